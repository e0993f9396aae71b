import { useId, useRef, useState, type DragEvent } from 'react';
import { Button } from '../ui/button';
import { cx } from '../ui/cx';

export interface ScanDropZoneProps {
  /** what the zone says it takes, e.g. "JPEG, PNG, TIFF or WebP, up to 200 MB each" */
  hint: string;
  disabled?: boolean;
  /** why it is disabled, in words (shown instead of the hint) */
  disabledReason?: string;
  onFiles: (files: File[]) => void;
}

/** A sheet of paper with a tab, an arrow rising out of it: "bring in". Decorative. */
function IntakeGlyph() {
  return (
    <svg viewBox="0 0 48 48" width="48" height="48" aria-hidden="true" focusable="false" className="shrink-0 text-accent">
      <path d="M10 16h10l3 3h15v21H10z" fill="none" stroke="currentColor" strokeWidth="2.5" strokeLinejoin="round" />
      <path d="M24 36V22m-6 6l6-6 6 6" fill="none" stroke="currentColor" strokeWidth="2.5" strokeLinecap="round" strokeLinejoin="round" />
      <path d="M14 10h20" stroke="currentColor" strokeWidth="2.5" strokeLinecap="round" opacity="0.6" />
    </svg>
  );
}

/**
 * Where scans are dropped, with a button that opens the file chooser for people who use the keyboard or
 * prefer not to drag. Both lead to the same list of files.
 */
export function ScanDropZone({ hint, disabled = false, disabledReason, onFiles }: ScanDropZoneProps) {
  const inputRef = useRef<HTMLInputElement>(null);
  const [over, setOver] = useState(false);
  const hintId = useId();

  function take(list: FileList | null) {
    const files = list ? Array.from(list) : [];
    if (files.length > 0 && !disabled) onFiles(files);
  }

  function onDragOver(event: DragEvent<HTMLDivElement>) {
    if (!event.dataTransfer.types.includes('Files')) return;
    event.preventDefault();
    event.dataTransfer.dropEffect = disabled ? 'none' : 'copy';
    if (!disabled) setOver(true);
  }

  function onDrop(event: DragEvent<HTMLDivElement>) {
    event.preventDefault();
    setOver(false);
    take(event.dataTransfer.files);
  }

  return (
    <div
      onDragOver={onDragOver}
      onDragEnter={onDragOver}
      onDragLeave={(event) => {
        if (!event.currentTarget.contains(event.relatedTarget as Node | null)) setOver(false);
      }}
      onDrop={onDrop}
      className={cx(
        'flex flex-col items-center gap-3 rounded-card border-2 px-4 py-8 text-center sm:px-8',
        over ? 'border-solid border-accent bg-accent-tint' : 'border-dashed border-line bg-sunk',
        disabled && 'opacity-80',
      )}
    >
      <IntakeGlyph />
      <p className="text-lg font-bold">{over ? 'Release to add these scans' : 'Drop scans here'}</p>
      <p className="text-muted">or</p>
      <Button variant="primary" disabled={disabled} aria-describedby={hintId} onClick={() => inputRef.current?.click()}>
        Choose scans…
      </Button>
      <p id={hintId} className="max-w-prose text-sm text-muted">
        {disabled && disabledReason ? disabledReason : hint}
      </p>
      <input
        ref={inputRef}
        type="file"
        multiple
        hidden
        aria-label="Scans to add"
        onChange={(event) => {
          take(event.currentTarget.files);
          event.currentTarget.value = '';
        }}
      />
    </div>
  );
}
