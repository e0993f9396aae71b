/**
 * The TF.js → ONNX converter on tiny graphs built here (model.json + weights written by the test), each
 * run by TF.js (wasm, as in the product) and by onnxruntime-node on the same input. Every op mapping has
 * its own graph: convolutions with SAME padding at stride 1 and 2 on even and odd sizes, VALID and
 * EXPLICIT padding, depthwise convolutions with a channel multiplier, fused Relu / Relu6, the hard-swish
 * pattern with a float16-stored constant, squeeze-and-excite (Mean over H, W), channel constants.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type * as OnnxProto from 'onnx-proto';
import ort from 'onnxruntime-node';
import { beforeAll, describe, expect, it } from 'vitest';
import { readModelArtifacts } from '../../server/src/ml/backbone/model-files.ts';
import { ensureBackend, tf } from '../../server/src/ml/backbone/tfjs-runtime.ts';
import { ConversionError, convertGraphToOnnx, type TfNode } from '../../server/src/ml/onnx/tfjs-to-onnx.ts';
import { decodeWeights, float16ToNumber, type WeightSpec } from '../../server/src/ml/onnx/weights.ts';

const { onnx } = createRequire(import.meta.url)('onnx-proto') as typeof OnnxProto;

beforeAll(async () => {
  await ensureBackend('wasm');
});

// ---- a small builder of TF.js graph models -------------------------------------------------------------

const b64 = (s: string) => Buffer.from(s).toString('base64');
const intList = (xs: number[]) => ({ list: { i: xs.map(String) } });

/** Float32 → binary16 bits, for values that binary16 holds exactly (the test data is chosen so). */
function toHalfBits(x: number): number {
  if (x === 0) return Object.is(x, -0) ? 0x8000 : 0;
  const sign = x < 0 ? 0x8000 : 0;
  const a = Math.abs(x);
  let e = Math.floor(Math.log2(a));
  if (e < -14) e = -14; // subnormal
  const m = a / 2 ** e;
  const bits = e === -14 && m < 1 ? Math.round(m * 1024) : ((e + 15) << 10) | Math.round((m - 1) * 1024);
  if (float16ToNumber(sign | bits) !== x) throw new Error(`${x} is not exactly representable as float16`);
  return sign | bits;
}

/** Deterministic pseudo-random values on a 1/256 grid in [-2, 2) (exact in float16). */
function values(n: number, seed: number): Float32Array {
  let s = seed >>> 0;
  return Float32Array.from({ length: n }, () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return ((s >>> 22) - 512) / 256;
  });
}

class GraphBuilder {
  nodes: TfNode[] = [];
  specs: WeightSpec[] = [];
  chunks: Buffer[] = [];

  input(name: string, shape: number[]): string {
    this.nodes.push({ name, op: 'Placeholder', attr: { dtype: { type: 'DT_FLOAT' }, shape: { shape: { dim: shape.map((size) => ({ size: String(size) })) } } } });
    return name;
  }

  constant(name: string, shape: number[], data: Float32Array | Int32Array, as: 'float32' | 'float16' | 'int32' = 'float32'): string {
    const dtype = as === 'int32' ? 'DT_INT32' : 'DT_FLOAT';
    this.nodes.push({ name, op: 'Const', attr: { dtype: { type: dtype }, value: { tensor: { dtype, tensorShape: { dim: shape.map((size) => ({ size: String(size) })) } } } as never } });
    if (as === 'float16') {
      const buf = Buffer.alloc(data.length * 2);
      data.forEach((v, i) => buf.writeUInt16LE(toHalfBits(v), 2 * i));
      this.chunks.push(buf);
      this.specs.push({ name, shape, dtype: 'float32', quantization: { dtype: 'float16', original_dtype: 'float32' } });
    } else {
      const buf = Buffer.alloc(data.length * 4);
      data.forEach((v, i) => (as === 'int32' ? buf.writeInt32LE(v, 4 * i) : buf.writeFloatLE(v, 4 * i)));
      this.chunks.push(buf);
      this.specs.push({ name, shape, dtype: as });
    }
    return name;
  }

  op(name: string, op: string, input: string[], attr: TfNode['attr'] = {}): string {
    this.nodes.push({ name, op, input, attr: { T: { type: 'DT_FLOAT' }, ...attr } });
    return name;
  }

  conv(name: string, x: string, k: number, cin: number, cout: number, o: { stride?: number; padding?: 'SAME' | 'VALID' | 'EXPLICIT'; pads?: number[]; fused?: string[]; seed?: number; half?: boolean } = {}): string {
    const s = o.stride ?? 1;
    const w = this.constant(`${name}/w`, [k, k, cin, cout], values(k * k * cin * cout, o.seed ?? 1), o.half ? 'float16' : 'float32');
    const fused = o.fused ?? [];
    const inputs = [x, w];
    if (fused[0] === 'BiasAdd') inputs.push(this.constant(`${name}/b`, [cout], values(cout, (o.seed ?? 1) + 100)));
    const attr: TfNode['attr'] = { strides: intList([1, s, s, 1]), dilations: intList([1, 1, 1, 1]), padding: { s: b64(o.padding ?? 'SAME') }, data_format: { s: b64('NHWC') }, explicit_paddings: intList(o.pads ?? []) };
    if (fused.length === 0) return this.op(name, 'Conv2D', inputs, attr);
    return this.op(name, '_FusedConv2D', inputs, { ...attr, fused_ops: { list: { s: fused.map(b64) } }, num_args: { i: '1' }, epsilon: { f: 0 } });
  }

  depthwise(name: string, x: string, k: number, c: number, m: number, o: { stride?: number; fused?: string[]; seed?: number } = {}): string {
    const s = o.stride ?? 1;
    const w = this.constant(`${name}/w`, [k, k, c, m], values(k * k * c * m, o.seed ?? 2));
    const fused = o.fused ?? [];
    const inputs = [x, w];
    if (fused[0] === 'BiasAdd') inputs.push(this.constant(`${name}/b`, [c * m], values(c * m, (o.seed ?? 2) + 100)));
    const attr: TfNode['attr'] = { strides: intList([1, s, s, 1]), dilations: intList([1, 1, 1, 1]), padding: { s: b64('SAME') }, data_format: { s: b64('NHWC') }, explicit_paddings: intList([]) };
    if (fused.length === 0) return this.op(name, 'DepthwiseConv2dNative', inputs, attr);
    return this.op(name, 'FusedDepthwiseConv2dNative', inputs, { ...attr, fused_ops: { list: { s: fused.map(b64) } }, num_args: { i: '1' } });
  }

  mean(name: string, x: string): string {
    const axes = this.constant(`${name}/axes`, [2], Int32Array.of(1, 2), 'int32');
    return this.op(name, 'Mean', [x, axes], { keep_dims: { b: true }, Tidx: { type: 'DT_INT32' } });
  }

  /** Writes model.json + weights.bin into a fresh folder; returns the model.json path. */
  write(): string {
    const dir = mkdtempSync(join(tmpdir(), 'cartouche-onnx-'));
    writeFileSync(join(dir, 'weights.bin'), Buffer.concat(this.chunks));
    writeFileSync(
      join(dir, 'model.json'),
      JSON.stringify({ format: 'graph-model', generatedBy: 'test', convertedBy: 'test', modelTopology: { node: this.nodes, library: {}, versions: {} }, weightsManifest: [{ paths: ['weights.bin'], weights: this.specs }] }),
    );
    return join(dir, 'model.json');
  }
}

// ---- running both ---------------------------------------------------------------------------------------

interface Compared {
  maxAbs: number;
  scale: number;
  onnxShape: readonly number[];
  tfShape: number[];
}

/** Runs the graph in TF.js and the converted model in onnxruntime-node on the same NHWC input. */
async function compare(modelJson: string, inputNode: string, featureNode: string, inputShape: [number, number, number, number], seed = 7, activations: 'ops' | 'fused' = 'ops'): Promise<Compared & { opTypes: string[] }> {
  const artifacts = await readModelArtifacts(modelJson);
  const converted = convertGraphToOnnx(artifacts as Parameters<typeof convertGraphToOnnx>[0], { inputNode, featureNode, activations });
  const opTypes = (onnx.ModelProto.decode(converted.bytes).graph?.node ?? []).map((n) => n.opType ?? '');
  const input = values(inputShape.reduce((a, b) => a * b, 1), seed);
  const model = await tf.loadGraphModel(tf.io.fromMemory(artifacts));
  const expected = tf.tidy(() => {
    const y = model.execute({ [inputNode]: tf.tensor4d(input, inputShape) }, featureNode) as ReturnType<typeof tf.tensor4d>;
    return { data: y.transpose([0, 3, 1, 2]).dataSync() as Float32Array, shape: y.shape };
  });
  model.dispose();
  const session = await ort.InferenceSession.create(converted.bytes, { intraOpNumThreads: 1, graphOptimizationLevel: 'all' });
  const out = (await session.run({ [converted.inputName]: new ort.Tensor('float32', input, inputShape) }))[converted.outputName]!;
  await session.release();
  const got = out.data as Float32Array;
  expect(got.length).toBe(expected.data.length);
  let maxAbs = 0;
  let scale = 0;
  for (let i = 0; i < got.length; i++) {
    maxAbs = Math.max(maxAbs, Math.abs(got[i]! - expected.data[i]!));
    scale = Math.max(scale, Math.abs(expected.data[i]!));
  }
  expect(converted.channels).toBe(expected.shape[3]);
  return { maxAbs, scale, onnxShape: out.dims, tfShape: expected.shape, opTypes };
}

/** float32 agreement: relative to the largest value, well below what a wrong padding or layout gives (≫ 1e-2). */
function expectAgreement(r: Compared): void {
  expect(r.onnxShape).toEqual([r.tfShape[0], r.tfShape[3], r.tfShape[1], r.tfShape[2]]);
  expect(r.scale).toBeGreaterThan(0.1);
  expect(r.maxAbs / r.scale).toBeLessThan(1e-5);
}

describe('convolutions', () => {
  it.each([
    ['stride 1, 3×3, odd size 9', 1, 3, 9],
    ['stride 2, 3×3, even size 8 (TF pads 0 before, 1 after)', 2, 3, 8],
    ['stride 2, 3×3, odd size 9 (1 before, 1 after)', 2, 3, 9],
    ['stride 2, 5×5, even size 10 (1 before, 2 after)', 2, 5, 10],
    ['stride 2, 1×1, size 7 (no padding)', 2, 1, 7],
  ])('SAME padding, %s, fused bias + Relu, matches TF.js', async (_label, stride, k, size) => {
    const g = new GraphBuilder();
    const x = g.input('x', [1, size, size, 3]);
    g.conv('conv', x, k, 3, 4, { stride, fused: ['BiasAdd', 'Relu'] });
    expectAgreement(await compare(g.write(), 'x', 'conv', [1, size, size, 3]));
  });

  it('VALID padding at stride 2 and EXPLICIT padding, unfused, match TF.js', async () => {
    const g = new GraphBuilder();
    const x = g.input('x', [1, 11, 11, 2]);
    const a = g.conv('valid', x, 3, 2, 3, { stride: 2, padding: 'VALID' });
    g.conv('explicit', a, 3, 3, 2, { padding: 'EXPLICIT', pads: [0, 0, 2, 1, 0, 1, 0, 0], seed: 5 });
    expectAgreement(await compare(g.write(), 'x', 'valid', [1, 11, 11, 2]));
    expectAgreement(await compare(g.write(), 'x', 'explicit', [1, 11, 11, 2]));
  });

  it('a fused Relu6 becomes Clip(0, 6) and matches TF.js, with a batch of 3', async () => {
    const g = new GraphBuilder();
    const x = g.input('x', [-1, 8, 8, 3]);
    g.conv('conv', x, 3, 3, 5, { fused: ['BiasAdd', 'Relu6'] });
    const r = await compare(g.write(), 'x', 'conv', [3, 8, 8, 3]);
    expectAgreement(r);
  });

  it('depthwise with channel multiplier 2 becomes a grouped Conv (group = C), at stride 1 and 2', async () => {
    for (const [stride, size] of [
      [1, 7],
      [2, 8],
      [2, 9],
    ] as const) {
      const g = new GraphBuilder();
      const x = g.input('x', [1, size, size, 3]);
      g.depthwise('dw', x, 3, 3, 2, { stride, fused: ['BiasAdd', 'Relu'] });
      expectAgreement(await compare(g.write(), 'x', 'dw', [1, size, size, 3]));
    }
    const g = new GraphBuilder();
    const x = g.input('x', [1, 6, 6, 4]);
    g.depthwise('dw', x, 3, 4, 1);
    expectAgreement(await compare(g.write(), 'x', 'dw', [1, 6, 6, 4]));
  });
});

describe('activations, arithmetic, pooling', () => {
  it('the hard-swish pattern keeps the graph’s float16 constant (not exactly 1/6) op by op', async () => {
    const g = new GraphBuilder();
    const x = g.input('x', [1, 6, 6, 3]);
    const c = g.conv('conv', x, 3, 3, 4, { fused: ['BiasAdd'], half: true });
    const three = g.constant('three', [], Float32Array.of(3), 'float16');
    const sixth = 0.1666259765625; // float16 nearest to 1/6 (bits 0x3155), as the backbone stores it
    const k = g.constant('sixth', [], Float32Array.of(sixth), 'float16');
    const r6 = g.op('hs/relu6', 'Relu6', [g.op('hs/add', 'AddV2', [c, three])]);
    g.op('hs/mul_1', 'Mul', [g.op('hs/mul', 'Mul', [c, r6]), k]);
    expect(sixth).not.toBe(1 / 6);
    const r = await compare(g.write(), 'x', 'hs/mul_1', [1, 6, 6, 3]);
    expectAgreement(r);
    expect(r.opTypes).toEqual(['Transpose', 'Conv', 'Add', 'Clip', 'Mul', 'Mul', 'Identity']);
  });

  it('fused: both groupings of hard swish, and hard sigmoid, become HardSwish / HardSigmoid × the leftover scale, still matching TF.js', async () => {
    const g = new GraphBuilder();
    const x = g.input('x', [1, 7, 7, 3]);
    const sixth = g.constant('sixth', [], Float32Array.of(0.1666259765625), 'float16');
    const three = g.constant('three', [], Float32Array.of(3), 'float16');
    // (c · x) · relu6(x + 3), as the backbone groups it
    const a = g.conv('a', x, 3, 3, 4, { fused: ['BiasAdd'] });
    const hs1 = g.op('a/hs/mul_1', 'Mul', [g.op('a/hs/mul', 'Mul', [sixth, a]), g.op('a/hs/relu6', 'Relu6', [g.op('a/hs/add', 'Add', [a, three])])]);
    // (x · relu6(x + 3)) · c
    const b = g.conv('b', hs1, 3, 4, 4, { fused: ['BiasAdd'], seed: 3 });
    const hs2 = g.op('b/hs/mul_1', 'Mul', [g.op('b/hs/mul', 'Mul', [b, g.op('b/hs/relu6', 'Relu6', [g.op('b/hs/add', 'AddV2', [three, b])])]), sixth]);
    // squeeze-and-excite gate: relu6(x + 3) · c
    const m = g.conv('se/c', g.mean('se/mean', hs2), 1, 4, 4, { fused: ['BiasAdd'], seed: 9 });
    const gate = g.op('se/gate', 'Mul', [g.op('se/relu6', 'Relu6', [g.op('se/add', 'AddV2', [m, three])]), sixth]);
    g.op('out', 'Mul', [gate, hs2]);
    const modelJson = g.write();
    const fused = await compare(modelJson, 'x', 'out', [1, 7, 7, 3], 7, 'fused');
    expectAgreement(fused);
    expect(fused.opTypes.filter((t) => t === 'HardSwish')).toHaveLength(2);
    expect(fused.opTypes.filter((t) => t === 'HardSigmoid')).toHaveLength(1);
    expect(fused.opTypes).not.toContain('Clip');
    const plain = await compare(modelJson, 'x', 'out', [1, 7, 7, 3], 7, 'ops');
    expectAgreement(plain);
    expect(plain.opTypes.filter((t) => t === 'Clip')).toHaveLength(3);
  });

  it('fused: a pattern whose inner value is used elsewhere stays op by op', async () => {
    const g = new GraphBuilder();
    const x = g.input('x', [1, 5, 5, 3]);
    const a = g.conv('a', x, 3, 3, 3, { fused: ['BiasAdd'] });
    const sixth = g.constant('sixth', [], Float32Array.of(0.1666259765625), 'float16');
    const three = g.constant('three', [], Float32Array.of(3));
    const r6 = g.op('r6', 'Relu6', [g.op('add', 'AddV2', [a, three])]);
    const hs = g.op('hs', 'Mul', [g.op('mul', 'Mul', [a, r6]), sixth]);
    g.op('out', 'AddV2', [hs, r6]); // relu6(x + 3) is needed again
    const r = await compare(g.write(), 'x', 'out', [1, 5, 5, 3], 7, 'fused');
    expectAgreement(r);
    expect(r.opTypes).not.toContain('HardSwish');
  });

  it('squeeze-and-excite: Mean over H, W (keep_dims) → GlobalAveragePool, 1×1 convs, broadcast Mul', async () => {
    const g = new GraphBuilder();
    const x = g.input('x', [1, 7, 7, 4]);
    const f = g.conv('f', x, 3, 4, 6, { fused: ['BiasAdd', 'Relu'] });
    const m = g.mean('se/mean', f);
    const s1 = g.conv('se/c1', m, 1, 6, 3, { fused: ['BiasAdd', 'Relu'], seed: 11 });
    const s2 = g.conv('se/c2', s1, 1, 3, 6, { fused: ['BiasAdd'], seed: 12 });
    g.op('se/out', 'Mul', [s2, f]);
    expectAgreement(await compare(g.write(), 'x', 'se/out', [1, 7, 7, 4]));
  });

  it('a per-channel constant (rank 1) is laid out as [C, 1, 1]; Sub, RealDiv and a residual Add match', async () => {
    const g = new GraphBuilder();
    const x = g.input('x', [1, 5, 5, 3]);
    const a = g.conv('a', x, 3, 3, 3, { fused: ['BiasAdd'] });
    const shift = g.constant('shift', [3], Float32Array.of(0.5, -1.25, 2));
    const scale = g.constant('scale', [3], Float32Array.of(2, 4, 0.5));
    const y = g.op('div', 'RealDiv', [g.op('sub', 'Sub', [a, shift]), scale]);
    g.op('res', 'AddV2', [y, x]);
    expectAgreement(await compare(g.write(), 'x', 'res', [1, 5, 5, 3]));
  });

  it('appends average and max pooling as one output [N, 2C], equal to TF.js mean and max over H, W', async () => {
    const g = new GraphBuilder();
    const x = g.input('x', [-1, 9, 9, 3]);
    g.conv('conv', x, 3, 3, 5, { stride: 2, fused: ['BiasAdd', 'Relu'] });
    const modelJson = g.write();
    const artifacts = await readModelArtifacts(modelJson);
    const converted = convertGraphToOnnx(artifacts as Parameters<typeof convertGraphToOnnx>[0], { inputNode: 'x', featureNode: 'conv', pooling: ['avg', 'max'] });
    expect(converted.outputName).toBe('features');
    const input = values(2 * 9 * 9 * 3, 3);
    const model = await tf.loadGraphModel(tf.io.fromMemory(artifacts));
    const expected = tf.tidy(() => {
      const y = model.execute({ x: tf.tensor4d(input, [2, 9, 9, 3]) }, 'conv') as ReturnType<typeof tf.tensor4d>;
      return tf.concat([tf.mean(y, [1, 2]), tf.max(y, [1, 2])], -1).dataSync() as Float32Array;
    });
    model.dispose();
    const session = await ort.InferenceSession.create(converted.bytes);
    const out = (await session.run({ images: new ort.Tensor('float32', input, [2, 9, 9, 3]) })).features!;
    await session.release();
    expect(out.dims).toEqual([2, 10]);
    const got = out.data as Float32Array;
    for (let i = 0; i < got.length; i++) expect(Math.abs(got[i]! - expected[i]!)).toBeLessThan(1e-5);
  });
});

describe('weights and refusals', () => {
  it('decodes float16-stored weights exactly as TF.js does, subnormals, ±0 and ±∞ included', () => {
    // binary16 bit patterns with known values (IEEE 754-2008 binary16: 1 sign, 5 exponent, 10 fraction bits)
    const bits = [0x0000, 0x8000, 0x3c00, 0xbc00, 0x3555, 0x3155, 0x7bff, 0x0001, 0x03ff, 0x0400, 0x7c00, 0xfc00, 0x4248];
    expect(float16ToNumber(0x3c00)).toBe(1);
    expect(float16ToNumber(0x7bff)).toBe(65504); // largest binary16 (IEEE 754; common practice to quote)
    expect(float16ToNumber(0x0001)).toBe(2 ** -24); // smallest subnormal
    expect(Object.is(float16ToNumber(0x8000), -0)).toBe(true);
    const data = Buffer.alloc(bits.length * 2 + 8);
    bits.forEach((b, i) => data.writeUInt16LE(b, 2 * i));
    data.writeInt32LE(-7, bits.length * 2);
    data.writeInt32LE(123456, bits.length * 2 + 4);
    const specs: WeightSpec[] = [
      { name: 'h', shape: [bits.length], dtype: 'float32', quantization: { dtype: 'float16', original_dtype: 'float32' } },
      { name: 'i', shape: [2], dtype: 'int32' },
    ];
    const ours = decodeWeights(specs, data);
    const theirs = tf.io.decodeWeights(data.buffer.slice(data.byteOffset, data.byteOffset + data.byteLength), specs as Parameters<typeof tf.io.decodeWeights>[1]);
    expect(Array.from(ours.get('h')!.data)).toEqual(Array.from(theirs.h!.dataSync()));
    expect(Array.from(ours.get('i')!.data)).toEqual([-7, 123456]);
    for (const t of Object.values(theirs)) t.dispose();
  });

  it('decodes uint8 affine-quantized weights as TF.js does (value = q · scale + min)', () => {
    const data = Buffer.from([0, 1, 127, 255]);
    const specs: WeightSpec[] = [{ name: 'q', shape: [4], dtype: 'float32', quantization: { dtype: 'uint8', scale: 0.5, min: -1 } }];
    const ours = decodeWeights(specs, data);
    const theirs = tf.io.decodeWeights(data.buffer.slice(data.byteOffset, data.byteOffset + 4), specs as Parameters<typeof tf.io.decodeWeights>[1]);
    expect(Array.from(ours.get('q')!.data)).toEqual(Array.from(theirs.q!.dataSync()));
    expect(Array.from(ours.get('q')!.data)).toEqual([-1, -0.5, 62.5, 126.5]);
    theirs.q!.dispose();
  });

  it('refuses weight data that does not match the manifest', () => {
    expect(() => decodeWeights([{ name: 'a', shape: [4], dtype: 'float32' }], new Uint8Array(8))).toThrow(/runs past the end/);
    expect(() => decodeWeights([{ name: 'a', shape: [1], dtype: 'float32' }], new Uint8Array(8))).toThrow(/has 8 bytes/);
    expect(() => decodeWeights([{ name: 'a', shape: [1], dtype: 'string' }], new Uint8Array(4))).toThrow(/not supported/);
  });

  it('names an op it cannot convert, and a feature node that is missing', async () => {
    const g = new GraphBuilder();
    const x = g.input('x', [1, 4, 4, 3]);
    g.op('pool', 'AvgPool', [x], { ksize: intList([1, 2, 2, 1]) });
    const artifacts = await readModelArtifacts(g.write());
    const source = artifacts as Parameters<typeof convertGraphToOnnx>[0];
    expect(() => convertGraphToOnnx(source, { inputNode: 'x', featureNode: 'pool' })).toThrow(ConversionError);
    expect(() => convertGraphToOnnx(source, { inputNode: 'x', featureNode: 'pool' })).toThrow(/op AvgPool is not supported/);
    expect(() => convertGraphToOnnx(source, { inputNode: 'x', featureNode: 'nothing' })).toThrow(/no node named nothing/);
  });

  it('converts only what the feature node depends on (a branch after it is left out)', async () => {
    const g = new GraphBuilder();
    const x = g.input('x', [1, 6, 6, 3]);
    const a = g.conv('a', x, 3, 3, 4, { fused: ['BiasAdd', 'Relu'] });
    g.op('after', 'AvgPool', [a]); // unsupported, but not on the path
    const artifacts = await readModelArtifacts(g.write());
    const converted = convertGraphToOnnx(artifacts as Parameters<typeof convertGraphToOnnx>[0], { inputNode: 'x', featureNode: 'a' });
    expect(converted.ops).toEqual({ Placeholder: 1, Const: 2, _FusedConv2D: 1 });
  });
});
