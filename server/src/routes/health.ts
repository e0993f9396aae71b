import { PUBLIC } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import type { GuardedRouter } from '../http/routes.ts';
import { processEmbedderState } from '../services/features.ts';
import { embedderHealth, getHealth } from '../services/health.ts';

export function registerHealthRoutes(api: GuardedRouter, ctx: AppContext): void {
  api.route('get', '/health', PUBLIC, async (_req, res) => {
    const report = await getHealth(ctx.sequelize, {
      version: ctx.config.version,
      workerStaleAfterMs: ctx.config.workerStaleAfterMs,
      embedder: embedderHealth(ctx.config.embedder, processEmbedderState()),
    });
    res.status(report.database.ok ? 200 : 503).set('Cache-Control', 'no-store').json(report);
  });
}
