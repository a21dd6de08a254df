/**
 * The audit log: every change a person makes to a course, with who, when, the
 * value before and the value after. Write it in the same transaction as the
 * change, so a change that rolls back leaves no entry and a kept change always has one.
 *
 *   audit(transaction, { courseId, actorId, action, subjectType, subjectId, before, after })
 */
import { Op, QueryTypes, type Transaction, type WhereOptions } from 'sequelize';
import type { AuditEventDto, AuditListResponse, AuditQuery } from '../../shared/accounts.js';
import { AuditEvent, User } from '../models/index.js';

export interface AuditInput {
  courseId: number;
  /** The person who made the change; null for the system (a job acting on its own). */
  actorId: number | null;
  /** Dotted, past tense: 'role.changed', 'join-code.rotated', 'invitation.sent', 'release.made', 'score.overridden', ... */
  action: string;
  /** What was changed: 'enrollment', 'course', 'invitation', 'assignment', 'submission', ... */
  subjectType: string;
  subjectId?: string | number | null;
  /** Plain JSON values (no secrets: never a password, hash or token). */
  before?: unknown;
  after?: unknown;
}

export async function audit(transaction: Transaction | null | undefined, e: AuditInput): Promise<void> {
  await AuditEvent.create(
    {
      courseId: e.courseId,
      actorId: e.actorId,
      action: e.action,
      subjectType: e.subjectType,
      subjectId: e.subjectId === undefined || e.subjectId === null ? null : String(e.subjectId),
      before: e.before ?? null,
      after: e.after ?? null,
    },
    { transaction: transaction ?? undefined },
  );
}

type WithActor = AuditEvent & { actor?: User | null };

const toDto = (e: WithActor): AuditEventDto => ({
  id: String(e.id),
  createdAt: e.createdAt.toISOString(),
  action: e.action,
  actor: e.actor ? { id: e.actor.id, displayName: e.actor.displayName, email: e.actor.email } : null,
  subjectType: e.subjectType,
  subjectId: e.subjectId,
  before: e.before,
  after: e.after,
});

/** A course's log, newest first, filtered by action, actor and a start time; paged by id. */
export async function listAudit(courseId: number, q: AuditQuery): Promise<AuditListResponse> {
  const limit = q.limit ?? 100;
  const where: WhereOptions = {
    courseId,
    ...(q.action ? { action: q.action } : {}),
    ...(q.actor ? { actorId: q.actor } : {}),
    ...(q.since || q.before
      ? {
          [Op.and]: [
            ...(q.since ? [{ createdAt: { [Op.gte]: new Date(q.since) } }] : []),
            ...(q.before ? [{ id: { [Op.lt]: q.before } }] : []),
          ],
        }
      : {}),
  };
  const rows = (await AuditEvent.findAll({
    where,
    include: [{ model: User, as: 'actor', attributes: ['id', 'displayName', 'email'], required: false }],
    order: [['id', 'DESC']],
    limit: limit + 1,
  })) as WithActor[];
  const more = rows.length > limit;
  const page = rows.slice(0, limit);
  const sequelize = AuditEvent.sequelize!;
  const actions = await sequelize.query<{ action: string }>('SELECT DISTINCT action FROM audit_events WHERE "courseId" = :courseId ORDER BY action', {
    replacements: { courseId },
    type: QueryTypes.SELECT,
  });
  const actors = await sequelize.query<{ id: number; displayName: string }>(
    `SELECT DISTINCT u.id, u."displayName" FROM audit_events a JOIN users u ON u.id = a."actorId"
      WHERE a."courseId" = :courseId ORDER BY u."displayName"`,
    { replacements: { courseId }, type: QueryTypes.SELECT },
  );
  return {
    events: page.map(toDto),
    nextBefore: more ? String(page[page.length - 1]!.id) : null,
    actions: actions.map((a) => a.action),
    actors,
  };
}
