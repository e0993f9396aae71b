import { useId } from 'react';
import { Link, useParams } from 'react-router';
import { problemOf, problemReference } from '../api/http';
import { useItemRecord } from '../api/items';
import { hasPermission, useSession } from '../api/session';
import { stateWords } from '../components/catalogue/catalogue-table';
import { ItemHistory } from '../components/catalogue/item-history';
import { Card } from '../components/ui/card';
import { ProblemNotice } from '../components/ui/problem-notice';
import { formatDateTime } from '../lib/format';

/** One item's record in the catalogue: its fields, its description and subjects, and its history. */
export function ItemRecordRoute() {
  const { id } = useParams();
  const itemId = Number(id);
  const record = useItemRecord(Number.isInteger(itemId) && itemId > 0 ? itemId : 0);
  const { user } = useSession();
  const historyId = useId();
  if (record.isError) {
    const p = problemOf(record.error);
    return <ProblemNotice headingLevel={1} title={p.title} detail={p.detail} reference={problemReference(p)} action={<Link to="/catalogue">Back to the catalogue</Link>} />;
  }
  if (!record.data) return <p role="status" className="text-muted">Loading the item…</p>;
  const { item, history } = record.data;
  const fields: Array<[string, string | null]> = [
    ['Collection', item.collection?.name ?? null],
    ['Caption', item.caption],
    ['Creator', item.creator],
    ['Date', item.dateText],
    ['Rights', item.rights],
    ['File', item.fileName],
    ['State', `${stateWords[item.state]}${item.approvedAt ? `, ${formatDateTime(item.approvedAt)}` : ''}`],
  ];
  return (
    <>
      <title>{`${item.identifier} · Catalogue · Cartouche`}</title>
      <div className="space-y-6">
        <p>
          <Link to={`/catalogue?collection=${item.collection?.id ?? ''}`}>Back to the catalogue</Link>
        </p>
        <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">{item.identifier}</h1>
        <div className="grid gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
          <img src={item.imageUrl} alt={item.decorative ? '' : (item.altText ?? `Scan of ${item.identifier}, not described yet`)} className="w-full rounded-card border border-line bg-sunk" />
          <Card className="space-y-4">
            <dl className="grid grid-cols-[max-content_minmax(0,1fr)] gap-x-4 gap-y-1">
              {fields.map(([k, v]) => (
                <div key={k} className="contents">
                  <dt className="font-bold">{k}</dt>
                  <dd className="break-words">{v ?? <span className="text-muted">not recorded</span>}</dd>
                </div>
              ))}
            </dl>
            {item.captionFlagged ? (
              <p className="rounded-control border-2 border-ink p-2">
                <span className="font-bold">Caption flagged</span> for harmful or outdated language: {item.captionFlagNote}
              </p>
            ) : null}
            <div>
              <h2 className="text-xl font-bold">Alt text</h2>
              <p>{item.decorative ? 'Decorative: no alt text by design.' : (item.altText ?? 'Not written yet.')}</p>
              {item.state !== 'approved' && item.altText ? <p className="text-sm text-muted">A draft, not approved yet.</p> : null}
            </div>
            {item.longDescription ? (
              <div>
                <h2 className="text-xl font-bold">Long description</h2>
                <p className="whitespace-pre-wrap">{item.longDescription}</p>
              </div>
            ) : null}
            <div>
              <h2 className="text-xl font-bold">Confirmed subjects</h2>
              <p>{item.subjects.length ? item.subjects.map((s) => `${s.prefLabel}${s.kind === 'form' ? ' (form)' : ''}`).join(', ') : 'None yet.'}</p>
            </div>
            {item.ocrText ? (
              <div>
                <h2 className="text-xl font-bold">Text in the image</h2>
                {item.mostlyText ? <p className="text-sm">Mostly text (WCAG 2.2 SC 1.4.5 Images of Text).</p> : null}
                <pre className="whitespace-pre-wrap font-sans">{item.ocrText}</pre>
              </div>
            ) : null}
            {hasPermission(user, 'review:write') ? (
              <p>
                <Link to={`/review?collection=${item.collection?.id ?? ''}`}>Open the review desk</Link>
              </p>
            ) : null}
          </Card>
        </div>
        <Card as="section" aria-labelledby={historyId} className="space-y-3">
          <h2 id={historyId} className="text-2xl font-bold">
            History
          </h2>
          <ItemHistory history={history} />
        </Card>
      </div>
    </>
  );
}
