import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as XLSX from 'xlsx';
import { createApp, type CartoucheApp } from '../../server/src/app.ts';
import type { AppConfig } from '../../server/src/config.ts';
import { exportTasks } from '../../jobs/src/tasks/export-build.ts';
import { NightShiftWorker } from '../../jobs/src/worker.ts';
import { LEDGER_SHEETS } from '../../server/src/services/exports/ledger.ts';
import { openTestDatabase, resetDatabase } from '../helpers/db.ts';
import { SEED_PERIOD, seedLedger, type LedgerSeed } from '../helpers/ledger-seed.ts';
import { signIn, type SignedIn } from '../helpers/people.ts';

let sequelize: Sequelize;
let config: AppConfig;
let app: CartoucheApp;
let seed: LedgerSeed;
let manager: SignedIn;
let worker: NightShiftWorker;
let workbook: Buffer;
const dir = mkdtempSync(join(tmpdir(), 'cartouche-ledger-'));

beforeAll(async () => {
  ({ sequelize, config } = await openTestDatabase());
  await resetDatabase(sequelize);
  app = createApp({ config, sequelize });
  worker = new NightShiftWorker({ sequelize, tasks: exportTasks({ config }) });
  seed = await seedLedger(sequelize, config);
  manager = await signIn(app, 'manager');
  const asked = await manager.agent
    .post(`/api/collections/${seed.collection.id}/exports`)
    .set('x-csrf-token', manager.csrf)
    .send({ kind: 'ledger_xlsx', periodFrom: SEED_PERIOD.from, periodTo: SEED_PERIOD.to })
    .expect(202);
  expect(asked.body.export.status).toBe('queued');
  expect(await worker.runOnce()).toBe(true);
  const done = await manager.agent.get(`/api/exports/${asked.body.export.id}`).expect(200);
  expect(done.body.export).toMatchObject({ status: 'ready', rowCount: 6, kind: 'ledger_xlsx', fileName: 'ledger-harbour-plates-2026-11-23-to-2026-11-29.xlsx' });
  const file = await manager.agent.get(done.body.export.downloadUrl).buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on('data', (c: Buffer) => chunks.push(c));
    res.on('end', () => cb(null, Buffer.concat(chunks)));
  });
  expect(file.status).toBe(200);
  expect(file.headers['content-disposition']).toContain('ledger-harbour-plates-2026-11-23-to-2026-11-29.xlsx');
  workbook = file.body as Buffer;
  writeFileSync(join(dir, 'ledger.xlsx'), workbook);
});
afterAll(async () => {
  await sequelize.close();
});

const HEADERS = {
  Summary: ['Figure', 'Value'],
  'By subject': ['Subject', 'Kind', 'Concept URI', 'Items with the subject', 'Accepted in period', 'Rejected in period', 'Added by editors in period', 'Waiting for review', 'Precision in period'],
  'By editor': ['Editor', 'Role', 'Items approved', 'of which decorative', 'Subjects accepted', 'Subjects rejected', 'Subjects added', 'Last activity in period'],
  Items: ['Identifier', 'File', 'Form', 'Subjects', 'Concept URIs', 'Alt text', 'Alt text characters', 'Long description', 'Decorative', 'State', 'Reviewer', 'Approved', 'Added', 'Caption'],
};

describe('the coverage ledger read back with exceljs (the library that wrote it, reading)', () => {
  it('has the four sheets in order, each with its header, a frozen header row and an auto-filter over its rows', async () => {
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(workbook as unknown as ArrayBuffer);
    expect(wb.worksheets.map((w) => w.name)).toEqual([...LEDGER_SHEETS]);
    for (const ws of wb.worksheets) {
      const want = HEADERS[ws.name as keyof typeof HEADERS];
      expect((ws.getRow(1).values as unknown[]).slice(1)).toEqual(want);
      expect(ws.views[0]).toMatchObject({ state: 'frozen', ySplit: 1 });
      expect(ws.autoFilter).toBeTruthy();
      expect(ws.getRow(1).font?.bold).toBe(true);
    }
    const items = wb.getWorksheet('Items')!;
    expect(items.rowCount).toBe(7);
    expect(items.getColumn(6).width).toBe(60);
  });

  it('holds the figures of the week: coverage 4 of 6 as a percentage, counts as whole numbers', async () => {
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(workbook as unknown as ArrayBuffer);
    const summary = wb.getWorksheet('Summary')!;
    const byFigure = new Map<string, ExcelJS.Cell>();
    summary.eachRow((row, n) => n > 1 && byFigure.set(String(row.getCell(1).value), row.getCell(2)));
    expect(byFigure.get('Items')!.value).toBe(6);
    expect(byFigure.get('Items')!.numFmt).toBe('#,##0');
    expect(byFigure.get('Items approved (alt text or decorative)')!.value).toBe(4);
    expect(byFigure.get('Coverage (working figure)')!.value).toBeCloseTo(4 / 6, 10);
    expect(byFigure.get('Coverage (working figure)')!.numFmt).toBe('0.0%');
    // approved in the week: 0001 (24th), 0002 (29th 23:30 London = still the 29th), 0006 (26th); not 0005 (October)
    expect(byFigure.get('Items approved in the period')!.value).toBe(3);
    expect(byFigure.get('Suggestions accepted in the period')!.value).toBe(3);
    expect(byFigure.get('Suggestions rejected in the period')!.value).toBe(2);
    expect(String(byFigure.get('About coverage')!.value)).toMatch(/not a statement of conformance/);
    expect(byFigure.get('Period from')!.value).toEqual(new Date('2026-11-23T00:00:00Z'));
    expect(byFigure.get('Period from')!.numFmt).toBe('yyyy-mm-dd');

    const bySubject = wb.getWorksheet('By subject')!;
    const lighthouse = bySubject.getRows(2, bySubject.rowCount - 1)!.find((r) => r.getCell(1).value === 'lighthouse')!;
    // accepted on 0001 and 0006, rejected on 0002 in the week; one still proposed on 0004
    expect((lighthouse.values as unknown[]).slice(1)).toEqual(['lighthouse', 'subject', 'https://kestrelmouth-harbour.example/vocabulary/harbour-plates/lighthouse', 2, 2, 1, 0, 1, 2 / 3]);
    expect(lighthouse.getCell(9).numFmt).toBe('0.0%');

    const byEditor = wb.getWorksheet('By editor')!;
    const morwen = byEditor.getRows(2, byEditor.rowCount - 1)!.find((r) => r.getCell(1).value === 'Morwen Tidewell')!;
    expect((morwen.values as unknown[]).slice(1, 8)).toEqual(['Morwen Tidewell', 'editor', 1, 0, 2, 1, 1]);
    expect(morwen.getCell(8).value).toEqual(new Date('2026-11-24T10:15:00Z')); // GMT in November: wall clock = UTC
    expect(morwen.getCell(8).numFmt).toBe('yyyy-mm-dd hh:mm');
  });

  it('writes one row per item with the approved texts only, subjects in order, dates as dates', async () => {
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(workbook as unknown as ArrayBuffer);
    const rows = wb.getWorksheet('Items')!.getRows(2, 6)!.map((r) => (r.values as unknown[]).slice(1));
    const byId = new Map(rows.map((r) => [r[0], r]));
    const first = byId.get('KHM-P-0001')!;
    expect(first.slice(0, 11)).toEqual([
      'KHM-P-0001',
      'plate-0001.tif',
      'engraving',
      'lighthouse; pier & jetty',
      'https://kestrelmouth-harbour.example/vocabulary/harbour-plates/engraving https://kestrelmouth-harbour.example/vocabulary/harbour-plates/lighthouse https://kestrelmouth-harbour.example/vocabulary/harbour-plates/pier-and-jetty',
      seed.text.alt,
      [...seed.text.alt].length,
      seed.text.long.replace('\r\n', '\n'), // line ends as LF in every export (XML 1.0 §2.11 folds CRLF anyway)
      'no',
      'approved',
      'Morwen Tidewell',
    ]);
    expect(first[11]).toEqual(new Date('2026-11-24T10:15:00Z'));
    // decorative: an empty alt (0 characters) reads back as a blank cell; the Decorative column says why
    expect(byId.get('KHM-P-0002')!.slice(5, 10)).toEqual([undefined, 0, undefined, 'yes', 'approved']);
    // a draft is not a description: nothing of it leaves Cartouche
    expect(byId.get('KHM-P-0003')![5]).toBeUndefined();
    expect(byId.get('KHM-P-0003')![9]).toBe('new');
  });
});

describe('the coverage ledger read back with SheetJS (xlsx), an independent reader', () => {
  it('sees the same sheets, headers, row counts, auto-filter ranges and number formats', () => {
    const wb = XLSX.read(workbook, { type: 'buffer', cellDates: true, cellNF: true, cellStyles: true });
    expect(wb.SheetNames).toEqual([...LEDGER_SHEETS]);
    for (const name of wb.SheetNames) {
      const ws = wb.Sheets[name]!;
      const grid = XLSX.utils.sheet_to_json<unknown[]>(ws, { header: 1, raw: true, defval: null });
      expect(grid[0]).toEqual(HEADERS[name as keyof typeof HEADERS]);
      const range = XLSX.utils.decode_range(ws['!ref']!);
      expect(ws['!autofilter']?.ref).toBe(XLSX.utils.encode_range({ s: { r: 0, c: 0 }, e: { r: range.e.r, c: HEADERS[name as keyof typeof HEADERS].length - 1 } }));
    }
    const items = wb.Sheets.Items!;
    expect(XLSX.utils.sheet_to_json(items).length).toBe(6);
    // column L (Approved) of the first data row: a date cell with the date-time format
    const approved = items.L2!;
    expect(approved.t).toBe('d');
    expect(approved.z).toBe('yyyy-mm-dd hh:mm');
    expect(items.G2!.t).toBe('n');
    const summary = wb.Sheets.Summary!;
    const coverageRow = XLSX.utils.sheet_to_json<unknown[]>(summary, { header: 1 }).findIndex((r) => r[0] === 'Coverage (working figure)');
    const coverage = summary[XLSX.utils.encode_cell({ r: coverageRow, c: 1 })]!;
    expect(coverage.v).toBeCloseTo(4 / 6, 10);
    expect(coverage.z).toBe('0.0%');
    expect(coverage.w).toBe('66.7%'); // SheetJS's own formatter applying the format
    expect(items['!cols']?.[5]?.wch ?? items['!cols']?.[5]?.width).toBeGreaterThan(50);
  });

  it('has the frozen header row in the sheet XML as ECMA-376 Part 1 spells it (<pane ySplit="1" state="frozen">)', () => {
    // read with Info-ZIP unzip (Debian package), a third reader; element and attribute names from ECMA-376 Part 1, §18.3.1.66 pane (section number from memory)
    for (let n = 1; n <= 4; n++) {
      const xml = execFileSync('unzip', ['-p', join(dir, 'ledger.xlsx'), `xl/worksheets/sheet${n}.xml`], { encoding: 'utf8' });
      expect(xml).toMatch(/<pane [^>]*ySplit="1"[^>]*state="frozen"|<pane [^>]*state="frozen"[^>]*ySplit="1"/);
      expect(xml).toMatch(/<autoFilter ref="A1:[A-Z]+\d+"\/>/);
    }
  });
});

describe('asking for exports', () => {
  it('refuses a period that ends before it starts, an unknown kind and a day that does not exist, naming each field', async () => {
    const bad = await manager.agent
      .post(`/api/collections/${seed.collection.id}/exports`)
      .set('x-csrf-token', manager.csrf)
      .send({ kind: 'ledger_xlsx', periodFrom: '2026-11-29', periodTo: '2026-11-23' })
      .expect(400);
    expect(bad.body.errors).toEqual([{ path: 'periodTo', message: 'The last day is before the first day.' }]);
    const kind = await manager.agent.post(`/api/collections/${seed.collection.id}/exports`).set('x-csrf-token', manager.csrf).send({ kind: 'pdf' }).expect(400);
    expect(kind.body.errors[0].path).toBe('kind');
    const day = await manager.agent.post(`/api/collections/${seed.collection.id}/exports`).set('x-csrf-token', manager.csrf).send({ kind: 'items_csv', periodTo: '2026-02-30' }).expect(400);
    expect(day.body.errors[0]).toMatchObject({ path: 'periodTo', message: 'Not a calendar day.' });
  });

  it('answers 409 for the file of an export that is not built yet, and lists exports newest first', async () => {
    const asked = await manager.agent.post(`/api/collections/${seed.collection.id}/exports`).set('x-csrf-token', manager.csrf).send({ kind: 'items_csv' }).expect(202);
    const early = await manager.agent.get(`/api/exports/${asked.body.export.id}/file`).expect(409);
    expect(early.body.type).toBe('/problems/export-not-ready');
    const list = await manager.agent.get(`/api/collections/${seed.collection.id}/exports`).expect(200);
    expect(list.body.exports.map((e: { kind: string }) => e.kind)).toEqual(['items_csv', 'ledger_xlsx']);
    expect(list.body.exports[1].requestedBy.id).toBe(manager.user.id);
    await worker.runOnce();
  });

  it('a ledger for a collection with no items is still a valid workbook, with empty sheets and no coverage figure', async () => {
    const { makeCollection } = await import('../helpers/fixtures.ts');
    const empty = await makeCollection();
    const asked = await manager.agent.post(`/api/collections/${empty.id}/exports`).set('x-csrf-token', manager.csrf).send({ kind: 'ledger_xlsx' }).expect(202);
    await worker.runOnce();
    const view = await manager.agent.get(`/api/exports/${asked.body.export.id}`).expect(200);
    expect(view.body.export).toMatchObject({ status: 'ready', rowCount: 0 });
  });
});
