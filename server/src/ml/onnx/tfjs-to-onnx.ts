/**
 * TF.js graph model (model.json + weights) → ONNX model of the sub-graph that computes one node.
 *
 * It walks back from the feature node, keeps only what that node depends on, and maps each op:
 *
 * | TF.js op | ONNX |
 * | --- | --- |
 * | `Placeholder` (NHWC) | graph input, then one `Transpose` to NCHW; everything after runs in NCHW |
 * | `Conv2D`, `_FusedConv2D` (BiasAdd, then Relu / Relu6) | `Conv` (+ `Relu` / `Clip(0, 6)`); HWIO weights → OIHW |
 * | `DepthwiseConv2dNative`, `FusedDepthwiseConv2dNative` | `Conv` with `group = C`; [kh, kw, C, M] → [C·M, 1, kh, kw] |
 * | `Relu`, `Relu6`, `Sigmoid`, `Identity` | `Relu`, `Clip(0, 6)`, `Sigmoid`, `Identity` |
 * | `Add`, `AddV2`, `BiasAdd`, `Sub`, `Mul`, `RealDiv` | `Add`, `Add`, `Add`, `Sub`, `Mul`, `Div` (channel constants reshaped to [C, 1, 1]) |
 * | `Mean` / `Max` over H, W with `keep_dims` | `GlobalAveragePool` / `GlobalMaxPool` |
 *
 * Padding: TF `SAME` → `auto_pad = SAME_UPPER` (both put the odd pixel of padding at the end, which is
 * what makes stride-2 layers agree), `VALID` → `VALID`, `EXPLICIT` → `pads`. Ops are translated one by
 * one, never fused into a different formula: the hard-swish pattern x · relu6(x + 3) · c keeps the
 * graph's own constant c (stored as float16, so not exactly 1/6) — ONNX `HardSwish` would drift.
 *
 * With `activations: 'fused'` those two patterns become ONNX `HardSwish` / `HardSigmoid` times the
 * leftover scale 6c instead — faithful, and faster.
 *
 * Optionally the pooled features are appended as the single output `features` [N, C·k]: for each listed
 * pooling, `GlobalAveragePool` / `GlobalMaxPool`, concatenated in that order. Otherwise the output is
 * the feature map itself, NCHW, named `feature_map`.
 */
import { createRequire } from 'node:module';
import type * as OnnxProto from 'onnx-proto';
import type { Pooling } from '../backbone/embedder.ts';
import { decodeWeights, type DecodedTensor, type WeightSpec } from './weights.ts';

const { onnx } = createRequire(import.meta.url)('onnx-proto') as typeof OnnxProto;

/** Bumped whenever the ONNX written for the same TF.js graph changes (part of the cache key). */
export const CONVERTER_VERSION = 1;
export const ONNX_OPSET = 14; // HardSwish is opset 14

interface TfAttr {
  s?: string;
  i?: string | number;
  f?: number;
  b?: boolean;
  type?: string;
  list?: { s?: string[]; i?: (string | number)[]; f?: number[] };
  shape?: { dim?: { size: string | number }[] };
  tensor?: unknown;
}

export interface TfNode {
  name: string;
  op: string;
  input?: string[];
  attr?: Record<string, TfAttr>;
}

/** What the converter reads: the graph's nodes and the decoded (or still encoded) weights. */
export interface GraphModelSource {
  modelTopology: { node?: TfNode[] } | unknown;
  weightSpecs: WeightSpec[];
  weightData: ArrayBuffer | Uint8Array;
}

export interface ConvertOptions {
  inputNode: string;
  featureNode: string;
  /** append the pooled features as the output `features`; absent: output the NCHW feature map */
  pooling?: readonly Pooling[];
  /** the ONNX graph input's name (NHWC float32, [N, H, W, C]) */
  inputName?: string;
  /** recorded in the model's metadata */
  docString?: string;
  /**
   * `ops` (default): the hard-swish x · relu6(x + 3) · c and hard-sigmoid relu6(x + 3) · c patterns op by op.
   * `fused`: each becomes ONNX `HardSwish` / `HardSigmoid` followed by one `Mul` by the leftover scale 6c
   * (c is the graph's float16 1/6, so 6c ≈ 0.99976, not 1): the same values to float rounding, fewer
   * passes over the tensor.
   */
  activations?: 'ops' | 'fused';
}

export interface ConvertedModel {
  bytes: Uint8Array;
  inputName: string;
  outputName: string;
  /** channels at the feature node */
  channels: number;
  /** TF.js ops of the converted path and how many of each */
  ops: Record<string, number>;
}

export class ConversionError extends Error {}

const decoder = new TextDecoder();
const encoder = new TextEncoder();
const str = (a: TfAttr | undefined): string | undefined => (a?.s === undefined ? undefined : decoder.decode(Buffer.from(a.s, 'base64')));
const ints = (a: TfAttr | undefined): number[] => (a?.list?.i ?? []).map(Number);

type Attribute = OnnxProto.onnx.IAttributeProto;
const A = onnx.AttributeProto.AttributeType;
const attrInts = (name: string, values: number[]): Attribute => ({ name, type: A.INTS, ints: values });
const attrInt = (name: string, value: number): Attribute => ({ name, type: A.INT, i: value });
const attrString = (name: string, value: string): Attribute => ({ name, type: A.STRING, s: encoder.encode(value) });

function floatTensor(name: string, dims: number[], data: Float32Array): OnnxProto.onnx.ITensorProto {
  const raw = new Uint8Array(data.length * 4);
  const view = new DataView(raw.buffer);
  for (let i = 0; i < data.length; i++) view.setFloat32(4 * i, data[i]!, true);
  return { name, dims, dataType: onnx.TensorProto.DataType.FLOAT, rawData: raw };
}

/** The node's name for an input reference: `name`, `name:0` → `name`; control inputs (`^name`) are skipped by the caller. */
function refName(ref: string): string {
  const m = /^([^:]+)(?::(\d+))?$/.exec(ref);
  if (!m) throw new ConversionError(`cannot read the input reference ${ref}`);
  if (m[2] !== undefined && m[2] !== '0') throw new ConversionError(`input ${ref} uses output ${m[2]} of a multi-output node, which is not supported`);
  return m[1]!;
}

/** HWIO (TF Conv2D) → OIHW (ONNX Conv). */
function hwioToOihw(w: DecodedTensor): { dims: number[]; data: Float32Array } {
  const [kh, kw, ci, co] = w.shape as [number, number, number, number];
  const src = w.data;
  const out = new Float32Array(src.length);
  for (let y = 0; y < kh; y++)
    for (let x = 0; x < kw; x++)
      for (let i = 0; i < ci; i++)
        for (let o = 0; o < co; o++) out[((o * ci + i) * kh + y) * kw + x] = src[((y * kw + x) * ci + i) * co + o]!;
  return { dims: [co, ci, kh, kw], data: out };
}

/** [kh, kw, C, M] (TF depthwise) → [C·M, 1, kh, kw]; output channel c·M + m, as in TF. */
function depthwiseToGrouped(w: DecodedTensor): { dims: number[]; data: Float32Array; groups: number } {
  const [kh, kw, c, m] = w.shape as [number, number, number, number];
  const src = w.data;
  const out = new Float32Array(src.length);
  for (let y = 0; y < kh; y++)
    for (let x = 0; x < kw; x++)
      for (let i = 0; i < c; i++)
        for (let j = 0; j < m; j++) out[((i * m + j) * kh + y) * kw + x] = src[((y * kw + x) * c + i) * m + j]!;
  return { dims: [c * m, 1, kh, kw], data: out, groups: c };
}

const ELEMENTWISE: Record<string, string> = { Add: 'Add', AddV2: 'Add', BiasAdd: 'Add', Sub: 'Sub', Mul: 'Mul', RealDiv: 'Div' };
const UNARY: Record<string, string> = { Relu: 'Relu', Sigmoid: 'Sigmoid', Identity: 'Identity' };
const CONV_OPS = new Set(['Conv2D', '_FusedConv2D', 'DepthwiseConv2dNative', 'FusedDepthwiseConv2dNative']);

interface HardActivation {
  kind: 'HardSwish' | 'HardSigmoid';
  /** the activation's input */
  x: string;
  /** what is left after the ONNX op: 6c */
  scale: number;
}

/**
 * Finds x · relu6(x + 3) · c (hard swish, either grouping of the products) and relu6(x + 3) · c (hard
 * sigmoid) with scalar constants, where the pattern's inner nodes feed nothing else. Returns the node
 * that ends each pattern and the inner nodes to leave out.
 */
function findHardActivations(order: readonly TfNode[], constant: (name: string) => DecodedTensor | undefined, dataInputs: (n: TfNode) => string[]): { at: Map<string, HardActivation>; inner: Set<string> } {
  const byName = new Map(order.map((n) => [n.name, n]));
  const consumers = new Map<string, number>();
  for (const n of order) for (const r of dataInputs(n)) consumers.set(r, (consumers.get(r) ?? 0) + 1);
  const single = (name: string) => consumers.get(name) === 1;
  const scalar = (name: string): number | undefined => {
    const c = constant(name);
    return c && c.data.length === 1 ? c.data[0] : undefined;
  };
  /** relu6(x + 3) → x and its two nodes */
  const shifted = (name: string): { x: string; inner: string[] } | undefined => {
    const r = byName.get(name);
    if (r?.op !== 'Relu6' || !single(name)) return undefined;
    const a = byName.get(dataInputs(r)[0] ?? '');
    if (!a || (a.op !== 'Add' && a.op !== 'AddV2') || !single(a.name)) return undefined;
    const [p, q] = dataInputs(a) as [string, string];
    const x = scalar(q) === 3 ? p : scalar(p) === 3 ? q : undefined;
    return x === undefined || scalar(x) !== undefined ? undefined : { x, inner: [a.name, r.name] };
  };
  /** x · k (or k · x) with a scalar k → x and k */
  const scaled = (name: string): { x: string; k: number } | undefined => {
    const m = byName.get(name);
    if (m?.op !== 'Mul' || !single(name)) return undefined;
    const [p, q] = dataInputs(m) as [string, string];
    const kq = scalar(q);
    const kp = scalar(p);
    if (kq !== undefined && kp === undefined) return { x: p, k: kq };
    if (kp !== undefined && kq === undefined) return { x: q, k: kp };
    return undefined;
  };
  const at = new Map<string, HardActivation>();
  const inner = new Set<string>();
  const take = (end: string, found: HardActivation, parts: string[]) => {
    at.set(end, found);
    for (const p of parts) inner.add(p);
  };
  for (const n of order) {
    if (n.op !== 'Mul' || inner.has(n.name)) continue;
    const [p, q] = dataInputs(n) as [string, string];
    let matched = false;
    // (k · x) · relu6(x + 3)
    for (const [s, r] of [
      [p, q],
      [q, p],
    ] as const) {
      const sh = shifted(r);
      const sc = sh && scaled(s);
      if (sh && sc && sc.x === sh.x) {
        take(n.name, { kind: 'HardSwish', x: sh.x, scale: 6 * sc.k }, [...sh.inner, s]);
        matched = true;
        break;
      }
    }
    if (matched) continue;
    for (const [m, k] of [
      [p, q],
      [q, p],
    ] as const) {
      const c = scalar(k);
      if (c === undefined) continue;
      // (x · relu6(x + 3)) · k
      const mm = byName.get(m);
      if (mm?.op === 'Mul' && single(m)) {
        const [a, b] = dataInputs(mm) as [string, string];
        const hit = [
          [a, b],
          [b, a],
        ].find(([x, r]) => shifted(r!)?.x === x);
        if (hit) {
          take(n.name, { kind: 'HardSwish', x: hit[0]!, scale: 6 * c }, [...shifted(hit[1]!)!.inner, m]);
          matched = true;
          break;
        }
      }
      // relu6(x + 3) · k
      const sh = shifted(m);
      if (sh) {
        take(n.name, { kind: 'HardSigmoid', x: sh.x, scale: 6 * c }, sh.inner);
        matched = true;
        break;
      }
    }
  }
  return { at, inner };
}

/** Converts the sub-graph of a TF.js graph model that computes `featureNode` into ONNX bytes. */
export function convertGraphToOnnx(source: GraphModelSource, options: ConvertOptions): ConvertedModel {
  const nodes = (source.modelTopology as { node?: TfNode[] } | undefined)?.node;
  if (!Array.isArray(nodes)) throw new ConversionError('the model has no graph nodes (is it a TF.js graph model?)');
  const byName = new Map(nodes.map((n) => [n.name, n]));
  const weights = decodeWeights(source.weightSpecs, source.weightData);
  if (!byName.has(options.featureNode)) throw new ConversionError(`the graph has no node named ${options.featureNode}`);

  // the nodes the feature node depends on, in an order where inputs come first (iterative post-order walk)
  const order: TfNode[] = [];
  const state = new Map<string, 'open' | 'done'>();
  const stack: { name: string; expanded: boolean }[] = [{ name: options.featureNode, expanded: false }];
  while (stack.length) {
    const top = stack.pop()!;
    const node = byName.get(top.name);
    if (!node) throw new ConversionError(`node ${top.name} is referenced but not in the graph`);
    if (top.expanded) {
      state.set(top.name, 'done');
      order.push(node);
      continue;
    }
    if (state.get(top.name) === 'done') continue;
    if (state.get(top.name) === 'open') throw new ConversionError(`the graph has a cycle through ${top.name}`);
    state.set(top.name, 'open');
    stack.push({ name: top.name, expanded: true });
    for (const ref of node.input ?? []) {
      if (ref.startsWith('^')) continue;
      const name = refName(ref);
      if (state.get(name) !== 'done') stack.push({ name, expanded: false });
    }
  }

  const onnxNodes: OnnxProto.onnx.INodeProto[] = [];
  const initializers: OnnxProto.onnx.ITensorProto[] = [];
  const inputName = options.inputName ?? 'images';
  const ops: Record<string, number> = {};
  /** channel count of each converted tensor (NCHW axis 1); undefined for scalars and constants */
  const channels = new Map<string, number>();
  const initialized = new Set<string>();
  let inputChannels = 0;

  const constant = (name: string): DecodedTensor | undefined => {
    const node = byName.get(name);
    if (node?.op !== 'Const') return undefined;
    const w = weights.get(name);
    if (!w) throw new ConversionError(`constant ${name} has no entry in the weights manifest (inline constants are not supported)`);
    return w;
  };
  const addInitializer = (name: string, dims: number[], data: Float32Array): string => {
    if (!initialized.has(name)) {
      initializers.push(floatTensor(name, dims, data));
      initialized.add(name);
    }
    return name;
  };
  /** a constant operand of an elementwise op, laid out to broadcast against NCHW */
  const broadcastConstant = (name: string, w: DecodedTensor): string => {
    if (w.dtype !== 'float32') throw new ConversionError(`constant ${name} is ${w.dtype}, expected float32`);
    const data = w.data as Float32Array;
    if (w.shape.length === 0 || w.data.length === 1) return addInitializer(`${name}/scalar`, [], Float32Array.of(data[0]!));
    if (w.shape.length === 1) return addInitializer(`${name}/c11`, [w.shape[0]!, 1, 1], data);
    if (w.shape.length === 4) {
      const [n, h, wd, c] = w.shape as [number, number, number, number];
      const out = new Float32Array(data.length);
      for (let a = 0; a < n; a++) for (let y = 0; y < h; y++) for (let x = 0; x < wd; x++) for (let k = 0; k < c; k++) out[((a * c + k) * h + y) * wd + x] = data[((a * h + y) * wd + x) * c + k]!;
      return addInitializer(`${name}/nchw`, [n, c, h, wd], out);
    }
    throw new ConversionError(`constant ${name} of shape [${w.shape.join(', ')}] cannot be broadcast in NCHW`);
  };
  const clip = (input: string, output: string, name: string) => {
    const lo = addInitializer('cartouche/clip_min_0', [], Float32Array.of(0));
    const hi = addInitializer('cartouche/clip_max_6', [], Float32Array.of(6));
    onnxNodes.push({ name, opType: 'Clip', input: [input, lo, hi], output: [output] });
  };
  const dataInputs = (node: TfNode) => (node.input ?? []).filter((r) => !r.startsWith('^')).map(refName);
  const tensorOf = (name: string): string => {
    if (!channels.has(name)) throw new ConversionError(`node ${name} is used as a feature map but is not one (op ${byName.get(name)?.op})`);
    return name;
  };

  const fused = options.activations === 'fused' ? findHardActivations(order, constant, dataInputs) : { at: new Map<string, HardActivation>(), inner: new Set<string>() };

  for (const node of order) {
    ops[node.op] = (ops[node.op] ?? 0) + 1;
    const inputs = dataInputs(node);
    const attr = node.attr ?? {};
    if (node.op === 'Const') continue; // read where used
    if (fused.inner.has(node.name)) continue; // part of a pattern emitted at its last node
    const hard = fused.at.get(node.name);
    if (hard) {
      const activated = `${node.name}/${hard.kind}`;
      const attribute = hard.kind === 'HardSigmoid' ? [{ name: 'alpha', type: A.FLOAT, f: 1 / 6 }, { name: 'beta', type: A.FLOAT, f: 0.5 }] : [];
      onnxNodes.push({ name: activated, opType: hard.kind, input: [tensorOf(hard.x)], output: [activated], attribute });
      const scale = addInitializer(`${node.name}/leftover_scale`, [], Float32Array.of(hard.scale));
      onnxNodes.push({ name: node.name, opType: 'Mul', input: [activated, scale], output: [node.name] });
      channels.set(node.name, channels.get(hard.x)!);
      continue;
    }
    if (node.op === 'Placeholder') {
      if (node.name !== options.inputNode) throw new ConversionError(`the feature node depends on the placeholder ${node.name}, not on ${options.inputNode}`);
      const dims = (attr.shape?.shape?.dim ?? []).map((d) => Number(d.size));
      if (dims.length !== 4) throw new ConversionError(`placeholder ${node.name} is not rank 4 (NHWC)`);
      inputChannels = dims[3]!;
      if (!(inputChannels > 0)) throw new ConversionError(`placeholder ${node.name} has no fixed channel count`);
      onnxNodes.push({ name: `${node.name}/to_nchw`, opType: 'Transpose', input: [inputName], output: [node.name], attribute: [attrInts('perm', [0, 3, 1, 2])] });
      channels.set(node.name, inputChannels);
      continue;
    }
    if (CONV_OPS.has(node.op)) {
      const format = str(attr.data_format) ?? 'NHWC';
      if (format !== 'NHWC') throw new ConversionError(`${node.name}: data format ${format} is not supported (NHWC only)`);
      const x = tensorOf(inputs[0]!);
      const w = constant(inputs[1]!);
      if (!w || w.shape.length !== 4) throw new ConversionError(`${node.name}: the filter must be a rank-4 constant`);
      const depthwise = node.op.includes('Depthwise');
      const kernel = depthwise ? depthwiseToGrouped(w) : { ...hwioToOihw(w), groups: 1 };
      const [, sh, sw] = ints(attr.strides).length === 4 ? ints(attr.strides) : [1, 1, 1, 1];
      const [, dh, dw] = ints(attr.dilations).length === 4 ? ints(attr.dilations) : [1, 1, 1, 1];
      const padding = str(attr.padding) ?? 'VALID';
      const convAttrs: Attribute[] = [
        attrInts('kernel_shape', [w.shape[0]!, w.shape[1]!]),
        attrInts('strides', [sh!, sw!]),
        attrInts('dilations', [dh!, dw!]),
        attrInt('group', kernel.groups),
      ];
      if (padding === 'SAME') convAttrs.push(attrString('auto_pad', 'SAME_UPPER'));
      else if (padding === 'VALID') convAttrs.push(attrString('auto_pad', 'VALID'));
      else if (padding === 'EXPLICIT') {
        const p = ints(attr.explicit_paddings); // [0, 0, top, bottom, left, right, 0, 0] in NHWC
        if (p.length !== 8) throw new ConversionError(`${node.name}: explicit paddings must list 8 values`);
        convAttrs.push(attrInts('pads', [p[2]!, p[4]!, p[3]!, p[5]!]));
      } else throw new ConversionError(`${node.name}: padding ${padding} is not supported`);

      const fused = node.op.startsWith('_Fused') || node.op.startsWith('Fused') ? (attr.fused_ops?.list?.s ?? []).map((s) => decoder.decode(Buffer.from(s, 'base64'))) : [];
      const [first, activation, ...rest] = fused;
      if (fused.length > 0 && first !== 'BiasAdd') throw new ConversionError(`${node.name}: fused ops ${fused.join(', ')} are not supported (BiasAdd first)`);
      if (rest.length > 0 || (activation !== undefined && activation !== 'Relu' && activation !== 'Relu6')) {
        throw new ConversionError(`${node.name}: fused ops ${fused.join(', ')} are not supported (BiasAdd, then Relu or Relu6)`);
      }
      const convInputs = [x, addInitializer(`${node.name}/weights_oihw`, kernel.dims, kernel.data)];
      if (first === 'BiasAdd') {
        const b = constant(inputs[2] ?? '');
        if (!b || b.data.length !== kernel.dims[0]) throw new ConversionError(`${node.name}: the bias must be a constant with one value per output channel`);
        convInputs.push(addInitializer(`${inputs[2]!}/bias`, [kernel.dims[0]!], b.data as Float32Array));
      }
      const convOut = activation ? `${node.name}/conv` : node.name;
      onnxNodes.push({ name: convOut, opType: 'Conv', input: convInputs, output: [convOut], attribute: convAttrs });
      if (activation === 'Relu') onnxNodes.push({ name: `${node.name}/relu`, opType: 'Relu', input: [convOut], output: [node.name] });
      if (activation === 'Relu6') clip(convOut, node.name, `${node.name}/relu6`);
      channels.set(node.name, kernel.dims[0]!);
      continue;
    }
    if (node.op === 'Relu6') {
      clip(tensorOf(inputs[0]!), node.name, node.name);
      channels.set(node.name, channels.get(inputs[0]!)!);
      continue;
    }
    if (UNARY[node.op]) {
      onnxNodes.push({ name: node.name, opType: UNARY[node.op], input: [tensorOf(inputs[0]!)], output: [node.name] });
      channels.set(node.name, channels.get(inputs[0]!)!);
      continue;
    }
    if (ELEMENTWISE[node.op]) {
      if (inputs.length !== 2) throw new ConversionError(`${node.name}: ${node.op} needs two inputs`);
      const operands = inputs.map((name) => {
        const c = constant(name);
        return c ? broadcastConstant(name, c) : tensorOf(name);
      });
      const maps = inputs.filter((n) => channels.has(n));
      if (maps.length === 0) throw new ConversionError(`${node.name}: ${node.op} of two constants is not supported`);
      onnxNodes.push({ name: node.name, opType: ELEMENTWISE[node.op], input: operands, output: [node.name] });
      channels.set(node.name, Math.max(...maps.map((n) => channels.get(n)!)));
      continue;
    }
    if (node.op === 'Mean' || node.op === 'Max') {
      const axes = constant(inputs[1] ?? '');
      const list = axes ? Array.from(axes.data).sort() : [];
      if (list.join(',') !== '1,2') throw new ConversionError(`${node.name}: ${node.op} is supported over the spatial axes [1, 2] only`);
      if (attr.keep_dims?.b !== true) throw new ConversionError(`${node.name}: ${node.op} without keep_dims is not supported`);
      onnxNodes.push({ name: node.name, opType: node.op === 'Mean' ? 'GlobalAveragePool' : 'GlobalMaxPool', input: [tensorOf(inputs[0]!)], output: [node.name] });
      channels.set(node.name, channels.get(inputs[0]!)!);
      continue;
    }
    throw new ConversionError(`${node.name}: op ${node.op} is not supported by the converter`);
  }

  const featureChannels = channels.get(options.featureNode);
  if (featureChannels === undefined) throw new ConversionError(`node ${options.featureNode} is not a feature map`);
  if (!inputChannels) throw new ConversionError(`node ${options.featureNode} does not depend on the input ${options.inputNode}`);

  let outputName: string;
  let outputDims: OnnxProto.onnx.TensorShapeProto.IDimension[];
  if (options.pooling && options.pooling.length > 0) {
    const pooled = options.pooling.map((p, i) => {
      const name = `cartouche/pool_${i}_${p}`;
      onnxNodes.push({ name, opType: p === 'avg' ? 'GlobalAveragePool' : 'GlobalMaxPool', input: [options.featureNode], output: [name] });
      return name;
    });
    let joined = pooled[0]!;
    if (pooled.length > 1) {
      joined = 'cartouche/pooled';
      onnxNodes.push({ name: joined, opType: 'Concat', input: pooled, output: [joined], attribute: [attrInt('axis', 1)] });
    }
    outputName = 'features';
    onnxNodes.push({ name: outputName, opType: 'Flatten', input: [joined], output: [outputName], attribute: [attrInt('axis', 1)] });
    outputDims = [{ dimParam: 'N' }, { dimValue: featureChannels * pooled.length }];
  } else {
    outputName = 'feature_map';
    onnxNodes.push({ name: outputName, opType: 'Identity', input: [options.featureNode], output: [outputName] });
    outputDims = [{ dimParam: 'N' }, { dimValue: featureChannels }, { dimParam: 'h' }, { dimParam: 'w' }];
  }

  const floatType = (dims: OnnxProto.onnx.TensorShapeProto.IDimension[]): OnnxProto.onnx.ITypeProto => ({
    tensorType: { elemType: onnx.TensorProto.DataType.FLOAT, shape: { dim: dims } },
  });
  const model = onnx.ModelProto.create({
    irVersion: 7,
    opsetImport: [{ domain: '', version: ONNX_OPSET }],
    producerName: 'cartouche tfjs-to-onnx',
    producerVersion: String(CONVERTER_VERSION),
    docString: options.docString ?? `TF.js graph ${options.inputNode} → ${options.featureNode}`,
    graph: {
      name: 'backbone',
      node: onnxNodes,
      initializer: initializers,
      input: [{ name: inputName, type: floatType([{ dimParam: 'N' }, { dimParam: 'H' }, { dimParam: 'W' }, { dimValue: inputChannels }]) }],
      output: [{ name: outputName, type: floatType(outputDims) }],
    },
  });
  return { bytes: onnx.ModelProto.encode(model).finish(), inputName, outputName, channels: featureChannels, ops };
}
