import { Link } from 'react-router';
import type { CatalogueRow } from '../../api/items';
import { formatDateTime } from '../../lib/format';

export const stateWords: Record<CatalogueRow['state'], string> = { new: 'New', suggested: 'Suggested, waiting for review', approved: 'Approved' };

/** One page of the catalogue. */
export function CatalogueTable({ rows, caption }: { rows: readonly CatalogueRow[]; caption: string }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-left">
        <caption className="pb-2 text-left text-muted">{caption}</caption>
        <thead>
          <tr className="border-b-2 border-ink">
            <th scope="col" className="py-2 pr-3">
              Item
            </th>
            <th scope="col" className="py-2 pr-3">
              Caption
            </th>
            <th scope="col" className="py-2 pr-3">
              Alt text
            </th>
            <th scope="col" className="py-2 pr-3">
              Subjects
            </th>
            <th scope="col" className="py-2">
              State
            </th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.id} className="border-b border-rule align-top">
              <th scope="row" className="py-2 pr-3">
                <Link to={`/catalogue/items/${r.id}`} className="inline-flex min-h-11 items-center gap-2 font-bold">
                  <img src={r.thumbUrl} alt="" className="h-12 w-16 rounded border border-line bg-sunk object-contain" />
                  {r.identifier}
                </Link>
              </th>
              <td className="max-w-xs py-2 pr-3">{r.caption ?? <span className="text-muted">none</span>}</td>
              <td className="max-w-xs py-2 pr-3">{r.decorative ? <span className="text-muted">decorative, no alt text</span> : (r.altText ?? <span className="text-muted">not written</span>)}</td>
              <td className="py-2 pr-3">{r.subjects.length ? r.subjects.join(', ') : <span className="text-muted">none confirmed</span>}</td>
              <td className="py-2">
                {stateWords[r.state]}
                {r.approvedBy ? (
                  <span className="block text-sm text-muted">
                    by {r.approvedBy.name}
                    {r.approvedAt ? `, ${formatDateTime(r.approvedAt)}` : ''}
                  </span>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
