import { useId, useState, type KeyboardEvent } from 'react';
import { problemOf, problemReference } from '../../api/http';
import { useDecideGrid, useSubjectGrid, useSubjectSearch } from '../../api/review';
import { formatCount } from '../../lib/format';
import { Button } from '../ui/button';
import { SelectField } from '../ui/field';
import { ProblemNotice } from '../ui/problem-notice';
import { broaderPath } from './subject-typeahead';
import { probabilityWords } from './words';

type Choice = 'accept' | 'reject' | null;

/**
 * Subject first: the items one subject's model ranks highest, to confirm or reject many at once. Y marks the
 * focused item as showing the subject, X as not; Ctrl+Enter saves every marked item in one transaction.
 */
export function SubjectGrid({ collectionId, announce }: { collectionId: number; announce(message: string): void }) {
  const subjects = useSubjectSearch(collectionId, '', 'subject');
  const [picked, setPicked] = useState<number | null>(null);
  const list = subjects.data ?? [];
  const subjectId = picked ?? list[0]?.id ?? null;
  const grid = useSubjectGrid(subjectId);
  const save = useDecideGrid();
  const [choices, setChoices] = useState<Map<number, Choice>>(new Map());
  const headingId = useId();

  const items = grid.data?.items ?? [];
  const marked = items.filter((i) => choices.get(i.itemId));
  const label = grid.data?.subject.prefLabel ?? '';

  function mark(itemId: number, c: Choice) {
    setChoices((m) => new Map(m).set(itemId, c));
  }

  function saveAll() {
    if (!subjectId || marked.length === 0) return;
    save.mutate(
      { subjectId, decisions: marked.map((i) => ({ itemId: i.itemId, version: i.version, decision: choices.get(i.itemId)! })) },
      {
        onSuccess: (r) => {
          announce(`${formatCount(r.decided)} decisions on ${label} saved.`);
          setChoices(new Map());
        },
        onError: (e) => announce(problemOf(e).title),
      },
    );
  }

  function markAll() {
    setChoices(new Map(items.map((i) => [i.itemId, 'accept' as Choice])));
  }

  function onKeyDown(event: KeyboardEvent<HTMLDivElement>) {
    if ((event.ctrlKey || event.metaKey) && event.key === 'Enter') {
      event.preventDefault();
      saveAll();
    } else if ((event.key === 'm' || event.key === 'M') && !event.ctrlKey && !event.metaKey && !event.altKey && !(event.target instanceof HTMLSelectElement)) {
      event.preventDefault();
      markAll();
    }
  }

  return (
    <div className="space-y-4" onKeyDown={onKeyDown}>
      <div className="flex flex-wrap items-end gap-4">
        <SelectField label="Subject" fieldClassName="min-w-64" value={subjectId ?? ''} onChange={(e) => {
            setPicked(Number(e.currentTarget.value));
            setChoices(new Map());
          }}>
          {list.map((s) => (
            <option key={s.id} value={s.id}>
              {s.prefLabel}
              {s.broader.length ? ` (in ${broaderPath(s)})` : ''}
            </option>
          ))}
        </SelectField>
        <Button variant="primary" onClick={saveAll} disabled={marked.length === 0} aria-disabled={save.isPending ? true : undefined} aria-keyshortcuts="Control+Enter">
          {save.isPending ? 'Saving…' : `Save ${formatCount(marked.length)} decision${marked.length === 1 ? '' : 's'}`} <kbd className="text-sm font-normal">Ctrl+Enter</kbd>
        </Button>
        <Button onClick={markAll} disabled={items.length === 0} aria-keyshortcuts="m">
          Mark all as showing it <kbd className="text-sm font-normal">M</kbd>
        </Button>
      </div>
      {save.isError ? <ProblemNotice headingLevel={3} title={problemOf(save.error).title} detail={problemOf(save.error).detail} reference={problemReference(problemOf(save.error))} /> : null}
      {grid.isError ? <ProblemNotice headingLevel={3} title={problemOf(grid.error).title} detail={problemOf(grid.error).detail} /> : null}
      {grid.data ? (
        <section aria-labelledby={headingId} className="space-y-3">
          <h3 id={headingId} className="text-xl font-bold">
            Does it show “{label}”?
          </h3>
          <p className="text-muted">
            The {formatCount(items.length)} items the model ranks highest of {formatCount(grid.data.waiting)} waiting. These are machine proposals until you decide. In
            each item, Tab reaches the choice; Y: it shows {label}, X: it does not; M marks them all as showing it; Ctrl+Enter saves.
          </p>
          {items.length === 0 ? <p>Nothing waits for a decision on {label}.</p> : null}
          <ul className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
            {items.map((i) => {
              const p = probabilityWords(i.probability);
              const c = choices.get(i.itemId) ?? null;
              return (
                <li key={i.itemId} className="rounded-control border-2 border-rule bg-raised p-2">
                  <fieldset
                    onKeyDown={(e) => {
                      if (e.key === 'y' || e.key === 'Y') mark(i.itemId, 'accept');
                      else if (e.key === 'x' || e.key === 'X') mark(i.itemId, 'reject');
                      else return;
                      e.preventDefault();
                    }}
                  >
                    <legend className="font-bold">{i.identifier}</legend>
                    <img src={i.thumbUrl} alt={`Scan of ${i.identifier}`} className="mt-1 aspect-[4/3] w-full rounded border border-line bg-sunk object-contain" />
                    <p className="text-sm">
                      {p.words} ({p.number}){i.model ? `, model version ${i.model.version}` : ''}
                    </p>
                    <div className="mt-1 flex flex-wrap gap-x-4">
                      {(['accept', 'reject'] as const).map((d) => (
                        <label key={d} className="inline-flex min-h-11 items-center gap-2">
                          <input type="radio" className="size-5 accent-accent" name={`grid-${i.itemId}`} checked={c === d} onChange={() => mark(i.itemId, d)} />
                          {d === 'accept' ? 'Shows it (Y)' : 'Does not (X)'}
                        </label>
                      ))}
                    </div>
                  </fieldset>
                </li>
              );
            })}
          </ul>
        </section>
      ) : grid.isPending && subjectId !== null ? (
        <p className="text-muted">Loading the ranked items…</p>
      ) : null}
    </div>
  );
}
