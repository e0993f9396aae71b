import { createWriteStream } from 'node:fs';
import { once } from 'node:events';
import type { Sequelize } from 'sequelize';
import type { Collection } from '../../models/index.ts';
import { ITEM_COLUMNS, itemCells } from './ledger.ts';
import { itemPages } from './rows.ts';
import { periodInstants } from './time.ts';

/**
 * The byte-order mark the CSV starts with. RFC 4180 does not require one and UTF-8 needs none, but the
 * spreadsheet programs managers open a CSV with by double-clicking read a file without it in the
 * machine's legacy code page and garble every curly apostrophe and accented name (common practice);
 * programs that load CSV (csv-parse with `bom: true`, Python's `utf-8-sig`) skip it.
 */
export const CSV_BOM = '\uFEFF';

/**
 * One field per RFC 4180 §2: a field containing a comma, a double quote, CR or LF is enclosed in double
 * quotes, and a double quote inside it is written twice. Dates become ISO 8601 local date-times.
 */
export function csvField(value: string | number | Date | null): string {
  if (value === null) return '';
  const text = value instanceof Date ? value.toISOString().slice(0, 16).replace('T', ' ') : String(value);
  return /[",\r\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text;
}

/** A record: fields joined by commas, ended by CRLF (RFC 4180 §2.1). */
export function csvRecord(fields: Array<string | number | Date | null>): string {
  return `${fields.map(csvField).join(',')}\r\n`;
}

/**
 * Writes the items of a collection as CSV (UTF-8 with a byte-order mark, CRLF line ends, a header record),
 * the same columns as the ledger's Items sheet; dates are wall-clock times in the collection's time zone.
 */
export async function writeItemsCsv(
  sequelize: Sequelize,
  req: { collection: Pick<Collection, 'id' | 'scheduleTimezone'>; period: { from: string | null; to: string | null }; filename: string; onProgress?: (done: number) => Promise<void> | void },
): Promise<{ rows: number }> {
  const tz = req.collection.scheduleTimezone;
  const out = createWriteStream(req.filename);
  const write = async (text: string) => {
    if (!out.write(text)) await once(out, 'drain');
  };
  let rows = 0;
  try {
    await write(CSV_BOM + csvRecord(ITEM_COLUMNS.map((c) => c.header)));
    for await (const page of itemPages(sequelize, { collectionId: req.collection.id, createdBefore: periodInstants(req.period, tz).to })) {
      let chunk = '';
      for (const item of page) {
        const cells = itemCells(item, tz);
        chunk += csvRecord(ITEM_COLUMNS.map((c) => cells[c.key]));
        rows++;
      }
      await write(chunk);
      await req.onProgress?.(rows);
    }
  } finally {
    out.end();
    await once(out, 'close');
  }
  return { rows };
}
