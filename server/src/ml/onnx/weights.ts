/**
 * Decoding the weight shards of a TF.js model: the weights are stored one after another, in the order of
 * the manifest, each either as its own dtype (float32, int32: 4 bytes little-endian) or quantized as the
 * manifest entry's `quantization` says:
 * - `{ dtype: 'float16' }`: IEEE 754 binary16 halves (2 bytes each), widened to float32 exactly;
 * - `{ dtype: 'uint8' | 'uint16', scale, min }`: affine, value = q × scale + min.
 * This is the layout the TF.js converter writes (tfjs-core `io.decodeWeights` reads the same); the unit
 * tests compare this decoder with TF.js's own.
 */

export interface WeightSpec {
  name: string;
  shape: number[];
  dtype: string;
  quantization?: { dtype: string; scale?: number; min?: number; original_dtype?: string };
}

export interface DecodedTensor {
  dtype: 'float32' | 'int32';
  shape: number[];
  data: Float32Array | Int32Array;
}

const QUANT_BYTES: Record<string, number> = { float16: 2, uint8: 1, uint16: 2 };
const PLAIN_BYTES: Record<string, number> = { float32: 4, int32: 4 };

/** One IEEE 754 binary16 value (its 16 bits) as a number; exact, subnormals, ±0, ±∞ and NaN included. */
export function float16ToNumber(bits: number): number {
  const sign = bits & 0x8000 ? -1 : 1;
  const exponent = (bits >> 10) & 0x1f;
  const fraction = bits & 0x3ff;
  if (exponent === 0) return sign * 2 ** -14 * (fraction / 1024);
  if (exponent === 0x1f) return fraction ? Number.NaN : sign * Number.POSITIVE_INFINITY;
  return sign * 2 ** (exponent - 15) * (1 + fraction / 1024);
}

function elementCount(shape: readonly number[]): number {
  return shape.reduce((a, b) => a * b, 1);
}

/** Decodes every weight of the manifest from the concatenated shard bytes. */
export function decodeWeights(specs: readonly WeightSpec[], data: ArrayBuffer | Uint8Array): Map<string, DecodedTensor> {
  const bytes = data instanceof Uint8Array ? data : new Uint8Array(data);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const out = new Map<string, DecodedTensor>();
  let offset = 0;
  for (const spec of specs) {
    const n = elementCount(spec.shape);
    const q = spec.quantization;
    const width = q ? QUANT_BYTES[q.dtype] : PLAIN_BYTES[spec.dtype];
    if (width === undefined) throw new Error(`weight ${spec.name}: ${q ? `quantization dtype ${q.dtype}` : `dtype ${spec.dtype}`} is not supported`);
    if (spec.dtype !== 'float32' && spec.dtype !== 'int32') throw new Error(`weight ${spec.name}: dtype ${spec.dtype} is not supported`);
    const size = n * width;
    if (offset + size > bytes.byteLength) throw new Error(`weight ${spec.name} runs past the end of the weight data (${offset + size} > ${bytes.byteLength} bytes)`);
    const values = spec.dtype === 'int32' ? new Int32Array(n) : new Float32Array(n);
    if (!q) {
      for (let i = 0; i < n; i++) values[i] = spec.dtype === 'int32' ? view.getInt32(offset + 4 * i, true) : view.getFloat32(offset + 4 * i, true);
    } else if (q.dtype === 'float16') {
      for (let i = 0; i < n; i++) values[i] = float16ToNumber(view.getUint16(offset + 2 * i, true));
    } else {
      if (typeof q.scale !== 'number' || typeof q.min !== 'number') throw new Error(`weight ${spec.name}: ${q.dtype} quantization needs scale and min`);
      for (let i = 0; i < n; i++) {
        const v = q.dtype === 'uint8' ? view.getUint8(offset + i) : view.getUint16(offset + 2 * i, true);
        values[i] = v * q.scale + q.min;
      }
    }
    out.set(spec.name, { dtype: spec.dtype, shape: [...spec.shape], data: values });
    offset += size;
  }
  if (offset !== bytes.byteLength) throw new Error(`the weight data has ${bytes.byteLength} bytes, the manifest describes ${offset}`);
  return out;
}
