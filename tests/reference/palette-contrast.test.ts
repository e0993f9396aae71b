import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { projectRoot } from '../../server/src/config.ts';

// WCAG 2.2, definitions of "relative luminance" and "contrast ratio" (W3C Recommendation, 2023):
//   L = 0.2126 R + 0.7152 G + 0.0722 B, each channel c/255 linearised as c <= 0.04045 ? c/12.92 : ((c+0.055)/1.055)^2.4
//   contrast = (L1 + 0.05) / (L2 + 0.05), L1 the lighter.
// SC 1.4.3 asks 4.5:1 for body text; SC 1.4.11 asks 3:1 for UI component boundaries and focus indicators.
function luminance(hex: string): number {
  const m = /^#([0-9a-f]{6})$/i.exec(hex);
  if (!m?.[1]) throw new Error(`not a #rrggbb colour: ${hex}`);
  const [r, g, b] = [0, 2, 4].map((i) => {
    const c = parseInt(m[1]!.slice(i, i + 2), 16) / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  }) as [number, number, number];
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x) as [number, number];
  return (hi + 0.05) / (lo + 0.05);
}

const css = readFileSync(join(projectRoot, 'client', 'src', 'index.css'), 'utf8');
const palette = Object.fromEntries([...css.matchAll(/--color-([a-z-]+):\s*(#[0-9a-f]{6})\s*;/gi)].map((m) => [m[1], m[2]!.toLowerCase()]));

describe('contrast ratio formula (WCAG 2.2 definitions)', () => {
  it('reproduces the end points of the definition: black on white is 21:1, a colour on itself 1:1', () => {
    expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 10);
    expect(contrast('#1f6472', '#1f6472')).toBe(1);
  });
  it('reproduces widely cited values (from memory): #767676 on white ≈ 4.54:1 passes AA, #777777 ≈ 4.48:1 fails', () => {
    expect(contrast('#767676', '#ffffff')).toBeCloseTo(4.54, 2);
    expect(contrast('#777777', '#ffffff')).toBeCloseTo(4.48, 2);
  });
});

describe("Cartouche's palette (client/src/index.css) meets WCAG 2.2 AA", () => {
  it('defines the colours it is tested on', () => {
    for (const name of ['paper', 'raised', 'sunk', 'ink', 'muted', 'line', 'accent', 'on-accent']) expect(palette[name], name).toMatch(/^#/);
  });
  it.each([
    ['ink', 'paper'],
    ['ink', 'raised'],
    ['ink', 'sunk'],
    ['muted', 'paper'],
    ['muted', 'raised'],
    ['muted', 'sunk'],
    ['accent', 'paper'],
    ['accent', 'raised'],
    ['on-accent', 'accent'],
  ])('text %s on %s reaches 4.5:1 (SC 1.4.3)', (fg, bg) => {
    expect(contrast(palette[fg]!, palette[bg]!)).toBeGreaterThanOrEqual(4.5);
  });
  it.each([
    ['line', 'paper'],
    ['line', 'raised'],
    ['line', 'sunk'],
    ['accent', 'sunk'],
  ])('component boundary / focus ring %s on %s reaches 3:1 (SC 1.4.11)', (fg, bg) => {
    expect(contrast(palette[fg]!, palette[bg]!)).toBeGreaterThanOrEqual(3);
  });
});
