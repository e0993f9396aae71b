import ExcelJS from 'exceljs';
import type { Sequelize } from 'sequelize';
import type { Collection } from '../../models/index.ts';
import { editorFigures, ledgerFigures, precision, subjectFigures } from './figures.ts';
import { itemPages, type ExportItem } from './rows.ts';
import { asLocalCell, periodInstants } from './time.ts';

export const LEDGER_SHEETS = ['Summary', 'By subject', 'By editor', 'Items'] as const;

/** Column layout of the Items sheet (also the CSV's columns, see csv.ts). */
export const ITEM_COLUMNS = [
  { header: 'Identifier', key: 'identifier', width: 18 },
  { header: 'File', key: 'file', width: 28 },
  { header: 'Form', key: 'form', width: 16 },
  { header: 'Subjects', key: 'subjects', width: 36 },
  { header: 'Concept URIs', key: 'conceptUris', width: 48 },
  { header: 'Alt text', key: 'altText', width: 60 },
  { header: 'Alt text characters', key: 'altLength', width: 12 },
  { header: 'Long description', key: 'longDescription', width: 60 },
  { header: 'Decorative', key: 'decorative', width: 11 },
  { header: 'State', key: 'state', width: 12 },
  { header: 'Reviewer', key: 'reviewer', width: 24 },
  { header: 'Approved', key: 'approvedAt', width: 18 },
  { header: 'Added', key: 'createdAt', width: 18 },
  { header: 'Caption', key: 'caption', width: 48 },
] as const;

export const STATE_WORDS: Record<ExportItem['state'], string> = { new: 'new', suggested: 'suggested', approved: 'approved' };

export const COUNT_FORMAT = '#,##0';
export const PERCENT_FORMAT = '0.0%';
export const DATE_FORMAT = 'yyyy-mm-dd';
export const DATETIME_FORMAT = 'yyyy-mm-dd hh:mm';

export const COVERAGE_NOTE =
  'Coverage is a working figure of Cartouche: the share of items whose text alternative (alt text, or an empty alt for a decorative image) an editor has approved. ' +
  'It is not a statement of conformance: accessibility obligations differ by jurisdiction — see WCAG 2.2 (https://www.w3.org/TR/WCAG22/) and the law that applies to you.';

export interface LedgerRequest {
  collection: Pick<Collection, 'id' | 'name' | 'scheduleTimezone'>;
  period: { from: string | null; to: string | null };
  /** where the workbook is written (streamed; never held in memory whole) */
  filename: string;
  builtAt?: Date;
  onProgress?: (done: number) => Promise<void> | void;
}

/** The text in the ledger's Items sheet and the CSV for one item, in ITEM_COLUMNS order. */
export function itemCells(item: ExportItem, timeZone: string): Record<(typeof ITEM_COLUMNS)[number]['key'], string | number | Date | null> {
  const forms = item.subjects.filter((s) => s.kind === 'form');
  const subjects = item.subjects.filter((s) => s.kind === 'subject');
  return {
    identifier: item.identifier,
    file: item.fileName,
    form: forms.map((s) => s.label).join('; ') || null,
    subjects: subjects.map((s) => s.label).join('; ') || null,
    conceptUris: item.subjects.map((s) => s.conceptUri).filter(Boolean).join(' ') || null,
    altText: item.altText,
    altLength: item.altText === null ? null : [...item.altText].length,
    longDescription: item.longDescription,
    decorative: item.decorative ? 'yes' : 'no',
    state: STATE_WORDS[item.state],
    reviewer: item.approvedByName,
    approvedAt: item.approvedAt ? asLocalCell(item.approvedAt, timeZone) : null,
    createdAt: asLocalCell(item.createdAt, timeZone),
    caption: item.caption,
  };
}

type Sheet = ReturnType<ExcelJS.stream.xlsx.WorkbookWriter['addWorksheet']>;

function header(ws: Sheet, columns: Column[]): void {
  ws.columns = columns.map((c) => ({ header: c.header, key: c.key, width: c.width, ...(c.numFmt ? { style: { numFmt: c.numFmt } } : {}) }));
  const row = ws.getRow(1);
  row.font = { bold: true };
  row.alignment = { vertical: 'top', wrapText: true };
  row.commit();
}

function finish(ws: Sheet, columns: number, rows: number): void {
  // the filter covers the header and every data row, as a spreadsheet program sets it
  ws.autoFilter = { from: { row: 1, column: 1 }, to: { row: Math.max(1, rows + 1), column: columns } };
  ws.commit();
}

type Column = { header: string; key: string; width: number; numFmt?: string };

/** A sheet small enough to hold in memory (the per-subject and per-editor figures): header, rows, filter. */
function smallSheet(ws: Sheet, columns: Column[], rows: Array<Record<string, unknown>>): void {
  header(ws, columns);
  for (const r of rows) ws.addRow(r).commit();
  finish(ws, columns.length, rows.length);
}

const frozen = { views: [{ state: 'frozen' as const, xSplit: 0, ySplit: 1, topLeftCell: 'A2', activeCell: 'A2' }] };

/**
 * Writes the coverage ledger of a collection for a period with exceljs's streaming writer: the three
 * summary sheets first (small, from SQL aggregates), then the Items sheet, one committed row at a time,
 * from pages of items read by keyset. Memory stays flat however many items there are.
 */
export async function writeLedger(sequelize: Sequelize, req: LedgerRequest): Promise<{ rows: number }> {
  const tz = req.collection.scheduleTimezone;
  const bounds = periodInstants(req.period, tz);
  const builtAt = req.builtAt ?? new Date();
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ filename: req.filename, useStyles: true, useSharedStrings: false });
  wb.creator = 'Cartouche';
  wb.created = builtAt;
  wb.title = `Coverage ledger · ${req.collection.name}`;

  // ---- Summary
  const f = await ledgerFigures(sequelize, req.collection.id, bounds);
  const summary = wb.addWorksheet('Summary', frozen);
  header(summary, [
    { header: 'Figure', key: 'figure', width: 44 },
    { header: 'Value', key: 'value', width: 30 },
  ]);
  const summaryRows: Array<[string, string | number | Date | null, string?]> = [
    ['Collection', req.collection.name],
    ['Period from', req.period.from ? new Date(`${req.period.from}T00:00:00Z`) : 'the beginning', DATE_FORMAT],
    ['Period to', req.period.to ? new Date(`${req.period.to}T00:00:00Z`) : 'the time of building', DATE_FORMAT],
    ['Time zone of dates', tz],
    ['Built', asLocalCell(builtAt, tz), DATETIME_FORMAT],
    ['Items', f.items, COUNT_FORMAT],
    ['Items approved (alt text or decorative)', f.approved, COUNT_FORMAT],
    ['of which decorative', f.decorative, COUNT_FORMAT],
    ['Items not yet approved', f.items - f.approved, COUNT_FORMAT],
    ['Coverage (working figure)', f.items === 0 ? null : f.approved / f.items, PERCENT_FORMAT],
    ['Items approved in the period', f.approvedInPeriod, COUNT_FORMAT],
    ['Suggestions accepted in the period', f.accepted, COUNT_FORMAT],
    ['Suggestions rejected in the period', f.rejected, COUNT_FORMAT],
    ['Subjects added by editors in the period', f.added, COUNT_FORMAT],
    ['Suggestion precision in the period (accepted ÷ decided)', precision(f.accepted, f.rejected), PERCENT_FORMAT],
    ['Suggestions waiting for review', f.waiting, COUNT_FORMAT],
    ['About coverage', COVERAGE_NOTE],
    ['About the Items sheet', 'Each item as it stood when the ledger was built; alt text and long descriptions only once approved (drafts are not descriptions).'],
  ];
  for (const [figure, value, numFmt] of summaryRows) {
    const row = summary.addRow({ figure, value });
    if (numFmt && typeof value !== 'string') row.getCell(2).numFmt = numFmt;
    if (typeof value === 'string' && value.length > 40) row.getCell(2).alignment = { wrapText: true, vertical: 'top' };
    row.commit();
  }
  finish(summary, 2, summaryRows.length);

  // ---- By subject
  const subjects = await subjectFigures(sequelize, req.collection.id, bounds);
  smallSheet(
    wb.addWorksheet('By subject', frozen),
    [
      { header: 'Subject', key: 'label', width: 28 },
      { header: 'Kind', key: 'kind', width: 10 },
      { header: 'Concept URI', key: 'conceptUri', width: 48 },
      { header: 'Items with the subject', key: 'items', width: 14, numFmt: COUNT_FORMAT },
      { header: 'Accepted in period', key: 'accepted', width: 14, numFmt: COUNT_FORMAT },
      { header: 'Rejected in period', key: 'rejected', width: 14, numFmt: COUNT_FORMAT },
      { header: 'Added by editors in period', key: 'added', width: 14, numFmt: COUNT_FORMAT },
      { header: 'Waiting for review', key: 'waiting', width: 14, numFmt: COUNT_FORMAT },
      { header: 'Precision in period', key: 'precision', width: 12, numFmt: PERCENT_FORMAT },
    ],
    subjects.map((s) => ({
      label: s.label,
      kind: s.kind,
      conceptUri: s.conceptUri,
      items: s.items,
      accepted: s.acceptedInPeriod,
      rejected: s.rejectedInPeriod,
      added: s.addedInPeriod,
      waiting: s.waiting,
      precision: precision(s.acceptedInPeriod, s.rejectedInPeriod),
    })),
  );

  // ---- By editor
  const editors = await editorFigures(sequelize, req.collection.id, bounds);
  smallSheet(
    wb.addWorksheet('By editor', frozen),
    [
      { header: 'Editor', key: 'name', width: 28 },
      { header: 'Role', key: 'role', width: 11 },
      { header: 'Items approved', key: 'approved', width: 12, numFmt: COUNT_FORMAT },
      { header: 'of which decorative', key: 'decorative', width: 12, numFmt: COUNT_FORMAT },
      { header: 'Subjects accepted', key: 'accepted', width: 12, numFmt: COUNT_FORMAT },
      { header: 'Subjects rejected', key: 'rejected', width: 12, numFmt: COUNT_FORMAT },
      { header: 'Subjects added', key: 'added', width: 12, numFmt: COUNT_FORMAT },
      { header: 'Last activity in period', key: 'last', width: 18, numFmt: DATETIME_FORMAT },
    ],
    editors.map((e) => ({ ...e, last: e.lastActivity ? asLocalCell(e.lastActivity, tz) : null })),
  );

  // ---- Items, streamed
  const items = wb.addWorksheet('Items', frozen);
  header(
    items,
    ITEM_COLUMNS.map((c) => ({
      ...c,
      ...(c.key === 'altLength' ? { numFmt: '0' } : c.key === 'approvedAt' || c.key === 'createdAt' ? { numFmt: DATETIME_FORMAT } : {}),
    })),
  );
  let rows = 0;
  for await (const page of itemPages(sequelize, { collectionId: req.collection.id, createdBefore: bounds.to })) {
    for (const item of page) {
      items.addRow(itemCells(item, tz)).commit();
      rows++;
    }
    await req.onProgress?.(rows);
  }
  finish(items, ITEM_COLUMNS.length, rows);
  await wb.commit();
  return { rows };
}
