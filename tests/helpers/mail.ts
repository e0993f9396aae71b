import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { simpleParser } from 'mailparser';
import { startFakeSmtp } from '../../server/src/mail/fake-smtp.ts';
import { listMessages, readMessage } from '../../server/src/mail/mailbox.ts';

/** The project's fake SMTP server on an ephemeral loopback port, with a fresh mail folder. */
export async function startTestSmtp(): Promise<{ port: number; mailDir: string; close(): Promise<void>; messagesTo(address: string): Promise<Array<{ subject: string; text: string }>> }> {
  const mailDir = mkdtempSync(join(tmpdir(), 'cartouche-mail-'));
  const smtp = await startFakeSmtp({ port: 0, mailDir });
  return {
    port: smtp.port,
    mailDir,
    close: () => smtp.close(),
    async messagesTo(address) {
      const out = [];
      for (const m of await listMessages(mailDir)) {
        if (!m.to.includes(address)) continue;
        const full = await readMessage(mailDir, m.id);
        const parsed = await simpleParser(full!.raw);
        out.push({ subject: m.subject, text: parsed.text ?? '' });
      }
      return out;
    },
  };
}

/** The token of the first Cartouche link (…/welcome?token= or …/set-password?token=) in a message. */
export function tokenFromText(text: string): string {
  const m = /\/(?:welcome|set-password)\?token=([A-Za-z0-9_-]+)/.exec(text);
  if (!m?.[1]) throw new Error(`no Cartouche link in:\n${text}`);
  return m[1];
}
