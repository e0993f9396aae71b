import { useEffect, useId, useRef, useState } from 'react';
import { ALT_TEXT_RULES } from '../../../../common/alt-text/index.ts';
import { Button } from '../ui/button';
import { Checkbox } from '../ui/checkbox';
import { DESK_SHORTCUTS, setSingleKeysEnabled, singleKeysEnabled } from './shortcuts';

/** The keyboard help and the checker's rules with their sources, in a modal dialog ("?" opens and closes it). */
export function ShortcutsHelp({ open, onClose, onSingleKeys }: { open: boolean; onClose(): void; onSingleKeys(on: boolean): void }) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  const [single, setSingle] = useState(singleKeysEnabled);

  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    if (!open && d.open) d.close();
  }, [open]);

  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      onClose={onClose}
      onKeyDown={(e) => {
        if (e.key === '?') {
          e.preventDefault();
          onClose();
        }
      }}
      className="m-auto max-h-[90vh] w-[min(48rem,95vw)] overflow-auto rounded-card border-2 border-ink bg-raised p-6 text-ink backdrop:bg-ink/60"
    >
      <div className="flex items-start justify-between gap-4">
        <h2 id={titleId} className="text-2xl font-bold">
          Keyboard and checker help
        </h2>
        <Button onClick={onClose}>Close</Button>
      </div>
      <p className="mt-2 max-w-prose">
        Every action of the desk has a key. Single keys work while the focus is on the desk, outside the text fields; turn them off if they get in the way of
        your screen reader or speech input.
      </p>
      <Checkbox
        className="mt-2"
        label="Single-key shortcuts on"
        checked={single}
        onChange={(e) => {
          const on = e.currentTarget.checked;
          setSingle(on);
          setSingleKeysEnabled(on);
          onSingleKeys(on);
        }}
      />
      <table className="mt-4 w-full border-collapse text-left">
        <caption className="sr-only">Keyboard shortcuts of the review desk</caption>
        <thead>
          <tr className="border-b-2 border-ink">
            <th scope="col" className="py-2 pr-4">
              Key
            </th>
            <th scope="col" className="py-2">
              Does
            </th>
          </tr>
        </thead>
        <tbody>
          {DESK_SHORTCUTS.map((s) => (
            <tr key={s.keys} className="border-b border-rule">
              <td className="py-1.5 pr-4 font-bold whitespace-nowrap">
                <kbd>{s.keys}</kbd>
              </td>
              <td className="py-1.5">{s.action}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <h3 className="mt-6 text-xl font-bold">What the alt-text checker looks for</h3>
      <p className="mt-1 max-w-prose">
        Errors block approval, advice never does. The rules point to WCAG 2.2 and common practice; they help, but Cartouche claims no compliance with any law —
        obligations differ by jurisdiction.
      </p>
      <ul className="mt-2 space-y-2">
        {ALT_TEXT_RULES.map((r) => (
          <li key={r.id}>
            <span className="font-bold">{r.severity === 'error' ? 'Blocks approval' : 'Advice'}:</span> {r.summary}{' '}
            <span className="text-sm text-muted">({r.sources.map((s) => s.label).join('; ')})</span>
          </li>
        ))}
      </ul>
    </dialog>
  );
}
