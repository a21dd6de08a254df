import type { ScaleLinear, ScaleLogarithmic } from 'd3-scale';

/** Shared parts of the pictures: margins, tick labels in the product's number style, axis titles. */
export const plotMargin = { top: 12, right: 14, bottom: 40, left: 52 };

type Scale = ScaleLinear<number, number> | ScaleLogarithmic<number, number>;

export function tickLabel(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e5) return String(Number(v.toPrecision(4))).replace('-', '\u2212');
  const e = Math.floor(Math.log10(a) + 1e-9);
  const m = Number((v / 10 ** e).toPrecision(3));
  const sup = String(e).replace('-', '⁻').replace(/\d/g, (d) => '⁰¹²³⁴⁵⁶⁷⁸⁹'[Number(d)]);
  return `${Math.abs(m) === 1 ? (m < 0 ? '\u2212' : '') : `${String(m).replace('-', '\u2212')}×`}10${sup}`;
}

export function XAxis({ scale, y, ticks, label, x0, x1, format = tickLabel }: { scale: Scale; y: number; ticks: number[]; label: string; x0: number; x1: number; format?: (v: number) => string }) {
  return (
    <g className="text-muted" fontSize={11}>
      <line x1={x0} x2={x1} y1={y} y2={y} stroke="currentColor" strokeOpacity={0.6} />
      {ticks.map((t) => (
        <g key={t} transform={`translate(${scale(t)},${y})`}>
          <line y2={4} stroke="currentColor" strokeOpacity={0.6} />
          <text y={15} textAnchor="middle" fill="currentColor" className="tabular">
            {format(t)}
          </text>
        </g>
      ))}
      <text x={(x0 + x1) / 2} y={y + 32} textAnchor="middle" fill="var(--color-ink)" fontSize={12}>
        {label}
      </text>
    </g>
  );
}

export function YAxis({ scale, x, ticks, label, y0, y1, format = tickLabel }: { scale: Scale; x: number; ticks: number[]; label: string; y0: number; y1: number; format?: (v: number) => string }) {
  return (
    <g className="text-muted" fontSize={11}>
      <line x1={x} x2={x} y1={y0} y2={y1} stroke="currentColor" strokeOpacity={0.6} />
      {ticks.map((t) => (
        <g key={t} transform={`translate(${x},${scale(t)})`}>
          <line x2={-4} stroke="currentColor" strokeOpacity={0.6} />
          <text x={-7} dy="0.32em" textAnchor="end" fill="currentColor" className="tabular">
            {format(t)}
          </text>
        </g>
      ))}
      <text transform={`translate(${x - 40},${(y0 + y1) / 2}) rotate(-90)`} textAnchor="middle" fill="var(--color-ink)" fontSize={12}>
        {label}
      </text>
    </g>
  );
}

/** A picture and its table side by side on wide screens, stacked on narrow ones. */
export function PlotWithTable({ plot, table, caption }: { plot: React.ReactNode; table: React.ReactNode; caption?: React.ReactNode }) {
  return (
    <div className="grid grid-cols-[minmax(0,1fr)] gap-4 xl:grid-cols-[minmax(0,26rem)_minmax(0,1fr)]">
      <figure className="min-w-0">
        {plot}
        {caption && <figcaption className="mt-1.5 text-xs text-muted">{caption}</figcaption>}
      </figure>
      <div className="min-w-0">{table}</div>
    </div>
  );
}
