import { useState } from 'react';
import { formatComplex, formatSci } from '../../lib/numbers';
import { PlaneFrame } from './PlaneFrame';

/** How a value stands: a shape and a word for each, never colour alone. */
export type EigenState = 'stable' | 'unstable' | 'undetermined';

export interface PlanePoint {
  re: number;
  im: number;
  /** Continuous-time value log(λ)/dt, when known. */
  continuous?: { re: number | null; im: number | null } | null;
  condition?: number;
  spread?: number;
  state: EigenState;
}

export const eigenStateWords: Record<EigenState, string> = {
  stable: 'settled',
  unstable: 'unstable across the rank band',
  undetermined: 'undetermined (not graded)',
};

export function PointShape({ state, x, y, r = 4.5 }: { state: EigenState; x: number; y: number; r?: number }) {
  if (state === 'unstable')
    return <path d={`M${x},${y - r * 1.25}L${x + r * 1.15},${y + r * 0.85}L${x - r * 1.15},${y + r * 0.85}Z`} fill="var(--color-near-miss)" stroke="var(--color-surface-raised)" strokeWidth={0.8} />;
  if (state === 'undetermined')
    return (
      <g stroke="var(--color-flagged)" strokeWidth={2.2} strokeLinecap="round">
        <line x1={x - r} y1={y - r} x2={x + r} y2={y + r} />
        <line x1={x - r} y1={y + r} x2={x + r} y2={y - r} />
      </g>
    );
  return <circle cx={x} cy={y} r={r} fill="var(--color-matched)" stroke="var(--color-surface-raised)" strokeWidth={0.8} />;
}

/** Small legend item: the mark as drawn in the picture and its word. */
export function StateLegend({ states }: { states: EigenState[] }) {
  const shown = (['stable', 'unstable', 'undetermined'] as const).filter((s) => states.includes(s));
  return (
    <ul className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-muted" aria-label="Marks">
      {shown.map((s) => (
        <li key={s} className="inline-flex items-center gap-1">
          <svg width="12" height="12" viewBox="0 0 12 12" aria-hidden="true">
            <PointShape state={s} x={6} y={6.5} r={4} />
          </svg>
          {eigenStateWords[s]}
        </li>
      ))}
    </ul>
  );
}

/**
 * Eigenvalues on the complex plane with the unit circle. Hover a point, or focus the
 * picture and use the arrow keys, to read the exact value and its conditioning.
 */
export function ComplexPlanePlot({
  points,
  label,
  active,
  onActiveChange,
}: {
  points: PlanePoint[];
  label: string;
  /** Index of the highlighted value (shared with the table beside the picture). */
  active?: number | null;
  onActiveChange?: (i: number | null) => void;
}) {
  const [ownActive, setOwnActive] = useState<number | null>(null);
  const cur = active !== undefined ? active : ownActive;
  const setCur = (i: number | null) => (onActiveChange ? onActiveChange(i) : setOwnActive(i));
  const p = cur !== null ? points[cur] : undefined;

  return (
    <PlaneFrame
      label={label}
      keysHint="Use the arrow keys to step through the values, Home and End for the first and last."
      count={points.length}
      active={cur}
      onActiveChange={setCur}
      reach={points.flatMap((pt) => [Math.abs(pt.re), Math.abs(pt.im)]).filter(Number.isFinite)}
      svgClassName="max-w-[26rem]"
      tipClassName="min-h-[3.25rem]"
      tip={
        p && cur !== null ? (
          <dl className="grid grid-cols-[max-content_1fr] gap-x-3 rounded-md border border-line bg-surface-raised px-2.5 py-1.5">
            <dt className="text-muted">λ{sub(cur + 1)}</dt>
            <dd className="tabular font-mono">{formatComplex(p.re, p.im)}</dd>
            {p.continuous && (
              <>
                <dt className="text-muted">continuous</dt>
                <dd className="tabular font-mono">{formatComplex(p.continuous.re, p.continuous.im)}</dd>
              </>
            )}
            {p.condition !== undefined && (
              <>
                <dt className="text-muted">condition</dt>
                <dd className="tabular font-mono">{formatSci(p.condition)}</dd>
              </>
            )}
            {p.spread !== undefined && (
              <>
                <dt className="text-muted">spread</dt>
                <dd className="tabular font-mono">{formatSci(p.spread)}</dd>
              </>
            )}
            <dt className="text-muted">state</dt>
            <dd>{eigenStateWords[p.state]}</dd>
          </dl>
        ) : null
      }
    >
      {({ x, y }) =>
        points.map((pt, i) =>
          Number.isFinite(pt.re) && Number.isFinite(pt.im) ? (
            <g key={i} onMouseEnter={() => setCur(i)} style={{ cursor: 'default' }}>
              <circle cx={x(pt.re)} cy={y(pt.im)} r={9} fill="transparent" />
              <PointShape state={pt.state} x={x(pt.re)} y={y(pt.im)} r={i === cur ? 6 : 4.5} />
              {i === cur && <circle cx={x(pt.re)} cy={y(pt.im)} r={10} fill="none" stroke="var(--color-focus)" strokeWidth={1.5} />}
            </g>
          ) : null,
        )
      }
    </PlaneFrame>
  );
}

/** λ₁, λ₁₂: subscript digits. */
export function sub(n: number): string {
  return String(n).replace(/\d/g, (d) => '₀₁₂₃₄₅₆₇₈₉'[Number(d)]);
}
