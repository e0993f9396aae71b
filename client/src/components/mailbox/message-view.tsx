import { useEffect, useRef } from 'react';
import { problemOf, problemReference } from '../../api/http';
import { useMailboxMessage } from '../../api/mailbox';
import { formatBytes, formatDateTime } from '../../lib/format';
import { Button } from '../ui/button';
import { ProblemNotice } from '../ui/problem-notice';
import { MessageText } from './message-text';

/** One captured message: its envelope, its plain text, and the raw message on request. */
export function MessageView({ id, focusOnOpen }: { id: string; focusOnOpen: boolean }) {
  const message = useMailboxMessage(id);
  const headingRef = useRef<HTMLHeadingElement>(null);
  const loaded = message.data !== undefined;

  // Opening a message from the list moves reading to it (on a narrow screen it is below the list).
  useEffect(() => {
    if (focusOnOpen && loaded) headingRef.current?.focus();
  }, [focusOnOpen, loaded, id]);

  if (message.isPending) {
    return (
      <p role="status" className="text-muted">
        Opening the message…
      </p>
    );
  }

  if (message.data === undefined) {
    const problem = problemOf(message.error);
    return (
      <ProblemNotice
        announce
        headingLevel={2}
        title={problem.status === 404 ? 'This message is not in the mailbox' : problem.title}
        detail={
          problem.status === 404
            ? 'It may have been cleared away. Choose another message from the list.'
            : problem.detail
        }
        reference={problemReference(problem)}
        action={
          problem.status === 404 ? undefined : (
            <Button variant="primary" onClick={() => void message.refetch()}>
              {message.isFetching ? 'Retrying…' : 'Retry'}
            </Button>
          )
        }
      />
    );
  }

  const { summary, text, raw } = message.data;
  const received = formatDateTime(summary.receivedAt);
  return (
    <article aria-labelledby="message-heading" className="space-y-5">
      <h2 id="message-heading" ref={headingRef} tabIndex={-1} className="rounded-control text-2xl font-bold break-words">
        {summary.subject || '(no subject)'}
      </h2>
      <dl className="grid grid-cols-1 gap-x-4 gap-y-1 sm:grid-cols-[max-content_1fr]">
        <dt className="text-muted">From</dt>
        <dd className="break-all">{summary.from || '(no sender)'}</dd>
        <dt className="text-muted">To</dt>
        <dd className="break-all">{summary.to.join(', ') || '(no recipient)'}</dd>
        {received ? (
          <>
            <dt className="text-muted">Received</dt>
            <dd>{received}</dd>
          </>
        ) : null}
        <dt className="text-muted">Size</dt>
        <dd>{formatBytes(summary.size)}</dd>
      </dl>
      <section aria-labelledby="message-text-heading" className="space-y-2 border-t border-rule pt-4">
        <h3 id="message-text-heading" className="text-lg font-bold">
          Message text
        </h3>
        {text.trim() === '' ? (
          <p className="text-muted">This message has no plain-text part.</p>
        ) : (
          <MessageText text={text} />
        )}
      </section>
      <details className="rounded-control border-2 border-line bg-paper">
        <summary className="flex min-h-11 cursor-pointer items-center rounded-control px-3 font-bold">
          Raw message, as received
        </summary>
        <pre className="max-h-96 overflow-auto border-t border-rule px-3 py-2 text-sm whitespace-pre-wrap break-all" tabIndex={0}>
          {raw}
        </pre>
      </details>
    </article>
  );
}
