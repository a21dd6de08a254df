import { Op, QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { UserSummary } from '../../shared/api.js';
import { User } from '../models/index.js';
import { badRequest, conflict, forbidden, notFound } from '../errors.js';
import { decoyHash, hashPassword, verifyPassword } from './passwords.js';
import type { Mailer } from './mail.js';

export const toUserSummary = (u: User): UserSummary => ({
  id: u.id,
  email: u.email,
  displayName: u.displayName,
  canTeach: u.canTeach,
});

export function findUserByEmail(email: string, transaction?: Transaction): Promise<User | null> {
  return User.findOne({ where: { email: { [Op.eq]: email.trim().toLowerCase() } }, transaction });
}

/** The user with this e-mail and password, or null; an unknown e-mail and a wrong password are indistinguishable. */
export async function authenticate(email: string, password: string): Promise<User | null> {
  const user = await findUserByEmail(email);
  if (!user) {
    await verifyPassword(password, await decoyHash());
    return null;
  }
  return (await verifyPassword(password, user.passwordHash)) ? user : null;
}

export async function changePassword(
  sequelize: Sequelize,
  mailer: Mailer,
  user: User,
  currentPassword: string,
  newPassword: string,
  keepSessionId: string,
): Promise<void> {
  if (!(await verifyPassword(currentPassword, user.passwordHash))) {
    throw badRequest('Your current password is not right', [
      { path: 'currentPassword', message: 'Your current password is not right' },
    ]);
  }
  if (currentPassword === newPassword) {
    throw badRequest('Choose a new password that differs from the current one', [
      { path: 'newPassword', message: 'The new password is the same as the current one' },
    ]);
  }
  user.passwordHash = await hashPassword(newPassword);
  await sequelize.transaction(async (transaction) => {
    await user.save({ transaction });
    // Sign the account out everywhere else.
    await sequelize.query(
      `DELETE FROM "session" WHERE sid <> :sid AND (sess->'passport'->>'user') = :uid`,
      { replacements: { sid: keepSessionId, uid: String(user.id) }, type: QueryTypes.DELETE, transaction },
    );
  });
  await mailer.passwordChanged(user.email, user.displayName);
}

/** A teaching account grants (or withdraws) the right to create courses. */
export async function setCanTeach(mailer: Mailer, actor: User, targetId: number, canTeach: boolean): Promise<User> {
  if (!actor.canTeach) throw forbidden('Only accounts that can teach may grant teaching');
  const target = await User.findByPk(targetId);
  if (!target) throw notFound('There is no user with that id');
  if (target.id === actor.id && !canTeach) throw conflict('You cannot withdraw your own teaching permission');
  const granted = canTeach && !target.canTeach;
  if (target.canTeach !== canTeach) {
    target.canTeach = canTeach;
    await target.save();
  }
  if (granted) await mailer.teachingGranted(target.email, target.displayName, actor.displayName);
  return target;
}
