/**
 * Image preprocessing for the backbone, with sharp: EXIF orientation applied, transparency flattened on
 * white, the whole image fitted (contain, letterboxed on white) into a square of the input size, 8-bit
 * sRGB. Large JPEG and WebP scans are shrunk while decoding (sharp's shrink-on-load), so a 12 MP scan
 * costs about twice a thumbnail, not forty times.
 */
import sharp from 'sharp';

export interface PreprocessOptions {
  /** side of the square the image is fitted into, in pixels */
  size: number;
  /** refuse images with more pixels than this (sharp's default limit is 0x3FFF²) */
  maxInputPixels?: number;
}

export interface RgbImage {
  /** size × size × 3 bytes, row-major, RGB */
  data: Uint8Array;
  size: number;
}

/** Bumped whenever the pixels handed to the backbone change for the same input file. */
export const PREPROCESSING_VERSION = 1;

const WHITE = { r: 255, g: 255, b: 255, alpha: 1 };

export async function toSquareRgb(image: Buffer, options: PreprocessOptions): Promise<RgbImage> {
  const { size } = options;
  if (!Number.isInteger(size) || size < 16 || size > 4096) throw new Error(`input size must be an integer in 16..4096, got ${size}`);
  const { data, info } = await sharp(image, {
    autoOrient: true,
    failOn: 'error',
    limitInputPixels: options.maxInputPixels ?? 0x3fff * 0x3fff,
  })
    .flatten({ background: WHITE })
    .resize(size, size, { fit: 'contain', background: WHITE })
    .toColourspace('srgb')
    .removeAlpha()
    .raw()
    .toBuffer({ resolveWithObject: true });
  if (info.width !== size || info.height !== size || info.channels !== 3) {
    throw new Error(`preprocessing produced ${info.width}×${info.height}×${info.channels}, expected ${size}×${size}×3`);
  }
  return { data: new Uint8Array(data.buffer, data.byteOffset, data.byteLength), size };
}
