import type { Request } from 'express';
import multer from 'multer';
import sharp, { type Metadata } from 'sharp';
import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import { currentUser, type GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { Collection, Example, Subject, SubjectModel } from '../models/index.ts';
import { EXAMPLE_MEDIA } from '../models/example.ts';
import { processEmbedder } from '../services/features.ts';
import { Storage } from '../services/storage.ts';
import { activeModel, judgedItems, modelHistory, rankedPreview, summarise, synthesizeSubjectModel } from '../services/subject-models.ts';
import { subjectCreateSchema, subjectMoveSchema, subjectUpdateSchema } from '../../../common/schemas/subject.ts';
import { addExamples, estimateAtThreshold, removeExample } from '../services/subject-studio.ts';
import { conceptBase, conceptUriOf, createSubject, moveSubject, subjectRecord, updateSubject } from '../services/vocabulary.ts';
import { subjectHistory } from '../services/subject-history.ts';

const idParam = z.object({ id: z.coerce.number().int().positive() });
const EXAMPLE_FORMATS = new Set(['jpeg', 'png', 'webp', 'tiff']);
const MAX_EXAMPLE_BYTES = 25 * 1024 * 1024;
const MAX_EXAMPLE_PIXELS = 50_000_000;

const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_EXAMPLE_BYTES, files: 20 } });

/** Reads the real format from the bytes (not the name): a drawing saved as PNG, a photo as JPEG, … */
async function checkExampleImage(name: string, bytes: Buffer): Promise<{ format: string; width: number; height: number }> {
  let meta: Metadata;
  try {
    meta = await sharp(bytes, { limitInputPixels: MAX_EXAMPLE_PIXELS, failOn: 'error' }).metadata();
  } catch (err) {
    throw new HttpProblem(400, 'Not a usable image', `${name}: ${(err as Error).message.includes('pixel limit') ? `larger than ${MAX_EXAMPLE_PIXELS / 1e6} megapixels` : 'not an image Cartouche can read'}.`);
  }
  if (!meta.format || !EXAMPLE_FORMATS.has(meta.format)) throw new HttpProblem(400, 'Unsupported image format', `${name}: ${meta.format ?? 'unknown'} files cannot be examples; use JPEG, PNG, WebP or TIFF.`);
  return { format: meta.format, width: meta.width ?? 0, height: meta.height ?? 0 };
}

function exampleView(e: Example) {
  return { id: e.id, subjectId: e.subjectId, medium: e.medium, origin: e.origin, itemId: e.itemId, createdAt: e.createdAt.toISOString(), imageUrl: `/api/examples/${e.id}/image` };
}

export function registerSubjectRoutes(api: GuardedRouter, ctx: AppContext): void {
  const storage = new Storage(ctx.config.storageDir);
  const read = needs('collections:read');
  const write = needs('subjects:write');
  const base = conceptBase(ctx.config.publicUrl);
  const actorOf = (req: Request) => ({ id: currentUser(req).id, ip: req.ip ?? null });

  const subjectOr404 = async (id: number) => {
    const s = await Subject.findByPk(id);
    if (!s) throw new HttpProblem(404, 'Not found', 'No such subject.');
    return s;
  };

  api.route('get', '/collections/:id/subjects', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const collection = await Collection.findByPk(id);
    if (!collection) throw new HttpProblem(404, 'Not found', 'No such collection.');
    const subjects = await Subject.findAll({ where: { collectionId: id }, order: [['prefLabel', 'ASC']] });
    const examples = await Example.count({ where: { subjectId: subjects.map((s) => s.id) }, group: ['subject_id'] as never });
    const exampleCount = new Map((examples as unknown as Array<{ subject_id?: number; subjectId?: number; count: number }>).map((r) => [Number(r.subject_id ?? r.subjectId), Number(r.count)]));
    const models = await SubjectModel.findAll({ where: { subjectId: subjects.map((s) => s.id), active: true }, attributes: { exclude: ['weights'] } });
    const modelOf = new Map(models.map((m) => [m.subjectId, summarise(m)]));
    res.json({
      subjects: subjects.map((s) => ({
        id: s.id,
        prefLabel: s.prefLabel,
        kind: s.kind,
        broaderId: s.broaderId,
        status: s.status,
        notation: s.notation,
        altTextPhrase: s.altTextPhrase,
        altLabels: s.altLabels,
        feedsAltText: s.feedsAltText,
        conceptUri: conceptUriOf(s, collection.slug, base),
        version: s.version,
        examples: exampleCount.get(s.id) ?? 0,
        model: modelOf.get(s.id) ?? null,
      })),
    });
  });

  api.route('get', '/subjects/:id', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const s = await subjectOr404(id);
    const examples = await Example.findAll({ where: { subjectId: id }, order: [['id', 'ASC']] });
    const embedder = await processEmbedder();
    const model = await activeModel(id, embedder.id);
    const judged = await judgedItems(id);
    res.json({
      subject: {
        id: s.id,
        collectionId: s.collectionId,
        prefLabel: s.prefLabel,
        altLabels: s.altLabels,
        kind: s.kind,
        broaderId: s.broaderId,
        notation: s.notation,
        scopeNote: s.scopeNote,
        altTextPhrase: s.altTextPhrase,
        status: s.status,
        version: s.version,
        feedsAltText: s.feedsAltText,
        conceptUri: conceptUriOf(s, (await Collection.findByPk(s.collectionId))!.slug, base),
      },
      examples: examples.map(exampleView),
      model: model ? summarise(model) : null,
      judgements: { confirmed: judged.confirmed.length, rejected: judged.rejected.length },
    });
  });

  api.route('post', '/collections/:id/subjects', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(subjectCreateSchema, req.body, 'body');
    const s = await createSubject(ctx.sequelize, id, body, base, actorOf(req));
    res.status(201).json({ subject: subjectRecord(s, (await Collection.findByPk(id))!.slug, base) });
  });

  /** The whole record from the editor's copy; a copy older than the stored version gets 409. */
  api.route('put', '/subjects/:id', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(subjectUpdateSchema, req.body, 'body');
    const s = await updateSubject(ctx.sequelize, id, body, actorOf(req));
    res.json({ subject: subjectRecord(s, (await Collection.findByPk(s.collectionId))!.slug, base) });
  });

  /** Re-parents a subject (drag and drop, or "Move under…"); refuses loops and stale copies. */
  api.route('post', '/subjects/:id/move', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(subjectMoveSchema, req.body, 'body');
    const s = await moveSubject(ctx.sequelize, id, body, actorOf(req));
    res.json({ subject: subjectRecord(s, (await Collection.findByPk(s.collectionId))!.slug, base) });
  });

  /** Estimated precision and recall at a threshold, from the items editors judged; says when there are too few. */
  api.route('get', '/subjects/:id/history', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    await subjectOr404(id);
    res.json({ history: await subjectHistory(id) });
  });

  api.route('get', '/subjects/:id/estimate', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const { minZ } = parse(z.object({ minZ: z.coerce.number().min(-10).max(10).default(2) }), req.query, 'query');
    res.set('Cache-Control', 'no-store').json({ estimate: await estimateAtThreshold(ctx.sequelize, await processEmbedder(), id, minZ) });
  });

  api.route('post', '/subjects/:id/examples', write, upload.array('files', 20), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const { medium } = parse(z.object({ medium: z.enum(EXAMPLE_MEDIA) }), req.body, 'body');
    await subjectOr404(id);
    const files = (req.files as Express.Multer.File[] | undefined) ?? [];
    if (files.length === 0) throw new HttpProblem(400, 'No files', 'Send one or more image files in the "files" field.');
    // every file is checked before any is stored: a batch of examples lands whole or not at all
    for (const f of files) await checkExampleImage(f.originalname, f.buffer);
    const embedder = await processEmbedder();
    const created = await addExamples(ctx.sequelize, embedder, storage, id, medium, files.map((f) => ({ name: f.originalname, bytes: f.buffer })), actorOf(req));
    res.status(201).json({ examples: created.map(exampleView), embedderId: embedder.id });
  });

  api.route('delete', '/examples/:id', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    await removeExample(ctx.sequelize, id, actorOf(req));
    res.status(204).end();
  });

  api.route('get', '/examples/:id/image', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const example = await Example.findByPk(id);
    if (!example) throw new HttpProblem(404, 'Not found', 'No such example.');
    const path = storage.pathOf(example.fileKey);
    const { format } = await sharp(path).metadata();
    res.type(`image/${format ?? 'png'}`);
    // the storage folder may sit under a dot-folder (.data): allow it explicitly
    res.set('Cache-Control', 'private, max-age=31536000, immutable').sendFile(path, { dotfiles: 'allow', headers: { 'Content-Type': res.get('Content-Type') } });
  });

  api.route('get', '/subjects/:id/preview', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const q = parse(
      z.object({ topN: z.coerce.number().int().min(1).max(500).default(50), minZ: z.coerce.number().min(-10).max(10).default(2) }),
      req.query,
      'query',
    );
    res.json(await rankedPreview(ctx.sequelize, await processEmbedder(), id, q));
  });

  api.route('post', '/subjects/:id/models', write, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(
      z.discriminatedUnion('mode', [
        z.object({ mode: z.literal('from-examples') }),
        z.object({ mode: z.literal('narrower'), broaderSubjectId: z.number().int().positive().optional() }),
        z.object({ mode: z.literal('carried'), sourceSubjectId: z.number().int().positive() }),
      ]),
      req.body,
      'body',
    );
    const model = await synthesizeSubjectModel(ctx.sequelize, await processEmbedder(), id, body, currentUser(req).id, req.ip ?? null);
    res.status(201).json({ model });
  });

  api.route('get', '/subjects/:id/models', read, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    res.json({ models: await modelHistory(id) });
  });
}
