/**
 * Renders demo scenes to SVG and rasterises them with sharp (librsvg), so every demo scan is drawn
 * by the project itself. Only fonts installed on the machine are used (DejaVu Sans and Serif).
 */
import sharp from 'sharp';
import { drawSea, drawSky } from './draw-backdrop.ts';
import { drawElement } from './draw-elements.ts';
import { type DrawCtx, escapeXml, f1, strokePath, textWidthEm } from './draw-kit.ts';
import { renderChart, renderOrnament } from './draw-sheets.ts';
import { ENGRAVING_INK, ENGRAVING_PAPER, LITHO_PALETTES, type LithoPalette, type Painter, engravingPainter, lithoPainter, photoPainter, toneRgb } from './paint.ts';
import { type Rng, mulberry32, range } from './prng.ts';
import type { PosterScene, SceneSpec, ViewPicture, ViewScene } from './scene.ts';
import type { DemoItem } from './scenario.ts';

export interface RenderOptions {
  width?: number;
  height?: number;
}

/** default pixel size: long side between 900 and 1199 px, chosen by the scene seed */
export function sceneSize(scene: SceneSpec, opts: RenderOptions = {}): { width: number; height: number } {
  if (opts.width && opts.height) return { width: Math.round(opts.width), height: Math.round(opts.height) };
  if (opts.width) return { width: Math.round(opts.width), height: Math.round(opts.width / scene.aspect) };
  if (opts.height) return { width: Math.round(opts.height * scene.aspect), height: Math.round(opts.height) };
  const long = 900 + (scene.seed % 300);
  return scene.aspect >= 1
    ? { width: long, height: Math.round(long / scene.aspect) }
    : { width: Math.round(long * scene.aspect), height: long };
}

function ids(seed: number): (name: string) => string {
  const prefix = `s${(seed >>> 0).toString(36)}`;
  return (name) => `${prefix}-${name}`;
}

function drawPicture(c: DrawCtx, pic: ViewPicture, clipId: string): string {
  const parts: string[] = [];
  parts.push(drawSky(c, pic.weather));
  parts.push(drawSea(c, pic.sea, pic.weather));
  for (const el of pic.elements) parts.push(drawElement(c, el));
  if (c.p.style === 'photograph' && pic.weather === 'fog') {
    const g = c.id('fog');
    c.defs.push(
      `<linearGradient id="${g}" gradientUnits="userSpaceOnUse" x1="0" y1="${f1(c.y0)}" x2="0" y2="${f1(c.y0 + c.H)}"><stop offset="0" stop-color="${c.p.tone(0.9)}" stop-opacity="0.4"/><stop offset="0.6" stop-color="${c.p.tone(0.88)}" stop-opacity="0.25"/><stop offset="1" stop-color="${c.p.tone(0.85)}" stop-opacity="0.05"/></linearGradient>`,
    );
    parts.push(`<rect x="${f1(c.x0)}" y="${f1(c.y0)}" width="${f1(c.W)}" height="${f1(c.H)}" fill="url(#${g})"/>`);
  }
  c.defs.push(`<clipPath id="${clipId}"><rect x="${f1(c.x0)}" y="${f1(c.y0)}" width="${f1(c.W)}" height="${f1(c.H)}"/></clipPath>`);
  return `<g clip-path="url(#${clipId})">${parts.join('')}</g>`;
}

function makeCtx(x0: number, y0: number, W: number, H: number, pic: ViewPicture, p: Painter, rng: Rng, id: (n: string) => string, defs: string[]): DrawCtx {
  return { x0, y0, W, H, horizon: y0 + pic.horizon * H, p, rng, weather: pic.weather, sea: pic.sea, id, defs };
}

function renderEngravingView(scene: ViewScene, W: number, H: number, rng: Rng, id: (n: string) => string): string {
  const defs: string[] = [];
  const m = Math.min(W, H) * 0.04;
  const pad = Math.min(W, H) * 0.035;
  const letterH = scene.lettering ? H * 0.08 : 0;
  const x0 = m + pad;
  const y0 = m + pad;
  const pw = W - 2 * (m + pad);
  const ph = H - 2 * (m + pad) - letterH;
  const lw = Math.max(1, ph / 520);
  const p = engravingPainter(lw, Math.max(2.4, ph / 260), id('h'));
  defs.push(...p.defs);
  const c = makeCtx(x0, y0, pw, ph, scene, p, rng, id, defs);
  const picture = drawPicture(c, scene, id('clip'));
  const toning = id('toning');
  defs.push(
    `<radialGradient id="${toning}" cx="0.5" cy="0.45" r="0.75"><stop offset="0.5" stop-color="#a8895a" stop-opacity="0"/><stop offset="1" stop-color="#a8895a" stop-opacity="0.35"/></radialGradient>`,
  );
  const fox = id('fox');
  defs.push(`<radialGradient id="${fox}"><stop offset="0" stop-color="#9a7442" stop-opacity="0.35"/><stop offset="1" stop-color="#9a7442" stop-opacity="0"/></radialGradient>`);
  const out: string[] = [];
  out.push(`<rect width="${W}" height="${H}" fill="${ENGRAVING_PAPER}"/>`);
  out.push(`<rect width="${W}" height="${H}" fill="url(#${toning})"/>`);
  // foxing: a few faint brown spots on the paper
  for (let i = 0, n = 3 + (scene.seed % 5); i < n; i++) {
    const r = Math.min(W, H) * range(rng, 0.006, 0.03);
    out.push(`<circle cx="${f1(range(rng, 0, W))}" cy="${f1(range(rng, 0, H))}" r="${f1(r)}" fill="url(#${fox})"/>`);
  }
  // plate mark: the slightly darker, pressed area of the plate
  out.push(`<rect x="${f1(m)}" y="${f1(m)}" width="${f1(W - 2 * m)}" height="${f1(H - 2 * m)}" fill="#e6dabb" opacity="0.7" stroke="#a8966f" stroke-width="${f1(lw * 1.5)}"/>`);
  out.push(`<rect x="${f1(m + lw * 2)}" y="${f1(m + lw * 2)}" width="${f1(W - 2 * m)}" height="${f1(H - 2 * m)}" fill="none" stroke="#fbf5e4" stroke-width="${f1(lw)}" opacity="0.8"/>`);
  out.push(picture);
  out.push(`<rect x="${f1(x0)}" y="${f1(y0)}" width="${f1(pw)}" height="${f1(ph)}" fill="none" stroke="${ENGRAVING_INK}" stroke-width="${f1(lw * 1.6)}"/>`);
  out.push(`<rect x="${f1(x0 - lw * 4)}" y="${f1(y0 - lw * 4)}" width="${f1(pw + lw * 8)}" height="${f1(ph + lw * 8)}" fill="none" stroke="${ENGRAVING_INK}" stroke-width="${f1(lw * 0.6)}"/>`);
  if (scene.lettering) {
    const fs = Math.min(letterH * 0.5, (pw * 0.85) / textWidthEm(scene.lettering.toUpperCase(), false) / 1.08);
    out.push(
      `<text x="${f1(W / 2)}" y="${f1(y0 + ph + letterH * 0.66)}" font-family="DejaVu Serif" font-size="${f1(fs)}" letter-spacing="${f1(fs * 0.08)}" text-anchor="middle" fill="${ENGRAVING_INK}">${escapeXml(scene.lettering.toUpperCase())}</text>`,
    );
  }
  return `<defs>${defs.join('')}</defs>${out.join('')}`;
}

function photoFinish(defs: string[], id: (n: string) => string, seed: number, tone: ReturnType<typeof toneRgb>, x: number, y: number, w: number, h: number): string {
  const grain = id('grain');
  const [r, g, b] = tone.map((v) => (v / 255).toFixed(3));
  defs.push(
    `<filter id="${grain}" x="0" y="0" width="100%" height="100%"><feTurbulence type="fractalNoise" baseFrequency="0.9" numOctaves="1" seed="${seed % 1000}"/>` +
      `<feColorMatrix type="matrix" values="0 0 0 0 ${r}  0 0 0 0 ${g}  0 0 0 0 ${b}  2.2 0 0 0 -1.0"/></filter>`,
  );
  const vig = id('vignette');
  defs.push(
    `<radialGradient id="${vig}" cx="0.5" cy="0.5" r="0.72"><stop offset="0.55" stop-color="rgb(${tone.join(',')})" stop-opacity="0"/><stop offset="1" stop-color="rgb(${tone.join(',')})" stop-opacity="0.62"/></radialGradient>`,
  );
  return (
    `<rect x="${f1(x)}" y="${f1(y)}" width="${f1(w)}" height="${f1(h)}" fill="url(#${vig})"/>` +
    `<rect x="${f1(x)}" y="${f1(y)}" width="${f1(w)}" height="${f1(h)}" filter="url(#${grain})" opacity="0.55"/>`
  );
}

function renderPhotoView(scene: ViewScene, W: number, H: number, rng: Rng, id: (n: string) => string): string {
  const defs: string[] = [];
  const tone = scene.tone ?? 'sepia';
  const slide = scene.mount === 'lantern-slide';
  const out: string[] = [];
  const dark = toneRgb(tone, 0.03);
  let x0 = 0;
  let y0 = 0;
  let pw = W;
  let ph = H;
  if (slide) {
    x0 = W * 0.1;
    y0 = H * 0.17;
    pw = W - 2 * x0;
    ph = H - y0 - H * 0.09;
    out.push(`<rect width="${W}" height="${H}" fill="rgb(${dark.join(',')})"/>`);
  }
  const lw = Math.max(1, ph / 560);
  const p = photoPainter(tone, lw, scene.weather === 'fog' ? 0.25 : 0);
  const c = makeCtx(x0, y0, pw, ph, scene, p, rng, id, defs);
  defs.push(`<filter id="${id('smokeblur')}" x="-30%" y="-30%" width="160%" height="160%"><feGaussianBlur stdDeviation="${f1(ph * 0.01)}"/></filter>`);
  const picture = drawPicture(c, scene, id('clip'));
  if (slide) {
    const clip = id('window');
    const r = Math.min(pw, ph) * 0.06;
    defs.push(`<clipPath id="${clip}"><rect x="${f1(x0)}" y="${f1(y0)}" width="${f1(pw)}" height="${f1(ph)}" rx="${f1(r)}"/></clipPath>`);
    out.push(`<g clip-path="url(#${clip})">${picture}${photoFinish(defs, id, scene.seed, dark, x0, y0, pw, ph)}</g>`);
    // paper label with the slide title, and the white thumb spot
    const label = scene.label ?? '';
    const fs = Math.min(H * 0.045, (W * 0.7) / Math.max(1, textWidthEm(label, false)));
    const lwid = textWidthEm(label, false) * fs + fs * 2;
    const paper = '#efe6cf';
    out.push(`<rect x="${f1((W - lwid) / 2)}" y="${f1(H * 0.045)}" width="${f1(lwid)}" height="${f1(fs * 1.8)}" fill="${paper}" stroke="#b7a680" stroke-width="1"/>`);
    out.push(
      `<text x="${f1(W / 2)}" y="${f1(H * 0.045 + fs * 1.27)}" font-family="DejaVu Serif" font-size="${f1(fs)}" text-anchor="middle" fill="#2a2420">${escapeXml(label)}</text>`,
    );
    out.push(`<circle cx="${f1(W * 0.05)}" cy="${f1(H * 0.95)}" r="${f1(W * 0.018)}" fill="#f3efe4"/>`);
    out.push(`<rect x="1.5" y="1.5" width="${W - 3}" height="${H - 3}" fill="none" stroke="#4a4640" stroke-width="3"/>`);
  } else {
    out.push(picture);
    out.push(photoFinish(defs, id, scene.seed, dark, 0, 0, W, H));
    // dark, uneven emulsion edge of the glass plate
    const e = Math.min(W, H) * 0.022;
    const jag = (n: number, a: number) => range(rng, -a, a) + n;
    let inner = `M${f1(jag(e, e * 0.4))},${f1(jag(e, e * 0.4))}`;
    const steps = 24;
    for (let i = 1; i <= steps; i++) inner += ` L${f1((W * i) / steps)},${f1(jag(e, e * 0.5))}`;
    for (let i = 1; i <= steps; i++) inner += ` L${f1(W - jag(e, e * 0.5))},${f1((H * i) / steps)}`;
    for (let i = steps - 1; i >= 0; i--) inner += ` L${f1((W * i) / steps)},${f1(H - jag(e, e * 0.5))}`;
    for (let i = steps - 1; i >= 0; i--) inner += ` L${f1(jag(e, e * 0.5))},${f1((H * i) / steps)}`;
    out.push(`<path d="M-2,-2 H${W + 2} V${H + 2} H-2 Z ${inner} Z" fill="rgb(${dark.join(',')})" fill-rule="evenodd" opacity="0.9"/>`);
    // a chipped corner and a few scratches
    const corner = Math.floor(range(rng, 0, 4));
    const cs = Math.min(W, H) * range(rng, 0.04, 0.08);
    const cxs = corner % 2 === 0 ? 0 : W;
    const cys = corner < 2 ? 0 : H;
    const sx = corner % 2 === 0 ? 1 : -1;
    const sy = corner < 2 ? 1 : -1;
    out.push(`<path d="M${cxs},${cys} l${f1(sx * cs)},0 l${f1(-sx * cs * 0.7)},${f1(sy * cs * 0.5)} l${f1(-sx * cs * 0.3)},${f1(sy * cs * 0.5)} Z" fill="#f4f1ea"/>`);
    let scratches = '';
    for (let i = 0; i < 3; i++) {
      const ax = range(rng, 0.1, 0.9) * W;
      const ay = range(rng, 0.1, 0.9) * H;
      const l = Math.min(W, H) * range(rng, 0.04, 0.12);
      scratches += `M${f1(ax)},${f1(ay)} q${f1(range(rng, -0.3, 0.3) * l)},${f1(l * 0.5)} ${f1(range(rng, -0.2, 0.2) * l)},${f1(l)} `;
    }
    out.push(strokePath(scratches, `rgb(${toneRgb(tone, 0.95).join(',')})`, 0.8, 'opacity="0.35"'));
  }
  return `<defs>${defs.join('')}</defs>${out.join('')}`;
}

function fitText(text: string, maxWidth: number, maxSize: number, bold: boolean, condensed: boolean): number {
  return Math.min(maxSize, maxWidth / Math.max(1, textWidthEm(text, bold, condensed)));
}

function renderPoster(scene: PosterScene, W: number, H: number, rng: Rng, id: (n: string) => string): string {
  const defs: string[] = [];
  const pal = LITHO_PALETTES[scene.palette % LITHO_PALETTES.length] as LithoPalette;
  const m = W * 0.055;
  const out: string[] = [`<rect width="${W}" height="${H}" fill="${pal.paper}"/>`];
  // title band
  const bandH = H * 0.2;
  out.push(`<rect x="${f1(m)}" y="${f1(m)}" width="${f1(W - 2 * m)}" height="${f1(bandH)}" fill="${pal.ink}"/>`);
  const words = scene.title.split(' ');
  const lines: string[] = [];
  if (textWidthEm(scene.title, true, true) * (bandH * 0.5) > W - 4 * m && words.length > 1) {
    const half = Math.ceil(words.length / 2);
    lines.push(words.slice(0, half).join(' '), words.slice(half).join(' '));
  } else lines.push(scene.title);
  const titleFs = Math.min(...lines.map((l) => fitText(l, W - 4 * m, (bandH * 0.78) / lines.length, true, true)));
  lines.forEach((line, i) => {
    const y = m + bandH / 2 + (i - (lines.length - 1) / 2) * titleFs * 1.02 + titleFs * 0.36;
    out.push(
      `<text x="${f1(W / 2)}" y="${f1(y)}" font-family="DejaVu Sans Condensed" font-weight="bold" font-size="${f1(titleFs)}" text-anchor="middle" fill="${pal.paper}" letter-spacing="${f1(titleFs * 0.02)}">${escapeXml(line)}</text>`,
    );
  });
  // picture panel
  const px0 = m;
  const py0 = m + bandH + H * 0.025;
  const pw = W - 2 * m;
  const ph = H * 0.52;
  const lw = Math.max(1.5, ph / 420);
  const p = lithoPainter(pal, lw);
  const c = makeCtx(px0, py0, pw, ph, scene.picture, p, rng, id, defs);
  out.push(drawPicture(c, scene.picture, id('clip')));
  out.push(`<rect x="${f1(px0)}" y="${f1(py0)}" width="${f1(pw)}" height="${f1(ph)}" fill="none" stroke="${pal.ink}" stroke-width="${f1(lw * 3)}"/>`);
  // lower lettering
  const subY = py0 + ph + H * 0.072;
  const subFs = fitText(scene.subtitle, W - 2.6 * m, H * 0.05, true, true);
  out.push(
    `<text x="${f1(W / 2)}" y="${f1(subY)}" font-family="DejaVu Sans Condensed" font-weight="bold" font-size="${f1(subFs)}" text-anchor="middle" fill="${pal.accent}">${escapeXml(scene.subtitle)}</text>`,
  );
  const footFs = fitText(scene.footer, W - 3 * m, H * 0.03, false, false);
  out.push(`<rect x="${f1(m)}" y="${f1(H - m - H * 0.06)}" width="${f1(W - 2 * m)}" height="${f1(H * 0.06)}" fill="${pal.accent}"/>`);
  out.push(
    `<text x="${f1(W / 2)}" y="${f1(H - m - H * 0.03 + footFs * 0.36)}" font-family="DejaVu Serif" font-size="${f1(footFs)}" text-anchor="middle" fill="${pal.paper}">${escapeXml(scene.footer)}</text>`,
  );
  return `<defs>${defs.join('')}</defs>${out.join('')}`;
}

/** Draws a scene as a standalone SVG document. Pure: the same scene gives the same SVG. */
export function renderScene(scene: SceneSpec, opts: RenderOptions = {}): string {
  const { width: W, height: H } = sceneSize(scene, opts);
  const rng = mulberry32(scene.seed);
  const id = ids(scene.seed);
  let body: string;
  switch (scene.layout) {
    case 'view':
      body = scene.style === 'engraving' ? renderEngravingView(scene, W, H, rng, id) : renderPhotoView(scene, W, H, rng, id);
      break;
    case 'poster':
      body = renderPoster(scene, W, H, rng, id);
      break;
    case 'chart':
      body = renderChart(scene, W, H, rng, id);
      break;
    case 'ornament':
      body = renderOrnament(scene, W, H, rng, id);
      break;
  }
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}">${body}</svg>`;
}

export interface RenderedImage {
  data: Buffer;
  mime: 'image/jpeg' | 'image/png';
  width: number;
  height: number;
}

/**
 * Rasterises an item's scene. Engravings and photographs become JPEG (quality 82), as scans
 * usually are; flat-colour prints (posters, charts) become PNG. Photographs get a slight lens
 * softness here (a Gaussian blur in libvips is much quicker than an SVG filter in librsvg).
 */
export async function renderItemImage(item: DemoItem, medium: string, opts: RenderOptions = {}): Promise<RenderedImage> {
  const svg = renderScene(item.scene, opts);
  const { width, height } = sceneSize(item.scene, opts);
  const jpeg = medium === 'engraving' || medium === 'photograph';
  let pipeline = sharp(Buffer.from(svg), { density: 72 }).flatten({ background: '#ffffff' });
  if (item.scene.style === 'photograph') pipeline = pipeline.blur(Math.max(0.5, Math.min(width, height) / 1100));
  const data = jpeg ? await pipeline.jpeg({ quality: 82, chromaSubsampling: '4:2:0' }).toBuffer() : await pipeline.png({ compressionLevel: 8 }).toBuffer();
  return { data, mime: jpeg ? 'image/jpeg' : 'image/png', width, height };
}
