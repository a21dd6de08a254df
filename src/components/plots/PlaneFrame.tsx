import { scaleLinear, type ScaleLinear } from 'd3-scale';
import { useId, type KeyboardEvent, type ReactNode } from 'react';
import { plotMargin as M, XAxis, YAxis } from './axes';

const SIZE = 340;

export interface PlaneScales {
  x: ScaleLinear<number, number>;
  y: ScaleLinear<number, number>;
}

/**
 * The complex plane shared by the eigenvalue pictures: a focusable group that steps
 * through the values with the keyboard, the grid, axes and unit circle, and the
 * reading line below. The plot draws its own values (`children`) and reading (`tip`).
 */
export function PlaneFrame({
  label,
  keysHint,
  count,
  active,
  onActiveChange,
  reach,
  svgClassName,
  legend,
  tip,
  tipClassName,
  children,
}: {
  /** Accessible name of the picture. */
  label: string;
  /** Sentence added to the label of the focusable group, on how to use the keys. */
  keysHint: string;
  /** How many values the keys step through. */
  count: number;
  /** Index of the highlighted value, or null. */
  active: number | null;
  onActiveChange: (i: number | null) => void;
  /** Absolute coordinates the picture must show (the unit circle always shows). */
  reach: number[];
  /** Size class of the picture (e.g. a max width). */
  svgClassName: string;
  /** Shown between the picture and the reading line. */
  legend?: ReactNode;
  /** The reading of the highlighted value; null shows how to read one. */
  tip: ReactNode | null;
  /** Height class of the reading line, so the page does not jump. */
  tipClassName: string;
  children: (scales: PlaneScales) => ReactNode;
}) {
  const tipId = useId();
  const extent = Math.max(1.15, ...reach.map((v) => v * 1.08));
  const x = scaleLinear().domain([-extent, extent]).range([M.left, SIZE - M.right]).nice();
  const y = scaleLinear().domain([-extent, extent]).range([SIZE - M.bottom, M.top]).nice();
  const [d0, d1] = x.domain();
  const y0 = y.domain();
  const circle = `M${x(1)},${y(0)}A${x(1) - x(0)},${y(0) - y(1)} 0 1,0 ${x(-1)},${y(0)}A${x(1) - x(0)},${y(0) - y(1)} 0 1,0 ${x(1)},${y(0)}`;
  const ticks = x.ticks(5);

  const onKey = (e: KeyboardEvent) => {
    if (count === 0) return;
    const n = count;
    const cur = active;
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
      onActiveChange(keys[e.key]());
    } else if (e.key === 'Escape') onActiveChange(null);
  };

  return (
    <div className="relative">
      <div
        tabIndex={0}
        onKeyDown={onKey}
        onFocus={() => active === null && count > 0 && onActiveChange(0)}
        onBlur={() => onActiveChange(null)}
        aria-describedby={tipId}
        aria-label={`${label}. ${keysHint}`}
        role="group"
        className="rounded-md"
      >
        <svg viewBox={`0 0 ${SIZE} ${SIZE}`} className={`block h-auto w-full ${svgClassName}`} role="img" aria-label={label} onMouseLeave={() => onActiveChange(null)}>
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
          {children({ x, y })}
        </svg>
      </div>
      {legend}
      <div id={tipId} aria-live="polite" className={`mt-1 ${tipClassName} text-xs`}>
        {tip ?? <p className="pt-1 text-muted">Point at a value, or focus the picture and use the arrow keys, to read it exactly.</p>}
      </div>
    </div>
  );
}
