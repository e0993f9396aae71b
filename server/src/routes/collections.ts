import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import type { GuardedRouter } from '../http/routes.ts';
import { listCollectionSummaries } from '../services/collections.ts';

export function registerCollectionRoutes(api: GuardedRouter, ctx: AppContext): void {
  api.route('get', '/collections', needs('collections:read'), async (_req, res) => {
    res.json({ collections: await listCollectionSummaries(ctx.sequelize) });
  });
}
