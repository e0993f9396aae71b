import { Router } from 'express';
import type { AppContext } from '../context.ts';
import { listCollectionSummaries } from '../services/collections.ts';

export function collectionRoutes(ctx: AppContext): Router {
  const router = Router();
  router.get('/collections', async (_req, res) => {
    res.json({ collections: await listCollectionSummaries(ctx.sequelize) });
  });
  return router;
}
