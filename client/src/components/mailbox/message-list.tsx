import { Link } from 'react-router';
import type { MessageSummary } from '../../api/mailbox';
import { formatDateTime } from '../../lib/format';
import { cx } from '../ui/cx';

/** The captured messages, newest first; each opens in the reading pane. */
export function MessageList({ messages, selectedId }: { messages: MessageSummary[]; selectedId: string | null }) {
  return (
    <ul className="space-y-2">
      {messages.map((message) => {
        const selected = message.id === selectedId;
        const received = formatDateTime(message.receivedAt);
        return (
          <li key={message.id}>
            <Link
              to={{ search: `?${new URLSearchParams({ message: message.id }).toString()}` }}
              aria-current={selected ? 'true' : undefined}
              preventScrollReset
              className={cx(
                'block min-h-11 rounded-control border-2 px-3 py-2 text-ink no-underline hover:text-ink',
                selected ? 'border-ink border-l-[6px] bg-raised' : 'border-line bg-raised hover:border-ink hover:bg-sunk',
              )}
            >
              <span className="block font-bold break-words">{message.subject || '(no subject)'}</span>
              <span className="block text-sm break-all text-muted">To {message.to.join(', ') || 'nobody'}</span>
              {received ? <span className="block text-sm text-muted">{received}</span> : null}
              {selected ? <span className="mt-1 block text-sm font-bold">Shown in the reading pane</span> : null}
            </Link>
          </li>
        );
      })}
    </ul>
  );
}
