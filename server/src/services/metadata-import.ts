import { Op, type Sequelize } from 'sequelize';
import { HttpProblem } from '../http/problem.ts';
import { ImportBatch, Item } from '../models/index.ts';
import { audit } from './audit.ts';
import { openCollection } from './ingest.ts';
import { IDENTIFIER_MAX, baseName, cleanIdentifier } from './ingest/identifier.ts';
import { readSheet, type Sheet } from './ingest/sheet.ts';
import {
  IMPORT_FIELDS,
  type ApplyResultRow,
  type FieldChange,
  type ImportColumn,
  type ImportColumns,
  type ImportField,
  type ImportPreview,
  type ImportResult,
  type ImportSummary,
  type PreviewRow,
  type ProblemCode,
} from '../../../common/api/metadata-import.ts';

export { IMPORT_FIELDS, type ApplyResultRow, type FieldChange, type ImportColumns, type ImportField, type ImportPreview, type ImportResult, type ImportSummary, type PreviewRow, type ProblemCode };

/**
 * Catalogue metadata from a CSV or XLSX sheet: each row is matched to an item of the collection by its
 * identifier or its file name; the preview says, row by row, what would change (field: old → new) or what is
 * wrong; nothing changes until the preview is applied, in one transaction, against the item versions the
 * preview was made from.
 */

/** The item fields a sheet can fill. */
type Column = ImportColumn;

export const FIELD_LABELS: Record<Column, string> = {
  identifier: 'Identifier',
  fileName: 'File name',
  caption: 'Caption',
  creator: 'Creator',
  dateText: 'Date',
  rights: 'Rights',
};

/** The longest value each field holds (the column widths of items; the caption is TEXT, kept to 10,000 characters). */
export const FIELD_MAX: Record<Column, number> = {
  identifier: IDENTIFIER_MAX,
  fileName: 255,
  caption: 10_000,
  creator: 300,
  dateText: 100,
  rights: 500,
};

/**
 * Header names each column is known by, compared without regard to case, accents, spaces, "_", "-" or "."; a
 * Dublin Core prefix ("dc:", "dcterms:") is ignored, so dc:identifier, dc:title, dc:creator, dc:date and dc:rights
 * are understood too.
 */
export const COLUMN_ALIASES: Record<Column, readonly string[]> = {
  identifier: ['identifier', 'id', 'object number', 'object id', 'accession number', 'accession no', 'inventory number', 'inventory no', 'reference', 'reference number', 'ref'],
  fileName: ['file name', 'filename', 'file', 'image', 'image file', 'image file name', 'scan', 'scan file'],
  caption: ['caption', 'title', 'label'],
  creator: ['creator', 'artist', 'maker', 'photographer', 'author', 'engraver', 'illustrator'],
  dateText: ['date', 'date text', 'dated', 'date made', 'date created', 'year'],
  rights: ['rights', 'rights statement', 'licence', 'license', 'copyright', 'usage rights'],
};

export function normaliseHeader(text: string): string {
  return text
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/^\s*(dc|dcterms)\s*:\s*/, '')
    .replace(/[\s_.-]+/g, ' ')
    .trim();
}

const aliasIndex = new Map<string, Column>(
  (Object.entries(COLUMN_ALIASES) as Array<[Column, readonly string[]]>).flatMap(([col, names]) => names.map((n) => [normaliseHeader(n), col] as [string, Column])),
);

export function toPreview(batch: ImportBatch): ImportPreview {
  return {
    id: batch.id,
    collectionId: batch.collectionId,
    sourceName: batch.sourceName,
    format: batch.sourceFormat,
    status: batch.status,
    createdAt: batch.createdAt.toISOString(),
    appliedAt: batch.appliedAt ? batch.appliedAt.toISOString() : null,
    columns: batch.columns as ImportColumns,
    summary: batch.summary as ImportSummary,
    rows: batch.rows as PreviewRow[],
    result: (batch.result as ImportResult | null) ?? null,
  };
}

const badSheet = (detail: string) => new HttpProblem(400, 'Sheet not usable', detail, { type: '/problems/sheet-not-usable' });
const key = (s: string) => s.normalize('NFC').toLowerCase();
const clean = (s: string) => s.normalize('NFC').trim();

interface ReadRow {
  row: number;
  values: Partial<Record<Column, string>>;
  empty: boolean;
}

/** Finds the header row (the first non-empty one), maps its columns and reads the data rows below it. */
export function mapColumns(sheet: Sheet, maxRows: number): { columns: ImportColumns; rows: ReadRow[] } {
  const headerIndex = sheet.rows.findIndex((r) => r.cells.some((c) => c.trim() !== ''));
  if (headerIndex < 0) throw badSheet('The sheet is empty: it needs a header row naming its columns, then one row per item.');
  const header = sheet.rows[headerIndex]!;
  const mapped: ImportColumns['mapped'] = [];
  const ignored: string[] = [];
  const byField = new Map<Column, number>();
  header.cells.forEach((cell, i) => {
    const name = cell.trim();
    if (name === '') return;
    const field = aliasIndex.get(normaliseHeader(name));
    if (!field) return void ignored.push(name);
    if (byField.has(field)) {
      const first = header.cells[byField.get(field)!]!.trim();
      throw badSheet(`Two columns mean ${FIELD_LABELS[field].toLowerCase()}: "${first}" and "${name}". Remove or rename one of them.`);
    }
    byField.set(field, i);
    mapped.push({ column: name, field });
  });
  if (!byField.has('identifier') && !byField.has('fileName')) {
    throw badSheet(
      `No column says which item a row is about. Name one column "identifier" or "file name" (found: ${header.cells.filter((c) => c.trim()).map((c) => `"${c.trim()}"`).join(', ') || 'nothing'}).`,
    );
  }
  if (![...byField.keys()].some((f) => f !== 'fileName' && f !== 'identifier') && !(byField.has('identifier') && byField.has('fileName'))) {
    throw badSheet('The sheet has no column to bring in: add at least one of caption, creator, date or rights (or both identifier and file name, to set identifiers).');
  }
  const data = sheet.rows.slice(headerIndex + 1);
  // empty rows at the end of a sheet are an artefact of saving, not rows anyone meant
  while (data.length > 0 && data[data.length - 1]!.cells.every((c) => c.trim() === '')) data.pop();
  if (data.length === 0) throw badSheet('The sheet has a header row but no rows of items below it.');
  if (data.length > maxRows) throw badSheet(`The sheet has ${data.length.toLocaleString('en-GB')} rows; one import takes up to ${maxRows.toLocaleString('en-GB')}. Split it into several sheets.`);
  const rows = data.map((r) => {
    const values: ReadRow['values'] = {};
    for (const [field, i] of byField) {
      const v = clean(r.cells[i] ?? '');
      if (v !== '') values[field] = v;
    }
    return { row: r.row, values, empty: r.cells.every((c) => c.trim() === '') };
  });
  return {
    columns: { mapped, ignored, headerRow: header.row, sheetName: sheet.sheetName, encoding: sheet.encoding, delimiter: sheet.delimiter },
    rows,
  };
}

type ItemRow = Pick<Item, 'id' | 'identifier' | 'fileName' | 'caption' | 'creator' | 'dateText' | 'rights' | 'version'>;

async function candidateItems(collectionId: number, rows: ReadRow[]): Promise<ItemRow[]> {
  const ids = [...new Set(rows.flatMap((r) => (r.values.identifier ? [cleanIdentifier(r.values.identifier)] : [])))];
  const names = [...new Set(rows.flatMap((r) => (r.values.fileName ? [baseName(r.values.fileName)] : [])))];
  const found = new Map<number, ItemRow>();
  const attributes = ['id', 'identifier', 'fileName', 'caption', 'creator', 'dateText', 'rights', 'version'] as const;
  for (const [column, values] of [['identifier', ids], ['fileName', names]] as const) {
    for (let i = 0; i < values.length; i += 500) {
      const chunk = values.slice(i, i + 500);
      const items = await Item.findAll({ attributes: [...attributes], where: { collectionId, [column]: { [Op.in]: chunk } } });
      for (const it of items) found.set(it.id, it);
    }
  }
  return [...found.values()];
}

/** Matches every row and works out its changes or its problem. Reads the database, writes nothing. */
export async function planRows(collectionId: number, rows: ReadRow[]): Promise<PreviewRow[]> {
  const items = await candidateItems(collectionId, rows);
  const byIdentifier = new Map(items.map((it) => [key(it.identifier), it]));
  const byFileName = new Map<string, ItemRow[]>();
  for (const it of items) byFileName.set(key(it.fileName), [...(byFileName.get(key(it.fileName)) ?? []), it]);

  const planned = rows.map((r): PreviewRow => {
    const identifier = r.values.identifier ? cleanIdentifier(r.values.identifier) : null;
    const fileName = r.values.fileName ? baseName(r.values.fileName) : null;
    const base: PreviewRow = { row: r.row, identifier, fileName, status: 'problem', item: null, matchedBy: null, changes: [], problem: null };
    const problem = (code: ProblemCode, message: string, item: ItemRow | null = null): PreviewRow => ({
      ...base,
      item: item ? snapshot(item) : null,
      problem: { code, message },
    });
    if (r.empty) return problem('empty-row', 'The row is empty.');

    for (const [field, value] of Object.entries(r.values) as Array<[Column, string]>) {
      if (value.length > FIELD_MAX[field]) {
        return problem('too-long', `${FIELD_LABELS[field]} is ${value.length.toLocaleString('en-GB')} characters long; it holds at most ${FIELD_MAX[field].toLocaleString('en-GB')}. Nothing in this row is brought in.`);
      }
    }
    if (!identifier && !fileName) return problem('no-key', 'The row gives neither an identifier nor a file name, so it cannot be matched to an item.');

    const byId = identifier ? byIdentifier.get(key(identifier)) : undefined;
    const byName = fileName ? (byFileName.get(key(fileName)) ?? []) : [];
    let item: ItemRow;
    let matchedBy: PreviewRow['matchedBy'];
    if (byId) {
      if (fileName && key(byId.fileName) !== key(fileName)) {
        const other = byName.length > 0 ? ` The file ${fileName} belongs to ${byName.map((i) => i.identifier).join(', ')}.` : '';
        return problem('mismatch', `Identifier ${identifier} is the item made from ${byId.fileName}, not from ${fileName}.${other} Correct the row so that both point at the same item.`, byId);
      }
      item = byId;
      matchedBy = fileName ? 'identifier and file name' : 'identifier';
    } else if (byName.length === 1) {
      item = byName[0]!;
      matchedBy = 'file name';
    } else if (byName.length > 1) {
      return problem('ambiguous', `${byName.length} items were made from files named ${fileName} (${byName.map((i) => i.identifier).join(', ')}). Add an identifier column to say which one this row is about.`);
    } else if (identifier && fileName) {
      return problem('no-match', `No item of this collection has the identifier ${identifier} or was made from a file named ${fileName}.`);
    } else if (identifier) {
      return problem('no-match', `No item of this collection has the identifier ${identifier}.`);
    } else {
      return problem('no-match', `No item of this collection was made from a file named ${fileName}.`);
    }

    const changes: FieldChange[] = [];
    if (identifier && matchedBy === 'file name' && identifier !== item.identifier) changes.push({ field: 'identifier', from: item.identifier, to: identifier });
    for (const field of ['caption', 'creator', 'dateText', 'rights'] as const) {
      const to = r.values[field];
      if (to !== undefined && to !== (item[field] ?? '')) changes.push({ field, from: item[field] ?? null, to });
    }
    return { ...base, item: snapshot(item), matchedBy, changes, status: changes.length > 0 ? 'change' : 'unchanged' };
  });

  // rows that meet on one item: the same content twice is a duplicate; different content is a conflict
  const byItem = new Map<number, PreviewRow[]>();
  for (const p of planned) if (p.item && p.status !== 'problem') byItem.set(p.item.id, [...(byItem.get(p.item.id) ?? []), p]);
  for (const group of byItem.values()) {
    if (group.length < 2) continue;
    const first = group[0]!;
    const same = group.every((g) => JSON.stringify(g.changes) === JSON.stringify(first.changes));
    for (const [i, g] of group.entries()) {
      const others = group.filter((o) => o !== g).map((o) => o.row);
      if (same && i === 0) continue;
      g.status = 'problem';
      g.problem = same
        ? { code: 'duplicate-row', message: `Row ${first.row} already brings in the same for ${g.item!.identifier}; this row repeats it and is left out.` }
        : { code: 'conflicting-rows', message: `${rowList(others)} also ${others.length === 1 ? 'describes' : 'describe'} ${g.item!.identifier}, differently. Keep one row per item.` };
      g.changes = same ? [] : g.changes;
    }
  }

  // an identifier may be given to one item only, and not to one that another item already has
  const wanted = new Map<string, PreviewRow[]>();
  for (const p of planned) {
    const c = p.status === 'change' ? p.changes.find((ch) => ch.field === 'identifier') : undefined;
    if (c) wanted.set(key(c.to), [...(wanted.get(key(c.to)) ?? []), p]);
  }
  for (const [id, group] of wanted) {
    const holder = byIdentifier.get(id);
    for (const p of group) {
      if (holder && holder.id !== p.item!.id) {
        p.status = 'problem';
        p.problem = { code: 'identifier-taken', message: `The identifier ${holder.identifier} already belongs to another item of this collection (made from ${holder.fileName}).` };
      } else if (group.length > 1) {
        p.status = 'problem';
        p.problem = { code: 'identifier-taken', message: `${rowList(group.filter((o) => o !== p).map((o) => o.row))} would give the same identifier to another item.` };
      }
    }
  }
  return planned;
}

function rowList(rows: number[]): string {
  return rows.length === 1 ? `Row ${rows[0]}` : `Rows ${rows.slice(0, -1).join(', ')} and ${rows[rows.length - 1]}`;
}

function snapshot(item: ItemRow): NonNullable<PreviewRow['item']> {
  return { id: item.id, identifier: item.identifier, fileName: item.fileName, version: item.version };
}

function summarise(rows: PreviewRow[]): ImportSummary {
  return {
    rows: rows.length,
    changes: rows.filter((r) => r.status === 'change').length,
    unchanged: rows.filter((r) => r.status === 'unchanged').length,
    problems: rows.filter((r) => r.status === 'problem').length,
  };
}

export interface PreviewInput {
  collectionId: number;
  fileName: string;
  data: Buffer;
  actorId: number | null;
  maxRows: number;
}

/** Reads the sheet, plans every row and keeps the preview under a new id. Changes no item. */
export async function previewImport(input: PreviewInput): Promise<ImportPreview> {
  await openCollection(input.collectionId);
  const sheet = await readSheet(input.data, baseName(input.fileName));
  const { columns, rows } = mapColumns(sheet, input.maxRows);
  const planned = await planRows(input.collectionId, rows);
  const batch = await ImportBatch.create({
    collectionId: input.collectionId,
    sourceName: baseName(input.fileName),
    sourceFormat: sheet.format,
    columns,
    rows: planned,
    summary: summarise(planned),
    result: null,
    createdBy: input.actorId,
    appliedBy: null,
    appliedAt: null,
  });
  return toPreview(batch);
}

export async function getImport(collectionId: number, importId: number): Promise<ImportPreview> {
  const batch = await ImportBatch.findOne({ where: { id: importId, collectionId } });
  if (!batch) throw new HttpProblem(404, 'Not found', `Collection ${collectionId} has no import ${importId}.`);
  return toPreview(batch);
}

/**
 * Applies the rows of a preview that would change an item, in one transaction. Each item is locked and must
 * still be at the version the preview saw: an item changed since (by an editor, another import) is left alone
 * and reported. Rows with problems, and rows that change nothing, are not touched. A preview applies once.
 */
export async function applyImport(sequelize: Sequelize, collectionId: number, importId: number, actorId: number | null, ip: string | null): Promise<ImportPreview> {
  await openCollection(collectionId);
  const id = await sequelize.transaction(async (transaction) => {
    const batch = await ImportBatch.findOne({ where: { id: importId, collectionId }, lock: transaction.LOCK.UPDATE, transaction });
    if (!batch) throw new HttpProblem(404, 'Not found', `Collection ${collectionId} has no import ${importId}.`);
    if (batch.status !== 'previewed') {
      throw new HttpProblem(409, 'Already applied', `The import of ${batch.sourceName} was applied on ${batch.appliedAt?.toISOString() ?? 'an earlier occasion'}; make a new preview to bring the sheet in again.`, { type: '/problems/conflict' });
    }
    const results: ApplyResultRow[] = [];
    for (const row of (batch.rows as PreviewRow[]).filter((r) => r.status === 'change' && r.item)) {
      const planned = row.item!;
      const item = await Item.findOne({ where: { id: planned.id, collectionId }, lock: transaction.LOCK.UPDATE, transaction });
      const done = (outcome: ApplyResultRow['outcome'], message: string) => results.push({ row: row.row, itemId: planned.id, identifier: item?.identifier ?? planned.identifier, outcome, message });
      if (!item) {
        done('gone', `${planned.identifier} was removed after the preview; nothing was changed for this row.`);
        continue;
      }
      if (item.version !== planned.version) {
        done('stale', `${item.identifier} was changed after the preview (version ${planned.version}, now ${item.version}); this row was left alone. Make a new preview to see the changes against the current record.`);
        continue;
      }
      const values: Partial<Record<ImportField, string>> = {};
      for (const c of row.changes) values[c.field] = c.to;
      if (values.identifier) {
        const holder = await Item.findOne({ attributes: ['id', 'identifier'], where: { collectionId, identifier: values.identifier, id: { [Op.ne]: item.id } }, lock: transaction.LOCK.UPDATE, transaction });
        if (holder) {
          done('identifier-taken', `The identifier ${values.identifier} was given to another item after the preview; this row was left alone.`);
          continue;
        }
      }
      // the model's optimistic lock checks the version once more in the UPDATE itself
      await item.update(values, { transaction });
      done('applied', `${item.identifier}: ${row.changes.map((c) => FIELD_LABELS[c.field].toLowerCase()).join(', ')} updated.`);
    }
    const result: ImportResult = { applied: results.filter((r) => r.outcome === 'applied').length, refused: results.filter((r) => r.outcome !== 'applied').length, rows: results };
    await batch.update({ status: 'applied', result, appliedBy: actorId, appliedAt: new Date() }, { transaction });
    await audit(
      { action: 'metadata-imported', actorId, targetType: 'import', targetId: batch.id, detail: { collectionId, sourceName: batch.sourceName, applied: result.applied, refused: result.refused }, ip },
      transaction,
    );
    return batch.id;
  });
  return getImport(collectionId, id);
}
