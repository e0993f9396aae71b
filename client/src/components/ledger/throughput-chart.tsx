import { Bar, BarChart, CartesianGrid, LabelList, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { CollectionDashboard } from '../../api/dashboard';
import { formatCount } from '../../lib/format';
import { ChartFigure, INK, PATTERN_NAMES, PATTERN_WORDS, PatternDefs, PatternSwatch, RULE, patternId, tableClass, useSvgPrefix, weekLabel, weekWords } from './chart-kit';

/** At most this many editors get a pattern of their own; the rest are summed as "other editors". */
const SHOWN_EDITORS = PATTERN_NAMES.length - 1;

/**
 * Items approved per week, stacked by editor: each editor's part has its own fill pattern, named in the
 * legend, and the week's total is written above its bar. The table adds the subject decisions.
 */
export function ThroughputChart({ throughput, collectionName }: { throughput: CollectionDashboard['throughput']; collectionName: string }) {
  const prefix = useSvgPrefix();
  const totals = new Map<number, number>();
  for (const r of throughput.rows) totals.set(r.editorId, (totals.get(r.editorId) ?? 0) + r.approved + r.decisions);
  const ranked = [...throughput.editors].sort((a, b) => (totals.get(b.id) ?? 0) - (totals.get(a.id) ?? 0) || a.name.localeCompare(b.name));
  const shown = ranked.slice(0, SHOWN_EDITORS);
  const others = ranked.length > SHOWN_EDITORS;
  const groups = [...shown.map((e) => ({ key: `e${e.id}`, name: e.name, ids: [e.id] })), ...(others ? [{ key: 'others', name: 'Other editors', ids: ranked.slice(SHOWN_EDITORS).map((e) => e.id) }] : [])];

  const cell = (week: string, ids: number[], what: 'approved' | 'decisions') =>
    throughput.rows.filter((r) => r.week === week && ids.includes(r.editorId)).reduce((n, r) => n + r[what], 0);
  const data = throughput.weeks.map((week) => {
    const row: Record<string, string | number> = { week, total: 0 };
    for (const g of groups) {
      row[g.key] = cell(week, g.ids, 'approved');
      row.total = Number(row.total) + Number(row[g.key]);
    }
    return row;
  });
  // the total of a week is written above its topmost part that has a height
  const topGroup = data.map((row) => groups.reduce((top, g, i) => (Number(row[g.key]) > 0 ? i : top), -1));
  const approvedAll = data.reduce((n, r) => n + Number(r.total), 0);
  const decisionsAll = throughput.rows.reduce((n, r) => n + r.decisions, 0);
  const busiest = data.reduce<Record<string, string | number> | null>((best, r) => (best === null || Number(r.total) > Number(best.total) ? r : best), null);
  const summary =
    approvedAll === 0 && decisionsAll === 0
      ? `No editor approved an item or decided a subject in ${collectionName} in the last ${throughput.weeks.length} weeks.`
      : `Items of ${collectionName} approved per week in the last ${throughput.weeks.length} weeks, by editor: ${formatCount(approvedAll)} in all` +
        (busiest && Number(busiest.total) > 0 ? `, most in the ${weekWords(String(busiest.week))} (${formatCount(Number(busiest.total))})` : '') +
        `; ${formatCount(decisionsAll)} subject decisions besides.`;

  return (
    <ChartFigure
      title="Review throughput"
      summary={summary}
      legend={
        groups.length ? (
          <ul className="flex flex-wrap gap-x-6 gap-y-2 text-sm" aria-label="Editors">
            {groups.map((g, i) => (
              <li key={g.key} className="flex items-center gap-2">
                <PatternSwatch prefix={prefix} name={PATTERN_NAMES[i]!} />
                <span>
                  {g.name} <span className="text-muted">({PATTERN_WORDS[PATTERN_NAMES[i]!]})</span>
                </span>
              </li>
            ))}
          </ul>
        ) : null
      }
      table={
        <table className={tableClass}>
          <caption className="sr-only">Items approved and subject decisions per week and editor</caption>
          <thead>
            <tr>
              <th scope="col">Week</th>
              {groups.map((g) => (
                <th key={g.key} scope="col">
                  {g.name}: approved · decisions
                </th>
              ))}
              <th scope="col">All: approved · decisions</th>
            </tr>
          </thead>
          <tbody>
            {throughput.weeks.map((week) => (
              <tr key={week}>
                <th scope="row">{weekWords(week)}</th>
                {groups.map((g) => (
                  <td key={g.key} className="tabular-nums">
                    {formatCount(cell(week, g.ids, 'approved'))} · {formatCount(cell(week, g.ids, 'decisions'))}
                  </td>
                ))}
                <td className="tabular-nums font-bold">
                  {formatCount(cell(week, ranked.map((e) => e.id), 'approved'))} · {formatCount(cell(week, ranked.map((e) => e.id), 'decisions'))}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      }
    >
      {(a11y) => (
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={data} margin={{ top: 24, right: 16, bottom: 8, left: 8 }} {...a11y}>
            <PatternDefs prefix={prefix} />
            <CartesianGrid stroke={RULE} vertical={false} />
            <XAxis dataKey="week" tickFormatter={weekLabel} stroke={INK} tick={{ fill: INK, fontSize: 13 }} />
            <YAxis allowDecimals={false} stroke={INK} tick={{ fill: INK, fontSize: 13 }} width={44} />
            <Tooltip
              formatter={(value, name) => [formatCount(Number(value)), groups.find((g) => g.key === name)?.name ?? String(name)]}
              labelFormatter={(label) => weekWords(String(label))}
              contentStyle={{ border: `2px solid ${INK}`, borderRadius: 6 }}
            />
            {groups.map((g, i) => (
              <Bar key={g.key} dataKey={g.key} name={g.key} stackId="approved" fill={`url(#${patternId(prefix, PATTERN_NAMES[i]!)})`} stroke={INK} strokeWidth={1} isAnimationActive={false}>
                <LabelList
                  dataKey="total"
                  content={(props) => {
                    const index = Number(props.index);
                    if (topGroup[index] !== i) return null;
                    const x = Number(props.x) + Number(props.width) / 2;
                    return (
                      <text x={x} y={Number(props.y) - 6} textAnchor="middle" fill={INK} fontSize={13} fontWeight={700}>
                        {formatCount(Number(data[index]?.total ?? 0))}
                      </text>
                    );
                  }}
                />
              </Bar>
            ))}
          </BarChart>
        </ResponsiveContainer>
      )}
    </ChartFigure>
  );
}
