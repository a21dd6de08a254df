import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import type { Member } from '../../shared/api.js';
import {
  auditQuery,
  changeRoleBody,
  createInvitationsBody,
  outboxFilterSchema,
  type AuditListResponse,
  type CreateInvitationsResponse,
  type Invitation,
  type OutboxListResponse,
  type OutboxMessageDto,
} from '../../shared/accounts.js';
import { badRequest } from '../errors.js';
import { currentUser, idParam, requireCourseRole } from '../middleware/auth.js';
import { parseBody, zodDetails } from '../middleware/validate.js';
import { audit, listAudit } from '../services/audit.js';
import { changeRole } from '../services/courses.js';
import { createInvitations, listInvitations, revokeInvitation } from '../services/invitations.js';
import type { Mailer } from '../services/mail.js';
import { listCourseOutbox, retryOutboxMessage, toOutboxDto } from '../services/outbox.js';

/**
 * Mounted at /api/courses/:courseId: what instructors manage about people and mail
 * (invitations, roles), the course's outbox and its audit log. Instructors only.
 */
export function courseAdminRouter({
  sequelize,
  mailer,
  onJoined,
}: {
  sequelize: Sequelize;
  mailer: Mailer;
  onJoined?: (courseId: number, userId: number) => Promise<void>;
}): Router {
  const router = Router({ mergeParams: true });
  const instructor = requireCourseRole('instructor');

  router.get('/invitations', instructor, async (req, res) => {
    res.json({ invitations: await listInvitations(req.courseId!) });
  });

  router.post('/invitations', instructor, async (req, res) => {
    const input = parseBody(createInvitationsBody, req.body);
    const body: CreateInvitationsResponse = await createInvitations(sequelize, mailer, currentUser(req), req.courseId!, input);
    res.status(201).json(body);
  });

  router.post('/invitations/:invitationId/revoke', instructor, async (req, res) => {
    const body: Invitation = await revokeInvitation(sequelize, currentUser(req), req.courseId!, idParam(req, 'invitationId'));
    res.json(body);
  });

  router.post('/members/:userId/role', instructor, async (req, res) => {
    const { role } = parseBody(changeRoleBody, req.body);
    const { member, becameStudent } = await changeRole(currentUser(req), req.courseId!, idParam(req, 'userId'), role);
    if (becameStudent && onJoined) await onJoined(req.courseId!, member.userId);
    const body: Member = member;
    res.json(body);
  });

  router.get('/outbox', instructor, async (req, res) => {
    const parsed = outboxFilterSchema.safeParse(req.query.state ?? 'unsent');
    if (!parsed.success) throw badRequest('state must be unsent, failed or all', [{ path: 'state', message: 'Expected unsent, failed or all' }]);
    const body: OutboxListResponse = await listCourseOutbox(req.courseId!, parsed.data);
    res.json(body);
  });

  router.post('/outbox/:messageId/retry', instructor, async (req, res) => {
    const id = idParam(req, 'messageId');
    const row = await sequelize.transaction(async (transaction) => {
      const r = await retryOutboxMessage(mailer.deps, req.courseId!, id, transaction);
      await audit(transaction, {
        courseId: req.courseId!,
        actorId: currentUser(req).id,
        action: 'mail.resent',
        subjectType: 'mail',
        subjectId: id,
        before: { to: r.to, subject: r.subject, state: 'failed' },
        after: { to: r.to, subject: r.subject, state: 'queued' },
      });
      return r;
    });
    const body: OutboxMessageDto = toOutboxDto(row);
    res.json(body);
  });

  router.get('/audit', instructor, async (req, res) => {
    const parsed = auditQuery.safeParse(req.query);
    if (!parsed.success) {
      const details = zodDetails(parsed.error);
      throw badRequest(`Please check: ${[...new Set(details.map((d) => d.path))].join(', ')}`, details);
    }
    const body: AuditListResponse = await listAudit(req.courseId!, parsed.data);
    res.json(body);
  });

  return router;
}
