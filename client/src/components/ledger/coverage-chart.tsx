import { CartesianGrid, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { CoverageOverTime } from '../../api/dashboard';
import { formatCount } from '../../lib/format';
import { ChartFigure, INK, LINE_STYLES, LineSwatch, Marker, RULE, percentWords, tableClass, useWideScreen, weekLabel, weekWords } from './chart-kit';

/**
 * Coverage over time, one line per collection: each line has its own dash and marker shape, and its last
 * point is labelled with the collection's name and figure, so no line is known by colour alone.
 */
export function CoverageChart({ data }: { data: CoverageOverTime }) {
  const wide = useWideScreen();
  const series = data.series;
  const rows = data.weeks.map((week, w) => {
    const row: Record<string, string | number | null> = { week };
    series.forEach((s, i) => (row[`c${i}`] = s.points[w]?.coverage ?? null));
    return row;
  });
  const last = data.weeks.length - 1;
  const labelShift = endLabelShifts(series.map((s) => s.points[last]?.coverage ?? null));
  const summary =
    series.length === 0
      ? 'There is no collection yet.'
      : `Share of each collection’s items whose text alternative an editor has approved, at the end of each of the last ${data.weeks.length} weeks. Now: ` +
        series.map((s) => `${s.name} ${percentWords(s.points[last]?.coverage ?? null)} (${formatCount(s.points[last]?.approved ?? 0)} of ${formatCount(s.points[last]?.items ?? 0)})`).join('; ') +
        '.';

  return (
    <ChartFigure
      title="Coverage over time"
      summary={summary}
      height={300}
      legend={
        <ul className="flex flex-wrap gap-x-6 gap-y-2 text-sm" aria-label="Lines">
          {series.map((s, i) => (
            <li key={s.collectionId} className="flex items-center gap-2">
              <LineSwatch index={i} />
              <span>
                {s.name} <span className="text-muted">({LINE_STYLES[i % LINE_STYLES.length]!.words})</span>
              </span>
            </li>
          ))}
        </ul>
      }
      table={
        <table className={tableClass}>
          <caption className="sr-only">Coverage per week and collection: approved of all items</caption>
          <thead>
            <tr>
              <th scope="col">Week</th>
              {series.map((s) => (
                <th key={s.collectionId} scope="col">
                  {s.name}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {data.weeks.map((week, w) => (
              <tr key={week}>
                <th scope="row">{weekWords(week)}</th>
                {series.map((s) => {
                  const p = s.points[w]!;
                  return (
                    <td key={s.collectionId} className="tabular-nums">
                      {p.items === 0 ? 'no items' : `${percentWords(p.coverage)} (${formatCount(p.approved)} of ${formatCount(p.items)})`}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      }
    >
      {(a11y) => (
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={rows} margin={{ top: 16, right: wide ? 190 : 12, bottom: 8, left: 0 }} {...a11y}>
            <CartesianGrid stroke={RULE} vertical={false} />
            <XAxis dataKey="week" tickFormatter={weekLabel} stroke={INK} tick={{ fill: INK, fontSize: 13 }} />
            <YAxis domain={[0, 1]} ticks={[0, 0.25, 0.5, 0.75, 1]} tickFormatter={(v: number) => percentWords(v)} stroke={INK} tick={{ fill: INK, fontSize: 13 }} width={56} />
            <Tooltip
              formatter={(value, name) => [percentWords(typeof value === 'number' ? value : null), series[Number(String(name).slice(1))]?.name ?? String(name)]}
              labelFormatter={(label) => weekWords(String(label))}
              contentStyle={{ border: `2px solid ${INK}`, borderRadius: 6 }}
            />
            {series.map((s, i) => {
              const style = LINE_STYLES[i % LINE_STYLES.length]!;
              return (
                <Line
                  key={s.collectionId}
                  dataKey={`c${i}`}
                  name={`c${i}`}
                  type="linear"
                  stroke={style.stroke}
                  strokeWidth={2.5}
                  strokeDasharray={style.dash}
                  connectNulls={false}
                  isAnimationActive={false}
                  dot={(props: { cx?: number; cy?: number; index?: number; value?: unknown }) =>
                    props.cx === undefined || props.cy === undefined || props.value === null ? <g key={`d${i}-${props.index}`} /> : <Marker key={`d${i}-${props.index}`} shape={style.marker} x={props.cx} y={props.cy} stroke={style.stroke} />
                  }
                  label={(props: { x?: number | string; y?: number | string; index?: number; value?: unknown }) =>
                    wide && props.index === last && typeof props.value === 'number' ? (
                      <text key={`l${i}`} x={Number(props.x) + 10} y={Number(props.y) + 4 + (labelShift[i] ?? 0)} fill={INK} fontSize={13} fontWeight={700}>
                        {s.name.length > 18 ? `${s.name.slice(0, 17)}…` : s.name} {percentWords(props.value)}
                      </text>
                    ) : (
                      <g key={`l${i}-${props.index}`} />
                    )
                  }
                />
              );
            })}
          </LineChart>
        </ResponsiveContainer>
      )}
    </ChartFigure>
  );
}

/** Height of the plotting area in pixels (the figure's 300 less the margins and the week axis), for label spacing. */
const PLOT_HEIGHT = 246;
/** Least distance between two end labels, in pixels (a 13 px line of text and a little air). */
const LABEL_GAP = 16;

/**
 * How far to move each line's end label down (pixels) so that no two overlap: labels are taken from the top of
 * the chart down, and each is pushed below the one above it when closer than LABEL_GAP. Lines without a last
 * value get no label and no shift.
 */
export function endLabelShifts(values: ReadonlyArray<number | null>): number[] {
  const order = values.map((v, i) => ({ i, y: v === null ? null : (1 - v) * PLOT_HEIGHT })).filter((e): e is { i: number; y: number } => e.y !== null).sort((a, b) => a.y - b.y || a.i - b.i);
  const shifts = values.map(() => 0);
  let previous = -Infinity;
  for (const e of order) {
    const y = Math.max(e.y, previous + LABEL_GAP);
    shifts[e.i] = y - e.y;
    previous = y;
  }
  return shifts;
}
