import { scaleLinear, scaleLog } from 'd3-scale';
import { line } from 'd3-shape';
import { XAxis, YAxis, plotMargin as M, tickLabel } from './axes';

const W = 420;
const H = 260;

/**
 * The decay of singular values (or Gram eigenvalue roots) on a log axis, with the
 * chosen rank marked. Values at or below zero cannot sit on a log axis and are left out
 * (the table beside the picture lists them).
 */
export function DecayPlot({ values, rank, label, what = 'σ', order = 'largest first' }: { values: number[]; rank?: number | null; label: string; what?: string; order?: string }) {
  const pts = values.map((v, i) => ({ i: i + 1, v })).filter((p) => p.v > 0 && Number.isFinite(p.v));
  if (pts.length === 0) return <p className="text-sm text-muted">No positive values to draw.</p>;
  const max = Math.max(...pts.map((p) => p.v));
  const min = Math.min(...pts.map((p) => p.v));
  const x = scaleLinear()
    .domain([1, Math.max(2, values.length)])
    .range([M.left, W - M.right]);
  const y = scaleLog()
    .domain([min === max ? min / 10 : min, max])
    .range([H - M.bottom, M.top])
    .nice();
  const decades = Math.log10(y.domain()[1] / y.domain()[0]);
  const yTicks = y.ticks().filter((t) => {
    const e = Math.log10(t);
    return Math.abs(e - Math.round(e)) < 1e-9 && (decades <= 8 || Math.round(e) % Math.ceil(decades / 6) === 0);
  });
  const xTicks = x.ticks(Math.min(8, values.length)).filter((t) => Number.isInteger(t));
  const path = line<{ i: number; v: number }>()
    .x((p) => x(p.i))
    .y((p) => y(p.v))(pts);
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="block h-auto w-full max-w-[30rem]" role="img" aria-label={label}>
      <rect x={M.left} y={M.top} width={W - M.left - M.right} height={H - M.top - M.bottom} fill="var(--color-surface)" />
      {yTicks.map((t) => (
        <line key={t} x1={M.left} x2={W - M.right} y1={y(t)} y2={y(t)} stroke="var(--color-line)" strokeWidth={0.6} />
      ))}
      {rank != null && rank >= 1 && rank <= values.length && (
        <g>
          <rect x={M.left} y={M.top} width={x(rank) - M.left} height={H - M.top - M.bottom} fill="var(--color-accent-soft)" opacity={0.7} />
          <line x1={x(rank)} x2={x(rank)} y1={M.top} y2={H - M.bottom} stroke="var(--color-accent)" strokeDasharray="5 3" strokeWidth={1.5} />
          <text x={x(rank) + (x(rank) > W - 100 ? -5 : 5)} y={M.top + 13} fontSize={11.5} fill="var(--color-accent-strong)" textAnchor={x(rank) > W - 100 ? 'end' : 'start'} fontWeight={600}>
            rank {rank} kept
          </text>
        </g>
      )}
      <path d={path ?? ''} fill="none" stroke="var(--color-ink)" strokeWidth={1.4} />
      {pts.map((p) => (
        <circle key={p.i} cx={x(p.i)} cy={y(p.v)} r={pts.length > 60 ? 1.6 : 2.8} fill={rank != null && p.i <= rank ? 'var(--color-accent)' : 'var(--color-surface-raised)'} stroke="var(--color-ink)" strokeWidth={0.9}>
          <title>{`${what}${p.i} = ${tickLabel(p.v)}`}</title>
        </circle>
      ))}
      <XAxis scale={x} y={H - M.bottom} ticks={xTicks} label={`index (${order})`} x0={M.left} x1={W - M.right} />
      <YAxis scale={y} x={M.left} ticks={yTicks} label={`${what} (log scale)`} y0={H - M.bottom} y1={M.top} />
    </svg>
  );
}
