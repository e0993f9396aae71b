import multer from 'multer';
import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import { currentUser, type GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import { collectionOr404 } from '../services/collections.ts';
import { exportVocabulary, importVocabulary } from '../services/vocabulary-exchange.ts';
import { conceptBase } from '../services/vocabulary.ts';

const idParam = z.object({ id: z.coerce.number().int().positive() });
const MAX_VOCABULARY_BYTES = 5 * 1024 * 1024;
const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_VOCABULARY_BYTES, files: 1 } });

const formatParam = z.enum(['turtle', 'csv'], { error: 'Either “turtle” (SKOS in Turtle) or “csv”.' });

/** The format of an uploaded file: as asked, or from its name. */
function formatOf(asked: string | undefined, fileName: string): 'turtle' | 'csv' {
  if (asked) return parse(formatParam, asked, 'body');
  if (/\.(ttl|turtle)$/i.test(fileName)) return 'turtle';
  if (/\.csv$/i.test(fileName)) return 'csv';
  throw new HttpProblem(400, 'Unknown file format', `${fileName}: name the format (turtle or csv), or give the file a .ttl or .csv name.`, { errors: [{ path: 'format', message: 'Choose Turtle or CSV.' }] });
}

export function registerVocabularyRoutes(api: GuardedRouter, ctx: AppContext): void {
  const base = conceptBase(ctx.config.publicUrl);

  /** The collection's vocabulary as a download: SKOS in Turtle, or a CSV sheet. */
  api.route('get', '/collections/:id/vocabulary', needs('collections:read'), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const { format } = parse(z.object({ format: formatParam.default('turtle') }), req.query, 'query');
    const c = await collectionOr404(id);
    const text = await exportVocabulary(c, format, base);
    const ext = format === 'csv' ? 'csv' : 'ttl';
    res
      .type(format === 'csv' ? 'text/csv; charset=utf-8' : 'text/turtle; charset=utf-8')
      .set('Content-Disposition', `attachment; filename="${c.slug}-vocabulary.${ext}"`)
      .set('Cache-Control', 'no-store')
      .send(text);
  });

  /**
   * Imports a vocabulary file (multipart field "file"; "format" turtle|csv or from the name; "dryRun"
   * "true" to check without storing). Whole or nothing: any integrity violation is reported with its
   * concept and imports nothing.
   */
  api.route('post', '/collections/:id/vocabulary', needs('subjects:write'), upload.single('file'), async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(z.object({ format: z.string().optional(), dryRun: z.enum(['true', 'false']).optional() }), req.body ?? {}, 'body');
    const file = req.file;
    if (!file) throw new HttpProblem(400, 'No file', 'Send the vocabulary file in the "file" field.');
    const format = formatOf(body.format, file.originalname);
    let text: string;
    try {
      text = new TextDecoder('utf-8', { fatal: true }).decode(file.buffer);
    } catch {
      throw new HttpProblem(400, 'Not UTF-8 text', `${file.originalname}: save the file as UTF-8 text and import it again.`);
    }
    const report = await importVocabulary(ctx.sequelize, id, format, text, base, { id: currentUser(req).id, ip: req.ip ?? null }, body.dryRun === 'true');
    res.status(report.dryRun ? 200 : 201).json({ report });
  });
}
