import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { Collection, Item, Subject, Suggestion, User } from '../../server/src/models/index.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { buildDemoScenario } from '../../scripts/demo/index.ts';
import { loadDemoScenario } from '../../scripts/load-demo.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';

let sequelize: Sequelize;
const storage = new Storage(mkdtempSync(join(tmpdir(), 'cartouche-demo-')));

beforeAll(async () => {
  ({ sequelize } = await openTestDatabase());
});
afterAll(async () => sequelize.close());
beforeEach(async () => resetDatabase(sequelize));

describe('loading the demo scenario', () => {
  it('loads people, collections, vocabularies with broader subjects, items with stored images, and reviewed decisions', async () => {
    const scenario = buildDemoScenario();
    // the first items of each collection are enough to exercise every table; the full load runs in npm start
    const result = await loadDemoScenario(sequelize, storage, { itemsPerCollection: 12 });
    expect(result.loaded).toBe(true);
    expect(await User.count()).toBe(scenario.people.length);
    expect(await Collection.count()).toBe(scenario.collections.length);
    expect(await Subject.count()).toBe(scenario.collections.reduce((n, c) => n + c.subjects.length, 0));
    expect(await Subject.count({ where: { kind: 'form' } })).toBeGreaterThan(0);
    const narrower = await Subject.findOne({ where: { prefLabel: 'lighthouse' }, include: [{ model: Subject, as: 'broader' }] });
    expect((narrower as unknown as { broader: Subject | null })?.broader?.prefLabel).toBeTruthy();
    const items = await Item.findAll();
    expect(items).toHaveLength(12 * scenario.collections.length);
    for (const item of items) expect(await storage.has(item.fileKey!)).toBe(true);
    const approved = items.filter((i) => i.state === 'approved');
    for (const a of approved) expect(await Suggestion.count({ where: { itemId: a.id, state: 'added' } })).toBeGreaterThan(0);
  });

  it('dates the demo from the day it is loaded: scans in twelve weeks ago, approvals spread since, the last yesterday', async () => {
    const now = new Date('2026-12-02T12:00:00Z');
    await loadDemoScenario(sequelize, storage, { itemsPerCollection: 40, now });
    const day = 86_400_000;
    const items = await Item.findAll();
    for (const i of items) expect(i.createdAt.getTime()).toBe(now.getTime() - 84 * day);
    const approvals = items.filter((i) => i.approvedAt).map((i) => i.approvedAt!.getTime()).sort((a, b) => a - b);
    expect(approvals.length).toBeGreaterThan(2);
    expect(approvals[0]).toBe(now.getTime() - 77 * day);
    expect(approvals.at(-1)).toBeLessThanOrEqual(now.getTime() - day);
    // spread over more than one week, so the ledger's weekly lines have a history
    expect(approvals.at(-1)! - approvals[0]!).toBeGreaterThan(7 * day);
    const decided = await Suggestion.findAll({ where: { state: 'added' } });
    for (const d of decided) expect(d.decidedAt!.getTime()).toBeLessThan(now.getTime());
  });

  it('does nothing when the database already has collections', async () => {
    await loadDemoScenario(sequelize, storage, { itemsPerCollection: 2 });
    const again = await loadDemoScenario(sequelize, storage, { itemsPerCollection: 2 });
    expect(again.loaded).toBe(false);
    expect(again.reason).toMatch(/already holds/);
  });

  it('writes nothing at all when the scenario is inconsistent (one transaction)', async () => {
    const scenario = buildDemoScenario();
    const broken = structuredClone(scenario);
    const last = broken.collections.at(-1)!;
    last.items = last.items.slice(0, 2);
    last.items[1]!.reviewed = { altText: 'Engraving of a pier.', decorative: false, reviewerEmail: 'nobody@nowhere.example', approvedAt: '2026-01-01T00:00:00Z' };
    for (const c of broken.collections.slice(0, -1)) c.items = c.items.slice(0, 2);
    await expect(loadDemoScenario(sequelize, storage, { scenario: broken })).rejects.toThrow(/not a demo person/);
    expect(await User.count()).toBe(0);
    expect(await Collection.count()).toBe(0);
    expect(await Item.count()).toBe(0);
  });
});
