import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import { currentUser, type GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { Collection, Run } from '../models/index.ts';
import { cancelRun, listRuns, runView, startRun } from '../services/runs.ts';

const idParam = z.object({ id: z.coerce.number().int().positive() });

export function registerRunRoutes(api: GuardedRouter, ctx: AppContext): void {
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
