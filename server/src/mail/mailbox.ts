/**
 * Reads the development mailbox that the fake SMTP server (`fake-smtp.ts`) fills.
 *
 * Each message is two files in the mail folder, both written atomically (temporary file, then
 * rename), the envelope last, so a message is listed only once it is complete:
 *   `<id>.eml`   the message exactly as received (RFC 5322)
 *   `<id>.json`  its summary: `{ id, receivedAt, from, to, subject, size }`
 *
 * Message ids are `<13-digit epoch milliseconds>-<4-digit sequence>-<8 hex digits>`; they sort in
 * the order the messages arrived. Anything else is refused before the file system is touched.
 */
import { readFile, readdir } from 'node:fs/promises';
import { join } from 'node:path';

export interface MessageSummary {
  id: string;
  /** ISO 8601 time the message was received */
  receivedAt: string;
  /** envelope sender (MAIL FROM); empty for a null sender */
  from: string;
  /** envelope recipients (RCPT TO) */
  to: string[];
  /** the Subject header, RFC 2047 encoded-words decoded; empty when there is none */
  subject: string;
  /** size of the raw message in bytes */
  size: number;
}

export interface StoredMessage {
  summary: MessageSummary;
  /** the raw message as received, decoded as UTF-8 */
  raw: string;
}

export const MESSAGE_ID_PATTERN = /^\d{13}-\d{4}-[0-9a-f]{8}$/;

export class InvalidMessageIdError extends Error {
  constructor(id: string) {
    super(`not a message id: ${JSON.stringify(id.slice(0, 80))}`);
    this.name = 'InvalidMessageIdError';
  }
}

export function isMessageId(id: unknown): id is string {
  return typeof id === 'string' && MESSAGE_ID_PATTERN.test(id);
}

export function messagePaths(mailDir: string, id: string): { eml: string; json: string } {
  if (!isMessageId(id)) throw new InvalidMessageIdError(String(id));
  return { eml: join(mailDir, `${id}.eml`), json: join(mailDir, `${id}.json`) };
}

/** All complete messages in `mailDir`, newest first. A missing folder is an empty mailbox. */
export async function listMessages(mailDir: string): Promise<MessageSummary[]> {
  let names: string[];
  try {
    names = await readdir(mailDir);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return [];
    throw error;
  }
  const ids = names
    .filter((name) => name.endsWith('.json'))
    .map((name) => name.slice(0, -'.json'.length))
    .filter(isMessageId);
  const summaries = await Promise.all(ids.map((id) => readSummary(mailDir, id)));
  return summaries
    .filter((summary): summary is MessageSummary => summary !== null)
    .sort((a, b) => compareNewestFirst(a, b));
}

/**
 * One message with its raw text, or null when there is no such message.
 * @throws InvalidMessageIdError when `id` is not a message id (e.g. `../etc/passwd`)
 */
export async function readMessage(mailDir: string, id: string): Promise<StoredMessage | null> {
  const paths = messagePaths(mailDir, id);
  const summary = await readSummary(mailDir, id);
  if (!summary) return null;
  try {
    return { summary, raw: await readFile(paths.eml, 'utf8') };
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null;
    throw error;
  }
}

function compareNewestFirst(a: MessageSummary, b: MessageSummary): number {
  if (a.receivedAt !== b.receivedAt) return a.receivedAt < b.receivedAt ? 1 : -1;
  return a.id < b.id ? 1 : a.id > b.id ? -1 : 0;
}

async function readSummary(mailDir: string, id: string): Promise<MessageSummary | null> {
  let text: string;
  try {
    text = await readFile(messagePaths(mailDir, id).json, 'utf8');
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null;
    throw error;
  }
  try {
    return parseSummary(JSON.parse(text), id);
  } catch {
    return null; // a damaged envelope is left out rather than breaking the whole mailbox
  }
}

function parseSummary(value: unknown, id: string): MessageSummary | null {
  if (!value || typeof value !== 'object') return null;
  const v = value as Record<string, unknown>;
  if (v.id !== id) return null;
  if (typeof v.receivedAt !== 'string' || Number.isNaN(Date.parse(v.receivedAt))) return null;
  if (typeof v.from !== 'string' || typeof v.subject !== 'string') return null;
  if (!Array.isArray(v.to) || !v.to.every((address) => typeof address === 'string')) return null;
  if (typeof v.size !== 'number' || !Number.isInteger(v.size) || v.size < 0) return null;
  return { id, receivedAt: v.receivedAt, from: v.from, to: [...(v.to as string[])], subject: v.subject, size: v.size };
}
