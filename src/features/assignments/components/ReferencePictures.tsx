import { useState } from 'react';
import type { ReferenceResponse } from '../../../../shared/assignment';
import { Button } from '../../../components/Button';
import { ComplexPlanePlot, PointShape, StateLegend, sub, type EigenState, type PlanePoint } from '../../../components/plots/ComplexPlanePlot';
import { DecayPlot } from '../../../components/plots/DecayPlot';
import { ModeShapes, alignMode } from '../../../components/plots/ModeShapes';
import { PlotWithTable } from '../../../components/plots/axes';
import { Table, Td, Th } from '../../../components/Table';
import { formatComplex, formatReal, formatSci } from '../../../lib/numbers';

const shortStateWords: Record<EigenState, string> = { stable: 'settled', unstable: 'unstable', undetermined: 'undetermined' };

/** The scorer's own classification (sent by the server); without it, only the rank band's spread can tell. */
export function eigenState(ev: { spread?: number }, unstableSpreadLimit: number, scored?: { state: string }): EigenState {
  if (scored) return scored.state === 'graded' ? 'stable' : scored.state === 'unstable' ? 'unstable' : 'undetermined';
  if (ev.spread !== undefined && ev.spread > unstableSpreadLimit) return 'unstable';
  return 'stable';
}

function CopyButton({ text, label }: { text: string; label: string }) {
  const [done, setDone] = useState(false);
  return (
    <Button
      size="sm"
      variant="secondary"
      onClick={() =>
        void navigator.clipboard?.writeText(text).then(() => {
          setDone(true);
          window.setTimeout(() => setDone(false), 1500);
        })
      }
    >
      {done ? 'Copied' : label}
    </Button>
  );
}

/**
 * Pictures first, each with its table as the text alternative: eigenvalues on the complex
 * plane, the decay of singular values with the rank marked, and mode shapes.
 */
export function ReferencePictures({ data, unstableSpreadLimit, title }: { data: ReferenceResponse; unstableSpreadLimit: number; title: string }) {
  const [active, setActive] = useState<number | null>(null);
  const ref = data.reference;
  if (!ref) return null;
  const points: PlanePoint[] = ref.eigenvalues.map((ev, i) => ({
    re: ev.re,
    im: ev.im,
    condition: ev.condition,
    spread: ev.spread,
    continuous: ref.continuous?.[i] ?? null,
    state: eigenState(ev, unstableSpreadLimit, data.classification?.[i]),
  }));
  const hasSpread = ref.eigenvalues.some((e) => e.spread !== undefined);
  const hasCont = !!ref.continuous;
  const exact = JSON.stringify(ref.eigenvalues.map((e) => [e.re, e.im]));
  const sv = data.singularValues ?? [];
  // EDMD's values are the diagonal of the pivoted QR of Ψ_X (its least-squares solve); functions past the cut-off are dropped.
  const edmdQr = ref.method === 'edmd';
  const kept = edmdQr ? (ref.dictionaryRank ?? ref.rank) : ref.rank;
  const modes = data.modes ?? [];
  const modeNames = ref.eigenvalues.map((_, i) => `ξ${sub(i + 1)}`);

  return (
    <div className="flex flex-col gap-6">
      <section aria-labelledby="plane-heading">
        <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
          <h3 id="plane-heading" className="text-sm font-semibold">
            Eigenvalues on the complex plane
          </h3>
          <span className="text-xs text-muted">
            {ref.eigenvalues.length} value{ref.eigenvalues.length === 1 ? '' : 's'}
            {data.classification && <>, {data.classification.filter((c) => c.state === 'graded').length} graded</>} · rank {ref.rank} · n = {ref.n}, m = {ref.m}
            {ref.dt !== undefined && <> · dt = {formatReal(ref.dt, 4)}</>}
          </span>
        </div>
        <PlotWithTable
          plot={
            <>
              <ComplexPlanePlot points={points} label={`${title}: ${points.length} eigenvalues on the complex plane with the unit circle`} active={active} onActiveChange={setActive} />
              <StateLegend states={points.map((p) => p.state)} />
            </>
          }
          table={
            <div className="flex flex-col gap-2">
              <div className="max-h-[26rem] overflow-y-auto">
                <Table caption="Reference eigenvalues and their state (the picture's values)">
                  <thead>
                    <tr>
                      <Th numeric>#</Th>
                      <Th numeric className="normal-case!">λ</Th>
                      {hasCont && <Th numeric className="normal-case!">log λ / dt</Th>}
                      <Th numeric>condition</Th>
                      {hasSpread && <Th numeric>spread</Th>}
                      <Th>state</Th>
                    </tr>
                  </thead>
                  <tbody>
                    {points.map((p, i) => (
                      <tr key={i} onMouseEnter={() => setActive(i)} onMouseLeave={() => setActive(null)} className={i === active ? 'bg-accent-soft/60' : ''}>
                        <Td numeric className="text-muted">
                          {i + 1}
                        </Td>
                        <Td numeric className="font-mono text-[0.8125rem] whitespace-nowrap">
                          {formatComplex(p.re, p.im)}
                        </Td>
                        {hasCont && (
                          <Td numeric className="font-mono text-[0.8125rem] whitespace-nowrap">
                            {formatComplex(p.continuous?.re, p.continuous?.im)}
                          </Td>
                        )}
                        <Td numeric className="font-mono text-[0.8125rem]">
                          {formatSci(p.condition)}
                        </Td>
                        {hasSpread && (
                          <Td numeric className="font-mono text-[0.8125rem]">
                            {formatSci(p.spread)}
                          </Td>
                        )}
                        <Td className="text-xs whitespace-nowrap">
                          <span className="inline-flex items-center gap-1">
                            <svg width="12" height="12" viewBox="0 0 12 12" aria-hidden="true">
                              <PointShape state={p.state} x={6} y={6.5} r={4} />
                            </svg>
                            {shortStateWords[p.state]}
                          </span>
                        </Td>
                      </tr>
                    ))}
                  </tbody>
                </Table>
              </div>
              <div className="flex flex-wrap items-center gap-2 text-xs text-muted">
                <CopyButton text={exact} label="Copy exact values" />
                <span>as a JSON list of [re, im] pairs, full precision</span>
              </div>
              <p className="text-xs text-muted">
                Unstable: moves more than {unstableSpreadLimit} across the rank band. Undetermined: moves by the stated tolerance or more when the data
                are perturbed at float32 rounding level (or the dictionary leaves it free), so no solver can be held to it. Neither is graded.
              </p>
            </div>
          }
        />
      </section>

      {sv.length > 0 && (
        <section aria-labelledby="decay-heading">
          <h3 id="decay-heading" className="mb-2 text-sm font-semibold">
            {ref.method === 'kernel-edmd'
              ? 'Decay of the Gram matrix (square roots of its eigenvalues)'
              : edmdQr
                ? 'Decay of the dictionary on the data: |Rᵢᵢ| of the pivoted QR of Ψ_X'
                : 'Decay of the singular values'}
          </h3>
          <PlotWithTable
            plot={
              <DecayPlot
                values={sv}
                rank={ref.method === 'edmd' ? null : ref.rank}
                {...(edmdQr ? { what: '|Rᵢᵢ|', order: 'pivot order' } : {})}
                label={edmdQr ? `Decay of ${sv.length} values |Rᵢᵢ| on a log axis` : `Decay of ${sv.length} singular values on a log axis, rank ${ref.rank} marked`}
              />
            }
            table={
              <div className="max-h-[18rem] overflow-y-auto">
                <Table caption={edmdQr ? `|Rᵢᵢ| of the pivoted QR of Ψ_X, in pivot order (${kept} of ${sv.length} functions kept)` : `Singular values, largest first (rank ${ref.rank} kept)`}>
                  <thead>
                    <tr>
                      <Th numeric>#</Th>
                      <Th numeric className="normal-case!">{edmdQr ? '|Rᵢᵢ|' : 'σ'}</Th>
                      <Th numeric className="normal-case!">{edmdQr ? '|Rᵢᵢ| / |R₁₁|' : 'σ / σ₁'}</Th>
                      <Th>kept</Th>
                    </tr>
                  </thead>
                  <tbody>
                    {sv.map((v, i) => (
                      <tr key={i}>
                        <Td numeric className="text-muted">
                          {i + 1}
                        </Td>
                        <Td numeric className="font-mono text-[0.8125rem]">
                          {formatSci(v)}
                        </Td>
                        <Td numeric className="font-mono text-[0.8125rem]">
                          {formatSci(sv[0] ? v / sv[0] : NaN)}
                        </Td>
                        <Td className="text-xs">{i < kept ? 'kept' : '—'}</Td>
                      </tr>
                    ))}
                  </tbody>
                </Table>
              </div>
            }
          />
        </section>
      )}

      {modes.some((m) => m) && (
        <section aria-labelledby="modes-heading">
          <h3 id="modes-heading" className="mb-2 text-sm font-semibold">
            Mode shapes
          </h3>
          <PlotWithTable
            plot={
              <ModeShapes
                // A conjugate pair has conjugate modes with the same real part: draw the one with Im λ ≥ 0.
                modes={modes.map((m, i) => ((ref.eigenvalues[i]?.im ?? 0) < 0 ? null : m))}
                names={modeNames}
              />
            }
            table={
              <Table caption="Modes (each turned so its largest entry is real and 1)">
                <thead>
                  <tr>
                    <Th>mode</Th>
                    <Th numeric className="normal-case!">λ</Th>
                    <Th numeric>largest at state</Th>
                    <Th numeric className="normal-case!">sign changes of Re ξ</Th>
                  </tr>
                </thead>
                <tbody>
                  {modes.map((m, i) => {
                    if (!m) return null;
                    const a = alignMode(m);
                    let peak = 0;
                    a.re.forEach((_, k) => {
                      if (Math.hypot(a.re[k], a.im[k]) > Math.hypot(a.re[peak], a.im[peak])) peak = k;
                    });
                    let changes = 0;
                    for (let k = 1; k < a.re.length; k++) if (Math.sign(a.re[k]) * Math.sign(a.re[k - 1]) < 0) changes++;
                    const ev = ref.eigenvalues[i];
                    return (
                      <tr key={i}>
                        <Td className="font-mono text-[0.8125rem]">{modeNames[i]}</Td>
                        <Td numeric className="font-mono text-[0.8125rem] whitespace-nowrap">
                          {ev ? formatComplex(ev.re, ev.im) : '—'}
                        </Td>
                        <Td numeric>{peak}</Td>
                        <Td numeric>{changes}</Td>
                      </tr>
                    );
                  })}
                </tbody>
              </Table>
            }
          />
        </section>
      )}
    </div>
  );
}
