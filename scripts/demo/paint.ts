/**
 * Painters: how each part of a drawing is filled in a given medium.
 * Engravings fill with hatching patterns in ink on paper, photographs with toned greys that fade
 * with distance, lithographs with a few flat colours.
 */
import type { PhotoTone, SceneStyle } from './scene.ts';

export type Part =
  | 'hull'
  | 'band'
  | 'house'
  | 'sail'
  | 'spar'
  | 'funnel'
  | 'funnelTop'
  | 'smoke'
  | 'tower'
  | 'towerBand'
  | 'iron'
  | 'lamp'
  | 'beam'
  | 'stone'
  | 'timber'
  | 'figure'
  | 'shirt'
  | 'cargo'
  | 'land'
  | 'rock'
  | 'roof'
  | 'window'
  | 'flag'
  | 'paving'
  | 'cloud'
  | 'foam'
  | 'net';

export interface Painter {
  style: SceneStyle;
  /** line colour */
  ink: string;
  paper: string;
  /** flat sky colour */
  sky: string;
  /** base line width in px */
  lw: number;
  fill(part: Part, haze?: number): string;
  /** outline colour, or 'none' */
  stroke(part: Part, haze?: number): string;
  /** a tone between dark (0) and light (1) in this medium, for skies and seas */
  tone(v: number, haze?: number): string;
  defs: string[];
}

type Rgb = [number, number, number];

function hex(c: Rgb): string {
  return '#' + c.map((v) => Math.max(0, Math.min(255, Math.round(v))).toString(16).padStart(2, '0')).join('');
}

function mix(a: Rgb, b: Rgb, t: number): Rgb {
  return [a[0] + (b[0] - a[0]) * t, a[1] + (b[1] - a[1]) * t, a[2] + (b[2] - a[2]) * t];
}

function parseHex(h: string): Rgb {
  const n = Number.parseInt(h.slice(1), 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
}

const TONES: Record<PhotoTone, [Rgb, Rgb, Rgb]> = {
  sepia: [
    [34, 24, 15],
    [130, 100, 68],
    [238, 226, 202],
  ],
  grey: [
    [22, 22, 24],
    [120, 119, 116],
    [233, 232, 226],
  ],
  selenium: [
    [36, 24, 30],
    [114, 96, 98],
    [232, 225, 218],
  ],
};

export function toneRgb(tone: PhotoTone, v: number): Rgb {
  const [d, m, l] = TONES[tone];
  const t = Math.max(0, Math.min(1, v));
  return t < 0.5 ? mix(d, m, t * 2) : mix(m, l, (t - 0.5) * 2);
}

export function photoPainter(tone: PhotoTone, lw: number, fog: number): Painter {
  const value: Record<Part, number> = {
    hull: 0.13,
    band: 0.8,
    house: 0.78,
    sail: 0.84,
    spar: 0.16,
    funnel: 0.24,
    funnelTop: 0.08,
    smoke: 0.42,
    tower: 0.88,
    towerBand: 0.3,
    iron: 0.18,
    lamp: 1,
    beam: 1,
    stone: 0.5,
    timber: 0.3,
    figure: 0.12,
    shirt: 0.36,
    cargo: 0.38,
    land: 0.4,
    rock: 0.26,
    roof: 0.3,
    window: 0.1,
    flag: 0.3,
    paving: 0.68,
    cloud: 0.93,
    foam: 0.92,
    net: 0.45,
  };
  const sky = toneRgb(tone, 0.86);
  const col = (v: number, haze = 0): string => {
    const h = Math.max(0, Math.min(1, haze * 0.55 + fog * 0.5));
    return hex(mix(toneRgb(tone, v), sky, h));
  };
  return {
    style: 'photograph',
    ink: col(0.1),
    paper: col(0.95),
    sky: hex(sky),
    lw,
    fill: (p, haze) => col(value[p], haze),
    stroke: (p, haze) => (p === 'sail' || p === 'tower' || p === 'house' || p === 'cloud' ? col(value[p] - 0.22, haze) : 'none'),
    tone: (v, haze) => col(v, haze),
    defs: [],
  };
}

export interface LithoPalette {
  paper: string;
  sky: string;
  skyLow: string;
  sea: string;
  deep: string;
  ink: string;
  accent: string;
  land: string;
  warm: string;
}

export const LITHO_PALETTES: LithoPalette[] = [
  { paper: '#f5ecd6', sky: '#f3cf73', skyLow: '#f7e2a4', sea: '#2f7190', deep: '#1c4a64', ink: '#1a2230', accent: '#c4452e', land: '#6f8a4c', warm: '#e79a3c' },
  { paper: '#fbf3e1', sky: '#9fd0d6', skyLow: '#cde8e6', sea: '#1f5078', deep: '#143755', ink: '#141e2b', accent: '#e0a12a', land: '#b4573a', warm: '#f0c95a' },
  { paper: '#f7e9cf', sky: '#efb287', skyLow: '#f6d6b4', sea: '#375d7f', deep: '#233f5a', ink: '#251a2b', accent: '#7a2f5f', land: '#8b6b3d', warm: '#f2c24f' },
  { paper: '#f2efe4', sky: '#cfe0c8', skyLow: '#e6eedc', sea: '#2e6a5e', deep: '#1d4740', ink: '#1d2420', accent: '#b8322f', land: '#c59a55', warm: '#eec064' },
];

export function lithoPainter(palette: LithoPalette, lw: number): Painter {
  const p = palette;
  const fills: Record<Part, string> = {
    hull: p.ink,
    band: p.paper,
    house: p.paper,
    sail: p.paper,
    spar: p.ink,
    funnel: p.accent,
    funnelTop: p.ink,
    smoke: '#ffffff',
    tower: p.paper,
    towerBand: p.accent,
    iron: p.ink,
    lamp: p.warm,
    beam: '#fff6c8',
    stone: p.land,
    timber: p.ink,
    figure: p.ink,
    shirt: p.accent,
    cargo: p.warm,
    land: p.land,
    rock: p.deep,
    roof: p.accent,
    window: p.ink,
    flag: p.accent,
    paving: p.skyLow,
    cloud: p.paper,
    foam: p.paper,
    net: p.warm,
  };
  return {
    style: 'lithograph',
    ink: p.ink,
    paper: p.paper,
    sky: p.sky,
    lw,
    fill: (part) => fills[part],
    stroke: (part) => (part === 'sail' || part === 'tower' || part === 'house' || part === 'cloud' ? p.ink : 'none'),
    tone: (v) => (v < 0.5 ? hex(mix(parseHex(p.deep), parseHex(p.sea), v * 2)) : hex(mix(parseHex(p.sea), parseHex(p.skyLow), (v - 0.5) * 2))),
    defs: [],
  };
}

export const ENGRAVING_INK = '#2b2119';
export const ENGRAVING_PAPER = '#f0e6cc';

/**
 * Engraving: ink lines on paper. Tones are hatching patterns whose spacing follows the picture
 * size, so a plate reads the same at any resolution.
 */
export function engravingPainter(lw: number, spacing: number, idPrefix: string): Painter {
  const ink = ENGRAVING_INK;
  const paper = ENGRAVING_PAPER;
  const w1 = (lw * 0.55).toFixed(2);
  const w2 = (lw * 0.75).toFixed(2);
  const id = (name: string) => `${idPrefix}-${name}`;
  // Tiles hold many lines: librsvg is far quicker with a few large pattern tiles than many tiny ones.
  const LINES = 12;
  const tile = (angle: number, width: string, sp: number, name: string, crossed: boolean) => {
    const t = (sp * LINES).toFixed(2);
    let lines = '';
    for (let i = 0; i < LINES; i++) {
      const y = (i * sp).toFixed(2);
      lines += `M0,${y} H${t} `;
      if (crossed) lines += `M${y},0 V${t} `;
    }
    return (
      `<pattern id="${id(name)}" patternUnits="userSpaceOnUse" width="${t}" height="${t}" patternTransform="rotate(${angle})">` +
      `<rect width="${t}" height="${t}" fill="${paper}"/><path d="${lines}" stroke="${ink}" stroke-width="${width}" fill="none"/></pattern>`
    );
  };
  const line = (angle: number, width: string, sp: number, name: string) => tile(angle, width, sp, name, false);
  const cross = (angle: number, width: string, sp: number, name: string) => tile(angle, width, sp, name, true);
  const defs = [
    line(0, w1, spacing * 1.8, 'light'),
    line(90, w1, spacing, 'vert'),
    line(35, w1, spacing, 'mid'),
    line(-35, w2, spacing, 'mid2'),
    cross(45, w1, spacing, 'cross'),
    cross(20, w2, spacing * 0.8, 'dark'),
  ];
  const u = (name: string) => `url(#${id(name)})`;
  const fills: Record<Part, string> = {
    hull: u('dark'),
    band: paper,
    house: u('light'),
    sail: paper,
    spar: ink,
    funnel: u('cross'),
    funnelTop: ink,
    smoke: u('light'),
    tower: u('vert'),
    towerBand: u('dark'),
    iron: ink,
    lamp: paper,
    beam: paper,
    stone: u('mid'),
    timber: u('cross'),
    figure: u('dark'),
    shirt: u('mid2'),
    cargo: u('mid'),
    land: u('mid'),
    rock: u('cross'),
    roof: u('mid2'),
    window: ink,
    flag: u('cross'),
    paving: u('light'),
    cloud: paper,
    foam: paper,
    net: u('cross'),
  };
  return {
    style: 'engraving',
    ink,
    paper,
    sky: paper,
    lw,
    fill: (part) => fills[part],
    stroke: (part) => (part === 'beam' || part === 'foam' ? 'none' : ink),
    tone: (v) => (v > 0.7 ? paper : v > 0.45 ? u('light') : v > 0.25 ? u('mid') : u('dark')),
    defs,
  };
}
