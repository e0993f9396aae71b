import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cohenKappa } from '../../server/src/ml/metrics.ts';
import { SecondReview, Suggestion } from '../../server/src/models/index.ts';
import { collectionAgreement } from '../../server/src/services/agreement.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeItem, makeSubject } from '../helpers/fixtures.ts';
import { makePerson } from '../helpers/people.ts';

let sequelize: Sequelize;
beforeAll(async () => {
  ({ sequelize } = await openTestDatabase());
  await resetDatabase(sequelize);
});
afterAll(async () => {
  await sequelize.close();
});

describe('agreement between editors on blind second reviews', () => {
  it("reproduces a published 2×2 example per pair of editors and per subject agrees with cohenKappa on the same judgements", async () => {
    const c = await makeCollection();
    const first = await makePerson('editor', { displayName: 'Ada Netmender' });
    const second = await makePerson('editor', { displayName: 'Bryn Capstan' });
    const subjects = await Promise.all(['anchor', 'buoy', 'crane', 'dock', 'eel trap'].map((prefLabel) => makeSubject(c, { prefLabel })));
    // Wikipedia "Cohen's kappa" worked example (from memory): 50 judgements, both yes 20, first yes/second no 5,
    // first no/second yes 10, both no 15 → p_o = 0.7, p_e = 0.5, kappa = 0.4. Spread over 10 items × 5 subjects.
    const cells: Array<[boolean, boolean]> = [...Array(20).fill([true, true]), ...Array(5).fill([true, false]), ...Array(10).fill([false, true]), ...Array(15).fill([false, false])];
    const bySubject = new Map<number, { a: number[]; b: number[] }>();
    for (let i = 0; i < 10; i++) {
      const item = await makeItem(c, { state: 'approved' });
      await item.update({ approvedBy: first.id });
      const judgements = [];
      for (const [j, s] of subjects.entries()) {
        const [a, b] = cells[i * 5 + j]!;
        await Suggestion.create({ itemId: item.id, subjectId: s.id, subjectModelId: null, runId: null, score: 0.5, probability: 0.5, state: a ? 'accepted' : 'rejected', decidedBy: first.id, decidedAt: new Date() });
        judgements.push({ subjectId: s.id, present: b, subjectModelId: null });
        const t = bySubject.get(s.id) ?? { a: [], b: [] };
        t.a.push(a ? 1 : 0);
        t.b.push(b ? 1 : 0);
        bySubject.set(s.id, t);
      }
      await SecondReview.create({ itemId: item.id, reviewerId: second.id, firstReviewerId: first.id, judgements });
    }
    const result = await collectionAgreement(sequelize, c.id);
    expect(result.perPair).toHaveLength(1);
    expect(result.perPair[0]).toMatchObject({ editorA: { id: first.id, name: 'Ada Netmender' }, editorB: { id: second.id, name: 'Bryn Capstan' }, items: 10 });
    expect(result.perPair[0]!.kappa).toBeCloseTo(0.4, 10);
    expect(result.perSubject.map((s) => s.label)).toEqual(['anchor', 'buoy', 'crane', 'dock', 'eel trap']);
    for (const s of result.perSubject) {
      const t = bySubject.get(s.subjectId)!;
      expect(s.items).toBe(10);
      expect(s.kappa).toBeCloseTo(cohenKappa(t.a, t.b), 10);
    }
  });

  it('counts a subject only the second editor added as absent for the first, leaves out undefined kappas, and an empty collection has no figures', async () => {
    const c = await makeCollection();
    expect(await collectionAgreement(sequelize, c.id)).toEqual({ perSubject: [], perPair: [] });
    const first = await makePerson('editor');
    const second = await makePerson('editor');
    const s = await makeSubject(c, { prefLabel: 'net loft' });
    const item = await makeItem(c, { state: 'approved' });
    await item.update({ approvedBy: first.id });
    await SecondReview.create({ itemId: item.id, reviewerId: second.id, firstReviewerId: first.id, judgements: [{ subjectId: s.id, present: true, subjectModelId: null }] });
    const r = await collectionAgreement(sequelize, c.id);
    // one judgement is too few for a kappa: it is left out, not shown as a figure
    expect(r.perSubject).toEqual([{ subjectId: s.id, label: 'net loft', items: 1, kappa: null }]);
    // a second item where both say yes: the first says no then yes, the second yes twice → p_o = 0.5, p_e = 0.5, kappa 0
    const again = await makeItem(c, { state: 'approved' });
    await again.update({ approvedBy: first.id });
    await Suggestion.create({ itemId: again.id, subjectId: s.id, subjectModelId: null, runId: null, score: null, probability: null, state: 'added', decidedBy: first.id, decidedAt: new Date() });
    await SecondReview.create({ itemId: again.id, reviewerId: second.id, firstReviewerId: first.id, judgements: [{ subjectId: s.id, present: true, subjectModelId: null }] });
    const two = await collectionAgreement(sequelize, c.id);
    expect(two.perSubject).toEqual([{ subjectId: s.id, label: 'net loft', items: 2, kappa: 0 }]);
    expect(two.perPair[0]).toMatchObject({ items: 2, kappa: 0 });
  });
});
