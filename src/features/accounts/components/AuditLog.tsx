import { useState } from 'react';
import { auditActionLabels, type AuditEventDto } from '../../../../shared/accounts';
import { roleLabels, type Role } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { EmptyState } from '../../../components/EmptyState';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Loading } from '../../../components/Loading';
import { Table, Td, Th } from '../../../components/Table';
import { formatDateTime } from '../../../lib/format';
import { useAudit, type AuditFilters } from '../api';

const fieldWords: Record<string, string> = { joinCode: 'join code', role: 'role', email: 'e-mail', state: 'state', userId: 'user id', expiresAt: 'expires', through: 'through', accountCreated: 'new account', to: 'to', subject: 'subject', reason: 'why' };

function show(key: string, v: unknown): string {
  if (v === null || v === undefined) return key === 'joinCode' ? 'none (joining off)' : '—';
  if (key === 'role' && typeof v === 'string' && v in roleLabels) return roleLabels[v as Role];
  if (key === 'expiresAt' && typeof v === 'string') return formatDateTime(v);
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  if (typeof v === 'object') return JSON.stringify(v);
  return String(v);
}

/** Before and after, field by field: changed fields as "old → new", the others once. */
export function Change({ before, after }: { before: unknown; after: unknown }) {
  const b = (before && typeof before === 'object' ? before : {}) as Record<string, unknown>;
  const a = (after && typeof after === 'object' ? after : {}) as Record<string, unknown>;
  const keys = [...new Set([...Object.keys(b), ...Object.keys(a)])].filter((k) => k !== 'userId');
  if (keys.length === 0) return <span className="text-muted">—</span>;
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-2 gap-y-0.5 text-xs">
      {keys.map((k) => {
        const changed = JSON.stringify(b[k]) !== JSON.stringify(a[k]) && k in b && k in a;
        return (
          <div key={k} className="contents">
            <dt className="text-muted">{fieldWords[k] ?? k}</dt>
            <dd className={changed ? 'font-medium' : ''}>
              {changed ? (
                <>
                  <span className="text-muted line-through decoration-muted/60">{show(k, b[k])}</span>
                  <span aria-label="changed to"> → </span>
                  {show(k, a[k])}
                </>
              ) : (
                show(k, k in a ? a[k] : b[k])
              )}
            </dd>
          </div>
        );
      })}
    </dl>
  );
}

const actionLabel = (a: string) => auditActionLabels[a] ?? a;

function subjectOf(e: AuditEventDto): string {
  const a = (e.after ?? e.before ?? {}) as Record<string, unknown>;
  if (typeof a.email === 'string') return a.email;
  if (typeof a.to === 'string') return a.to;
  if (e.subjectType === 'course') return 'this course';
  return `${e.subjectType}${e.subjectId ? ` ${e.subjectId}` : ''}`;
}

/** A course's audit log for its instructors: newest first, filterable by action, person and date. */
export function AuditLog({ courseId }: { courseId: number }) {
  const [filters, setFilters] = useState<AuditFilters>({});
  const log = useAudit(courseId, filters);
  const set = (patch: AuditFilters) => setFilters((f) => ({ ...f, ...patch }));
  const filtered = !!(filters.action || filters.actor || filters.since);

  if (log.isPending) return <Loading what="the audit log" />;
  if (log.error) return <ErrorBanner error={log.error} title="The audit log could not be loaded" />;
  const { events, actions, actors, nextBefore } = log.data;

  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end gap-3" role="group" aria-label="Filter the log">
        <div className="flex flex-col gap-1">
          <label htmlFor="audit-action" className="text-sm font-medium">
            What
          </label>
          <select id="audit-action" value={filters.action ?? ''} onChange={(e) => set({ action: e.target.value || undefined })} className="rounded-md border border-line-strong bg-surface-raised px-2 py-1.5 text-sm">
            <option value="">Every change</option>
            {actions.map((a) => (
              <option key={a} value={a}>
                {actionLabel(a)}
              </option>
            ))}
          </select>
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="audit-actor" className="text-sm font-medium">
            Who
          </label>
          <select id="audit-actor" value={filters.actor ?? ''} onChange={(e) => set({ actor: e.target.value ? Number(e.target.value) : undefined })} className="rounded-md border border-line-strong bg-surface-raised px-2 py-1.5 text-sm">
            <option value="">Anyone</option>
            {actors.map((a) => (
              <option key={a.id} value={a.id}>
                {a.displayName}
              </option>
            ))}
          </select>
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="audit-since" className="text-sm font-medium">
            Since
          </label>
          <input
            id="audit-since"
            type="date"
            value={filters.since ?? ''}
            onChange={(e) => set({ since: e.target.value || undefined })}
            className="rounded-md border border-line-strong bg-surface-raised px-2 py-1 text-sm"
          />
        </div>
        {filtered && (
          <Button variant="quiet" size="sm" onClick={() => setFilters({})}>
            Clear filters
          </Button>
        )}
        <p className="tabular ml-auto text-sm text-muted" aria-live="polite">
          {log.isFetching ? 'Loading…' : `${events.length}${nextBefore ? '+' : ''} ${events.length === 1 ? 'entry' : 'entries'}`}
        </p>
      </div>
      {events.length === 0 ? (
        <EmptyState title={filtered ? 'Nothing matches these filters' : 'Nothing recorded yet'}>
          {filtered
            ? 'Clear a filter or pick an earlier date.'
            : 'Changes people make to this course appear here: roles, the join code, invitations, and later releases, overrides and extensions.'}
        </EmptyState>
      ) : (
        <Table caption="Audit log, newest first" captionHidden>
          <thead>
            <tr>
              <Th>When</Th>
              <Th>Who</Th>
              <Th>What</Th>
              <Th>Concerning</Th>
              <Th>Before → after</Th>
            </tr>
          </thead>
          <tbody>
            {events.map((e) => (
              <tr key={e.id} className="align-top hover:bg-surface-sunken/40">
                <Td className="tabular whitespace-nowrap text-muted">
                  <time dateTime={e.createdAt}>{formatDateTime(e.createdAt)}</time>
                </Td>
                <Td className="whitespace-nowrap">{e.actor ? e.actor.displayName : <span className="text-muted">the site</span>}</Td>
                <Td className="whitespace-nowrap font-medium">{actionLabel(e.action)}</Td>
                <Td className="max-w-[16rem] truncate" title={subjectOf(e)}>
                  {subjectOf(e)}
                </Td>
                <Td>
                  <Change before={e.before} after={e.after} />
                </Td>
              </tr>
            ))}
          </tbody>
        </Table>
      )}
      {nextBefore && <p className="text-sm text-muted">Only the newest 200 entries are shown; narrow the filters to see older ones.</p>}
    </div>
  );
}
