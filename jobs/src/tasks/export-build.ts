import type { AppConfig } from '../../../server/src/config.ts';
import { createMailer, type Mailer } from '../../../server/src/mail/mailer.ts';
import { EXPORT_JOB, buildExport } from '../../../server/src/services/exports/index.ts';
import { WEEKLY_JOB, runWeeklyLedger } from '../../../server/src/services/exports/weekly.ts';
import { Storage } from '../../../server/src/services/storage.ts';
import type { TaskHandler } from '../worker.ts';

/**
 * The export job kinds: `export-build` (one requested export: ledger, CSV, XMP sidecars or IIIF manifest)
 * and `weekly-ledger` (the ledger of last week, mailed to the managers; see services/exports/weekly.ts).
 */
export function exportTasks(deps: { config: AppConfig; mailer?: Mailer }): Record<string, TaskHandler> {
  const storage = new Storage(deps.config.storageDir);
  const mailer = deps.mailer ?? createMailer(deps.config);
  return {
    [EXPORT_JOB]: async (job, { sequelize, reportProgress }) => {
      const exp = await buildExport(sequelize, { config: deps.config, storage }, Number(job.payload.exportId), reportProgress, { finalAttempt: job.attempts >= job.maxAttempts });
      return { exportId: exp.id, rows: exp.rowCount, bytes: exp.byteSize };
    },
    [WEEKLY_JOB]: (job, { sequelize, reportProgress }) => runWeeklyLedger(sequelize, { config: deps.config, storage, mailer }, job, reportProgress),
  };
}
