import { useEffect, useId, useRef, useState, type FormEvent } from 'react';
import { problemOf, problemReference } from '../../api/http';
import { EXPORT_KINDS, isBuilding, manifestUrl, useExports, useRequestExport, type ExportEntry, type ExportKind } from '../../api/exports';
import { formatBytes, formatCount, formatDateTime } from '../../lib/format';
import { Button } from '../ui/button';
import { TextField } from '../ui/field';
import { ProblemNotice } from '../ui/problem-notice';
import { StatusBadge, type StatusTone } from '../ui/status-badge';

export const KIND_WORDS: Record<ExportKind, { name: string; about: string }> = {
  ledger_xlsx: { name: 'Coverage ledger (.xlsx workbook)', about: 'Summary, by subject, by editor and every item, for the accessibility lead.' },
  items_csv: { name: 'Items (.csv)', about: 'One line per item with its approved texts and subjects, for loading into another catalogue. UTF-8.' },
  xmp_zip: { name: 'XMP sidecars (.zip)', about: 'One .xmp file per approved item, named like its image: IPTC alt text, extended description and subjects.' },
  iiif_manifest: { name: 'IIIF manifest (.json)', about: 'A IIIF Presentation 3 manifest of the collection with the alt texts, as a file.' },
};

const tones: Record<ExportEntry['status'], StatusTone> = { queued: 'waiting', running: 'attention', ready: 'done', failed: 'down' };
const statusWords: Record<ExportEntry['status'], string> = { queued: 'Waiting for a worker', running: 'Being built', ready: 'Ready', failed: 'Failed' };

/** Monday and Sunday of last week, in the reader's calendar. */
export function lastWeek(now = new Date()): { from: string; to: string } {
  const local = new Date(now.getFullYear(), now.getMonth(), now.getDate());
  const weekday = local.getDay() || 7;
  const monday = new Date(local);
  monday.setDate(local.getDate() - weekday + 1 - 7);
  const sunday = new Date(monday);
  sunday.setDate(monday.getDate() + 6);
  const iso = (d: Date) => `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
  return { from: iso(monday), to: iso(sunday) };
}

function periodWords(e: Pick<ExportEntry, 'periodFrom' | 'periodTo'>): string {
  if (!e.periodFrom && !e.periodTo) return 'everything so far';
  return `${e.periodFrom ?? 'the beginning'} to ${e.periodTo ?? 'now'}`;
}

/** Asking for an export of a collection, and the files asked for so far (newest first). */
export function ExportPanel({ collectionId, collectionName }: { collectionId: number; collectionName: string }) {
  const exports = useExports(collectionId);
  const request = useRequestExport();
  const week = lastWeek();
  const [kind, setKind] = useState<ExportKind>('ledger_xlsx');
  const [from, setFrom] = useState(week.from);
  const [to, setTo] = useState(week.to);
  const [said, setSaid] = useState('');
  const kindName = useId();
  const data = exports.data;
  const list = data ?? [];

  // announce an export that finished since the last look
  const seen = useRef(new Map<number, ExportEntry['status']>());
  useEffect(() => {
    for (const e of data ?? []) {
      const before = seen.current.get(e.id);
      if (before && isBuilding({ status: before }) && !isBuilding(e)) {
        setSaid(e.status === 'ready' ? `${e.label} for ${periodWords(e)} is ready to download.` : `${e.label} for ${periodWords(e)} failed.`);
      }
      seen.current.set(e.id, e.status);
    }
  }, [data]);

  const problem = request.isError ? problemOf(request.error) : null;
  const fieldError = (path: string) => problem?.errors?.find((e) => e.path === path)?.detail;

  function submit(event: FormEvent) {
    event.preventDefault();
    if (request.isPending) return;
    setSaid('');
    request.mutate(
      { collectionId, kind, periodFrom: from || null, periodTo: to || null },
      { onSuccess: (e) => setSaid(`${e.label} for ${periodWords(e)} is asked for; a worker builds it shortly.`) },
    );
  }

  const periodMatters = kind !== 'iiif_manifest';
  return (
    <div className="space-y-6">
      <form onSubmit={submit} noValidate className="space-y-5" aria-label={`New export of ${collectionName}`}>
        <fieldset className="space-y-2">
          <legend id={kindName} className="font-bold">
            File
          </legend>
          {EXPORT_KINDS.map((k) => (
            <label key={k} className="flex min-h-11 cursor-pointer items-start gap-3 rounded-control py-1">
              <input type="radio" name="kind" value={k} checked={kind === k} onChange={() => setKind(k)} className="mt-1 size-5 shrink-0 accent-accent" />
              <span>
                <span className="font-bold">{KIND_WORDS[k].name}</span>
                <span className="block text-sm text-muted">{KIND_WORDS[k].about}</span>
              </span>
            </label>
          ))}
        </fieldset>
        {periodMatters ? (
          <fieldset className="space-y-2">
            <legend className="font-bold">Period</legend>
            <p className="max-w-prose text-sm text-muted">
              Days in the collection’s time zone, both included. The ledger counts approvals and decisions made in the period and lists the items that existed by
              its end. Leave a day empty for no limit on that side.
            </p>
            <div className="grid max-w-xl gap-4 sm:grid-cols-2">
              <TextField label="First day" type="date" value={from} onChange={(e) => setFrom(e.currentTarget.value)} error={fieldError('periodFrom')} />
              <TextField label="Last day" type="date" value={to} onChange={(e) => setTo(e.currentTarget.value)} error={fieldError('periodTo')} />
            </div>
          </fieldset>
        ) : null}
        <Button type="submit" variant="primary" aria-disabled={request.isPending ? true : undefined}>
          {request.isPending ? 'Asking…' : 'Build the file'}
        </Button>
      </form>
      <p role="status" className="sr-only">
        {said}
      </p>
      {problem ? (
        <ProblemNotice headingLevel={3} announce title={problem.title} detail={problem.detail} items={problem.errors?.map((e) => e.detail)} reference={problemReference(problem)} />
      ) : null}

      <p className="max-w-prose">
        The IIIF manifest is also served live, always up to date, for viewers that are signed in to Cartouche:{' '}
        <a href={manifestUrl(collectionId)} className="font-bold underline">
          live IIIF manifest of {collectionName}
        </a>
        .
      </p>

      <section aria-labelledby={`${kindName}-list`} className="space-y-3">
        <h3 id={`${kindName}-list`} className="text-xl font-bold">
          Files asked for
        </h3>
        {exports.isError ? (
          <ProblemNotice headingLevel={3} title={problemOf(exports.error).title} detail={problemOf(exports.error).detail} />
        ) : exports.isPending ? (
          <p className="text-muted">Loading the files…</p>
        ) : list.length === 0 ? (
          <p>No file has been asked for yet.</p>
        ) : (
          <ol className="space-y-3">
            {list.map((e) => (
              <li key={e.id} className="rounded-card border border-rule bg-raised p-4">
                <div className="flex flex-wrap items-start justify-between gap-x-3 gap-y-2">
                  <p className="font-bold">
                    {e.label} · {periodWords(e)}
                  </p>
                  <StatusBadge tone={tones[e.status]}>{statusWords[e.status]}</StatusBadge>
                </div>
                <p className="text-sm text-muted">
                  {e.trigger === 'weekly' ? 'Weekly mail' : e.requestedBy ? `Asked for by ${e.requestedBy.name}` : 'Asked for'} · {formatDateTime(e.createdAt) ?? e.createdAt}
                  {e.mailedAt ? ` · mailed ${formatDateTime(e.mailedAt) ?? e.mailedAt}` : ''}
                </p>
                {e.progress ? <p className="text-sm">{formatCount(e.progress.done)} rows written so far</p> : null}
                {e.status === 'failed' && e.error ? <p className="text-sm">Why: {e.error}</p> : null}
                {e.status === 'queued' && e.error ? <p className="text-sm">The last attempt failed ({e.error}); a worker tries again shortly.</p> : null}
                {e.status === 'ready' && e.downloadUrl ? (
                  <p className="mt-1">
                    <a href={e.downloadUrl} download={e.fileName ?? undefined} className="inline-flex min-h-11 items-center font-bold underline">
                      Download {e.fileName}
                    </a>{' '}
                    <span className="text-sm text-muted">
                      ({e.byteSize === null ? '' : formatBytes(e.byteSize)}
                      {e.rowCount === null ? '' : `, ${formatCount(e.rowCount)} ${e.kind === 'iiif_manifest' ? 'canvases' : e.kind === 'xmp_zip' ? 'sidecars' : 'items'}`})
                    </span>
                  </p>
                ) : null}
              </li>
            ))}
          </ol>
        )}
      </section>
    </div>
  );
}
