import type { ItemRecord } from '../../api/items';
import { HistoryList } from '../ui/history-list';
import { methodWords } from '../review/words';

/** Who decided what about an item, when, and which model version's suggestion they answered. */
export function ItemHistory({ history }: { history: ItemRecord['history'] }) {
  const entries = history.map((h) => ({
    ...h,
    summary:
      h.summary +
      (h.model ? `, answering model version ${h.model.version} (${methodWords[h.model.method] ?? h.model.method})` : '') +
      (typeof h.detail?.because === 'string' ? ` — ${h.detail.because}` : ''),
  }));
  return <HistoryList entries={entries} empty="Nothing has been decided about this item yet." />;
}
