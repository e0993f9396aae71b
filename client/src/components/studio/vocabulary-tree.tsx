import { DndContext, KeyboardSensor, PointerSensor, useDraggable, useDroppable, useSensor, useSensors, type DragEndEvent } from '@dnd-kit/core';
import { useId, useState } from 'react';
import { Link } from 'react-router';
import { problemOf } from '../../api/http';
import { useMoveSubject, type SubjectListEntry } from '../../api/subjects';
import { Button } from '../ui/button';
import { cx } from '../ui/cx';
import { SelectField } from '../ui/field';
import { buildTree, broaderChoices, subtreeIds, type TreeNode } from './tree';
import { kindShort, methodWords, statusWords } from './words';

interface VocabularyTreeProps {
  subjects: readonly SubjectListEntry[];
  canWrite: boolean;
  /** where a subject's page is */
  hrefOf(subject: SubjectListEntry): string;
}

const TOP = 'top-of-tree';

/** Six dots: "this can be picked up". Decorative; the button's name says it. */
function GripGlyph() {
  return (
    <svg viewBox="0 0 12 18" width="12" height="18" aria-hidden="true" focusable="false">
      {[3, 9, 15].flatMap((y) => [3, 9].map((x) => <circle key={`${x}-${y}`} cx={x} cy={y} r="1.6" fill="currentColor" />))}
    </svg>
  );
}

/**
 * The vocabulary as a tree of broader and narrower subjects. Archivists re-parent a subject by dragging
 * its handle onto another subject (or onto "Top of the tree"), or, without dragging, with its
 * "Move under…" control (WCAG 2.2 SC 2.5.7 asks for a way that needs no dragging). The server refuses
 * loops and stale copies; the refusal is shown and announced.
 */
export function VocabularyTree({ subjects, canWrite, hrefOf }: VocabularyTreeProps) {
  const move = useMoveSubject();
  const [message, setMessage] = useState('');
  const sensors = useSensors(useSensor(PointerSensor, { activationConstraint: { distance: 6 } }), useSensor(KeyboardSensor));
  const byId = new Map(subjects.map((s) => [s.id, s]));
  const tree = buildTree(subjects);

  function moveTo(subject: SubjectListEntry, broaderId: number | null) {
    if (subject.broaderId === broaderId) return;
    if (broaderId !== null && subtreeIds(subjects, subject.id).has(broaderId)) {
      setMessage(`“${subject.prefLabel}” cannot go under “${byId.get(broaderId)?.prefLabel}”, which is narrower than it.`);
      return;
    }
    const target = broaderId === null ? 'the top of the tree' : `“${byId.get(broaderId)?.prefLabel}”`;
    setMessage(`Moving “${subject.prefLabel}” under ${target}…`);
    move.mutate(
      { subjectId: subject.id, move: { broaderId, version: subject.version } },
      {
        onSuccess: () => setMessage(`“${subject.prefLabel}” is now under ${target}.`),
        onError: (error) => {
          const p = problemOf(error);
          setMessage(`“${subject.prefLabel}” was not moved. ${p.title}: ${p.detail}`);
        },
      },
    );
  }

  function onDragEnd(event: DragEndEvent) {
    const subject = byId.get(Number(event.active.id));
    if (!subject || !event.over) return;
    moveTo(subject, event.over.id === TOP ? null : Number(event.over.id));
  }

  const body = (
    <div className="space-y-3">
      <p role="status" className={cx(message ? 'rounded-card border-2 border-line bg-accent-tint px-4 py-2' : 'sr-only')}>
        {message}
      </p>
      {canWrite ? <TopDrop /> : null}
      <ul className="space-y-1">
        {tree.map((node) => (
          <TreeRow key={node.subject.id} node={node} subjects={subjects} canWrite={canWrite} hrefOf={hrefOf} onMove={moveTo} />
        ))}
      </ul>
    </div>
  );

  if (!canWrite) return body;
  return (
    <DndContext
      sensors={sensors}
      onDragEnd={onDragEnd}
      accessibility={{
        announcements: {
          onDragStart: ({ active }) => `Picked up “${byId.get(Number(active.id))?.prefLabel}”.`,
          onDragOver: ({ active, over }) => (over ? `“${byId.get(Number(active.id))?.prefLabel}” is over ${over.id === TOP ? 'the top of the tree' : `“${byId.get(Number(over.id))?.prefLabel}”`}.` : 'Not over a subject.'),
          onDragEnd: ({ active, over }) => (over ? `Dropped “${byId.get(Number(active.id))?.prefLabel}”.` : 'Dropped outside the tree; nothing moved.'),
          onDragCancel: ({ active }) => `Moving “${byId.get(Number(active.id))?.prefLabel}” was cancelled.`,
        },
        screenReaderInstructions: { draggable: 'To move this subject, press space or enter, use the arrow keys to reach another subject, and press space or enter again. Escape cancels. Or use its “Move under…” button.' },
      }}
    >
      {body}
    </DndContext>
  );
}

function TopDrop() {
  const { setNodeRef, isOver } = useDroppable({ id: TOP });
  return (
    <div ref={setNodeRef} className={cx('rounded-card border-2 border-dashed px-4 py-2 text-sm', isOver ? 'border-accent bg-accent-tint' : 'border-line')}>
      Top of the tree: drop a subject here to give it no broader subject.
    </div>
  );
}

interface TreeRowProps {
  node: TreeNode;
  subjects: readonly SubjectListEntry[];
  canWrite: boolean;
  hrefOf(subject: SubjectListEntry): string;
  onMove(subject: SubjectListEntry, broaderId: number | null): void;
}

function TreeRow({ node, subjects, canWrite, hrefOf, onMove }: TreeRowProps) {
  const s = node.subject;
  const facts = [kindShort[s.kind], statusWords[s.status].label.toLowerCase(), `${s.examples} ${s.examples === 1 ? 'example' : 'examples'}`, s.model ? `model v${s.model.version}: ${methodWords(s.model.method).label.toLowerCase()}` : 'no model yet'];
  return (
    <li>
      {canWrite ? <DraggableRow subject={s} facts={facts} href={hrefOf(s)} subjects={subjects} onMove={onMove} /> : <RowContent subject={s} facts={facts} href={hrefOf(s)} />}
      {node.children.length ? (
        <ul className="ml-5 mt-1 space-y-1 border-l-2 border-rule pl-4">
          {node.children.map((child) => (
            <TreeRow key={child.subject.id} node={child} subjects={subjects} canWrite={canWrite} hrefOf={hrefOf} onMove={onMove} />
          ))}
        </ul>
      ) : null}
    </li>
  );
}

function RowContent({ subject, facts, href }: { subject: SubjectListEntry; facts: string[]; href: string }) {
  return (
    <div className="min-w-0 flex-1">
      <Link to={href} className="font-bold">
        {subject.prefLabel}
      </Link>
      {subject.notation ? <span className="ml-2 text-sm text-muted">{subject.notation}</span> : null}
      <p className="text-sm text-muted">{facts.join(' · ')}</p>
    </div>
  );
}

function DraggableRow({ subject, facts, href, subjects, onMove }: { subject: SubjectListEntry; facts: string[]; href: string; subjects: readonly SubjectListEntry[]; onMove: TreeRowProps['onMove'] }) {
  const { attributes, listeners, setNodeRef: setDragRef, transform, isDragging } = useDraggable({ id: subject.id });
  const { setNodeRef: setDropRef, isOver } = useDroppable({ id: subject.id });
  const [moving, setMoving] = useState(false);
  const [target, setTarget] = useState<string>(subject.broaderId === null ? '' : String(subject.broaderId));
  const panelId = useId();
  const choices = broaderChoices(subjects, subject.id);
  const style = transform ? { transform: `translate3d(${transform.x}px, ${transform.y}px, 0)` } : undefined;

  return (
    <div
      ref={setDropRef}
      className={cx('rounded-card border-2 bg-raised px-2 py-1.5', isOver && !isDragging ? 'border-accent bg-accent-tint' : 'border-transparent')}
    >
      <div ref={setDragRef} style={style} className={cx('flex flex-wrap items-center gap-3', isDragging && 'relative z-10 rounded-card bg-raised shadow-lg')}>
        <button
          type="button"
          className="inline-flex min-h-11 min-w-11 cursor-grab items-center justify-center rounded-control border-2 border-line text-muted hover:border-ink"
          aria-label={`Drag “${subject.prefLabel}” to another broader subject`}
          {...listeners}
          {...attributes}
        >
          <GripGlyph />
        </button>
        <RowContent subject={subject} facts={facts} href={href} />
        <Button aria-expanded={moving} aria-controls={panelId} onClick={() => setMoving((m) => !m)}>
          Move under…<span className="sr-only"> (“{subject.prefLabel}”)</span>
        </Button>
      </div>
      {moving ? (
        <div id={panelId} className="mt-2 flex flex-wrap items-end gap-3 pl-14">
          <SelectField label={`New broader subject for “${subject.prefLabel}”`} value={target} onChange={(e) => setTarget(e.currentTarget.value)} fieldClassName="min-w-64">
            <option value="">None (top of the tree)</option>
            {choices.map((c) => (
              <option key={c.id} value={c.id}>
                {'\u2003'.repeat(c.depth)}
                {c.prefLabel}
              </option>
            ))}
          </SelectField>
          <Button
            variant="primary"
            onClick={() => {
              onMove(subject, target === '' ? null : Number(target));
              setMoving(false);
            }}
          >
            Move
          </Button>
          <Button onClick={() => setMoving(false)}>Cancel</Button>
        </div>
      ) : null}
    </div>
  );
}
