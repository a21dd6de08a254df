import { useState } from 'react';
import { formatComplex } from '../../lib/numbers';
import { PlaneFrame } from './PlaneFrame';

/**
 * How a value stands in a score: each kind has its own shape, colour token and
 * word, so none rests on colour alone. Submitted values are filled or crossed;
 * reference values are hollow squares.
 */
export type MatchMark = 'matched' | 'near-miss' | 'unmatched' | 'not-graded' | 'reference' | 'reference-missed' | 'other';

export const matchMarkWords: Record<MatchMark, string> = {
  matched: 'matched',
  'near-miss': 'near miss',
  unmatched: 'unmatched',
  'not-graded': 'not graded',
  reference: 'reference value',
  'reference-missed': 'reference value nobody matched',
  other: "the other student's value",
};

export function MarkShape({ mark, x, y, r = 4.5 }: { mark: MatchMark; x: number; y: number; r?: number }) {
  switch (mark) {
    case 'matched':
      return <circle cx={x} cy={y} r={r} fill="var(--color-matched)" stroke="var(--color-surface-raised)" strokeWidth={0.8} />;
    case 'near-miss':
      return <path d={`M${x},${y - r * 1.3}L${x + r * 1.3},${y}L${x},${y + r * 1.3}L${x - r * 1.3},${y}Z`} fill="var(--color-near-miss)" stroke="var(--color-surface-raised)" strokeWidth={0.8} />;
    case 'unmatched':
      return (
        <g stroke="var(--color-flagged)" strokeWidth={2.2} strokeLinecap="round">
          <line x1={x - r} y1={y - r} x2={x + r} y2={y + r} />
          <line x1={x - r} y1={y + r} x2={x + r} y2={y - r} />
        </g>
      );
    case 'not-graded':
      return <circle cx={x} cy={y} r={r * 0.85} fill="none" stroke="var(--color-missing)" strokeWidth={1.6} strokeDasharray="2 1.6" />;
    case 'reference':
      return <rect x={x - r * 1.1} y={y - r * 1.1} width={r * 2.2} height={r * 2.2} fill="none" stroke="var(--color-ink)" strokeWidth={1.4} />;
    case 'reference-missed':
      return <rect x={x - r * 1.1} y={y - r * 1.1} width={r * 2.2} height={r * 2.2} fill="none" stroke="var(--color-missing)" strokeWidth={1.6} strokeDasharray="2.5 1.8" />;
    case 'other':
      return <path d={`M${x},${y - r * 1.25}L${x + r * 1.15},${y + r * 0.85}L${x - r * 1.15},${y + r * 0.85}Z`} fill="var(--color-near-miss)" stroke="var(--color-surface-raised)" strokeWidth={0.8} />;
  }
}

/** The mark and its word, for tables and legends. */
export function MarkWord({ mark, word }: { mark: MatchMark; word?: string }) {
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap">
      <svg width="13" height="13" viewBox="0 0 13 13" aria-hidden="true">
        <MarkShape mark={mark} x={6.5} y={6.5} r={4} />
      </svg>
      <span>{word ?? matchMarkWords[mark]}</span>
    </span>
  );
}

export interface MatchPoint {
  re: number;
  im: number;
  mark: MatchMark;
  /** What the value is, for the reading line: "your value 3", "reference 2". */
  label: string;
  /** Index of a point this one is paired with (a submitted value's reference); a thin line joins them. */
  pairedWith?: number;
}

/**
 * Values on the complex plane with the unit circle, each drawn by its status.
 * Hover a point, or focus the picture and use the arrow keys, to read it exactly.
 */
export function MatchPlanePlot({ points, label, legendLabels }: { points: MatchPoint[]; label: string; legendLabels?: Partial<Record<MatchMark, string>> }) {
  const [cur, setCur] = useState<number | null>(null);
  const finite = points.filter((pt) => Number.isFinite(pt.re) && Number.isFinite(pt.im));
  const p = cur !== null ? points[cur] : undefined;
  const marks = (Object.keys(matchMarkWords) as MatchMark[]).filter((m) => points.some((pt) => pt.mark === m));
  // Reference squares first, submitted values on top.
  const order = points.map((_, i) => i).sort((a, b) => Number(points[b].mark.startsWith('reference')) - Number(points[a].mark.startsWith('reference')));

  return (
    <PlaneFrame
      label={label}
      keysHint="Use the arrow keys to step through the values."
      count={points.length}
      active={cur}
      onActiveChange={setCur}
      reach={finite.flatMap((pt) => [Math.abs(pt.re), Math.abs(pt.im)])}
      svgClassName="max-w-[24rem]"
      tipClassName="min-h-[2.25rem]"
      legend={
        <ul className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-muted" aria-label="Marks">
          {marks.map((m) => (
            <li key={m}>
              <MarkWord mark={m} word={legendLabels?.[m]} />
            </li>
          ))}
        </ul>
      }
      tip={
        p ? (
          <p className="inline-flex flex-wrap items-center gap-x-2 rounded-md border border-line bg-surface-raised px-2.5 py-1.5">
            <span className="text-muted">{p.label}</span>
            <span className="tabular font-mono">{formatComplex(p.re, p.im)}</span>
            <MarkWord mark={p.mark} word={legendLabels?.[p.mark]} />
          </p>
        ) : null
      }
    >
      {({ x, y }) => (
        <>
          {points.map((pt, i) => {
            const q = pt.pairedWith !== undefined ? points[pt.pairedWith] : undefined;
            return q ? <line key={`l${i}`} x1={x(pt.re)} y1={y(pt.im)} x2={x(q.re)} y2={y(q.im)} stroke="var(--color-muted)" strokeWidth={0.9} /> : null;
          })}
          {order.map((i) => {
            const pt = points[i];
            if (!Number.isFinite(pt.re) || !Number.isFinite(pt.im)) return null;
            return (
              <g key={i} onMouseEnter={() => setCur(i)}>
                <circle cx={x(pt.re)} cy={y(pt.im)} r={9} fill="transparent" />
                <MarkShape mark={pt.mark} x={x(pt.re)} y={y(pt.im)} r={i === cur ? 6 : 4.5} />
                {i === cur && <circle cx={x(pt.re)} cy={y(pt.im)} r={10.5} fill="none" stroke="var(--color-focus)" strokeWidth={1.5} />}
              </g>
            );
          })}
        </>
      )}
    </PlaneFrame>
  );
}
