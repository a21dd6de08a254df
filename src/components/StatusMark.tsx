import type { ReactElement } from 'react';

/** Grading statuses: each has its own colour token, shape and word, so none relies on colour alone. */
export type MatchStatus = 'matched' | 'near-miss' | 'missing' | 'flagged';

const marks: Record<MatchStatus, { label: string; className: string; shape: ReactElement }> = {
  matched: {
    label: 'Matched',
    className: 'text-matched',
    shape: <circle cx="6" cy="6" r="4.5" fill="currentColor" />,
  },
  'near-miss': {
    label: 'Near miss',
    className: 'text-near-miss',
    shape: <path d="M6 1.2 10.8 6 6 10.8 1.2 6Z" fill="currentColor" />,
  },
  missing: {
    label: 'Missing',
    className: 'text-missing',
    shape: <circle cx="6" cy="6" r="4" fill="none" stroke="currentColor" strokeWidth="1.6" strokeDasharray="2 1.6" />,
  },
  flagged: {
    label: 'Flagged',
    className: 'text-flagged',
    shape: <path d="M2.5 11V1.5h7L8 4l1.5 2.5h-5.5V11Z" fill="currentColor" />,
  },
};

export function StatusMark({ status }: { status: MatchStatus }) {
  const m = marks[status];
  return (
    <span className={`inline-flex items-center gap-1 text-xs font-medium ${m.className}`}>
      <svg viewBox="0 0 12 12" width="12" height="12" aria-hidden="true">
        {m.shape}
      </svg>
      <span className="text-ink">{m.label}</span>
    </span>
  );
}
