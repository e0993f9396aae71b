/** Drawers for the things a harbour view can show: vessels, structures, people, birds. */
import {
  type DrawCtx,
  Frame,
  escapeXml,
  f1,
  hazeAt,
  lineColour,
  lineWidth,
  px,
  py,
  shape,
  strokePath,
  textWidthEm,
} from './draw-kit.ts';
import { range } from './prng.ts';
import type {
  CargoElement,
  CraneElement,
  GullElement,
  HeadlandElement,
  LighthouseElement,
  PierElement,
  QuayElement,
  RockElement,
  RowingBoatElement,
  SailingShipElement,
  SceneElement,
  SteamshipElement,
  SunElement,
  WorkerElement,
} from './scene.ts';

/** a wavy strip of water drawn over the bottom of a hull so it sits in the sea */
function waterline(c: DrawCtx, f: Frame, from: number, to: number, depth: number): string {
  // in heavy seas the hull rides on the breaking waves instead
  if (c.sea === 'rough') return '';
  const pts: string[] = [];
  const steps = 10;
  for (let i = 0; i <= steps; i++) {
    const x = from + ((to - from) * i) / steps;
    pts.push(`${i === 0 ? 'M' : 'L'}${f1(f.X(x, 0) )},${f1(f.oy + (i % 2 === 0 ? -0.6 : 0.6) * f.k)}`);
  }
  const bottom = f.oy + depth * f.k;
  const d = `${pts.join(' ')} L${f1(f.X(to, 0))},${f1(bottom)} L${f1(f.X(from, 0))},${f1(bottom)} Z`;
  return `<path d="${d}" fill="${seaFill(c)}" stroke="none"/>` + seaLinesOver(c, f.X(from, 0), f.X(to, 0), f.oy, bottom);
}

/** the colour or pattern of the sea at a given height */
export function seaFill(c: DrawCtx): string {
  return c.p.style === 'engraving' ? c.p.paper : `url(#${c.id('sea')})`;
}

function seaLinesOver(c: DrawCtx, xa: number, xb: number, y: number, bottom: number): string {
  if (c.p.style !== 'engraving') return '';
  const left = Math.min(xa, xb);
  const right = Math.max(xa, xb);
  let d = '';
  const gap = Math.max(2.5, (bottom - y) / 4);
  for (let yy = y + gap * 0.6; yy < bottom; yy += gap) {
    d += `M${f1(left)},${f1(yy)} L${f1(right)},${f1(yy)} `;
  }
  return d ? strokePath(d, c.p.ink, c.p.lw * 0.6) : '';
}

/** name board with upper-case lettering, kept upright and unmirrored */
function nameBoard(c: DrawCtx, f: Frame, cx: number, cy: number, name: string, fsUnits: number, rot: number): string {
  const fs = f.len(fsUnits);
  const w = textWidthEm(name, true) * fs + fs * 0.8;
  const h = fs * 1.3;
  const x = f.X(cx, cy);
  const y = f.Y(cx, cy);
  const board = c.p.style === 'lithograph' ? c.p.paper : c.p.style === 'photograph' ? c.p.fill('band', 0) : c.p.paper;
  const ink = c.p.style === 'photograph' ? c.p.fill('window', 0) : c.p.ink;
  return (
    `<g transform="translate(${f1(x)},${f1(y)}) rotate(${f1(rot * f.facing)})">` +
    `<rect x="${f1(-w / 2)}" y="${f1(-h / 2)}" width="${f1(w)}" height="${f1(h)}" fill="${board}" stroke="${ink}" stroke-width="${f1(Math.max(0.8, fs * 0.06))}"/>` +
    `<text x="0" y="${f1(fs * 0.36)}" font-family="DejaVu Serif" font-weight="bold" font-size="${f1(fs)}" text-anchor="middle" fill="${ink}" letter-spacing="${f1(fs * 0.04)}">${escapeXml(name)}</text></g>`
  );
}

export function drawSailingShip(c: DrawCtx, el: SailingShipElement): string {
  const k = (el.size * c.H) / 100;
  const ox = px(c, el.x);
  const oy = py(c, el.y);
  const f = new Frame(ox, oy, k, el.facing, el.heel);
  const haze = hazeAt(c, oy);
  const sw = lineWidth(c, k, 0.28);
  const thin = sw * 0.55;
  const lc = lineColour(c, haze);
  const out: string[] = [];
  const layout: Record<1 | 2 | 3, Array<[number, number]>> = {
    1: [[2, 68]],
    2: [
      [-17, 64],
      [16, 68],
    ],
    3: [
      [-28, 60],
      [0, 71],
      [26, 63],
    ],
  };
  const masts = layout[el.masts];
  const rig = el.masts === 1 ? 'fore-and-aft' : el.rig;
  const bowsprit: [number, number] = [72, -25];
  // rigging behind the sails
  let rigging = '';
  const foremost = masts[masts.length - 1] as [number, number];
  for (const [mx, h] of masts) {
    const top = -10 - h;
    rigging += f.line(mx, top, mx - 7, -11) + f.line(mx, top, mx + 7, -11) + f.line(mx, top * 0.98, mx - 12, -11.5);
  }
  rigging += f.line(foremost[0], -10 - foremost[1], bowsprit[0], bowsprit[1]);
  const aft = masts[0] as [number, number];
  rigging += f.line(aft[0], -10 - aft[1], -49, -12);
  for (let i = 1; i < masts.length; i++) {
    const a = masts[i - 1] as [number, number];
    const b = masts[i] as [number, number];
    rigging += f.line(a[0], -10 - a[1] * 0.97, b[0], -10 - b[1] * 0.72);
  }
  out.push(strokePath(rigging, lc, thin));
  // jibs
  const [fm, fh] = foremost;
  out.push(shape(c, f.d([['M', fm + 1, -10 - fh * 0.8], ['Q', fm + 22, -10 - fh * 0.45, bowsprit[0] - 2, bowsprit[1] + 1], ['L', fm + 15, -15], ['Z']]), 'sail', haze, thin));
  out.push(shape(c, f.d([['M', fm + 1, -10 - fh * 0.56], ['Q', fm + 16, -10 - fh * 0.3, 54, -18], ['L', fm + 11, -14], ['Z']]), 'sail', haze, thin));
  // sails
  let shading = '';
  for (const [mx, h] of masts) {
    if (rig === 'square') {
      const scale = el.masts === 3 ? 0.9 : 1;
      const sails: Array<[number, number, number]> = [
        [0.42, 0.1, 32 * scale],
        [0.7, 0.44, 26 * scale],
        [0.9, 0.72, 19 * scale],
      ];
      for (const [tf, bf, w] of sails) {
        const yt = -10 - h * tf;
        const yb = -10 - h * bf;
        const mid = (yt + yb) / 2;
        const bulge = w * 0.09;
        out.push(
          shape(
            c,
            f.d([
              ['M', mx - w / 2, yt],
              ['L', mx + w / 2, yt],
              ['Q', mx + w / 2 + bulge, mid, mx + w * 0.46 + bulge * 0.4, yb],
              ['Q', mx + bulge, yb - (yb - yt) * 0.16, mx - w * 0.46 + bulge * 0.4, yb],
              ['Q', mx - w / 2 + bulge, mid, mx - w / 2, yt],
              ['Z'],
            ]),
            'sail',
            haze,
            thin,
          ),
        );
        // yard
        out.push(strokePath(f.line(mx - w / 2 - 1.5, yt, mx + w / 2 + 1.5, yt), lc, sw * 1.1));
        shading += f.d([['M', mx + w * 0.3, yt + 1], ['Q', mx + w * 0.38 + bulge, mid, mx + w * 0.3, yb - 1]]) + ' ';
        shading += f.d([['M', mx + w * 0.38, yt + 1], ['Q', mx + w * 0.45 + bulge, mid, mx + w * 0.4, yb - 1]]) + ' ';
      }
    } else {
      const peakY = -10 - h * 0.97;
      out.push(
        shape(
          c,
          f.d([
            ['M', mx - 1, -13],
            ['L', mx - 1, -10 - h * 0.8],
            ['L', mx - 25, peakY],
            ['Q', mx - 23, -10 - h * 0.45, mx - 29, -13],
            ['Z'],
          ]),
          'sail',
          haze,
          thin,
        ),
      );
      out.push(shape(c, f.poly([[mx - 1, -10 - h * 0.83], [mx - 1, -10 - h], [mx - 17, -10 - h * 0.95]]), 'sail', haze, thin));
      out.push(strokePath(f.line(mx, -10 - h * 0.8, mx - 26, peakY) + f.line(mx, -13, mx - 30, -13.5), lc, sw * 0.9));
      shading += f.d([['M', mx - 6, -10 - h * 0.76], ['Q', mx - 10, -10 - h * 0.45, mx - 7, -15]]) + ' ';
    }
  }
  if (c.p.style === 'engraving') out.push(strokePath(shading, c.p.ink, thin * 0.8));
  // masts
  let mastPath = '';
  for (const [mx, h] of masts) mastPath += f.line(mx, -11, mx, -10 - h - 2) + ' ';
  out.push(strokePath(mastPath, lc, sw * 1.3));
  // pennant
  const main = masts.reduce((a, b) => (b[1] > a[1] ? b : a));
  out.push(shape(c, f.poly([[main[0], -12 - main[1]], [main[0] - 13, -13.8 - main[1]], [main[0], -15.5 - main[1]]]), 'flag', haze, thin));
  // bowsprit and hull
  out.push(strokePath(f.line(44, -12.5, bowsprit[0], bowsprit[1]), lc, sw * 1.4));
  out.push(
    shape(
      c,
      f.d([
        ['M', -50, -12],
        ['L', -45, -13],
        ['Q', 0, -9, 47, -14.5],
        ['C', 45, -6, 40, 1, 30, 4],
        ['L', -38, 4],
        ['C', -45, 3, -49, -3, -50, -12],
        ['Z'],
      ]),
      'hull',
      haze,
      sw,
    ),
  );
  out.push(shape(c, f.d([['M', -48, -9.8], ['Q', 0, -6.6, 45, -11.6], ['L', 44.5, -9], ['Q', 0, -3.8, -47.5, -7]]) + ' Z', 'band', haze, thin));
  if (el.masts === 3) {
    let ports = '';
    for (let x = -38; x <= 36; x += 8) {
      const yBand = -8.3 + (x / 45) * -1.2 + Math.abs(x) * 0.028;
      ports += f.poly([[x, yBand - 0.9], [x + 2.6, yBand - 0.9], [x + 2.6, yBand + 0.9], [x, yBand + 0.9]]) + ' ';
    }
    out.push(`<path d="${ports}" fill="${c.p.fill('window', haze)}"/>`);
  }
  out.push(waterline(c, f, -56, 56, 6));
  if (el.name) out.push(nameBoard(c, f, 4, -4.3, el.name, 5.2, el.heel));
  return out.join('');
}

export function drawSteamship(c: DrawCtx, el: SteamshipElement): string {
  const k = (el.size * c.H) / 100;
  const ox = px(c, el.x);
  const oy = py(c, el.y);
  const f = new Frame(ox, oy, k, el.facing, 0);
  const haze = hazeAt(c, oy);
  const sw = lineWidth(c, k, 0.26);
  const thin = sw * 0.55;
  const lc = lineColour(c, haze);
  const out: string[] = [];
  const funnels = el.funnels === 1 ? [-5] : [-15, 1];
  // smoke first, so it trails behind the masts
  const top = -36;
  const last = funnels[0] as number;
  const puffs: Array<[number, number, number]> = [];
  const n = Math.round(5 + el.smoke * 12);
  for (let i = 0; i < n; i++) {
    const cx = last - 3 - i * 4.6 * (1 + i * 0.07);
    const cy = top - 3 - i * 1.9 - Math.sin(i * 1.7) * 1.2;
    const r = 3 + i * 1.05;
    puffs.push([cx, cy, r]);
  }
  for (const fx of funnels.slice(1)) puffs.push([fx - 4, top - 4, 3.4], [fx - 9, top - 6, 4.2]);
  if (c.p.style === 'engraving') {
    const circles = (extra: string, fill: string) =>
      puffs.map(([x, y, r]) => `<circle cx="${f1(f.X(x, y))}" cy="${f1(f.Y(x, y))}" r="${f1(f.len(r))}" fill="${fill}" ${extra}/>`).join('');
    out.push(circles(`stroke="${c.p.ink}" stroke-width="${f1(thin * 2.2)}"`, c.p.paper));
    out.push(circles('stroke="none"', c.p.fill('smoke')));
  } else {
    const op = c.p.style === 'lithograph' ? 0.92 : 0.8;
    out.push(
      `<g filter="${c.p.style === 'photograph' ? `url(#${c.id('smokeblur')})` : 'none'}">` +
        puffs
          .map(
            ([x, y, r], i) =>
              `<circle cx="${f1(f.X(x, y))}" cy="${f1(f.Y(x, y))}" r="${f1(f.len(r))}" fill="${c.p.fill('smoke', haze)}" opacity="${f1(op - (i / n) * 0.35)}"/>`,
          )
          .join('') +
        '</g>',
    );
  }
  // masts and stays
  let rig = f.line(31, -12, 29, -44) + f.line(-36, -9.5, -38, -40) + f.line(29, -44, -38, -40) + f.line(29, -44, 52, -12) + f.line(-38, -40, -50, -9.5);
  rig += f.line(29, -36, 38, -12) + f.line(-38, -32, -30, -10);
  out.push(strokePath(rig, lc, thin));
  out.push(strokePath(f.line(31, -12, 29, -44) + f.line(-36, -9.5, -38, -40), lc, sw * 1.1));
  // funnels
  for (const fx of funnels) {
    out.push(shape(c, f.poly([[fx - 4.2, -17], [fx + 4.2, -17], [fx + 1.2, top], [fx - 7.2, top]]), 'funnel', haze, sw));
    out.push(shape(c, f.poly([[fx - 6.4, top + 4.5], [fx + 1.9, top + 4.5], [fx + 1.2, top], [fx - 7.2, top]]), 'funnelTop', haze, sw));
  }
  // superstructure
  out.push(shape(c, f.poly([[-25, -10.5], [18, -11.8], [18, -18], [-25, -18]]), 'house', haze, thin));
  out.push(shape(c, f.poly([[7, -18], [19, -18], [19, -23], [7, -23]]), 'house', haze, thin));
  out.push(strokePath(f.line(5, -23.5, 21, -23.5), lc, sw));
  let windows = '';
  for (let x = -22; x < 16; x += 4.2) windows += f.poly([[x, -16.2], [x + 1.8, -16.2], [x + 1.8, -13.6], [x, -13.6]]) + ' ';
  for (let x = 9; x < 18; x += 3.2) windows += f.poly([[x, -22], [x + 1.6, -22], [x + 1.6, -20], [x, -20]]) + ' ';
  out.push(`<path d="${windows}" fill="${c.p.fill('window', haze)}"/>`);
  out.push(shape(c, f.d([['M', -23, -18.2], ['Q', -19, -16.8, -15, -18.2], ['Z']]), 'band', haze, thin));
  // hull
  out.push(
    shape(
      c,
      f.d([
        ['M', -50, -9.5],
        ['L', 52, -12.5],
        ['L', 47, 4],
        ['L', -40, 4],
        ['C', -47, 3, -51, -2, -50, -9.5],
        ['Z'],
      ]),
      'hull',
      haze,
      sw,
    ),
  );
  out.push(shape(c, f.poly([[-49.5, -9.3], [51.6, -12.3], [51.2, -10.6], [-49.3, -7.6]]), 'band', haze, thin));
  let ports = '';
  for (let x = -34; x < 40; x += 6) {
    const y = -5.6 - ((x + 50) / 100) * 3;
    ports += `<circle cx="${f1(f.X(x, y))}" cy="${f1(f.Y(x, y))}" r="${f1(f.len(0.9))}"/>`;
  }
  out.push(`<g fill="${c.p.style === 'engraving' ? c.p.paper : c.p.fill('band', haze)}">${ports}</g>`);
  if (el.paddle) {
    out.push(shape(c, f.d([['M', -10, -8], ['A', 12, 12, 0, 1, 14, -8], ['Z']]), 'house', haze, sw));
    let spokes = '';
    for (let a = 15; a < 180; a += 22) {
      const r = (a * Math.PI) / 180;
      spokes += f.line(2, -8, 2 - Math.cos(r) * 12, -8 - Math.sin(r) * 12) + ' ';
    }
    out.push(strokePath(spokes, lc, thin));
  }
  out.push(waterline(c, f, -57, 57, 6));
  if (el.name) {
    const fs = 4.6;
    const wUnits = textWidthEm(el.name, true) * fs + fs;
    const cx = Math.max(-10, 44 - wUnits / 2);
    out.push(nameBoard(c, f, cx, -5.6, el.name, fs, 0));
  }
  return out.join('');
}

export function drawRowingBoat(c: DrawCtx, el: RowingBoatElement): string {
  const k = (el.size * c.H) / 100;
  const f = new Frame(px(c, el.x), py(c, el.y), k, el.facing, 0);
  const haze = hazeAt(c, f.oy);
  const sw = lineWidth(c, k, 0.5);
  const lc = lineColour(c, haze);
  const out: string[] = [];
  const seats = el.rowers === 1 ? [-2] : [-20, 12];
  const limb = c.p.style === 'engraving' ? c.p.ink : c.p.fill('figure', haze);
  for (const rx of seats) {
    // oar, far side first
    out.push(strokePath(f.line(rx + 9, -27, rx - 28, 8), lc, sw * 1.3));
    // rower, leaning back
    out.push(shape(c, f.poly([[rx - 4, -12], [rx + 5, -12], [rx - 1, -37], [rx - 10, -36]]), 'shirt', haze, sw * 0.6));
    out.push(strokePath(f.line(rx - 5, -34, rx + 9, -27), limb, f.len(3.6)));
    out.push(`<circle cx="${f1(f.X(rx - 7, -42))}" cy="${f1(f.Y(rx - 7, -42))}" r="${f1(f.len(5.2))}" fill="${c.p.fill('figure', haze)}"/>`);
    out.push(shape(c, f.d([['M', rx - 12.5, -44], ['Q', rx - 7, -51, rx - 1.5, -44.5], ['L', rx + 2.5, -44], ['Z']]), 'figure', haze, sw * 0.4));
  }
  out.push(
    shape(
      c,
      f.d([
        ['M', -50, -17],
        ['Q', 0, -9, 50, -20],
        ['L', 47, -14],
        ['Q', 32, 2, 0, 2],
        ['Q', -36, 2, -48, -11],
        ['Z'],
      ]),
      'hull',
      haze,
      sw,
    ),
  );
  out.push(strokePath(f.d([['M', -47, -14.5], ['Q', 0, -7, 47, -17]]), c.p.style === 'engraving' ? c.p.paper : c.p.fill('band', haze), sw * 1.1));
  // near oars
  for (const rx of seats) {
    out.push(strokePath(f.line(rx + 9, -27, rx - 30, 9), lc, sw * 1.5));
    out.push(shape(c, f.poly([[rx - 26, 5], [rx - 34, 10], [rx - 32, 13], [rx - 24, 8]]), 'timber', haze, sw * 0.5));
  }
  out.push(waterline(c, f, -55, 55, 6));
  return out.join('');
}

export function drawLighthouse(c: DrawCtx, el: LighthouseElement): string {
  const k = (el.size * c.H) / 100;
  const f = new Frame(px(c, el.x), py(c, el.y), k, 1, 0);
  const haze = hazeAt(c, f.oy) * 0.5;
  const sw = lineWidth(c, k, 0.3);
  const thin = sw * 0.6;
  const lc = lineColour(c, haze);
  const out: string[] = [];
  const lampY = -82;
  if (el.beams) {
    const reach = (c.W * 0.9) / k;
    for (const dir of [-1, 1]) {
      const spread = reach * (dir === 1 ? 0.1 : 0.13);
      const poly = f.poly([
        [dir * 5, lampY - 2.5],
        [dir * reach, lampY - spread],
        [dir * reach, lampY + spread * 0.8],
        [dir * 5, lampY + 2.5],
      ]);
      if (c.p.style === 'engraving') {
        out.push(`<path d="${poly}" fill="${c.p.paper}" opacity="0.92"/>`);
        let rays = '';
        for (let i = 0; i < 5; i++) {
          const t = -spread + ((i + 0.5) / 5) * spread * 1.8;
          rays += f.line(dir * 12, lampY + t * 0.08, dir * reach, lampY + t) + ' ';
        }
        out.push(strokePath(rays, c.p.ink, thin * 0.5, 'stroke-dasharray="6 5" opacity="0.7"'));
        out.push(strokePath(f.line(dir * 5, lampY - 2.5, dir * reach, lampY - spread) + f.line(dir * 5, lampY + 2.5, dir * reach, lampY + spread * 0.8), c.p.ink, thin * 0.6));
      } else {
        const g = c.id(`beam${dir}`);
        const xA = f.X(0, lampY);
        const xB = f.X(dir * reach, lampY);
        const col = c.p.fill('beam', 0);
        c.defs.push(
          `<linearGradient id="${g}" gradientUnits="userSpaceOnUse" x1="${f1(xA)}" y1="0" x2="${f1(xB)}" y2="0"><stop offset="0" stop-color="${col}" stop-opacity="${c.p.style === 'lithograph' ? 0.95 : 0.75}"/><stop offset="1" stop-color="${col}" stop-opacity="0.05"/></linearGradient>`,
        );
        out.push(`<path d="${poly}" fill="url(#${g})"/>`);
      }
    }
  }
  if (el.cottage) {
    out.push(shape(c, f.poly([[11, 0], [34, 0], [34, -15], [11, -15]]), 'house', haze, thin));
    out.push(shape(c, f.poly([[9, -15], [22.5, -24], [36, -15]]), 'roof', haze, thin));
    out.push(shape(c, f.poly([[27, -20], [27, -26], [30, -26], [30, -18]]), 'stone', haze, thin));
    out.push(`<path d="${f.poly([[15, -10], [19, -10], [19, -5], [15, -5]])} ${f.poly([[25, -10], [29, -10], [29, -5], [25, -5]])}" fill="${c.p.fill('window', haze)}"/>`);
  }
  const half = (y: number) => 12 - 4.5 * (-y / 70);
  out.push(shape(c, f.poly([[-half(0), 0], [-half(-70), -70], [half(-70), -70], [half(0), 0]]), 'tower', haze, sw));
  if (el.bands) {
    for (const [a, b] of [
      [-10, -21],
      [-33, -44],
      [-56, -67],
    ] as Array<[number, number]>) {
      out.push(shape(c, f.poly([[-half(a), a], [-half(b), b], [half(b), b], [half(a), a]]), 'towerBand', haze, thin));
    }
  } else if (c.p.style === 'engraving') {
    // shade the left side of the round tower
    out.push(`<path d="${f.poly([[-half(0), 0], [-half(-70), -70], [-half(-70) + 4, -70], [-half(0) + 5, 0]])}" fill="${c.p.fill('towerBand')}"/>`);
  }
  let windows = f.d([['M', -3, 0], ['L', -3, -7], ['A', 3, 3, 0, 1, 3, -7], ['L', 3, 0], ['Z']]) + ' ';
  for (const y of [-27, -48, -62]) windows += f.poly([[-1.3, y], [1.3, y], [1.3, y + 4], [-1.3, y + 4]]) + ' ';
  out.push(`<path d="${windows}" fill="${c.p.fill('window', haze)}"/>`);
  // gallery, lantern, dome
  out.push(shape(c, f.poly([[-11.5, -70], [11.5, -70], [11.5, -73.5], [-11.5, -73.5]]), 'iron', haze, thin));
  let rail = f.line(-11, -78, 11, -78);
  for (let x = -11; x <= 11.01; x += 2.75) rail += f.line(x, -73.5, x, -78);
  out.push(strokePath(rail, lc, thin));
  if (c.p.style !== 'engraving') {
    const glow = c.id('glow');
    c.defs.push(
      `<radialGradient id="${glow}"><stop offset="0" stop-color="${c.p.fill('beam')}" stop-opacity="0.95"/><stop offset="1" stop-color="${c.p.fill('beam')}" stop-opacity="0"/></radialGradient>`,
    );
    if (el.beams) out.push(`<circle cx="${f1(f.X(0, lampY))}" cy="${f1(f.Y(0, lampY))}" r="${f1(f.len(14))}" fill="url(#${glow})"/>`);
  }
  out.push(shape(c, f.poly([[-6.8, -73.5], [6.8, -73.5], [6.8, -87], [-6.8, -87]]), 'lamp', haze, thin));
  out.push(strokePath(f.line(-2.3, -74, -2.3, -86.5) + f.line(2.3, -74, 2.3, -86.5) + f.line(-6.8, -80, 6.8, -80), lc, thin * 0.8));
  out.push(shape(c, f.d([['M', -8, -87], ['A', 8, 8, 0, 1, 8, -87], ['Z']]), 'iron', haze, thin));
  out.push(strokePath(f.line(0, -95, 0, -100), lc, thin));
  out.push(`<circle cx="${f1(f.X(0, -100.5))}" cy="${f1(f.Y(0, -100.5))}" r="${f1(f.len(1.4))}" fill="${lc}"/>`);
  return out.join('');
}

export function drawPier(c: DrawCtx, el: PierElement): string {
  const out: string[] = [];
  const dir = el.from === 'left' ? 1 : -1;
  const xEdge = el.from === 'left' ? c.x0 - c.W * 0.02 : c.x0 + c.W * 1.02;
  const xEnd = el.from === 'left' ? c.x0 + el.reach * c.W : c.x0 + c.W - el.reach * c.W;
  const at = (t: number) => {
    const x = xEdge + (xEnd - xEdge) * t;
    const water = py(c, el.yNear + (el.yFar - el.yNear) * t);
    const h = (el.heightNear + (el.heightFar - el.heightNear) * t) * c.H;
    return { x, water, deck: water - h, h };
  };
  const near = at(0);
  const far = at(1);
  const haze = hazeAt(c, (near.water + far.water) / 2);
  const lc = lineColour(c, haze);
  const sw = Math.max(c.p.lw * 0.6, near.h * 0.02);
  const thick = (t: number) => at(t).h * 0.16;
  const deckPoly = `M${f1(near.x)},${f1(near.deck)} L${f1(far.x)},${f1(far.deck)} L${f1(far.x)},${f1(far.deck + thick(1))} L${f1(near.x)},${f1(near.deck + thick(0))} Z`;
  if (el.build === 'timber') {
    const n = Math.max(7, Math.round(el.reach * 16));
    let braces = '';
    const piles: string[] = [];
    for (let i = 0; i <= n; i++) {
      const t = i / n;
      const a = at(t);
      const w = Math.max(1.5, a.h * 0.075);
      piles.push(`M${f1(a.x - w / 2)},${f1(a.deck)} L${f1(a.x + w / 2)},${f1(a.deck)} L${f1(a.x + w / 2)},${f1(a.water + a.h * 0.05)} L${f1(a.x - w / 2)},${f1(a.water + a.h * 0.05)} Z`);
      if (i < n) {
        const b = at((i + 1) / n);
        const top = (y: number, h: number) => y + h * 0.22;
        braces += `M${f1(a.x)},${f1(top(a.deck, a.h))} L${f1(b.x)},${f1(b.water - b.h * 0.08)} M${f1(b.x)},${f1(top(b.deck, b.h))} L${f1(a.x)},${f1(a.water - a.h * 0.08)} `;
        braces += `M${f1(a.x)},${f1(a.deck + a.h * 0.55)} L${f1(b.x)},${f1(b.deck + b.h * 0.55)} `;
      }
    }
    out.push(strokePath(braces, lc, sw * 0.8));
    out.push(`<path d="${piles.join(' ')}" fill="${c.p.fill('timber', haze)}" stroke="${c.p.style === 'engraving' ? c.p.ink : 'none'}" stroke-width="${f1(sw * 0.5)}"/>`);
  } else {
    const wall = `M${f1(near.x)},${f1(near.deck)} L${f1(far.x)},${f1(far.deck)} L${f1(far.x + dir * far.h * 0.5)},${f1(far.water)} L${f1(near.x)},${f1(near.water + near.h * 0.05)} Z`;
    out.push(shape(c, wall, 'stone', haze, sw));
    let joints = '';
    for (let r = 1; r < 5; r++) {
      const fr = r / 5;
      const y0 = near.deck + (near.water - near.deck) * fr;
      const y1 = far.deck + (far.water - far.deck) * fr;
      joints += `M${f1(near.x)},${f1(y0)} L${f1(far.x + dir * far.h * 0.5 * fr)},${f1(y1)} `;
      const cols = Math.round(el.reach * 18);
      for (let j = 0; j < cols; j++) {
        const t = (j + (r % 2) * 0.5) / cols;
        const a = at(t);
        const ya = a.deck + (a.water - a.deck) * fr;
        const yb = a.deck + (a.water - a.deck) * (fr - 0.2);
        joints += `M${f1(a.x)},${f1(ya)} L${f1(a.x)},${f1(yb)} `;
      }
    }
    out.push(strokePath(joints, lc, sw * 0.5, 'opacity="0.8"'));
  }
  out.push(shape(c, deckPoly, 'timber', haze, sw * 0.6));
  // railing
  let rail = '';
  const posts = Math.max(8, Math.round(el.reach * 30));
  for (let i = 0; i <= posts; i++) {
    const a = at(i / posts);
    rail += `M${f1(a.x)},${f1(a.deck)} L${f1(a.x)},${f1(a.deck - a.h * 0.3)} `;
  }
  rail += `M${f1(near.x)},${f1(near.deck - near.h * 0.3)} L${f1(far.x)},${f1(far.deck - far.h * 0.3)} `;
  rail += `M${f1(near.x)},${f1(near.deck - near.h * 0.15)} L${f1(far.x)},${f1(far.deck - far.h * 0.15)} `;
  out.push(strokePath(rail, lc, sw * 0.55));
  if (el.lamps) {
    let lamps = '';
    const heads: string[] = [];
    for (let i = 1; i < 4; i++) {
      const a = at(i / 4);
      const top = a.deck - a.h * 0.9;
      lamps += `M${f1(a.x)},${f1(a.deck)} L${f1(a.x)},${f1(top)} `;
      const r = a.h * 0.07;
      heads.push(`<rect x="${f1(a.x - r)}" y="${f1(top - r * 2)}" width="${f1(r * 2)}" height="${f1(r * 2)}" fill="${c.p.fill('lamp', haze)}" stroke="${lc}" stroke-width="${f1(sw * 0.5)}"/>`);
    }
    out.push(strokePath(lamps, lc, sw * 0.8) + heads.join(''));
  }
  // shelter on the pier head
  const sh = far.h * 0.7;
  const sx = far.x - dir * far.h * 0.9;
  const sx2 = far.x - dir * far.h * 0.1;
  const left = Math.min(sx, sx2);
  const right = Math.max(sx, sx2);
  out.push(shape(c, `M${f1(left)},${f1(far.deck)} L${f1(left)},${f1(far.deck - sh)} L${f1(right)},${f1(far.deck - sh)} L${f1(right)},${f1(far.deck)} Z`, 'house', haze, sw * 0.6));
  out.push(shape(c, `M${f1(left - sh * 0.15)},${f1(far.deck - sh)} L${f1((left + right) / 2)},${f1(far.deck - sh * 1.55)} L${f1(right + sh * 0.15)},${f1(far.deck - sh)} Z`, 'roof', haze, sw * 0.6));
  out.push(strokePath(`M${f1((left + right) / 2)},${f1(far.deck - sh * 1.55)} L${f1((left + right) / 2)},${f1(far.deck - sh * 2.1)}`, lc, sw * 0.6));
  out.push(shape(c, `M${f1((left + right) / 2)},${f1(far.deck - sh * 2.1)} l${f1(-dir * sh * 0.35)},${f1(sh * 0.1)} l${f1(dir * sh * 0.35)},${f1(sh * 0.1)} Z`, 'flag', haze, sw * 0.3));
  return out.join('');
}

export function drawCrane(c: DrawCtx, el: CraneElement): string {
  const k = (el.size * c.H) / 100;
  const f = new Frame(px(c, el.x), py(c, el.y), k, el.facing, 0);
  const haze = hazeAt(c, f.oy);
  const sw = lineWidth(c, k, 0.3);
  const lc = lineColour(c, haze);
  const out: string[] = [];
  const tip: [number, number] = [58, -97];
  // tie and hoist rope
  out.push(strokePath(f.line(-3, -52, tip[0], tip[1]) + f.line(-8, -30, -3, -52) + f.line(8, -30, -3, -52), lc, sw * 0.9));
  out.push(strokePath(f.line(tip[0], tip[1], tip[0], -47), lc, sw * 0.6));
  // lattice jib
  const lower = (t: number): [number, number] => [6 + (tip[0] - 6) * t, -22 + (tip[1] + 22) * t];
  const upper = (t: number): [number, number] => [-1 + (tip[0] + 1) * t, -30 + (tip[1] + 30) * t];
  let jib = f.line(...lower(0), ...lower(1)) + f.line(...upper(0), ...upper(1));
  for (let i = 0; i < 9; i++) {
    const a = lower(i / 9);
    const b = upper((i + 0.5) / 9);
    const d = lower((i + 1) / 9);
    jib += f.line(a[0], a[1], b[0], b[1]) + f.line(b[0], b[1], d[0], d[1]);
  }
  out.push(strokePath(f.line(...lower(0), ...lower(1)) + f.line(...upper(0), ...upper(1)), lc, Math.max(sw * 1.6, k * 0.9)));
  out.push(strokePath(jib, lc, sw));
  out.push(`<circle cx="${f1(f.X(tip[0], tip[1]))}" cy="${f1(f.Y(tip[0], tip[1]))}" r="${f1(f.len(1.8))}" fill="${lc}"/>`);
  // hook and load
  out.push(strokePath(f.d([['M', tip[0], -47], ['Q', tip[0] + 2.5, -44, tip[0], -43], ['Q', tip[0] - 2, -43, tip[0] - 2, -45]]), lc, sw * 0.8));
  const lx = tip[0];
  if (el.load === 'crate') {
    out.push(strokePath(f.line(lx, -45, lx - 7, -37) + f.line(lx, -45, lx + 7, -37), lc, sw * 0.5));
    out.push(shape(c, f.poly([[lx - 8, -37], [lx + 8, -37], [lx + 8, -24], [lx - 8, -24]]), 'cargo', haze, sw * 0.7));
    out.push(strokePath(f.line(lx - 8, -37, lx + 8, -24) + f.line(lx + 8, -37, lx - 8, -24), lc, sw * 0.45));
  } else if (el.load === 'barrel') {
    out.push(strokePath(f.line(lx, -45, lx, -39), lc, sw * 0.5));
    out.push(shape(c, f.d([['M', lx - 6, -39], ['C', lx - 9, -34, lx - 9, -28, lx - 6, -23], ['L', lx + 6, -23], ['C', lx + 9, -28, lx + 9, -34, lx + 6, -39], ['Z']]), 'cargo', haze, sw * 0.7));
    out.push(strokePath(f.line(lx - 7.4, -35, lx + 7.4, -35) + f.line(lx - 7.4, -27, lx + 7.4, -27), lc, sw * 0.5));
  } else {
    out.push(strokePath(f.line(lx, -45, lx - 9, -34) + f.line(lx, -45, lx + 9, -34), lc, sw * 0.5));
    out.push(shape(c, f.d([['M', lx - 11, -34], ['Q', lx, -40, lx + 11, -34], ['Q', lx + 13, -24, lx, -22], ['Q', lx - 13, -24, lx - 11, -34], ['Z']]), 'cargo', haze, sw * 0.7));
  }
  // cab and plinth
  out.push(shape(c, f.poly([[-14, 0], [14, 0], [12, -8], [-12, -8]]), 'stone', haze, sw * 0.8));
  out.push(shape(c, f.poly([[-10, -8], [10, -8], [10, -29], [-10, -29]]), 'timber', haze, sw * 0.8));
  out.push(shape(c, f.poly([[-12.5, -29], [0, -36], [12.5, -29]]), 'roof', haze, sw * 0.8));
  out.push(`<path d="${f.poly([[3, -24], [7, -24], [7, -18], [3, -18]])}" fill="${c.p.style === 'engraving' ? c.p.paper : c.p.fill('lamp', haze)}"/>`);
  out.push(shape(c, f.poly([[-13, -12], [-7, -12], [-7, -21], [-13, -21]]), 'iron', haze, sw * 0.5));
  return out.join('');
}

type Joint = [number, number];
interface Pose {
  head: Joint;
  neck: Joint;
  hip: Joint;
  knees: [Joint, Joint];
  feet: [Joint, Joint];
  elbows: [Joint, Joint];
  hands: [Joint, Joint];
}

const POSES: Record<WorkerElement['pose'], Pose> = {
  carry: { head: [3, -90], neck: [1, -80], hip: [0, -48], knees: [[-3, -24], [6, -25]], feet: [[-7, 0], [10, 0]], elbows: [[10, -86], [-4, -64]], hands: [[4, -96], [-3, -52]] },
  haul: { head: [-16, -86], neck: [-12, -77], hip: [-1, -46], knees: [[8, -24], [-6, -22]], feet: [[16, 0], [-10, 0]], elbows: [[0, -66], [-2, -62]], hands: [[14, -62], [12, -58]] },
  roll: { head: [25, -72], neck: [16, -68], hip: [-6, -46], knees: [[-10, -24], [2, -24]], feet: [[-15, 0], [4, 0]], elbows: [[22, -52], [18, -50]], hands: [[26, -40], [23, -38]] },
  push: { head: [12, -87], neck: [8, -78], hip: [-4, -46], knees: [[-9, -22], [4, -24]], feet: [[-16, 0], [7, 0]], elbows: [[14, -60], [12, -58]], hands: [[22, -50], [20, -48]] },
  mend: { head: [3, -75], neck: [2, -66], hip: [-2, -32], knees: [[16, -33], [15, -31]], feet: [[18, 0], [14, 0]], elbows: [[12, -52], [10, -50]], hands: [[22, -46], [20, -44]] },
};

export function drawWorker(c: DrawCtx, el: WorkerElement): string {
  const k = (el.size * c.H) / 100;
  const f = new Frame(px(c, el.x), py(c, el.y), k, el.facing, 0);
  const haze = hazeAt(c, f.oy);
  const sw = lineWidth(c, k, 0.35);
  const lc = lineColour(c, haze);
  const limb = c.p.style === 'engraving' ? c.p.ink : c.p.fill('figure', haze);
  const pose = POSES[el.pose];
  const out: string[] = [];
  if (el.pose === 'mend') {
    out.push(shape(c, f.poly([[-14, 0], [10, 0], [10, -30], [-14, -30]]), 'cargo', haze, sw * 0.6));
  }
  if (el.pose === 'haul') out.push(strokePath(f.line(13, -60, 80, -105), lc, sw * 0.9));
  const seg = (a: Joint, b: Joint, d: Joint) => f.d([['M', a[0], a[1]], ['L', b[0], b[1]], ['L', d[0], d[1]]]);
  // far limbs
  out.push(strokePath(seg(pose.hip, pose.knees[1], pose.feet[1]), limb, f.len(9)));
  out.push(strokePath(seg(pose.neck, pose.elbows[1], pose.hands[1]), limb, f.len(6.5)));
  // torso
  const [nx, ny] = pose.neck;
  const [hx, hy] = pose.hip;
  const ax = hx - nx;
  const ay = hy - ny;
  const len = Math.hypot(ax, ay);
  const ux = -ay / len;
  const uy = ax / len;
  out.push(
    shape(
      c,
      f.poly([
        [nx + ux * 10, ny + uy * 10],
        [nx - ux * 10, ny - uy * 10],
        [hx - ux * 10, hy - uy * 10],
        [hx + ux * 10, hy + uy * 10],
      ]),
      'shirt',
      haze,
      sw * 0.6,
    ),
  );
  // near limbs
  out.push(strokePath(seg(pose.hip, pose.knees[0], pose.feet[0]), limb, f.len(9.5)));
  out.push(strokePath(seg(pose.neck, pose.elbows[0], pose.hands[0]), limb, f.len(7)));
  // boots
  for (const [fx, fy] of pose.feet) out.push(`<ellipse cx="${f1(f.X(fx + 3, fy - 2))}" cy="${f1(f.Y(fx + 3, fy - 2))}" rx="${f1(f.len(7))}" ry="${f1(f.len(3))}" fill="${limb}"/>`);
  // head and cap
  const [qx, qy] = pose.head;
  out.push(`<circle cx="${f1(f.X(qx, qy))}" cy="${f1(f.Y(qx, qy))}" r="${f1(f.len(7.5))}" fill="${c.p.style === 'engraving' ? c.p.fill('shirt') : c.p.fill('figure', haze)}" stroke="${limb}" stroke-width="${f1(sw * 0.6)}"/>`);
  out.push(shape(c, f.d([['M', qx - 8, qy - 2], ['Q', qx - 2, qy - 13, qx + 7, qy - 3], ['L', qx + 12, qy - 2], ['Z']]), 'figure', haze, sw * 0.4));
  if (el.pose === 'carry') {
    out.push(shape(c, f.d([['M', -16, -84], ['Q', -12, -100, 6, -98], ['Q', 14, -96, 10, -86], ['Q', -2, -78, -16, -84], ['Z']]), 'cargo', haze, sw * 0.7));
  } else if (el.pose === 'roll') {
    out.push(shape(c, f.d([['M', 22, -38], ['C', 20, -26, 20, -12, 22, 0], ['L', 50, 0], ['C', 53, -12, 53, -26, 50, -38], ['Z']]), 'cargo', haze, sw * 0.8));
    out.push(strokePath(f.line(21, -30, 52, -30) + f.line(21, -8, 52, -8), lc, sw * 0.6));
  } else if (el.pose === 'push') {
    out.push(strokePath(f.line(20, -49, 40, -32) + f.line(40, -26, 40, 0), lc, sw * 1.1));
    out.push(shape(c, f.d([['M', 34, -40], ['L', 70, -40], ['Q', 72, -26, 60, -22], ['L', 40, -22], ['Z']]), 'timber', haze, sw * 0.7));
    out.push(shape(c, f.d([['M', 38, -40], ['Q', 46, -54, 56, -44], ['Q', 64, -54, 68, -40], ['Z']]), 'cargo', haze, sw * 0.6));
    out.push(`<circle cx="${f1(f.X(62, -10))}" cy="${f1(f.Y(62, -10))}" r="${f1(f.len(10))}" fill="${c.p.fill('iron', haze)}"/>`);
    out.push(`<circle cx="${f1(f.X(62, -10))}" cy="${f1(f.Y(62, -10))}" r="${f1(f.len(4))}" fill="${c.p.style === 'engraving' ? c.p.paper : c.p.fill('cargo', haze)}"/>`);
  } else if (el.pose === 'mend') {
    out.push(shape(c, f.d([['M', 12, -46], ['Q', 30, -50, 44, -38], ['L', 52, 0], ['L', 16, 0], ['Q', 22, -24, 12, -46], ['Z']]), 'net', haze, sw * 0.6));
    if (c.p.style !== 'engraving') {
      let mesh = '';
      for (let i = 0; i < 6; i++) mesh += f.line(14 + i * 6, -44 + i, 18 + i * 6, 0) + f.line(14, -40 + i * 7, 48, -34 + i * 6.5);
      out.push(strokePath(mesh, lc, sw * 0.3, 'opacity="0.6"'));
    }
  }
  return out.join('');
}

export function drawCargo(c: DrawCtx, el: CargoElement): string {
  const k = (el.size * c.H) / 100;
  const f = new Frame(px(c, el.x), py(c, el.y), k, 1, 0);
  const haze = hazeAt(c, f.oy);
  const sw = lineWidth(c, k, 0.6);
  const lc = lineColour(c, haze);
  if (el.type === 'barrel') {
    return (
      shape(c, f.d([['M', -30, 0], ['C', -38, -30, -38, -70, -30, -100], ['L', 30, -100], ['C', 38, -70, 38, -30, 30, 0], ['Z']]), 'cargo', haze, sw) +
      strokePath(f.d([['M', -34, -22], ['Q', 0, -16, 34, -22], ['M', -34, -78], ['Q', 0, -72, 34, -78]]), lc, sw * 1.4) +
      shape(c, f.d([['M', -30, -100], ['Q', 0, -108, 30, -100], ['Q', 0, -93, -30, -100], ['Z']]), 'timber', haze, sw * 0.6)
    );
  }
  if (el.type === 'crate') {
    return (
      shape(c, f.poly([[-50, 0], [50, 0], [50, -80], [-50, -80]]), 'cargo', haze, sw) +
      strokePath(f.line(-50, -80, 50, 0) + f.line(-50, 0, 50, -80) + f.line(-50, -40, 50, -40), lc, sw * 0.8) +
      shape(c, f.poly([[-50, -80], [-38, -92], [62, -92], [50, -80]]), 'paving', haze, sw * 0.6)
    );
  }
  const sack = (x: number, y: number, w: number) =>
    shape(c, f.d([['M', x - w, y], ['Q', x - w * 1.1, y - w * 0.9, x - w * 0.3, y - w * 1.1], ['Q', x, y - w * 1.35, x + w * 0.3, y - w * 1.1], ['Q', x + w * 1.1, y - w * 0.9, x + w, y], ['Z']]), 'cargo', haze, sw);
  return sack(-30, 0, 32) + sack(32, 0, 30) + sack(0, -34, 30);
}

export function drawGull(c: DrawCtx, el: GullElement): string {
  const k = (el.size * c.H) / 100;
  const f = new Frame(px(c, el.x), py(c, el.y), k, 1, 0);
  const lift = el.flap * 16;
  const dark = c.weather === 'storm';
  const col = c.p.style === 'engraving' ? (dark ? c.p.paper : c.p.ink) : c.p.style === 'lithograph' ? (dark ? c.p.paper : c.p.ink) : c.p.tone(dark ? 0.96 : 0.15);
  const body = f.d([['M', -10, 2], ['Q', 0, -4, 12, 1], ['Q', 0, 6, -10, 2], ['Z']]);
  return (
    strokePath(f.d([['M', -50, 10 - lift], ['Q', -26, -14 - lift * 0.6, 0, 1], ['Q', 26, -14 - lift * 0.6, 50, 10 - lift]]), col, Math.max(1.3, f.len(5))) +
    `<path d="${body}" fill="${col}"/>`
  );
}

export function drawHeadland(c: DrawCtx, el: HeadlandElement): string {
  const w = el.width * c.W;
  const h = el.height * c.H;
  const side = el.side === 'left' ? 1 : -1;
  const x0 = el.side === 'left' ? c.x0 - 2 : c.x0 + c.W + 2;
  const X = (t: number) => x0 + side * t * w;
  const base = c.horizon + c.H * 0.012;
  const top = c.horizon - h;
  const rng = c.rng;
  const pts: Array<[number, number]> = [];
  pts.push([X(0), base + c.H * 0.02]);
  pts.push([X(0), top + h * range(rng, 0, 0.1)]);
  const steps = 9;
  for (let i = 1; i <= steps; i++) {
    const t = (i / steps) * 0.72;
    pts.push([X(t), top + h * (0.05 + t * 0.2 + range(rng, -0.04, 0.04))]);
  }
  pts.push([X(0.8), top + h * 0.35]);
  pts.push([X(0.86), top + h * 0.62]);
  pts.push([X(0.94), top + h * 0.85]);
  pts.push([X(1), base]);
  const d = pts.map(([x, y], i) => `${i === 0 ? 'M' : 'L'}${f1(x)},${f1(y)}`).join(' ') + ' Z';
  const haze = c.p.style === 'photograph' ? 0.35 : 0;
  const out: string[] = [shape(c, d, 'land', haze, c.p.lw * 0.8)];
  // cliff face
  const cliff = `M${f1(X(0.72))},${f1(top + h * 0.22)} L${f1(X(0.8))},${f1(top + h * 0.35)} L${f1(X(0.86))},${f1(top + h * 0.62)} L${f1(X(0.94))},${f1(top + h * 0.85)} L${f1(X(1))},${f1(base)} L${f1(X(0.7))},${f1(base)} Z`;
  out.push(shape(c, cliff, 'rock', haze, c.p.lw * 0.6));
  let strata = '';
  for (let i = 1; i < 6; i++) {
    const y = top + h * (0.25 + i * 0.13);
    strata += `M${f1(X(0.7))},${f1(y)} L${f1(X(0.78 + i * 0.035))},${f1(y + h * 0.03)} `;
  }
  out.push(strokePath(strata, lineColour(c, haze), c.p.lw * 0.5, 'opacity="0.7"'));
  if (c.p.style !== 'lithograph') {
    let grass = '';
    for (let i = 0; i < 26; i++) {
      const t = range(rng, 0.02, 0.7);
      const y = top + h * (0.07 + t * 0.2) + range(rng, 0, h * 0.25);
      grass += `M${f1(X(t))},${f1(y)} l${f1(c.H * 0.006)},${f1(-c.H * 0.012)} `;
    }
    out.push(strokePath(grass, lineColour(c, haze), c.p.lw * 0.5));
  }
  out.push(strokePath(`M${f1(X(0.66))},${f1(base)} L${f1(X(1.04))},${f1(base)}`, c.p.style === 'engraving' ? c.p.ink : c.p.fill('foam', 0), c.p.lw, 'stroke-dasharray="7 4"'));
  return out.join('');
}

export function drawRock(c: DrawCtx, el: RockElement): string {
  const w = el.size * c.H;
  const cx = px(c, el.x);
  const cy = py(c, el.y);
  const pts: string[] = [];
  const n = 12;
  for (let i = 0; i <= n; i++) {
    const a = Math.PI + (i / n) * Math.PI;
    const r = 0.5 + range(c.rng, -0.06, 0.06);
    pts.push(`${i === 0 ? 'M' : 'L'}${f1(cx + Math.cos(a) * w * r)},${f1(cy + Math.sin(a) * w * 0.34 * (r + 0.2))}`);
  }
  const d = pts.join(' ') + ` L${f1(cx + w * 0.5)},${f1(cy + w * 0.05)} L${f1(cx - w * 0.5)},${f1(cy + w * 0.05)} Z`;
  const haze = hazeAt(c, cy) * 0.5;
  const foam = c.p.style === 'engraving' ? c.p.ink : c.p.fill('foam', 0);
  return (
    shape(c, d, 'rock', haze, c.p.lw * 0.8) +
    strokePath(`M${f1(cx - w * 0.62)},${f1(cy + w * 0.04)} Q${f1(cx)},${f1(cy - w * 0.03)} ${f1(cx + w * 0.62)},${f1(cy + w * 0.04)}`, foam, c.p.lw * 1.2, 'stroke-dasharray="5 4"')
  );
}

export function drawQuay(c: DrawCtx, el: QuayElement): string {
  const top = py(c, el.top);
  const bottom = c.y0 + c.H;
  const left = c.x0 - 2;
  const right = c.x0 + c.W + 2;
  const band = (bottom - top) * 0.12;
  const out: string[] = [];
  out.push(shape(c, `M${f1(left)},${f1(top)} L${f1(right)},${f1(top)} L${f1(right)},${f1(bottom + 2)} L${f1(left)},${f1(bottom + 2)} Z`, 'paving', 0, c.p.lw));
  out.push(shape(c, `M${f1(left)},${f1(top)} L${f1(right)},${f1(top)} L${f1(right)},${f1(top + band)} L${f1(left)},${f1(top + band)} Z`, 'stone', 0, c.p.lw));
  let joints = '';
  const stones = 14;
  for (let i = 1; i < stones; i++) {
    const x = c.x0 + (i / stones) * c.W;
    joints += `M${f1(x)},${f1(top)} L${f1(x)},${f1(top + band)} `;
  }
  let y = top + band;
  let gap = band * 0.9;
  let row = 0;
  while (y < bottom) {
    y += gap;
    joints += `M${f1(left)},${f1(y)} L${f1(right)},${f1(y)} `;
    const cols = Math.max(4, Math.round(10 - row * 1.5));
    for (let i = 0; i < cols; i++) {
      const x = c.x0 + ((i + (row % 2) * 0.5) / cols) * c.W;
      joints += `M${f1(x)},${f1(y - gap)} L${f1(x + (x - (c.x0 + c.W / 2)) * 0.08)},${f1(y)} `;
    }
    gap *= 1.35;
    row++;
  }
  out.push(strokePath(joints, lineColour(c, 0), c.p.lw * 0.55, 'opacity="0.75"'));
  for (const bx of el.bollards) {
    const x = px(c, bx);
    const r = band * 0.9;
    out.push(shape(c, `M${f1(x - r * 0.7)},${f1(top + band * 0.5)} L${f1(x - r * 0.6)},${f1(top - r * 1.3)} L${f1(x + r * 0.6)},${f1(top - r * 1.3)} L${f1(x + r * 0.7)},${f1(top + band * 0.5)} Z`, 'iron', 0, c.p.lw * 0.6));
    out.push(`<ellipse cx="${f1(x)}" cy="${f1(top - r * 1.3)}" rx="${f1(r)}" ry="${f1(r * 0.35)}" fill="${c.p.fill('iron', 0)}"/>`);
  }
  return out.join('');
}

export function drawSun(c: DrawCtx, el: SunElement): string {
  const r = el.size * c.H * 0.5;
  const cx = px(c, el.x);
  const cy = py(c, el.y);
  const col = c.p.fill('lamp');
  let rays = '';
  if (el.rays) {
    for (let i = 0; i < 16; i++) {
      const a = (i / 16) * Math.PI * 2;
      const a1 = a - 0.07;
      const a2 = a + 0.07;
      rays += `M${f1(cx + Math.cos(a1) * r * 1.25)},${f1(cy + Math.sin(a1) * r * 1.25)} L${f1(cx + Math.cos(a) * r * 2.1)},${f1(cy + Math.sin(a) * r * 2.1)} L${f1(cx + Math.cos(a2) * r * 1.25)},${f1(cy + Math.sin(a2) * r * 1.25)} Z `;
    }
  }
  return `<path d="${rays}" fill="${col}"/><circle cx="${f1(cx)}" cy="${f1(cy)}" r="${f1(r)}" fill="${col}"/>`;
}

export function drawElement(c: DrawCtx, el: SceneElement): string {
  switch (el.kind) {
    case 'sailing-ship':
      return drawSailingShip(c, el);
    case 'steamship':
      return drawSteamship(c, el);
    case 'rowing-boat':
      return drawRowingBoat(c, el);
    case 'lighthouse':
      return drawLighthouse(c, el);
    case 'pier':
      return drawPier(c, el);
    case 'crane':
      return drawCrane(c, el);
    case 'worker':
      return drawWorker(c, el);
    case 'cargo':
      return drawCargo(c, el);
    case 'gull':
      return drawGull(c, el);
    case 'headland':
      return drawHeadland(c, el);
    case 'rock':
      return drawRock(c, el);
    case 'quay':
      return drawQuay(c, el);
    case 'sun':
      return drawSun(c, el);
  }
}
