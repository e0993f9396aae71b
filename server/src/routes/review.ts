import type { Request, Response } from 'express';
import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem, sendProblem, type ProblemDetails } from '../http/problem.ts';
import { currentUser, type GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { collectionAgreement } from '../services/agreement.ts';
import { ocrItem } from '../services/ocr.ts';
import {
  AltTextRejected,
  StaleBatchError,
  StaleItemError,
  approveItem,
  decideMany,
  decideSubject,
  doubleReviewShare,
  flagCaption,
  itemPanel,
  promoteToExample,
  recordSecondReview,
  reviewQueue,
  saveDescription,
  searchSubjects,
  secondReviewQueue,
  setDoubleReviewShare,
  setForm,
  skipItem,
  subjectGrid,
} from '../services/review.ts';
import { Storage } from '../services/storage.ts';

const idParam = z.object({ id: z.coerce.number().int().positive() });
const version = z.number().int().positive();
const MAX_ALT = 2000;
const MAX_LONG = 20_000;

const description = z.object({
  version,
  altText: z.string().max(MAX_ALT, `Keep the alt text under ${MAX_ALT} characters; longer content belongs in the long description.`),
  longDescription: z.string().max(MAX_LONG),
  decorative: z.boolean(),
});

const bool = z.enum(['true', 'false', '1', '0']).transform((v) => v === 'true' || v === '1');

/** The 409 of a stale save: RFC 9457 problem details plus what the editor sent and the item as it is now. */
function sendStale(req: Request, res: Response, err: StaleItemError): void {
  const problem: ProblemDetails & { submitted: unknown; submittedVersion: number; current: unknown } = {
    type: '/problems/stale-item',
    title: 'Item changed meanwhile',
    status: 409,
    detail: `Someone saved ${err.current.item.identifier} after your copy (version ${err.submittedVersion}; it is at version ${err.current.item.version} now). Nothing was saved: compare both, then save again.`,
    instance: req.originalUrl,
    submittedVersion: err.submittedVersion,
    submitted: err.submitted,
    current: err.current,
  };
  sendProblem(res, problem);
}

function sendAltTextProblem(req: Request, res: Response, err: AltTextRejected): void {
  const problem: ProblemDetails & { findings: unknown } = {
    type: err.type,
    title: err.title,
    status: err.status,
    detail: err.message,
    instance: req.originalUrl,
    errors: err.errors,
    findings: err.findings,
  };
  sendProblem(res, problem);
}

/** Runs a handler and answers the desk's own conflicts with their full payloads. */
async function guarded(req: Request, res: Response, run: () => Promise<void>): Promise<void> {
  try {
    await run();
  } catch (err) {
    if (err instanceof StaleItemError) return sendStale(req, res, err);
    if (err instanceof AltTextRejected) return sendAltTextProblem(req, res, err);
    if (err instanceof StaleBatchError) {
      const problem: ProblemDetails & { stale: unknown } = {
        type: '/problems/stale-items',
        title: 'Items changed meanwhile',
        status: 409,
        detail: `${err.stale.map((s) => s.identifier).join(', ')} changed after the grid was loaded. Nothing was saved: reload the grid and decide again.`,
        instance: req.originalUrl,
        stale: err.stale,
      };
      return sendProblem(res, problem);
    }
    throw err;
  }
}

export function registerReviewRoutes(api: GuardedRouter, ctx: AppContext): void {
  const storage = new Storage(ctx.config.storageDir);
  const read = needs('collections:read');
  const write = needs('review:write');
  const actor = (req: Request) => ({ id: currentUser(req).id, ip: req.ip ?? null });

  api.route('get', '/review/queue', write, async (req, res) => {
    const q = parse(
      z
        .object({
          collectionId: z.coerce.number().int().positive(),
          subjectId: z.coerce.number().int().positive().optional(),
          state: z.enum(['open', 'new', 'suggested', 'approved']).default('open'),
          minProbability: z.coerce.number().min(0).max(1).optional(),
          maxProbability: z.coerce.number().min(0).max(1).optional(),
          notReviewed: bool.optional(),
          sort: z.enum(['uncertainty', 'identifier']).default('uncertainty'),
          limit: z.coerce.number().int().min(1).max(200).default(50),
          offset: z.coerce.number().int().min(0).default(0),
        })
        .refine((v) => v.minProbability === undefined || v.maxProbability === undefined || v.minProbability <= v.maxProbability, { message: 'minProbability is above maxProbability', path: ['minProbability'] }),
      req.query,
      'query',
    );
    res.json(await reviewQueue(ctx.sequelize, actor(req), q));
  });

  api.route('get', '/review/items/:id', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const { blind } = parse(z.object({ blind: bool.optional() }), req.query, 'query');
    res.json(await itemPanel(id, actor(req), { blind }));
  });

  api.route('post', '/review/items/:id/subjects', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(z.object({ version, subjectId: z.number().int().positive(), decision: z.enum(['accept', 'reject', 'undo']) }), req.body, 'body');
    await guarded(req, res, async () => void res.json(await decideSubject(ctx.sequelize, actor(req), id, body)));
  });

  api.route('put', '/review/items/:id/form', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(z.object({ version, subjectId: z.number().int().positive().nullable() }), req.body, 'body');
    await guarded(req, res, async () => void res.json(await setForm(ctx.sequelize, actor(req), id, body)));
  });

  api.route('put', '/review/items/:id/description', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(description, req.body, 'body');
    await guarded(req, res, async () => void res.json(await saveDescription(ctx.sequelize, actor(req), id, body)));
  });

  api.route('post', '/review/items/:id/approve', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(description, req.body, 'body');
    await guarded(req, res, async () => void res.json(await approveItem(ctx.sequelize, actor(req), id, body)));
  });

  api.route('post', '/review/items/:id/skip', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    await skipItem(ctx.sequelize, actor(req), id);
    res.status(204).end();
  });

  api.route('put', '/review/items/:id/caption-flag', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(
      z
        .object({ version, flagged: z.boolean(), note: z.string().max(2000).default('') })
        .refine((v) => !v.flagged || v.note.trim().length > 0, { message: 'Say what is harmful or outdated in the caption, so the next person knows why it was flagged.', path: ['note'] }),
      req.body,
      'body',
    );
    await guarded(req, res, async () => void res.json(await flagCaption(ctx.sequelize, actor(req), id, body)));
  });

  api.route('post', '/review/items/:id/examples', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(z.object({ subjectId: z.number().int().positive() }), req.body, 'body');
    const result = await promoteToExample(ctx.sequelize, storage, actor(req), id, body.subjectId);
    res.status(result.created ? 201 : 200).json(result);
  });

  api.route('post', '/review/items/:id/ocr', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    try {
      await ocrItem({ sequelize: ctx.sequelize, storage }, id);
    } catch (err) {
      if (err instanceof HttpProblem) throw err;
      throw new HttpProblem(422, 'Text not read', `The image of item ${id} could not be read: ${(err as Error).message}`, { type: '/problems/ocr-failed' });
    }
    res.json(await itemPanel(id, actor(req)));
  });

  api.route('post', '/review/items/:id/second-review', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(z.object({ present: z.array(z.number().int().positive()).max(500), absent: z.array(z.number().int().positive()).max(500) }), req.body, 'body');
    res.status(201).json(await recordSecondReview(ctx.sequelize, actor(req), id, body));
  });

  api.route('get', '/review/subjects', write, async (req, res) => {
    const q = parse(
      z.object({ collectionId: z.coerce.number().int().positive(), q: z.string().max(200).default(''), kind: z.enum(['subject', 'form']).optional(), limit: z.coerce.number().int().min(1).max(50).default(10) }),
      req.query,
      'query',
    );
    res.json({ subjects: await searchSubjects(q.collectionId, q.q, { kind: q.kind, limit: q.limit }) });
  });

  api.route('get', '/review/subjects/:id/grid', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const { limit } = parse(z.object({ limit: z.coerce.number().int().min(1).max(200).default(48) }), req.query, 'query');
    res.json(await subjectGrid(ctx.sequelize, id, limit));
  });

  api.route('post', '/review/subjects/:id/grid', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(
      z.object({ decisions: z.array(z.object({ itemId: z.number().int().positive(), version, decision: z.enum(['accept', 'reject']) })).min(1).max(200) }),
      req.body,
      'body',
    );
    const ids = body.decisions.map((d) => d.itemId);
    if (new Set(ids).size !== ids.length) throw new HttpProblem(400, 'Invalid request', 'Each item may appear once in one grid save.', { type: '/problems/invalid-request' });
    await guarded(req, res, async () => void res.json(await decideMany(ctx.sequelize, actor(req), id, body.decisions)));
  });

  api.route('get', '/review/collections/:id/second-reviews', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    res.json(await secondReviewQueue(ctx.sequelize, actor(req), id, 50));
  });

  api.route('get', '/review/collections/:id/settings', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    res.json({ doubleReviewShare: await doubleReviewShare(id) });
  });

  api.route('put', '/review/collections/:id/settings', needs('collections:write'), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(z.object({ doubleReviewShare: z.number().min(0).max(1) }), req.body, 'body');
    res.json({ doubleReviewShare: await setDoubleReviewShare(ctx.sequelize, actor(req), id, body.doubleReviewShare) });
  });

  api.route('get', '/review/collections/:id/agreement', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    res.json({ doubleReviewShare: await doubleReviewShare(id), ...(await collectionAgreement(ctx.sequelize, id)) });
  });
}
