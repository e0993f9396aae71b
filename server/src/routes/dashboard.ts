import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import type { GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { Collection } from '../models/index.ts';
import { collectionDashboard, coverageOverTime } from '../services/dashboard.ts';

const idParam = z.object({ id: z.coerce.number().int().positive() });
const weeksQuery = z.object({ weeks: z.coerce.number().int().min(2, 'At least 2 weeks.').max(104, 'At most 104 weeks (two years).').default(12) });

export function registerDashboardRoutes(api: GuardedRouter, ctx: AppContext): void {
  const read = needs('exports:read');

  /** Coverage over time of every collection (for the dashboard's first chart). */
  api.route('get', '/dashboard/coverage', read, async (req, res) => {
    const { weeks } = parse(weeksQuery, req.query, 'query');
    res.set('Cache-Control', 'no-store').json(await coverageOverTime(ctx.sequelize, { weeks }));
  });

  /** Throughput per week and editor, precision per subject, editor agreement and the last runs of one collection. */
  api.route('get', '/collections/:id/dashboard', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const { weeks } = parse(weeksQuery, req.query, 'query');
    if (!(await Collection.findByPk(id))) throw new HttpProblem(404, 'Not found', `There is no collection ${id}.`);
    res.set('Cache-Control', 'no-store').json(await collectionDashboard(ctx.sequelize, id, { weeks }));
  });
}
