/**
 * The review desk's part of the demo: each collection reviews a fifth of its items twice, and the approved
 * items of that share already have a blind second review by another demo editor, so the catalogue's agreement
 * figures show something on the first start. The second editor mostly agrees; where an invented, deterministic
 * coin says so they leave out a subject or see one more — the kind of disagreement kappa is there to show.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import { Collection, SecondReview, Subject, Suggestion, User } from '../../server/src/models/index.ts';
import { approvedInSample } from '../../server/src/services/review.ts';
import { hashString } from './prng.ts';

export const DEMO_DOUBLE_REVIEW_SHARE = 0.2;

export async function loadReviewDemoState(sequelize: Sequelize): Promise<{ secondReviews: number }> {
  const editors = await User.findAll({ where: { role: 'editor', active: true }, order: [['id', 'ASC']] });
  let secondReviews = 0;
  for (const c of await Collection.findAll({ order: [['id', 'ASC']] })) {
    await sequelize.query('INSERT INTO review_settings (collection_id, double_review_share) VALUES (:id, :share) ON DUPLICATE KEY UPDATE double_review_share = VALUES(double_review_share)', {
      replacements: { id: c.id, share: DEMO_DOUBLE_REVIEW_SHARE },
      type: QueryTypes.INSERT,
    });
    const active = await Subject.findAll({ where: { collectionId: c.id, status: 'active' }, order: [['id', 'ASC']] });
    for (const item of await approvedInSample(sequelize, c.id)) {
      const others = editors.filter((e) => e.id !== item.approvedBy);
      if (others.length === 0 || (await SecondReview.count({ where: { itemId: item.id } })) > 0) continue;
      const reviewer = others[hashString(item.identifier) % others.length]!;
      const firsts = await Suggestion.findAll({ where: { itemId: item.id, state: ['accepted', 'added'] } });
      const judgements = firsts.map((f) => ({ subjectId: f.subjectId, present: hashString(`${item.identifier}:${f.subjectId}`) % 6 !== 0, subjectModelId: f.subjectModelId }));
      const candidates = active.filter((s) => !firsts.some((f) => f.subjectId === s.id));
      if (candidates.length && hashString(`${item.identifier}:extra`) % 4 === 0) {
        judgements.push({ subjectId: candidates[hashString(item.identifier) % candidates.length]!.id, present: true, subjectModelId: null });
      }
      await SecondReview.create({ itemId: item.id, reviewerId: reviewer.id, firstReviewerId: item.approvedBy, judgements });
      secondReviews++;
    }
  }
  return { secondReviews };
}
