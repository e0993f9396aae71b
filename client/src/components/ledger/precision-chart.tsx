import { Bar, BarChart, CartesianGrid, LabelList, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { SubjectPrecision } from '../../api/dashboard';
import { formatCount } from '../../lib/format';
import { ChartFigure, INK, PatternDefs, RULE, patternId, percentWords, tableClass, useSvgPrefix, useWideScreen } from './chart-kit';

const decidedWords = (s: SubjectPrecision) => `${formatCount(s.accepted)} of ${formatCount(s.accepted + s.rejected)}`;

/**
 * Suggestion precision per subject: of the suggestions editors decided, the share they accepted. Each bar
 * is labelled with its figure and counts; subjects with nothing decided yet are listed, not drawn.
 */
export function PrecisionChart({ subjects }: { subjects: SubjectPrecision[] }) {
  const prefix = useSvgPrefix();
  const wide = useWideScreen();
  const decided = subjects.filter((s) => s.precision !== null);
  const undecided = subjects.filter((s) => s.precision === null);
  const data = decided.map((s) => ({ label: s.label, precision: s.precision, text: `${percentWords(s.precision)} (${decidedWords(s)})`, short: percentWords(s.precision) }));
  const summary =
    decided.length === 0
      ? 'No suggestion has been decided yet, so there is no precision to show.'
      : `Of the suggestions editors decided, the share they accepted, per subject: ` + decided.map((s) => `${s.label} ${percentWords(s.precision)} (${decidedWords(s)})`).join('; ') + '.' +
        (undecided.length ? ` Nothing decided yet for ${undecided.map((s) => s.label).join(', ')}.` : '');

  return (
    <ChartFigure
      title="Suggestion precision by subject"
      summary={summary}
      height={Math.max(120, 40 * decided.length + 48)}
      table={
        <table className={tableClass}>
          <caption className="sr-only">Suggestions accepted, rejected, added by editors and still waiting, per subject</caption>
          <thead>
            <tr>
              <th scope="col">Subject</th>
              <th scope="col">Precision</th>
              <th scope="col">Accepted</th>
              <th scope="col">Rejected</th>
              <th scope="col">Added by editors</th>
              <th scope="col">Waiting for review</th>
            </tr>
          </thead>
          <tbody>
            {subjects.map((s) => (
              <tr key={s.subjectId}>
                <th scope="row">
                  {s.label}
                  {s.kind === 'form' ? <span className="text-muted"> (form)</span> : null}
                </th>
                <td className="tabular-nums">{s.precision === null ? 'nothing decided' : percentWords(s.precision)}</td>
                <td className="tabular-nums">{formatCount(s.accepted)}</td>
                <td className="tabular-nums">{formatCount(s.rejected)}</td>
                <td className="tabular-nums">{formatCount(s.added)}</td>
                <td className="tabular-nums">{formatCount(s.waiting)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      }
    >
      {(a11y) =>
        decided.length === 0 ? (
          <p className="text-muted">Nothing to draw yet.</p>
        ) : (
          <ResponsiveContainer width="100%" height="100%">
            <BarChart data={data} layout="vertical" margin={{ top: 4, right: wide ? 140 : 96, bottom: 4, left: 0 }} {...a11y}>
              <PatternDefs prefix={prefix} />
              <CartesianGrid stroke={RULE} horizontal={false} />
              <XAxis type="number" domain={[0, 1]} ticks={[0, 0.25, 0.5, 0.75, 1]} tickFormatter={(v: number) => percentWords(v)} stroke={INK} tick={{ fill: INK, fontSize: 13 }} />
              <YAxis type="category" dataKey="label" width={wide ? 140 : 90} stroke={INK} tick={{ fill: INK, fontSize: 13 }} />
              <Tooltip formatter={(_v, _n, item) => [String((item.payload as { text: string }).text), 'Precision']} contentStyle={{ border: `2px solid ${INK}`, borderRadius: 6 }} />
              <Bar dataKey="precision" fill={`url(#${patternId(prefix, 'diagonal')})`} stroke={INK} strokeWidth={1} isAnimationActive={false} barSize={22} minPointSize={3}>
                <LabelList dataKey={wide ? 'text' : 'short'} position="right" fill={INK} fontSize={13} />
              </Bar>
            </BarChart>
          </ResponsiveContainer>
        )
      }
    </ChartFigure>
  );
}
