/** Sky and sea for a harbour view, in each medium. */
import { type DrawCtx, f1, strokePath } from './draw-kit.ts';
import { chance, int, range } from './prng.ts';
import type { SeaState, Weather } from './scene.ts';

interface Cloud {
  cx: number;
  cy: number;
  w: number;
  h: number;
  puffs: Array<[number, number, number]>;
}

function makeClouds(c: DrawCtx, count: number, dark: boolean): Cloud[] {
  const out: Cloud[] = [];
  const skyH = c.horizon - c.y0;
  for (let i = 0; i < count; i++) {
    const h = skyH * range(c.rng, 0.14, dark ? 0.32 : 0.24);
    const w = Math.max(h * 2.2, c.W * range(c.rng, 0.14, dark ? 0.45 : 0.3));
    const cx = c.x0 + c.W * range(c.rng, -0.05, 1.05);
    const cy = c.y0 + skyH * range(c.rng, 0.25, 0.78);
    const puffs: Array<[number, number, number]> = [];
    const n = Math.max(3, Math.ceil(w / (h * 0.5)));
    for (let j = 0; j < n; j++) {
      const t = j / (n - 1);
      const bump = 1 - Math.pow(2 * t - 1, 2);
      const r = h * (0.28 + 0.34 * bump) * range(c.rng, 0.85, 1.15);
      const x = cx - w / 2 + r * 0.8 + t * (w - r * 1.6);
      puffs.push([x, cy - r * 0.95 - bump * h * 0.12, r]);
    }
    out.push({ cx, cy, w, h, puffs });
  }
  return out;
}

function cloudPath(cl: Cloud): string {
  // overlapping puffs over a flat, rounded base
  let d = '';
  for (const [x, y, r] of cl.puffs) {
    d += `M${f1(x - r)},${f1(y)} a${f1(r)},${f1(r)} 0 1,0 ${f1(r * 2)},0 a${f1(r)},${f1(r)} 0 1,0 ${f1(-r * 2)},0 `;
  }
  const first = cl.puffs[0] as [number, number, number];
  const last = cl.puffs[cl.puffs.length - 1] as [number, number, number];
  const top = cl.cy - cl.h * 0.3;
  d += `M${f1(first[0])},${f1(top)} L${f1(last[0])},${f1(top)} Q${f1(last[0] + last[2])},${f1(cl.cy)} ${f1(last[0])},${f1(cl.cy)} L${f1(first[0])},${f1(cl.cy)} Q${f1(first[0] - first[2])},${f1(cl.cy)} ${f1(first[0])},${f1(top)} Z`;
  return d;
}

export function drawSky(c: DrawCtx, weather: Weather): string {
  const out: string[] = [];
  const top = c.y0;
  const hz = c.horizon;
  const left = c.x0;
  const right = c.x0 + c.W;
  const storm = weather === 'storm';
  if (c.p.style === 'engraving') {
    // ruled sky: fine horizontal lines, closer at the top
    const sp = c.p.lw * (storm ? 2.2 : 3.4);
    let d = '';
    let y = top + sp * 0.5;
    while (y < hz) {
      const t = (y - top) / Math.max(1, hz - top);
      if (storm || t < 0.85 || chance(c.rng, 0.4)) {
        let x = left;
        while (x < right) {
          const len = range(c.rng, c.W * 0.08, c.W * 0.5);
          d += `M${f1(x)},${f1(y)} L${f1(Math.min(right, x + len))},${f1(y)} `;
          x += len + range(c.rng, 0, c.W * (storm ? 0.01 : 0.04) * (0.3 + t));
        }
      }
      y += sp * (1 + t * (storm ? 0.4 : 1.3));
    }
    out.push(strokePath(d, c.p.ink, c.p.lw * (storm ? 0.6 : 0.42)));
    if (storm) {
      let d2 = '';
      const sp2 = c.p.lw * 2.6;
      for (let x = left - (hz - top); x < right; x += sp2) {
        d2 += `M${f1(x)},${f1(top)} L${f1(x + (hz - top) * 0.6)},${f1(hz - (hz - top) * 0.12)} `;
      }
      out.push(strokePath(d2, c.p.ink, c.p.lw * 0.45, 'opacity="0.9"'));
    }
    const clouds = makeClouds(c, storm ? int(c.rng, 3, 4) : weather === 'cloudy' ? int(c.rng, 3, 5) : int(c.rng, 1, 2), storm);
    for (const cl of clouds) {
      const d3 = cloudPath(cl);
      if (storm) {
        out.push(`<path d="${d3}" fill="${c.p.fill('towerBand')}" stroke="none"/>`);
      } else {
        out.push(`<path d="${d3}" fill="${c.p.ink}" stroke="${c.p.ink}" stroke-width="${f1(c.p.lw * 1.2)}"/>`);
        out.push(`<path d="${d3}" fill="${c.p.paper}" stroke="none"/>`);
        let shade = '';
        const first = cl.puffs[0] as [number, number, number];
        const last = cl.puffs[cl.puffs.length - 1] as [number, number, number];
        for (let i = 0; i < 4; i++) {
          const yy = cl.cy - cl.h * (0.04 + i * 0.06);
          const inset = (last[0] - first[0]) * (0.02 + i * 0.06);
          shade += `M${f1(first[0] + inset)},${f1(yy)} L${f1(last[0] - inset)},${f1(yy)} `;
        }
        out.push(strokePath(shade, c.p.ink, c.p.lw * 0.4));
      }
    }
    if (storm) out.push(drawRain(c, c.p.ink, 0.8));
    return out.join('');
  }
  if (c.p.style === 'photograph') {
    const g = c.id('sky');
    const [a, b] = storm ? [0.2, 0.52] : weather === 'fog' ? [0.82, 0.9] : weather === 'cloudy' ? [0.58, 0.86] : [0.7, 0.92];
    c.defs.push(
      `<linearGradient id="${g}" gradientUnits="userSpaceOnUse" x1="0" y1="${f1(top)}" x2="0" y2="${f1(hz)}"><stop offset="0" stop-color="${c.p.tone(a)}"/><stop offset="1" stop-color="${c.p.tone(b)}"/></linearGradient>`,
    );
    out.push(`<rect x="${f1(left - 2)}" y="${f1(top - 2)}" width="${f1(c.W + 4)}" height="${f1(hz - top + 4)}" fill="url(#${g})"/>`);
    if (weather !== 'fog') {
      const clouds = makeClouds(c, storm ? 5 : weather === 'cloudy' ? int(c.rng, 4, 6) : int(c.rng, 1, 3), storm);
      const blur = c.id('cloudblur');
      c.defs.push(`<filter id="${blur}" x="-20%" y="-50%" width="140%" height="200%"><feGaussianBlur stdDeviation="${f1(c.H * 0.012)}"/></filter>`);
      out.push(
        `<g filter="url(#${blur})">` +
          clouds.map((cl) => `<path d="${cloudPath(cl)}" fill="${c.p.tone(storm ? range(c.rng, 0.08, 0.3) : range(c.rng, 0.9, 1))}" opacity="${storm ? 0.85 : 0.8}"/>`).join('') +
          '</g>',
      );
    }
    if (storm) out.push(drawRain(c, c.p.tone(0.85), 0.45));
    return out.join('');
  }
  // lithograph: flat bands
  const mid = top + (hz - top) * 0.62;
  out.push(`<rect x="${f1(left - 2)}" y="${f1(top - 2)}" width="${f1(c.W + 4)}" height="${f1(hz - top + 4)}" fill="${storm ? c.p.tone(0.25) : c.p.sky}"/>`);
  out.push(`<rect x="${f1(left - 2)}" y="${f1(mid)}" width="${f1(c.W + 4)}" height="${f1(hz - mid + 2)}" fill="${storm ? c.p.tone(0.4) : c.p.fill('paving')}"/>`);
  const clouds = makeClouds(c, weather === 'fair' ? int(c.rng, 1, 2) : 4, storm);
  for (const cl of clouds) out.push(`<path d="${cloudPath(cl)}" fill="${storm ? c.p.tone(0.15) : c.p.paper}"/>`);
  if (storm) out.push(drawRain(c, c.p.paper, 0.6));
  return out.join('');
}

function drawRain(c: DrawCtx, colour: string, opacity: number): string {
  let d = '';
  const n = Math.round((c.W * c.H) / 900);
  const len = c.H * 0.07;
  for (let i = 0; i < n; i++) {
    const x = c.x0 + range(c.rng, -0.1, 1.05) * c.W;
    const y = c.y0 + range(c.rng, 0, 0.95) * c.H;
    const l = len * range(c.rng, 0.5, 1.3);
    d += `M${f1(x)},${f1(y)} l${f1(-l * 0.35)},${f1(l)} `;
  }
  return strokePath(d, colour, Math.max(0.7, c.p.lw * 0.5), `opacity="${opacity}"`);
}

export function drawSea(c: DrawCtx, sea: SeaState, weather: Weather, bottomFrac = 1): string {
  const out: string[] = [];
  const hz = c.horizon;
  const bottom = c.y0 + c.H * bottomFrac;
  const left = c.x0 - 2;
  const right = c.x0 + c.W + 2;
  const depthH = Math.max(1, c.y0 + c.H - hz);
  const amp = sea === 'rough' ? 1 : sea === 'choppy' ? 0.5 : 0.2;
  if (c.p.style === 'engraving') {
    out.push(`<rect x="${f1(left)}" y="${f1(hz)}" width="${f1(right - left)}" height="${f1(bottom - hz + 2)}" fill="${c.p.paper}"/>`);
    let d = '';
    let y = hz + c.p.lw * 1.2;
    while (y < bottom) {
      const t = (y - hz) / depthH;
      let x = left;
      while (x < right) {
        const len = range(c.rng, c.W * 0.04, c.W * (0.25 - t * 0.12));
        const x2 = Math.min(right, x + len);
        if (amp > 0.3 && t > 0.08) {
          const a = amp * c.H * 0.012 * (0.4 + t * 2);
          d += `M${f1(x)},${f1(y)} Q${f1((x + x2) / 2)},${f1(y - a)} ${f1(x2)},${f1(y)} `;
        } else {
          d += `M${f1(x)},${f1(y)} L${f1(x2)},${f1(y)} `;
        }
        x = x2 + range(c.rng, 0, c.W * 0.025 * (0.4 + t));
      }
      y += c.p.lw * (1.4 + t * 5.5) * (weather === 'storm' ? 0.8 : 1);
    }
    out.push(strokePath(d, c.p.ink, c.p.lw * 0.5));
    out.push(strokePath(`M${f1(left)},${f1(hz)} L${f1(right)},${f1(hz)}`, c.p.ink, c.p.lw * 0.7));
    if (sea === 'rough') out.push(waveCrests(c, hz, bottom, (r) => (r % 2 === 0 ? c.p.fill('stone') : c.p.fill('rock')), c.p.paper, c.p.ink));
    return out.join('');
  }
  if (c.p.style === 'photograph') {
    const g = c.id('sea');
    const [a, b] = weather === 'storm' ? [0.36, 0.14] : weather === 'fog' ? [0.8, 0.6] : [0.62, 0.3];
    c.defs.push(
      `<linearGradient id="${g}" gradientUnits="userSpaceOnUse" x1="0" y1="${f1(hz)}" x2="0" y2="${f1(c.y0 + c.H)}"><stop offset="0" stop-color="${c.p.tone(a)}"/><stop offset="1" stop-color="${c.p.tone(b)}"/></linearGradient>`,
    );
    out.push(`<rect x="${f1(left)}" y="${f1(hz)}" width="${f1(right - left)}" height="${f1(bottom - hz + 2)}" fill="url(#${g})"/>`);
    // glints and ripples
    let light = '';
    let dark = '';
    const n = Math.round(60 + amp * 120);
    for (let i = 0; i < n; i++) {
      const t = Math.pow(c.rng(), 1.4);
      const y = hz + t * (bottom - hz);
      const x = left + c.rng() * (right - left);
      const l = c.W * (0.01 + t * 0.06) * range(c.rng, 0.5, 1.5);
      const a2 = c.H * 0.006 * (0.3 + t * 2) * (0.5 + amp);
      if (chance(c.rng, 0.5)) light += `M${f1(x)},${f1(y)} Q${f1(x + l / 2)},${f1(y - a2)} ${f1(x + l)},${f1(y)} `;
      else dark += `M${f1(x)},${f1(y)} Q${f1(x + l / 2)},${f1(y + a2)} ${f1(x + l)},${f1(y)} `;
    }
    out.push(strokePath(light, c.p.tone(0.85), Math.max(1, c.p.lw * 0.6), 'opacity="0.55"'));
    out.push(strokePath(dark, c.p.tone(0.08), Math.max(1, c.p.lw * 0.7), 'opacity="0.35"'));
    if (sea === 'rough') out.push(waveCrests(c, hz, bottom, (r) => c.p.tone(0.3 - r * 0.04), c.p.tone(0.9), 'none'));
    return out.join('');
  }
  // lithograph
  const g = c.id('sea');
  c.defs.push(
    `<linearGradient id="${g}" gradientUnits="userSpaceOnUse" x1="0" y1="${f1(hz)}" x2="0" y2="${f1(c.y0 + c.H)}"><stop offset="0" stop-color="${c.p.tone(0.55)}"/><stop offset="0.35" stop-color="${c.p.tone(0.55)}"/><stop offset="0.36" stop-color="${c.p.tone(0.3)}"/><stop offset="1" stop-color="${c.p.tone(0.3)}"/></linearGradient>`,
  );
  out.push(`<rect x="${f1(left)}" y="${f1(hz)}" width="${f1(right - left)}" height="${f1(bottom - hz + 2)}" fill="url(#${g})"/>`);
  let waves = '';
  for (let i = 0; i < 26; i++) {
    const t = c.rng();
    const y = hz + (0.08 + t * 0.9) * (bottom - hz);
    const x = left + c.rng() * (right - left);
    const l = c.W * (0.03 + t * 0.08);
    waves += `M${f1(x)},${f1(y)} q${f1(l / 4)},${f1(-l / 6)} ${f1(l / 2)},0 q${f1(l / 4)},${f1(-l / 6)} ${f1(l / 2)},0 `;
  }
  out.push(strokePath(waves, c.p.paper, Math.max(1.5, c.p.lw), 'opacity="0.7"'));
  if (sea === 'rough') out.push(waveCrests(c, hz, bottom, (r) => c.p.tone(0.4 - r * 0.06), c.p.paper, 'none'));
  return out.join('');
}

/** rows of breaking waves for heavy weather, back to front */
function waveCrests(c: DrawCtx, hz: number, bottom: number, body: (row: number) => string, foam: string, line: string): string {
  const out: string[] = [];
  const rows = 5;
  const left = c.x0 - 4;
  const right = c.x0 + c.W + 4;
  for (let r = 0; r < rows; r++) {
    const t = (r + 1) / rows;
    const y = hz + (bottom - hz) * (0.06 + t * 0.86);
    const w = c.W * (0.07 + t * 0.13);
    const h = w * range(c.rng, 0.18, 0.26);
    let x = left - range(c.rng, 0, w);
    let d = `M${f1(x)},${f1(y)}`;
    let spray = '';
    while (x < right) {
      const k = range(c.rng, 0.85, 1.2);
      const ww = w * k;
      const hh = h * k;
      d += ` C${f1(x + ww * 0.3)},${f1(y)} ${f1(x + ww * 0.48)},${f1(y - hh * 0.9)} ${f1(x + ww * 0.62)},${f1(y - hh)}`;
      d += ` C${f1(x + ww * 0.72)},${f1(y - hh * 1.04)} ${f1(x + ww * 0.78)},${f1(y - hh * 0.72)} ${f1(x + ww * 0.7)},${f1(y - hh * 0.56)}`;
      d += ` C${f1(x + ww * 0.78)},${f1(y - hh * 0.3)} ${f1(x + ww * 0.86)},${f1(y)} ${f1(x + ww)},${f1(y)}`;
      spray += `M${f1(x + ww * 0.42)},${f1(y - hh * 0.72)} Q${f1(x + ww * 0.6)},${f1(y - hh * 1.08)} ${f1(x + ww * 0.71)},${f1(y - hh * 0.6)} `;
      x += ww;
    }
    const gap = (bottom - hz) * 0.22;
    d += ` L${f1(right)},${f1(y + gap)} L${f1(left)},${f1(y + gap)} Z`;
    out.push(`<path d="${d}" fill="${body(r)}" stroke="${line}" stroke-width="${f1(c.p.lw * 0.7)}"/>`);
    out.push(strokePath(spray, foam, Math.max(1.5, h * 0.16)));
  }
  return out.join('');
}
