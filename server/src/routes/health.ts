import { Router } from 'express';
import type { AppContext } from '../context.ts';
import { getHealth } from '../services/health.ts';

export function healthRoutes(ctx: AppContext): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    const report = await getHealth(ctx.sequelize, { version: ctx.config.version, workerStaleAfterMs: ctx.config.workerStaleAfterMs });
    res.status(report.database.ok ? 200 : 503).set('Cache-Control', 'no-store').json(report);
  });
  return router;
}
