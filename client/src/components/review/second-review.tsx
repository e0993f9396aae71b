import { useId, useState } from 'react';
import { problemOf, problemReference } from '../../api/http';
import { useItemPanel, useRecordSecondReview, useSecondReviews } from '../../api/review';
import { formatCount, formatShare } from '../../lib/format';
import { Button } from '../ui/button';
import { ProblemNotice } from '../ui/problem-notice';
import { ScanViewer } from './scan-viewer';
import { SubjectTypeahead } from './subject-typeahead';
import { probabilityWords } from './words';

/**
 * Blind second reviews: a share of approved items is reviewed again by another editor, who sees the machine's
 * proposals but not the first editor's decisions, and says which subjects the item shows. This changes nothing
 * on the item; it measures agreement.
 */
export function SecondReviews({ collectionId, announce }: { collectionId: number; announce(message: string): void }) {
  const queue = useSecondReviews(collectionId);
  const [itemId, setItemId] = useState<number | null>(null);
  const items = queue.data?.items ?? [];
  const chosen = itemId ?? items[0]?.id ?? null;
  if (queue.isError) return <ProblemNotice headingLevel={3} title={problemOf(queue.error).title} detail={problemOf(queue.error).detail} />;
  if (!queue.data) return <p className="text-muted">Loading…</p>;
  return (
    <div className="space-y-4">
      <p className="max-w-prose">
        This collection reviews {formatShare(queue.data.share)} of its items twice. {formatCount(queue.data.total)} approved item{queue.data.total === 1 ? '' : 's'} wait
        for your blind second review. You will not see what the first editor decided.
      </p>
      {items.length === 0 ? null : (
        <>
          <nav aria-label="Items waiting for a second review">
            <ul className="flex flex-wrap gap-2">
              {items.map((i) => (
                <li key={i.id}>
                  <Button aria-current={i.id === chosen ? 'true' : undefined} className={i.id === chosen ? 'border-ink bg-sunk' : ''} onClick={() => setItemId(i.id)}>
                    {i.identifier}
                  </Button>
                </li>
              ))}
            </ul>
          </nav>
          {chosen !== null ? <BlindPanel key={chosen} itemId={chosen} announce={announce} onDone={() => setItemId(null)} /> : null}
        </>
      )}
    </div>
  );
}

function BlindPanel({ itemId, announce, onDone }: { itemId: number; announce(m: string): void; onDone(): void }) {
  const panel = useItemPanel(itemId, true);
  const record = useRecordSecondReview();
  const [present, setPresent] = useState<Map<number, string>>(new Map());
  const [zoom, setZoom] = useState(1);
  const headingId = useId();
  if (panel.isError) return <ProblemNotice headingLevel={3} title={problemOf(panel.error).title} detail={problemOf(panel.error).detail} />;
  if (!panel.data) return <p className="text-muted">Loading the item…</p>;
  const p = panel.data;
  const proposed = [...p.subjects, ...p.forms];
  const extra = [...present.entries()].filter(([id]) => !proposed.some((s) => s.subject.id === id));
  function toggle(id: number, label: string, on: boolean) {
    setPresent((m) => {
      const n = new Map(m);
      if (on) n.set(id, label);
      else n.delete(id);
      return n;
    });
  }
  function submit() {
    record.mutate(
      { itemId, present: [...present.keys()], absent: proposed.map((s) => s.subject.id).filter((id) => !present.has(id)) },
      {
        onSuccess: () => {
          announce(`Second review of ${p.item.identifier} recorded.`);
          onDone();
        },
      },
    );
  }
  return (
    <section
      aria-labelledby={headingId}
      className="grid gap-6 lg:grid-cols-[minmax(0,7fr)_minmax(0,5fr)]"
      onKeyDown={(e) => {
        if ((e.ctrlKey || e.metaKey) && e.key === 'Enter') {
          e.preventDefault();
          submit();
        }
      }}
    >
      <div className="min-w-0">
        <h3 id={headingId} className="mb-2 text-xl font-bold">
          {p.item.identifier}: blind second review
        </h3>
        <ScanViewer src={p.item.imageUrl} identifier={p.item.identifier} zoom={zoom} onZoom={setZoom} />
        <p className="mt-2">
          <span className="font-bold">Caption:</span> {p.item.caption ?? 'not recorded'}
        </p>
      </div>
      <div className="min-w-0 space-y-4">
        <fieldset className="space-y-2">
          <legend className="font-bold">Which of the machine’s proposals does the item show?</legend>
          {proposed.length === 0 ? <p className="text-muted">The models proposed nothing for this item.</p> : null}
          {proposed.map((s) => {
            const w = probabilityWords(s.probability);
            return (
              <label key={s.id} className="flex min-h-11 items-center gap-2.5">
                <input type="checkbox" className="size-5 accent-accent" checked={present.has(s.subject.id)} onChange={(e) => toggle(s.subject.id, s.subject.prefLabel, e.currentTarget.checked)} />
                <span>
                  {s.subject.prefLabel} <span className="text-sm text-muted">({s.subject.kind === 'form' ? 'form, ' : ''}machine proposal, {w.words}, {w.number})</span>
                </span>
              </label>
            );
          })}
        </fieldset>
        {extra.length ? <p>Also present: {extra.map(([, l]) => l).join(', ')}</p> : null}
        <SubjectTypeahead collectionId={p.item.collectionId} label="Another subject it shows" kind="" taken={new Set(present.keys())} onPick={(s) => toggle(s.id, s.prefLabel, true)} />
        {record.isError ? <ProblemNotice headingLevel={3} title={problemOf(record.error).title} detail={problemOf(record.error).detail} reference={problemReference(problemOf(record.error))} /> : null}
        <Button variant="primary" onClick={submit} aria-disabled={record.isPending ? true : undefined} aria-keyshortcuts="Control+Enter">
          Record the second review <kbd className="text-sm font-normal">Ctrl+Enter</kbd>
        </Button>
      </div>
    </section>
  );
}
