import { useQueryClient } from '@tanstack/react-query';
import { useEffect, useMemo, useState } from 'react';
import { Link, useSearchParams } from 'react-router';
import { useCollections } from '../api/collections';
import { problemOf, problemReference } from '../api/http';
import { itemPanelQueryOptions, useItemPanel, useReviewQueue, useSkipItem, type QueueFilters } from '../api/review';
import { queryKeys } from '../api/query-keys';
import { CollectionPicker, useCollectionParam } from '../components/collections/collection-picker';
import { ItemDesk } from '../components/review/item-desk';
import { QueueFiltersForm } from '../components/review/queue-filters';
import { SecondReviews } from '../components/review/second-review';
import { SubjectGrid } from '../components/review/subject-grid';
import { Card } from '../components/ui/card';
import { cx } from '../components/ui/cx';
import { ProblemNotice } from '../components/ui/problem-notice';
import { formatCount } from '../lib/format';

const MODES = [
  { key: 'items', label: 'One item at a time' },
  { key: 'subjects', label: 'One subject, many items' },
  { key: 'second', label: 'Second reviews' },
] as const;
type Mode = (typeof MODES)[number]['key'];

/** The review desk: an editor confirms or corrects the machine's suggestions, writes the alt text and approves. */
export function ReviewRoute() {
  const collections = useCollections();
  const list = collections.data?.collections ?? [];
  const { chosen, choose } = useCollectionParam(list);
  const [params, setParams] = useSearchParams();
  const mode: Mode = (MODES.find((m) => m.key === params.get('mode'))?.key ?? 'items') as Mode;
  const [announcement, setAnnouncement] = useState('');

  const announce = (message: string) => {
    // the same words twice still need announcing: clear, then say
    setAnnouncement('');
    setTimeout(() => setAnnouncement(message), 50);
  };

  return (
    <>
      <title>Review desk · Cartouche</title>
      <div className="space-y-6">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">Review desk</h1>
          <p className="max-w-prose text-lg text-muted">
            Confirm or correct the subjects, finish the alt text and approve. Suggested subjects and the composed draft are machine proposals, not descriptions,
            until an editor approves them.
          </p>
          <p className="max-w-prose text-sm text-muted">
            The checker follows WCAG 2.2 and common practice. Legal obligations for accessible images differ by jurisdiction: look to WCAG 2.2 and the law that
            applies to you; Cartouche claims no compliance on anyone’s behalf.
          </p>
        </div>
        <p role="status" aria-live="polite" className="sr-only">
          {announcement}
        </p>
        {collections.isError ? (
          <ProblemNotice announce title={problemOf(collections.error).title} detail={problemOf(collections.error).detail} reference={problemReference(problemOf(collections.error))} />
        ) : collections.isPending ? (
          <p role="status" className="text-muted">
            Loading collections…
          </p>
        ) : chosen === null ? (
          <Card className="max-w-prose">
            <h2 className="text-xl font-bold">No collection yet</h2>
            <p className="mt-2">The review desk works on one collection at a time. Once a collection exists, it can be chosen here.</p>
          </Card>
        ) : (
          <>
            <div className="flex flex-wrap items-end justify-between gap-4">
              <CollectionPicker collections={list} value={chosen.id} onChange={choose} />
              <nav aria-label="Ways to review">
                <ul className="flex flex-wrap gap-2">
                  {MODES.map((m) => (
                    <li key={m.key}>
                      <Link
                        to={`?${new URLSearchParams({ collection: String(chosen.id), mode: m.key }).toString()}`}
                        aria-current={m.key === mode ? 'page' : undefined}
                        className={cx(
                          'inline-flex min-h-11 items-center rounded-control border-2 px-3 py-2 font-bold no-underline',
                          m.key === mode ? 'border-ink bg-ink text-paper hover:text-paper' : 'border-line bg-raised text-ink hover:border-ink hover:bg-sunk hover:text-ink',
                        )}
                        onClick={(e) => {
                          e.preventDefault();
                          setParams({ collection: String(chosen.id), mode: m.key }, { replace: true });
                        }}
                      >
                        {m.label}
                      </Link>
                    </li>
                  ))}
                </ul>
              </nav>
            </div>
            {mode === 'items' ? <ItemQueue key={chosen.id} collectionId={chosen.id} announce={announce} /> : null}
            {mode === 'subjects' ? (
              <Card as="section" aria-label="One subject, many items">
                <SubjectGrid key={chosen.id} collectionId={chosen.id} announce={announce} />
              </Card>
            ) : null}
            {mode === 'second' ? (
              <Card as="section" aria-label="Second reviews">
                <SecondReviews key={chosen.id} collectionId={chosen.id} announce={announce} />
              </Card>
            ) : null}
          </>
        )}
      </div>
    </>
  );
}

function ItemQueue({ collectionId, announce }: { collectionId: number; announce(m: string): void }) {
  const queryClient = useQueryClient();
  const [filters, setFilters] = useState<QueueFilters>({ collectionId, state: 'open', sort: 'uncertainty', offset: 0, limit: 50 });
  const queue = useReviewQueue(filters);
  const [done, setDone] = useState<ReadonlySet<number>>(new Set());
  const [currentId, setCurrentId] = useState<number | null>(null);
  const skip = useSkipItem();
  const entries = useMemo(() => (queue.data?.items ?? []).filter((e) => !done.has(e.id) || e.id === currentId), [queue.data, done, currentId]);
  const shownId = currentId !== null && !done.has(currentId) ? currentId : (entries.find((e) => !done.has(e.id))?.id ?? null);
  const panel = useItemPanel(shownId);
  const index = entries.findIndex((e) => e.id === shownId);
  const next = entries.slice(index + 1).find((e) => !done.has(e.id));

  useEffect(() => {
    if (next) void queryClient.prefetchQuery(itemPanelQueryOptions(next.id));
  }, [next, queryClient]);

  function moveOn(itemId: number) {
    setDone((d) => new Set(d).add(itemId));
    setCurrentId(next?.id ?? null);
    void queryClient.invalidateQueries({ queryKey: queryKeys.review.all, predicate: (q) => q.queryKey[1] === 'queue' });
  }

  const total = queue.data?.total ?? 0;
  const remaining = Math.max(0, total - [...done].filter((id) => queue.data?.items.some((e) => e.id === id)).length);

  return (
    <div className="space-y-4">
      <details className="rounded-card border border-rule bg-raised p-4">
        <summary className="min-h-11 cursor-pointer py-2 font-bold">
          Queue: {formatCount(total)} item{total === 1 ? '' : 's'}, {filters.sort === 'uncertainty' ? 'most uncertain first' : 'by identifier'} — change the filters
        </summary>
        <div className="mt-3">
          <QueueFiltersForm
            filters={filters}
            onChange={(f) => {
              setFilters(f);
              setDone(new Set());
              setCurrentId(null);
            }}
          />
        </div>
      </details>
      {queue.isError ? <ProblemNotice headingLevel={2} title={problemOf(queue.error).title} detail={problemOf(queue.error).detail} /> : null}
      {queue.data && shownId === null ? (
        <Card>
          <h2 className="text-xl font-bold">Nothing waits in this queue</h2>
          <p className="mt-2">Every item that matches the filters has been dealt with. Change the filters, or come back after the night shift.</p>
        </Card>
      ) : null}
      {panel.isError ? <ProblemNotice headingLevel={2} title={problemOf(panel.error).title} detail={problemOf(panel.error).detail} /> : null}
      {panel.data && shownId !== null ? (
        <Card as="section" aria-label={`Item ${panel.data.item.identifier}`}>
          <ItemDesk
            key={panel.data.item.id}
            panel={panel.data}
            position={`Item ${formatCount(Math.max(1, index + 1))} of ${formatCount(remaining)} waiting${panel.data.item.captionFlagged ? ' · caption flagged' : ''}`}
            announce={announce}
            onApproved={(id, message) => {
              moveOn(id);
              announce(next ? `${message} Next: ${next.identifier}.` : `${message} That was the last item of the queue.`);
            }}
            onSkip={(id) => {
              skip.mutate(id, { onSuccess: () => announce(`Skipped ${panel.data.item.identifier}; it moves to the end of your queue.`) });
              moveOn(id);
            }}
          />
        </Card>
      ) : shownId !== null ? (
        <p role="status" className="text-muted">
          Loading the item…
        </p>
      ) : null}
    </div>
  );
}
