import { scaleLinear } from 'd3-scale';
import { useId, useState, type KeyboardEvent } from 'react';
import { formatComplex } from '../../lib/numbers';
import { XAxis, YAxis } from './axes';

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

const SIZE = 340;
const M = { top: 12, right: 14, bottom: 40, left: 52 };

/**
 * Values on the complex plane with the unit circle, each drawn by its status.
 * Hover a point, or focus the picture and use the arrow keys, to read it exactly.
 */
export function MatchPlanePlot({ points, label, legendLabels }: { points: MatchPoint[]; label: string; legendLabels?: Partial<Record<MatchMark, string>> }) {
  const [cur, setCur] = useState<number | null>(null);
  const tipId = useId();
  const finite = points.filter((p) => Number.isFinite(p.re) && Number.isFinite(p.im));
  const extent = Math.max(1.15, ...finite.flatMap((p) => [Math.abs(p.re), Math.abs(p.im)]).map((v) => v * 1.08));
  const x = scaleLinear().domain([-extent, extent]).range([M.left, SIZE - M.right]).nice();
  const y = scaleLinear().domain([-extent, extent]).range([SIZE - M.bottom, M.top]).nice();
  const [d0, d1] = x.domain();
  const y0 = y.domain();
  const circle = `M${x(1)},${y(0)}A${x(1) - x(0)},${y(0) - y(1)} 0 1,0 ${x(-1)},${y(0)}A${x(1) - x(0)},${y(0) - y(1)} 0 1,0 ${x(1)},${y(0)}`;
  const ticks = x.ticks(5);
  const p = cur !== null ? points[cur] : undefined;
  const marks = (Object.keys(matchMarkWords) as MatchMark[]).filter((m) => points.some((pt) => pt.mark === m));
  // Reference squares first, submitted values on top.
  const order = points.map((_, i) => i).sort((a, b) => Number(points[b].mark.startsWith('reference')) - Number(points[a].mark.startsWith('reference')));

  const onKey = (e: KeyboardEvent) => {
    if (points.length === 0) return;
    const n = points.length;
    const keys: Record<string, () => number> = {
      ArrowRight: () => (cur === null ? 0 : (cur + 1) % n),
      ArrowDown: () => (cur === null ? 0 : (cur + 1) % n),
      ArrowLeft: () => (cur === null ? n - 1 : (cur - 1 + n) % n),
      ArrowUp: () => (cur === null ? n - 1 : (cur - 1 + n) % n),
      Home: () => 0,
      End: () => n - 1,
    };
    if (keys[e.key]) {
      e.preventDefault();
      setCur(keys[e.key]());
    } else if (e.key === 'Escape') setCur(null);
  };

  return (
    <div className="relative">
      <div
        tabIndex={0}
        onKeyDown={onKey}
        onFocus={() => cur === null && points.length > 0 && setCur(0)}
        onBlur={() => setCur(null)}
        aria-describedby={tipId}
        aria-label={`${label}. Use the arrow keys to step through the values.`}
        role="group"
        className="rounded-md"
      >
        <svg viewBox={`0 0 ${SIZE} ${SIZE}`} className="block h-auto w-full max-w-[24rem]" role="img" aria-label={label} onMouseLeave={() => setCur(null)}>
          <rect x={M.left} y={M.top} width={SIZE - M.left - M.right} height={SIZE - M.top - M.bottom} fill="var(--color-surface)" />
          {ticks.map((t) => (
            <g key={t} stroke="var(--color-line)" strokeWidth={0.6}>
              <line x1={x(t)} x2={x(t)} y1={y(y0[0])} y2={y(y0[1])} />
              <line x1={x(d0)} x2={x(d1)} y1={y(t)} y2={y(t)} />
            </g>
          ))}
          <line x1={x(0)} x2={x(0)} y1={y(y0[0])} y2={y(y0[1])} stroke="var(--color-line-strong)" />
          <line x1={x(d0)} x2={x(d1)} y1={y(0)} y2={y(0)} stroke="var(--color-line-strong)" />
          <path d={circle} fill="none" stroke="var(--color-ink)" strokeOpacity={0.55} strokeDasharray="4 3" />
          <text x={x(-Math.SQRT1_2) - 4} y={y(Math.SQRT1_2) - 4} fontSize={10.5} fill="var(--color-muted)" textAnchor="end">
            |λ| = 1
          </text>
          <XAxis scale={x} y={SIZE - M.bottom} ticks={ticks} label="Re λ" x0={M.left} x1={SIZE - M.right} />
          <YAxis scale={y} x={M.left} ticks={y.ticks(5)} label="Im λ" y0={SIZE - M.bottom} y1={M.top} />
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
        </svg>
      </div>
      <ul className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-muted" aria-label="Marks">
        {marks.map((m) => (
          <li key={m}>
            <MarkWord mark={m} word={legendLabels?.[m]} />
          </li>
        ))}
      </ul>
      <div id={tipId} aria-live="polite" className="mt-1 min-h-[2.25rem] text-xs">
        {p ? (
          <p className="inline-flex flex-wrap items-center gap-x-2 rounded-md border border-line bg-surface-raised px-2.5 py-1.5">
            <span className="text-muted">{p.label}</span>
            <span className="tabular font-mono">{formatComplex(p.re, p.im)}</span>
            <MarkWord mark={p.mark} word={legendLabels?.[p.mark]} />
          </p>
        ) : (
          <p className="pt-1 text-muted">Point at a value, or focus the picture and use the arrow keys, to read it exactly.</p>
        )}
      </div>
    </div>
  );
}
