import { queryOptions, useQuery } from '@tanstack/react-query';
import { http, unexpectedShape } from './http';
import { queryKeys } from './query-keys';

/** One message the development mail server captured instead of sending it. */
export interface MessageSummary {
  id: string;
  /** ISO 8601 time the message was received. */
  receivedAt: string;
  /** Envelope sender; empty for a null sender. */
  from: string;
  /** Envelope recipients. */
  to: string[];
  subject: string;
  /** Size of the raw message in bytes. */
  size: number;
}

export interface MailboxResponse {
  messages: MessageSummary[];
}

export interface MailboxMessage {
  summary: MessageSummary;
  /** The decoded plain-text body. */
  text: string;
  /** The message exactly as received. */
  raw: string;
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function isSummary(value: unknown): value is MessageSummary {
  return (
    isRecord(value) &&
    typeof value.id === 'string' &&
    typeof value.receivedAt === 'string' &&
    typeof value.from === 'string' &&
    Array.isArray(value.to) &&
    typeof value.subject === 'string' &&
    typeof value.size === 'number'
  );
}

/** Newest first, whatever order the server used. */
function newestFirst(a: MessageSummary, b: MessageSummary): number {
  return Date.parse(b.receivedAt) - Date.parse(a.receivedAt) || b.id.localeCompare(a.id);
}

/** GET /api/mailbox */
export async function getMailbox(signal?: AbortSignal): Promise<MailboxResponse> {
  const path = '/api/mailbox';
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.messages) || !body.messages.every(isSummary)) {
    throw unexpectedShape(path, 'a list of messages');
  }
  return { messages: [...body.messages].sort(newestFirst) };
}

export function mailboxQueryOptions() {
  return queryOptions({
    queryKey: queryKeys.mailbox.list(),
    queryFn: ({ signal }) => getMailbox(signal),
    staleTime: 5_000,
  });
}

export function useMailbox() {
  return useQuery(mailboxQueryOptions());
}

/** GET /api/mailbox/:id */
export async function getMailboxMessage(id: string, signal?: AbortSignal): Promise<MailboxMessage> {
  const path = `/api/mailbox/${encodeURIComponent(id)}`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !isSummary(body.summary) || typeof body.text !== 'string' || typeof body.raw !== 'string') {
    throw unexpectedShape(path, 'a message');
  }
  return { summary: body.summary, text: body.text, raw: body.raw };
}

export function mailboxMessageQueryOptions(id: string) {
  return queryOptions({
    queryKey: queryKeys.mailbox.message(id),
    queryFn: ({ signal }) => getMailboxMessage(id, signal),
    // A captured message never changes.
    staleTime: Infinity,
  });
}

export function useMailboxMessage(id: string | null) {
  return useQuery({ ...mailboxMessageQueryOptions(id ?? ''), enabled: id !== null });
}
