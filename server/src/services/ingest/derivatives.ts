import sharp, { type OutputInfo, type SharpOptions } from 'sharp';

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
  /** JPEG, sRGB, on white; absent when it was not asked for (it is then made when first needed) */
  view?: Buffer;
  /** dimensions of the review-size image (after orientation), when it was made */
  viewWidth?: number;
  viewHeight?: number;
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
 * orientation, alpha flattened on white, converted to sRGB and shrunk to the review size (a JPEG is shrunk
 * while it loads only when it is at least three times the review size: sharp leaves a real resize after it); then encodes the review-size JPEG
 * and, from the same pixels, the thumbnail (JPEG too: measured on a 3000 × 2000 scan, a WebP thumbnail took
 * about half as long again, and mozjpeg's trellis coding seven times as long as plain JPEG for the review
 * image, which the night shift cannot afford; sharp's default optimised Huffman tables cost a second pass
 * too — measured on the review image of a 3000 × 2000 scan, 21 ms against 6 ms for a file 14 % larger — so
 * the standard tables are used). With `embedInput`, the thumbnail's pixels are also kept as a
 * lossless PNG for the embedder (about 0.6 ms more; the embedder then decodes a 320-pixel image instead of
 * the scan or the review image). With `view: false` only the thumbnail (and the embedding input) is made, by a
 * far cheaper decode (see thumbnailOnly); the review image is then made when it is first needed.
 */
export async function makeDerivatives(
  input: string | Buffer,
  maxPixels: number,
  sizes: DerivativeSizes = DEFAULT_SIZES,
  opts: { embedInput?: boolean; view?: boolean } = {},
): Promise<Derivatives> {
  if (opts.view === false) return thumbnailOnly(input, maxPixels, sizes, opts.embedInput === true);
  const { data, info } = await decodeUpright(input, maxPixels, sizes.view);
  const raw = { raw: { width: info.width, height: info.height, channels: info.channels } } as const;
  const view = await sharp(data, raw).jpeg({ quality: 84, optimiseCoding: false }).toBuffer();
  const small = await sharp(data, raw).resize({ width: sizes.thumb, height: sizes.thumb, fit: 'inside', withoutEnlargement: true }).raw().toBuffer({ resolveWithObject: true });
  return { ...(await encodeSmall(small, opts.embedInput === true)), view, viewWidth: info.width, viewHeight: info.height };
}

/**
 * The thumbnail (and embedding input) alone, decoded straight to thumbnail size: a JPEG at least three times
 * the thumbnail's size is shrunk by libjpeg while it loads (sharp asks for a 1/2, 1/4 or 1/8 scale only when
 * that leaves a real resize after it), which skips most of the decoding work — measured on a 3000 × 2000 scan,
 * 13 ms against 40 ms for the review-size decode. Every byte of the data is still read, so truncated and
 * damaged files are refused just the same.
 */
async function thumbnailOnly(input: string | Buffer, maxPixels: number, sizes: DerivativeSizes, embedInput: boolean): Promise<Derivatives> {
  return encodeSmall(await decodeUpright(input, maxPixels, sizes.thumb), embedInput);
}

/** Decodes the whole image to raw sRGB pixels: upright by its EXIF orientation, on white, at most `longSide` on its long side. */
function decodeUpright(input: string | Buffer, maxPixels: number, longSide: number): Promise<{ data: Buffer; info: OutputInfo }> {
  return sharp(input, decodeOptions(maxPixels))
    .rotate()
    .resize({ width: longSide, height: longSide, fit: 'inside', withoutEnlargement: true })
    .flatten({ background: '#ffffff' })
    .toColourspace('srgb')
    .raw()
    .toBuffer({ resolveWithObject: true });
}

async function encodeSmall(small: { data: Buffer; info: OutputInfo }, embedInput: boolean): Promise<Pick<Derivatives, 'thumb' | 'embedInput'>> {
  const smallRaw = { raw: { width: small.info.width, height: small.info.height, channels: small.info.channels } } as const;
  const thumb = await sharp(small.data, smallRaw).jpeg({ quality: 80, optimiseCoding: false }).toBuffer();
  if (!embedInput) return { thumb };
  return { thumb, embedInput: await sharp(small.data, smallRaw).png({ compressionLevel: 0 }).toBuffer() };
}

/** The media type of a stored derivative, read from its bytes. */
export function derivativeType(head: Buffer): 'image/webp' | 'image/jpeg' | 'application/octet-stream' {
  if (head.subarray(0, 4).toString('latin1') === 'RIFF' && head.subarray(8, 12).toString('latin1') === 'WEBP') return 'image/webp';
  if (head[0] === 0xff && head[1] === 0xd8 && head[2] === 0xff) return 'image/jpeg';
  return 'application/octet-stream';
}
