/**
 * How closely two embedders agree on the same images, and the fixed probe images the start-up check
 * uses (drawn from SVG here, so nothing is fetched or shipped).
 */
import sharp from 'sharp';

export interface Agreement {
  images: number;
  /** largest absolute difference of any value */
  maxAbs: number;
  /** largest ‖a − b‖ / ‖b‖ over the images (b is the reference) */
  relativeL2: number;
  /** lowest cosine similarity between the two features of one image */
  lowestCosine: number;
}

/** The start-up check's limit on the relative L2 distance between ONNX and TF.js features. */
export const AGREEMENT_TOLERANCE = 1e-4;

/** Agreement of `a` with the reference `b`, image by image. */
export function agreement(a: readonly Float32Array[], b: readonly Float32Array[]): Agreement {
  if (a.length !== b.length) throw new Error(`${a.length} features against ${b.length}`);
  let maxAbs = 0;
  let relativeL2 = 0;
  let lowestCosine = 1;
  a.forEach((x, k) => {
    const y = b[k]!;
    if (x.length !== y.length) throw new Error(`feature ${k}: ${x.length} values against ${y.length}`);
    let diff = 0;
    let ny = 0;
    let nx = 0;
    let dot = 0;
    for (let i = 0; i < x.length; i++) {
      const d = x[i]! - y[i]!;
      maxAbs = Math.max(maxAbs, Math.abs(d));
      diff += d * d;
      ny += y[i]! * y[i]!;
      nx += x[i]! * x[i]!;
      dot += x[i]! * y[i]!;
    }
    relativeL2 = Math.max(relativeL2, ny > 0 ? Math.sqrt(diff / ny) : Math.sqrt(diff));
    lowestCosine = Math.min(lowestCosine, nx > 0 && ny > 0 ? dot / Math.sqrt(nx * ny) : nx === ny ? 1 : 0);
  });
  return { images: a.length, maxAbs, relativeL2, lowestCosine };
}

/** The probe drawing of the start-up check: a harbour scene of simple shapes, 360 × 240 px PNG. */
export function probeImage(): Promise<Buffer> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="360" height="240">
<rect width="100%" height="100%" fill="#f4efe3"/>
<rect x="0" y="170" width="360" height="70" fill="#5d7f95"/>
<path d="M60 165 L220 165 L195 200 L85 200 Z" fill="#3b2f2a"/>
<line x1="140" y1="40" x2="140" y2="165" stroke="#3b2f2a" stroke-width="5"/>
<polygon points="145,48 145,150 215,150" fill="#e8d9b5" stroke="#3b2f2a" stroke-width="3"/>
<rect x="270" y="60" width="34" height="110" fill="#c8553d"/>
<polygon points="262,60 312,60 287,28" fill="#3b2f2a"/>
<circle cx="60" cy="55" r="22" fill="none" stroke="#d9a441" stroke-width="6"/>
</svg>`;
  return sharp(Buffer.from(svg)).png().toBuffer();
}
