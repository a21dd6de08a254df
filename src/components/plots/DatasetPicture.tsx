import type { DatasetPreview } from '../../../shared/assignment';
import { Heatmap } from './Heatmap';
import { LinesPlot } from './LinesPlot';

/** The small picture of a dataset: a few states over time as lines, or a heatmap of a 1-D grid over time. */
export function DatasetPicture({ preview, name }: { preview: DatasetPreview; name: string }) {
  const { states, times, values } = preview;
  if (states.length === 0 || times.length === 0) return <p className="text-sm text-muted">This dataset has no snapshots to draw.</p>;
  const span = `snapshots ${times[0]} to ${times[times.length - 1]}`;
  if (preview.kind === 'heatmap') {
    return (
      <Heatmap
        values={values}
        label={`Heatmap of ${name}: ${states.length} grid points over ${span}`}
        xLabel="snapshot"
        yLabel="state index"
        xDomain={[times[0], times[times.length - 1]]}
        yDomain={[states[0], states[states.length - 1]]}
        valueLabel="value"
        symmetric={values.flat().some((v) => v < 0)}
      />
    );
  }
  return (
    <LinesPlot
      label={`Line plot of ${name}: states ${states.join(', ')} over ${span}`}
      xLabel="snapshot"
      yLabel="value"
      series={states.map((s, k) => ({ name: `x${s}`, x: times, y: values[k] ?? [] }))}
    />
  );
}
