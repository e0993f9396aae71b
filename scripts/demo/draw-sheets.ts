/** Whole-sheet drawings that are not harbour views: engraved or printed charts, ornamental plates. */
import { escapeXml, f1, strokePath, textWidthEm } from './draw-kit.ts';
import { ENGRAVING_INK, ENGRAVING_PAPER, LITHO_PALETTES, type LithoPalette } from './paint.ts';
import { type Rng, int, range } from './prng.ts';
import type { ChartScene, OrnamentScene } from './scene.ts';

interface Sheet {
  W: number;
  H: number;
  rng: Rng;
  id(name: string): string;
  defs: string[];
}

function hatch(s: Sheet, name: string, angle: number, spacing: number, width: number, ink: string, paper: string | null): string {
  const id = s.id(name);
  const n = 12;
  const t = spacing * n;
  let lines = '';
  for (let i = 0; i < n; i++) lines += `M0,${f1(i * spacing)} H${f1(t)} `;
  s.defs.push(
    `<pattern id="${id}" patternUnits="userSpaceOnUse" width="${f1(t)}" height="${f1(t)}" patternTransform="rotate(${angle})">` +
      (paper ? `<rect width="${f1(t)}" height="${f1(t)}" fill="${paper}"/>` : '') +
      `<path d="${lines}" stroke="${ink}" stroke-width="${f1(width)}" fill="none"/></pattern>`,
  );
  return `url(#${id})`;
}

/** smooth closed-ish polyline through points */
function smooth(points: Array<[number, number]>): string {
  if (points.length < 2) return '';
  const first = points[0] as [number, number];
  let d = `M${f1(first[0])},${f1(first[1])}`;
  for (let i = 1; i < points.length - 1; i++) {
    const p = points[i] as [number, number];
    const n = points[i + 1] as [number, number];
    d += ` Q${f1(p[0])},${f1(p[1])} ${f1((p[0] + n[0]) / 2)},${f1((p[1] + n[1]) / 2)}`;
  }
  const last = points[points.length - 1] as [number, number];
  d += ` L${f1(last[0])},${f1(last[1])}`;
  return d;
}

function compassRose(cx: number, cy: number, r: number, ink: string, light: string, accent: string, lw: number): string {
  const out: string[] = [];
  out.push(`<circle cx="${f1(cx)}" cy="${f1(cy)}" r="${f1(r)}" fill="none" stroke="${ink}" stroke-width="${f1(lw * 1.2)}"/>`);
  out.push(`<circle cx="${f1(cx)}" cy="${f1(cy)}" r="${f1(r * 0.9)}" fill="none" stroke="${ink}" stroke-width="${f1(lw * 0.6)}"/>`);
  let ticks = '';
  for (let i = 0; i < 72; i++) {
    const a = (i / 72) * Math.PI * 2;
    const r2 = i % 2 === 0 ? r * 0.84 : r * 0.87;
    ticks += `M${f1(cx + Math.cos(a) * r * 0.9)},${f1(cy + Math.sin(a) * r * 0.9)} L${f1(cx + Math.cos(a) * r2)},${f1(cy + Math.sin(a) * r2)} `;
  }
  out.push(strokePath(ticks, ink, lw * 0.5));
  const point = (angle: number, len: number, width: number, fillA: string, fillB: string) => {
    const a = angle - Math.PI / 2;
    const tip: [number, number] = [cx + Math.cos(a) * len, cy + Math.sin(a) * len];
    const l: [number, number] = [cx + Math.cos(a - Math.PI / 2) * width, cy + Math.sin(a - Math.PI / 2) * width];
    const rr: [number, number] = [cx + Math.cos(a + Math.PI / 2) * width, cy + Math.sin(a + Math.PI / 2) * width];
    return (
      `<path d="M${f1(cx)},${f1(cy)} L${f1(l[0])},${f1(l[1])} L${f1(tip[0])},${f1(tip[1])} Z" fill="${fillA}" stroke="${ink}" stroke-width="${f1(lw * 0.5)}"/>` +
      `<path d="M${f1(cx)},${f1(cy)} L${f1(rr[0])},${f1(rr[1])} L${f1(tip[0])},${f1(tip[1])} Z" fill="${fillB}" stroke="${ink}" stroke-width="${f1(lw * 0.5)}"/>`
    );
  };
  for (let i = 0; i < 8; i++) out.push(point(((i + 0.5) / 8) * Math.PI * 2, r * 0.5, r * 0.06, ink, light));
  for (let i = 0; i < 4; i++) out.push(point(((i + 0.5) / 4) * Math.PI * 2 + Math.PI / 4, r * 0.62, r * 0.08, light, ink));
  for (let i = 0; i < 4; i++) out.push(point((i / 4) * Math.PI * 2, r * 0.84, r * 0.11, i === 0 ? accent : light, ink));
  out.push(`<circle cx="${f1(cx)}" cy="${f1(cy)}" r="${f1(r * 0.05)}" fill="${light}" stroke="${ink}" stroke-width="${f1(lw * 0.5)}"/>`);
  out.push(
    `<text x="${f1(cx)}" y="${f1(cy - r * 1.06)}" font-family="DejaVu Serif" font-weight="bold" font-size="${f1(r * 0.24)}" text-anchor="middle" fill="${ink}">N</text>`,
  );
  return out.join('');
}

export function renderChart(scene: ChartScene, W: number, H: number, rng: Rng, id: (n: string) => string): string {
  const s: Sheet = { W, H, rng, id, defs: [] };
  const engraved = scene.style === 'engraving';
  const pal: LithoPalette = LITHO_PALETTES[scene.palette % LITHO_PALETTES.length] as LithoPalette;
  const ink = engraved ? ENGRAVING_INK : pal.ink;
  const paper = engraved ? ENGRAVING_PAPER : '#f3ead3';
  const lw = Math.max(1, Math.min(W, H) / 700);
  const m = Math.min(W, H) * 0.04;
  const band = Math.min(W, H) * 0.018;
  const mx0 = m + band;
  const my0 = m + band;
  const mw = W - 2 * (m + band);
  const mh = H - 2 * (m + band);
  const out: string[] = [];
  out.push(`<rect width="${W}" height="${H}" fill="${paper}"/>`);
  const seaTint = engraved ? paper : '#dfe9e4';
  out.push(`<rect x="${f1(mx0)}" y="${f1(my0)}" width="${f1(mw)}" height="${f1(mh)}" fill="${seaTint}"/>`);
  // coastline: distance of the coast from its side of the sheet, varying along the side
  const along = scene.coast === 'left' || scene.coast === 'right' ? mh : mw;
  const across = scene.coast === 'left' || scene.coast === 'right' ? mw : mh;
  const phases = [range(rng, 0, 6.3), range(rng, 0, 6.3), range(rng, 0, 6.3)];
  const inletAt = range(rng, 0.35, 0.65);
  const depthAt = (t: number) => {
    const [p1, p2, p3] = phases as [number, number, number];
    let v = 0.3 + 0.05 * Math.sin(t * 5 + p1) + 0.03 * Math.sin(t * 13 + p2) + 0.015 * Math.sin(t * 31 + p3);
    v -= 0.11 * Math.exp(-Math.pow((t - inletAt) / 0.055, 2));
    v += 0.06 * Math.exp(-Math.pow((t - inletAt - 0.17) / 0.08, 2));
    return v * across;
  };
  const toXY = (t: number, dist: number): [number, number] => {
    switch (scene.coast) {
      case 'left':
        return [mx0 + dist, my0 + t * along];
      case 'right':
        return [mx0 + mw - dist, my0 + t * along];
      case 'top':
        return [mx0 + t * along, my0 + dist];
      case 'bottom':
        return [mx0 + t * along, my0 + mh - dist];
    }
  };
  const coastPts: Array<[number, number]> = [];
  const N = 80;
  for (let i = -2; i <= N + 2; i++) {
    const t = i / N;
    coastPts.push(toXY(t, depthAt(t) + range(rng, -0.004, 0.004) * across));
  }
  const far = -across * 0.2;
  const landPath = smooth(coastPts) + ` L${toXY(1.05, far).map(f1).join(',')} L${toXY(-0.05, far).map(f1).join(',')} Z`;
  const clip = id('mapclip');
  s.defs.push(`<clipPath id="${clip}"><rect x="${f1(mx0)}" y="${f1(my0)}" width="${f1(mw)}" height="${f1(mh)}"/></clipPath>`);
  const body: string[] = [];
  // rhumb lines from the compass rose
  const cx = mx0 + scene.compass.x * mw;
  const cy = my0 + scene.compass.y * mh;
  const cr = scene.compass.size * mh;
  let rhumbs = '';
  for (let i = 0; i < 16; i++) {
    const a = (i / 16) * Math.PI * 2;
    rhumbs += `M${f1(cx)},${f1(cy)} L${f1(cx + Math.cos(a) * W * 1.5)},${f1(cy + Math.sin(a) * W * 1.5)} `;
  }
  body.push(strokePath(rhumbs, engraved ? ink : pal.sea, lw * 0.5, 'opacity="0.4"'));
  // waterlines along the coast, outermost first
  const rings = engraved ? 7 : 5;
  for (let i = rings; i >= 1; i--) {
    const d = i * Math.min(W, H) * (engraved ? 0.009 : 0.012);
    if (engraved) {
      body.push(`<path d="${landPath}" fill="none" stroke="${ink}" stroke-width="${f1(d * 2)}" stroke-linejoin="round" opacity="${f1(0.35 + (rings - i) * 0.08)}"/>`);
      body.push(`<path d="${landPath}" fill="none" stroke="${paper}" stroke-width="${f1(d * 2 - lw * 0.9)}" stroke-linejoin="round"/>`);
    } else {
      const t = i / rings;
      const col = t > 0.8 ? '#c9ddd9' : t > 0.6 ? '#b5d0cf' : t > 0.4 ? '#9cc2c4' : t > 0.2 ? '#86b4b9' : '#6fa3ac';
      body.push(`<path d="${landPath}" fill="none" stroke="${col}" stroke-width="${f1(d * 2)}" stroke-linejoin="round"/>`);
    }
  }
  const landFill = engraved ? hatch(s, 'land', 0, lw * 3.2, lw * 0.5, ink, paper) : '#ecdcb0';
  body.push(`<path d="${landPath}" fill="${landFill}" stroke="${ink}" stroke-width="${f1(lw * 1.6)}" stroke-linejoin="round"/>`);
  // hills as hachured ridges
  const inland = (t: number, f: number) => toXY(t, depthAt(t) * f);
  let hach = '';
  const tick = Math.min(W, H) * 0.014;
  for (let hIdx = 0; hIdx < 4; hIdx++) {
    const t0 = range(rng, 0.05, 0.8);
    const f = range(rng, 0.3, 0.6);
    const steps = 14;
    for (let i = 0; i < steps; i++) {
      const t = t0 + (i / steps) * 0.16;
      const [ax, ay] = inland(t, f);
      const [bx, by] = inland(t + 0.16 / steps, f);
      const dx = bx - ax;
      const dy = by - ay;
      const len = Math.hypot(dx, dy) || 1;
      const nx = -dy / len;
      const ny = dx / len;
      const l = tick * (0.6 + Math.sin((i / steps) * Math.PI));
      hach += `M${f1(ax + nx * tick * 0.2)},${f1(ay + ny * tick * 0.2)} l${f1(nx * l)},${f1(ny * l)} M${f1(ax - nx * tick * 0.2)},${f1(ay - ny * tick * 0.2)} l${f1(-nx * l)},${f1(-ny * l)} `;
    }
  }
  body.push(strokePath(hach, engraved ? ink : '#8a6d3b', lw * 0.9));
  // the town beside the inlet, with a pier
  let blocks = '';
  for (let i = 0; i < 24; i++) {
    const t = inletAt + (i % 2 === 0 ? -1 : 1) * range(rng, 0.02, 0.07);
    const [bx, by] = inland(t, range(rng, 0.25, 0.85));
    const bw = Math.min(W, H) * range(rng, 0.008, 0.016);
    const bh = Math.min(W, H) * range(rng, 0.008, 0.014);
    blocks += `M${f1(bx - bw / 2)},${f1(by - bh / 2)} h${f1(bw)} v${f1(bh)} h${f1(-bw)} Z `;
  }
  body.push(`<path d="${blocks}" fill="${engraved ? ink : pal.accent}"/>`);
  const pierA = toXY(inletAt + 0.05, depthAt(inletAt + 0.05));
  const pierB = toXY(inletAt + 0.04, depthAt(inletAt + 0.05) + across * 0.08);
  body.push(strokePath(`M${f1(pierA[0])},${f1(pierA[1])} L${f1(pierB[0])},${f1(pierB[1])}`, ink, lw * 3));
  const townFs = Math.min(W, H) * 0.026;
  const vertical = scene.coast === 'left' || scene.coast === 'right';
  const labelT = inletAt + (inletAt > 0.5 ? -0.2 : 0.2);
  const [lx, ly] = inland(labelT, 0.5);
  const rot = vertical ? (scene.coast === 'left' ? -90 : 90) : 0;
  body.push(
    `<text x="${f1(lx)}" y="${f1(ly)}" transform="rotate(${rot} ${f1(lx)} ${f1(ly)})" font-family="DejaVu Serif" font-size="${f1(townFs)}" letter-spacing="${f1(townFs * 0.25)}" text-anchor="middle" dominant-baseline="middle" fill="${ink}">${escapeXml(scene.town)}</text>`,
  );
  if (scene.light) {
    const [sx, sy] = toXY(inletAt + 0.16, depthAt(inletAt + 0.16) - across * 0.01);
    const r = Math.min(W, H) * 0.012;
    let star = '';
    for (let i = 0; i < 8; i++) {
      const a = (i / 8) * Math.PI * 2;
      star += `M${f1(sx)},${f1(sy)} L${f1(sx + Math.cos(a) * r * 2.4)},${f1(sy + Math.sin(a) * r * 2.4)} `;
    }
    body.push(strokePath(star, engraved ? ink : pal.accent, lw));
    body.push(`<circle cx="${f1(sx)}" cy="${f1(sy)}" r="${f1(r * 0.7)}" fill="${engraved ? ink : pal.accent}"/>`);
  }
  // soundings, deeper away from the coast
  const fs = Math.min(W, H) * 0.017;
  let soundings = '';
  const cartX = scene.coast === 'right' ? mx0 + mw * 0.04 : mx0 + mw * 0.6;
  const cartY = scene.coast === 'bottom' ? my0 + mh * 0.05 : my0 + mh * 0.68;
  const cartW = mw * Math.max(0.34, Math.min(0.5, scene.title.length * 0.017));
  const cartH = mh * 0.27;
  for (let i = 0; i < 130; i++) {
    const t = range(rng, 0.02, 0.98);
    const dist = depthAt(t) + range(rng, 0.02, 0.7) * across;
    const [sx, sy] = toXY(t, dist);
    if (sx < mx0 + fs || sx > mx0 + mw - fs || sy < my0 + fs || sy > my0 + mh - fs) continue;
    if (Math.hypot(sx - cx, sy - cy) < cr * 1.15) continue;
    if (sx > cartX - fs && sx < cartX + cartW + fs && sy > cartY - fs && sy < cartY + cartH + fs) continue;
    const v = Math.max(1, Math.round(1 + ((dist - depthAt(t)) / across) * 30 + range(rng, -1.5, 1.5)));
    soundings += `<text x="${f1(sx)}" y="${f1(sy)}">${v}</text>`;
  }
  body.push(`<g font-family="DejaVu Serif" font-style="italic" font-size="${f1(fs)}" fill="${ink}" text-anchor="middle">${soundings}</g>`);
  body.push(compassRose(cx, cy, cr, ink, paper, engraved ? ink : pal.accent, lw));
  // title cartouche
  const titleFs = Math.min(cartH * 0.2, (cartW * 0.86) / textWidthEm(scene.title, true));
  const subFs = titleFs * 0.62;
  body.push(`<rect x="${f1(cartX)}" y="${f1(cartY)}" width="${f1(cartW)}" height="${f1(cartH)}" fill="${paper}" stroke="${ink}" stroke-width="${f1(lw * 2)}"/>`);
  body.push(`<rect x="${f1(cartX + lw * 5)}" y="${f1(cartY + lw * 5)}" width="${f1(cartW - lw * 10)}" height="${f1(cartH - lw * 10)}" fill="none" stroke="${ink}" stroke-width="${f1(lw * 0.7)}"/>`);
  body.push(
    `<text x="${f1(cartX + cartW / 2)}" y="${f1(cartY + cartH * 0.45)}" font-family="DejaVu Serif" font-weight="bold" font-size="${f1(titleFs)}" text-anchor="middle" fill="${ink}">${escapeXml(scene.title)}</text>`,
  );
  body.push(
    `<text x="${f1(cartX + cartW / 2)}" y="${f1(cartY + cartH * 0.7)}" font-family="DejaVu Serif" font-style="italic" font-size="${f1(subFs)}" text-anchor="middle" fill="${ink}">${escapeXml(scene.subtitle)}</text>`,
  );
  // scale bar
  const sbY = cartY + cartH * 0.84;
  const sbW = cartW * 0.6;
  const sbX = cartX + (cartW - sbW) / 2;
  for (let i = 0; i < 6; i++) {
    body.push(`<rect x="${f1(sbX + (i * sbW) / 6)}" y="${f1(sbY)}" width="${f1(sbW / 6)}" height="${f1(cartH * 0.04)}" fill="${i % 2 === 0 ? ink : paper}" stroke="${ink}" stroke-width="${f1(lw * 0.5)}"/>`);
  }
  out.push(`<g clip-path="url(#${clip})">${body.join('')}</g>`);
  // neat line with a graduated border
  out.push(`<rect x="${f1(m)}" y="${f1(m)}" width="${f1(W - 2 * m)}" height="${f1(H - 2 * m)}" fill="none" stroke="${ink}" stroke-width="${f1(lw * 1.8)}"/>`);
  out.push(`<rect x="${f1(mx0)}" y="${f1(my0)}" width="${f1(mw)}" height="${f1(mh)}" fill="none" stroke="${ink}" stroke-width="${f1(lw)}"/>`);
  let ticks = '';
  const seg = Math.min(W, H) * 0.05;
  for (let x = mx0, i = 0; x < mx0 + mw; x += seg, i++) {
    if (i % 2 === 0) {
      const w = Math.min(seg, mx0 + mw - x);
      ticks += `M${f1(x)},${f1(m)} h${f1(w)} v${f1(band)} h${f1(-w)} Z M${f1(x)},${f1(H - m - band)} h${f1(w)} v${f1(band)} h${f1(-w)} Z `;
    }
  }
  for (let y = my0, i = 0; y < my0 + mh; y += seg, i++) {
    if (i % 2 === 0) {
      const h = Math.min(seg, my0 + mh - y);
      ticks += `M${f1(m)},${f1(y)} h${f1(band)} v${f1(h)} h${f1(-band)} Z M${f1(W - m - band)},${f1(y)} h${f1(band)} v${f1(h)} h${f1(-band)} Z `;
    }
  }
  out.push(`<path d="${ticks}" fill="${ink}"/>`);
  return `<defs>${s.defs.join('')}</defs>${out.join('')}`;
}

export function renderOrnament(scene: OrnamentScene, W: number, H: number, rng: Rng, id: (n: string) => string): string {
  const s: Sheet = { W, H, rng, id, defs: [] };
  const ink = ENGRAVING_INK;
  const paper = ENGRAVING_PAPER;
  const lw = Math.max(1, Math.min(W, H) / 650);
  const mid = hatch(s, 'mid', 40, lw * 3, lw * 0.6, ink, paper);
  const dark = hatch(s, 'dark', -40, lw * 2.2, lw * 0.8, ink, paper);
  const out: string[] = [`<rect width="${W}" height="${H}" fill="${paper}"/>`];
  const m = Math.min(W, H) * 0.06;
  const bw = Math.min(W, H) * 0.085;
  out.push(`<rect x="${f1(m * 0.5)}" y="${f1(m * 0.5)}" width="${f1(W - m)}" height="${f1(H - m)}" fill="#e7dbbd" stroke="#b9a884" stroke-width="${f1(lw * 2)}"/>`);
  const x0 = m;
  const y0 = m;
  const x1 = W - m;
  const y1 = H - m;
  out.push(`<rect x="${f1(x0)}" y="${f1(y0)}" width="${f1(x1 - x0)}" height="${f1(y1 - y0)}" fill="${paper}" stroke="${ink}" stroke-width="${f1(lw * 1.6)}"/>`);
  out.push(`<rect x="${f1(x0 + bw)}" y="${f1(y0 + bw)}" width="${f1(x1 - x0 - 2 * bw)}" height="${f1(y1 - y0 - 2 * bw)}" fill="none" stroke="${ink}" stroke-width="${f1(lw * 1.6)}"/>`);
  // motif repeated along the band centre line
  const sides: Array<[number, number, number, number]> = [
    [x0 + bw, y0 + bw / 2, x1 - bw, y0 + bw / 2],
    [x1 - bw / 2, y0 + bw, x1 - bw / 2, y1 - bw],
    [x1 - bw, y1 - bw / 2, x0 + bw, y1 - bw / 2],
    [x0 + bw / 2, y1 - bw, x0 + bw / 2, y0 + bw],
  ];
  const motifs: string[] = [];
  for (const [ax, ay, bx, by] of sides) {
    const len = Math.hypot(bx - ax, by - ay);
    const step = bw * (scene.border === 'rope' ? 0.42 : 0.9);
    const n = Math.max(2, Math.floor(len / step));
    const ang = (Math.atan2(by - ay, bx - ax) * 180) / Math.PI;
    for (let i = 0; i < n; i++) {
      const t = (i + 0.5) / n;
      const x = ax + (bx - ax) * t;
      const y = ay + (by - ay) * t;
      motifs.push(`<g transform="translate(${f1(x)},${f1(y)}) rotate(${f1(ang)})">${motif(scene.border, bw, lw, ink, paper, mid, dark, i)}</g>`);
    }
  }
  out.push(motifs.join(''));
  for (const [cx, cy] of [
    [x0 + bw / 2, y0 + bw / 2],
    [x1 - bw / 2, y0 + bw / 2],
    [x1 - bw / 2, y1 - bw / 2],
    [x0 + bw / 2, y1 - bw / 2],
  ] as Array<[number, number]>) {
    out.push(rosette(cx, cy, bw * 0.42, lw, ink, paper, dark));
  }
  const cx = W / 2;
  const cy = H / 2;
  const size = Math.min(x1 - x0, y1 - y0) * 0.36;
  out.push(centrePiece(scene.centre, cx, cy, size, lw, ink, paper, mid, dark, rng));
  return `<defs>${s.defs.join('')}</defs>${out.join('')}`;
}

function motif(kind: OrnamentScene['border'], bw: number, lw: number, ink: string, paper: string, mid: string, dark: string, i: number): string {
  const h = bw * 0.36;
  switch (kind) {
    case 'rope': {
      const w = bw * 0.42;
      return `<path d="M${f1(-w * 0.7)},${f1(h)} C${f1(-w * 0.2)},${f1(h)} ${f1(-w * 0.1)},${f1(-h)} ${f1(w * 0.55)},${f1(-h)} L${f1(w * 0.75)},${f1(-h * 0.6)} C${f1(w * 0.1)},${f1(-h * 0.6)} ${f1(0)},${f1(h)} ${f1(-w * 0.5)},${f1(h)} Z" fill="${mid}" stroke="${ink}" stroke-width="${f1(lw)}"/>`;
    }
    case 'wave': {
      const w = bw * 0.9;
      return `<path d="M${f1(-w / 2)},${f1(h)} C${f1(-w * 0.2)},${f1(h)} ${f1(-w * 0.1)},${f1(-h)} ${f1(w * 0.15)},${f1(-h)} C${f1(w * 0.45)},${f1(-h)} ${f1(w * 0.42)},${f1(h * 0.1)} ${f1(w * 0.2)},${f1(h * 0.1)} C${f1(w * 0.05)},${f1(h * 0.1)} ${f1(w * 0.08)},${f1(-h * 0.45)} ${f1(w * 0.22)},${f1(-h * 0.4)}" fill="none" stroke="${ink}" stroke-width="${f1(lw * 2)}"/>` +
        `<path d="M${f1(-w / 2)},${f1(h)} L${f1(w / 2)},${f1(h)}" stroke="${ink}" stroke-width="${f1(lw)}"/>`;
    }
    case 'laurel': {
      const leaf = (dx: number, dy: number, rot: number) =>
        `<ellipse cx="${f1(dx)}" cy="${f1(dy)}" rx="${f1(bw * 0.2)}" ry="${f1(bw * 0.075)}" transform="rotate(${rot} ${f1(dx)} ${f1(dy)})" fill="${i % 2 ? mid : dark}" stroke="${ink}" stroke-width="${f1(lw * 0.8)}"/>`;
      return `<path d="M${f1(-bw * 0.5)},0 L${f1(bw * 0.5)},0" stroke="${ink}" stroke-width="${f1(lw * 1.2)}"/>` + leaf(-bw * 0.1, -bw * 0.12, -30) + leaf(-bw * 0.1, bw * 0.12, 30) + leaf(bw * 0.25, -bw * 0.1, -30) + leaf(bw * 0.25, bw * 0.1, 30);
    }
    case 'shell': {
      const r = bw * 0.34;
      let ribs = '';
      for (let k = 0; k <= 6; k++) {
        const a = Math.PI + (k / 6) * Math.PI;
        ribs += `M0,${f1(r * 0.45)} L${f1(Math.cos(a) * r)},${f1(Math.sin(a) * r + r * 0.45)} `;
      }
      return (
        `<path d="M${f1(-r)},${f1(r * 0.45)} A${f1(r)},${f1(r)} 0 0 1 ${f1(r)},${f1(r * 0.45)} L0,${f1(r * 0.45)} Z" fill="${mid}" stroke="${ink}" stroke-width="${f1(lw)}"/>` +
        `<path d="${ribs}" stroke="${ink}" stroke-width="${f1(lw * 0.8)}"/>` +
        `<circle cx="${f1(bw * 0.45)}" cy="0" r="${f1(bw * 0.06)}" fill="${ink}"/>` +
        `<path d="M${f1(-r * 0.4)},${f1(r * 0.45)} h${f1(r * 0.8)} l${f1(-r * 0.2)},${f1(r * 0.3)} h${f1(-r * 0.4)} Z" fill="${paper}" stroke="${ink}" stroke-width="${f1(lw * 0.8)}"/>`
      );
    }
  }
}

function rosette(cx: number, cy: number, r: number, lw: number, ink: string, paper: string, dark: string): string {
  let petals = '';
  for (let i = 0; i < 8; i++) {
    const a = (i / 8) * 360;
    petals += `<ellipse cx="${f1(cx)}" cy="${f1(cy - r * 0.55)}" rx="${f1(r * 0.22)}" ry="${f1(r * 0.45)}" transform="rotate(${a} ${f1(cx)} ${f1(cy)})" fill="${paper}" stroke="${ink}" stroke-width="${f1(lw)}"/>`;
  }
  return petals + `<circle cx="${f1(cx)}" cy="${f1(cy)}" r="${f1(r * 0.3)}" fill="${dark}" stroke="${ink}" stroke-width="${f1(lw)}"/>`;
}

function centrePiece(kind: OrnamentScene['centre'], cx: number, cy: number, size: number, lw: number, ink: string, paper: string, mid: string, dark: string, rng: Rng): string {
  const sw = f1(lw * 1.4);
  const out: string[] = [];
  // oval medallion behind every centre piece
  out.push(`<ellipse cx="${f1(cx)}" cy="${f1(cy)}" rx="${f1(size * 1.05)}" ry="${f1(size * 1.2)}" fill="${paper}" stroke="${ink}" stroke-width="${sw}"/>`);
  out.push(`<ellipse cx="${f1(cx)}" cy="${f1(cy)}" rx="${f1(size * 0.98)}" ry="${f1(size * 1.13)}" fill="none" stroke="${ink}" stroke-width="${f1(lw * 0.6)}"/>`);
  let rays = '';
  for (let i = 0; i < 90; i++) {
    const a = (i / 90) * Math.PI * 2;
    rays += `M${f1(cx + Math.cos(a) * size * 0.98)},${f1(cy + Math.sin(a) * size * 1.13)} L${f1(cx + Math.cos(a) * size * 0.9)},${f1(cy + Math.sin(a) * size * 1.04)} `;
  }
  out.push(strokePath(rays, ink, lw * 0.6));
  switch (kind) {
    case 'anchor': {
      const s = size * 0.8;
      out.push(`<path d="M${f1(cx)},${f1(cy - s * 0.75)} L${f1(cx)},${f1(cy + s * 0.8)}" stroke="${ink}" stroke-width="${f1(s * 0.09)}" stroke-linecap="round"/>`);
      out.push(`<path d="M${f1(cx - s * 0.38)},${f1(cy - s * 0.52)} L${f1(cx + s * 0.38)},${f1(cy - s * 0.52)}" stroke="${ink}" stroke-width="${f1(s * 0.07)}" stroke-linecap="round"/>`);
      out.push(`<circle cx="${f1(cx)}" cy="${f1(cy - s * 0.86)}" r="${f1(s * 0.11)}" fill="none" stroke="${ink}" stroke-width="${f1(s * 0.045)}"/>`);
      out.push(`<path d="M${f1(cx - s * 0.6)},${f1(cy + s * 0.3)} Q${f1(cx - s * 0.55)},${f1(cy + s * 0.82)} ${f1(cx)},${f1(cy + s * 0.84)} Q${f1(cx + s * 0.55)},${f1(cy + s * 0.82)} ${f1(cx + s * 0.6)},${f1(cy + s * 0.3)}" fill="none" stroke="${ink}" stroke-width="${f1(s * 0.08)}"/>`);
      for (const dir of [-1, 1]) {
        out.push(`<path d="M${f1(cx + dir * s * 0.6)},${f1(cy + s * 0.18)} l${f1(dir * s * 0.1)},${f1(s * 0.2)} l${f1(-dir * s * 0.2)},${f1(-s * 0.02)} Z" fill="${ink}"/>`);
      }
      // rope twined round the shank
      let rope = `M${f1(cx - s * 0.12)},${f1(cy - s * 0.8)}`;
      for (let i = 0; i < 6; i++) {
        const y = cy - s * 0.6 + i * s * 0.22;
        rope += ` Q${f1(cx + (i % 2 ? -1 : 1) * s * 0.32)},${f1(y)} ${f1(cx + (i % 2 ? 1 : -1) * s * 0.08)},${f1(y + s * 0.11)}`;
      }
      out.push(`<path d="${rope}" fill="none" stroke="${ink}" stroke-width="${f1(s * 0.035)}"/>`);
      break;
    }
    case 'knot': {
      const s = size * 0.55;
      for (const dir of [-1, 1]) {
        out.push(
          `<path d="M${f1(cx)},${f1(cy)} C${f1(cx + dir * s * 1.2)},${f1(cy - s * 1.1)} ${f1(cx + dir * s * 1.5)},${f1(cy + s * 0.9)} ${f1(cx)},${f1(cy)}" fill="${mid}" stroke="${ink}" stroke-width="${f1(s * 0.09)}"/>`,
        );
        out.push(
          `<path d="M${f1(cx)},${f1(cy)} C${f1(cx + dir * s * 0.3)},${f1(cy + s * 0.9)} ${f1(cx + dir * s * 0.9)},${f1(cy + s * 1.3)} ${f1(cx + dir * s * 1.1)},${f1(cy + s * 1.5)}" fill="none" stroke="${ink}" stroke-width="${f1(s * 0.09)}" stroke-linecap="round"/>`,
        );
      }
      out.push(`<circle cx="${f1(cx)}" cy="${f1(cy)}" r="${f1(s * 0.16)}" fill="${dark}" stroke="${ink}" stroke-width="${sw}"/>`);
      break;
    }
    case 'star': {
      const s = size * 0.8;
      const n = 8;
      for (let i = 0; i < n; i++) {
        const a = (i / n) * Math.PI * 2 - Math.PI / 2;
        const len = i % 2 === 0 ? s : s * 0.6;
        const w = s * 0.14;
        const tip = [cx + Math.cos(a) * len, cy + Math.sin(a) * len];
        const l = [cx + Math.cos(a - Math.PI / 2) * w, cy + Math.sin(a - Math.PI / 2) * w];
        const r = [cx + Math.cos(a + Math.PI / 2) * w, cy + Math.sin(a + Math.PI / 2) * w];
        out.push(`<path d="M${f1(cx)},${f1(cy)} L${l.map(f1).join(',')} L${tip.map(f1).join(',')} Z" fill="${dark}" stroke="${ink}" stroke-width="${sw}"/>`);
        out.push(`<path d="M${f1(cx)},${f1(cy)} L${r.map(f1).join(',')} L${tip.map(f1).join(',')} Z" fill="${paper}" stroke="${ink}" stroke-width="${sw}"/>`);
      }
      break;
    }
    case 'shell': {
      const r = size * 0.8;
      const ribs = int(rng, 9, 13);
      let d = '';
      for (let k = 0; k < ribs; k++) {
        const a0 = Math.PI + (k / ribs) * Math.PI;
        const a1 = Math.PI + ((k + 1) / ribs) * Math.PI;
        const bx = cx;
        const by = cy + r * 0.5;
        d += `<path d="M${f1(bx)},${f1(by)} L${f1(cx + Math.cos(a0) * r)},${f1(cy + Math.sin(a0) * r * 0.9 + r * 0.2)} Q${f1(cx + Math.cos((a0 + a1) / 2) * r * 1.12)},${f1(cy + Math.sin((a0 + a1) / 2) * r + r * 0.2)} ${f1(cx + Math.cos(a1) * r)},${f1(cy + Math.sin(a1) * r * 0.9 + r * 0.2)} Z" fill="${k % 2 ? mid : paper}" stroke="${ink}" stroke-width="${sw}"/>`;
      }
      out.push(d);
      out.push(`<path d="M${f1(cx - r * 0.25)},${f1(cy + r * 0.5)} h${f1(r * 0.5)} l${f1(-r * 0.1)},${f1(r * 0.22)} h${f1(-r * 0.3)} Z" fill="${dark}" stroke="${ink}" stroke-width="${sw}"/>`);
      break;
    }
  }
  return out.join('');
}
