import { QueryTypes, type Sequelize } from 'sequelize';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { Item, Suggestion } from '../../server/src/models/index.ts';
import { listTables, openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeItem, makeSubject, makeSuggestion } from '../helpers/fixtures.ts';

let sequelize: Sequelize;
let dbName: string;

beforeAll(async () => {
  const opened = await openTestDatabase();
  sequelize = opened.sequelize;
  dbName = opened.config.db.name;
});
afterAll(async () => sequelize.close());
beforeEach(async () => resetDatabase(sequelize));

describe('the schema made by the migrations', () => {
  it('has the tables of the data model, with foreign keys', async () => {
    const tables = await listTables(sequelize);
    for (const t of ['users', 'collections', 'subjects', 'examples', 'items', 'embeddings', 'subject_models', 'suggestions', 'runs', 'jobs', 'audit_events', 'exports', 'sessions']) {
      expect(tables).toContain(t);
    }
    const fks = await sequelize.query<{ t: string; c: string; r: string }>(
      `SELECT TABLE_NAME AS t, COLUMN_NAME AS c, REFERENCED_TABLE_NAME AS r FROM information_schema.KEY_COLUMN_USAGE
        WHERE TABLE_SCHEMA = :db AND REFERENCED_TABLE_NAME IS NOT NULL ORDER BY t, c`,
      { type: QueryTypes.SELECT, replacements: { db: dbName } },
    );
    const has = (t: string, c: string, r: string) => fks.some((f) => f.t === t && f.c === c && f.r === r);
    expect(has('suggestions', 'item_id', 'items')).toBe(true);
    expect(has('suggestions', 'subject_id', 'subjects')).toBe(true);
    expect(has('subjects', 'broader_id', 'subjects')).toBe(true);
    expect(has('items', 'collection_id', 'collections')).toBe(true);
    expect(has('examples', 'subject_id', 'subjects')).toBe(true);
  });

  it('rejects a suggestion for an item that does not exist (foreign key) and a second suggestion of one subject for one item', async () => {
    const c = await makeCollection();
    const s = await makeSubject(c);
    const item = await makeItem(c);
    await makeSuggestion(item, s);
    await expect(makeSuggestion(item, s)).rejects.toMatchObject({ name: 'SequelizeUniqueConstraintError' });
    await expect(sequelize.query(`INSERT INTO suggestions (item_id, subject_id, state) VALUES (999999, ${s.id}, 'proposed')`)).rejects.toThrow(/foreign key/i);
  });

  it('deleting a collection removes its subjects, items and suggestions (cascade)', async () => {
    const c = await makeCollection();
    const s = await makeSubject(c);
    await makeSuggestion(await makeItem(c), s);
    await c.destroy();
    expect(await Item.count()).toBe(0);
    expect(await Suggestion.count()).toBe(0);
  });

  it('locks items optimistically: a stale copy cannot overwrite a newer edit', async () => {
    const c = await makeCollection();
    const item = await makeItem(c);
    const first = await Item.findByPk(item.id);
    const second = await Item.findByPk(item.id);
    await first!.update({ altText: 'An engraving of the harbour mouth.' });
    await expect(second!.update({ altText: 'A photograph of a pier.' })).rejects.toThrow(/stale|OptimisticLock/i);
    expect((await Item.findByPk(item.id))?.altText).toBe('An engraving of the harbour mouth.');
  });

  it('locks suggestions optimistically too', async () => {
    const c = await makeCollection();
    const sug = await makeSuggestion(await makeItem(c), await makeSubject(c));
    const a = await Suggestion.findByPk(sug.id);
    const b = await Suggestion.findByPk(sug.id);
    await a!.update({ state: 'accepted' });
    await expect(b!.update({ state: 'rejected' })).rejects.toThrow(/stale|OptimisticLock/i);
  });
});
