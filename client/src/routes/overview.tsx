import { CollectionList } from '../components/collections/collection-list';
import { SystemStatusLine } from '../components/system-status/system-status-line';

/** The landing screen: the state of the system and the coverage of every collection. */
export function OverviewRoute() {
  return (
    <>
      <title>Overview · Cartouche</title>
      <div className="space-y-8">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">Overview</h1>
          <p className="max-w-prose text-lg text-muted">
            How far each collection’s alt text has come, and what is waiting for a person to review.
          </p>
        </div>
        <SystemStatusLine />
        <CollectionList />
      </div>
    </>
  );
}
