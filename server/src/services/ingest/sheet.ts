import { parse as parseCsv } from 'csv-parse/sync';
import ExcelJS from 'exceljs';
import { HttpProblem } from '../../http/problem.ts';

/** A catalogue sheet read into plain text cells, with the row numbers a spreadsheet program shows. */
export interface Sheet {
  format: 'csv' | 'xlsx';
  /** the worksheet read (XLSX) */
  sheetName?: string;
  /** how the text was decoded and split (CSV) */
  encoding?: 'utf-8' | 'windows-1252';
  delimiter?: string;
  rows: Array<{ row: number; cells: string[] }>;
}

const sheetProblem = (detail: string) => new HttpProblem(400, 'Sheet not readable', detail, { type: '/problems/sheet-not-readable' });

/** Reads a CSV or XLSX file, telling which from its bytes (an XLSX file is a ZIP package). */
export async function readSheet(data: Buffer, fileName: string): Promise<Sheet> {
  if (data.length === 0) throw sheetProblem(`${fileName} is empty.`);
  if (data[0] === 0x50 && data[1] === 0x4b && data[2] === 0x03 && data[3] === 0x04) return readXlsx(data, fileName);
  // the compound-file signature of the older binary Excel format (from memory)
  if (data.subarray(0, 8).equals(Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]))) {
    throw sheetProblem(`${fileName} is in the older Excel format (.xls). Save it as an Excel workbook (.xlsx) or as CSV and send it again.`);
  }
  if (data.subarray(0, 1024).includes(0)) throw sheetProblem(`${fileName} is neither a CSV text file nor an Excel workbook (.xlsx).`);
  return readCsv(data, fileName);
}

function decodeText(data: Buffer): { text: string; encoding: 'utf-8' | 'windows-1252' } {
  try {
    return { text: new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(data), encoding: 'utf-8' };
  } catch {
    // not UTF-8: spreadsheet programs on Windows save CSV in their ANSI code page, most often Windows-1252
    return { text: new TextDecoder('windows-1252').decode(data), encoding: 'windows-1252' };
  }
}

/** The separator used in the first line outside quotes: comma, semicolon (common in European exports) or tab. */
function detectDelimiter(text: string): string {
  const counts: Record<string, number> = { ',': 0, ';': 0, '\t': 0 };
  let quoted = false;
  for (const ch of text) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === '\n' || ch === '\r')) break;
    else if (!quoted && ch in counts) counts[ch]!++;
  }
  const [best, n] = Object.entries(counts).sort((a, b) => b[1] - a[1])[0]!;
  return n > 0 ? best : ',';
}

function readCsv(data: Buffer, fileName: string): Sheet {
  const { text, encoding } = decodeText(data);
  const delimiter = detectDelimiter(text);
  let records: string[][];
  try {
    records = parseCsv(text, { bom: true, delimiter, relax_column_count: true, skip_empty_lines: false, trim: false });
  } catch (err) {
    throw sheetProblem(`${fileName} is not valid CSV: ${(err as Error).message}`);
  }
  return { format: 'csv', encoding, delimiter, rows: records.map((cells, i) => ({ row: i + 1, cells })) };
}

async function readXlsx(data: Buffer, fileName: string): Promise<Sheet> {
  const workbook = new ExcelJS.Workbook();
  try {
    await workbook.xlsx.load(data as unknown as Parameters<typeof workbook.xlsx.load>[0]);
  } catch (err) {
    throw sheetProblem(`${fileName} is a ZIP package but not a readable Excel workbook (${(err as Error).message}).`);
  }
  const sheet = workbook.worksheets.find((ws) => ws.state === 'visible' && ws.actualRowCount > 0) ?? workbook.worksheets[0];
  if (!sheet) throw sheetProblem(`${fileName} has no worksheet.`);
  const rows: Sheet['rows'] = [];
  sheet.eachRow({ includeEmpty: true }, (row, rowNumber) => {
    const values = Array.isArray(row.values) ? row.values : [];
    const cells: string[] = [];
    for (let c = 1; c < values.length; c++) cells.push(cellText(values[c]));
    rows.push({ row: rowNumber, cells });
  });
  return { format: 'xlsx', sheetName: sheet.name, rows };
}

/** A cell's value as the text a person sees (dates as YYYY-MM-DD, formulas as their result). */
export function cellText(value: unknown): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'string') return value;
  if (typeof value === 'number') return Number.isInteger(value) ? String(value) : String(Number(value.toPrecision(15)));
  if (typeof value === 'boolean') return value ? 'TRUE' : 'FALSE';
  if (value instanceof Date) {
    const iso = value.toISOString();
    return iso.endsWith('T00:00:00.000Z') ? iso.slice(0, 10) : iso.replace('.000Z', 'Z');
  }
  if (typeof value === 'object') {
    const v = value as Record<string, unknown>;
    if (Array.isArray(v.richText)) return v.richText.map((r) => (typeof r === 'object' && r !== null ? String((r as { text?: unknown }).text ?? '') : '')).join('');
    if ('result' in v) return cellText(v.result);
    if ('formula' in v || 'sharedFormula' in v) return '';
    if (typeof v.text === 'string') return v.text;
    if (typeof v.error === 'string') return v.error;
  }
  return String(value);
}
