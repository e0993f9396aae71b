import sharp, { type SharpOptions } from 'sharp';

export interface DerivativeSizes {
  /** long side of the thumbnail, in pixels */
  thumb: number;
  /** long side of the review-size image, in pixels */
  view: number;
}

export const DEFAULT_SIZES: DerivativeSizes = { thumb: 320, view: 1600 };

export interface Derivatives {
  /** JPEG, sRGB, on white */
  thumb: Buffer;
  /** JPEG, sRGB, on white */
  view: Buffer;
  /** dimensions of the review-size image (after orientation) */
  viewWidth: number;
  viewHeight: number;
  /**
   * the thumbnail's own pixels as a lossless PNG (uncompressed: it lives only until the embedder has read it),
   * when asked for: a small embedding input, so the embedder never decodes the scan again
   */
  embedInput?: Buffer;
}

/** What decoding needs to know: how many pixels are allowed, and to fail on any decoder error. */
export function decodeOptions(maxPixels: number): SharpOptions {
  // 'error' stops on damaged or truncated data (libjpeg's "premature end", libpng's read errors) but lets
  // through the harmless warnings many older scanners produce; 'warning' would refuse those too.
  return { failOn: 'error', limitInputPixels: maxPixels, sequentialRead: true };
}

/**
 * Decodes the image once — whole, so damaged or truncated data is noticed — turned upright by its EXIF
 * orientation, alpha flattened on white, converted to sRGB and shrunk to the review size (JPEG and WebP are
 * shrunk while they load when the scan is at least twice the review size); then encodes the review-size JPEG
 * and, from the same pixels, the thumbnail (JPEG too: measured on a 3000 × 2000 scan, a WebP thumbnail took
 * about half as long again, and mozjpeg's trellis coding seven times as long as plain JPEG for the review
 * image, which the night shift cannot afford; sharp's default optimised Huffman tables cost a second pass
 * too — measured on the review image of a 3000 × 2000 scan, 21 ms against 6 ms for a file 14 % larger — so
 * the standard tables are used). With `embedInput`, the thumbnail's pixels are also kept as a
 * lossless PNG for the embedder (about 0.6 ms more; the embedder then decodes a 320-pixel image instead of
 * the scan or the review image).
 */
export async function makeDerivatives(input: string | Buffer, maxPixels: number, sizes: DerivativeSizes = DEFAULT_SIZES, opts: { embedInput?: boolean } = {}): Promise<Derivatives> {
  const { data, info } = await sharp(input, decodeOptions(maxPixels))
    .rotate()
    .resize({ width: sizes.view, height: sizes.view, fit: 'inside', withoutEnlargement: true })
    .flatten({ background: '#ffffff' })
    .toColourspace('srgb')
    .raw()
    .toBuffer({ resolveWithObject: true });
  const raw = { raw: { width: info.width, height: info.height, channels: info.channels } } as const;
  const view = await sharp(data, raw).jpeg({ quality: 84, optimiseCoding: false }).toBuffer();
  const small = await sharp(data, raw).resize({ width: sizes.thumb, height: sizes.thumb, fit: 'inside', withoutEnlargement: true }).raw().toBuffer({ resolveWithObject: true });
  const smallRaw = { raw: { width: small.info.width, height: small.info.height, channels: small.info.channels } } as const;
  const thumb = await sharp(small.data, smallRaw).jpeg({ quality: 80, optimiseCoding: false }).toBuffer();
  const embedInput = opts.embedInput ? await sharp(small.data, smallRaw).png({ compressionLevel: 0 }).toBuffer() : undefined;
  return { thumb, view, viewWidth: info.width, viewHeight: info.height, ...(embedInput ? { embedInput } : {}) };
}

/** The media type of a stored derivative, read from its bytes. */
export function derivativeType(head: Buffer): 'image/webp' | 'image/jpeg' | 'application/octet-stream' {
  if (head.subarray(0, 4).toString('latin1') === 'RIFF' && head.subarray(8, 12).toString('latin1') === 'WEBP') return 'image/webp';
  if (head[0] === 0xff && head[1] === 0xd8 && head[2] === 0xff) return 'image/jpeg';
  return 'application/octet-stream';
}
