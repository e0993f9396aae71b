import { useId } from 'react';
import type { DescriptionValues, ItemPanel } from '../../api/review';
import { formatDateTime } from '../../lib/format';
import { Button } from '../ui/button';

interface ConflictMergeProps {
  mine: DescriptionValues;
  theirs: ItemPanel;
  onKeepMine(): void;
  onTakeTheirs(): void;
  onEdit(): void;
}

function Version({ title, v }: { title: string; v: DescriptionValues }) {
  return (
    <div className="min-w-0 space-y-2 rounded-control border-2 border-line bg-raised p-3">
      <h4 className="font-bold">{title}</h4>
      <dl className="space-y-1">
        <dt className="text-sm font-bold">Alt text</dt>
        <dd className="break-words">{v.decorative ? <span className="text-muted">empty (decorative)</span> : v.altText || <span className="text-muted">empty</span>}</dd>
        <dt className="text-sm font-bold">Long description</dt>
        <dd className="break-words whitespace-pre-wrap">{v.longDescription || <span className="text-muted">none</span>}</dd>
        <dt className="text-sm font-bold">Decorative</dt>
        <dd>{v.decorative ? 'yes' : 'no'}</dd>
      </dl>
    </div>
  );
}

/** Someone saved the item after the editor's copy: both versions side by side, and the three ways on. Nothing is lost. */
export function ConflictMerge({ mine, theirs, onKeepMine, onTakeTheirs, onEdit }: ConflictMergeProps) {
  const titleId = useId();
  const t = theirs.item;
  const when = t.approvedAt ? formatDateTime(t.approvedAt) : null;
  return (
    <section role="alert" aria-labelledby={titleId} className="space-y-3 rounded-card border-2 border-ink border-l-[6px] bg-sunk p-4">
      <h3 id={titleId} className="text-xl font-bold">
        Changed by someone else meanwhile
      </h3>
      <p className="max-w-prose">
        {t.identifier} was saved by another editor after you opened it (it is at version {t.version} now{t.approvedBy ? `, approved by ${t.approvedBy.name}${when ? ` on ${when}` : ''}` : ''}).
        Nothing of yours was saved and nothing is lost: your text stays in this browser until you choose.
      </p>
      <div className="grid gap-3 md:grid-cols-2">
        <Version title="Your version (not saved)" v={mine} />
        <Version title="Stored now" v={{ altText: t.altText ?? '', longDescription: t.longDescription ?? '', decorative: t.decorative }} />
      </div>
      <div className="flex flex-wrap gap-2">
        <Button variant="primary" onClick={onKeepMine}>
          Save mine over theirs
        </Button>
        <Button onClick={onTakeTheirs}>Take theirs</Button>
        <Button onClick={onEdit}>Edit mine first</Button>
      </div>
    </section>
  );
}
