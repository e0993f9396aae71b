import { isAbsolute } from 'node:path';
import cron from 'node-cron';
import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import { currentUser, type GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { Collection, Run } from '../models/index.ts';
import { cancelRun, listRuns, runView, startRun } from '../services/runs.ts';

const idParam = z.object({ id: z.coerce.number().int().positive() });

const timeZones = new Set(Intl.supportedValuesOf('timeZone').concat('UTC'));

const scheduleBody = z.object({
  scheduleCron: z.string().trim().max(100).refine((v) => cron.validate(v), 'Not a cron expression (five fields: minute hour day month weekday, e.g. "0 2 * * *").'),
  scheduleTimezone: z.string().refine((v) => timeZones.has(v), 'Not a time zone name (IANA, e.g. "Europe/London" or "UTC").'),
  scheduleEnabled: z.boolean(),
  dropFolder: z
    .string()
    .trim()
    .max(1000)
    .refine((v) => v === '' || isAbsolute(v), 'Give the drop folder as an absolute path on the server.')
    .transform((v) => (v === '' ? null : v)),
});

export function registerRunRoutes(api: GuardedRouter, ctx: AppContext): void {
  api.route('get', '/collections/:id/schedule', needs('collections:read'), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const c = await Collection.findByPk(id);
    if (!c) throw new HttpProblem(404, 'Not found', 'No such collection.');
    res.json({ schedule: { scheduleCron: c.scheduleCron, scheduleTimezone: c.scheduleTimezone, scheduleEnabled: c.scheduleEnabled, dropFolder: c.dropFolder ?? '' } });
  });

  /** The night-shift settings of a collection; the workers pick a change up within a few minutes. */
  api.route('put', '/collections/:id/schedule', needs('collections:write'), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(scheduleBody, req.body, 'body');
    const c = await Collection.findByPk(id);
    if (!c) throw new HttpProblem(404, 'Not found', 'No such collection.');
    await c.update(body);
    res.json({ schedule: { ...body, dropFolder: body.dropFolder ?? '' } });
  });

  api.route('get', '/collections/:id/runs', needs('collections:read'), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    if (!(await Collection.findByPk(id))) throw new HttpProblem(404, 'Not found', 'No such collection.');
    res.set('Cache-Control', 'no-store').json({ runs: await listRuns(id) });
  });

  api.route('post', '/collections/:id/runs', needs('runs:start'), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const run = await startRun(ctx.sequelize, id, 'manual', currentUser(req).id);
    res.status(202).json({ run: runView(run) });
  });

  api.route('get', '/runs/:id', needs('collections:read'), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const run = await Run.findByPk(id);
    if (!run) throw new HttpProblem(404, 'Not found', 'No such run.');
    res.set('Cache-Control', 'no-store').json({ run: runView(run) });
  });

  api.route('post', '/runs/:id/cancel', needs('runs:start'), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    res.json({ run: runView(await cancelRun(id)) });
  });
}
