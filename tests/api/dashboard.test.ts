import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { collectionAgreement } from '../../server/src/services/agreement.ts';
import { coverageOverTime, precisionBySubject, reviewThroughput } from '../../server/src/services/dashboard.ts';
import { startRun } from '../../server/src/services/runs.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection } from '../helpers/fixtures.ts';
import { seedLedger, type LedgerSeed } from '../helpers/ledger-seed.ts';
import { signIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let app: CartoucheApp;
let seed: LedgerSeed;
const NOW = new Date('2026-12-02T12:00:00Z'); // a Wednesday

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  await resetDatabase(sequelize);
  app = createApp({ config, sequelize });
  seed = await seedLedger(sequelize, config);
  // a blind second review of plate 0001 by the other editor
  const s = seed.subjects;
  await sequelize.query('INSERT INTO second_reviews (item_id, reviewer_id, first_reviewer_id, judgements) VALUES (:item, :second, :first, :judgements)', {
    replacements: {
      item: seed.items[0]!.id,
      second: seed.editors[1].id,
      first: seed.editors[0].id,
      judgements: JSON.stringify([
        { subjectId: s.engraving.id, present: true, subjectModelId: null },
        { subjectId: s.lighthouse.id, present: true, subjectModelId: null },
        { subjectId: s.storm.id, present: true, subjectModelId: null },
        { subjectId: s.pier.id, present: false, subjectModelId: null },
      ]),
    },
  });
});
afterAll(async () => {
  await sequelize.close();
});

describe('dashboard aggregates', () => {
  it('coverage over time: per ISO week, items that existed by its end and those approved by then (from approved_at)', async () => {
    await makeCollection({ name: 'Empty drawer' });
    const { weeks, series } = await coverageOverTime(sequelize, { weeks: 12, now: NOW });
    expect(weeks[0]).toBe('2026-09-14');
    expect(weeks.at(-1)).toBe('2026-11-30');
    const plates = series.find((x) => x.collectionId === seed.collection.id)!;
    const at = (w: string) => plates.points.find((p) => p.week === w)!;
    expect(at('2026-09-21')).toEqual({ week: '2026-09-21', items: 0, approved: 0, coverage: null });
    expect(at('2026-09-28')).toMatchObject({ items: 1, approved: 1, coverage: 1 });
    expect(at('2026-10-26')).toMatchObject({ items: 1, approved: 1 });
    expect(at('2026-11-02')).toMatchObject({ items: 5, approved: 1, coverage: 0.2 });
    expect(at('2026-11-16')).toMatchObject({ items: 6, approved: 1 });
    // 0002 was approved on Sunday 29 November at 23:30 UTC: still the week of the 23rd
    expect(at('2026-11-23')).toMatchObject({ items: 6, approved: 4 });
    expect(at('2026-11-30')).toMatchObject({ items: 6, approved: 4, coverage: 4 / 6 });
    const empty = series.find((x) => x.name === 'Empty drawer')!;
    expect(empty.points.every((p) => p.items === 0 && p.coverage === null)).toBe(true);
  });

  it('review throughput per week and editor: approvals and subject decisions', async () => {
    const t = await reviewThroughput(sequelize, seed.collection.id, { weeks: 12, now: NOW });
    expect(t.editors.map((e) => e.name)).toEqual(['Ilse Brackwater', 'Morwen Tidewell']);
    const name = new Map(t.editors.map((e) => [e.id, e.name]));
    expect(t.rows.map((r) => [r.week, name.get(r.editorId), r.approved, r.decisions])).toEqual([
      ['2026-09-28', 'Morwen Tidewell', 1, 2],
      ['2026-11-23', 'Ilse Brackwater', 2, 2],
      ['2026-11-23', 'Morwen Tidewell', 1, 4],
    ]);
  });

  it('suggestion precision per subject: accepted ÷ (accepted + rejected); editor-added subjects are counted apart', async () => {
    const p = await precisionBySubject(sequelize, seed.collection.id);
    expect(p.map((s) => [s.label, s.accepted, s.rejected, s.added, s.waiting, s.precision])).toEqual([
      ['engraving', 1, 0, 0, 0, 1],
      ['lighthouse', 2, 1, 0, 1, 2 / 3],
      ['pier & jetty', 1, 0, 1, 0, 1],
      ['storm', 0, 1, 1, 0, 0],
    ]);
  });
});

describe('GET /api/collections/:id/dashboard and /api/dashboard/coverage', () => {
  it('answers a manager with throughput, precision, the editors’ agreement and the last runs', async () => {
    await startRun(sequelize, seed.collection.id, 'manual', null);
    const { agent } = await signIn(app, 'manager');
    const res = await agent.get(`/api/collections/${seed.collection.id}/dashboard?weeks=8`).expect(200);
    expect(res.body.throughput.weeks.length).toBe(8);
    expect(res.body.precision.length).toBe(4);
    expect(res.body.runs).toEqual([expect.objectContaining({ status: 'queued', trigger: 'manual' })]);
    // the agreement panel shows what the review desk's agreement service computes, unchanged
    expect(res.body.agreement).toEqual(JSON.parse(JSON.stringify(await collectionAgreement(sequelize, seed.collection.id))));
    // by hand, Cohen's κ = (p_o − p_e) / (1 − p_e) (Cohen 1960; common formula): the two editors agree on 2 of 4
    // subject judgements (p_o = 0.5), each said "present" 3 times of 4 (p_e = 0.75² + 0.25² = 0.625) → κ = −1/3
    expect(res.body.agreement.perPair).toEqual([
      { editorA: { id: seed.editors[0].id, name: 'Morwen Tidewell' }, editorB: { id: seed.editors[1].id, name: 'Ilse Brackwater' }, items: 1, kappa: expect.closeTo(-1 / 3, 10) },
    ]);
    const coverage = await agent.get('/api/dashboard/coverage?weeks=4').expect(200);
    expect(coverage.body.weeks.length).toBe(4);
    expect(coverage.body.series.map((x: { name: string }) => x.name)).toEqual(['Empty drawer', 'Harbour plates']);
  });

  it('refuses a weeks value out of range and an unknown collection', async () => {
    const { agent } = await signIn(app, 'editor');
    const bad = await agent.get('/api/dashboard/coverage?weeks=500').expect(400);
    expect(bad.body.errors[0]).toMatchObject({ path: 'weeks', message: 'At most 104 weeks (two years).' });
    await agent.get('/api/collections/999999/dashboard').expect(404);
  });
});
