import { z } from 'zod';
import { collectionCreateSchema, collectionUpdateSchema } from '../../../common/schemas/collection.ts';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { currentUser, type GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { collectionDetail, collectionOr404, createCollection, listArchivedCollections, listCollectionSummaries, setArchived, updateCollection } from '../services/collections.ts';

const idParam = z.object({ id: z.coerce.number().int().positive() });

export function registerCollectionRoutes(api: GuardedRouter, ctx: AppContext): void {
  const read = needs('collections:read');
  const write = needs('collections:write');

  api.route('get', '/collections', read, async (_req, res) => {
    res.json({ collections: await listCollectionSummaries(ctx.sequelize) });
  });

  api.route('get', '/collections/archived', read, async (_req, res) => {
    res.json({ collections: await listArchivedCollections() });
  });

  api.route('post', '/collections', write, async (req, res) => {
    const body = parse(collectionCreateSchema, req.body, 'body');
    const c = await createCollection(body, { id: currentUser(req).id, ip: req.ip ?? null });
    res.status(201).json({ collection: await collectionDetail(c) });
  });

  api.route('get', '/collections/:id', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    res.set('Cache-Control', 'no-store').json({ collection: await collectionDetail(await collectionOr404(id)) });
  });

  api.route('put', '/collections/:id', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(collectionUpdateSchema, req.body, 'body');
    res.json({ collection: await collectionDetail(await updateCollection(ctx.sequelize, id, body, { id: currentUser(req).id, ip: req.ip ?? null })) });
  });

  api.route('post', '/collections/:id/archive', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    res.json({ collection: await collectionDetail(await setArchived(id, true, { id: currentUser(req).id, ip: req.ip ?? null })) });
  });

  api.route('post', '/collections/:id/restore', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    res.json({ collection: await collectionDetail(await setArchived(id, false, { id: currentUser(req).id, ip: req.ip ?? null })) });
  });
}
