import { once } from 'node:events';
import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import type { GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { Collection, Item } from '../models/index.ts';
import { IIIF_MEDIA_TYPE, canvasOf, partOf, viewImageOf, writeManifest, type IiifPart } from '../services/exports/iiif.ts';
import { exportItem } from '../services/exports/rows.ts';
import { createIngestDeps } from '../services/ingest.ts';

const idParam = z.object({ id: z.coerce.number().int().positive() });
const PARTS = ['canvas', 'page', 'painting', 'annotations', 'alt-text', 'long-description'] as const satisfies readonly IiifPart[];
const partParams = z.object({ id: z.coerce.number().int().positive(), part: z.enum(PARTS, { message: `One of ${PARTS.join(', ')}.` }) });

/**
 * IIIF Presentation 3.0: a collection's Manifest, and every Canvas, AnnotationPage and Annotation in it at
 * its own URL (the ids in the Manifest are these URLs). The painted images are the items' review-size
 * images at /api/items/:id/view. Signed-in readers only, like the rest of the catalogue.
 */
export function registerIiifRoutes(api: GuardedRouter, ctx: AppContext): void {
  const deps = createIngestDeps(ctx);
  const read = needs('exports:read');

  api.route('get', '/iiif/collections/:id/manifest', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const collection = await Collection.findByPk(id);
    if (!collection) throw new HttpProblem(404, 'Not found', `There is no collection ${id}.`);
    const [row] = await ctx.sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM items WHERE collection_id = :id AND (view_key IS NOT NULL OR file_key IS NOT NULL)', {
      type: QueryTypes.SELECT,
      replacements: { id },
    });
    // §3 Manifest: "items … MUST have at least one item"
    if (!Number(row?.n)) throw new HttpProblem(409, 'No images yet', `${collection.name} has no item with a stored image, and a IIIF manifest needs at least one canvas.`, { type: '/problems/no-images' });
    res.status(200).type(IIIF_MEDIA_TYPE).set('Cache-Control', 'no-store');
    await writeManifest(ctx.sequelize, deps, {
      collection,
      publicUrl: ctx.config.publicUrl,
      write: async (chunk) => {
        if (!res.write(chunk)) await once(res, 'drain');
      },
    });
    res.end();
  });

  api.route('get', '/iiif/items/:id/:part', read, async (req, res) => {
    const { id, part } = parse(partParams, req.params, 'path');
    const item = await Item.findByPk(id, { attributes: ['id', 'collectionId'] });
    if (!item) throw new HttpProblem(404, 'Not found', `There is no item ${id}.`);
    const collection = (await Collection.findByPk(item.collectionId))!;
    let found: object | null = null;
    const exported = await exportItem(ctx.sequelize, item.collectionId, id);
    if (exported) {
      const image = await viewImageOf(deps, exported);
      if (image) found = partOf(canvasOf(exported, image, { publicUrl: ctx.config.publicUrl, language: collection.altTextLanguage || 'none' }), part);
    }
    if (!found) throw new HttpProblem(404, 'Not found', `Item ${id} has no ${part.replace('-', ' ')} (no stored image, or no approved text of that kind).`);
    res.type(IIIF_MEDIA_TYPE).set('Cache-Control', 'no-store').send(JSON.stringify(found));
  });
}
