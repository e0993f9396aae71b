import { useCollections } from '../../api/collections';
import { problemOf, problemReference } from '../../api/http';
import { formatCount } from '../../lib/format';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { ProblemNotice } from '../ui/problem-notice';
import { CollectionCard } from './collection-card';

const gridClass = 'grid grid-cols-1 gap-5 md:grid-cols-2 xl:grid-cols-3';

/** Every collection the signed-in person can see, as cards; with loading, empty and error states. */
export function CollectionList() {
  const collections = useCollections();
  const list = collections.data?.collections;

  return (
    <section aria-labelledby="collections-heading" aria-busy={collections.isPending} className="space-y-4">
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <h2 id="collections-heading" className="text-2xl font-bold">
          Collections
        </h2>
        {list && list.length > 0 ? (
          <p className="text-muted">
            {list.length === 1 ? '1 collection' : `${formatCount(list.length)} collections`}
          </p>
        ) : null}
      </div>

      {collections.isPending ? (
        <>
          <p role="status" className="text-muted">
            Loading collections…
          </p>
          <ul aria-hidden="true" className={gridClass}>
            {[0, 1].map((key) => (
              <li key={key} className="h-72 rounded-card border border-rule bg-raised motion-safe:animate-pulse" />
            ))}
          </ul>
        </>
      ) : list === undefined ? (
        <CollectionsProblem error={collections.error} retrying={collections.isFetching} onRetry={collections.refetch} />
      ) : list.length === 0 ? (
        <Card className="max-w-prose">
          <h3 className="text-xl font-bold">No collections yet</h3>
          <p className="mt-2">
            A collection appears here once an archivist creates it and imports its scans. Each collection then
            shows its items, its subjects and how much of its alt text people have approved.
          </p>
        </Card>
      ) : (
        <>
          {collections.isError ? (
            <p className="text-sm">
              <span className="font-bold">The latest refresh failed:</span> {problemOf(collections.error).title}.
              The figures below may be out of date.
            </p>
          ) : null}
          <ul className={gridClass}>
            {list.map((collection) => (
              <CollectionCard key={collection.id} collection={collection} />
            ))}
          </ul>
        </>
      )}
    </section>
  );
}

function CollectionsProblem({
  error,
  retrying,
  onRetry,
}: {
  error: unknown;
  retrying: boolean;
  onRetry: () => unknown;
}) {
  const problem = problemOf(error);
  return (
    <ProblemNotice
      announce
      headingLevel={3}
      title={problem.title}
      detail={problem.detail}
      items={problem.errors?.map((entry) => (entry.pointer ? `${entry.pointer}: ${entry.detail}` : entry.detail))}
      reference={problemReference(problem)}
      action={
        <Button variant="primary" onClick={() => void onRetry()} disabled={retrying}>
          {retrying ? 'Retrying…' : 'Retry'}
        </Button>
      }
    />
  );
}
