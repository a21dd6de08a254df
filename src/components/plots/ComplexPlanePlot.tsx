import { scaleLinear } from 'd3-scale';
import { useId, useState, type KeyboardEvent } from 'react';
import { formatComplex, formatSci } from '../../lib/numbers';
import { XAxis, YAxis } from './axes';

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

const SIZE = 340;
const M = { top: 12, right: 14, bottom: 40, left: 52 };

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
  const tipId = useId();

  const extent = Math.max(1.15, ...points.flatMap((p) => [Math.abs(p.re), Math.abs(p.im)]).filter(Number.isFinite).map((v) => v * 1.08));
  const x = scaleLinear().domain([-extent, extent]).range([M.left, SIZE - M.right]).nice();
  const y = scaleLinear().domain([-extent, extent]).range([SIZE - M.bottom, M.top]).nice();
  const [d0, d1] = x.domain();
  const y0 = y.domain();
  const circle = `M${x(1)},${y(0)}A${x(1) - x(0)},${y(0) - y(1)} 0 1,0 ${x(-1)},${y(0)}A${x(1) - x(0)},${y(0) - y(1)} 0 1,0 ${x(1)},${y(0)}`;
  const ticks = x.ticks(5);
  const p = cur !== null && cur !== undefined ? points[cur] : undefined;

  const onKey = (e: KeyboardEvent) => {
    if (points.length === 0) return;
    if (e.key === 'ArrowRight' || e.key === 'ArrowDown') {
      e.preventDefault();
      setCur(cur === null || cur === undefined ? 0 : (cur + 1) % points.length);
    } else if (e.key === 'ArrowLeft' || e.key === 'ArrowUp') {
      e.preventDefault();
      setCur(cur === null || cur === undefined ? points.length - 1 : (cur - 1 + points.length) % points.length);
    } else if (e.key === 'Home') {
      e.preventDefault();
      setCur(0);
    } else if (e.key === 'End') {
      e.preventDefault();
      setCur(points.length - 1);
    } else if (e.key === 'Escape') setCur(null);
  };

  return (
    <div className="relative">
      <div
        tabIndex={0}
        onKeyDown={onKey}
        onFocus={() => cur == null && points.length > 0 && setCur(0)}
        onBlur={() => setCur(null)}
        aria-describedby={tipId}
        aria-label={`${label}. Use the arrow keys to step through the values, Home and End for the first and last.`}
        role="group"
        className="rounded-md"
      >
        <svg viewBox={`0 0 ${SIZE} ${SIZE}`} className="block h-auto w-full max-w-[26rem]" role="img" aria-label={label} onMouseLeave={() => setCur(null)}>
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
          {points.map((pt, i) =>
            Number.isFinite(pt.re) && Number.isFinite(pt.im) ? (
              <g key={i} onMouseEnter={() => setCur(i)} style={{ cursor: 'default' }}>
                <circle cx={x(pt.re)} cy={y(pt.im)} r={9} fill="transparent" />
                <PointShape state={pt.state} x={x(pt.re)} y={y(pt.im)} r={i === cur ? 6 : 4.5} />
                {i === cur && <circle cx={x(pt.re)} cy={y(pt.im)} r={10} fill="none" stroke="var(--color-focus)" strokeWidth={1.5} />}
              </g>
            ) : null,
          )}
        </svg>
      </div>
      <div id={tipId} aria-live="polite" className="mt-1 min-h-[3.25rem] text-xs">
        {p && cur !== null && cur !== undefined ? (
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
        ) : (
          <p className="pt-1 text-muted">Point at a value, or focus the picture and use the arrow keys, to read it exactly.</p>
        )}
      </div>
    </div>
  );
}

/** λ₁, λ₁₂: subscript digits. */
export function sub(n: number): string {
  return String(n).replace(/\d/g, (d) => '₀₁₂₃₄₅₆₇₈₉'[Number(d)]);
}
