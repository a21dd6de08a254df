import { scaleLinear, scaleSequential } from 'd3-scale';
import { interpolateViridis } from 'd3-scale-chromatic';
import { useMemo } from 'react';
import { XAxis, YAxis, tickLabel } from './axes';

const W = 440;
const H = 250;
const M = { top: 10, right: 74, bottom: 40, left: 52 };
/** Above this many cells the picture is painted on a canvas and shown as one image. */
const SVG_CELLS = 3000;

/**
 * values[row][col] as coloured cells on a perceptual scale (viridis, from
 * d3-scale-chromatic), rows upwards, columns to the right, with a colour bar.
 */
export function Heatmap({
  values,
  label,
  xLabel,
  yLabel,
  xDomain,
  yDomain,
  valueLabel,
  symmetric = false,
  rowNames,
}: {
  /** Names for the rows' ticks instead of numbers (e.g. ξ₁, ξ₃). */
  rowNames?: string[];
  values: number[][];
  label: string;
  xLabel: string;
  yLabel: string;
  /** Axis values of the first and last column / row (cell centres). */
  xDomain: [number, number];
  yDomain: [number, number];
  valueLabel: string;
  /** Colour domain symmetric about zero (signed quantities). */
  symmetric?: boolean;
}) {
  const rows = values.length;
  const cols = rows > 0 ? values[0].length : 0;
  const flat = values.flat().filter(Number.isFinite);
  let lo = flat.length ? Math.min(...flat) : 0;
  let hi = flat.length ? Math.max(...flat) : 1;
  if (symmetric) {
    const a = Math.max(Math.abs(lo), Math.abs(hi)) || 1;
    lo = -a;
    hi = a;
  }
  if (lo === hi) hi = lo + 1;
  const colour = scaleSequential(interpolateViridis).domain([lo, hi]);
  const px0 = M.left;
  const px1 = W - M.right;
  const py0 = H - M.bottom;
  const py1 = M.top;
  const cw = (px1 - px0) / Math.max(1, cols);
  const ch = (py0 - py1) / Math.max(1, rows);
  const half = (d: [number, number], n: number) => (n > 1 ? (d[1] - d[0]) / (n - 1) / 2 : 0.5);
  const x = scaleLinear()
    .domain([xDomain[0] - half(xDomain, cols), xDomain[1] + half(xDomain, cols)])
    .range([px0, px1]);
  const y = scaleLinear()
    .domain([yDomain[0] - half(yDomain, rows), yDomain[1] + half(yDomain, rows)])
    .range([py0, py1]);

  const large = rows * cols > SVG_CELLS;
  const image = useMemo(() => {
    if (!large || typeof document === 'undefined') return null;
    const canvas = document.createElement('canvas');
    canvas.width = cols;
    canvas.height = rows;
    const ctx = canvas.getContext('2d');
    if (!ctx) return null;
    const img = ctx.createImageData(cols, rows);
    for (let r = 0; r < rows; r++)
      for (let c = 0; c < cols; c++) {
        const v = values[r][c];
        const rgb = Number.isFinite(v) ? colour(v) : 'rgb(200,200,200)';
        const m = /rgb\((\d+), ?(\d+), ?(\d+)\)/.exec(rgb) ?? /#(..)(..)(..)/.exec(rgb);
        const k = ((rows - 1 - r) * cols + c) * 4;
        const parse = (s: string) => (rgb.startsWith('#') ? parseInt(s, 16) : Number(s));
        img.data[k] = m ? parse(m[1]) : 0;
        img.data[k + 1] = m ? parse(m[2]) : 0;
        img.data[k + 2] = m ? parse(m[3]) : 0;
        img.data[k + 3] = 255;
      }
    ctx.putImageData(img, 0, 0);
    return canvas.toDataURL();
    // values identify the picture; colour follows from them
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [values, large, rows, cols]);

  const barTicks = scaleLinear().domain([lo, hi]).ticks(4);
  const bar = scaleLinear().domain([lo, hi]).range([py0, py1]);
  const gradId = `hm-${rows}-${cols}-${Math.round(lo * 1e6)}`;

  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="block h-auto w-full max-w-[30rem]" role="img" aria-label={label}>
      {large && image ? (
        <image href={image} x={px0} y={py1} width={px1 - px0} height={py0 - py1} preserveAspectRatio="none" style={{ imageRendering: 'pixelated' }} />
      ) : (
        <g shapeRendering="crispEdges">
          {values.map((row, r) =>
            row.map((v, c) => <rect key={`${r}-${c}`} x={px0 + c * cw} y={py0 - (r + 1) * ch} width={cw + 0.3} height={ch + 0.3} fill={Number.isFinite(v) ? colour(v) : 'var(--color-line)'} />),
          )}
        </g>
      )}
      <XAxis scale={x} y={py0} ticks={x.ticks(6).filter((t) => t >= xDomain[0] && t <= xDomain[1])} label={xLabel} x0={px0} x1={px1} />
      {rowNames ? (
        <YAxis scale={y} x={px0} ticks={rowNames.map((_, i) => yDomain[0] + i)} format={(t) => rowNames[Math.round(t - yDomain[0])] ?? ''} label={yLabel} y0={py0} y1={py1} />
      ) : (
        <YAxis scale={y} x={px0} ticks={y.ticks(5).filter((t) => t >= yDomain[0] && t <= yDomain[1] && Number.isInteger(t))} label={yLabel} y0={py0} y1={py1} />
      )}
      <defs>
        <linearGradient id={gradId} x1="0" x2="0" y1="1" y2="0">
          {[0, 0.25, 0.5, 0.75, 1].map((f) => (
            <stop key={f} offset={f} stopColor={interpolateViridis(f)} />
          ))}
        </linearGradient>
      </defs>
      <rect x={W - M.right + 10} y={py1} width={10} height={py0 - py1} fill={`url(#${gradId})`} />
      {barTicks.map((t) => (
        <text key={t} x={W - M.right + 24} y={bar(t)} dy="0.32em" fontSize={10} fill="var(--color-muted)" className="tabular">
          {tickLabel(t)}
        </text>
      ))}
      <text transform={`translate(${W - 12},${(py0 + py1) / 2}) rotate(90)`} textAnchor="middle" fontSize={11} fill="var(--color-ink)">
        {valueLabel}
      </text>
    </svg>
  );
}
