import { simpleParser } from 'mailparser';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { HttpProblem } from '../http/problem.ts';
import type { GuardedRouter } from '../http/routes.ts';
import { InvalidMessageIdError, listMessages, readMessage } from '../mail/mailbox.ts';

/** The development mailbox: what the local fake SMTP server caught. Not registered in production. */
export function registerMailboxRoutes(api: GuardedRouter, ctx: AppContext): void {
  if (!ctx.config.mailboxEnabled) return;
  const read = needs('mailbox:read');

  api.route('get', '/mailbox', read, async (_req, res) => {
    res.set('Cache-Control', 'no-store').json({ messages: await listMessages(ctx.config.mailDir) });
  });

  api.route('get', '/mailbox/:id', read, async (req, res) => {
    let message;
    try {
      message = await readMessage(ctx.config.mailDir, String(req.params.id));
    } catch (err) {
      if (err instanceof InvalidMessageIdError) throw new HttpProblem(400, 'Invalid message id', 'That is not the id of a captured message.');
      throw err;
    }
    if (!message) throw new HttpProblem(404, 'Not found', 'No captured message has that id.');
    const parsed = await simpleParser(message.raw);
    res.set('Cache-Control', 'no-store').json({ summary: message.summary, text: parsed.text ?? '', raw: message.raw });
  });
}
