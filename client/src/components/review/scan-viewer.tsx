import { useId, type KeyboardEvent } from 'react';
import { Button } from '../ui/button';

export const ZOOM_STEPS = [1, 1.5, 2, 3, 4, 6] as const;

export function nextZoom(zoom: number, direction: 1 | -1): number {
  const i = ZOOM_STEPS.findIndex((z) => z >= zoom);
  const at = i === -1 ? ZOOM_STEPS.length - 1 : i;
  return ZOOM_STEPS[Math.min(ZOOM_STEPS.length - 1, Math.max(0, at + direction))]!;
}

interface ScanViewerProps {
  src: string;
  identifier: string;
  zoom: number;
  onZoom(zoom: number): void;
}

/**
 * The scan, large. It fits the frame at 100 %; zoomed in, the frame scrolls (arrow keys scroll it when it has
 * the focus). + and − zoom, 0 fits, from the frame itself or anywhere on the desk.
 */
export function ScanViewer({ src, identifier, zoom, onZoom }: ScanViewerProps) {
  const hintId = useId();
  const percent = `${Math.round(zoom * 100)} %`;

  function onKeyDown(event: KeyboardEvent<HTMLDivElement>) {
    if (event.ctrlKey || event.metaKey || event.altKey) return;
    if (event.key === '+' || event.key === '=') onZoom(nextZoom(zoom, 1));
    else if (event.key === '-') onZoom(nextZoom(zoom, -1));
    else if (event.key === '0') onZoom(1);
    else return;
    event.preventDefault();
    event.stopPropagation();
  }

  return (
    <figure className="space-y-2">
      <div
        role="group"
        tabIndex={0}
        aria-label={`Scan of ${identifier}, zoom ${percent}`}
        aria-describedby={hintId}
        onKeyDown={onKeyDown}
        className="max-h-[min(70vh,44rem)] overflow-auto rounded-card border-2 border-line bg-sunk"
      >
        <img
          src={src}
          alt={`Scan of ${identifier}`}
          className="block h-auto max-w-none"
          style={{ width: `${zoom * 100}%` }}
          draggable={false}
        />
      </div>
      <figcaption className="flex flex-wrap items-center justify-between gap-2">
        <span id={hintId} className="text-sm text-muted">
          Zoom {percent}. Keys: + zoom in, − zoom out, 0 fit; arrow keys scroll the scan when it has the focus.
        </span>
        <span className="flex gap-2">
          <Button onClick={() => onZoom(nextZoom(zoom, -1))} disabled={zoom <= ZOOM_STEPS[0]} aria-keyshortcuts="-">
            <span aria-hidden="true">−</span>
            <span className="sr-only">Zoom out</span>
          </Button>
          <Button onClick={() => onZoom(1)} aria-keyshortcuts="0">
            Fit
          </Button>
          <Button onClick={() => onZoom(nextZoom(zoom, 1))} disabled={zoom >= ZOOM_STEPS[ZOOM_STEPS.length - 1]!} aria-keyshortcuts="+">
            <span aria-hidden="true">+</span>
            <span className="sr-only">Zoom in</span>
          </Button>
        </span>
      </figcaption>
    </figure>
  );
}
