// Checks of the grading rules in /work/shared/design/numerics.md ("Grading a list of eigenvalues", "Conditioning").
// Source kind: Fact of the trade (common practice, no source); the reference values are invented fixtures (tests/fixtures/submissions/REF.json).
import { describe, expect, it } from 'vitest';
import { gradeSubmission } from '../../../grading/scoring/score';
import { readSubmission, type ComplexNumber, type Submission } from '../../../grading/formats/submission';
import type { ReferenceSpectrum } from '../../../shared/reference';
import type { GradingSettingsInput, ScoreReport } from '../../../shared/score-report';
import { expectValidReport, fixtureBytes, loadReference } from './helpers';

const ref = loadReference();
const lam = ref.eigenvalues.map((e) => ({ re: e.re, im: e.im }));
const SHARE = 10 / 6;

function sub(values: ComplexNumber[], extra: Partial<Submission['parts']> = {}): Submission {
  return { parts: { eigenvalues: { name: 'eigenvalues', kind: 'eigenvalues', file: 'ev.txt', vectors: [values] }, ...extra } as Submission['parts'], warnings: [] };
}
function grade(values: ComplexNumber[], settings: GradingSettingsInput = {}, reference: ReferenceSpectrum = ref, extras?: Parameters<typeof gradeSubmission>[0]['extras'], submission?: Submission): ScoreReport {
  return expectValidReport(gradeSubmission({ reference, submission: submission ?? sub(values), settings, extras }));
}
const codes = (r: ScoreReport) => r.flags.map((f) => f.code);
/** Default tolerance (Fact of the trade: common practice, no source — relTol × |λ| dominates here). */
const tolOf = (z: ComplexNumber) => Math.max(1e-6, 1e-3 * Math.hypot(z.re, z.im));
const shift = (z: ComplexNumber, d: number, angle = 0.7): ComplexNumber => ({ re: z.re + d * Math.cos(angle), im: z.im + d * Math.sin(angle) });

describe('eigenvalue credit', () => {
  it('an exact copy gets full credit and no flags', () => {
    const r = grade(lam);
    expect(r.points).toBe(10);
    expect(r.maxPoints).toBe(10);
    expect(r.flags).toEqual([]);
    expect(r.parts[0].matches.every((m) => m.status === 'full' && m.credit === 1)).toBe(true);
    expect(r.status).toBe('provisional');
    expect(r.computedFrom).toMatchObject({ engineVersion: '0.1.0', referenceHash: ref.hash, referenceMethod: 'dmd', referenceRank: 6, dt: 0.1 });
  });

  it('permuted copies from every tool fixture get full credit (matched by value, never by position)', () => {
    for (const name of ['numpy-savetxt-complex.txt', 'matlab-disp.txt', 'julia-println.txt', 'json-pairs.json', 'octave-disp.txt']) {
      const read = readSubmission([{ name, bytes: fixtureBytes(name) }]);
      expect(read.ok).toBe(true);
      if (!read.ok) continue;
      const r = expectValidReport(gradeSubmission({ reference: ref, submission: read.submission }));
      expect(r.points, name).toBe(10);
    }
  });

  it('the conjugated copy of a real-data spectrum gets full credit (Fact of the trade: real data gives conjugate pairs)', () => {
    const r = grade(lam.map((z) => ({ re: z.re, im: -z.im })).reverse());
    expect(r.points).toBe(10);
  });

  it('copies perturbed by up to 0.9 × tolerance in random directions get full credit', () => {
    let seed = 7;
    const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    for (let trial = 0; trial < 50; trial++) {
      const values = lam.map((z) => shift(z, 0.9 * rand() * tolOf(z), 2 * Math.PI * rand()));
      const r = grade([...values].sort(() => rand() - 0.5));
      expect(r.points).toBe(10);
    }
  });

  it('one value moved beyond the zero-credit multiple costs exactly its share', () => {
    const moved = lam.map((z, k) => (k === 5 ? shift(z, 4 * tolOf(z)) : z));
    const r = grade(moved);
    expect(r.points).toBeCloseTo(10 - SHARE, 9);
    const m = r.parts[0].matches.find((x) => x.referenceIndex === 5);
    expect(m).toMatchObject({ status: 'no-credit', credit: 0 });
    expect(m?.cost).toBeCloseTo(4, 6);
  });

  it('one value moved far away is missing and extra, and costs exactly its share', () => {
    const moved = lam.map((z, k) => (k === 2 ? { re: -0.7, im: 0 } : z));
    const r = grade(moved);
    expect(r.points).toBeCloseTo(10 - SHARE, 9);
    expect(r.parts[0].missing.map((m) => m.referenceIndex)).toEqual([2]);
    expect(r.parts[0].extra.map((e) => e.submittedIndex)).toEqual([2]);
    expect(codes(r)).toEqual(expect.arrayContaining(['missing-values', 'extra-values']));
  });

  it('a near miss earns linear partial credit and is flagged', () => {
    // 2 × tolerance with zero credit at 3 ×: half credit.
    const moved = lam.map((z, k) => (k === 2 ? shift(z, 2 * tolOf(z)) : z));
    const r = grade(moved);
    expect(r.points).toBeCloseTo(10 - 0.5 * SHARE, 9);
    expect(r.parts[0].matches.find((m) => m.referenceIndex === 2)).toMatchObject({ status: 'near-miss' });
    expect(codes(r)).toContain('near-miss');
    expect(r.flags.find((f) => f.code === 'near-miss')?.message).toMatch(/near miss/);
  });

  it('a near miss under a tight tolerance is printed with enough digits to see the difference', () => {
    // Common practice, no source: a sentence about a value outside tolerance must show that it differs.
    const tight = { relTol: 1e-9, absTol: 0 };
    const tol = grade(lam, tight).parts[0].matches.find((x) => x.referenceIndex === 2)!.tolerance;
    expect(tol / Math.hypot(lam[2].re, lam[2].im)).toBeLessThan(1e-6); // beyond what 6 digits can show
    const moved = lam.map((z, k) => (k === 2 ? shift(z, 2 * tol, 0) : z));
    const msg = grade(moved, tight).flags.find((f) => f.code === 'near-miss')?.message ?? '';
    const m = /\(([^,]+?) for ([^,]+?), 2\.00× tolerance\)/.exec(msg);
    expect(m, msg).not.toBeNull();
    expect(m![1]).not.toBe(m![2]);
    expect(Number(m![1]) - Number(m![2])).toBeCloseTo(2 * tol, 10);
  });

  it('respects the abs-tol and rel-tol settings', () => {
    const moved = lam.map((z) => shift(z, 0.004));
    expect(grade(moved).points).toBe(0);
    expect(grade(moved, { absTol: 0.005 }).points).toBe(10);
    expect(grade(moved, { relTol: 0.02 }).points).toBe(10);
    expect(grade(moved, { absTol: 0.005 }).parts[0].matches[0].toleranceSource).toBe('absolute');
  });

  it('widens the tolerance of an ill-conditioned eigenvalue by κ × perturbation scale', () => {
    const illRef: ReferenceSpectrum = { ...ref, eigenvalues: ref.eigenvalues.map((e, k) => (k === 5 ? { ...e, condition: 1e6 } : e)) };
    const moved = lam.map((z, k) => (k === 5 ? shift(z, 0.009) : z));
    const r = grade(moved, {}, illRef);
    expect(r.points).toBe(10);
    const m = r.parts[0].matches.find((x) => x.referenceIndex === 5);
    expect(m?.toleranceSource).toBe('conditioning');
    expect(m?.tolerance).toBeCloseTo(1e6 * 1e-8, 12);
  });
});

describe('conjugate pairs, extras and unstable reference values', () => {
  const upper = lam.filter((z) => z.im >= 0);

  it("'both-required': half of each pair is missing and flagged", () => {
    const r = grade(upper);
    expect(r.points).toBeCloseTo(10 - 2 * SHARE, 9);
    expect(codes(r)).toContain('conjugate-missing');
  });

  it("'one-for-both': one value of a pair stands for both", () => {
    const r = grade(upper, { conjugatePolicy: 'one-for-both' });
    expect(r.points).toBeCloseTo(10, 9);
    expect(r.parts[0].missing).toEqual([]);
    expect(r.parts[0].matches.filter((m) => m.coversConjugate !== undefined)).toHaveLength(2);
  });

  it('warns when real data gets an odd number of non-real values', () => {
    const r = grade(lam.filter((_, k) => k !== 1));
    expect(r.warnings.some((w) => /odd count/.test(w.message))).toBe(true);
    expect(codes(r)).toContain('reader-warning');
  });

  it('lists extras, which cost credit only when the assignment says so', () => {
    const values = [...lam, { re: -0.4, im: 0 }, { re: 0.1, im: 0.6 }];
    const free = grade(values);
    expect(free.points).toBe(10);
    expect(free.parts[0].extra).toHaveLength(2);
    expect(codes(free)).toContain('extra-values');
    const paid = grade(values, { extraPenalty: 0.5 });
    expect(paid.points).toBeCloseTo(10 - 2 * 0.5 * SHARE, 9);
    expect(paid.parts[0].penalty).toBeCloseTo(2 * 0.5 * SHARE, 9);
  });

  const unstableRef: ReferenceSpectrum = { ...ref, eigenvalues: ref.eigenvalues.map((e, k) => (k === 5 ? { ...e, spread: 0.1 } : e)) };
  it("unstable reference values are left out under 'exclude'", () => {
    const r = grade(lam.map((z, k) => (k === 5 ? shift(z, 0.05) : z)), { unstablePolicy: 'exclude' }, unstableRef);
    expect(r.points).toBeCloseTo(10, 9);
    expect(r.parts[0].excluded.map((e) => e.referenceIndex)).toEqual([5]);
    expect(r.parts[0].matches.find((m) => m.referenceIndex === 5)?.status).toBe('excluded');
    expect(r.parts[0].extra).toEqual([]);
    expect(codes(r)).toContain('unstable-reference');
  });
  it("unstable reference values get their spread as tolerance under 'spread-as-tolerance'", () => {
    const r = grade(lam.map((z, k) => (k === 5 ? shift(z, 0.05) : z)), { unstablePolicy: 'spread-as-tolerance' }, unstableRef);
    expect(r.points).toBe(10);
    const m = r.parts[0].matches.find((x) => x.referenceIndex === 5);
    expect(m).toMatchObject({ toleranceSource: 'spread', tolerance: 0.1, unstable: true });
    expect(codes(r)).toContain('unstable-reference');
  });
});

describe('discrete and continuous time', () => {
  const omega = (ref.continuous ?? []).map((c) => ({ re: c.re as number, im: c.im as number }));

  it('Fact of the trade: ω = log(λ)/dt (common practice, no source) — the fixture continuous values agree with the principal log', () => {
    lam.forEach((z, k) => {
      expect(omega[k].re).toBeCloseTo(Math.log(Math.hypot(z.re, z.im)) / 0.1, 12);
      expect(omega[k].im).toBeCloseTo(Math.atan2(z.im, z.re) / 0.1, 12);
    });
  });

  it('detects a continuous-time hand-in for a discrete assignment', () => {
    const r = grade(omega);
    expect(r.points).toBe(0);
    expect(codes(r)).toContain('wrong-domain');
    expect(r.flags.find((f) => f.code === 'wrong-domain')?.message).toMatch(/these look like continuous-time values/i);
  });

  it('grades a continuous assignment in ω, and detects a discrete hand-in for it', () => {
    const ok = grade(omega, { domain: 'continuous' });
    expect(ok.points).toBe(10);
    expect(ok.parts[0].domain).toBe('continuous');
    const wrong = grade(lam, { domain: 'continuous' });
    expect(wrong.points).toBe(0);
    expect(wrong.flags.find((f) => f.code === 'wrong-domain')?.message).toMatch(/discrete-time values/);
  });

  it('a correct discrete submission is not flagged as the wrong domain', () => {
    expect(codes(grade(lam))).not.toContain('wrong-domain');
  });
});

describe('modes, eigenfunctions and predictions', () => {
  const modes = lam.map((z, j) => [0, 1, 2, 3].map((p) => ({ re: Math.cos(p * (j + 1)) + z.re, im: Math.sin(p * (j + 1)) * (z.im === 0 ? 0 : 1) })));
  const mul = (v: ComplexNumber[], f: ComplexNumber) => v.map((a) => ({ re: a.re * f.re - a.im * f.im, im: a.re * f.im + a.im * f.re }));
  const settings: GradingSettingsInput = {
    parts: [
      { name: 'eigenvalues', kind: 'eigenvalues', weight: 6 },
      { name: 'modes', kind: 'modes', weight: 3 },
      { name: 'prediction', kind: 'prediction', weight: 1 },
    ],
  };
  const snapshot = [1, -2, 0.5].map((x) => ({ re: x, im: 0 }));

  it('compares modes phase- and scale-free after pairing them through the eigenvalues', () => {
    const order = [3, 0, 5, 1, 4, 2];
    const values = order.map((j) => lam[j]);
    const vectors = order.map((j, k) => mul(modes[j], { re: (k + 1) * Math.cos(k), im: (k + 1) * Math.sin(k) }));
    const s = sub(values, {
      modes: { name: 'modes', kind: 'modes', file: 'modes.csv', vectors },
      prediction: { name: 'prediction', kind: 'prediction', file: 'p.txt', vectors: [snapshot] },
    });
    const r = grade([], settings, ref, { modes, prediction: snapshot }, s);
    expect(r.points).toBeCloseTo(10, 9);
    const mp = r.parts.find((p) => p.name === 'modes');
    expect(mp?.vectors.every((v) => v.similarity !== null && Math.abs(v.similarity - 1) < 1e-12)).toBe(true);
    expect(mp?.vectors.find((v) => v.referenceIndex === 0)?.submittedIndex).toBe(1);
  });

  it('a mode in the wrong column gets no credit, and a prediction is graded by relative error', () => {
    const vectors = lam.map((_, j) => modes[(j + 1) % 6]);
    const off = snapshot.map((z) => ({ re: z.re * 1.05, im: 0 }));
    const s = sub(lam, {
      modes: { name: 'modes', kind: 'modes', file: 'modes.csv', vectors },
      prediction: { name: 'prediction', kind: 'prediction', file: 'p.txt', vectors: [off] },
    });
    const r = grade([], settings, ref, { modes, prediction: snapshot }, s);
    const mp = r.parts.find((p) => p.name === 'modes');
    expect(mp?.points).toBeLessThan(3);
    const pp = r.parts.find((p) => p.name === 'prediction');
    expect(pp?.relativeError).toBeCloseTo(0.05, 12);
    // full at 0.01, none at 0.1: 0.05 gives (0.1 - 0.05) / 0.09 of a point.
    expect(pp?.points).toBeCloseTo(0.05 / 0.09, 6);
  });

  it('flags a part that was not submitted and gives it no points', () => {
    const r = grade(lam, settings, ref, { modes, prediction: snapshot });
    expect(r.points).toBeCloseTo(6, 9);
    expect(r.maxPoints).toBe(10);
    expect(r.flags.filter((f) => f.code === 'part-missing').map((f) => f.part)).toEqual(['modes', 'prediction']);
  });
});
