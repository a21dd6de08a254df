import { Fragment, useMemo, useState } from 'react';
import { roleLabels, roles, type Member, type Role } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { ErrorBanner, Notice } from '../../../components/ErrorBanner';
import { RoleTag } from '../../../components/RoleTag';
import { SortableTh, Table, Td, Th, type SortDirection } from '../../../components/Table';
import { formatDate } from '../../../lib/format';
import { ApiError } from '../../../lib/http';
import { useChangeRole } from '../../accounts/api';
import { useGrantTeaching } from '../../auth/api';

type SortKey = 'name' | 'role' | 'joined';
const roleRank: Record<Role, number> = { instructor: 0, teaching_assistant: 1, student: 2 };

function compare(a: Member, b: Member, key: SortKey): number {
  const byName = a.displayName.localeCompare(b.displayName, 'en', { sensitivity: 'base' });
  if (key === 'role') return roleRank[a.role] - roleRank[b.role] || byName;
  if (key === 'joined') return a.joinedAt.localeCompare(b.joinedAt) || byName;
  return byName;
}

/** "a teaching assistant", "an instructor": the role as it reads after "Make … ". */
const roleWithArticle: Record<Role, string> = {
  instructor: 'an instructor',
  teaching_assistant: 'a teaching assistant',
  student: 'a student',
};

/** What a person may do in the course once they hold the role (what the API's role checks allow). */
const roleMeans: Record<Role, string> = {
  instructor:
    'Instructors can do everything in the course: write and publish assignments, grant extensions, release scores, and manage members, invitations and the join code.',
  teaching_assistant:
    'Teaching assistants see every member, hand-in and the gradebook, and review flagged submissions; they cannot change assignments or roles, or release scores.',
  student: 'Students hand in their own work and see only their own variants and released scores; the staff pages close to them.',
};

export interface MembersTableProps {
  courseId: number;
  members: Member[];
  /** The signed-in person's id, so their own row gets no action. */
  selfId: number;
  /** Instructors who may teach can allow a colleague to create courses. */
  canGrantTeaching: boolean;
  /** Instructors change the roles of the other members (the API refuses one's own role). */
  canChangeRoles: boolean;
}

/** Everyone in the course: compact, sortable by name, role or date, filterable by name, e-mail or role. */
export function MembersTable({ courseId, members, selfId, canGrantTeaching, canChangeRoles }: MembersTableProps) {
  const [sort, setSort] = useState<{ key: SortKey; dir: SortDirection }>({ key: 'role', dir: 'ascending' });
  const [filter, setFilter] = useState('');
  const [roleFilter, setRoleFilter] = useState<Role | 'all'>('all');
  const [granted, setGranted] = useState<Record<number, boolean>>({});
  const [confirming, setConfirming] = useState<number | null>(null);
  const [lastGranted, setLastGranted] = useState<string | null>(null);
  const grant = useGrantTeaching();
  const confirmingMember = members.find((m) => m.userId === confirming) ?? null;
  // A role chosen in a row's select, waiting for confirmation; the API's refusal, shown under that row.
  const [roleDraft, setRoleDraft] = useState<{ userId: number; role: Role } | null>(null);
  const [roleError, setRoleError] = useState<{ userId: number; message: string } | null>(null);
  const [lastRoleChange, setLastRoleChange] = useState<string | null>(null);
  const changeRole = useChangeRole(courseId);
  const columns = canGrantTeaching ? 5 : 4;

  const rows = useMemo(() => {
    const q = filter.trim().toLowerCase();
    const list = members.filter(
      (m) =>
        (roleFilter === 'all' || m.role === roleFilter) &&
        (!q || m.displayName.toLowerCase().includes(q) || m.email.toLowerCase().includes(q) || roleLabels[m.role].toLowerCase().includes(q)),
    );
    list.sort((a, b) => (sort.dir === 'ascending' ? 1 : -1) * compare(a, b, sort.key));
    return list;
  }, [members, filter, roleFilter, sort]);

  const counts = useMemo(() => {
    const c: Record<Role, number> = { instructor: 0, teaching_assistant: 0, student: 0 };
    for (const m of members) c[m.role] += 1;
    return c;
  }, [members]);

  const sortBy = (key: SortKey) =>
    setSort((s) => ({ key, dir: s.key === key && s.dir === 'ascending' ? 'descending' : 'ascending' }));

  const chooseRole = (m: Member, role: Role) => {
    setRoleError((e) => (e?.userId === m.userId ? null : e));
    setLastRoleChange(null);
    setRoleDraft(role === m.role ? null : { userId: m.userId, role });
  };

  const confirmRole = (m: Member, role: Role) =>
    changeRole.mutate(
      { userId: m.userId, role },
      {
        onSuccess: (updated) => {
          setRoleDraft(null);
          setLastRoleChange(`${updated.displayName} is now ${roleWithArticle[updated.role]}.`);
        },
        onError: (err) => {
          setRoleDraft(null);
          const message = err instanceof ApiError || err instanceof Error ? err.message : 'Something went wrong. Try again.';
          setRoleError({ userId: m.userId, message });
        },
      },
    );

  const confirmGrant = (m: Member) =>
    grant.mutate(
      { userId: m.userId, canTeach: true },
      {
        onSuccess: (u) => {
          setGranted((g) => ({ ...g, [m.userId]: u.canTeach }));
          setConfirming(null);
          setLastGranted(u.canTeach ? m.displayName : null);
        },
      },
    );

  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end gap-3">
        <div className="flex flex-col gap-1">
          <label htmlFor="member-filter" className="text-sm font-medium">
            Filter members
          </label>
          <input
            id="member-filter"
            type="search"
            value={filter}
            onChange={(e) => setFilter(e.target.value)}
            placeholder="Name, e-mail or role"
            className="w-64 rounded-md border border-line-strong bg-surface-raised px-3 py-1.5 text-sm"
          />
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="member-role" className="text-sm font-medium">
            Role
          </label>
          <select
            id="member-role"
            value={roleFilter}
            onChange={(e) => setRoleFilter(e.target.value as Role | 'all')}
            className="rounded-md border border-line-strong bg-surface-raised px-2 py-1.5 text-sm"
          >
            <option value="all">All roles ({members.length})</option>
            {roles.map((r) => (
              <option key={r} value={r}>
                {roleLabels[r]} ({counts[r]})
              </option>
            ))}
          </select>
        </div>
        <p className="tabular ml-auto text-sm text-muted" aria-live="polite">
          Showing {rows.length} of {members.length}
        </p>
      </div>
      {confirmingMember && (
        <div role="group" aria-label="Confirm teaching permission" className="flex flex-wrap items-center gap-3 rounded-md border border-accent/40 bg-accent-soft px-3.5 py-2.5 text-sm">
          <span className="flex-1">
            Allow <strong className="font-semibold">{confirmingMember.displayName}</strong> to create courses of their own? Their role in this course stays{' '}
            {roleLabels[confirmingMember.role].toLowerCase()}.
          </span>
          <Button size="sm" autoFocus busy={grant.isPending} onClick={() => confirmGrant(confirmingMember)}>
            Allow to teach
          </Button>
          <Button size="sm" variant="secondary" onClick={() => setConfirming(null)}>
            Cancel
          </Button>
        </div>
      )}
      {lastGranted && !confirmingMember && <Notice>{lastGranted} may now create courses.</Notice>}
      {grant.error && <ErrorBanner error={grant.error} title="Teaching permission not changed" />}
      {lastRoleChange && !roleDraft && <Notice>{lastRoleChange}</Notice>}
      <Table caption="Course members" captionHidden>
        <thead>
          <tr>
            <SortableTh label="Name" active={sort.key === 'name'} direction={sort.dir} onSort={() => sortBy('name')} />
            <Th>E-mail</Th>
            <SortableTh label="Role" active={sort.key === 'role'} direction={sort.dir} onSort={() => sortBy('role')} />
            <SortableTh label="Joined" numeric active={sort.key === 'joined'} direction={sort.dir} onSort={() => sortBy('joined')} />
            {canGrantTeaching && (
              <Th>
                <span className="sr-only">Actions</span>
              </Th>
            )}
          </tr>
        </thead>
        <tbody>
          {rows.length === 0 && (
            <tr>
              <Td colSpan={columns} className="py-4 text-center text-muted">
                Nobody matches this filter. Clear it to see all {members.length} members.
              </Td>
            </tr>
          )}
          {rows.map((m) => {
            const draft = roleDraft?.userId === m.userId ? roleDraft.role : null;
            const error = roleError?.userId === m.userId ? roleError.message : null;
            const busy = changeRole.isPending && changeRole.variables?.userId === m.userId;
            const confirmId = `role-confirm-${m.userId}`;
            const errorId = `role-error-${m.userId}`;
            return (
              <Fragment key={m.userId}>
                <tr className="hover:bg-surface-sunken/40">
                  <Td className="font-medium whitespace-nowrap">
                    {m.displayName}
                    {m.userId === selfId && <span className="ml-1.5 text-xs font-normal text-muted">(you)</span>}
                  </Td>
                  <Td className="text-muted">
                    <a href={`mailto:${m.email}`} className="hover:text-accent hover:underline">
                      {m.email}
                    </a>
                  </Td>
                  <Td>
                    {canChangeRoles && m.userId !== selfId ? (
                      <select
                        aria-label={`Role of ${m.displayName}`}
                        value={draft ?? m.role}
                        disabled={busy}
                        aria-invalid={error ? true : undefined}
                        aria-describedby={draft ? confirmId : error ? errorId : undefined}
                        onChange={(e) => chooseRole(m, e.target.value as Role)}
                        className="rounded-md border border-line-strong bg-surface-raised px-1.5 py-0.5 text-xs font-medium aria-invalid:border-danger"
                      >
                        {roles.map((r) => (
                          <option key={r} value={r}>
                            {roleLabels[r]}
                          </option>
                        ))}
                      </select>
                    ) : (
                      <RoleTag role={m.role} />
                    )}
                  </Td>
                  <Td numeric className="whitespace-nowrap text-muted">
                    <time dateTime={m.joinedAt}>{formatDate(m.joinedAt)}</time>
                  </Td>
                  {canGrantTeaching && (
                    <Td className="w-px text-right whitespace-nowrap">
                      {m.userId !== selfId &&
                        (granted[m.userId] ? (
                          <span className="text-xs text-ok">✓ May create courses</span>
                        ) : (
                          <Button
                            size="sm"
                            variant="subtle"
                            aria-pressed={confirming === m.userId}
                            onClick={() => {
                              grant.reset();
                              setLastGranted(null);
                              setConfirming(m.userId);
                            }}
                            // The name starts with the visible text (WCAG 2.5.3, label in name), then says who.
                            aria-label={`Allow to teach: ${m.displayName}`}
                          >
                            Allow to teach…
                          </Button>
                        ))}
                    </Td>
                  )}
                </tr>
                {draft && (
                  <tr>
                    <Td colSpan={columns} className="bg-accent-soft">
                      <div role="group" aria-labelledby={confirmId} className="flex flex-wrap items-center gap-x-3 gap-y-2 py-1">
                        <div className="min-w-64 flex-1">
                          <p id={confirmId} className="font-medium">
                            Make {m.displayName} {roleWithArticle[draft]}?
                          </p>
                          <p className="text-xs text-muted">
                            Now {roleLabels[m.role].toLowerCase()}. {roleMeans[draft]}
                          </p>
                        </div>
                        <Button size="sm" busy={busy} onClick={() => confirmRole(m, draft)} aria-label={`Change role: make ${m.displayName} ${roleWithArticle[draft]}`}>
                          Change role
                        </Button>
                        <Button size="sm" variant="secondary" disabled={busy} onClick={() => setRoleDraft(null)}>
                          Keep as {roleLabels[m.role].toLowerCase()}
                        </Button>
                      </div>
                    </Td>
                  </tr>
                )}
                {error && !draft && (
                  <tr>
                    <Td colSpan={columns} className="bg-danger-soft">
                      <p id={errorId} role="alert" className="flex gap-2 text-danger">
                        <span aria-hidden="true" className="font-semibold">
                          !
                        </span>
                        <span>
                          <span className="font-semibold">Role of {m.displayName} not changed:</span> {error}
                        </span>
                      </p>
                    </Td>
                  </tr>
                )}
              </Fragment>
            );
          })}
        </tbody>
      </Table>
    </div>
  );
}
