/**
 * The one mail module. By default messages are written as .eml files under <data>/outbox
 * (a local stand-in for the mail service, so everything works offline); with SMTP_URL set they
 * go to that server. Every message is also logged in mail_log for the admins' Outbox screen.
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import nodemailer from 'nodemailer';
import type { Transporter } from 'nodemailer';
import type { Db } from '@/db/client';
import { mailLog } from '@/db/schema';

export type OutgoingMail = {
  to: string;
  subject: string;
  text: string;
  kind: string;
  organizationId?: string | null;
  /** Files sent with the message (the release report): in the .eml and over SMTP; the mail log keeps the text only. */
  attachments?: { filename: string; content: Buffer; contentType: string }[];
};

export type Mailer = {
  send: (mail: OutgoingMail) => Promise<void>;
  /** 'file' or 'smtp' */
  transport: 'file' | 'smtp';
  outboxDir: string | null;
};

const FROM = process.env.MAIL_FROM || 'Quasilevel <no-reply@quasilevel.example>';

/** Builds the mailer: file transport under `outboxDir` unless `smtpUrl` is given. */
export function createMailer(opts: { db: Db; outboxDir: string; smtpUrl?: string }): Mailer {
  const useSmtp = !!opts.smtpUrl;
  let transporter: Transporter;
  if (useSmtp) {
    transporter = nodemailer.createTransport(opts.smtpUrl);
  } else {
    mkdirSync(opts.outboxDir, { recursive: true });
    // streamTransport + buffer gives the raw RFC 822 message, which we write ourselves.
    transporter = nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'unix' });
  }
  return {
    transport: useSmtp ? 'smtp' : 'file',
    outboxDir: useSmtp ? null : opts.outboxDir,
    async send(mail) {
      const info = await transporter.sendMail({ from: FROM, to: mail.to, subject: mail.subject, text: mail.text, attachments: mail.attachments });
      let file: string | null = null;
      if (!useSmtp) {
        const { writeFile } = await import('node:fs/promises');
        const stamp = new Date().toISOString().replace(/[:.]/g, '-');
        const safeTo = mail.to.replace(/[^a-zA-Z0-9@._-]/g, '_');
        file = path.join(opts.outboxDir, `${stamp}-${mail.kind}-${safeTo}-${Math.random().toString(36).slice(2, 8)}.eml`);
        await writeFile(file, (info as unknown as { message: Buffer }).message);
      }
      await opts.db.insert(mailLog).values({
        id: crypto.randomUUID(),
        organizationId: mail.organizationId ?? null,
        to: mail.to,
        subject: mail.subject,
        body: mail.text,
        kind: mail.kind,
        transport: useSmtp ? 'smtp' : 'file',
        file: file ? path.basename(file) : null,
      });
    },
  };
}
