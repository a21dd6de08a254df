import { matchWithCutoff } from './assignment';
import type { ComplexNumber, Submission } from '../formats/submission-types';
import type { ReferenceSpectrum } from '../../shared/reference';
import {
  SCORER_VERSION,
  gradingSettings,
  scoreReport,
  type EigenvalueMatch,
  type GradingPart,
  type GradingSettings,
  type GradingSettingsInput,
  type PartReport,
  type ReaderWarning,
  type ReferenceExtras,
  type ScoreFlag,
  type ScoreReport,
} from '../../shared/score-report';

/**
 * The scorer: grades a read submission against a reference spectrum under an
 * assignment's settings and explains every point in the report.
 */

export interface GradeInput {
  reference: ReferenceSpectrum;
  /** Reference vectors for mode, eigenfunction and prediction parts. */
  extras?: ReferenceExtras;
  submission: Submission;
  settings?: GradingSettingsInput;
}

type Domain = 'discrete' | 'continuous';

const abs = (z: ComplexNumber) => Math.hypot(z.re, z.im);
const dist = (a: ComplexNumber, b: ComplexNumber) => Math.hypot(a.re - b.re, a.im - b.im);
const conj = (z: ComplexNumber): ComplexNumber => ({ re: z.re, im: -z.im });
const cexp = (z: ComplexNumber): ComplexNumber => {
  const m = Math.exp(z.re);
  return { re: m * Math.cos(z.im), im: m * Math.sin(z.im) };
};
const clog = (z: ComplexNumber): ComplexNumber => ({ re: Math.log(abs(z)), im: Math.atan2(z.im, z.re) });
const finite = (z: ComplexNumber) => Number.isFinite(z.re) && Number.isFinite(z.im);
const fmt = (z: ComplexNumber) => {
  const p = (x: number) => Number(x.toPrecision(6)).toString();
  return z.im === 0 ? p(z.re) : `${p(z.re)} ${z.im < 0 ? '−' : '+'} ${p(Math.abs(z.im))}i`;
};
/**
 * A value beside its partner in a sentence about a tolerance: enough significant digits that a difference of
 * one tolerance shows (two past the tolerance's place), at least 4, at most 15 (6 for every value hid the
 * difference of a near miss under a tolerance below 1e-6 of |λ|).
 */
const fmtTo = (z: ComplexNumber, tolerance: number) => {
  const size = Math.max(Math.abs(z.re), Math.abs(z.im));
  const digits = size > 0 && tolerance > 0 && Number.isFinite(tolerance) ? Math.min(15, Math.max(4, Math.ceil(Math.log10(size / tolerance)) + 2)) : 6;
  const p = (x: number) => Number(x.toPrecision(digits)).toString();
  return z.im === 0 ? p(z.re) : `${p(z.re)} ${z.im < 0 ? '−' : '+'} ${p(Math.abs(z.im))}i`;
};
const round = (x: number) => Math.round(x * 1e9) / 1e9;

interface RefValue {
  index: number;
  /** In the grading domain. */
  value: ComplexNumber;
  discrete: ComplexNumber;
  tolerance: number;
  source: EigenvalueMatch['toleranceSource'];
  unstable: boolean;
  excludedReason: string | null;
  /** Why the value is left out, as a code (null when graded). */
  excludedCode: ExcludedCode | null;
  /** Tolerance used to pair a left-out value with a submitted value that matched nothing graded. */
  matchTolerance: number;
  partner: number | null;
  /** Measured sensitivity in the grading domain, if the reference has it. */
  sensitivity?: number;
  /** Band spread over the ranks from which the value is resolved (the one that classifies it). */
  spread: number;
  resolvedFromRank?: number;
}

type ExcludedCode = 'undetermined-dictionary' | 'undetermined-sensitivity' | 'unstable' | 'no-continuous' | 'not-finite';

const sig = (x: number) => Number(x.toPrecision(3)).toString();

/**
 * Band classification with the assignment's limit: the value is resolved from the lowest rank q such that at
 * every band rank from q up to r its counterpart is within the limit (a complex value may skip the odd rank
 * where its pair was split); its spread is taken over the ranks from q on. A value whose counterparts below r
 * are far or absent is "resolved from rank r", not unstable (numerics.md, "Conditioning").
 */
export function bandClassification(e: ReferenceSpectrum['eigenvalues'][number], rank: number, limit: number): { spread: number; resolvedFromRank?: number } {
  if (!e.bandDistances) return { spread: e.spread ?? 0, ...(e.resolvedFromRank !== undefined ? { resolvedFromRank: e.resolvedFromRank } : {}) };
  const within = (d: number | null | undefined) => d !== null && d !== undefined && d <= limit;
  const at = new Map(e.bandDistances.map((d) => [d.rank, d.distance]));
  const below = e.bandDistances
    .map((d) => d.rank)
    .filter((q) => q < rank)
    .sort((x, y) => x - y);
  const complex = e.im !== 0;
  let from = rank;
  for (let t = below.length - 1; t >= 0; t--) {
    const q = below[t];
    if (within(at.get(q))) from = q;
    else if (t > 0 && complex && at.get(q) === null && within(at.get(below[t - 1]))) continue;
    else break;
  }
  let spread = 0;
  for (const d of e.bandDistances) if (d.rank >= from && d.distance !== null) spread = Math.max(spread, d.distance);
  return { spread, ...(below.length > 0 && from > below[0] ? { resolvedFromRank: from } : {}) };
}

/**
 * Tolerances and grading status of every reference eigenvalue in the grading domain (numerics.md, "Grading a
 * list of eigenvalues"): a determined, stable value has tolerance max(abs, rel·|λ|, safety × measured
 * sensitivity); a value the data do not determine (rank-deficient dictionary, or a sensitivity that reaches
 * the stated tolerance max(abs, rel·|λ|)) is left out; the rank band only classifies (unstable values are left
 * out or graded with their spread, as the settings say). κ is not part of the tolerance when the reference has
 * measured sensitivities; older references without them fall back to κ × perturbationScale.
 */
export function referenceTolerances(reference: ReferenceSpectrum, settings: GradingSettings, domain: Domain, dt: number | null): RefValue[] {
  const out: RefValue[] = [];
  const ev = reference.eigenvalues;
  ev.forEach((e, index) => {
    const discrete = { re: e.re, im: e.im };
    const band = bandClassification(e, reference.rank, settings.unstableSpreadLimit);
    const spread = band.spread;
    const unstable = spread > settings.unstableSpreadLimit;
    let value = discrete;
    // Sensitivities and spreads are perturbations of λ; in the continuous domain |dω| = |dλ| / (|λ| dt).
    let toDomain = 1;
    const base = { index, discrete, partner: null, spread, ...(band.resolvedFromRank !== undefined ? { resolvedFromRank: band.resolvedFromRank } : {}) };
    if (domain === 'continuous') {
      // The engine's log(λ)/dt is used when it was computed with the same dt.
      const c = reference.dt === dt ? reference.continuous?.[index] : undefined;
      const mag = abs(discrete);
      if (dt === null || mag === 0 || (c && (c.re === null || c.im === null))) {
        out.push({ ...base, value: discrete, tolerance: 1, matchTolerance: 1, source: 'absolute', unstable, excludedReason: dt === null ? 'no dt to convert to continuous time' : 'λ = 0 has no continuous-time counterpart', excludedCode: 'no-continuous' });
        return;
      }
      value = c && c.re !== null && c.im !== null ? { re: c.re, im: c.im } : (() => {
        const l = clog(discrete);
        return { re: l.re / dt, im: l.im / dt };
      })();
      toDomain = 1 / (mag * dt);
    }
    const stated = Math.max(settings.absTol, settings.relTol * abs(value));
    const sensitivity = e.sensitivity !== undefined ? e.sensitivity * toDomain : undefined;
    const terms: [EigenvalueMatch['toleranceSource'], number][] = [
      ['absolute', settings.absTol],
      ['relative', settings.relTol * abs(value)],
      sensitivity !== undefined ? ['sensitivity', settings.sensitivitySafety * sensitivity] : ['conditioning', e.condition * settings.perturbationScale * toDomain],
    ];
    if (unstable && settings.unstablePolicy === 'spread-as-tolerance') terms.push(['spread', spread * toDomain]);
    let [source, tolerance] = terms[0];
    for (const [s, t] of terms) if (Number.isFinite(t) && t > tolerance) [source, tolerance] = [s, t];
    if (!(tolerance > 0)) {
      tolerance = Number.MIN_VALUE * 1e10;
      source = 'absolute';
    }
    let excludedReason: string | null = null;
    let excludedCode: ExcludedCode | null = null;
    if (e.determined === false || e.undetermined) {
      excludedCode = 'undetermined-dictionary';
      excludedReason = `not determined by the data: ${e.undetermined?.message ?? 'the reference marks it undetermined'}`;
    } else if (sensitivity !== undefined && sensitivity >= stated) {
      excludedCode = 'undetermined-sensitivity';
      excludedReason = `not determined by the data: it moves by ${sig(sensitivity)} when the data are perturbed at float32 rounding, at or above the stated tolerance ${sig(stated)}`;
    } else if (unstable && settings.unstablePolicy === 'exclude') {
      excludedCode = 'unstable';
      excludedReason = `unstable across the rank band (spread ${sig(spread)} over the limit ${settings.unstableSpreadLimit})`;
    } else if (!finite(value)) {
      excludedCode = 'not-finite';
      excludedReason = 'not a finite value in this domain';
    }
    const matchTolerance = Math.max(tolerance, settings.sensitivitySafety * (sensitivity ?? 0), spread * toDomain);
    out.push({ ...base, value, tolerance, source, unstable, excludedReason, excludedCode, matchTolerance, ...(sensitivity !== undefined ? { sensitivity } : {}) });
  });
  // Conjugate partners (the reference keeps pairs exactly conjugate; allow round-off).
  const taken = new Set<number>();
  for (const r of out) {
    if (taken.has(r.index) || Math.abs(r.discrete.im) <= 1e-12 * Math.max(1, abs(r.discrete))) continue;
    let best: RefValue | null = null;
    for (const q of out) {
      if (q.index === r.index || taken.has(q.index)) continue;
      const d = dist(q.discrete, conj(r.discrete));
      if (d <= 1e-8 * Math.max(1, abs(r.discrete)) && (!best || d < dist(best.discrete, conj(r.discrete)))) best = q;
    }
    if (best) {
      r.partner = best.index;
      best.partner = r.index;
      taken.add(r.index);
      taken.add(best.index);
    }
  }
  return out;
}

/** Credit for a cost (distance / tolerance), on the same 1e-9 grid as the points, so that "full" and the points agree. */
function creditFor(cost: number, zeroAt: number): number {
  if (cost <= 1) return 1;
  if (cost >= zeroAt) return 0;
  const c = Math.round(((zeroAt - cost) / (zeroAt - 1)) * 1e9) / 1e9;
  return Math.min(1, Math.max(0, c));
}

/**
 * A real value never stands for a non-real reference value whose imaginary part is beyond its tolerance: it
 * would otherwise earn partial credit as a near miss for a value of another kind (common practice, no source).
 */
function typeMismatch(s: ComplexNumber, r: RefValue): boolean {
  return s.im === 0 && Math.abs(r.value.im) > r.tolerance;
}

interface EigenGrade {
  report: PartReport;
  /** submitted index → reference index (matched pairs, within the cut-off). */
  pairs: Map<number, number>;
  /** reference index → [submitted index, conjugated?] for vectors. */
  vectorSource: Map<number, { submitted: number; conjugate: boolean }>;
  creditedCount: number;
  gradedCount: number;
}

function gradeEigenvalues(part: GradingPart, submitted: ComplexNumber[], refs: RefValue[], settings: GradingSettings, domain: Domain): EigenGrade {
  // Stage 1: graded values only, so that a left-out value can never take a submitted value from a graded one.
  const graded = refs.filter((r) => !r.excludedReason);
  const cost = submitted.map((s) => graded.map((r) => dist(s, r.value) / r.tolerance));
  const safe = cost.map((row) => row.map((c) => (Number.isFinite(c) ? c : Number.MAX_VALUE)));
  const stage1 = matchWithCutoff(safe, settings.cutoffMultiple).pairs;
  // Stage 2: what is left over is paired with the left-out values (within their wider match tolerance; values
  // beyond the dictionary's rank take any value), so it is reported beside them and not as extra.
  const used = new Set(stage1.map(([i]) => i));
  const rest = submitted.map((_, i) => i).filter((i) => !used.has(i));
  const leftOut = refs.filter((r) => r.excludedReason && r.excludedCode !== 'no-continuous' && finite(r.value));
  const cost2 = rest.map((i) =>
    leftOut.map((r) => {
      const d = dist(submitted[i], r.value);
      const c = r.excludedCode === 'undetermined-dictionary' ? Math.min(d / r.matchTolerance, settings.cutoffMultiple) * 1e-6 : d / r.matchTolerance;
      return Number.isFinite(c) ? c : Number.MAX_VALUE;
    }),
  );
  const stage2 = matchWithCutoff(cost2, settings.cutoffMultiple).pairs.map(([a, b]): [number, number, RefValue] => [rest[a], b, leftOut[b]]);
  const pairs: [number, RefValue, number][] = [
    ...stage1.map(([i, jj]): [number, RefValue, number] => [i, graded[jj], safe[i][jj]]),
    ...stage2.map(([i, , r]): [number, RefValue, number] => [i, r, dist(submitted[i], r.value) / r.matchTolerance]),
  ];
  const share = graded.length > 0 ? part.weight / graded.length : 0;

  const byRef = new Map<number, { sub: number; cost: number }>();
  for (const [i, r, c] of pairs) if (!r.excludedReason) byRef.set(r.index, { sub: i, cost: c });
  const mismatch = new Set<number>();
  for (const r of graded) {
    const m = byRef.get(r.index);
    if (m && typeMismatch(submitted[m.sub], r)) mismatch.add(r.index);
  }
  const credit = new Map<number, number>();
  for (const r of graded) {
    const m = byRef.get(r.index);
    credit.set(r.index, m && !mismatch.has(r.index) ? creditFor(m.cost, settings.zeroCreditMultiple) : 0);
  }
  // One value of a conjugate pair may stand for both.
  const covers = new Map<number, number>(); // matched ref → partner it covers
  if (settings.conjugatePolicy === 'one-for-both') {
    for (const r of graded) {
      if (r.partner === null || !credit.has(r.partner)) continue;
      const a = credit.get(r.index) ?? 0;
      const b = credit.get(r.partner) ?? 0;
      if (b > a) {
        credit.set(r.index, b);
        if (!byRef.has(r.index)) covers.set(r.partner, r.index);
      }
    }
  }
  const vectorSource = new Map<number, { submitted: number; conjugate: boolean }>();
  for (const [j, m] of byRef) vectorSource.set(j, { submitted: m.sub, conjugate: false });
  for (const [matched, partner] of covers) {
    const m = byRef.get(matched);
    if (m && !vectorSource.has(partner)) vectorSource.set(partner, { submitted: m.sub, conjugate: true });
  }

  const matches: EigenvalueMatch[] = [];
  for (const [i, r, c] of pairs) {
    const excluded = r.excludedReason !== null;
    const cr = excluded ? 0 : (credit.get(r.index) ?? 0);
    const coversIndex = covers.get(r.index);
    const points = excluded ? 0 : share * cr + (coversIndex !== undefined ? share * (credit.get(coversIndex) ?? 0) : 0);
    matches.push({
      submittedIndex: i,
      referenceIndex: r.index,
      submitted: submitted[i],
      reference: r.value,
      distance: dist(submitted[i], r.value),
      tolerance: excluded ? r.matchTolerance : r.tolerance,
      toleranceSource: r.source,
      cost: Math.min(c, Number.MAX_VALUE),
      credit: cr,
      points: round(points),
      // status follows the credit actually given: full credit never carries a near miss
      status: excluded ? 'excluded' : cr >= 1 ? 'full' : cr > 0 ? 'near-miss' : 'no-credit',
      unstable: r.unstable,
      ...(coversIndex !== undefined ? { coversConjugate: coversIndex } : {}),
      ...(mismatch.has(r.index) ? { note: 'a real value cannot stand for a non-real reference value whose imaginary part is beyond the tolerance' } : {}),
      ...(r.sensitivity !== undefined ? { sensitivity: r.sensitivity } : {}),
      ...(r.resolvedFromRank !== undefined ? { resolvedFromRank: r.resolvedFromRank } : {}),
    });
  }
  matches.sort((a, b) => a.referenceIndex - b.referenceIndex);
  const matchedSubs = new Set(pairs.map(([i]) => i));
  const coveredRefs = new Set(covers.values());
  const missing = graded
    .filter((r) => !byRef.has(r.index) && !coveredRefs.has(r.index) && !(settings.conjugatePolicy === 'one-for-both' && (credit.get(r.index) ?? 0) > 0))
    .map((r) => {
      const nearest = submitted.length > 0 ? Math.min(...submitted.map((s) => dist(s, r.value))) : undefined;
      return {
        referenceIndex: r.index,
        reference: r.value,
        tolerance: r.tolerance,
        ...(nearest !== undefined && Number.isFinite(nearest) ? { nearestDistance: nearest } : {}),
      };
    });
  const extra = submitted.map((s, i) => ({ submittedIndex: i, submitted: s })).filter((e) => !matchedSubs.has(e.submittedIndex));
  const earned = graded.reduce((s, r) => s + share * (credit.get(r.index) ?? 0), 0);
  const penalty = Math.min(earned, settings.extraPenalty * share * extra.length);
  const excluded = refs.filter((r) => r.excludedReason).map((r) => ({ referenceIndex: r.index, reference: finite(r.value) ? r.value : r.discrete, reason: r.excludedReason as string, ...(r.excludedCode ? { code: r.excludedCode } : {}) }));
  const notes: string[] = [];
  notes.push(`${graded.length} reference eigenvalue${graded.length === 1 ? '' : 's'} graded in the ${domain}-time domain, ${round(share)} points each; credit is full within tolerance and falls linearly to zero at ${settings.zeroCreditMultiple}× it; pairs beyond ${settings.cutoffMultiple}× are not matched.`);
  if (settings.conjugatePolicy === 'one-for-both') notes.push('One value of a conjugate pair stands for both.');
  if (penalty > 0) notes.push(`${extra.length} extra value${extra.length === 1 ? '' : 's'} cost ${round(penalty)} points.`);

  return {
    report: {
      name: part.name,
      kind: 'eigenvalues',
      points: round(Math.max(0, earned - penalty)),
      maxPoints: part.weight,
      submitted: true,
      domain,
      matches,
      missing,
      extra,
      excluded,
      penalty: round(penalty),
      vectors: [],
      notes,
    },
    pairs: new Map(pairs.map(([i, r]) => [i, r.index])),
    vectorSource,
    creditedCount: graded.filter((r) => (credit.get(r.index) ?? 0) >= 1).length,
    gradedCount: graded.length,
  };
}

function similarity(a: ComplexNumber[], b: ComplexNumber[]): number {
  let re = 0;
  let im = 0;
  let na = 0;
  let nb = 0;
  // Scale first so that huge or tiny vectors do not overflow.
  const sa = Math.max(...a.map(abs)) || 1;
  const sb = Math.max(...b.map(abs)) || 1;
  for (let k = 0; k < a.length; k++) {
    const x = { re: a[k].re / sa, im: a[k].im / sa };
    const y = { re: b[k].re / sb, im: b[k].im / sb };
    re += x.re * y.re + x.im * y.im;
    im += x.re * y.im - x.im * y.re;
    na += x.re * x.re + x.im * x.im;
    nb += y.re * y.re + y.im * y.im;
  }
  if (na === 0 || nb === 0) return 0;
  return Math.min(1, Math.hypot(re, im) / Math.sqrt(na * nb));
}

function linear(x: number, full: number, zero: number): number {
  if (full === zero) return x >= full ? 1 : 0;
  const t = (x - zero) / (full - zero);
  return Math.max(0, Math.min(1, t));
}

function gradeVectors(part: GradingPart, vectors: ComplexNumber[][] | null, refVectors: (ComplexNumber[] | null)[] | undefined, eig: EigenGrade | null): PartReport {
  const base: PartReport = { name: part.name, kind: part.kind, points: 0, maxPoints: part.weight, submitted: vectors !== null, matches: [], missing: [], extra: [], excluded: [], penalty: 0, vectors: [], notes: [] };
  const indices = part.referenceIndices ?? (refVectors ?? []).map((v, j) => (v ? j : -1)).filter((j) => j >= 0);
  if (indices.length === 0) {
    base.notes.push('The reference carries no vectors for this part, so nothing was graded.');
    return base;
  }
  const full = part.fullCreditAt ?? 0.99;
  const zero = part.zeroCreditAt ?? 0.9;
  const share = part.weight / indices.length;
  let points = 0;
  for (const j of indices) {
    const ref = refVectors?.[j] ?? null;
    const src = eig?.vectorSource.get(j);
    const entry = { referenceIndex: j, submittedIndex: src?.submitted ?? null, similarity: null as number | null, credit: 0, points: 0, note: undefined as string | undefined };
    if (!ref) entry.note = 'the reference has no vector for this eigenvalue';
    else if (!vectors) entry.note = 'part not submitted';
    else if (!src) entry.note = 'no submitted eigenvalue was matched to this reference eigenvalue, so no column can be paired with it';
    else if (src.submitted >= vectors.length) entry.note = `column ${src.submitted + 1} (for submitted eigenvalue ${src.submitted + 1}) is missing: the part has ${vectors.length} column${vectors.length === 1 ? '' : 's'}`;
    else {
      let v = vectors[src.submitted];
      if (src.conjugate) v = v.map(conj);
      if (v.length !== ref.length) entry.note = `expected ${ref.length} values in the column, found ${v.length}`;
      else {
        entry.similarity = similarity(v, ref);
        entry.credit = linear(entry.similarity, full, zero);
        entry.points = round(share * entry.credit);
        points += share * entry.credit;
        if (src.conjugate) entry.note = 'compared as the conjugate of the column of the conjugate eigenvalue';
      }
    }
    const { note, ...rest } = entry;
    base.vectors.push(note ? { ...rest, note } : rest);
  }
  base.points = round(points);
  base.notes.push(`Compared phase- and scale-free, |⟨a,b⟩|/(‖a‖‖b‖): full credit at ${full} or more, none at ${zero} or less; column i belongs to the i-th submitted eigenvalue.`);
  return base;
}

function gradePrediction(part: GradingPart, vectors: ComplexNumber[][] | null, ref: ComplexNumber[] | undefined): PartReport {
  const base: PartReport = { name: part.name, kind: 'prediction', points: 0, maxPoints: part.weight, submitted: vectors !== null, matches: [], missing: [], extra: [], excluded: [], penalty: 0, vectors: [], relativeError: null, notes: [] };
  const full = part.fullCreditAt ?? 0.01;
  const zero = part.zeroCreditAt ?? 0.1;
  if (!ref) base.notes.push('The reference carries no held-out snapshot, so nothing was graded.');
  else if (vectors) {
    const p = vectors[0];
    if (p.length !== ref.length) base.notes.push(`expected ${ref.length} values, found ${p.length}`);
    else {
      const scale = Math.max(...ref.map(abs), ...p.map(abs)) || 1;
      let num = 0;
      let den = 0;
      for (let k = 0; k < p.length; k++) {
        num += (dist(p[k], ref[k]) / scale) ** 2;
        den += (abs(ref[k]) / scale) ** 2;
      }
      const e = den > 0 ? Math.sqrt(num / den) : Math.sqrt(num) * scale;
      base.relativeError = Number.isFinite(e) ? e : null;
      const credit = base.relativeError === null ? 0 : linear(-base.relativeError, -full, -zero);
      base.points = round(part.weight * credit);
    }
    base.notes.push(`Relative error ‖p − x‖/‖x‖: full credit at ${full} or less, none at ${zero} or more.`);
  }
  return base;
}

/** Grade a submission. Never throws on any submission the readers accept. */
export function gradeSubmission(input: GradeInput): ScoreReport {
  const settings = gradingSettings.parse(input.settings ?? {});
  const { reference, submission } = input;
  const dt = settings.dt ?? reference.dt ?? null;
  const domain: Domain = settings.domain;
  const flags: ScoreFlag[] = [];
  const warnings: ReaderWarning[] = [...submission.warnings];
  const parts: PartReport[] = [];

  const eigPart = settings.parts.find((p) => p.kind === 'eigenvalues');
  let eig: EigenGrade | null = null;
  if (domain === 'continuous' && dt === null) {
    flags.push({ code: 'part-missing', message: 'The assignment grades continuous-time values but neither it nor the reference gives dt; eigenvalues were not graded.' });
  }
  if (eigPart) {
    const sub = submission.parts[eigPart.name];
    const refs = referenceTolerances(reference, settings, domain, dt);
    if (!sub) {
      flags.push({ code: 'part-missing', part: eigPart.name, message: `The part "${eigPart.name}" was not in the submission.` });
      parts.push({ name: eigPart.name, kind: 'eigenvalues', points: 0, maxPoints: eigPart.weight, submitted: false, domain, matches: [], missing: [], extra: [], excluded: [], penalty: 0, vectors: [], notes: [] });
    } else {
      const values = sub.vectors[0];
      eig = gradeEigenvalues(eigPart, values, refs, settings, domain);
      parts.push(eig.report);
      eigenvalueFlags(eig, refs, values, settings, domain, dt, eigPart, flags, warnings, sub.file);
    }
  }
  for (const part of settings.parts) {
    if (part.kind === 'eigenvalues') continue;
    const sub = submission.parts[part.name];
    if (!sub) flags.push({ code: 'part-missing', part: part.name, message: `The part "${part.name}" was not in the submission.` });
    if (part.kind === 'prediction') parts.push(gradePrediction(part, sub?.vectors ?? null, input.extras?.prediction));
    else parts.push(gradeVectors(part, sub?.vectors ?? null, part.kind === 'modes' ? input.extras?.modes : input.extras?.eigenfunctions, eig));
  }
  if (warnings.length > 0) {
    flags.push({ code: 'reader-warning', message: `The files were read with ${warnings.length} warning${warnings.length === 1 ? '' : 's'}; see the warnings list.` });
  }
  const report: ScoreReport = {
    status: 'provisional',
    points: round(parts.reduce((s, p) => s + p.points, 0)),
    maxPoints: round(parts.reduce((s, p) => s + p.maxPoints, 0)),
    parts,
    flags,
    warnings,
    computedFrom: {
      scorerVersion: SCORER_VERSION,
      engineVersion: reference.engineVersion ?? null,
      referenceHash: reference.hash ?? null,
      referenceMethod: reference.method,
      referenceRank: reference.rank,
      settings,
      dt,
    },
  };
  return scoreReport.parse(report);
}

function eigenvalueFlags(
  eig: EigenGrade,
  refs: RefValue[],
  values: ComplexNumber[],
  settings: GradingSettings,
  domain: Domain,
  dt: number | null,
  part: GradingPart,
  flags: ScoreFlag[],
  warnings: ReaderWarning[],
  file: string,
): void {
  const r = eig.report;
  const near = r.matches.filter((m) => m.status === 'near-miss');
  if (near.length > 0) {
    flags.push({
      code: 'near-miss',
      part: part.name,
      message: `${near.length} value${near.length === 1 ? ' is a near miss' : 's are near misses'} (${near.map((m) => `${fmtTo(m.submitted, m.tolerance)} for ${fmtTo(m.reference, m.tolerance)}, ${m.cost.toPrecision(3)}× tolerance`).slice(0, 3).join('; ')}): outside tolerance but within ${settings.zeroCreditMultiple}×, partial credit.`,
    });
  }
  const noCredit = r.matches.filter((m) => m.status === 'no-credit');
  if (r.missing.length > 0 || noCredit.length > 0) {
    const parts: string[] = [];
    if (r.missing.length > 0) parts.push(`${r.missing.length} reference eigenvalue${r.missing.length === 1 ? ' has' : 's have'} no matching submitted value (${r.missing.slice(0, 4).map((m) => fmt(m.reference)).join(', ')}${r.missing.length > 4 ? ', …' : ''})`);
    if (noCredit.length > 0) parts.push(`${noCredit.length} ${noCredit.length === 1 ? 'was' : 'were'} matched only beyond ${settings.zeroCreditMultiple}× tolerance and earned nothing (${noCredit.slice(0, 4).map((m) => `${fmtTo(m.reference, m.tolerance)}, ${m.cost.toPrecision(3)}×`).join('; ')})`);
    flags.push({ code: 'missing-values', part: part.name, message: `${parts.join('; ')}.` });
  }
  if (r.extra.length > 0) {
    flags.push({ code: 'extra-values', part: part.name, message: `${r.extra.length} submitted value${r.extra.length === 1 ? ' matches' : 's match'} no reference eigenvalue: ${r.extra.slice(0, 4).map((e) => fmt(e.submitted)).join(', ')}${r.extra.length > 4 ? ', …' : ''}${settings.extraPenalty > 0 ? ' (extras cost credit in this assignment)' : ' (extras cost no credit in this assignment)'}.` });
  }
  const unstable = refs.filter((x) => x.unstable);
  if (unstable.length > 0) {
    flags.push({
      code: 'unstable-reference',
      part: part.name,
      message: `${unstable.length} reference eigenvalue${unstable.length === 1 ? ' moves' : 's move'} more than ${settings.unstableSpreadLimit} across the rank band (${unstable.slice(0, 3).map((x) => fmt(x.discrete)).join(', ')}) and ${settings.unstablePolicy === 'exclude' ? 'were left out of grading' : 'were graded with their spread as tolerance'}.`,
    });
  }
  const undetermined = refs.filter((x) => x.excludedCode === 'undetermined-dictionary' || x.excludedCode === 'undetermined-sensitivity');
  if (undetermined.length > 0) {
    const dict = undetermined.filter((x) => x.excludedCode === 'undetermined-dictionary').length;
    const sens = undetermined.length - dict;
    const why: string[] = [];
    if (dict > 0) why.push(`${dict} lie beyond the numerical rank of the dictionary on the data`);
    if (sens > 0) why.push(`${sens} move${sens === 1 ? 's' : ''} by the stated tolerance or more when the data are perturbed at float32 rounding (${undetermined.filter((x) => x.excludedCode === 'undetermined-sensitivity').slice(0, 3).map((x) => fmt(x.discrete)).join(', ')})`);
    flags.push({
      code: 'undetermined-reference',
      part: part.name,
      message: `${undetermined.length} reference eigenvalue${undetermined.length === 1 ? ' is' : 's are'} not determined by the data and ${undetermined.length === 1 ? 'was' : 'were'} not graded: ${why.join('; ')}. Any submitted value there is accepted without credit or penalty.`,
    });
  }
  if (settings.conjugatePolicy === 'both-required') {
    const credited = new Set(r.matches.filter((m) => m.credit > 0).map((m) => m.referenceIndex));
    const lonely = refs.filter((x) => x.partner !== null && credited.has(x.index) && !credited.has(x.partner) && !refs[x.partner].excludedReason);
    if (lonely.length > 0) {
      flags.push({ code: 'conjugate-missing', part: part.name, message: `${lonely.length} conjugate pair${lonely.length === 1 ? ' is' : 's are'} incomplete: ${lonely.slice(0, 3).map((x) => fmt(x.value)).join(', ')} ${lonely.length === 1 ? 'was' : 'were'} found but not ${lonely.length === 1 ? 'its' : 'their'} conjugate; this assignment needs both values of a pair.` });
    }
  }
  // Real data: non-real eigenvalues come in conjugate pairs (common practice).
  const realData = refs.every((x) => Math.abs(x.discrete.im) <= 1e-12 * Math.max(1, abs(x.discrete)) || x.partner !== null);
  const nonReal = values.filter((v) => Math.abs(v.im) > 1e-9 * Math.max(1, abs(v))).length;
  if (realData && nonReal % 2 === 1 && settings.conjugatePolicy === 'both-required') {
    warnings.push({ part: part.name, file, message: `${nonReal} non-real values were submitted, an odd count; eigenvalues of real data come in conjugate pairs.` });
  }
  // Wrong domain: would the values fit far better read the other way?
  if (dt !== null && values.length > 0 && eig.gradedCount > 0) {
    const other: Domain = domain === 'discrete' ? 'continuous' : 'discrete';
    const converted = values.map((v) => {
      if (domain === 'discrete') return cexp({ re: v.re * dt, im: v.im * dt });
      if (abs(v) === 0) return { re: Number.NaN, im: Number.NaN };
      const l = clog(v);
      return { re: l.re / dt, im: l.im / dt };
    });
    const usable = converted.map((c) => (finite(c) ? c : { re: 1e300, im: 1e300 }));
    const alt = gradeEigenvalues(part, usable, refs, settings, domain);
    const asIs = eig.creditedCount;
    const asOther = alt.creditedCount;
    if (asOther >= Math.max(1, Math.ceil(0.5 * eig.gradedCount)) && asOther >= asIs + Math.max(1, Math.ceil(0.25 * eig.gradedCount))) {
      flags.push({
        code: 'wrong-domain',
        part: part.name,
        message: `These look like ${other}-time values${other === 'continuous' ? ' (ω = log(λ)/dt)' : ' (λ = exp(ω·dt))'}: read that way, ${asOther} of ${eig.gradedCount} reference eigenvalues are within tolerance, against ${asIs} as submitted. The assignment asks for ${domain}-time values, so the score uses them as submitted.`,
      });
    }
  }
}
