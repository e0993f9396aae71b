import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import { currentUser, type GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { Collection, ExportFile } from '../models/index.ts';
import { EXPORT_KINDS } from '../models/export-file.ts';
import { KIND_INFO, getExportView, listExports, requestExport } from '../services/exports/index.ts';
import { ledgerMailSettings, ledgerMailView, saveLedgerMailSettings } from '../services/exports/weekly.ts';
import { Storage } from '../services/storage.ts';

const idParam = z.object({ id: z.coerce.number().int().positive() });

const calendarDay = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Give a day as YYYY-MM-DD.')
  .refine((v) => !Number.isNaN(Date.parse(`${v}T00:00:00Z`)) && new Date(`${v}T00:00:00Z`).toISOString().startsWith(v), 'Not a calendar day.');

const exportBody = z
  .object({
    kind: z.enum(EXPORT_KINDS, { message: `Choose one of ${EXPORT_KINDS.join(', ')}.` }),
    periodFrom: calendarDay.nullable().default(null),
    periodTo: calendarDay.nullable().default(null),
  })
  .refine((b) => !b.periodFrom || !b.periodTo || b.periodFrom <= b.periodTo, { message: 'The last day is before the first day.', path: ['periodTo'] });

const mailBody = z.object({
  enabled: z.boolean(),
  weekday: z.number().int().min(1, 'Weekday 1 is Monday.').max(7, 'Weekday 7 is Sunday.'),
  hour: z.number().int().min(0).max(23, 'Give an hour from 0 to 23.'),
});

export function registerExportRoutes(api: GuardedRouter, ctx: AppContext): void {
  const storage = new Storage(ctx.config.storageDir);
  const read = needs('exports:read');

  async function collectionOf(id: number): Promise<Collection> {
    const c = await Collection.findByPk(id);
    if (!c) throw new HttpProblem(404, 'Not found', `There is no collection ${id}.`);
    return c;
  }

  api.route('get', '/collections/:id/exports', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    await collectionOf(id);
    res.set('Cache-Control', 'no-store').json({ exports: await listExports(id) });
  });

  /** Asks for an export; the worker builds it (202, then poll GET /exports/:id until it is ready). */
  api.route('post', '/collections/:id/exports', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(exportBody, req.body, 'body');
    await collectionOf(id);
    const exp = await requestExport(ctx.sequelize, { collectionId: id, kind: body.kind, periodFrom: body.periodFrom, periodTo: body.periodTo, requestedBy: currentUser(req).id });
    res.status(202).location(`/api/exports/${exp.id}`).json({ export: await getExportView(exp.id) });
  });

  api.route('get', '/exports/:id', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    res.set('Cache-Control', 'no-store').json({ export: await getExportView(id) });
  });

  api.route('get', '/exports/:id/file', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const exp = await ExportFile.findByPk(id);
    if (!exp) throw new HttpProblem(404, 'Not found', `There is no export ${id}.`);
    if (exp.status !== 'ready' || !exp.fileKey) {
      throw new HttpProblem(409, 'Not ready', exp.status === 'failed' ? `Export ${id} failed: ${exp.error ?? 'no reason recorded'}.` : `Export ${id} is ${exp.status}; ask again once it is ready.`, { type: '/problems/export-not-ready' });
    }
    if (!(await storage.has(exp.fileKey))) throw new HttpProblem(410, 'Gone', `The file of export ${id} is no longer in storage.`);
    res.attachment(exp.fileName ?? `export-${id}.${KIND_INFO[exp.kind].extension}`);
    res.set({ 'Content-Type': KIND_INFO[exp.kind].mimeType, 'Cache-Control': 'private, max-age=31536000, immutable' });
    await new Promise<void>((resolve, reject) =>
      res.sendFile(storage.pathOf(exp.fileKey!), { dotfiles: 'allow', headers: { 'Content-Type': KIND_INFO[exp.kind].mimeType } }, (err) => (err ? reject(err) : resolve())),
    );
  });

  api.route('get', '/collections/:id/ledger-mail', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const settings = await ledgerMailSettings(await collectionOf(id));
    res.set('Cache-Control', 'no-store').json({ ledgerMail: ledgerMailView(settings) });
  });

  api.route('put', '/collections/:id/ledger-mail', needs('exports:schedule'), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(mailBody, req.body, 'body');
    const settings = await saveLedgerMailSettings(await collectionOf(id), body, currentUser(req).id);
    res.json({ ledgerMail: ledgerMailView(settings) });
  });
}
