import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import type { GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { Collection, ItemTextRead, Subject, Suggestion } from '../models/index.ts';
import { ITEM_STATES } from '../models/item.ts';
import { catalogueFacets, itemHistory, itemOr404, searchCatalogue } from '../services/catalogue.ts';

const day = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-03-31.');

export function registerItemRoutes(api: GuardedRouter, ctx: AppContext): void {
  const read = needs('collections:read');

  api.route('get', '/items', read, async (req, res) => {
    const q = parse(
      z
        .object({
          collectionId: z.coerce.number().int().positive(),
          q: z.string().max(300).optional(),
          state: z.enum(ITEM_STATES).optional(),
          subjectId: z.coerce.number().int().positive().optional(),
          reviewerId: z.coerce.number().int().positive().optional(),
          from: day.optional(),
          to: day.optional(),
          page: z.coerce.number().int().min(1).default(1),
          pageSize: z.coerce.number().int().min(1).max(100).default(25),
        })
        .refine((v) => !v.from || !v.to || v.from <= v.to, { message: 'The first day is after the last one.', path: ['from'] }),
      req.query,
      'query',
    );
    if (!(await Collection.findByPk(q.collectionId))) throw new HttpProblem(404, 'Not found', 'No such collection.');
    res.json(await searchCatalogue(ctx.sequelize, q));
  });

  api.route('get', '/items/facets', read, async (req, res) => {
    const { collectionId } = parse(z.object({ collectionId: z.coerce.number().int().positive() }), req.query, 'query');
    res.json(await catalogueFacets(ctx.sequelize, collectionId));
  });

  api.route('get', '/items/:id', read, async (req, res) => {
    const { id } = parse(z.object({ id: z.coerce.number().int().positive() }), req.params, 'path');
    const item = await itemOr404(id);
    const collection = await Collection.findByPk(item.collectionId, { attributes: ['id', 'name', 'slug'] });
    const confirmed = await Suggestion.findAll({ where: { itemId: id, state: ['accepted', 'added'] }, include: [{ model: Subject, as: 'subject', attributes: ['id', 'prefLabel', 'kind', 'altLabels'] }] });
    const ocr = await ItemTextRead.findByPk(id);
    res.json({
      item: {
        id: item.id,
        identifier: item.identifier,
        fileName: item.fileName,
        collection: collection ? { id: collection.id, name: collection.name } : null,
        caption: item.caption,
        creator: item.creator,
        dateText: item.dateText,
        rights: item.rights,
        state: item.state,
        altText: item.altText,
        longDescription: item.longDescription,
        decorative: item.decorative,
        captionFlagged: item.captionFlagged,
        captionFlagNote: item.captionFlagNote,
        ocrText: item.ocrText,
        mostlyText: ocr?.mostlyText ?? false,
        approvedAt: item.approvedAt?.toISOString() ?? null,
        version: item.version,
        imageUrl: `/api/items/${item.id}/view`,
        thumbUrl: `/api/items/${item.id}/thumbnail`,
        subjects: confirmed.map((c) => {
          const s = (c as unknown as { subject: Subject }).subject;
          return { id: s.id, prefLabel: s.prefLabel, kind: s.kind, state: c.state };
        }),
      },
      history: await itemHistory(id),
    });
  });
}
