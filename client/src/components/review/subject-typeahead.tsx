import { useDeferredValue, useId, useState, type KeyboardEvent, type Ref } from 'react';
import { useSubjectSearch, type SubjectMatch } from '../../api/review';
import { controlClass } from '../ui/field';
import { cx } from '../ui/cx';

interface SubjectTypeaheadProps {
  collectionId: number;
  label: string;
  hint?: string;
  /** subjects already on the item, marked in the list */
  taken: ReadonlySet<number>;
  onPick(subject: SubjectMatch): void;
  inputRef?: Ref<HTMLInputElement>;
  kind?: 'subject' | 'form' | '';
}

/** Broader subjects as a path, nearest last: "vessel › sailing ship". */
export function broaderPath(s: Pick<SubjectMatch, 'broader'>): string {
  return [...s.broader].reverse().map((b) => b.prefLabel).join(' › ');
}

/**
 * A combobox over the collection's vocabulary (preferred and alternative labels), following the WAI-ARIA
 * combobox pattern: type, move with the arrow keys, Enter picks, Escape closes.
 */
export function SubjectTypeahead({ collectionId, label, hint, taken, onPick, inputRef, kind = 'subject' }: SubjectTypeaheadProps) {
  const id = useId();
  const [text, setText] = useState('');
  const [open, setOpen] = useState(false);
  const [active, setActive] = useState(0);
  const deferred = useDeferredValue(text.trim());
  const search = useSubjectSearch(open && deferred.length > 0 ? collectionId : null, deferred, kind);
  const options = open && deferred.length > 0 ? (search.data ?? []) : [];
  const listId = `${id}-list`;
  const optionId = (i: number) => `${id}-opt-${i}`;

  function pick(s: SubjectMatch) {
    onPick(s);
    setText('');
    setOpen(false);
    setActive(0);
  }

  function onKeyDown(event: KeyboardEvent<HTMLInputElement>) {
    if (event.key === 'ArrowDown') {
      setOpen(true);
      setActive((a) => Math.min(a + 1, Math.max(0, options.length - 1)));
    } else if (event.key === 'ArrowUp') {
      setActive((a) => Math.max(0, a - 1));
    } else if (event.key === 'Enter') {
      const s = options[active];
      if (!s) return;
      pick(s);
    } else if (event.key === 'Escape') {
      if (!open && text === '') return;
      setOpen(false);
      setText('');
    } else return;
    event.preventDefault();
    event.stopPropagation();
  }

  const status = !open || deferred.length === 0 ? '' : search.isPending ? 'Searching…' : options.length === 0 ? `No subject matches “${deferred}”.` : `${options.length} ${options.length === 1 ? 'subject matches' : 'subjects match'}; arrow keys to choose, Enter to add.`;

  return (
    <div className="relative space-y-1.5">
      <label htmlFor={id} className="block font-bold">
        {label}
      </label>
      {hint ? (
        <p id={`${id}-hint`} className="text-sm text-muted">
          {hint}
        </p>
      ) : null}
      <input
        ref={inputRef}
        id={id}
        type="text"
        role="combobox"
        autoComplete="off"
        aria-autocomplete="list"
        aria-expanded={options.length > 0}
        aria-controls={listId}
        aria-activedescendant={options.length > 0 ? optionId(active) : undefined}
        aria-describedby={hint ? `${id}-hint` : undefined}
        className={controlClass}
        value={text}
        onChange={(e) => {
          setText(e.currentTarget.value);
          setOpen(true);
          setActive(0);
        }}
        onKeyDown={onKeyDown}
        onBlur={() => setOpen(false)}
      />
      <p role="status" className="sr-only">
        {status}
      </p>
      <ul id={listId} role="listbox" aria-label={`${label}: matches`} className={cx('absolute z-10 mt-1 max-h-80 w-full overflow-auto rounded-control border-2 border-ink bg-raised', options.length === 0 && 'hidden')}>
        {options.map((s, i) => (
          <li
            key={s.id}
            id={optionId(i)}
            role="option"
            aria-selected={i === active}
            onMouseDown={(e) => {
              e.preventDefault();
              pick(s);
            }}
            className={cx('cursor-pointer border-b border-rule px-3 py-2 last:border-b-0', i === active && 'bg-ink text-paper')}
          >
            <span className="font-bold">{s.prefLabel}</span>
            {s.matchedAltLabel ? <span> (also called “{s.matchedAltLabel}”)</span> : null}
            {taken.has(s.id) ? <span>, already on this item</span> : null}
            {s.broader.length ? <span className="block text-sm">broader: {broaderPath(s)}</span> : null}
          </li>
        ))}
      </ul>
    </div>
  );
}
