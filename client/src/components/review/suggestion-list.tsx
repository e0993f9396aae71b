import type { PanelSuggestion } from '../../api/review';
import { Button } from '../ui/button';
import { cx } from '../ui/cx';
import { broaderPath } from './subject-typeahead';
import { decisionWords, methodWords, probabilityWords } from './words';

interface SuggestionListProps {
  suggestions: readonly PanelSuggestion[];
  current: number;
  onCurrent(index: number): void;
  onDecide(s: PanelSuggestion, decision: 'accept' | 'reject' | 'undo'): void;
  busy: boolean;
  /** a blind second review shows no decisions */
  blind?: boolean;
}

/** The subjects suggested for (or decided on) the item, most probable first, each with its words and number. */
export function SuggestionList({ suggestions, current, onCurrent, onDecide, busy, blind }: SuggestionListProps) {
  if (suggestions.length === 0) return <p className="text-muted">No subject is suggested for this item yet. Add one below.</p>;
  return (
    <ol className="space-y-2" aria-label="Suggested and decided subjects">
      {suggestions.map((s, i) => {
        const p = probabilityWords(s.probability);
        const state = s.state;
        const confirmed = state === 'accepted' || state === 'added';
        return (
          <li
            key={s.id}
            aria-current={i === current ? 'true' : undefined}
            onFocus={() => onCurrent(i)}
            className={cx('rounded-control border-2 p-3', i === current ? 'border-ink bg-sunk' : 'border-rule bg-raised', state === 'rejected' && 'border-dashed')}
          >
            <div className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
              <p className="min-w-0">
                <span className="font-bold">{s.subject.prefLabel}</span>
                {s.subject.broader.length ? <span className="text-sm text-muted"> — broader: {broaderPath(s.subject)}</span> : null}
              </p>
              {!blind && state ? (
                <p className="text-sm font-bold">
                  {confirmed ? '✓ ' : state === 'rejected' ? '✗ ' : ''}
                  {decisionWords[state]}
                </p>
              ) : null}
            </div>
            <p className="text-sm">
              {s.model ? (
                <>
                  Machine proposal, <span className="font-bold">{p.words}</span> ({p.number}), model version {s.model.version} {methodWords[s.model.method] ?? s.model.method}
                </>
              ) : (
                'Added by an editor, not proposed by a model'
              )}
              {!blind && s.decidedBy ? `; decided by ${s.decidedBy.name}` : ''}
            </p>
            {blind ? null : (
              <div className="mt-2 flex flex-wrap gap-2">
                {!confirmed ? (
                  <Button disabled={busy} onClick={() => onDecide(s, 'accept')} aria-keyshortcuts={i === current ? 'a' : undefined}>
                    Accept<span className="sr-only"> {s.subject.prefLabel}</span>
                  </Button>
                ) : null}
                {state !== 'rejected' ? (
                  <Button disabled={busy} onClick={() => onDecide(s, 'reject')} aria-keyshortcuts={i === current ? 'r' : undefined}>
                    Reject<span className="sr-only"> {s.subject.prefLabel}</span>
                  </Button>
                ) : null}
                {state !== 'proposed' ? (
                  <Button disabled={busy} onClick={() => onDecide(s, 'undo')} aria-keyshortcuts={i === current ? 'u' : undefined}>
                    Undo<span className="sr-only"> decision on {s.subject.prefLabel}</span>
                  </Button>
                ) : null}
              </div>
            )}
          </li>
        );
      })}
    </ol>
  );
}
