import { useEffect, useId, useState } from 'react';
import { problemOf, problemReference } from '../../api/http';
import { useEstimate, usePreview, usePromoteItem, type Estimate, type PreviewItem } from '../../api/subjects';
import { Button } from '../ui/button';
import { ProblemNotice } from '../ui/problem-notice';
import { percent } from './words';

/** The threshold's range, as a z-score: how many standard deviations above the collection's mean score. */
const MIN_Z = -3;
const MAX_Z = 4;
const DEFAULT_Z = 2;

function useDebounced<T>(value: T, ms: number): T {
  const [v, setV] = useState(value);
  useEffect(() => {
    const t = setTimeout(() => setV(value), ms);
    return () => clearTimeout(t);
  }, [value, ms]);
  return v;
}

/** Signed numbers with a true minus sign, as typeset. */
const signed = (v: number, digits: number) => v.toFixed(digits).replace('-', '\u2212');

const range = (i: { low: number; high: number } | null) => (i ? `${percent(i.low)} to ${percent(i.high)}` : '');

function EstimateText({ estimate }: { estimate: Estimate }) {
  if (!estimate.enough || !estimate.counts) {
    return (
      <div className="space-y-1">
        <p className="font-bold">No estimate of precision or recall yet.</p>
        <p>{estimate.reason}</p>
        <p className="text-sm text-muted">
          Reviewed so far: {estimate.judged.confirmed} confirmed, {estimate.judged.rejected} rejected. Cartouche estimates from {estimate.minimumJudged} reviewed items with at least one of each; fewer would
          move the figures by tens of points with every decision.
        </p>
      </div>
    );
  }
  const { truePositives: tp, falsePositives: fp, falseNegatives: fn } = estimate.counts;
  return (
    <div className="space-y-2">
      <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
        <dt className="font-bold">Estimated precision</dt>
        <dd>
          {estimate.precision === null ? (
            'cannot be estimated: no reviewed item scores this high.'
          ) : (
            <>
              <span className="font-bold">{percent(estimate.precision)}</span> (95 % interval {range(estimate.precisionInterval)}): of the {tp + fp} reviewed items at or above this
              threshold, {tp} show the subject.
            </>
          )}
        </dd>
        <dt className="font-bold">Estimated recall</dt>
        <dd>
          <span className="font-bold">{percent(estimate.recall)}</span> (95 % interval {range(estimate.recallInterval)}): of the {tp + fn} reviewed items that show the subject, {tp} are at
          or above this threshold.
        </dd>
      </dl>
      <p className="text-sm text-muted">
        An estimate from {estimate.judged.confirmed + estimate.judged.rejected} reviewed items, not a measurement of the whole collection: the reviewed items are the ones earlier suggestions put in front of
        editors, so they are not a random sample.
      </p>
    </div>
  );
}

function ItemCard({ item, subjectId, label, canPromote }: { item: PreviewItem; subjectId: number; label: string; canPromote: boolean }) {
  const promote = usePromoteItem();
  return (
    <li className="space-y-1 rounded-card border-2 border-rule bg-raised p-2">
      <img src={`/api/items/${item.itemId}/thumbnail`} alt={`Scan ${item.identifier}`} className="aspect-square w-full rounded-control bg-paper object-cover" loading="lazy" />
      <p className="font-bold [overflow-wrap:anywhere]">{item.identifier}</p>
      <p className="text-sm">
        {item.probability === null ? `${signed(item.z, 1)} SD above the usual score` : `probability ${percent(item.probability)}`}
      </p>
      {item.judgement ? <p className="text-sm font-bold">{item.judgement === 'confirmed' ? 'Confirmed by an editor' : 'Rejected by an editor'}</p> : <p className="text-sm text-muted">Not reviewed</p>}
      {item.caption ? <p className="line-clamp-2 text-sm text-muted">{item.caption}</p> : null}
      {canPromote && item.judgement === 'confirmed' ? (
        <Button className="w-full" aria-disabled={promote.isPending ? true : undefined} onClick={() => promote.mutate({ itemId: item.itemId, subjectId })}>
          {promote.isSuccess ? 'An example now' : 'Make it an example'}
          <span className="sr-only">: {item.identifier} for “{label}”</span>
        </Button>
      ) : null}
    </li>
  );
}

/**
 * What the subject would catch: the collection's items it ranks highest at or above the threshold, refreshed
 * whenever examples or the model change, and the estimated precision and recall at that threshold.
 */
export function PreviewPanel({ subjectId, label, exampleCount, canPromote }: { subjectId: number; label: string; exampleCount: number; canPromote: boolean }) {
  const [minZ, setMinZ] = useState(DEFAULT_Z);
  const z = useDebounced(minZ, 250);
  const ready = exampleCount > 0;
  const preview = usePreview(subjectId, z, ready);
  const estimate = useEstimate(subjectId, z, ready);
  const sliderId = useId();
  const hintId = useId();

  if (!ready) return <p className="max-w-prose">The preview appears once “{label}” has an example.</p>;
  const items = preview.data?.items ?? [];
  const calibrated = preview.data?.model?.calibration?.kind === 'platt';

  return (
    <div className="space-y-5">
      <div className="max-w-xl space-y-1.5">
        <label htmlFor={sliderId} className="block font-bold">
          Threshold: {signed(minZ, 2)} SD above the usual score
          {estimate.data?.probabilityAtThreshold != null ? ` (probability ${percent(estimate.data.probabilityAtThreshold)})` : ''}
        </label>
        <p id={hintId} className="text-sm text-muted">
          Items scoring at least this many standard deviations (SD) above the collection’s average score for this subject are listed. Higher means fewer, surer suggestions.
        </p>
        <input
          id={sliderId}
          type="range"
          min={MIN_Z}
          max={MAX_Z}
          step={0.25}
          value={minZ}
          aria-describedby={hintId}
          aria-valuetext={`${signed(minZ, 2)} standard deviations`}
          onChange={(e) => setMinZ(Number(e.currentTarget.value))}
          className="h-11 w-full accent-accent"
        />
      </div>

      <section aria-label="Estimated precision and recall" className="rounded-card border-2 border-line bg-paper p-4">
        {estimate.isError ? (
          <ProblemNotice headingLevel={3} title={problemOf(estimate.error).title} detail={problemOf(estimate.error).detail} reference={problemReference(problemOf(estimate.error))} />
        ) : estimate.data ? (
          <EstimateText estimate={estimate.data} />
        ) : (
          <p className="text-muted">Estimating…</p>
        )}
      </section>

      {preview.isError ? (
        <ProblemNotice headingLevel={3} title={problemOf(preview.error).title} detail={problemOf(preview.error).detail} reference={problemReference(problemOf(preview.error))} />
      ) : preview.data === undefined ? (
        <p className="text-muted">Ranking the collection…</p>
      ) : (
        <div className="space-y-3">
          <p role="status">
            {preview.data.scored === 0
              ? 'No scan of this collection has been read yet, so there is nothing to rank.'
              : items.length === 0
                ? `None of the ${preview.data.scored} scans scores this high. Lower the threshold to see the nearest ones.`
                : `The ${items.length} highest of ${preview.data.scored} scans at this threshold${preview.data.model ? `, ranked by model version ${preview.data.model.version}` : ', ranked by the average of the examples (no model made yet)'}.`}
          </p>
          {!calibrated && items.length > 0 ? (
            <p className="max-w-prose text-sm text-muted">
              No probabilities yet: they appear once the model is calibrated on at least 10 confirmed and 10 rejected items. Until then each item shows how far above the usual score it is.
            </p>
          ) : null}
          <p className="max-w-prose text-sm text-muted">These are what the subject would suggest, not descriptions: nothing is tagged until an editor accepts it at the review desk.</p>
          <ol aria-label={`Items “${label}” ranks highest`} className="grid grid-cols-[repeat(auto-fill,minmax(9rem,1fr))] gap-3">
            {items.map((item) => (
              <ItemCard key={item.itemId} item={item} subjectId={subjectId} label={label} canPromote={canPromote} />
            ))}
          </ol>
        </div>
      )}
    </div>
  );
}
