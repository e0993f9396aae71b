import { useId } from 'react';
import type { CollectionSummary } from '../../api/collections';
import { formatCount, formatDateTime, formatShare, share } from '../../lib/format';
import { Card } from '../ui/card';
import { Meter } from '../ui/meter';
import { StatList } from '../ui/stat-list';

function itemsPhrase(count: number): string {
  return count === 1 ? '1 item' : `${formatCount(count)} items`;
}

function formsPhrase(count: number): string {
  if (count === 0) return 'no forms yet';
  return count === 1 ? 'plus 1 form' : `plus ${formatCount(count)} forms`;
}

/** One collection at a glance: what it is, how far its alt text has come, what waits for people. */
export function CollectionCard({ collection }: { collection: CollectionSummary }) {
  const headingId = useId();
  const coverage = share(collection.approvedCount, collection.itemCount);
  const coverageText = formatShare(coverage);
  const hasItems = collection.itemCount > 0;
  const coverageCaption = hasItems
    ? `Approved on ${formatCount(collection.approvedCount)} of ${itemsPhrase(collection.itemCount)}`
    : 'No items imported yet';
  const lastRun = collection.lastRunAt === null ? null : formatDateTime(collection.lastRunAt);

  return (
    <Card as="li" aria-labelledby={headingId} className="flex flex-col gap-5">
      <div className="space-y-1">
        <h3 id={headingId} className="text-xl font-bold leading-snug">
          {collection.name}
        </h3>
        <p className="text-sm text-muted">
          <span className="font-bold">Medium:</span> {collection.medium}
        </p>
      </div>

      {collection.description ? <p className="max-w-prose">{collection.description}</p> : null}

      <Meter
        label="Alt text coverage"
        value={coverage}
        valueText={coverageText}
        spokenText={hasItems ? `${coverageText}, ${coverageCaption.toLowerCase()}` : coverageCaption}
        caption={coverageCaption}
        contextIds={headingId}
      />

      <StatList
        className="border-t border-rule pt-4"
        stats={[
          { label: 'Items', value: formatCount(collection.itemCount) },
          {
            label: 'Subjects',
            value: formatCount(collection.subjectCount),
            note: formsPhrase(collection.formCount),
          },
          {
            label: 'Waiting for review',
            value: formatCount(collection.suggestedCount),
            note: 'items with suggestions',
          },
          { label: 'Marked decorative', value: formatCount(collection.decorativeCount) },
        ]}
      />

      <p className="mt-auto border-t border-rule pt-4 text-sm text-muted">
        <span className="font-bold">Last night-shift run:</span>{' '}
        {collection.lastRunAt !== null && lastRun !== null ? (
          <time dateTime={collection.lastRunAt}>{lastRun}</time>
        ) : (
          'never'
        )}
      </p>
    </Card>
  );
}
