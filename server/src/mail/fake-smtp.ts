/**
 * Local fake SMTP server for development and tests: accepts every message on a loopback address
 * and keeps it in a mail folder (see `mailbox.ts` for the layout and for reading it back), so the
 * mail Cartouche sends can be looked at instead of delivered.
 *
 * Plain SMTP on loopback: no STARTTLS, no authentication needed (AUTH PLAIN/LOGIN is offered and
 * any credentials are accepted, so a transport configured with a user still works), no reverse
 * DNS lookups, messages up to 25 MB.
 *
 * Run: `npx tsx server/src/mail/fake-smtp.ts` (CARTOUCHE_SMTP_PORT default 4313,
 * CARTOUCHE_SMTP_HOST default 127.0.0.1, mail in `${CARTOUCHE_DATA_DIR:-.data}/mail`).
 */
import { randomBytes } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { mkdir, rename, rm, writeFile } from 'node:fs/promises';
import type { AddressInfo } from 'node:net';
import { join, resolve } from 'node:path';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { pathToFileURL } from 'node:url';
import type { Logger } from 'pino';
import { SMTPServer, type SMTPServerDataStream, type SMTPServerSession } from 'smtp-server';
import { messagePaths, type MessageSummary } from './mailbox.ts';

export interface FakeSmtpOptions {
  /** port to listen on; 0 picks a free one (the real one is returned) */
  port: number;
  /** loopback address to listen on; default 127.0.0.1 */
  host?: string;
  /** folder the messages are stored in (created when missing) */
  mailDir: string;
  logger?: Logger;
}

export interface FakeSmtp {
  port: number;
  close(): Promise<void>;
}

export const MAX_MESSAGE_BYTES = 25 * 1024 * 1024;
/** the header section is read from at most this many leading bytes */
const MAX_HEADER_BYTES = 256 * 1024;

export async function startFakeSmtp(opts: FakeSmtpOptions): Promise<FakeSmtp> {
  const host = opts.host ?? '127.0.0.1';
  if (!(host === 'localhost' || host === '::1' || /^127\.\d{1,3}\.\d{1,3}\.\d{1,3}$/.test(host))) {
    throw new Error(`the fake SMTP server only listens on a loopback address, not "${host}"`);
  }
  const mailDir = resolve(opts.mailDir);
  await mkdir(mailDir, { recursive: true });
  const logger = opts.logger;

  const server = new SMTPServer({
    name: 'localhost',
    banner: 'Cartouche local development mail sink: messages are kept, never delivered',
    secure: false,
    disabledCommands: ['STARTTLS'],
    hideSTARTTLS: true,
    authOptional: true,
    allowInsecureAuth: true,
    disableReverseLookup: true,
    size: MAX_MESSAGE_BYTES,
    logger: false,
    closeTimeout: 2000,
    onAuth(auth, _session, callback) {
      callback(null, { user: auth.username ?? 'anonymous' });
    },
    onData(stream, session, callback) {
      storeMessage(mailDir, stream, session).then(
        (summary) => {
          logger?.info(
            { id: summary.id, from: summary.from, to: summary.to, subject: summary.subject, size: summary.size },
            'mail received',
          );
          callback(null, `Kept as ${summary.id}`);
        },
        (error: Error & { responseCode?: number }) => {
          if (!error.responseCode) {
            logger?.error({ err: error }, 'could not keep a received message');
            error.responseCode = 451;
          }
          callback(error);
        },
      );
    },
  });
  server.on('error', (error) => logger?.error({ err: error }, 'fake SMTP server error'));

  await new Promise<void>((resolveListen, rejectListen) => {
    const onError = (error: Error) => rejectListen(error);
    server.server.once('error', onError);
    server.listen(opts.port, host, () => {
      server.server.off('error', onError);
      resolveListen();
    });
  });
  const { port } = server.server.address() as AddressInfo;
  logger?.info({ host, port, mailDir }, 'fake SMTP server listening');

  let closing: Promise<void> | undefined;
  return {
    port,
    close() {
      closing ??= new Promise<void>((resolveClose) => server.close(() => resolveClose()));
      return closing;
    },
  };
}

/* ------------------------------------------------------------- storing */

let lastMs = 0;
let sequence = 0;

/** `<epoch ms>-<sequence>-<random>`: unique, and sorting the ids sorts by arrival. */
function nextMessageId(): { id: string; ms: number } {
  let ms = Date.now();
  if (ms <= lastMs) {
    ms = lastMs;
    sequence += 1;
    if (sequence > 9999) {
      ms = lastMs + 1;
      sequence = 0;
    }
  } else {
    sequence = 0;
  }
  lastMs = ms;
  const id = `${String(ms).padStart(13, '0')}-${String(sequence).padStart(4, '0')}-${randomBytes(4).toString('hex')}`;
  return { id, ms };
}

async function storeMessage(
  mailDir: string,
  stream: SMTPServerDataStream,
  session: SMTPServerSession,
): Promise<MessageSummary> {
  const { id, ms } = nextMessageId();
  const paths = messagePaths(mailDir, id);
  const tempEml = join(mailDir, `.${id}.eml.tmp`);
  const tempJson = join(mailDir, `.${id}.json.tmp`);

  let size = 0;
  const head: Buffer[] = [];
  let headBytes = 0;
  const observe = new Transform({
    transform(chunk: Buffer, _encoding, done) {
      size += chunk.length;
      if (headBytes < MAX_HEADER_BYTES) {
        const part = chunk.subarray(0, MAX_HEADER_BYTES - headBytes);
        head.push(part);
        headBytes += part.length;
      }
      done(null, chunk);
    },
  });

  try {
    await pipeline(stream, observe, createWriteStream(tempEml, { flags: 'wx', mode: 0o644 }));
    if (stream.sizeExceeded) {
      throw Object.assign(new Error('Message exceeds fixed maximum message size'), { responseCode: 552 });
    }
    const summary: MessageSummary = {
      id,
      receivedAt: new Date(ms).toISOString(),
      from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
      to: session.envelope.rcptTo.map((address) => address.address),
      subject: readSubject(Buffer.concat(head)),
      size,
    };
    await rename(tempEml, paths.eml);
    await writeFile(tempJson, `${JSON.stringify(summary, null, 2)}\n`, { flag: 'wx', mode: 0o644 });
    await rename(tempJson, paths.json);
    return summary;
  } catch (error) {
    await Promise.all([rm(tempEml, { force: true }), rm(tempJson, { force: true })]);
    throw error;
  }
}

/* ------------------------------------------------------------- headers */

/** The decoded Subject of a raw message (only its header section is looked at). */
export function readSubject(raw: Buffer | string): string {
  const value = headerValue(headerSection(raw), 'subject');
  return value === undefined ? '' : decodeEncodedWords(value).trim();
}

/** The header section of a raw message as text (UTF-8, as SMTPUTF8 allows raw UTF-8 headers). */
export function headerSection(raw: Buffer | string): string {
  const text = typeof raw === 'string' ? raw : new TextDecoder('utf-8').decode(raw);
  const end = text.search(/\r?\n\r?\n/);
  return end === -1 ? text : text.slice(0, end);
}

/** The first header field called `name` (case-insensitive), unfolded, or undefined. */
export function headerValue(headers: string, name: string): string | undefined {
  const unfolded = headers.replace(/\r?\n(?=[ \t])/g, '');
  const wanted = name.toLowerCase();
  for (const line of unfolded.split(/\r?\n/)) {
    const colon = line.indexOf(':');
    if (colon > 0 && line.slice(0, colon).trim().toLowerCase() === wanted) return line.slice(colon + 1).trim();
  }
  return undefined;
}

const ENCODED_WORD = /=\?([^?\s*]+)(?:\*[^?\s]*)?\?([BbQq])\?([^?\s]*)\?=/g;

/**
 * Decodes RFC 2047 encoded-words (`=?charset?B?…?=`, `=?charset?Q?…?=`) in a header value.
 * White space between adjacent encoded-words is dropped (RFC 2047 §6.2) and adjacent words in
 * the same charset are joined as bytes before decoding, so a character split across two words
 * survives. Words in an unknown charset, or malformed, are left as they are.
 */
export function decodeEncodedWords(value: string): string {
  let out = '';
  let cursor = 0;
  let run: { charset: string; bytes: Buffer[]; text: string } | null = null;
  const flush = () => {
    if (run) out += decodeCharset(run.charset, Buffer.concat(run.bytes)) ?? run.text;
    run = null;
  };
  for (const word of value.matchAll(ENCODED_WORD)) {
    const [text, rawCharset, encoding, payload] = word as unknown as [string, string, string, string];
    const between = value.slice(cursor, word.index);
    cursor = word.index + text.length;
    const charset = rawCharset.toLowerCase();
    const bytes = encoding.toUpperCase() === 'B' ? decodeBase64(payload) : decodeQ(payload);
    if (!bytes) {
      flush();
      out += between + text;
      continue;
    }
    const adjacent = run !== null && /^[ \t\r\n]*$/.test(between);
    if (adjacent && run!.charset === charset) {
      run!.bytes.push(bytes);
      run!.text += text;
      continue;
    }
    flush();
    if (!adjacent) out += between;
    run = { charset, bytes: [bytes], text };
  }
  flush();
  return out + value.slice(cursor);
}

function decodeBase64(payload: string): Buffer | null {
  if (!/^[A-Za-z0-9+/]*={0,2}$/.test(payload)) return null;
  return Buffer.from(payload, 'base64');
}

function decodeQ(payload: string): Buffer | null {
  const bytes: number[] = [];
  for (let i = 0; i < payload.length; i += 1) {
    const c = payload[i]!;
    if (c === '_') bytes.push(0x20);
    else if (c === '=') {
      const hex = payload.slice(i + 1, i + 3);
      if (!/^[0-9A-Fa-f]{2}$/.test(hex)) return null;
      bytes.push(parseInt(hex, 16));
      i += 2;
    } else bytes.push(c.charCodeAt(0) & 0xff);
  }
  return Buffer.from(bytes);
}

function decodeCharset(charset: string, bytes: Buffer): string | null {
  try {
    return new TextDecoder(charset === 'utf8' ? 'utf-8' : charset).decode(bytes);
  } catch {
    return null;
  }
}

/* ------------------------------------------------------------- command line */

async function main(): Promise<void> {
  const { logger: rootLogger } = await import('../logger.ts');
  const logger = rootLogger.child({ component: 'fake-smtp' });
  const dataDir = resolve(process.env.CARTOUCHE_DATA_DIR ?? '.data');
  const portText = process.env.CARTOUCHE_SMTP_PORT;
  const port = portText ? Number(portText) : 4313;
  if (!Number.isInteger(port) || port < 0 || port > 65535) {
    throw new Error(`CARTOUCHE_SMTP_PORT must be a port number, got "${portText}"`);
  }
  const smtp = await startFakeSmtp({
    port,
    host: process.env.CARTOUCHE_SMTP_HOST || '127.0.0.1',
    mailDir: join(dataDir, 'mail'),
    logger,
  });
  const stop = (signal: NodeJS.Signals) => {
    logger.info({ signal }, 'stopping fake SMTP server');
    smtp.close().then(() => process.exit(0));
  };
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  main().catch((error: unknown) => {
    process.stderr.write(`fake SMTP server failed to start: ${error instanceof Error ? error.stack : String(error)}\n`);
    process.exitCode = 1;
  });
}
