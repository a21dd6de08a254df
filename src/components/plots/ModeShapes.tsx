import { Heatmap } from './Heatmap';
import { LinesPlot } from './LinesPlot';

export interface ModeVector {
  re: number[];
  im: number[];
}

/**
 * A mode's phase and scale are arbitrary: turn it so its largest entry is real and
 * positive, and scale that entry to 1, so shapes compare across variants.
 */
export function alignMode(m: ModeVector): ModeVector {
  let k = 0;
  let best = -1;
  for (let i = 0; i < m.re.length; i++) {
    const a = Math.hypot(m.re[i], m.im[i] ?? 0);
    if (a > best) [best, k] = [a, i];
  }
  if (!(best > 0)) return m;
  const cr = m.re[k] / best;
  const ci = -(m.im[k] ?? 0) / best; // conj(phase)
  return {
    re: m.re.map((r, i) => (r * cr - (m.im[i] ?? 0) * ci) / best),
    im: m.re.map((r, i) => (r * ci + (m.im[i] ?? 0) * cr) / best),
  };
}

/**
 * Mode shapes over the state index: the real part of the first few modes as lines,
 * and every graded mode as one row of a heatmap.
 */
export function ModeShapes({ modes, names, maxLines = 4 }: { modes: (ModeVector | null)[]; names: string[]; maxLines?: number }) {
  const present = modes.map((m, i) => (m ? { m: alignMode(m), name: names[i] ?? `ξ${i + 1}`, index: i } : null)).filter((x): x is NonNullable<typeof x> => x !== null);
  if (present.length === 0) return <p className="text-sm text-muted">The reference carries no mode vectors.</p>;
  const n = present[0].m.re.length;
  const idx = Array.from({ length: n }, (_, i) => i);
  return (
    <div className="flex flex-col gap-4">
      <LinesPlot
        label={`Real part of the first ${Math.min(maxLines, present.length)} mode shapes over ${n} states, each scaled so its largest entry is 1`}
        xLabel="state index"
        yLabel="Re ξ (scaled)"
        series={present.slice(0, maxLines).map((p) => ({ name: p.name, x: idx, y: p.m.re }))}
      />
      {present.length > 1 && (
        <Heatmap
          values={present.map((p) => p.m.re)}
          label={`Heatmap of the real part of ${present.length} mode shapes over ${n} states: one row per mode, named as in the table (one of each conjugate pair)`}
          xLabel="state index"
          yLabel="mode"
          xDomain={[0, n - 1]}
          yDomain={[1, present.length]}
          rowNames={present.map((p) => p.name)}
          valueLabel="Re ξ"
          symmetric
        />
      )}
    </div>
  );
}
