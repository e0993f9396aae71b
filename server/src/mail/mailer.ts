import nodemailer, { type Transporter } from 'nodemailer';
import type { AppConfig } from '../config.ts';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  attachments?: Array<{ filename: string; content: Buffer | string; contentType?: string }>;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<{ messageId: string }>;
}

/** Sends through the configured SMTP server (in development and tests: the project's own fake on loopback). */
export function createMailer(config: Pick<AppConfig, 'smtp'>): Mailer {
  let transport: Transporter | null = null;
  return {
    async send(mail) {
      transport ??= nodemailer.createTransport({
        host: config.smtp.host,
        port: config.smtp.port,
        secure: false,
        ignoreTLS: config.smtp.host === '127.0.0.1' || config.smtp.host === 'localhost',
        connectionTimeout: 10_000,
      });
      const info = await transport.sendMail({ from: config.smtp.from, ...mail });
      return { messageId: String(info.messageId) };
    },
  };
}
