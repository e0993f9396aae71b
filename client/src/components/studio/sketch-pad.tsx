import { useCallback, useEffect, useId, useRef, useState, type KeyboardEvent, type PointerEvent } from 'react';
import { Button } from '../ui/button';
import { cx } from '../ui/cx';

/** The drawing's size in pixels: the PNG that becomes the example. */
const WIDTH = 640;
const HEIGHT = 480;
const PAPER = '#ffffff';
const INK = '#1d1b18';

const WIDTHS = [
  { name: 'Fine', px: 3 },
  { name: 'Medium', px: 7 },
  { name: 'Bold', px: 14 },
] as const;

type Tool = 'pen' | 'eraser';

interface Point {
  x: number;
  y: number;
  /** pen pressure 0–1 (0.5 for a mouse or a finger) */
  p: number;
}

interface Stroke {
  tool: Tool;
  width: number;
  points: Point[];
}

/** One entry of the history: a stroke, or a clearing of everything before it. */
type Step = { kind: 'stroke'; stroke: Stroke } | { kind: 'clear' };

function visibleStrokes(steps: readonly Step[]): Stroke[] {
  const out: Stroke[] = [];
  for (const s of steps) {
    if (s.kind === 'clear') out.length = 0;
    else out.push(s.stroke);
  }
  return out;
}

function paint(ctx: CanvasRenderingContext2D, strokes: readonly Stroke[]) {
  ctx.fillStyle = PAPER;
  ctx.fillRect(0, 0, WIDTH, HEIGHT);
  ctx.lineCap = 'round';
  ctx.lineJoin = 'round';
  for (const s of strokes) {
    ctx.strokeStyle = s.tool === 'eraser' ? PAPER : INK;
    ctx.fillStyle = ctx.strokeStyle;
    const eraserScale = s.tool === 'eraser' ? 3 : 1;
    if (s.points.length === 1) {
      const q = s.points[0]!;
      ctx.beginPath();
      ctx.arc(q.x, q.y, (s.width * eraserScale * (0.5 + q.p)) / 2, 0, Math.PI * 2);
      ctx.fill();
      continue;
    }
    for (let i = 1; i < s.points.length; i++) {
      const a = s.points[i - 1]!;
      const b = s.points[i]!;
      ctx.lineWidth = s.width * eraserScale * (0.5 + (a.p + b.p) / 2);
      ctx.beginPath();
      ctx.moveTo(a.x, a.y);
      ctx.lineTo(b.x, b.y);
      ctx.stroke();
    }
  }
}

export interface SketchPadProps {
  /** saves the drawing (a PNG file); the pad clears itself once this resolves */
  onSave(file: File): Promise<unknown>;
  saving: boolean;
}

/**
 * A sketch pad for drawing an example: mouse, pen (with pressure) and touch through pointer events; three pen
 * widths, an eraser, undo and redo, clear. Every control is a button and works from the keyboard (Ctrl+Z and
 * Ctrl+Shift+Z also undo and redo on the pad); drawing itself needs a pointer, and the upload above is the way
 * to bring in a drawing made elsewhere.
 */
export function SketchPad({ onSave, saving }: SketchPadProps) {
  const canvasRef = useRef<HTMLCanvasElement>(null);
  const [steps, setSteps] = useState<Step[]>([]);
  const [undone, setUndone] = useState<Step[]>([]);
  const [tool, setTool] = useState<Tool>('pen');
  const [width, setWidth] = useState<number>(WIDTHS[1].px);
  const [announcement, setAnnouncement] = useState('');
  const current = useRef<Stroke | null>(null);
  const hintId = useId();
  const strokes = visibleStrokes(steps);
  const empty = strokes.length === 0;

  const redraw = useCallback(
    (extra?: Stroke) => {
      const ctx = canvasRef.current?.getContext('2d');
      if (ctx) paint(ctx, extra ? [...visibleStrokes(steps), extra] : visibleStrokes(steps));
    },
    [steps],
  );
  useEffect(() => redraw(), [redraw]);

  function pointAt(event: PointerEvent<HTMLCanvasElement>): Point {
    const rect = event.currentTarget.getBoundingClientRect();
    return {
      x: ((event.clientX - rect.left) / rect.width) * WIDTH,
      y: ((event.clientY - rect.top) / rect.height) * HEIGHT,
      p: event.pointerType === 'pen' && event.pressure > 0 ? event.pressure : 0.5,
    };
  }

  function down(event: PointerEvent<HTMLCanvasElement>) {
    if (event.button !== 0 && event.pointerType === 'mouse') return;
    event.preventDefault();
    event.currentTarget.setPointerCapture(event.pointerId);
    current.current = { tool, width, points: [pointAt(event)] };
    redraw(current.current);
  }

  function moveTo(event: PointerEvent<HTMLCanvasElement>) {
    if (!current.current) return;
    // coalesced events keep a fast pen stroke smooth
    const events = typeof event.nativeEvent.getCoalescedEvents === 'function' ? event.nativeEvent.getCoalescedEvents() : [];
    if (events.length > 0) {
      const rect = event.currentTarget.getBoundingClientRect();
      for (const e of events) current.current.points.push({ x: ((e.clientX - rect.left) / rect.width) * WIDTH, y: ((e.clientY - rect.top) / rect.height) * HEIGHT, p: e.pointerType === 'pen' && e.pressure > 0 ? e.pressure : 0.5 });
    } else current.current.points.push(pointAt(event));
    redraw(current.current);
  }

  function up() {
    const stroke = current.current;
    current.current = null;
    if (!stroke) return;
    setSteps((s) => [...s, { kind: 'stroke', stroke }]);
    setUndone([]);
  }

  function undo() {
    const last = steps[steps.length - 1];
    if (!last) return;
    setSteps(steps.slice(0, -1));
    setUndone([...undone, last]);
    setAnnouncement(last.kind === 'clear' ? 'Clearing undone.' : 'Last stroke undone.');
  }

  function redo() {
    const next = undone[undone.length - 1];
    if (!next) return;
    setUndone(undone.slice(0, -1));
    setSteps([...steps, next]);
    setAnnouncement(next.kind === 'clear' ? 'Cleared again.' : 'Stroke redone.');
  }

  function clear() {
    if (empty) return;
    setSteps([...steps, { kind: 'clear' }]);
    setUndone([]);
    setAnnouncement('The pad is clear. Undo brings the drawing back.');
  }

  function onKeyDown(event: KeyboardEvent<HTMLDivElement>) {
    if (!(event.ctrlKey || event.metaKey) || event.key.toLowerCase() !== 'z') return;
    event.preventDefault();
    if (event.shiftKey) redo();
    else undo();
  }

  async function save() {
    const canvas = canvasRef.current;
    if (!canvas || empty || saving) return;
    const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, 'image/png'));
    if (!blob) {
      setAnnouncement('The drawing could not be turned into a PNG file. Try again.');
      return;
    }
    const stamp = new Date().toISOString().replace(/[:.]/g, '-');
    try {
      await onSave(new File([blob], `sketch-pad-${stamp}.png`, { type: 'image/png' }));
      setSteps([]);
      setUndone([]);
      setAnnouncement('The sketch is saved as an example. The pad is ready for the next one.');
    } catch {
      setAnnouncement('The sketch was not saved; it is still on the pad.');
    }
  }

  // a pressed tool is filled with ink and carries a tick: the state shows in shape as well as colour
  const toggle = () => 'aria-pressed:border-ink aria-pressed:bg-ink aria-pressed:text-paper aria-pressed:hover:bg-ink';
  const tick = (pressed: boolean) =>
    pressed ? (
      <svg viewBox="0 0 16 16" width="16" height="16" aria-hidden="true" focusable="false">
        <path d="M3 8.5l3.2 3.2L13 5" fill="none" stroke="currentColor" strokeWidth="2.2" strokeLinecap="round" strokeLinejoin="round" />
      </svg>
    ) : null;

  return (
    <div className="space-y-3" onKeyDown={onKeyDown}>
      <div role="toolbar" aria-label="Sketch pad tools" className="flex flex-wrap items-center gap-2">
        <div role="group" aria-label="Tool" className="flex gap-2">
          <Button aria-pressed={tool === 'pen'} className={toggle()} onClick={() => setTool('pen')}>
            {tick(tool === 'pen')}
            Pen
          </Button>
          <Button aria-pressed={tool === 'eraser'} className={toggle()} onClick={() => setTool('eraser')}>
            {tick(tool === 'eraser')}
            Eraser
          </Button>
        </div>
        <div role="group" aria-label="Line width" className="flex gap-2">
          {WIDTHS.map((w) => (
            <Button key={w.name} aria-pressed={width === w.px} className={toggle()} onClick={() => setWidth(w.px)}>
              {tick(width === w.px)}
              <svg viewBox="0 0 24 24" width="24" height="24" aria-hidden="true" focusable="false">
                <line x1="4" y1="12" x2="20" y2="12" stroke="currentColor" strokeWidth={Math.max(1.5, w.px / 2)} strokeLinecap="round" />
              </svg>
              {w.name}
            </Button>
          ))}
        </div>
        <div role="group" aria-label="History" className="flex gap-2">
          <Button onClick={undo} disabled={steps.length === 0}>
            Undo
          </Button>
          <Button onClick={redo} disabled={undone.length === 0}>
            Redo
          </Button>
          <Button onClick={clear} disabled={empty}>
            Clear
          </Button>
        </div>
      </div>
      <canvas
        ref={canvasRef}
        width={WIDTH}
        height={HEIGHT}
        role="img"
        aria-label={empty ? 'Sketch pad, empty' : `Sketch pad with ${strokes.length} ${strokes.length === 1 ? 'stroke' : 'strokes'}`}
        aria-describedby={hintId}
        data-testid="sketch-pad"
        className={cx('block w-full max-w-2xl touch-none rounded-card border-2 border-line bg-raised', tool === 'eraser' ? 'cursor-cell' : 'cursor-crosshair')}
        style={{ aspectRatio: `${WIDTH} / ${HEIGHT}` }}
        onPointerDown={down}
        onPointerMove={moveTo}
        onPointerUp={up}
        onPointerCancel={up}
        onLostPointerCapture={up}
      />
      <p id={hintId} className="max-w-prose text-sm text-muted">
        Draw with a mouse, a pen or a finger. A few clear outlines work better than shading. Drawing needs a pointer; to bring in a drawing made elsewhere, use
        “Choose images…” above.
      </p>
      <div className="flex flex-wrap items-center gap-3">
        <Button variant="primary" onClick={() => void save()} disabled={empty} aria-disabled={saving ? true : undefined}>
          {saving ? 'Saving the sketch…' : 'Save the sketch as an example'}
        </Button>
      </div>
      <p role="status" className="sr-only">
        {announcement}
      </p>
    </div>
  );
}
