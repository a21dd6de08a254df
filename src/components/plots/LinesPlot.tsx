import { scaleLinear } from 'd3-scale';
import { line } from 'd3-shape';
import { XAxis, YAxis, plotMargin as M } from './axes';

const W = 440;
const H = 240;

/** Line styles told apart by dash pattern as well as colour. */
export const lineStyles = [
  { stroke: 'var(--color-ink)', dash: undefined },
  { stroke: 'var(--color-accent)', dash: '6 3' },
  { stroke: 'var(--color-matched)', dash: '2 2.5' },
  { stroke: 'var(--color-flagged)', dash: '9 3 2 3' },
  { stroke: 'var(--color-near-miss)', dash: '12 4' },
  { stroke: 'var(--color-muted)', dash: '1 3' },
];

export interface Series {
  name: string;
  x: number[];
  y: number[];
}

/** A few series against a common x axis, with a legend that shows each line's pattern. */
export function LinesPlot({ series, label, xLabel, yLabel }: { series: Series[]; label: string; xLabel: string; yLabel: string }) {
  const xs = series.flatMap((s) => s.x).filter(Number.isFinite);
  const ys = series.flatMap((s) => s.y).filter(Number.isFinite);
  if (xs.length === 0 || ys.length === 0) return <p className="text-sm text-muted">Nothing to draw.</p>;
  let [ylo, yhi] = [Math.min(...ys), Math.max(...ys)];
  if (ylo === yhi) [ylo, yhi] = [ylo - 1, yhi + 1];
  const x = scaleLinear()
    .domain([Math.min(...xs), Math.max(...xs)])
    .range([M.left, W - M.right]);
  const y = scaleLinear().domain([ylo, yhi]).range([H - M.bottom, M.top]).nice();
  const yTicks = y.ticks(5);
  return (
    <div>
      <svg viewBox={`0 0 ${W} ${H}`} className="block h-auto w-full max-w-[30rem]" role="img" aria-label={label}>
        <rect x={M.left} y={M.top} width={W - M.left - M.right} height={H - M.top - M.bottom} fill="var(--color-surface)" />
        {yTicks.map((t) => (
          <line key={t} x1={M.left} x2={W - M.right} y1={y(t)} y2={y(t)} stroke={t === 0 ? 'var(--color-line-strong)' : 'var(--color-line)'} strokeWidth={0.6} />
        ))}
        {series.map((s, k) => {
          const st = lineStyles[k % lineStyles.length];
          const d = line<number>()
            .defined((_, i) => Number.isFinite(s.x[i]) && Number.isFinite(s.y[i]))
            .x((_, i) => x(s.x[i]))
            .y((v) => y(v))(s.y);
          return <path key={s.name} d={d ?? ''} fill="none" stroke={st.stroke} strokeWidth={1.6} strokeDasharray={st.dash} />;
        })}
        <XAxis scale={x} y={H - M.bottom} ticks={x.ticks(6)} label={xLabel} x0={M.left} x1={W - M.right} />
        <YAxis scale={y} x={M.left} ticks={yTicks} label={yLabel} y0={H - M.bottom} y1={M.top} />
      </svg>
      <ul className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-muted" aria-hidden="true">
        {series.map((s, k) => {
          const st = lineStyles[k % lineStyles.length];
          return (
            <li key={s.name} className="inline-flex items-center gap-1.5">
              <svg width="26" height="8" viewBox="0 0 26 8">
                <line x1="1" x2="25" y1="4" y2="4" stroke={st.stroke} strokeWidth={1.8} strokeDasharray={st.dash} />
              </svg>
              <span className="font-mono tabular">{s.name}</span>
            </li>
          );
        })}
      </ul>
    </div>
  );
}
