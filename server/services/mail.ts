import type { Logger } from 'pino';
import { mailListResponse, type MailMessage } from '../../shared/api.js';
import { mailFrom, type MailTransport, type OutgoingMail } from '../mail/transport.js';
import { HttpError } from '../errors.js';

/** Sends notices; a mail server that is down is logged, never turns a finished change into an error. */
export class Mailer {
  constructor(
    private readonly transport: MailTransport,
    private readonly logger: Logger,
  ) {}

  async send(mail: OutgoingMail): Promise<boolean> {
    try {
      await this.transport.sendMail({ from: mailFrom(), ...mail });
      this.logger.info({ subject: mail.subject }, 'mail sent');
      return true;
    } catch (err) {
      this.logger.error({ err: (err as Error).message, subject: mail.subject }, 'mail could not be sent');
      return false;
    }
  }

  passwordChanged(to: string, displayName: string) {
    return this.send({
      to,
      subject: 'Your Modewright password was changed',
      text: [
        `Hello ${displayName},`,
        '',
        `The password of your Modewright account (${to}) was changed just now.`,
        'Other signed-in browsers have been signed out.',
        '',
        'If you did not do this, ask your course staff to reset your account at once.',
      ].join('\n'),
    });
  }

  teachingGranted(to: string, displayName: string, grantedBy: string) {
    return this.send({
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
}

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
