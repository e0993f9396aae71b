import type { Sequelize } from 'sequelize';
import type { AppConfig } from '../../config.ts';
import type { Mailer } from '../../mail/mailer.ts';
import { Collection, ExportFile, LedgerMailSetting, User } from '../../models/index.ts';
import { LEDGER_MAIL_DEFAULTS } from '../../models/export-file.ts';
import { readFile } from 'node:fs/promises';
import type { Storage } from '../storage.ts';
import { ledgerFigures } from './figures.ts';
import { KIND_INFO, buildExport, exportFileName } from './index.ts';
import { addDays, isoWeek, periodInstants, previousWeek, startOfDay, wallClock } from './time.ts';
import type { LedgerMailSettings, LedgerMailView } from '../../../../common/api/exports.ts';

export const WEEKLY_JOB = 'weekly-ledger';

/** Attachments above this size are not attached; the mail links to the stored file instead. */
export const MAX_ATTACHMENT_BYTES = 15 * 1024 * 1024;

export type { LedgerMailSettings };

export const WEEKDAY_NAMES = ['Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday'] as const;

export async function ledgerMailSettings(collection: Collection): Promise<LedgerMailSettings> {
  const row = await LedgerMailSetting.findByPk(collection.id);
  return {
    enabled: row?.enabled ?? LEDGER_MAIL_DEFAULTS.enabled,
    weekday: row?.weekday ?? LEDGER_MAIL_DEFAULTS.weekday,
    hour: row?.hour ?? LEDGER_MAIL_DEFAULTS.hour,
    timeZone: collection.scheduleTimezone,
  };
}

export async function saveLedgerMailSettings(collection: Collection, input: { enabled: boolean; weekday: number; hour: number }, actorId: number | null): Promise<LedgerMailSettings> {
  await LedgerMailSetting.upsert({ collectionId: collection.id, enabled: input.enabled, weekday: input.weekday, hour: input.hour, updatedBy: actorId });
  return { ...input, timeZone: collection.scheduleTimezone };
}

/** The instant this week's mail is due (the configured weekday and hour of the ISO week `at` falls in, in the zone). */
export function dueThisWeek(at: Date, s: Pick<LedgerMailSettings, 'weekday' | 'hour' | 'timeZone'>): Date {
  const w = wallClock(at, s.timeZone);
  const today = `${String(w.year).padStart(4, '0')}-${String(w.month).padStart(2, '0')}-${String(w.day).padStart(2, '0')}`;
  const day = addDays(today, s.weekday - w.weekday);
  return new Date(startOfDay(day, s.timeZone).getTime() + s.hour * 3_600_000);
}

/** The next time the mail goes out after `at` (null when it is switched off). */
export function nextSendAt(at: Date, s: LedgerMailSettings): Date | null {
  if (!s.enabled) return null;
  const due = dueThisWeek(at, s);
  return due.getTime() > at.getTime() ? due : dueThisWeek(new Date(at.getTime() + 7 * 86_400_000), s);
}

/**
 * Whether the weekly mail is due at `at`: from the configured hour until a day after it, so a worker that
 * was down at the hour still sends that week's ledger when it comes back the same day. The caller enqueues
 * with `weeklyKey`, which makes it once per collection and ISO week however often this says yes.
 */
export function isDue(at: Date, s: LedgerMailSettings): boolean {
  if (!s.enabled) return false;
  const due = dueThisWeek(at, s).getTime();
  return at.getTime() >= due && at.getTime() < due + 86_400_000;
}

/** One weekly ledger per collection and ISO week (of the collection's calendar). */
export function weeklyKey(collectionId: number, at: Date, timeZone: string): string {
  const w = wallClock(at, timeZone);
  const today = `${String(w.year).padStart(4, '0')}-${String(w.month).padStart(2, '0')}-${String(w.day).padStart(2, '0')}`;
  return `weekly-ledger:${collectionId}:${isoWeek(today)}`;
}

const percent = new Intl.NumberFormat('en-GB', { style: 'percent', maximumFractionDigits: 1 });
const count = new Intl.NumberFormat('en-GB');

/**
 * The weekly ledger job: builds the ledger of the week before `at` (Monday to Sunday in the collection's
 * zone), then mails it to every active manager. Resumable and once-only: the export belongs to this job
 * (exports.job_id), a ready file is not built again, and `mailed_at` is set after sending, so a retry
 * neither builds twice nor mails twice once the mail went out.
 */
export async function runWeeklyLedger(
  sequelize: Sequelize,
  deps: { config: Pick<AppConfig, 'publicUrl' | 'storageDir' | 'version'>; storage: Storage; mailer: Mailer },
  job: { id: number; payload: Record<string, unknown>; attempts?: number; maxAttempts?: number },
  reportProgress: (p: { done: number; total: number | null }) => Promise<void>,
): Promise<Record<string, unknown>> {
  const collectionId = Number(job.payload.collectionId);
  const at = new Date(String(job.payload.at));
  const collection = await Collection.findByPk(collectionId);
  if (!collection || collection.archivedAt) return { skipped: 'the collection is gone or archived' };
  const period = previousWeek(at, collection.scheduleTimezone);

  let exp = await ExportFile.findOne({ where: { jobId: job.id } });
  exp ??= await ExportFile.create({
    collectionId,
    kind: 'ledger_xlsx',
    periodFrom: period.from,
    periodTo: period.to,
    status: 'queued',
    fileKey: null,
    rowCount: null,
    requestedBy: null,
    jobId: job.id,
    trigger: 'weekly',
    error: null,
    finishedAt: null,
  });
  if (exp.mailedAt) return { exportId: exp.id, alreadyMailed: exp.mailedAt.toISOString() };
  exp = await buildExport(sequelize, deps, exp.id, reportProgress, { finalAttempt: job.attempts === undefined || job.attempts >= (job.maxAttempts ?? 1) });

  const managers = await User.findAll({ where: { role: 'manager', active: true }, order: [['id', 'ASC']] });
  if (managers.length === 0) return { exportId: exp.id, recipients: 0 };
  const f = await ledgerFigures(sequelize, collectionId, periodInstants(period, collection.scheduleTimezone));
  const fileName = exp.fileName ?? exportFileName('ledger_xlsx', collection.slug, period);
  const link = `${deps.config.publicUrl}/ledger?collection=${collectionId}`;
  const attach = Number(exp.byteSize ?? 0) <= MAX_ATTACHMENT_BYTES;
  const content = attach ? await readFile(deps.storage.pathOf(exp.fileKey!)) : null;
  const text = [
    `The coverage ledger of ${collection.name} for the week ${period.from} to ${period.to} (${collection.scheduleTimezone}).`,
    '',
    `Items: ${count.format(f.items)}`,
    `Approved (alt text or decorative): ${count.format(f.approved)}${f.items ? ` — coverage ${percent.format(f.approved / f.items)}` : ''}`,
    `Approved during the week: ${count.format(f.approvedInPeriod)}`,
    `Suggestions decided during the week: ${count.format(f.accepted + f.rejected)} (${count.format(f.accepted)} accepted, ${count.format(f.rejected)} rejected); subjects added by editors: ${count.format(f.added)}`,
    `Suggestions waiting for review: ${count.format(f.waiting)}`,
    '',
    attach ? `The workbook is attached (${fileName}).` : `The workbook is too large to attach; download it from Cartouche: ${deps.config.publicUrl}/api/exports/${exp.id}/file`,
    '',
    'Coverage is a working figure of Cartouche, not a statement of conformance: accessibility obligations differ by jurisdiction (see WCAG 2.2 and the law that applies to you).',
    '',
    `The dashboard: ${link}`,
    `This mail goes out ${WEEKDAY_NAMES[((await ledgerMailSettings(collection)).weekday - 1) % 7]}s; managers can change the day or switch it off on the Ledger screen.`,
  ].join('\n');
  for (const m of managers) {
    await deps.mailer.send({
      to: m.email,
      subject: `Coverage ledger: ${collection.name}, ${period.from} to ${period.to}`,
      text,
      ...(content ? { attachments: [{ filename: fileName, content, contentType: KIND_INFO.ledger_xlsx.mimeType }] } : {}),
    });
  }
  await exp.update({ mailedAt: new Date() });
  return { exportId: exp.id, recipients: managers.length, attached: attach };
}

/** The settings as the API shows them: with the weekday in words and when the next mail goes. */
export function ledgerMailView(settings: LedgerMailSettings, now: Date = new Date()): LedgerMailView {
  return { ...settings, weekdayName: WEEKDAY_NAMES[settings.weekday - 1]!, nextSendAt: nextSendAt(now, settings)?.toISOString() ?? null };
}
