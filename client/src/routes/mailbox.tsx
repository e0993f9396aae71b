import { useState } from 'react';
import { useSearchParams } from 'react-router';
import { problemOf, problemReference } from '../api/http';
import { useMailbox } from '../api/mailbox';
import { useSession } from '../api/session';
import { MessageList } from '../components/mailbox/message-list';
import { MessageView } from '../components/mailbox/message-view';
import { Button } from '../components/ui/button';
import { Card } from '../components/ui/card';
import { ProblemNotice } from '../components/ui/problem-notice';
import { formatCount } from '../lib/format';

function DevelopmentOnly() {
  return (
    <div className="rounded-card border-2 border-dashed border-ink bg-sunk px-4 py-3 sm:px-5">
      <p className="font-bold">This is a development mailbox: no mail leaves the machine.</p>
      <p className="mt-1 max-w-prose">
        Cartouche’s own mail server catches every message Cartouche sends (invitations, password links) and keeps it
        here instead of delivering it, so you can follow the links while developing or testing.
      </p>
    </div>
  );
}

/** The messages the development mail server captured, newest first, with a reading pane. */
export function MailboxRoute() {
  const session = useSession();
  if (!session.mailbox) {
    return (
      <>
        <title>Mailbox · Cartouche</title>
        <div className="max-w-prose space-y-4">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">No development mailbox on this server</h1>
          <p className="text-lg">
            This Cartouche server delivers its e-mail for real, so there is no captured mail to read here.
          </p>
        </div>
      </>
    );
  }
  return <Mailbox />;
}

function Mailbox() {
  const mailbox = useMailbox();
  const [params] = useSearchParams();
  const selectedId = params.get('message');
  // Focus moves to a message only when someone opens it here, not when the page loads with one open.
  const [firstSelected] = useState(selectedId);
  const messages = mailbox.data?.messages;

  return (
    <>
      <title>Development mailbox · Cartouche</title>
      <div className="space-y-6">
        <div className="space-y-2">
          <h1 className="text-3xl font-bold tracking-tight sm:text-4xl">Development mailbox</h1>
          <DevelopmentOnly />
        </div>

        <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(18rem,24rem)_1fr]">
          <section aria-labelledby="messages-heading" aria-busy={mailbox.isPending} className="space-y-3">
            <div className="flex flex-wrap items-center justify-between gap-3">
              <h2 id="messages-heading" className="text-xl font-bold">
                Messages
                {messages ? (
                  <span className="font-normal text-muted">
                    {' '}
                    ({messages.length === 1 ? '1 message' : `${formatCount(messages.length)} messages`}, newest first)
                  </span>
                ) : null}
              </h2>
              <Button onClick={() => void mailbox.refetch()} aria-disabled={mailbox.isFetching || undefined}>
                {mailbox.isFetching && !mailbox.isPending ? 'Checking…' : 'Check for new mail'}
              </Button>
            </div>
            {mailbox.isPending ? (
              <p role="status" className="text-muted">
                Loading messages…
              </p>
            ) : messages === undefined ? (
              <ProblemNotice
                announce
                headingLevel={3}
                title={problemOf(mailbox.error).title}
                detail={problemOf(mailbox.error).detail}
                reference={problemReference(problemOf(mailbox.error))}
              />
            ) : messages.length === 0 ? (
              <p>No messages yet. Invitations and password links appear here as soon as Cartouche sends them.</p>
            ) : (
              <MessageList messages={messages} selectedId={selectedId} />
            )}
          </section>

          <Card as="section" aria-label="Reading pane" className="min-w-0">
            {selectedId ? (
              <MessageView key={selectedId} id={selectedId} focusOnOpen={selectedId !== firstSelected} />
            ) : (
              <p className="text-muted">Choose a message from the list to read it here.</p>
            )}
          </Card>
        </div>
      </div>
    </>
  );
}
