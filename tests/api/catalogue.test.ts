import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import { Item } from '../../server/src/models/index.ts';
import { booleanQuery } from '../../server/src/services/catalogue.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection, makeItem, makeSubject, makeSuggestion } from '../helpers/fixtures.ts';
import { signIn, type SignedIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let app: CartoucheApp;
let manager: SignedIn;
let editor: SignedIn;

beforeAll(async () => {
  const opened = await openTestDatabase();
  sequelize = opened.sequelize;
  await resetDatabase(sequelize);
  app = createApp({ config: opened.config, sequelize });
  manager = await signIn(app, 'manager');
  editor = await signIn(app, 'editor');
});
afterAll(async () => {
  await sequelize.close();
});

const ids = (body: { items: Array<{ identifier: string }> }) => body.items.map((i) => i.identifier);

describe('the catalogue search (MariaDB FULLTEXT, BOOLEAN MODE with prefixes)', () => {
  it('finds an item by a word of its OCR text, by a subject’s alternative label, by identifier and caption; filters by state and reviewer', async () => {
    const c = await makeCollection();
    const ship = await makeSubject(c, { prefLabel: 'sailing ship' });
    await ship.update({ altLabels: ['tall ship', 'square-rigger'] });
    const poster = await makeItem(c, { identifier: 'KHM-PO-0007' });
    // as the OCR stage stores it (raw SQL, like the service does)
    await sequelize.query("UPDATE items SET ocr_text = 'GRAND REGATTA\nKestrelmouth 1892', updated_at = NOW(3) WHERE id = :id", { replacements: { id: poster.id } });
    const plate = await makeItem(c, { identifier: 'KHM-PL-0012' });
    await plate.update({ caption: 'The barque leaving the inner basin' });
    await makeSuggestion(plate, ship, 'accepted');
    const other = await makeItem(c, { identifier: 'KHM-PL-0013' });
    await makeSuggestion(other, ship, 'proposed');

    const search = async (q: string, extra = '') => (await manager.agent.get(`/api/items?collectionId=${c.id}&q=${encodeURIComponent(q)}${extra}`).expect(200)).body;
    expect(ids(await search('regatta'))).toEqual(['KHM-PO-0007']);
    expect(ids(await search('regat'))).toEqual(['KHM-PO-0007']);
    // alternative labels of confirmed subjects only: a mere proposal is not a description
    expect(ids(await search('tall ship'))).toEqual(['KHM-PL-0012']);
    expect(ids(await search('rigger'))).toEqual(['KHM-PL-0012']);
    expect(ids(await search('barque basin'))).toEqual(['KHM-PL-0012']);
    expect(ids(await search('KHM-PL-0012'))).toEqual(['KHM-PL-0012']);
    // stop words ("the") and short words are left out of the required terms, and said so
    const withStop = await search('the barque');
    expect(ids(withStop)).toEqual(['KHM-PL-0012']);
    expect(withStop.ignoredWords).toEqual(['the']);

    // a subject relabelled after the last search is found at once under its new label
    await ship.update({ altLabels: ['tall ship', 'windjammer'] });
    expect(ids(await search('windjammer'))).toEqual(['KHM-PL-0012']);

    // an approval through the desk is found by its alt text and filtered by reviewer and date
    const v = (await Item.findByPk(other.id))!.version;
    await editor.agent.post(`/api/review/items/${other.id}/approve`).set('x-csrf-token', editor.csrf).send({ version: v, altText: 'Engraving of a paddle steamer at the quay', longDescription: '', decorative: false }).expect(200);
    expect(ids(await search('paddle steamer'))).toEqual(['KHM-PL-0013']);
    const today = new Date().toISOString().slice(0, 10);
    expect(ids(await search('', `&state=approved&reviewerId=${editor.user.id}&from=${today}&to=${today}`))).toEqual(['KHM-PL-0013']);
    expect(ids(await search('', `&subjectId=${ship.id}`))).toEqual(['KHM-PL-0012']);
    const page = await search('', '&pageSize=2&page=2');
    expect(page).toMatchObject({ total: 3, page: 2, pageSize: 2 });
    expect(ids(page)).toEqual(['KHM-PO-0007']);
    await manager.agent.get(`/api/items?collectionId=${c.id}&from=2026-05-01&to=2026-04-01`).expect(400);
  });

  it('shows an item page with its history: who decided what, when, from which model version', async () => {
    const c = await makeCollection();
    const s = await makeSubject(c, { prefLabel: 'lighthouse' });
    const item = await makeItem(c, { state: 'suggested' });
    await makeSuggestion(item, s);
    await editor.agent.post(`/api/review/items/${item.id}/subjects`).set('x-csrf-token', editor.csrf).send({ version: item.version, subjectId: s.id, decision: 'accept' }).expect(200);
    const res = await manager.agent.get(`/api/items/${item.id}`).expect(200);
    expect(res.body.item.subjects).toEqual([{ id: s.id, prefLabel: 'lighthouse', kind: 'subject', state: 'accepted' }]);
    expect(res.body.history).toHaveLength(1);
    expect(res.body.history[0]).toMatchObject({ action: 'review-subject-accepted', actor: { id: editor.user.id }, summary: 'accepted subject “lighthouse”' });
  });

  it('builds InnoDB boolean queries: every word required, prefix-matched, stop words and short words left out', () => {
    // innodb_ft_min_token_size defaults to 3 and the default stop-word list holds "the", "of", "a" (MariaDB docs, from memory)
    expect(booleanQuery('The light of Kestrel Point')).toBe('+light* +kestrel* +point*');
    expect(booleanQuery('KHM-PL-0012')).toBe('+khm* +0012*');
    expect(booleanQuery('a of')).toBeNull();
    expect(booleanQuery('"unbalanced (quote')).toBe('+unbalanced* +quote*');
  });
});
