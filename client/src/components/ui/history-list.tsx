import { formatDateTime } from '../../lib/format';

export interface HistoryLine {
  at: string;
  actor: { name: string } | null;
  /** what happened, in words, after the person's name */
  summary: string;
}

/** A record's history, one entry a line: who (or Cartouche itself), what, and when. */
export function HistoryList({ entries, empty }: { entries: readonly HistoryLine[]; empty: string }) {
  if (entries.length === 0) return <p className="text-muted">{empty}</p>;
  return (
    <ol className="space-y-2">
      {entries.map((h, i) => (
        <li key={`${h.at}-${i}`} className="border-l-4 border-line pl-3">
          <p>
            <span className="font-bold">{h.actor?.name ?? 'Cartouche'}</span> {h.summary}
          </p>
          <p className="text-sm text-muted">
            <time dateTime={h.at}>{formatDateTime(h.at)}</time>
          </p>
        </li>
      ))}
    </ol>
  );
}
