import { useId, useRef } from 'react';
import { Button } from '../ui/button';
import { controlClass, ErrorGlyph } from '../ui/field';
import { cx } from '../ui/cx';

interface AltLabelsEditorProps {
  value: string[];
  onChange(next: string[]): void;
  onBlur(): void;
  /** errors by position, as the shared schema reports them (altLabels.0, altLabels.1, …) */
  errors: Array<string | undefined>;
  listError?: string | undefined;
}

/** Alternative labels, one per line, each with its own remove button; a button adds another. */
export function AltLabelsEditor({ value, onChange, onBlur, errors, listError }: AltLabelsEditorProps) {
  const groupId = useId();
  const hintId = `${groupId}-hint`;
  const listRef = useRef<HTMLUListElement>(null);

  function add() {
    onChange([...value, '']);
    // focus the new field once it is there
    requestAnimationFrame(() => listRef.current?.querySelector<HTMLInputElement>('li:last-child input')?.focus());
  }

  return (
    <fieldset className="space-y-2" aria-describedby={hintId}>
      <legend className="font-bold">Alternative labels</legend>
      <p id={hintId} className="text-sm text-muted">
        Other names people search by: older terms, local names, spellings in captions. Each differs from the preferred label.
      </p>
      {listError ? <p className="font-bold">{listError}</p> : null}
      {value.length === 0 ? <p className="text-sm">None yet.</p> : null}
      <ul ref={listRef} className="space-y-2">
        {value.map((label, i) => {
          const errorId = `${groupId}-e${i}`;
          return (
            <li key={i} className="space-y-1">
              {errors[i] ? (
                <p id={errorId} className="flex items-start gap-1.5 font-bold">
                  <ErrorGlyph />
                  <span>
                    <span className="sr-only">Error: </span>
                    {errors[i]}
                  </span>
                </p>
              ) : null}
              <div className="flex gap-2">
                <input
                  aria-label={`Alternative label ${i + 1}`}
                  aria-invalid={errors[i] ? true : undefined}
                  aria-describedby={errors[i] ? errorId : undefined}
                  className={cx(controlClass, 'flex-1')}
                  value={label}
                  onBlur={onBlur}
                  onChange={(event) => onChange(value.map((v, j) => (j === i ? event.currentTarget.value : v)))}
                />
                <Button onClick={() => onChange(value.filter((_, j) => j !== i))}>
                  Remove<span className="sr-only"> alternative label {i + 1}</span>
                </Button>
              </div>
            </li>
          );
        })}
      </ul>
      <Button onClick={add}>Add an alternative label</Button>
    </fieldset>
  );
}
