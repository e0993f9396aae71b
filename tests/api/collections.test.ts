import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { Run } from '../../server/src/models/index.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeItem, makeSubject, makeSuggestion } from '../helpers/fixtures.ts';
import { signIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
});
afterAll(async () => sequelize.close());
beforeEach(async () => resetDatabase(sequelize));

describe('GET /api/collections', () => {
  it('lists an empty catalogue as an empty list', async () => {
    const { agent } = await signIn(createApp({ config, sequelize }), 'manager');
    const res = await agent.get('/api/collections').expect(200);
    expect(res.body).toEqual({ collections: [] });
  });

  it('counts items, subjects, forms, waiting and approved items per collection', async () => {
    const plates = await makeCollection({ slug: 'plates', name: 'Engraved plates' });
    const photos = await makeCollection({ slug: 'photos', name: 'Glass plates', medium: 'photograph' });
    await makeCollection({ slug: 'old', name: 'Archived one', archivedAt: new Date() });

    const vessel = await makeSubject(plates, { prefLabel: 'vessel' });
    await makeSubject(plates, { prefLabel: 'sailing ship', broaderId: vessel.id });
    await makeSubject(plates, { prefLabel: 'lighthouse', status: 'draft' });
    await makeSubject(plates, { prefLabel: 'old term', status: 'retired' });
    await makeSubject(plates, { prefLabel: 'engraving', kind: 'form' });

    const a = await makeItem(plates);
    const b = await makeItem(plates);
    await makeItem(plates);
    const approved = await makeItem(plates, { state: 'approved', approvedAt: new Date() });
    await makeItem(plates, { state: 'approved', decorative: true, approvedAt: new Date() });
    // two proposals on one item count once; a proposal on an approved item is not waiting
    await makeSuggestion(a, vessel);
    await makeSuggestion(a, (await makeSubject(plates, { prefLabel: 'pier' })));
    await makeSuggestion(b, vessel, 'rejected');
    await makeSuggestion(approved, vessel);
    await Run.create({ collectionId: plates.id, trigger: 'manual', status: 'succeeded', requestedBy: null, startedAt: new Date('2026-11-30T02:00:00Z'), finishedAt: new Date('2026-11-30T02:05:00Z'), counts: {}, report: null, error: null });

    const { agent } = await signIn(createApp({ config, sequelize }), 'editor');
    const res = await agent.get('/api/collections').expect(200);
    expect(res.body.collections.map((c: { slug: string }) => c.slug)).toEqual(['plates', 'photos']);
    const [p, g] = res.body.collections;
    expect(p).toMatchObject({
      id: plates.id,
      name: 'Engraved plates',
      medium: 'engraving',
      itemCount: 5,
      subjectCount: 4,
      formCount: 1,
      suggestedCount: 1,
      approvedCount: 2,
      decorativeCount: 1,
      lastRunAt: '2026-11-30T02:05:00.000Z',
    });
    expect(g).toMatchObject({ id: photos.id, itemCount: 0, subjectCount: 0, formCount: 0, suggestedCount: 0, approvedCount: 0, lastRunAt: null });
  });
});
