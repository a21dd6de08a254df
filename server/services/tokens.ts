/**
 * Single-use, expiring secrets sent in links (sign-up confirmation, invitation,
 * password reset). The link carries 32 random bytes (base64url); the table
 * keeps only their sha256, so a copy of the database opens nothing.
 */
import { createHash, randomBytes } from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import type { Role } from '../../shared/api.js';
import { conflict, notFound } from '../errors.js';
import { Token } from '../models/index.js';
import type { TokenPurpose } from '../models/token.js';

export const tokenLifetimes: Record<TokenPurpose, number> = {
  'sign-up': 48 * 3600_000,
  invitation: 14 * 24 * 3600_000,
  'password-reset': 3600_000,
};

export const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

export interface IssueInput {
  purpose: TokenPurpose;
  email: string;
  userId?: number | null;
  courseId?: number | null;
  role?: Role | null;
  createdById?: number | null;
  data?: Record<string, unknown> | null;
  /** Default: tokenLifetimes[purpose]. */
  lifetimeMs?: number;
}

/** A new token: the secret for the link (never stored) and its row. */
export async function issueToken(transaction: Transaction | null | undefined, input: IssueInput): Promise<{ token: string; row: Token }> {
  const token = randomBytes(32).toString('base64url');
  const row = await Token.create(
    {
      purpose: input.purpose,
      hash: hashToken(token),
      email: input.email,
      userId: input.userId ?? null,
      courseId: input.courseId ?? null,
      role: input.role ?? null,
      createdById: input.createdById ?? null,
      data: input.data ?? null,
      expiresAt: new Date(Date.now() + (input.lifetimeMs ?? tokenLifetimes[input.purpose])),
    },
    { transaction: transaction ?? undefined },
  );
  return { token, row };
}

export type TokenState = 'valid' | 'used' | 'expired' | 'revoked' | 'unknown';

export function stateOf(row: Token | null, now = new Date()): TokenState {
  if (!row) return 'unknown';
  if (row.usedAt) return 'used';
  if (row.revokedAt) return 'revoked';
  if (row.expiresAt.getTime() <= now.getTime()) return 'expired';
  return 'valid';
}

export async function findToken(token: string, purpose: TokenPurpose, transaction?: Transaction): Promise<Token | null> {
  return Token.findOne({ where: { hash: hashToken(token), purpose }, transaction });
}

const refusals: Record<Exclude<TokenState, 'valid'>, Record<TokenPurpose, string>> = {
  unknown: {
    'sign-up': 'This confirmation link is not known; sign up again to get a new one',
    invitation: 'This invitation link is not known; ask the instructor to invite you again',
    'password-reset': 'This password link is not known; ask for a new one',
  },
  used: {
    'sign-up': 'This confirmation link was used already; sign in with your e-mail and password',
    invitation: 'This invitation was used already; sign in to see the course',
    'password-reset': 'This password link was used already; ask for a new one if you still need it',
  },
  expired: {
    'sign-up': 'This confirmation link has expired; sign up again to get a new one',
    invitation: 'This invitation has expired; ask the instructor to invite you again',
    'password-reset': 'This password link has expired (they last one hour); ask for a new one',
  },
  revoked: {
    'sign-up': 'A newer confirmation link was sent; use the newest e-mail',
    invitation: 'This invitation was withdrawn or replaced by a newer one; use the newest e-mail or ask the instructor',
    'password-reset': 'A newer password link was sent; use the newest e-mail',
  },
};

/** The refusal for a token in this state: 404 when unknown, 409 otherwise, naming the field `token`. */
export function tokenRefusal(state: Exclude<TokenState, 'valid'>, purpose: TokenPurpose) {
  const message = refusals[state][purpose];
  const details = [{ path: 'token', message }];
  return state === 'unknown' ? notFound(message) : Object.assign(conflict(message, details), { reason: state });
}

/**
 * Lock a token for use inside `transaction` (FOR UPDATE: two uses at once wait for each other)
 * and check it is valid; the caller does its change and then calls markUsed in the same
 * transaction. A rollback leaves the token unused.
 */
export async function takeToken(transaction: Transaction, token: string, purpose: TokenPurpose): Promise<Token> {
  const row = await Token.findOne({ where: { hash: hashToken(token), purpose }, transaction, lock: transaction.LOCK.UPDATE });
  const state = stateOf(row);
  if (state !== 'valid') throw tokenRefusal(state, purpose);
  return row!;
}

export async function markUsed(transaction: Transaction, row: Token, usedById: number | null): Promise<void> {
  const [n] = await Token.update(
    { usedAt: new Date(), usedById, data: null },
    { where: { id: row.id, usedAt: null, revokedAt: null }, transaction },
  );
  if (n !== 1) throw tokenRefusal('used', row.purpose);
}

/** Withdraw the unused tokens of this purpose for an address (and course), e.g. when a newer one is sent. */
export async function revokeUnused(
  transaction: Transaction | null | undefined,
  where: { purpose: TokenPurpose; email: string; courseId?: number; exceptId?: number },
): Promise<number> {
  const [n] = await Token.update(
    { revokedAt: new Date() },
    {
      where: {
        purpose: where.purpose,
        email: where.email.trim().toLowerCase(),
        usedAt: null,
        revokedAt: null,
        ...(where.courseId ? { courseId: where.courseId } : {}),
        ...(where.exceptId ? { id: { [Op.ne]: where.exceptId } } : {}),
      },
      transaction: transaction ?? undefined,
    },
  );
  return n;
}
