import type { ReactNode } from 'react';
import type { PartReport, ScoreReport, toleranceSource } from '../../../../shared/score-report';
import type { z } from 'zod';
import { submissionStatusLabels, type SubmissionStatus, type ValueStatus } from '../../../../shared/submission';
import { MarkWord, MatchPlanePlot, type MatchMark, type MatchPoint } from '../../../components/plots/MatchPlanePlot';
import { Table, Td, Th } from '../../../components/Table';
import { formatComplex, formatReal, formatSci } from '../../../lib/numbers';

type ToleranceSource = z.infer<typeof toleranceSource>;

/** Points as people write them: up to two decimals, no trailing zeros (7.5, 10, 3.33). */
export function formatPoints(x: number | null | undefined): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  return String(Number(x.toFixed(2))).replace('-', '\u2212');
}

const statusStyle: Record<SubmissionStatus, { mark: string; cls: string; short: string }> = {
  received: { mark: '◌', cls: 'border-line-strong bg-surface-sunken text-ink', short: 'Waiting' },
  grading: { mark: '◐', cls: 'border-focus/40 bg-[#e2eef1] text-[#16505f]', short: 'Being scored' },
  scored: { mark: '●', cls: 'border-ok/40 bg-ok-soft text-ok', short: 'Scored' },
  failed: { mark: '■', cls: 'border-danger/40 bg-danger-soft text-danger', short: 'Not scored' },
};

/** A submission's state as a mark and a word (the long sentence as its title). */
export function SubmissionStatusTag({ status, long = false }: { status: SubmissionStatus; long?: boolean }) {
  const s = statusStyle[status];
  return (
    <span title={submissionStatusLabels[status]} className={`inline-flex items-center gap-1 rounded border px-1.5 py-px text-xs font-medium whitespace-nowrap ${s.cls}`}>
      <span aria-hidden="true" className="text-[0.65rem]">
        {s.mark}
      </span>
      {long ? submissionStatusLabels[status] : s.short}
    </span>
  );
}

/** "late, 2 days": a word with a clock mark. */
export function LateTag({ days }: { days?: number }) {
  return (
    <span className="inline-flex items-center gap-1 rounded border border-near-miss/50 px-1.5 py-px text-xs font-medium whitespace-nowrap text-ink">
      <svg width="11" height="11" viewBox="0 0 12 12" aria-hidden="true">
        <circle cx="6" cy="6" r="4.8" fill="none" stroke="var(--color-near-miss)" strokeWidth="1.5" />
        <path d="M6 3.2V6l2 1.4" fill="none" stroke="var(--color-near-miss)" strokeWidth="1.5" strokeLinecap="round" />
      </svg>
      late{days ? `, ${days} day${days === 1 ? '' : 's'}` : ''}
    </span>
  );
}

/** "flagged" (or a count): a word with the flag shape. */
export function FlagTag({ count, word = 'flagged' }: { count?: number; word?: string }) {
  return (
    <span className="inline-flex items-center gap-1 rounded border border-flagged/40 px-1.5 py-px text-xs font-medium whitespace-nowrap text-ink">
      <svg width="11" height="11" viewBox="0 0 12 12" aria-hidden="true">
        <path d="M2.5 11V1.5h7L8 4l1.5 2.5h-5.5V11Z" fill="var(--color-flagged)" />
      </svg>
      {count !== undefined && count > 1 ? `${count} flags` : word}
    </span>
  );
}

/** Provisional until staff release: said in words next to every score. */
export function ProvisionalNote({ released }: { released: boolean }) {
  return released ? (
    <span className="text-xs text-muted">released by staff</span>
  ) : (
    <span className="text-xs text-muted">provisional until staff release it</span>
  );
}

const valueMarks: Record<ValueStatus['status'], MatchMark> = {
  matched: 'matched',
  'near-miss': 'near-miss',
  unmatched: 'unmatched',
  'not-graded': 'not-graded',
};

/** Policy 'status': the student's own values by status, picture and table. Never a reference value. */
export function ValueStatusView({ values, who = 'your' }: { values: ValueStatus[]; who?: string }) {
  const points: MatchPoint[] = values.map((v, i) => ({ re: v.submitted.re, im: v.submitted.im, mark: valueMarks[v.status], label: `${who} value ${i + 1}` }));
  const counts = (['matched', 'near-miss', 'unmatched', 'not-graded'] as const).map((s) => [s, values.filter((v) => v.status === s).length] as const).filter(([, n]) => n > 0);
  return (
    <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-[minmax(0,22rem)_minmax(0,1fr)]">
      <figure className="min-w-0">
        <MatchPlanePlot points={points} label={`Your ${values.length} values on the complex plane with the unit circle, each marked by how it matched`} />
        <figcaption className="mt-1 text-xs text-muted">
          {counts.map(([s, n]) => `${n} ${valueWord(s)}`).join(', ')}. Reference values stay hidden until staff release the scores.
        </figcaption>
      </figure>
      <div className="min-w-0 self-start">
      <Table caption="Your values and how each matched" captionHidden>
        <thead>
          <tr>
            <Th numeric>#</Th>
            <Th>Your value</Th>
            <Th>Status</Th>
          </tr>
        </thead>
        <tbody>
          {values.map((v, i) => (
            <tr key={i}>
              <Td numeric>{i + 1}</Td>
              <Td className="tabular font-mono text-[0.8125rem] whitespace-nowrap">{formatComplex(v.submitted.re, v.submitted.im)}</Td>
              <Td className="text-xs">
                <MarkWord mark={valueMarks[v.status]} />
              </Td>
            </tr>
          ))}
        </tbody>
      </Table>
      </div>
    </div>
  );
}

function valueWord(s: ValueStatus['status']): string {
  return { matched: 'matched', 'near-miss': 'near misses', unmatched: 'unmatched', 'not-graded': 'not graded' }[s];
}

const matchMarks = { full: 'matched', 'near-miss': 'near-miss', 'no-credit': 'unmatched', excluded: 'not-graded' } as const;
const matchWords = { full: 'matched', 'near-miss': 'near miss', 'no-credit': 'too far: no credit', excluded: 'not graded' } as const;
const sourceWords: Record<ToleranceSource, string> = { absolute: 'absolute', relative: 'relative', sensitivity: 'sensitivity', conditioning: 'conditioning', spread: 'spread' };

/** The eigenvalue part of a report as points: submitted values by status, reference values as squares joined to their match. */
export function reportPoints(part: PartReport, whose: { submitted: string; reference: string }): MatchPoint[] {
  const pts: MatchPoint[] = [];
  for (const m of part.matches) {
    pts.push({ re: m.reference.re, im: m.reference.im, mark: 'reference', label: `${whose.reference} ${m.referenceIndex + 1}` });
    pts.push({ re: m.submitted.re, im: m.submitted.im, mark: matchMarks[m.status], label: `${whose.submitted} ${m.submittedIndex + 1}`, pairedWith: pts.length - 1 });
  }
  for (const miss of part.missing) pts.push({ re: miss.reference.re, im: miss.reference.im, mark: 'reference-missed', label: `${whose.reference} ${miss.referenceIndex + 1} (not matched)` });
  for (const e of part.extra) pts.push({ re: e.submitted.re, im: e.submitted.im, mark: 'unmatched', label: `${whose.submitted} ${e.submittedIndex + 1} (extra)` });
  return pts;
}

/**
 * How a score was computed: per-part points, and for the eigenvalues each value's
 * reference, distance, tolerance (and which term set it), cost and credit.
 * `audience` words the labels for the student ("your") or staff ("submitted").
 */
export function ReportView({ report, audience, heading }: { report: ScoreReport; audience: 'student' | 'staff'; heading?: ReactNode }) {
  const eig = report.parts.find((p) => p.kind === 'eigenvalues');
  const whose = audience === 'student' ? { submitted: 'your value', reference: 'your reference value' } : { submitted: 'submitted value', reference: 'reference value' };
  const s = report.computedFrom.settings;
  return (
    <div className="flex flex-col gap-4">
      {heading}
      <Table caption="Points per part">
        <thead>
          <tr>
            <Th>Part</Th>
            <Th numeric>Points</Th>
            <Th>How</Th>
          </tr>
        </thead>
        <tbody>
          {report.parts.map((p) => (
            <tr key={p.name}>
              <Td className="font-medium">{p.name}</Td>
              <Td numeric className="whitespace-nowrap">
                {formatPoints(p.points)} of {formatPoints(p.maxPoints)}
              </Td>
              <Td className="text-xs text-muted">{partSummary(p)}</Td>
            </tr>
          ))}
          <tr>
            <Td className="font-semibold">Total</Td>
            <Td numeric className="font-semibold whitespace-nowrap">
              {formatPoints(report.points)} of {formatPoints(report.maxPoints)}
            </Td>
            <Td className="text-xs text-muted">before any late penalty</Td>
          </tr>
        </tbody>
      </Table>
      {eig && (eig.matches.length > 0 || eig.missing.length > 0 || eig.extra.length > 0) && (
        <div className="grid grid-cols-[minmax(0,1fr)] gap-4 xl:grid-cols-[minmax(0,22rem)_minmax(0,1fr)]">
          <figure className="min-w-0">
            <MatchPlanePlot
              points={reportPoints(eig, whose)}
              label={`${audience === 'student' ? 'Your values and your reference values' : 'Submitted and reference values'} on the complex plane with the unit circle`}
              legendLabels={audience === 'student' ? { reference: 'your reference value', 'reference-missed': 'reference value you did not match' } : undefined}
            />
            <figcaption className="mt-1 text-xs text-muted">A thin line joins each value to the reference value it was paired with.</figcaption>
          </figure>
          <div className="min-w-0 self-start">
          <Table caption={`How each eigenvalue earned its credit (${eig.domain ?? s.domain} domain)`}>
            <thead>
              <tr>
                <Th>{audience === 'student' ? 'Yours' : 'Submitted'}</Th>
                <Th>Reference</Th>
                <Th numeric>Distance</Th>
                <Th numeric>Tolerance</Th>
                <Th numeric>Points</Th>
                <Th>Status</Th>
              </tr>
            </thead>
            <tbody>
              {eig.matches.map((m) => (
                <tr key={`m${m.submittedIndex}-${m.referenceIndex}`}>
                  <Td className="tabular font-mono text-xs whitespace-nowrap">{formatComplex(m.submitted.re, m.submitted.im)}</Td>
                  <Td className="tabular font-mono text-xs whitespace-nowrap">{formatComplex(m.reference.re, m.reference.im)}</Td>
                  <Td numeric className="font-mono text-xs">
                    {formatSci(m.distance)}
                    <span className="block font-sans whitespace-nowrap text-muted">{formatReal(m.cost, 2)} × tol.</span>
                  </Td>
                  <Td numeric className="font-mono text-xs" title={`set by the ${sourceWords[m.toleranceSource]} term`}>
                    {formatSci(m.tolerance)}
                    <span className="block font-sans whitespace-nowrap text-muted">{sourceWords[m.toleranceSource]}</span>
                  </Td>
                  <Td numeric className="text-xs">
                    {formatPoints(m.points)}
                    {m.coversConjugate !== undefined && <span className="block text-muted">with its conjugate</span>}
                  </Td>
                  <Td className="text-xs">
                    <MarkWord mark={matchMarks[m.status]} word={m.unstable ? `${matchWords[m.status]} (unstable reference)` : matchWords[m.status]} />
                  </Td>
                </tr>
              ))}
              {eig.missing.map((m) => (
                <tr key={`r${m.referenceIndex}`}>
                  <Td className="text-xs text-muted">none</Td>
                  <Td className="tabular font-mono text-xs whitespace-nowrap">{formatComplex(m.reference.re, m.reference.im)}</Td>
                  <Td numeric className="font-mono text-xs">
                    {m.nearestDistance !== undefined ? formatSci(m.nearestDistance) : '—'}
                  </Td>
                  <Td numeric className="font-mono text-xs">
                    {formatSci(m.tolerance)}
                  </Td>
                  <Td numeric className="text-xs">
                    0
                  </Td>
                  <Td className="text-xs">
                    <MarkWord mark="reference-missed" word="missing" />
                  </Td>
                </tr>
              ))}
              {eig.extra.map((e) => (
                <tr key={`e${e.submittedIndex}`}>
                  <Td className="tabular font-mono text-xs whitespace-nowrap">{formatComplex(e.submitted.re, e.submitted.im)}</Td>
                  <Td className="text-xs text-muted">none</Td>
                  <Td numeric>—</Td>
                  <Td numeric>—</Td>
                  <Td numeric className="text-xs">
                    0
                  </Td>
                  <Td className="text-xs">
                    <MarkWord mark="unmatched" word="extra value" />
                  </Td>
                </tr>
              ))}
            </tbody>
          </Table>
          </div>
        </div>
      )}
      <p className="text-xs text-muted">
        Full credit within 1 × tolerance, falling to none at {formatReal(s.zeroCreditMultiple, 1)} ×; values farther than {formatReal(s.cutoffMultiple, 1)} × are left
        unmatched. Tolerance is the largest of {formatSci(s.absTol)} (absolute), {formatSci(s.relTol)} × |λ| (relative) and the value&apos;s conditioning. Scorer{' '}
        {report.computedFrom.scorerVersion}, reference by {report.computedFrom.referenceMethod} at rank {report.computedFrom.referenceRank}.
      </p>
      {report.warnings.length > 0 && (
        <ul className="list-disc pl-5 text-xs text-muted">
          {report.warnings.map((w, i) => (
            <li key={i}>
              {w.file}
              {w.line ? `, line ${w.line}` : ''}
              {w.column ? `, column ${w.column}` : ''}: {w.message}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

function partSummary(p: PartReport): string {
  if (!p.submitted) return 'not handed in';
  const bits: string[] = [];
  if (p.kind === 'eigenvalues') {
    const full = p.matches.filter((m) => m.status === 'full').length;
    const near = p.matches.filter((m) => m.status === 'near-miss').length;
    bits.push(`${full} matched`);
    if (near) bits.push(`${near} near miss${near === 1 ? '' : 'es'}`);
    if (p.missing.length) bits.push(`${p.missing.length} missing`);
    if (p.extra.length) bits.push(`${p.extra.length} extra`);
    if (p.penalty > 0) bits.push(`${formatPoints(p.penalty)} off for extra values`);
  } else if (p.kind === 'prediction') {
    bits.push(`relative error ${formatSci(p.relativeError ?? null)}`);
  } else if (p.vectors.length) {
    const sims = p.vectors.map((v) => v.similarity).filter((v): v is number => v !== null);
    bits.push(`${p.vectors.length} vectors compared${sims.length ? `, similarity ${formatReal(Math.min(...sims), 3)} at worst` : ''}`);
  }
  return [...bits, ...p.notes].join('; ');
}
