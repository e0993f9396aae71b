import sharp from 'sharp';
import type { Sequelize } from 'sequelize';
import type { Collection } from '../../models/index.ts';
import { ensureDerivatives, type IngestDeps } from '../ingest.ts';
import { itemPages, type ExportItem } from './rows.ts';

/**
 * IIIF Presentation API 3.0 (https://iiif.io/api/presentation/3.0/) for a collection: one Manifest, one
 * Canvas per item with a stored image, the review-size image painted on it (§3 "painting" motivation), and
 * the approved alt text and long description as `describing` annotations with a TextualBody in the
 * Canvas's `annotations` — the pattern the IIIF community documents for text alternatives, since 3.0 has no
 * alt-text property. Every id is a URL under the public address that answers with that resource.
 */

export const IIIF_CONTEXT = 'http://iiif.io/api/presentation/3/context.json';
/** The media type with the profile, as §6 "HTTP Requests and Responses" recommends. */
export const IIIF_MEDIA_TYPE = 'application/ld+json;profile="http://iiif.io/api/presentation/3/context.json"';

export type LanguageMap = Record<string, string[]>;
export type IiifPart = 'canvas' | 'page' | 'painting' | 'annotations' | 'alt-text' | 'long-description';

export function iiifUrls(publicUrl: string) {
  const base = `${publicUrl}/api`;
  return {
    manifest: (collectionId: number) => `${base}/iiif/collections/${collectionId}/manifest`,
    part: (itemId: number, part: IiifPart) => `${base}/iiif/items/${itemId}/${part}`,
    view: (itemId: number) => `${base}/items/${itemId}/view`,
    thumbnail: (itemId: number) => `${base}/items/${itemId}/thumbnail`,
  };
}

const lang = (language: string, text: string): LanguageMap => ({ [language || 'none']: [text] });
const none = (text: string): LanguageMap => ({ none: [text] });
const entry = (label: string, value: LanguageMap) => ({ label: { en: [label] }, value });

export interface CanvasImage {
  width: number;
  height: number;
  format: string;
}

/** The size and type of the review-size image an item is painted with, read from the stored file's header. */
export async function viewImageOf(deps: IngestDeps, item: Pick<ExportItem, 'id' | 'fileKey' | 'viewKey'>): Promise<CanvasImage | null> {
  let viewKey = item.viewKey;
  if (!viewKey) {
    if (!item.fileKey) return null;
    try {
      viewKey = (await ensureDerivatives(deps, { id: item.id, fileKey: item.fileKey, thumbKey: null, viewKey: null })).viewKey;
    } catch {
      return null; // no stored scan, or one that cannot be decoded: no canvas for it
    }
  }
  if (!(await deps.storage.has(viewKey))) return null;
  const meta = await sharp(deps.storage.pathOf(viewKey)).metadata();
  if (!meta.width || !meta.height) return null;
  return { width: meta.width, height: meta.height, format: meta.format === 'webp' ? 'image/webp' : 'image/jpeg' };
}

/** One item's Canvas (§3 Canvas: id, type, label, height, width, items; annotations; thumbnail; metadata). */
export function canvasOf(item: ExportItem, image: CanvasImage, opts: { publicUrl: string; language: string }) {
  const url = iiifUrls(opts.publicUrl);
  const canvasId = url.part(item.id, 'canvas');
  const metadata = [entry('Identifier', none(item.identifier)), entry('File', none(item.fileName))];
  if (item.caption) metadata.push(entry('Caption', lang(opts.language, item.caption)));
  if (item.creator) metadata.push(entry('Creator', lang(opts.language, item.creator)));
  if (item.dateText) metadata.push(entry('Date', lang(opts.language, item.dateText)));
  if (item.subjects.length) metadata.push(entry('Subjects', { [opts.language || 'none']: item.subjects.map((s) => s.label) }));
  if (item.state === 'approved' && item.decorative) metadata.push(entry('Decorative', lang('en', 'yes: an empty text alternative')));

  const describe = (part: 'alt-text' | 'long-description', label: string, value: string) => ({
    id: url.part(item.id, part),
    type: 'Annotation',
    motivation: 'describing',
    label: { en: [label] },
    body: { type: 'TextualBody', value, format: 'text/plain', language: opts.language || 'none' },
    target: canvasId,
  });
  const describing = [];
  if (item.altText) describing.push(describe('alt-text', 'Alt text', item.altText));
  if (item.longDescription) describing.push(describe('long-description', 'Long description', item.longDescription));
  const painting = {
    id: url.part(item.id, 'painting'),
    type: 'Annotation',
    motivation: 'painting',
    body: { id: url.view(item.id), type: 'Image', format: image.format, width: image.width, height: image.height },
    target: canvasId,
  };
  return {
    id: canvasId,
    type: 'Canvas',
    label: none(item.identifier),
    // the Canvas has the scan's own size when it is known; the painted image is scaled onto it
    width: item.width ?? image.width,
    height: item.height ?? image.height,
    metadata,
    thumbnail: [{ id: url.thumbnail(item.id), type: 'Image', format: 'image/jpeg' }],
    items: [{ id: url.part(item.id, 'page'), type: 'AnnotationPage', items: [painting] }],
    ...(describing.length ? { annotations: [{ id: url.part(item.id, 'annotations'), type: 'AnnotationPage', items: describing }] } : {}),
  };
}

export type Canvas = ReturnType<typeof canvasOf>;

/** One part of a canvas, for the URL that names it. */
export function partOf(canvas: Canvas, part: IiifPart): object | null {
  const withContext = (o: object) => ({ '@context': IIIF_CONTEXT, ...o });
  const page = canvas.items[0]!;
  const notes = canvas.annotations?.[0];
  switch (part) {
    case 'canvas':
      return withContext(canvas);
    case 'page':
      return withContext(page);
    case 'painting':
      return withContext(page.items[0]!);
    case 'annotations':
      return notes ? withContext(notes) : null;
    case 'alt-text':
    case 'long-description': {
      const found = notes?.items.find((a) => a.id.endsWith(`/${part}`));
      return found ? withContext(found) : null;
    }
  }
}

/**
 * Writes a collection's Manifest as JSON in pieces (the canvases of one page of items at a time), so a
 * collection of any size is answered without building the whole document in memory.
 */
export async function writeManifest(
  sequelize: Sequelize,
  deps: IngestDeps,
  req: { collection: Pick<Collection, 'id' | 'name' | 'description' | 'medium' | 'altTextLanguage'>; publicUrl: string; write: (chunk: string) => Promise<void> | void },
): Promise<{ canvases: number }> {
  const { collection } = req;
  const language = collection.altTextLanguage || 'none';
  const head = {
    '@context': IIIF_CONTEXT,
    id: iiifUrls(req.publicUrl).manifest(collection.id),
    type: 'Manifest',
    label: lang(language, collection.name),
    ...(collection.description ? { summary: lang(language, collection.description) } : {}),
    metadata: [entry('Medium', lang(language, collection.medium)), entry('Published by', none('Cartouche'))],
  };
  const open = JSON.stringify(head);
  await req.write(`${open.slice(0, -1)},"items":[`);
  let canvases = 0;
  for await (const page of itemPages(sequelize, { collectionId: collection.id })) {
    const parts: string[] = [];
    for (const item of page) {
      const image = await viewImageOf(deps, item);
      if (!image) continue;
      parts.push(JSON.stringify(canvasOf(item, image, { publicUrl: req.publicUrl, language })));
    }
    if (parts.length) {
      await req.write((canvases > 0 ? ',' : '') + parts.join(','));
      canvases += parts.length;
    }
  }
  await req.write(']}');
  return { canvases };
}
