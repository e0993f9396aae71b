import { useId, useState } from 'react';
import { Link, useNavigate } from 'react-router';
import { useArchivedCollections, useCollections, useCreateCollection } from '../api/collections';
import { problemOf, problemReference } from '../api/http';
import { hasPermission, useSession } from '../api/session';
import { CollectionForm, emptyCollection } from '../components/collections/collection-form';
import { Button } from '../components/ui/button';
import { Card } from '../components/ui/card';
import { CreatePanel } from '../components/ui/create-panel';
import { ProblemNotice } from '../components/ui/problem-notice';
import { formatCount, formatDateTime } from '../lib/format';

/** Every collection, a new one, and the archived ones. */
export function CollectionsRoute() {
  const { user } = useSession();
  const canWrite = hasPermission(user, 'collections:write');
  const collections = useCollections();
  const archived = useArchivedCollections();
  const create = useCreateCollection();
  const navigate = useNavigate();
  const [adding, setAdding] = useState(false);
  const listHeading = useId();
  const archivedHeading = useId();
  const list = collections.data?.collections ?? [];

  return (
    <>
      <title>Collections · Cartouche</title>
      <div className="space-y-8">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">Collections</h1>
          <p className="max-w-prose text-lg text-muted">Each collection has its own vocabulary, alt-text guidance, house style and night shift.</p>
          <p>
            <Link to="/subjects">Back to the subjects</Link>
          </p>
        </div>

        <Card as="section" aria-labelledby={listHeading} className="space-y-4">
          <div className="flex flex-wrap items-start justify-between gap-4">
            <h2 id={listHeading} className="text-2xl font-bold">
              In use
            </h2>
            {canWrite && !adding ? (
              <Button variant="primary" onClick={() => setAdding(true)}>
                New collection
              </Button>
            ) : null}
          </div>
          {adding ? (
            <CreatePanel title="New collection" onCancel={() => setAdding(false)}>
              <CollectionForm
                suggestSlug
                initial={emptyCollection()}
                submitLabel="Create the collection"
                save={async (values) => {
                  const c = await create.mutateAsync(values);
                  await navigate(`/collections/${c.id}`);
                }}
              />
            </CreatePanel>
          ) : null}
          {collections.isError ? (
            <ProblemNotice headingLevel={3} title={problemOf(collections.error).title} detail={problemOf(collections.error).detail} reference={problemReference(problemOf(collections.error))} />
          ) : collections.isPending ? (
            <p className="text-muted">Loading collections…</p>
          ) : list.length === 0 ? (
            <p>No collection yet.</p>
          ) : (
            <ul className="divide-y-2 divide-rule">
              {list.map((c) => (
                <li key={c.id} className="flex flex-wrap items-baseline justify-between gap-3 py-3">
                  <div>
                    <Link to={`/collections/${c.id}`} className="font-bold">
                      {c.name}
                    </Link>
                    <p className="text-sm text-muted">
                      {c.medium} · {formatCount(c.itemCount)} {c.itemCount === 1 ? 'item' : 'items'} · {formatCount(c.subjectCount)} {c.subjectCount === 1 ? 'subject' : 'subjects'}, {formatCount(c.formCount)}{' '}
                      {c.formCount === 1 ? 'form' : 'forms'}
                    </p>
                  </div>
                  <Link to={`/subjects?collection=${c.id}`}>Vocabulary<span className="sr-only"> of {c.name}</span></Link>
                </li>
              ))}
            </ul>
          )}
        </Card>

        <Card as="section" aria-labelledby={archivedHeading} className="space-y-3">
          <h2 id={archivedHeading} className="text-2xl font-bold">
            Archived
          </h2>
          <p className="max-w-prose text-muted">Archived collections keep everything but leave every list and the night shift. Open one to restore it.</p>
          {archived.data === undefined ? (
            <p className="text-muted">Loading…</p>
          ) : archived.data.length === 0 ? (
            <p>None.</p>
          ) : (
            <ul className="space-y-2">
              {archived.data.map((c) => (
                <li key={c.id}>
                  <Link to={`/collections/${c.id}`}>{c.name}</Link> <span className="text-sm text-muted">({c.medium}, archived {formatDateTime(c.archivedAt)})</span>
                </li>
              ))}
            </ul>
          )}
        </Card>
      </div>
    </>
  );
}
