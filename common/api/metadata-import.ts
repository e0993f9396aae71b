/**
 * What the catalogue-sheet import answers (server/src/services/metadata-import.ts builds it, the intake
 * screen reads it): one definition for both sides.
 */

export const IMPORT_FIELDS = ['identifier', 'caption', 'creator', 'dateText', 'rights'] as const;
/** a field of an item that a sheet may set */
export type ImportField = (typeof IMPORT_FIELDS)[number];
/** a column a sheet may have: the fields, and the file name that matches rows to items */
export type ImportColumn = ImportField | 'fileName';

export type ProblemCode = 'empty-row' | 'no-key' | 'no-match' | 'mismatch' | 'ambiguous' | 'too-long' | 'duplicate-row' | 'conflicting-rows' | 'identifier-taken';

export interface FieldChange {
  field: ImportField;
  from: string | null;
  to: string;
}

export interface PreviewRow {
  /** the row number as a spreadsheet program shows it (the header is usually row 1) */
  row: number;
  identifier: string | null;
  fileName: string | null;
  status: 'change' | 'unchanged' | 'problem';
  /** the matched item as it was when the preview was made */
  item: { id: number; identifier: string; fileName: string; version: number } | null;
  matchedBy: 'identifier' | 'file name' | 'identifier and file name' | null;
  changes: FieldChange[];
  problem: { code: ProblemCode; message: string } | null;
}

export interface ImportColumns {
  mapped: Array<{ column: string; field: ImportColumn }>;
  ignored: string[];
  headerRow: number;
  sheetName?: string;
  encoding?: string;
  delimiter?: string;
}

export interface ImportSummary {
  rows: number;
  changes: number;
  unchanged: number;
  problems: number;
}

export interface ApplyResultRow {
  row: number;
  itemId: number;
  identifier: string;
  outcome: 'applied' | 'stale' | 'gone' | 'identifier-taken';
  message: string;
}

export interface ImportResult {
  applied: number;
  refused: number;
  rows: ApplyResultRow[];
}

export interface ImportPreview {
  id: number;
  collectionId: number;
  sourceName: string;
  format: 'csv' | 'xlsx';
  status: 'previewed' | 'applied';
  createdAt: string;
  appliedAt: string | null;
  columns: ImportColumns;
  summary: ImportSummary;
  rows: PreviewRow[];
  result: ImportResult | null;
}
