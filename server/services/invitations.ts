/**
 * Course invitations: an instructor invites addresses as students or teaching
 * assistants; each gets a single-use link (14 days). Opening it signs up (a new
 * account, its address proven by the link) or, for an existing account signed
 * in with the invited address, enrolls. A newer invitation to the same address
 * for the same course withdraws the older one.
 */
import type { Sequelize } from 'sequelize';
import type { Role } from '../../shared/api.js';
import type { CreateInvitationsBody, CreateInvitationsResponse, Invitation, InvitationLookup } from '../../shared/accounts.js';
import { badRequest, conflict, notFound } from '../errors.js';
import { Course, Enrollment, OutboxMessage, Token, User } from '../models/index.js';
import { audit } from './audit.js';
import { invitationMailKey, type Mailer } from './mail.js';
import { hashPassword } from './passwords.js';
import { findUserByEmail } from './users.js';
import { findToken, issueToken, markUsed, revokeUnused, stateOf, takeToken } from './tokens.js';

const roleRank: Record<Role, number> = { student: 0, teaching_assistant: 1, instructor: 2 };
const roleWithArticle: Record<Role, string> = { student: 'a student', teaching_assistant: 'a teaching assistant', instructor: 'an instructor' };

async function toInvitations(rows: Token[]): Promise<Invitation[]> {
  if (rows.length === 0) return [];
  const mails = await OutboxMessage.findAll({ where: { key: rows.map((r) => invitationMailKey(r.hash)) } });
  const mailByKey = new Map(mails.map((m) => [m.key, m]));
  const inviterIds = [...new Set(rows.map((r) => r.createdById).filter((x): x is number => x !== null))];
  const inviters = new Map((await User.findAll({ where: { id: inviterIds }, attributes: ['id', 'displayName'] })).map((u) => [u.id, u.displayName]));
  const now = new Date();
  return rows.map((r) => {
    const state = stateOf(r, now);
    const mail = mailByKey.get(invitationMailKey(r.hash));
    return {
      id: r.id,
      email: r.email,
      role: r.role === 'teaching_assistant' ? 'teaching_assistant' : 'student',
      state: state === 'valid' ? 'pending' : state === 'used' ? 'accepted' : state === 'unknown' ? 'expired' : state,
      invitedBy: r.createdById ? (inviters.get(r.createdById) ?? null) : null,
      createdAt: r.createdAt.toISOString(),
      expiresAt: r.expiresAt.toISOString(),
      acceptedAt: r.usedAt ? r.usedAt.toISOString() : null,
      mail: mail ? { state: mail.state, lastError: mail.lastError, attempts: mail.attempts } : null,
    };
  });
}

/** A course's invitations, newest first (at most 1000). */
export async function listInvitations(courseId: number): Promise<Invitation[]> {
  const rows = await Token.findAll({ where: { purpose: 'invitation', courseId }, order: [['createdAt', 'DESC'], ['id', 'DESC']], limit: 1000 });
  return toInvitations(rows);
}

export async function createInvitations(
  sequelize: Sequelize,
  mailer: Mailer,
  actor: User,
  courseId: number,
  body: CreateInvitationsBody,
): Promise<CreateInvitationsResponse> {
  const course = await Course.findByPk(courseId);
  if (!course) throw notFound('This course no longer exists');
  const emails = [...new Set(body.emails.map((e) => e.trim().toLowerCase()))];
  const members = await Enrollment.findAll({
    where: { courseId },
    include: [{ model: User, as: 'user', required: true, where: { email: emails }, attributes: ['email'] }],
  });
  const memberRole = new Map(members.map((m) => [(m as Enrollment & { user: User }).user.email, m.role]));
  const skipped: CreateInvitationsResponse['skipped'] = [];
  const toInvite: string[] = [];
  for (const email of emails) {
    const role = memberRole.get(email);
    if (role && roleRank[role] >= roleRank[body.role]) {
      skipped.push({ email, reason: `already in the course as ${roleWithArticle[role]}` });
    } else {
      toInvite.push(email);
    }
  }
  const created = await sequelize.transaction(async (transaction) => {
    const rows: Token[] = [];
    for (const email of toInvite) {
      const replaced = await Token.findAll({ where: { purpose: 'invitation', email, courseId, usedAt: null, revokedAt: null }, transaction });
      await revokeUnused(transaction, { purpose: 'invitation', email, courseId });
      for (const old of replaced) {
        await audit(transaction, {
          courseId,
          actorId: actor.id,
          action: 'invitation.revoked',
          subjectType: 'invitation',
          subjectId: old.id,
          before: { email, role: old.role, state: 'pending' },
          after: { email, role: old.role, state: 'revoked', reason: 'replaced by a newer invitation' },
        });
      }
      const { token, row } = await issueToken(transaction, { purpose: 'invitation', email, courseId, role: body.role, createdById: actor.id });
      await mailer.invitation(transaction, {
        to: email,
        token,
        tokenHash: row.hash,
        courseId,
        courseTitle: course.title,
        courseCode: course.code,
        role: body.role,
        invitedBy: actor.displayName,
        expiresAt: row.expiresAt,
      });
      await audit(transaction, {
        courseId,
        actorId: actor.id,
        action: 'invitation.sent',
        subjectType: 'invitation',
        subjectId: row.id,
        after: { email, role: body.role, expiresAt: row.expiresAt.toISOString() },
      });
      rows.push(row);
    }
    return rows;
  });
  return { invitations: await toInvitations(created), skipped };
}

export async function revokeInvitation(sequelize: Sequelize, actor: User, courseId: number, id: number): Promise<Invitation> {
  const row = await sequelize.transaction(async (transaction) => {
    const t = await Token.findOne({ where: { id, courseId, purpose: 'invitation' }, transaction, lock: transaction.LOCK.UPDATE });
    if (!t) throw notFound('This course has no such invitation');
    const state = stateOf(t);
    if (state !== 'valid') throw conflict(`Only a pending invitation can be withdrawn; this one is ${state === 'used' ? 'accepted' : state}`);
    t.revokedAt = new Date();
    await t.save({ transaction });
    await audit(transaction, {
      courseId,
      actorId: actor.id,
      action: 'invitation.revoked',
      subjectType: 'invitation',
      subjectId: t.id,
      before: { email: t.email, role: t.role, state: 'pending' },
      after: { email: t.email, role: t.role, state: 'revoked' },
    });
    return t;
  });
  return (await toInvitations([row]))[0]!;
}

/** What an invitation link offers, before anyone acts on it. */
export async function lookupInvitation(token: string): Promise<InvitationLookup> {
  const row = await findToken(token, 'invitation');
  const state = stateOf(row);
  if (!row || state !== 'valid') return { state };
  const course = await Course.findByPk(row.courseId!);
  if (!course) return { state: 'unknown' };
  const inviter = row.createdById ? await User.findByPk(row.createdById, { attributes: ['displayName'] }) : null;
  return {
    state,
    email: row.email,
    role: row.role === 'teaching_assistant' ? 'teaching_assistant' : 'student',
    course: { id: course.id, title: course.title, code: course.code, term: course.term },
    invitedBy: inviter?.displayName ?? null,
    expiresAt: row.expiresAt.toISOString(),
    accountExists: (await findUserByEmail(row.email)) !== null,
  };
}

export interface AcceptResult {
  user: User;
  courseId: number;
  role: Role;
  accountCreated: boolean;
  /** True when the person became a student of the course with this accept (variants are due). */
  joinedAsStudent: boolean;
}

/**
 * Use an invitation. Signed in: the account must have the invited address. Signed out: the
 * address must have no account yet, and a name and password create one (the link proves the
 * address). An existing member keeps a higher role; a student invited as assistant is promoted.
 */
export async function acceptInvitation(
  sequelize: Sequelize,
  token: string,
  signedIn: User | null,
  newAccount: { displayName?: string; password?: string },
): Promise<AcceptResult> {
  const passwordHash = !signedIn && newAccount.password ? await hashPassword(newAccount.password) : null;
  return sequelize.transaction(async (transaction) => {
    const row = await takeToken(transaction, token, 'invitation');
    const courseId = row.courseId!;
    const invitedRole: Role = row.role === 'teaching_assistant' ? 'teaching_assistant' : 'student';
    let user: User;
    let accountCreated = false;
    if (signedIn) {
      if (signedIn.email !== row.email) {
        throw conflict(`This invitation was sent to ${row.email}, but you are signed in as ${signedIn.email}. Sign out, then open the link again.`);
      }
      user = signedIn;
    } else {
      if (await User.findOne({ where: { email: row.email }, transaction })) {
        throw conflict(`An account with ${row.email} exists already; sign in with it, then accept the invitation`, [
          { path: 'token', message: 'Sign in first' },
        ]);
      }
      if (!newAccount.displayName || !passwordHash) {
        const details = [
          ...(newAccount.displayName ? [] : [{ path: 'displayName', message: 'Enter your name' }]),
          ...(passwordHash ? [] : [{ path: 'password', message: 'Choose a password' }]),
        ];
        throw badRequest('Enter your name and choose a password to create your account', details);
      }
      user = await User.create({ email: row.email, displayName: newAccount.displayName, passwordHash }, { transaction });
      accountCreated = true;
    }
    const existing = await Enrollment.findOne({ where: { userId: user.id, courseId }, transaction, lock: transaction.LOCK.UPDATE });
    let role: Role = invitedRole;
    let joinedAsStudent = false;
    if (!existing) {
      await Enrollment.create({ userId: user.id, courseId, role: invitedRole }, { transaction });
      joinedAsStudent = invitedRole === 'student';
    } else if (roleRank[existing.role] < roleRank[invitedRole]) {
      await audit(transaction, {
        courseId,
        actorId: user.id,
        action: 'role.changed',
        subjectType: 'enrollment',
        subjectId: user.id,
        before: { userId: user.id, email: user.email, role: existing.role },
        after: { userId: user.id, email: user.email, role: invitedRole, through: `invitation ${row.id}` },
      });
      existing.role = invitedRole;
      await existing.save({ transaction });
    } else {
      role = existing.role;
    }
    await markUsed(transaction, row, user.id);
    await audit(transaction, {
      courseId,
      actorId: user.id,
      action: 'invitation.accepted',
      subjectType: 'invitation',
      subjectId: row.id,
      before: { email: row.email, role: invitedRole, state: 'pending' },
      after: { email: row.email, role, state: 'accepted', accountCreated },
    });
    return { user, courseId, role, accountCreated, joinedAsStudent };
  });
}
