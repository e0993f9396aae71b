import { useId, useState } from 'react';
import type { ImportPreview, PreviewRow } from '../../api/intake';
import { formatCount, formatDateTime } from '../../lib/format';
import { Button } from '../ui/button';
import { Checkbox } from '../ui/checkbox';
import { ErrorGlyph } from '../ui/field';
import { StatusBadge, type StatusTone } from '../ui/status-badge';
import { StatList } from '../ui/stat-list';
import { fieldLabels, matchedByWords, plural, rowStatusWords } from './words';

const PAGE = 100;

const rowTone: Record<PreviewRow['status'], StatusTone> = { change: 'good', unchanged: 'unknown', problem: 'down' };

function Value({ text, as: Tag }: { text: string | null; as: 'del' | 'ins' }) {
  if (text === null || text === '') return <span className="italic text-muted">empty</span>;
  return <Tag className="whitespace-pre-wrap no-underline [overflow-wrap:anywhere]">“{text}”</Tag>;
}

function RowCard({ row }: { row: PreviewRow }) {
  const headingId = useId();
  const key = row.identifier ?? row.fileName;
  return (
    <li aria-labelledby={headingId} className="space-y-2 border-t border-rule py-4 first:border-t-0">
      <div className="flex flex-wrap items-start justify-between gap-x-3 gap-y-1">
        <h4 id={headingId} className="font-bold [overflow-wrap:anywhere]">
          Row {row.row}
          {key ? <span className="font-normal text-muted"> · {key}</span> : null}
        </h4>
        <StatusBadge tone={rowTone[row.status]}>{rowStatusWords[row.status]}</StatusBadge>
      </div>
      {row.item ? (
        <p className="text-sm text-muted [overflow-wrap:anywhere]">
          Item <span className="font-bold text-ink">{row.item.identifier}</span> ({row.item.fileName})
          {row.matchedBy ? `, ${matchedByWords(row.matchedBy)}` : ''}
        </p>
      ) : null}
      {row.problem ? (
        <p className="flex items-start gap-1.5">
          <ErrorGlyph />
          <span>
            <span className="sr-only">Problem: </span>
            {row.problem.message}
          </span>
        </p>
      ) : null}
      {row.changes.length > 0 && !row.problem ? (
        <dl className="space-y-1.5">
          {row.changes.map((c) => (
            <div key={c.field} className="grid gap-x-3 sm:grid-cols-[8rem_1fr]">
              <dt className="font-bold">{fieldLabels[c.field]}</dt>
              <dd className="min-w-0">
                <span className="sr-only">from </span>
                <Value text={c.from} as="del" />
                <span aria-hidden="true" className="px-1.5 text-muted">
                  →
                </span>
                <span className="sr-only"> to </span>
                <Value text={c.to} as="ins" />
              </dd>
            </div>
          ))}
        </dl>
      ) : null}
      {row.status === 'unchanged' ? <p className="text-sm text-muted">The item already holds these values; nothing would change.</p> : null}
    </li>
  );
}

/** What a previewed sheet would do, row by row, and (once applied) what it did. */
export function ImportPreviewView({
  preview,
  applying,
  onApply,
  onDiscard,
}: {
  preview: ImportPreview;
  applying: boolean;
  onApply: () => void;
  onDiscard: () => void;
}) {
  const [showUnchanged, setShowUnchanged] = useState(false);
  const [limit, setLimit] = useState(PAGE);
  const headingId = useId();
  const applied = preview.status === 'applied';
  const shown = preview.rows.filter((r) => showUnchanged || r.status !== 'unchanged');
  const { summary, columns, result } = preview;

  return (
    <section aria-labelledby={headingId} className="space-y-5">
      <div className="space-y-1">
        <h3 id={headingId} className="text-xl font-bold [overflow-wrap:anywhere]">
          {applied ? 'Applied' : 'Preview'}: {preview.sourceName}
        </h3>
        <p className="text-sm text-muted">
          {preview.format === 'xlsx' ? `Worksheet “${columns.sheetName ?? ''}”` : 'CSV'}, header in row {columns.headerRow}
          {columns.encoding === 'windows-1252' ? ', read as Windows-1252 text' : ''}. Read {formatDateTime(preview.createdAt) ?? ''}.
        </p>
      </div>

      <StatList
        className="sm:grid-cols-4"
        stats={[
          { label: 'Rows', value: formatCount(summary.rows) },
          { label: applied ? 'Changed items' : 'Will change an item', value: formatCount(applied && result ? result.applied : summary.changes) },
          { label: 'Already match', value: formatCount(summary.unchanged) },
          { label: 'Problems', value: formatCount(summary.problems), note: summary.problems > 0 ? 'these rows change nothing' : undefined },
        ]}
      />

      <div className="space-y-1 text-sm">
        <p>
          <span className="font-bold">Columns read: </span>
          {columns.mapped.map((m) => `“${m.column}” as ${fieldLabels[m.field].toLowerCase()}`).join('; ')}.
        </p>
        {columns.ignored.length > 0 ? (
          <p>
            <span className="font-bold">Columns left out: </span>
            {columns.ignored.map((c) => `“${c}”`).join(', ')} (Cartouche has no field for them).
          </p>
        ) : null}
        <p className="text-muted">An empty cell leaves the item’s field as it is.</p>
      </div>

      {result ? (
        <div className="space-y-2 rounded-card border-2 border-line bg-accent-tint px-4 py-3">
          <p className="font-bold">
            {plural(result.applied, 'item was', 'items were')} updated
            {result.refused > 0 ? `; ${plural(result.refused, 'row was', 'rows were')} left alone` : ''}.
          </p>
          {result.refused > 0 ? (
            <ul className="list-disc space-y-1 pl-5">
              {result.rows
                .filter((r) => r.outcome !== 'applied')
                .map((r) => (
                  <li key={r.row}>
                    Row {r.row}: {r.message}
                  </li>
                ))}
            </ul>
          ) : null}
        </div>
      ) : null}

      {!applied ? (
        <div className="flex flex-wrap items-center gap-3">
          {summary.changes > 0 ? (
            <Button variant="primary" onClick={onApply} disabled={applying}>
              {applying ? 'Applying…' : `Apply ${plural(summary.changes, 'change', 'changes')}`}
            </Button>
          ) : (
            <p className="font-bold">No row would change an item.</p>
          )}
          <Button onClick={onDiscard}>{summary.changes > 0 ? 'Discard this preview' : 'Choose another sheet'}</Button>
        </div>
      ) : (
        <Button onClick={onDiscard}>Import another sheet</Button>
      )}
      {!applied && summary.changes > 0 ? (
        <p className="max-w-prose text-sm text-muted">
          Applying changes the items in one step. An item someone edits after this preview is left alone and listed.
        </p>
      ) : null}

      <div className="space-y-2">
        <h4 className="text-lg font-bold">Rows</h4>
        {summary.unchanged > 0 ? (
          <Checkbox
            label={`Also show the ${plural(summary.unchanged, 'row', 'rows')} that already match`}
            checked={showUnchanged}
            onChange={(e) => setShowUnchanged(e.currentTarget.checked)}
          />
        ) : null}
        {shown.length === 0 ? (
          <p className="text-muted">No rows to show.</p>
        ) : (
          <ol className="rounded-card border border-rule bg-raised px-4 sm:px-5">
            {shown.slice(0, limit).map((row) => (
              <RowCard key={row.row} row={row} />
            ))}
          </ol>
        )}
        {shown.length > limit ? (
          <Button onClick={() => setLimit((n) => n + PAGE * 5)}>
            Show {formatCount(Math.min(PAGE * 5, shown.length - limit))} more of {formatCount(shown.length - limit)} remaining rows
          </Button>
        ) : null}
      </div>
    </section>
  );
}
