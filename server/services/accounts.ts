/**
 * Sign-up and password reset by e-mail link.
 *
 * Sign-up creates the account on confirmation: until the link is opened,
 * only a sign-up token exists (with the chosen name and a bcrypt hash of the
 * password), so an address nobody confirmed never becomes an account, and a
 * second sign-up for the same address withdraws the first link. Neither
 * request ever tells whether an address has an account.
 */
import { QueryTypes, UniqueConstraintError, type Sequelize } from 'sequelize';
import type { SignUpBody } from '../../shared/accounts.js';
import { conflict } from '../errors.js';
import { User } from '../models/index.js';
import { hashPassword } from './passwords.js';
import { findUserByEmail } from './users.js';
import type { Mailer } from './mail.js';
import { issueToken, markUsed, revokeUnused, takeToken } from './tokens.js';

export const SIGN_UP_ACCEPTED = 'If the address can be used, a message with a confirmation link is on its way. Open it within 48 hours to finish.';
export const RESET_ACCEPTED = 'If an account uses this address, a message with a link to set a new password is on its way. The link works for one hour.';

export async function signUp(sequelize: Sequelize, mailer: Mailer, body: SignUpBody): Promise<void> {
  // Hashed in both cases, so the answer takes about as long whether or not the address has an account.
  const passwordHash = await hashPassword(body.password);
  const existing = await findUserByEmail(body.email);
  if (existing) {
    await mailer.signUpExisting(existing.email, existing.displayName);
    return;
  }
  await sequelize.transaction(async (transaction) => {
    await revokeUnused(transaction, { purpose: 'sign-up', email: body.email });
    const { token, row } = await issueToken(transaction, {
      purpose: 'sign-up',
      email: body.email,
      data: { displayName: body.displayName, passwordHash },
    });
    await mailer.signUpConfirmation(transaction, body.email, body.displayName, token, row.hash);
  });
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

export async function requestPasswordReset(sequelize: Sequelize, mailer: Mailer, email: string): Promise<void> {
  const user = await findUserByEmail(email);
  if (!user) return;
  await sequelize.transaction(async (transaction) => {
    await revokeUnused(transaction, { purpose: 'password-reset', email: user.email });
    const { token, row } = await issueToken(transaction, { purpose: 'password-reset', email: user.email, userId: user.id });
    await mailer.passwordReset(transaction, user.email, user.displayName, token, row.hash);
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
