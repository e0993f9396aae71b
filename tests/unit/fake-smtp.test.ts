import { mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import nodemailer from 'nodemailer';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeEncodedWords, readSubject, startFakeSmtp, type FakeSmtp } from '../../server/src/mail/fake-smtp.ts';
import { InvalidMessageIdError, listMessages, readMessage } from '../../server/src/mail/mailbox.ts';

describe('fake SMTP server', () => {
  let mailDir: string;
  let smtp: FakeSmtp;
  let firstId: string;
  let secondId: string;

  beforeAll(async () => {
    mailDir = await mkdtemp(join(tmpdir(), 'cartouche-mail-'));
    smtp = await startFakeSmtp({ port: 0, mailDir });
  });

  afterAll(async () => {
    await smtp?.close();
    if (mailDir) await rm(mailDir, { recursive: true, force: true });
  });

  it('listens on the real port it picked for port 0', () => {
    expect(smtp.port).toBeGreaterThan(0);
  });

  it('receives two messages over the wire from nodemailer', async () => {
    const transport = nodemailer.createTransport({ host: '127.0.0.1', port: smtp.port, secure: false, ignoreTLS: true });
    try {
      const first = await transport.sendMail({
        from: 'Cartouche <cartouche@kestrelmouth-harbour.example>',
        to: 'hester.amblecroft@kestrelmouth-harbour.example',
        subject: 'Weekly coverage: harbour photographs',
        text: 'Coverage rose to 62 % this week.',
      });
      const second = await transport.sendMail({
        from: 'Cartouche <cartouche@kestrelmouth-harbour.example>',
        to: ['odile.brackwater@kestrelmouth-harbour.example', 'mirela.quaystone@kestrelmouth-harbour.example'],
        subject: 'Relevé — Kestrelmouth',
        text: 'The ledger is attached.',
        attachments: [{ filename: 'coverage-ledger-2025-w14.csv', content: 'subject,items\nlighthouse,12\n' }],
      });
      expect(first.accepted).toEqual(['hester.amblecroft@kestrelmouth-harbour.example']);
      expect(second.accepted).toHaveLength(2);
      expect(second.response).toMatch(/^250 /);
    } finally {
      transport.close();
    }
  });

  it('lists both messages newest first with envelope and decoded subject', async () => {
    const messages = await listMessages(mailDir);
    expect(messages).toHaveLength(2);
    const [newest, oldest] = messages as [(typeof messages)[number], (typeof messages)[number]];
    expect(newest.subject).toBe('Relevé — Kestrelmouth');
    expect(newest.from).toBe('cartouche@kestrelmouth-harbour.example');
    expect(newest.to).toEqual(['odile.brackwater@kestrelmouth-harbour.example', 'mirela.quaystone@kestrelmouth-harbour.example']);
    expect(oldest.subject).toBe('Weekly coverage: harbour photographs');
    expect(oldest.to).toEqual(['hester.amblecroft@kestrelmouth-harbour.example']);
    expect(newest.id > oldest.id).toBe(true);
    expect(Date.parse(newest.receivedAt)).toBeGreaterThanOrEqual(Date.parse(oldest.receivedAt));
    expect(newest.size).toBeGreaterThan(oldest.size);
    secondId = newest.id;
    firstId = oldest.id;
  });

  it('keeps the raw message, attachment included, and only complete files', async () => {
    const stored = await readMessage(mailDir, secondId);
    expect(stored).not.toBeNull();
    expect(stored!.summary.id).toBe(secondId);
    expect(stored!.raw).toContain('coverage-ledger-2025-w14.csv');
    expect(stored!.raw).toMatch(/^Subject: =\?UTF-8\?[BQ]\?/im); // it really travelled encoded
    expect(Buffer.byteLength(stored!.raw, 'utf8')).toBe(stored!.summary.size);
    const files = (await readdir(mailDir)).sort();
    expect(files).toEqual([`${firstId}.eml`, `${firstId}.json`, `${secondId}.eml`, `${secondId}.json`].sort());
  });

  it('refuses ids that could leave the mail folder, and answers null for unknown ones', async () => {
    for (const id of ['../etc/passwd', '..%2F..%2Fetc%2Fpasswd', `${firstId}/../../x`, `${firstId}.json`, '', '/etc/passwd']) {
      await expect(readMessage(mailDir, id)).rejects.toBeInstanceOf(InvalidMessageIdError);
    }
    expect(await readMessage(mailDir, '0000000000000-0000-00000000')).toBeNull();
  });

  it('decodes RFC 2047 encoded-words (UTF-8 B and Q, split words, other charsets)', () => {
    expect(decodeEncodedWords('=?UTF-8?B?UmVsZXbDqSDigJQgS2VzdHJlbG1vdXRo?=')).toBe('Relevé — Kestrelmouth');
    expect(decodeEncodedWords('=?utf-8?Q?Relev=C3=A9_=E2=80=94_Kestrelmouth?=')).toBe('Relevé — Kestrelmouth');
    // one character split over two words, white space between words dropped
    expect(decodeEncodedWords('=?UTF-8?Q?Relev=C3?= =?UTF-8?Q?=A9?= and more')).toBe('Relevé and more');
    expect(decodeEncodedWords('Re: =?ISO-8859-1?Q?caf=E9?= list')).toBe('Re: café list');
    expect(decodeEncodedWords('plain subject')).toBe('plain subject');
    expect(readSubject('From: a@b.example\r\nSubject: =?UTF-8?B?TGlnaHRob3VzZQ==?=\r\n =?UTF-8?Q?_keepers?=\r\n\r\nSubject: body')).toBe(
      'Lighthouse keepers',
    );
    expect(readSubject('From: a@b.example\r\n\r\nSubject: only in the body')).toBe('');
  });

  it('closes cleanly and stops accepting connections', async () => {
    await smtp.close();
    const transport = nodemailer.createTransport({ host: '127.0.0.1', port: smtp.port, secure: false, connectionTimeout: 2000 });
    await expect(transport.verify()).rejects.toThrow();
    transport.close();
  });
});
