/** Shared drawing context and geometry helpers for the demo renderer. */
import type { Painter, Part } from './paint.ts';
import type { Rng } from './prng.ts';
import type { Facing, SeaState, Weather } from './scene.ts';

export interface DrawCtx {
  /** picture rectangle in px */
  x0: number;
  y0: number;
  W: number;
  H: number;
  /** horizon, absolute px */
  horizon: number;
  p: Painter;
  rng: Rng;
  weather: Weather;
  sea: SeaState;
  /** unique id for defs inside this document */
  id(name: string): string;
  defs: string[];
}

export const f1 = (v: number): string => (Math.round(v * 10) / 10).toString();

export function px(c: DrawCtx, x: number): number {
  return c.x0 + x * c.W;
}
export function py(c: DrawCtx, y: number): number {
  return c.y0 + y * c.H;
}

/** 0 for the foreground, towards 1 at the horizon; photographs fade distant things. */
export function hazeAt(c: DrawCtx, yAbs: number): number {
  const bottom = c.y0 + c.H;
  const depth = Math.max(0, Math.min(1, (yAbs - c.horizon) / Math.max(1, bottom - c.horizon)));
  return Math.pow(1 - depth, 2) * 0.9;
}

export function lineWidth(c: DrawCtx, k: number, factor = 0.22): number {
  return Math.max(c.p.lw * 0.45, Math.min(c.p.lw * 1.6, k * factor));
}

export type Cmd =
  | ['M' | 'L', number, number]
  | ['Q', number, number, number, number]
  | ['C', number, number, number, number, number, number]
  | ['A', number, number, 0 | 1, 0 | 1, number, number]
  | ['Z'];

/**
 * A local frame: `k` px per unit, x mirrored by `facing`, rotated clockwise by `rot` degrees
 * about the origin (rotation applied before mirroring, so positive leans towards the bow).
 */
export class Frame {
  private readonly cos: number;
  private readonly sin: number;
  constructor(
    readonly ox: number,
    readonly oy: number,
    readonly k: number,
    readonly facing: Facing = 1,
    readonly rot = 0,
  ) {
    const a = (rot * Math.PI) / 180;
    this.cos = Math.cos(a);
    this.sin = Math.sin(a);
  }
  X(lx: number, ly: number): number {
    return this.ox + this.facing * (lx * this.cos - ly * this.sin) * this.k;
  }
  Y(lx: number, ly: number): number {
    return this.oy + (lx * this.sin + ly * this.cos) * this.k;
  }
  pt(lx: number, ly: number): string {
    return `${f1(this.X(lx, ly))},${f1(this.Y(lx, ly))}`;
  }
  d(cmds: Cmd[]): string {
    return cmds
      .map((c) => {
        switch (c[0]) {
          case 'M':
          case 'L':
            return `${c[0]}${this.pt(c[1], c[2])}`;
          case 'Q':
            return `Q${this.pt(c[1], c[2])} ${this.pt(c[3], c[4])}`;
          case 'C':
            return `C${this.pt(c[1], c[2])} ${this.pt(c[3], c[4])} ${this.pt(c[5], c[6])}`;
          case 'A': {
            const sweep = this.facing === 1 ? c[4] : c[4] === 1 ? 0 : 1;
            return `A${f1(c[1] * this.k)} ${f1(c[2] * this.k)} 0 ${c[3]} ${sweep} ${this.pt(c[5], c[6])}`;
          }
          case 'Z':
            return 'Z';
        }
      })
      .join(' ');
  }
  poly(points: Array<[number, number]>): string {
    return points.map(([x, y], i) => `${i === 0 ? 'M' : 'L'}${this.pt(x, y)}`).join(' ') + ' Z';
  }
  line(x1: number, y1: number, x2: number, y2: number): string {
    return `M${this.pt(x1, y1)} L${this.pt(x2, y2)}`;
  }
  len(v: number): number {
    return v * this.k;
  }
}

export function shape(c: DrawCtx, d: string, part: Part, haze: number, sw: number, extra = ''): string {
  const stroke = c.p.stroke(part, haze);
  const strokeAttr = stroke === 'none' ? 'stroke="none"' : `stroke="${stroke}" stroke-width="${f1(sw)}" stroke-linejoin="round"`;
  return `<path d="${d}" fill="${c.p.fill(part, haze)}" ${strokeAttr}${extra ? ' ' + extra : ''}/>`;
}

export function strokePath(d: string, colour: string, sw: number, extra = ''): string {
  return `<path d="${d}" fill="none" stroke="${colour}" stroke-width="${f1(sw)}" stroke-linecap="round" stroke-linejoin="round"${extra ? ' ' + extra : ''}/>`;
}

/** line colour for thin parts (rigging, spars) */
export function lineColour(c: DrawCtx, haze: number): string {
  return c.p.style === 'photograph' ? c.p.fill('spar', haze) : c.p.ink;
}

export function escapeXml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** approximate advance width of upper-case text in DejaVu fonts, in em */
export function textWidthEm(text: string, bold = true, condensed = false): number {
  let w = 0;
  for (const ch of text) {
    if (ch === ' ') w += 0.32;
    else if ('IJ1.,:;\'’·!'.includes(ch)) w += 0.36;
    else if ('MW'.includes(ch)) w += 0.95;
    else if (ch >= 'a' && ch <= 'z') w += 0.6;
    else w += bold ? 0.76 : 0.7;
  }
  return condensed ? w * 0.84 : w;
}
