import type { ItemRecord } from '../../api/items';
import { formatDateTime } from '../../lib/format';
import { methodWords } from '../review/words';

/** Who decided what about an item, when, and which model version's suggestion they answered. */
export function ItemHistory({ history }: { history: ItemRecord['history'] }) {
  if (history.length === 0) return <p className="text-muted">Nothing has been decided about this item yet.</p>;
  return (
    <ol className="space-y-2">
      {history.map((h, i) => (
        <li key={`${h.at}-${i}`} className="border-l-4 border-line pl-3">
          <p>
            <span className="font-bold">{h.actor?.name ?? 'Cartouche'}</span> {h.summary}
            {h.model ? `, answering model version ${h.model.version} (${methodWords[h.model.method] ?? h.model.method})` : ''}
            {typeof h.detail?.because === 'string' ? ` — ${h.detail.because}` : ''}
          </p>
          <p className="text-sm text-muted">
            <time dateTime={h.at}>{formatDateTime(h.at)}</time>
          </p>
        </li>
      ))}
    </ol>
  );
}
