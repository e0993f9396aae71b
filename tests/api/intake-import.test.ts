import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import type { Sequelize } from 'sequelize';
import type request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { AuditEvent, ImportBatch, Item, type Collection } from '../../server/src/models/index.ts';
import type { ImportPreview, PreviewRow } from '../../server/src/services/metadata-import.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { makeCollection } from '../helpers/fixtures.ts';
import { signIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;

beforeAll(async () => {
  const dataDir = mkdtempSync(join(tmpdir(), 'cartouche-import-'));
  ({ sequelize, config } = await openTestDatabase({ dataDir, storageDir: join(dataDir, 'storage') }));
});
afterAll(async () => sequelize.close());
beforeEach(async () => resetDatabase(sequelize));

const app = () => createApp({ config, sequelize });

async function item(c: Collection, identifier: string, fileName: string, fields: Partial<Pick<Item, 'caption' | 'creator' | 'dateText' | 'rights'>> = {}): Promise<Item> {
  return Item.create({
    collectionId: c.id, identifier, fileName, fileKey: null, mimeType: null, width: null, height: null, byteSize: null,
    caption: fields.caption ?? null, creator: fields.creator ?? null, dateText: fields.dateText ?? null, rights: fields.rights ?? null,
    captionFlagNote: null, altText: null, longDescription: null, ocrText: null, approvedBy: null, approvedAt: null,
  });
}

function sendSheet(agent: request.Agent, csrf: string, collectionId: number, name: string, data: Buffer) {
  return agent.post(`/api/collections/${collectionId}/imports`).set('x-csrf-token', csrf).attach('sheet', data, name);
}

const byRow = (preview: ImportPreview) => new Map(preview.rows.map((r) => [r.row, r]));
const fields = async (id: number) => {
  const i = (await Item.findByPk(id))!;
  return { identifier: i.identifier, caption: i.caption, creator: i.creator, dateText: i.dateText, rights: i.rights, version: i.version };
};

describe('catalogue metadata import', () => {
  it('previews a CSV row by row (matches, changes, problems) without changing anything, then applies only the valid rows', async () => {
    const { agent, csrf, user } = await signIn(app(), 'archivist');
    const c = await makeCollection();
    const pier = await item(c, 'EAST-PIER', 'east-pier.jpg', { caption: 'Pier', rights: 'In copyright' });
    const cutter = await item(c, 'PILOT-CUTTER', 'pilot-cutter.tif');
    const lofts = await item(c, 'NET-LOFTS', 'net-lofts.png', { caption: 'Net lofts', creator: 'Ada Quill' });
    const twinA = await item(c, 'TWIN-A', 'plate.jpg');
    await item(c, 'TWIN-B', 'plate.jpg');
    const before = await Promise.all([pier, cutter, lofts, twinA].map((i) => fields(i.id)));

    const csv = [
      'Identifier,File name,Caption,Creator,Date,Rights,Shelf mark',
      'EAST-PIER,east-pier.jpg,The east pier at low water,,1903,CC BY 4.0,B12', // 2: change, matched by both
      ',PILOT-CUTTER.TIF,The pilot cutter at anchor,Tam Rook,c. 1910,,', // 3: change by file name (case-insensitive)
      'KHM-9999,,A plate nobody has,,,,', // 4: no match
      'NET-LOFTS,east-pier.jpg,Wrong pairing,,,,', // 5: identifier and file name point at different items
      ',,,,,,', // 6: empty row
      ',plate.jpg,Which plate?,,,,', // 7: two items share the file name
      `NET-LOFTS,,${'x'.repeat(10_001)},,,,`, // 8: caption too long
      'NET-LOFTS,,Net lofts,Ada Quill,,,', // 9: nothing to change
      'KHM-0042,plate.jpg,,,,,', // 10: ambiguous by file name, unknown identifier
      ',,A caption without a key,,,,', // 11: no identifier, no file name
      '',
    ].join('\r\n');

    const res = await sendSheet(agent, csrf, c.id, 'catalogue.csv', Buffer.from(csv)).expect(201);
    const preview = res.body.import as ImportPreview;
    expect(preview).toMatchObject({ sourceName: 'catalogue.csv', format: 'csv', status: 'previewed', summary: { rows: 10, changes: 2, unchanged: 1, problems: 7 } });
    expect(preview.columns.mapped.map((m) => m.field)).toEqual(['identifier', 'fileName', 'caption', 'creator', 'dateText', 'rights']);
    expect(preview.columns.ignored).toEqual(['Shelf mark']);
    const rows = byRow(preview);
    expect(rows.get(2)).toMatchObject({
      status: 'change',
      matchedBy: 'identifier and file name',
      item: { id: pier.id, identifier: 'EAST-PIER', version: pier.version },
      changes: [
        { field: 'caption', from: 'Pier', to: 'The east pier at low water' },
        { field: 'dateText', from: null, to: '1903' },
        { field: 'rights', from: 'In copyright', to: 'CC BY 4.0' },
      ],
    });
    expect(rows.get(3)).toMatchObject({ status: 'change', matchedBy: 'file name', item: { id: cutter.id }, changes: [{ field: 'caption' }, { field: 'creator', to: 'Tam Rook' }, { field: 'dateText', to: 'c. 1910' }] });
    const problem = (n: number) => (rows.get(n) as PreviewRow).problem;
    expect(problem(4)).toEqual({ code: 'no-match', message: 'No item of this collection has the identifier KHM-9999.' });
    expect(problem(5)).toMatchObject({ code: 'mismatch', message: expect.stringContaining('Identifier NET-LOFTS is the item made from net-lofts.png, not from east-pier.jpg. The file east-pier.jpg belongs to EAST-PIER.') });
    expect(problem(6)).toEqual({ code: 'empty-row', message: 'The row is empty.' });
    expect(problem(7)).toMatchObject({ code: 'ambiguous', message: expect.stringContaining('2 items were made from files named plate.jpg (TWIN-A, TWIN-B)') });
    expect(problem(8)).toMatchObject({ code: 'too-long', message: expect.stringContaining('Caption is 10,001 characters long; it holds at most 10,000') });
    expect(rows.get(9)).toMatchObject({ status: 'unchanged', changes: [], problem: null });
    expect(problem(10)).toMatchObject({ code: 'ambiguous' });
    expect(problem(11)).toMatchObject({ code: 'no-key' });
    // the preview changed nothing
    expect(await Promise.all([pier, cutter, lofts, twinA].map((i) => fields(i.id)))).toEqual(before);

    // the preview is kept on the server and reads back the same
    const again = await agent.get(`/api/collections/${c.id}/imports/${preview.id}`).expect(200);
    expect(again.body.import.rows).toEqual(preview.rows);

    const applied = await agent.post(`/api/collections/${c.id}/imports/${preview.id}/apply`).set('x-csrf-token', csrf).expect(200);
    const done = applied.body.import as ImportPreview;
    expect(done.status).toBe('applied');
    expect(done.result).toMatchObject({ applied: 2, refused: 0, rows: [{ row: 2, outcome: 'applied' }, { row: 3, outcome: 'applied' }] });
    expect(await fields(pier.id)).toEqual({ identifier: 'EAST-PIER', caption: 'The east pier at low water', creator: null, dateText: '1903', rights: 'CC BY 4.0', version: pier.version + 1 });
    expect(await fields(cutter.id)).toMatchObject({ caption: 'The pilot cutter at anchor', creator: 'Tam Rook', dateText: 'c. 1910' });
    // the rows with problems changed nothing: NET-LOFTS (rows 5, 8, 9) and the twins are as they were
    expect(await fields(lofts.id)).toEqual(before[2]);
    expect(await fields(twinA.id)).toEqual(before[3]);
    const event = await AuditEvent.findOne({ where: { action: 'metadata-imported' } });
    expect(event).toMatchObject({ actorId: user.id, targetId: String(preview.id), detail: { applied: 2, refused: 0, sourceName: 'catalogue.csv' } });

    const twice = await agent.post(`/api/collections/${c.id}/imports/${preview.id}/apply`).set('x-csrf-token', csrf).expect(409);
    expect(twice.body.title).toBe('Already applied');
  });

  it('refuses a row whose item changed between preview and apply, and applies the rest', async () => {
    const { agent, csrf } = await signIn(app(), 'archivist');
    const c = await makeCollection();
    const pier = await item(c, 'EAST-PIER', 'east-pier.jpg');
    const quay = await item(c, 'QUAY', 'quay.jpg');
    const csv = 'identifier,caption\nEAST-PIER,The east pier from the lighthouse\nQUAY,The quay at dusk\n';
    const preview = (await sendSheet(agent, csrf, c.id, 'captions.csv', Buffer.from(csv)).expect(201)).body.import as ImportPreview;
    expect(preview.summary).toMatchObject({ changes: 2, problems: 0 });

    // an editor corrects the pier's caption in the meantime
    const editorCopy = (await Item.findByPk(pier.id))!;
    await editorCopy.update({ caption: 'East pier, corrected by an editor' });

    const done = (await agent.post(`/api/collections/${c.id}/imports/${preview.id}/apply`).set('x-csrf-token', csrf).expect(200)).body.import as ImportPreview;
    expect(done.result!.rows).toEqual([
      { row: 2, itemId: pier.id, identifier: 'EAST-PIER', outcome: 'stale', message: expect.stringContaining('was changed after the preview') },
      { row: 3, itemId: quay.id, identifier: 'QUAY', outcome: 'applied', message: 'QUAY: caption updated.' },
    ]);
    expect((await Item.findByPk(pier.id))!.caption).toBe('East pier, corrected by an editor');
    expect((await Item.findByPk(quay.id))!.caption).toBe('The quay at dusk');
  });

  it('reads an XLSX workbook with other header names, dates, numbers and rich text, and sets identifiers matched by file name', async () => {
    const { agent, csrf } = await signIn(app(), 'archivist');
    const c = await makeCollection();
    const lantern = await item(c, 'LANTERN', 'lantern.png');
    const bell = await item(c, 'BELL', 'bell.tif');
    const other = await item(c, '1983', 'taken.jpg');

    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Catalogue 1903');
    ws.addRow(['Object number', 'Image file', 'Title', 'Artist', 'dc:date', 'Licence']);
    ws.addRow(['KHM 1903/12', 'lantern.png', { richText: [{ text: 'The harbour ' }, { text: 'lantern', font: { italic: true } }] }, 'Ada Quill', new Date(Date.UTC(1903, 4, 1)), 'Public domain']);
    ws.addRow([1983, 'bell.tif', 'The fog bell', null, 1911, null]);
    const data = Buffer.from(await wb.xlsx.writeBuffer());

    const preview = (await sendSheet(agent, csrf, c.id, 'catalogue.xlsx', data).expect(201)).body.import as ImportPreview;
    expect(preview).toMatchObject({ format: 'xlsx', columns: { sheetName: 'Catalogue 1903', ignored: [] } });
    const rows = byRow(preview);
    expect(rows.get(2)).toMatchObject({
      status: 'change',
      matchedBy: 'file name',
      changes: [
        { field: 'identifier', from: 'LANTERN', to: 'KHM 1903/12' },
        { field: 'caption', from: null, to: 'The harbour lantern' },
        { field: 'creator', to: 'Ada Quill' },
        { field: 'dateText', to: '1903-05-01' },
        { field: 'rights', to: 'Public domain' },
      ],
    });
    // 1983 is another item's identifier: that row matches the other item by identifier, and its file name disagrees
    expect(rows.get(3)).toMatchObject({ status: 'problem', problem: { code: 'mismatch' }, item: { id: other.id } });

    await agent.post(`/api/collections/${c.id}/imports/${preview.id}/apply`).set('x-csrf-token', csrf).expect(200);
    expect(await fields(lantern.id)).toMatchObject({ identifier: 'KHM 1903/12', caption: 'The harbour lantern', dateText: '1903-05-01' });
    expect(await fields(bell.id)).toMatchObject({ identifier: 'BELL', caption: null });
  });

  it('reports rows that repeat or contradict each other, and identifiers that are taken', async () => {
    const { agent, csrf } = await signIn(app(), 'archivist');
    const c = await makeCollection();
    await item(c, 'A', 'a.jpg');
    await item(c, 'B', 'b.jpg');
    await item(c, 'C', 'c.jpg');
    await item(c, 'D', 'd.jpg');
    const csv = [
      'identifier,file name,caption',
      'A,,Same text', // 2
      'A,,Same text', // 3: repeats row 2
      'B,,One text', // 4
      ',b.jpg,Another text', // 5: contradicts row 4
      'D,c.jpg,', // 6: identifier D and file c.jpg are two different items
      'NEW-1,c.jpg,', // 7
      'NEW-1,d.jpg,', // 8: same new identifier for two items
    ].join('\n');
    const preview = (await sendSheet(agent, csrf, c.id, 'x.csv', Buffer.from(csv)).expect(201)).body.import as ImportPreview;
    const rows = byRow(preview);
    expect(rows.get(2)).toMatchObject({ status: 'change' });
    expect(rows.get(3)!.problem).toMatchObject({ code: 'duplicate-row', message: expect.stringContaining('Row 2 already brings in the same for A') });
    expect(rows.get(4)!.problem).toMatchObject({ code: 'conflicting-rows', message: 'Row 5 also describes B, differently. Keep one row per item.' });
    expect(rows.get(5)!.problem).toMatchObject({ code: 'conflicting-rows' });
    expect(rows.get(6)!.problem).toMatchObject({ code: 'mismatch' });
    expect(rows.get(7)!.problem).toMatchObject({ code: 'identifier-taken', message: 'Row 8 would give the same identifier to another item.' });
    expect(rows.get(8)!.problem).toMatchObject({ code: 'identifier-taken' });
    expect(preview.summary).toMatchObject({ changes: 1, problems: 6 });
  });

  it('refuses a sheet it cannot use as a whole, keeping no preview', async () => {
    const { agent, csrf } = await signIn(app(), 'archivist');
    const c = await makeCollection();
    const noKey = await sendSheet(agent, csrf, c.id, 'x.csv', Buffer.from('Caption,Creator\nA pier,Someone\n')).expect(400);
    expect(noKey.body).toMatchObject({ title: 'Sheet not usable', detail: expect.stringContaining('Name one column "identifier" or "file name" (found: "Caption", "Creator")') });
    const xls = await sendSheet(agent, csrf, c.id, 'old.xls', Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1, 0, 0, 0, 0])).expect(400);
    expect(xls.body.detail).toContain('older Excel format');
    const zip = await sendSheet(agent, csrf, c.id, 'x.xlsx', Buffer.from('PK\x03\x04 not really a workbook')).expect(400);
    expect(zip.body.title).toBe('Sheet not readable');
    const none = await agent.post(`/api/collections/${c.id}/imports`).set('x-csrf-token', csrf).field('x', 'y').expect(400);
    expect(none.body.title).toBe('No sheet');
    expect(await ImportBatch.count()).toBe(0);
    const editor = await signIn(app(), 'editor');
    await sendSheet(editor.agent, editor.csrf, c.id, 'x.csv', Buffer.from('identifier,caption\nA,b\n')).expect(403);
    await agent.get(`/api/collections/${c.id}/imports/12345`).expect(404);
  });
});
