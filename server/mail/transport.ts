import nodemailer, { type Transporter } from 'nodemailer';

export type MailTransport = Transporter;

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
}

/**
 * SMTP transport from SMTP_HOST / SMTP_PORT (plus optional SMTP_USER / SMTP_PASSWORD,
 * SMTP_SECURE=1 for implicit TLS). A loopback host (the local mail catcher) needs no TLS.
 */
export function createMailTransport(env: NodeJS.ProcessEnv = process.env): MailTransport {
  const host = env.SMTP_HOST ?? '127.0.0.1';
  const port = Number(env.SMTP_PORT ?? 5481);
  const loopback = host === 'localhost' || host.startsWith('127.') || host === '::1';
  return nodemailer.createTransport({
    host,
    port,
    secure: env.SMTP_SECURE === '1',
    ignoreTLS: loopback,
    auth: env.SMTP_USER ? { user: env.SMTP_USER, pass: env.SMTP_PASSWORD ?? '' } : undefined,
    connectionTimeout: 10_000,
  });
}

export const mailFrom = (env: NodeJS.ProcessEnv = process.env) => env.MAIL_FROM ?? 'Modewright <no-reply@modewright.test>';
