/**
 * What the exports API answers (server/src/routes/exports.ts builds it, client/src/api/exports.ts reads it):
 * one definition, so the two sides cannot drift apart.
 */

export const EXPORT_KINDS = ['ledger_xlsx', 'items_csv', 'xmp_zip', 'iiif_manifest'] as const;
export type ExportKind = (typeof EXPORT_KINDS)[number];
export const EXPORT_STATUSES = ['queued', 'running', 'ready', 'failed'] as const;
export type ExportStatus = (typeof EXPORT_STATUSES)[number];

/** One requested export as the API shows it. */
export interface ExportView {
  id: number;
  collectionId: number | null;
  kind: ExportKind;
  label: string;
  periodFrom: string | null;
  periodTo: string | null;
  status: ExportStatus;
  trigger: 'manual' | 'weekly';
  rowCount: number | null;
  byteSize: number | null;
  fileName: string | null;
  /** rows written so far while the job runs, and how many there will be */
  progress: { done: number; total: number | null } | null;
  requestedBy: { id: number; name: string } | null;
  error: string | null;
  createdAt: string;
  finishedAt: string | null;
  mailedAt: string | null;
  downloadUrl: string | null;
}

/** The weekly ledger mail of a collection. */
export interface LedgerMailSettings {
  enabled: boolean;
  /** ISO weekday, 1 Monday … 7 Sunday */
  weekday: number;
  hour: number;
  /** the collection's time zone, in which weekday and hour are read */
  timeZone: string;
}

/** The weekly ledger mail as the API shows it: the settings, the weekday in words and the next sending. */
export interface LedgerMailView extends LedgerMailSettings {
  weekdayName: string;
  nextSendAt: string | null;
}
