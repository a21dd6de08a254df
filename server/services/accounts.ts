/**
 * Sign-up and password reset by e-mail link.
 *
 * Sign-up creates the account on confirmation: until the link is opened,
 * only a sign-up token exists (with the chosen name and a bcrypt hash of the
 * password), so an address nobody confirmed never becomes an account, and a
 * second sign-up for the same address withdraws the first link.
 *
 * Neither request tells whether an address has an account, not even by its
 * timing: the route does the same work for every address (validate, for a
 * sign-up hash the password, queue one 'account' job, answer 202 with a fixed
 * body); the job (server/jobs/accounts.ts) looks the address up and writes the
 * token and the message. Each request has its own id, and the one message it
 * may write is keyed by it in the outbox, so a retried or duplicated job
 * writes (and sends) nothing more and withdraws no link it sent before.
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes, UniqueConstraintError, type Sequelize } from 'sequelize';
import type { SignUpBody } from '../../shared/accounts.js';
import { conflict } from '../errors.js';
import { User } from '../models/index.js';
import { hashPassword } from './passwords.js';
import { findUserByEmail } from './users.js';
import { accountMailKey, type Mailer } from './mail.js';
import { redispatchQueued } from './outbox.js';
import { issueToken, markUsed, revokeUnused, takeToken } from './tokens.js';

export const SIGN_UP_ACCEPTED = 'If the address can be used, a message with a confirmation link is on its way. Open it within 48 hours to finish.';
export const RESET_ACCEPTED = 'If an account uses this address, a message with a link to set a new password is on its way. The link works for one hour.';

/** The data of one 'account' job: a request as the route accepted it. Never a password, only its bcrypt hash. */
export type AccountRequest =
  | { kind: 'password-reset'; requestId: string; email: string }
  | { kind: 'sign-up'; requestId: string; email: string; displayName: string; passwordHash: string };

/** Where the routes hand requests over: the 'account' queue (or, with no queue, this process after the answer). */
export type AccountRequestSink = (request: AccountRequest) => Promise<void>;

/** POST /api/auth/sign-up after validation: the same work for every address (hash, one job). */
export async function acceptSignUp(sink: AccountRequestSink, body: SignUpBody): Promise<void> {
  const passwordHash = await hashPassword(body.password);
  await sink({ kind: 'sign-up', requestId: randomUUID(), email: body.email, displayName: body.displayName, passwordHash });
}

/** POST /api/auth/password-reset after validation: one job, whatever the address. */
export async function acceptPasswordReset(sink: AccountRequestSink, email: string): Promise<void> {
  await sink({ kind: 'password-reset', requestId: randomUUID(), email });
}

/** Thrown inside a request's transaction when its message exists already: undo this run's token, change nothing. */
class AlreadyWritten extends Error {}

export type AccountRequestResult = 'written' | 'no-account' | 'already-written';

/**
 * Carry out one request (the 'account' job). The message is inserted under the request's key in
 * the same transaction as the token; when the key is taken (a retry or a duplicate of a run that
 * committed), this run rolls back: no second message, no new token, the sent link stays valid.
 */
export async function runAccountRequest(sequelize: Sequelize, mailer: Mailer, request: AccountRequest): Promise<AccountRequestResult> {
  try {
    return await sequelize.transaction(async (transaction): Promise<AccountRequestResult> => {
      const user = await findUserByEmail(request.email, transaction);
      let created: boolean;
      if (request.kind === 'password-reset') {
        // Only an account gets a link; accounts exist only once their address was confirmed.
        if (!user) return 'no-account';
        await revokeUnused(transaction, { purpose: 'password-reset', email: user.email });
        const { token } = await issueToken(transaction, { purpose: 'password-reset', email: user.email, userId: user.id });
        ({ created } = await mailer.passwordReset(transaction, request.requestId, user.email, user.displayName, token));
      } else if (user) {
        ({ created } = await mailer.signUpExisting(transaction, request.requestId, user.email, user.displayName));
      } else {
        await revokeUnused(transaction, { purpose: 'sign-up', email: request.email });
        const { token } = await issueToken(transaction, {
          purpose: 'sign-up',
          email: request.email,
          data: { displayName: request.displayName, passwordHash: request.passwordHash },
        });
        ({ created } = await mailer.signUpConfirmation(transaction, request.requestId, request.email, request.displayName, token));
      }
      if (!created) throw new AlreadyWritten();
      return 'written';
    });
  } catch (err) {
    if (!(err instanceof AlreadyWritten)) throw err;
    // The earlier run may have stopped between its commit and queuing the delivery.
    const kinds = ['password-reset', 'sign-up', 'sign-up-existing'] as const;
    for (const kind of kinds) await redispatchQueued(mailer.deps, accountMailKey(kind, request.requestId));
    return 'already-written';
  }
}

/** Use a sign-up link: the account is created (the address is proven) and returned for sign-in. */
export async function confirmSignUp(sequelize: Sequelize, token: string): Promise<User> {
  return sequelize.transaction(async (transaction) => {
    const row = await takeToken(transaction, token, 'sign-up');
    const data = (row.data ?? {}) as { displayName?: string; passwordHash?: string };
    if (!data.displayName || !data.passwordHash) throw conflict('This confirmation link is incomplete; sign up again');
    let user: User;
    try {
      user = await User.create({ email: row.email, displayName: data.displayName, passwordHash: data.passwordHash }, { transaction });
    } catch (err) {
      if (err instanceof UniqueConstraintError) {
        throw conflict('An account with this address exists already; sign in, or set a new password if you forgot it', [
          { path: 'token', message: 'An account with this address exists already' },
        ]);
      }
      throw err;
    }
    await markUsed(transaction, row, user.id);
    return user;
  });
}

/** Set a new password with a reset link; every session of the account ends and the owner is told. */
export async function completePasswordReset(sequelize: Sequelize, mailer: Mailer, token: string, newPassword: string): Promise<User> {
  const passwordHash = await hashPassword(newPassword);
  return sequelize.transaction(async (transaction) => {
    const row = await takeToken(transaction, token, 'password-reset');
    const user = row.userId ? await User.findByPk(row.userId, { transaction, lock: transaction.LOCK.UPDATE }) : null;
    if (!user) throw conflict('The account of this link no longer exists');
    user.passwordHash = passwordHash;
    await user.save({ transaction });
    await markUsed(transaction, row, user.id);
    await revokeUnused(transaction, { purpose: 'password-reset', email: user.email });
    await sequelize.query(`DELETE FROM "session" WHERE (sess->'passport'->>'user') = :uid`, {
      replacements: { uid: String(user.id) },
      type: QueryTypes.DELETE,
      transaction,
    });
    await mailer.passwordChanged(user.email, user.displayName, transaction);
    return user;
  });
}
