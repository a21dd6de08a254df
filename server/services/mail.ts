import { randomUUID } from 'node:crypto';
import type { Logger } from 'pino';
import type { Transaction } from 'sequelize';
import { mailListResponse, roleLabels, type MailMessage, type Role } from '../../shared/api.js';
import type { MailTransport } from '../mail/transport.js';
import type { JobQueue } from '../jobs/queue.js';
import { HttpError } from '../errors.js';
import { enqueueMail, type MailDeps } from './outbox.js';

export interface MailerOptions {
  queue: JobQueue | null;
  /** Only for delivery in this process when there is no queue. */
  transport?: MailTransport;
  logger?: Logger;
  /** Where links in messages point (MODEWRIGHT_PUBLIC_URL), without a trailing slash. */
  publicUrl: string;
}

/** The site's address for links in e-mail: MODEWRIGHT_PUBLIC_URL, or the local site. */
export function publicUrlFromEnv(env: NodeJS.ProcessEnv = process.env): string {
  const raw = env.MODEWRIGHT_PUBLIC_URL ?? `http://127.0.0.1:${env.MODEWRIGHT_PORT ?? 5480}`;
  return raw.replace(/\/+$/, '');
}

/**
 * The messages the site writes. Every one goes through the outbox (server/services/outbox.ts):
 * recorded under a unique key, then delivered by the mail job with retries; a mail server that
 * is down never turns a finished change into an error.
 */
export class Mailer {
  readonly deps: MailDeps;
  readonly publicUrl: string;
  constructor(options: MailerOptions) {
    this.deps = { queue: options.queue, transport: options.transport, logger: options.logger };
    this.publicUrl = options.publicUrl;
  }

  link(path: string, token?: string): string {
    return `${this.publicUrl}${path}${token ? `?token=${encodeURIComponent(token)}` : ''}`;
  }

  passwordChanged(to: string, displayName: string, transaction?: Transaction) {
    return enqueueMail(this.deps, transaction, {
      key: `password-changed:${randomUUID()}`,
      kind: 'password-changed',
      to,
      subject: 'Your Modewright password was changed',
      text: [
        `Hello ${displayName},`,
        '',
        `The password of your Modewright account (${to}) was changed just now.`,
        'Other signed-in browsers have been signed out.',
        '',
        `If you did not do this, set a new password at once: ${this.link('/forgot-password')}`,
        'and tell your course staff.',
      ].join('\n'),
    });
  }

  teachingGranted(to: string, displayName: string, grantedBy: string) {
    return enqueueMail(this.deps, null, {
      key: `teaching-granted:${randomUUID()}`,
      kind: 'teaching-granted',
      to,
      subject: 'You can now create courses on Modewright',
      text: [
        `Hello ${displayName},`,
        '',
        `${grantedBy} has allowed your account (${to}) to teach.`,
        'You can now create courses, share their join codes and invite your teaching assistants.',
      ].join('\n'),
    });
  }

  /** `requestId`: the sign-up request's id (one per POST /api/auth/sign-up), so a retried job writes the message once. */
  signUpConfirmation(transaction: Transaction, requestId: string, to: string, displayName: string, token: string) {
    return enqueueMail(this.deps, transaction, {
      key: accountMailKey('sign-up', requestId),
      kind: 'sign-up',
      to,
      subject: 'Confirm your Modewright account',
      text: [
        `Hello ${displayName},`,
        '',
        `Someone, probably you, asked for a Modewright account for ${to}.`,
        'Open this link to confirm the address and create the account (it works once, for 48 hours):',
        '',
        this.link('/confirm', token),
        '',
        'If you did not ask for an account, ignore this message; nothing is created without the link.',
      ].join('\n'),
    });
  }

  signUpExisting(transaction: Transaction, requestId: string, to: string, displayName: string) {
    return enqueueMail(this.deps, transaction, {
      key: accountMailKey('sign-up-existing', requestId),
      kind: 'sign-up',
      to,
      subject: 'You already have a Modewright account',
      text: [
        `Hello ${displayName},`,
        '',
        `Someone, probably you, tried to create a Modewright account for ${to}, but this address has one already.`,
        `Sign in at ${this.link('/')}`,
        `If you forgot the password, set a new one at ${this.link('/forgot-password')}`,
        '',
        'If this was not you, ignore this message; your account is unchanged.',
      ].join('\n'),
    });
  }

  /** `requestId`: the reset request's id (one per POST /api/auth/password-reset), so a retried job writes the message once. */
  passwordReset(transaction: Transaction, requestId: string, to: string, displayName: string, token: string) {
    return enqueueMail(this.deps, transaction, {
      key: accountMailKey('password-reset', requestId),
      kind: 'password-reset',
      to,
      subject: 'Set a new Modewright password',
      text: [
        `Hello ${displayName},`,
        '',
        `Someone, probably you, asked to set a new password for the Modewright account ${to}.`,
        'Open this link to choose it (it works once, for one hour):',
        '',
        this.link('/reset-password', token),
        '',
        'If you did not ask, ignore this message; your password stays as it is.',
      ].join('\n'),
    });
  }

  invitation(
    transaction: Transaction,
    m: { to: string; token: string; tokenHash: string; courseId: number; courseTitle: string; courseCode: string; role: Role; invitedBy: string; expiresAt: Date },
  ) {
    const role = roleLabels[m.role].toLowerCase();
    return enqueueMail(this.deps, transaction, {
      key: invitationMailKey(m.tokenHash),
      kind: 'invitation',
      courseId: m.courseId,
      to: m.to,
      subject: `Invitation to ${m.courseCode} on Modewright`,
      text: [
        'Hello,',
        '',
        `${m.invitedBy} invites you to join ${m.courseTitle} (${m.courseCode}) on Modewright as a ${role}.`,
        'Open this link to accept; it creates your account if you have none yet:',
        '',
        this.link('/invitation', m.token),
        '',
        `The link works once and until ${m.expiresAt.toUTCString()}.`,
        'If you were not expecting this, ignore the message.',
      ].join('\n'),
    });
  }
}

/** The outbox key of the one message a sign-up or password-reset request may write (one per request id). */
export const accountMailKey = (kind: 'sign-up' | 'sign-up-existing' | 'password-reset', requestId: string) => `${kind}:request:${requestId}`;

/** The outbox key of an invitation's message (one per invitation token). */
export const invitationMailKey = (tokenHash: string) => `invitation:${tokenHash}`;

/** Reads the local mail catcher's inbox (development and tests only). */
export async function readCatcher(catcherUrl: string): Promise<MailMessage[]> {
  let res: Response;
  try {
    res = await fetch(new URL('/messages', catcherUrl));
  } catch {
    throw new HttpError(502, 'internal', `The mail catcher at ${catcherUrl} is not reachable`);
  }
  if (!res.ok) throw new HttpError(502, 'internal', `The mail catcher answered ${res.status}`);
  const parsed = mailListResponse.safeParse(await res.json());
  if (!parsed.success) throw new HttpError(502, 'internal', 'The mail catcher sent an unexpected answer');
  return parsed.data.messages;
}
