import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Item, SecondReview } from '../../server/src/models/index.ts';
import { collectionAgreement } from '../../server/src/services/agreement.ts';
import { approvedInSample, doubleReviewShare } from '../../server/src/services/review.ts';
import { DEMO_DOUBLE_REVIEW_SHARE, loadReviewDemoState } from '../../scripts/demo/review-state.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeItem, makeSubject, makeSuggestion } from '../helpers/fixtures.ts';
import { makePerson } from '../helpers/people.ts';

let sequelize: Sequelize;
beforeAll(async () => {
  ({ sequelize } = await openTestDatabase());
  await resetDatabase(sequelize);
});
afterAll(async () => {
  await sequelize.close();
});

describe('the review desk part of the demo', () => {
  it('sets the double-review share and gives the sampled approved items a second review by another editor, once', async () => {
    const c = await makeCollection();
    const editors = [await makePerson('editor'), await makePerson('editor'), await makePerson('editor')];
    const subjects = await Promise.all(['quay', 'net', 'crane'].map((prefLabel) => makeSubject(c, { prefLabel })));
    for (let i = 0; i < 60; i++) {
      const item = await makeItem(c, { state: 'approved' });
      await Item.update({ approvedBy: editors[i % 3]!.id }, { where: { id: item.id } });
      await makeSuggestion(item, subjects[i % 3]!, 'added');
    }
    const first = await loadReviewDemoState(sequelize);
    expect(await doubleReviewShare(c.id)).toBe(DEMO_DOUBLE_REVIEW_SHARE);
    const sample = await approvedInSample(sequelize, c.id);
    // a fifth of 60, give or take the hash
    expect(sample.length).toBeGreaterThan(4);
    expect(sample.length).toBeLessThan(25);
    expect(first.secondReviews).toBe(sample.length);
    for (const r of await SecondReview.findAll()) expect(r.reviewerId).not.toBe(r.firstReviewerId);
    expect((await loadReviewDemoState(sequelize)).secondReviews).toBe(0);
    const agreement = await collectionAgreement(sequelize, c.id);
    expect(agreement.perSubject.length).toBeGreaterThan(0);
    expect(agreement.perPair.length).toBeGreaterThan(0);
  });
});
