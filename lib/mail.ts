import nodemailer, { type Transporter } from 'nodemailer';
import { env } from './env';

const key = Symbol.for('levelwire.mail');
type Holder = { [key]?: Transporter };

function transport(): Transporter {
  const g = globalThis as Holder;
  if (!g[key]) {
    const url = new URL(env().SMTP_URL);
    const loopback = url.hostname === '127.0.0.1' || url.hostname === 'localhost';
    // The loopback fake offers no TLS; real servers get STARTTLS as usual.
    g[key] = nodemailer.createTransport({ url: env().SMTP_URL, ignoreTLS: loopback } as nodemailer.TransportOptions);
  }
  return g[key]!;
}

/** A file sent with a message (the service report's PDF). */
export type MailAttachment = { filename: string; content: Buffer; contentType: string };

export type Mail = { to: string | string[]; subject: string; text: string; attachments?: MailAttachment[] };

/** Sends one plain-text message, with any attachments, through the configured SMTP server. */
export async function sendMail(mail: Mail): Promise<void> {
  await transport().sendMail({ from: env().MAIL_FROM, ...mail });
}
