import { useId } from 'react';
import { useSearchParams } from 'react-router';
import { useCollections } from '../api/collections';
import { problemOf, problemReference } from '../api/http';
import { useCatalogue, type CatalogueFilters, type ItemState } from '../api/items';
import { hasPermission, useSession } from '../api/session';
import { AgreementCard } from '../components/catalogue/agreement-card';
import { CatalogueFiltersForm, type FilterValues } from '../components/catalogue/catalogue-filters';
import { CatalogueTable } from '../components/catalogue/catalogue-table';
import { CollectionPicker, useCollectionParam } from '../components/collections/collection-picker';
import { Button } from '../components/ui/button';
import { Card } from '../components/ui/card';
import { ProblemNotice } from '../components/ui/problem-notice';
import { formatCount } from '../lib/format';

const PAGE_SIZE = 25;
const FILTER_KEYS = ['q', 'state', 'subjectId', 'reviewerId', 'from', 'to'] as const;

function readFilters(params: URLSearchParams): FilterValues {
  const num = (k: string) => (Number(params.get(k)) > 0 ? Number(params.get(k)) : undefined);
  const state = params.get('state');
  return {
    q: params.get('q') ?? undefined,
    state: state === 'new' || state === 'suggested' || state === 'approved' ? (state as ItemState) : undefined,
    subjectId: num('subjectId'),
    reviewerId: num('reviewerId'),
    from: params.get('from') ?? undefined,
    to: params.get('to') ?? undefined,
  };
}

/** The catalogue: every item of a collection, searchable, for everyone who may see the collection. */
export function CatalogueRoute() {
  const { user } = useSession();
  const collections = useCollections();
  const list = collections.data?.collections ?? [];
  const { chosen } = useCollectionParam(list);
  const [params, setParams] = useSearchParams();
  const resultsId = useId();
  const values = readFilters(params);
  const page = Math.max(1, Number(params.get('page')) || 1);
  const filters: CatalogueFilters | null = chosen ? { collectionId: chosen.id, ...values, page, pageSize: PAGE_SIZE } : null;
  const result = useCatalogue(filters);

  function go(next: FilterValues, nextPage = 1, collectionId = chosen?.id) {
    const p = new URLSearchParams();
    if (collectionId) p.set('collection', String(collectionId));
    for (const k of FILTER_KEYS) {
      const v = next[k];
      if (v !== undefined && v !== '') p.set(k, String(v));
    }
    if (nextPage > 1) p.set('page', String(nextPage));
    setParams(p, { preventScrollReset: true });
  }

  const data = result.data;
  const pages = data ? Math.max(1, Math.ceil(data.total / data.pageSize)) : 1;
  return (
    <>
      <title>Catalogue · Cartouche</title>
      <div className="space-y-6">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">Catalogue</h1>
          <p className="max-w-prose text-lg text-muted">
            Every item of a collection with its caption, alt text and confirmed subjects. Only subjects an editor confirmed count here; machine suggestions are
            not descriptions until approved.
          </p>
        </div>
        {collections.isError ? (
          <ProblemNotice announce title={problemOf(collections.error).title} detail={problemOf(collections.error).detail} />
        ) : collections.isPending ? (
          <p role="status" className="text-muted">
            Loading collections…
          </p>
        ) : chosen === null ? (
          <Card className="max-w-prose">
            <h2 className="text-xl font-bold">No collection yet</h2>
            <p className="mt-2">Once a collection exists, its items can be found here.</p>
          </Card>
        ) : (
          <>
            <CollectionPicker collections={list} value={chosen.id} onChange={(id) => go({}, 1, id)} />
            <Card as="section" aria-labelledby={resultsId} className="space-y-5">
              <h2 id={resultsId} className="sr-only">
                Items
              </h2>
              <CatalogueFiltersForm key={`${chosen.id}-${params.toString()}`} collectionId={chosen.id} initial={values} onApply={(v) => go(v)} />
              {result.isError ? <ProblemNotice headingLevel={3} title={problemOf(result.error).title} detail={problemOf(result.error).detail} items={problemOf(result.error).errors?.map((e) => e.detail)} reference={problemReference(problemOf(result.error))} /> : null}
              <p role="status" className="font-bold">
                {data ? `${formatCount(data.total)} item${data.total === 1 ? '' : 's'} found${data.ignoredWords.length ? ` (left out as too common or short to search: ${data.ignoredWords.join(', ')})` : ''}.` : 'Searching…'}
              </p>
              {data && data.items.length > 0 ? (
                <>
                  <CatalogueTable rows={data.items} caption={`Page ${formatCount(data.page)} of ${formatCount(pages)}, ${PAGE_SIZE} items a page`} />
                  <nav aria-label="Pages" className="flex flex-wrap items-center gap-3">
                    <Button disabled={page <= 1} onClick={() => go(values, page - 1)}>
                      Previous page
                    </Button>
                    <span>
                      Page {formatCount(page)} of {formatCount(pages)}
                    </span>
                    <Button disabled={page >= pages} onClick={() => go(values, page + 1)}>
                      Next page
                    </Button>
                  </nav>
                </>
              ) : null}
            </Card>
            <AgreementCard collectionId={chosen.id} canConfigure={hasPermission(user, 'collections:write')} />
          </>
        )}
      </div>
    </>
  );
}
