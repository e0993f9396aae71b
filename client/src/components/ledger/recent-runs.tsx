import { Link } from 'react-router';
import type { DashboardRun } from '../../api/dashboard';
import { formatCount, formatDateTime } from '../../lib/format';
import { StatusBadge, type StatusTone } from '../ui/status-badge';
import { tableClass } from './chart-kit';

const tones: Record<DashboardRun['status'], StatusTone> = { queued: 'waiting', running: 'attention', succeeded: 'done', failed: 'down', cancelled: 'stopped' };
const words: Record<DashboardRun['status'], string> = { queued: 'Queued', running: 'Running', succeeded: 'Finished', failed: 'Failed', cancelled: 'Cancelled' };

function minutes(ms: number | null): string {
  if (ms === null) return '—';
  const m = Math.round(ms / 60_000);
  return m < 1 ? 'under a minute' : m === 1 ? '1 minute' : `${formatCount(m)} minutes`;
}

/** The last night-shift runs of a collection, each linking to its detail on the Night shift screen. */
export function RecentRuns({ runs, collectionId }: { runs: DashboardRun[]; collectionId: number }) {
  if (runs.length === 0) return <p>This collection has had no night-shift run yet.</p>;
  return (
    <div className="overflow-x-auto">
      <table className={tableClass}>
        <caption className="sr-only">The last night-shift runs, newest first</caption>
        <thead>
          <tr>
            <th scope="col">Run</th>
            <th scope="col">Status</th>
            <th scope="col">Asked for</th>
            <th scope="col">Took</th>
            <th scope="col">New scans</th>
            <th scope="col">Suggestions made</th>
          </tr>
        </thead>
        <tbody>
          {runs.map((r) => (
            <tr key={r.id}>
              <th scope="row">
                <Link to={`/night-shift?collection=${collectionId}&run=${r.id}`} className="inline-flex min-h-11 items-center font-bold">
                  Run {r.id}
                  <span className="sr-only">, {r.trigger === 'schedule' ? 'scheduled' : 'started by hand'}</span>
                </Link>
              </th>
              <td>
                <StatusBadge tone={tones[r.status]}>{words[r.status]}</StatusBadge>
              </td>
              <td>
                {formatDateTime(r.createdAt) ?? r.createdAt}
                <span className="text-muted"> · {r.trigger === 'schedule' ? 'scheduled' : 'by hand'}</span>
              </td>
              <td>{minutes(r.durationMs)}</td>
              <td className="tabular-nums">{formatCount(r.counts.ingested)}</td>
              <td className="tabular-nums">{formatCount(r.counts.suggested)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
