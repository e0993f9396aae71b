import { useId, useSyncExternalStore, type ReactNode } from 'react';

/**
 * What the dashboard's charts share: fills that differ by pattern as well as by tone (so no series is told
 * apart by colour alone), line dashes and marker shapes, and the frame that gives every chart a heading,
 * a sentence saying what it shows, and the same figures as a table.
 */

export const INK = 'var(--color-ink)';
export const ACCENT = 'var(--color-accent)';
export const MUTED = 'var(--color-muted)';
export const RAISED = 'var(--color-raised)';
export const RULE = 'var(--color-rule)';

export const PATTERN_NAMES = ['solid', 'diagonal', 'dots', 'crossed', 'horizontal', 'vertical'] as const;
export type PatternName = (typeof PATTERN_NAMES)[number];

/** How a pattern reads in a legend or table (the words carry the meaning; the swatch repeats it). */
export const PATTERN_WORDS: Record<PatternName, string> = {
  solid: 'solid',
  diagonal: 'diagonal stripes',
  dots: 'dots',
  crossed: 'cross-hatched',
  horizontal: 'horizontal stripes',
  vertical: 'vertical stripes',
};

const WIDE = '(min-width: 40rem)';
/** Whether the screen is wide enough for labels written beside a chart (on a narrow one the legend names the lines). */
export function useWideScreen(): boolean {
  return useSyncExternalStore(
    (onChange) => {
      const query = window.matchMedia(WIDE);
      query.addEventListener('change', onChange);
      return () => query.removeEventListener('change', onChange);
    },
    () => window.matchMedia(WIDE).matches,
    () => true,
  );
}

/** A unique prefix for SVG ids on this page (useId's characters are not all safe inside url(#…)). */
export function useSvgPrefix(): string {
  return `p${useId().replace(/[^a-zA-Z0-9]/g, '')}`;
}

export function patternId(prefix: string, name: PatternName): string {
  return `${prefix}-${name}`;
}

/** The fill patterns, for the <defs> of a chart. */
export function PatternDefs({ prefix }: { prefix: string }) {
  const size = 8;
  return (
    <defs>
      <pattern id={patternId(prefix, 'solid')} width={size} height={size} patternUnits="userSpaceOnUse">
        <rect width={size} height={size} fill={ACCENT} />
      </pattern>
      <pattern id={patternId(prefix, 'diagonal')} width={size} height={size} patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
        <rect width={size} height={size} fill={RAISED} />
        <rect width="3.5" height={size} fill={INK} />
      </pattern>
      <pattern id={patternId(prefix, 'dots')} width={size} height={size} patternUnits="userSpaceOnUse">
        <rect width={size} height={size} fill={RAISED} />
        <circle cx="4" cy="4" r="2.2" fill={ACCENT} />
      </pattern>
      <pattern id={patternId(prefix, 'crossed')} width={size} height={size} patternUnits="userSpaceOnUse">
        <rect width={size} height={size} fill={RAISED} />
        <path d="M0 0L8 8M8 0L0 8" stroke={INK} strokeWidth="1.5" />
      </pattern>
      <pattern id={patternId(prefix, 'horizontal')} width={size} height={size} patternUnits="userSpaceOnUse">
        <rect width={size} height={size} fill={RAISED} />
        <rect y="2" width={size} height="3" fill={MUTED} />
      </pattern>
      <pattern id={patternId(prefix, 'vertical')} width={size} height={size} patternUnits="userSpaceOnUse">
        <rect width={size} height={size} fill={RAISED} />
        <rect x="2" width="3" height={size} fill={ACCENT} />
      </pattern>
    </defs>
  );
}

/** A legend swatch of a pattern, decorative: its name is written next to it. */
export function PatternSwatch({ prefix, name }: { prefix: string; name: PatternName }) {
  return (
    <svg width="22" height="16" viewBox="0 0 22 16" aria-hidden="true" focusable="false" className="shrink-0">
      <PatternDefs prefix={`${prefix}s`} />
      <rect x="0.75" y="0.75" width="20.5" height="14.5" fill={`url(#${patternId(`${prefix}s`, name)})`} stroke={INK} strokeWidth="1.5" />
    </svg>
  );
}

export const LINE_STYLES = [
  { dash: undefined, marker: 'circle', words: 'solid line, round markers', stroke: INK },
  { dash: '9 5', marker: 'square', words: 'dashed line, square markers', stroke: ACCENT },
  { dash: '2 4', marker: 'triangle', words: 'dotted line, triangle markers', stroke: INK },
  { dash: '12 4 3 4', marker: 'diamond', words: 'dash-dot line, diamond markers', stroke: ACCENT },
] as const;
export type MarkerShape = (typeof LINE_STYLES)[number]['marker'];

export function Marker({ shape, x, y, stroke }: { shape: MarkerShape; x: number; y: number; stroke: string }) {
  const common = { fill: RAISED, stroke, strokeWidth: 2 };
  switch (shape) {
    case 'circle':
      return <circle cx={x} cy={y} r={4.5} {...common} />;
    case 'square':
      return <rect x={x - 4} y={y - 4} width={8} height={8} {...common} />;
    case 'triangle':
      return <path d={`M${x} ${y - 5.5}L${x + 5} ${y + 4}L${x - 5} ${y + 4}Z`} {...common} />;
    case 'diamond':
      return <path d={`M${x} ${y - 5.5}L${x + 5.5} ${y}L${x} ${y + 5.5}L${x - 5.5} ${y}Z`} {...common} />;
  }
}

/** A legend sample of a line style, decorative. */
export function LineSwatch({ index }: { index: number }) {
  const style = LINE_STYLES[index % LINE_STYLES.length]!;
  return (
    <svg width="34" height="16" viewBox="0 0 34 16" aria-hidden="true" focusable="false" className="shrink-0">
      <line x1="1" y1="8" x2="33" y2="8" stroke={style.stroke} strokeWidth="2.5" strokeDasharray={style.dash} />
      <Marker shape={style.marker} x={17} y={8} stroke={style.stroke} />
    </svg>
  );
}

/** `2026-11-23` → "23 Nov" (the week's Monday). */
export function weekLabel(week: string): string {
  const d = new Date(`${week}T00:00:00Z`);
  return new Intl.DateTimeFormat(undefined, { day: 'numeric', month: 'short', timeZone: 'UTC' }).format(d);
}

/** `2026-11-23` → "week of 23 November 2026". */
export function weekWords(week: string): string {
  const d = new Date(`${week}T00:00:00Z`);
  return `week of ${new Intl.DateTimeFormat(undefined, { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' }).format(d)}`;
}

export const percentWords = (share: number | null) => (share === null ? 'no items' : new Intl.NumberFormat(undefined, { style: 'percent', maximumFractionDigits: 1 }).format(share));

interface ChartFigureProps {
  title: string;
  /** one or two sentences that say what the chart shows: the text alternative of the picture */
  summary: ReactNode;
  legend?: ReactNode;
  /** the same figures as a table */
  table: ReactNode;
  /** the chart, given the attributes that name it (role img, labelled by the heading and the summary) */
  children: (a11y: { role: 'img'; 'aria-labelledby': string }) => ReactNode;
  /** the chart's pixel height */
  height?: number;
}

/**
 * A chart with its heading, its summary (the picture's text alternative, referenced by the chart), an
 * optional legend written out in words, and a disclosure with the figures as a table.
 */
export function ChartFigure({ title, summary, legend, table, children, height = 280 }: ChartFigureProps) {
  const id = useSvgPrefix();
  return (
    <section aria-labelledby={`${id}-title`} className="min-w-0 space-y-3">
      <h3 id={`${id}-title`} className="text-xl font-bold">
        {title}
      </h3>
      <p id={`${id}-summary`} className="max-w-prose">
        {summary}
      </p>
      {legend}
      <div className="w-full" style={{ height }} data-chart={title}>
        {children({ role: 'img', 'aria-labelledby': `${id}-title ${id}-summary` })}
      </div>
      <details className="rounded-card border border-rule bg-paper">
        <summary className="flex min-h-11 cursor-pointer items-center px-4 font-bold">Figures as a table: {title.toLowerCase()}</summary>
        <div className="overflow-x-auto px-4 pb-4">{table}</div>
      </details>
    </section>
  );
}

/** Shared table look for the figures. */
export const tableClass = 'w-full border-collapse text-left text-sm [&_td]:border-t [&_td]:border-rule [&_td]:px-2 [&_td]:py-1.5 [&_th]:px-2 [&_th]:py-1.5 [&_thead_th]:font-bold [&_tbody_th]:font-normal [&_tbody_th]:border-t [&_tbody_th]:border-rule';
