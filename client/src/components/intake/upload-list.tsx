import { useId } from 'react';
import { thumbnailUrl } from '../../api/intake';
import { formatBytes, formatCount, formatShare, share } from '../../lib/format';
import { Button } from '../ui/button';
import { cx } from '../ui/cx';
import { StatusBadge, type StatusTone } from '../ui/status-badge';
import { ProgressBar } from './progress-bar';
import { isActive, type QueueTotals, type UploadEntry, type UploadQueue } from './use-upload-queue';
import { formatLabels, plural } from './words';

function badge(entry: UploadEntry): { tone: StatusTone; text: string } {
  switch (entry.state) {
    case 'waiting':
      return { tone: 'unknown', text: 'Waiting' };
    case 'sending':
      return { tone: 'attention', text: 'Sending' };
    case 'checking':
      return { tone: 'attention', text: 'Checking' };
    case 'cancelled':
      return { tone: 'unknown', text: 'Cancelled' };
    case 'not-sent':
      return { tone: 'down', text: 'Not sent' };
    case 'done':
      switch (entry.outcome?.outcome) {
        case 'ingested':
          return { tone: 'good', text: 'Added' };
        case 'duplicate':
          return { tone: 'unknown', text: 'Already there' };
        case 'failed':
          return { tone: 'down', text: 'Not stored' };
        default:
          return { tone: 'down', text: 'Not added' };
      }
  }
}

/** What happened to the file, in a sentence or two. */
function EntryDetail({ entry }: { entry: UploadEntry }) {
  const o = entry.outcome;
  if (entry.state === 'waiting') return <p className="text-muted">Waits for the files before it to be sent.</p>;
  if (entry.state === 'sending') {
    return (
      <p className="tabular-nums text-muted">
        {formatShare(share(entry.sent, entry.file.size))} sent ({formatBytes(entry.sent)} of {formatBytes(entry.file.size)})
      </p>
    );
  }
  if (entry.state === 'checking') return <p className="text-muted">Sent. Cartouche is checking the file and making its thumbnail.</p>;
  if (entry.state === 'cancelled') return <p className="text-muted">Cancelled before Cartouche handled it; nothing was added.</p>;
  if (entry.state === 'not-sent') return <p>{entry.problem}</p>;
  if (!o) return null;
  if (o.outcome === 'ingested') {
    return (
      <>
        <p>
          Added as <span className="font-bold">{o.identifier}</span>: {formatLabels[o.format] ?? o.format},{' '}
          {formatCount(o.width)} × {formatCount(o.height)} pixels.
        </p>
        {o.notes.length > 0 ? (
          <ul className="list-disc space-y-1 pl-5 text-muted">
            {o.notes.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
        ) : null}
      </>
    );
  }
  return <p>{o.reason}</p>;
}

function EntryRow({ entry, queue }: { entry: UploadEntry; queue: UploadQueue }) {
  const nameId = useId();
  const { tone, text } = badge(entry);
  const itemId = entry.outcome && (entry.outcome.outcome === 'ingested' || entry.outcome.outcome === 'duplicate') ? entry.outcome.itemId : null;
  const sending = entry.state === 'sending' || entry.state === 'checking';
  return (
    <li aria-labelledby={nameId} className="flex gap-3 border-t border-rule py-4 first:border-t-0 sm:gap-4">
      <div className="flex size-16 shrink-0 items-center justify-center overflow-hidden rounded-control border border-rule bg-sunk">
        {itemId !== null ? (
          // the file name beside it says what it is; the thumbnail only repeats it for the eye
          <img src={thumbnailUrl(itemId)} alt="" width={64} height={64} className="size-16 object-contain" />
        ) : (
          <svg viewBox="0 0 24 24" width="24" height="24" aria-hidden="true" focusable="false" className="text-muted">
            <path d="M5 3h10l4 4v14H5z" fill="none" stroke="currentColor" strokeWidth="1.75" strokeLinejoin="round" />
            <path d="M15 3v4h4" fill="none" stroke="currentColor" strokeWidth="1.75" strokeLinejoin="round" />
          </svg>
        )}
      </div>
      <div className="min-w-0 flex-1 space-y-2">
        <div className="flex flex-wrap items-start justify-between gap-x-3 gap-y-1">
          <div className="min-w-0">
            <p id={nameId} className="font-bold [overflow-wrap:anywhere]">
              {entry.file.name}
            </p>
            <p className="text-sm text-muted">
              {formatBytes(entry.file.size)} · into {entry.collectionName}
            </p>
          </div>
          <StatusBadge tone={tone}>{text}</StatusBadge>
        </div>
        {sending ? (
          <ProgressBar
            label={`Sending ${entry.file.name}`}
            value={entry.state === 'checking' ? null : share(entry.sent, entry.file.size)}
            valueText={entry.state === 'checking' ? 'Sent, being checked' : `${formatShare(share(entry.sent, entry.file.size))} sent`}
          />
        ) : null}
        <div className="space-y-1 text-sm">
          <EntryDetail entry={entry} />
        </div>
        {entry.state === 'waiting' || entry.state === 'sending' ? (
          <Button className="min-h-11 text-sm" onClick={() => queue.cancel(entry.id)} aria-describedby={nameId}>
            Cancel
          </Button>
        ) : entry.retryable ? (
          <Button className="min-h-11 text-sm" onClick={() => queue.retry(entry.id)} aria-describedby={nameId}>
            Send again
          </Button>
        ) : null}
      </div>
    </li>
  );
}

function overallWords(t: QueueTotals): string {
  return `${formatCount(t.settled)} of ${plural(t.files, 'file', 'files')} done · ${formatBytes(t.sentBytes)} of ${formatBytes(t.bytes)} sent`;
}

/** The files of this screen: overall progress, then each file with its own progress and outcome in words. */
export function UploadList({ entries, totals, announcement, queue }: { entries: UploadEntry[]; totals: QueueTotals; announcement: string; queue: UploadQueue }) {
  const headingId = useId();
  const busy = totals.active > 0;
  return (
    <section aria-labelledby={headingId} className="space-y-4">
      {/* Present before anything changes, so the summary is announced (politely) when the last file settles. */}
      <p role="status" className="sr-only">
        {announcement}
      </p>
      {entries.length > 0 ? (
        <>
          <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-2">
            <h3 id={headingId} className="text-xl font-bold">
              {busy ? 'Sending' : 'Done'}
            </h3>
            {!busy ? (
              <Button className="text-sm" onClick={() => queue.clearSettled()}>
                Clear the list
              </Button>
            ) : null}
          </div>
          <div className="space-y-2">
            <p className="tabular-nums">{busy ? overallWords(totals) : announcement}</p>
            <ProgressBar
              label="All files"
              value={totals.bytes > 0 ? share(totals.sentBytes, totals.bytes) : 1}
              valueText={overallWords(totals)}
              className={cx(!busy && 'opacity-80')}
            />
          </div>
          <ul className="rounded-card border border-rule bg-raised px-4 sm:px-5">
            {entries.map((entry) => (
              <EntryRow key={entry.id} entry={entry} queue={queue} />
            ))}
          </ul>
          {entries.some((e) => !isActive(e) && e.state !== 'done' && e.state !== 'cancelled') || entries.some((e) => e.outcome?.outcome === 'rejected') ? (
            <p className="max-w-prose text-sm text-muted">
              Files that were not added change nothing in the collection. Correct them and add them again.
            </p>
          ) : null}
        </>
      ) : (
        <h3 id={headingId} className="sr-only">
          Files
        </h3>
      )}
    </section>
  );
}
