// Engine side of grading fidelity (issue 8): EDMD as least squares on Ψ_X, measured sensitivity, the band's
// "resolved from rank r", the reference format, and CSV downloads carrying the same bits as .npy.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { readCsv, writeCsv } from '../../../grading/formats/csv';
import { writeNpy } from '../../../grading/formats/npy';
import { computeReference } from '../../../grading/methods/reference';
import { perturbSource, type PerturbWork } from '../../../grading/methods/sensitivity';
import { bandPairing } from '../../../grading/methods/spectrum';
import { pairMatrices } from '../../../grading/methods/pairs';
import type { PairSource } from '../../../grading/methods/types';
import { generateScenario } from '../../../grading/scenarios/scenarios';
import { gradingSettings } from '../../../shared/score-report';
import { referenceSpectrum } from '../../../shared/reference';
import { referenceTolerances } from '../../../grading/scoring/score';
import { grade, numpyAvailable, NUMPY_MISSING, ORACLE_DIR } from './helpers';

const HAVE_NUMPY = numpyAvailable();
const HAVE_MPMATH = HAVE_NUMPY && spawnSync('python3', ['-c', 'import mpmath'], { encoding: 'utf8' }).status === 0;
if (!HAVE_MPMATH) console.warn(`${NUMPY_MISSING} (or mpmath is missing: Debian python3-mpmath)`);

/**
 * Vibration-like data (invented, as the demo scenario but with 3 masses so the extended-precision check stays
 * small): unit masses on springs between walls, light Rayleigh damping, exact modal solution sampled every 0.02.
 * Lightly damped modes make the quadratic functions nearly dependent on a trajectory: the degree-2 dictionary
 * (28 functions) is numerically rank-deficient.
 */
function threeMassTrajectory(k = 200): PairSource {
  const springs = [10, 11.5, 9.2, 10.7];
  const d = 3;
  const alpha = 0.02;
  const beta = 0.004;
  const dt = 0.02;
  const km = new Matrix(d, d);
  for (let i = 0; i < d; i++) {
    km.set(i, i, springs[i] + springs[i + 1]);
    if (i + 1 < d) {
      km.set(i, i + 1, -springs[i + 1]);
      km.set(i + 1, i, -springs[i + 1]);
    }
  }
  const evd = new EigenvalueDecomposition(km, { assumeSymmetric: true });
  const vec = evd.eigenvectorMatrix;
  const q0 = [0.7, -0.4, 0.25];
  const v0 = [-0.3, 0.5, 0.1];
  const modal = evd.realEigenvalues.map((w2, c) => {
    const w = Math.sqrt(w2);
    const zeta = alpha / (2 * w) + (beta * w) / 2;
    const sr = -zeta * w;
    const wd = w * Math.sqrt(1 - zeta * zeta);
    const a0 = q0.reduce((s, q, i) => s + vec.get(i, c) * q, 0);
    const b0 = v0.reduce((s, v, i) => s + vec.get(i, c) * v, 0);
    return { sr, wd, A: a0, B: (b0 - sr * a0) / wd };
  });
  const n = 2 * d;
  const data = new Float64Array(n * k);
  for (let j = 0; j < k; j++) {
    const t = j * dt;
    const qc = modal.map((p) => Math.exp(p.sr * t) * (p.A * Math.cos(p.wd * t) + p.B * Math.sin(p.wd * t)));
    const vc = modal.map((p) => Math.exp(p.sr * t) * ((p.sr * p.A + p.wd * p.B) * Math.cos(p.wd * t) + (p.sr * p.B - p.wd * p.A) * Math.sin(p.wd * t)));
    for (let i = 0; i < d; i++) {
      let q = 0;
      let v = 0;
      for (let c = 0; c < d; c++) {
        q += vec.get(i, c) * qc[c];
        v += vec.get(i, c) * vc[c];
      }
      data[i + j * n] = q;
      data[d + i + j * n] = v;
    }
  }
  return { kind: 'trajectory', snapshots: { data, n, k } };
}

describe('EDMD as least squares on a rank-deficient dictionary', () => {
  it.skipIf(!HAVE_MPMATH)('vibration-like clean data, degree 2: λ = 1 to 1e-10, undetermined values marked and not graded; every graded value agrees with extended precision (mpmath, 60 digits)', async () => {
    const source = threeMassTrajectory();
    const { reference } = await computeReference(source, { method: 'edmd', options: { dictionary: { kind: 'monomial', degree: 2 } } });
    expect(reference.rank).toBe(28);
    expect(reference.dictionaryRank).toBeLessThan(28);
    expect(reference.cutoff).toBe(1e-10);
    const one = reference.eigenvalues.reduce((best, e) => (Math.hypot(e.re - 1, e.im) < Math.hypot(best.re - 1, best.im) ? e : best));
    expect(Math.hypot(one.re - 1, one.im)).toBeLessThan(1e-10);
    expect(reference.eigenvalues.filter((e) => e.determined === false).length).toBeGreaterThanOrEqual(28 - (reference.dictionaryRank ?? 0));

    const { x, y, n, m } = pairMatrices(source);
    const dir = mkdtempSync(join(tmpdir(), 'modewright-mp-'));
    let mpEig: [number, number][];
    let distanceToOne: number;
    try {
      writeFileSync(join(dir, 'x.npy'), writeNpy({ rows: n, cols: m, data: Float64Array.from(x) }));
      writeFileSync(join(dir, 'y.npy'), writeNpy({ rows: n, cols: m, data: Float64Array.from(y) }));
      const r = spawnSync('python3', [join(ORACLE_DIR, 'edmd_mp_oracle.py'), join(dir, 'x.npy'), join(dir, 'y.npy'), '2', '60'], { encoding: 'utf8' });
      if (r.status !== 0) throw new Error(r.stderr);
      ({ eigenvalues: mpEig, distanceToOne } = JSON.parse(r.stdout));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
    // Exact EDMD has λ = 1 (A e₁ = G e₁): mpmath finds it to its working precision.
    expect(distanceToOne).toBeLessThan(1e-25);
    // The exact eigenvalues as a submission: every graded value gets full credit, nothing undetermined is graded.
    const report = grade(
      reference,
      mpEig.map(([re, im]) => ({ re, im })),
    );
    const excluded = new Set(report.parts[0].excluded.map((e) => e.referenceIndex));
    reference.eigenvalues.forEach((e, i) => {
      if (e.determined === false) expect(excluded.has(i)).toBe(true);
    });
    const graded = report.parts[0].matches.filter((mm) => mm.status !== 'excluded');
    expect(graded.length).toBe(28 - excluded.size);
    expect(graded.length).toBeGreaterThan(5);
    expect(report.points).toBeCloseTo(report.maxPoints, 9);
    expect(report.flags.map((f) => f.code)).toContain('undetermined-reference');
  }, 120_000);

  it('the demo vibration data (8 states, 45 functions): λ = 1 exactly, the dropped functions named, no round-off value near 0 is graded (fact of the trade: the constant function is in the dictionary, so λ = 1 is exact)', async () => {
    const sc = generateScenario('vibration', { seed: 1, noise: 0 });
    const { reference, result } = await computeReference(sc.source, { method: 'edmd', options: { dictionary: { kind: 'monomial', degree: 2 } } });
    expect(result.leastSquares?.dictionaryRank).toBeLessThan(45);
    expect(result.leastSquares?.dropped.length).toBe(45 - (result.leastSquares?.dictionaryRank ?? 0));
    expect(reference.eigenvalues.some((e) => e.re === 1 && e.im === 0)).toBe(true);
    const refs = referenceTolerances(reference, gradingSettings.parse({}), 'discrete', null);
    // every graded value is away from 0 by far more than its tolerance: round-off values are not graded
    for (const r of refs.filter((v) => !v.excludedReason)) expect(Math.hypot(r.value.re, r.value.im)).toBeGreaterThan(100 * r.tolerance);
  });
});

describe('measured sensitivity', () => {
  it('every reference records it (3 seeded draws at float32 rounding), the same on a second run', async () => {
    const sc = generateScenario('linear-field', { seed: 2, noise: 1e-3 });
    const a = await computeReference(sc.source, { method: 'dmd', options: {} });
    const b = await computeReference(sc.source, { method: 'dmd', options: {} });
    expect(a.reference.sensitivityModel).toEqual({ model: 'float32-rounding', level: 2 ** -24, draws: 3, seed: 1 });
    expect(a.reference.eigenvalues.every((e) => e.sensitivity !== undefined && e.determined === true)).toBe(true);
    expect(a.reference.hash).toBe(b.reference.hash);
    // common practice, no source: the leading, well-separated values move by far less than the float32 level
    // times their magnitude × condition; edge-of-truncation values move more
    const sens = a.reference.eigenvalues.map((e) => e.sensitivity ?? 0);
    expect(Math.min(...sens)).toBeLessThan(1e-6);
    expect(Math.max(...sens)).toBeGreaterThan(Math.min(...sens) * 10);
  });

  it('the perturbed copies: δ uniform in ±2⁻²⁴ (range, mean, rms), seeded per draw, the same numbers in reused buffers, one stream across trajectories', () => {
    // Common practice, no source: a uniform variate on [−a, a] has mean 0 and rms a/√3.
    const n = 200, k = 1000;
    const data = Float64Array.from({ length: n * k }, (_, i) => (i % 7 === 3 ? -1 : 1) * (0.5 + ((i * 37) % 101)));
    const src: PairSource = { kind: 'trajectory', snapshots: { data, n, k } };
    const a = perturbSource(src, 1, 0);
    const dA = (a as { snapshots: { data: Float64Array } }).snapshots.data;
    let lo = Infinity, hi = -Infinity, sum = 0, sq = 0;
    for (let i = 0; i < data.length; i++) {
      const d = dA[i] / data[i] - 1;
      lo = Math.min(lo, d);
      hi = Math.max(hi, d);
      sum += d;
      sq += d * d;
    }
    const level = 2 ** -24, count = data.length;
    expect(lo).toBeGreaterThanOrEqual(-level * (1 + 1e-9));
    expect(hi).toBeLessThanOrEqual(level * (1 + 1e-9));
    expect(lo).toBeLessThan(-0.99 * level);
    expect(hi).toBeGreaterThan(0.99 * level);
    expect(Math.abs(sum / count)).toBeLessThan((5 * level) / Math.sqrt(3 * count)); // 5 standard errors
    expect(Math.sqrt(sq / count) / (level / Math.sqrt(3))).toBeCloseTo(1, 2);
    // Seeded: the same draw gives the same numbers, in fresh or reused buffers; another draw or seed others.
    const work: PerturbWork = [];
    const first = (perturbSource(src, 1, 1, work) as { snapshots: { data: Float64Array } }).snapshots.data.slice();
    const again = (perturbSource(src, 1, 0, work) as { snapshots: { data: Float64Array } }).snapshots.data;
    expect(again).toBe(work[0]);
    expect(Array.from(again)).toEqual(Array.from(dA));
    expect(first.some((v, i) => v !== dA[i])).toBe(true);
    const otherSeed = (perturbSource(src, 2, 0) as { snapshots: { data: Float64Array } }).snapshots.data;
    expect(otherSeed.some((v, i) => v !== dA[i])).toBe(true);
    // Two trajectories with the same data: the second continues the stream, so its δ differ from the first's.
    const two = perturbSource({ kind: 'trajectories', list: [{ data, n, k }, { data, n, k }] }, 1, 0) as { list: { data: Float64Array }[] };
    expect(Array.from(two.list[0].data)).toEqual(Array.from(dA));
    expect(two.list[1].data.some((v, i) => v !== dA[i])).toBe(true);
  });

  it('a value whose sensitivity reaches the stated tolerance is undetermined and not graded; below it the tolerance is max(abs, rel·|λ|, 3 × sensitivity)', () => {
    const base = referenceSpectrum.parse({
      method: 'dmd',
      rank: 3,
      n: 3,
      m: 10,
      eigenvalues: [
        { re: 0.9, im: 0, condition: 1, sensitivity: 1e-9 },
        { re: 0.5, im: 0, condition: 1, sensitivity: 6e-4 },
        { re: 0.2, im: 0, condition: 1, sensitivity: 1e-4 },
      ],
    });
    const refs = referenceTolerances(base, gradingSettings.parse({}), 'discrete', null);
    expect(refs[0]).toMatchObject({ source: 'relative', excludedReason: null });
    expect(refs[0].tolerance).toBeCloseTo(9e-4, 15);
    expect(refs[1].excludedCode).toBe('undetermined-sensitivity'); // 6e-4 ≥ 1e-3 × 0.5
    expect(refs[1].excludedReason).toMatch(/float32 rounding, at or above the stated tolerance/);
    expect(refs[2]).toMatchObject({ source: 'sensitivity', excludedReason: null });
    expect(refs[2].tolerance).toBeCloseTo(3e-4, 15); // 3 × 1e-4 > 1e-3 × 0.2
    const r = grade(base, [{ re: 0.9, im: 0 }, { re: 0.7, im: 0 }, { re: 0.2002, im: 0 }]);
    expect(r.points).toBeCloseTo(10, 9); // 0.5's value is wrong but not graded; 0.2002 is within 3 × 1e-4
    expect(r.parts[0].excluded.map((e) => e.code)).toEqual(['undetermined-sensitivity']);
  });
});

describe('rank band: classification only, "resolved from rank r"', () => {
  it('a value absent below r is resolved from r, its spread taken where it exists (common practice, no source)', () => {
    const ref = [{ re: 0.9, im: 0 }, { re: 0.5, im: 0 }];
    const out = bandPairing(ref, [{ rank: 1, values: [{ re: 0.9001, im: 0 }] }, { rank: 3, values: [{ re: 0.9002, im: 0 }, { re: 0.5003, im: 0 }, { re: 0.1, im: 0 }] }], 2);
    expect(out.resolvedFromRank).toEqual([undefined, 2]);
    expect(out.spread[0]).toBeCloseTo(2e-4, 12);
    expect(out.spread[1]).toBeCloseTo(3e-4, 12);
  });

  it('kernel EDMD on the clean drift map: λ = 1 is not unstable and is graded with the stated tolerance', async () => {
    const sc = generateScenario('drift-map', { seed: 1, noise: 0 });
    const { reference } = await computeReference(sc.source, { method: 'kernel-edmd', options: { kernel: { kind: 'polynomial', degree: 2 } } });
    const j = reference.eigenvalues.findIndex((e) => Math.abs(e.re - 1) < 1e-9 && e.im === 0);
    expect(j).toBeGreaterThanOrEqual(0);
    const refs = referenceTolerances(reference, gradingSettings.parse({}), 'discrete', null);
    expect(refs[j]).toMatchObject({ unstable: false, excludedReason: null, source: 'relative' });
    expect(refs[j].tolerance).toBeCloseTo(1e-3, 9);
  });

  it('exact DMD at the exact rank of clean data: the tolerance is the stated one, not the under-fitted ranks’ spread', async () => {
    const sc = generateScenario('linear-field', { seed: 1, noise: 0 });
    const { reference } = await computeReference(sc.source, { method: 'dmd', options: {} });
    expect(reference.rank).toBe(7);
    const refs = referenceTolerances(reference, gradingSettings.parse({}), 'discrete', null);
    for (const r of refs) {
      expect(r.excludedReason).toBeNull();
      expect(r.tolerance).toBeCloseTo(1e-3 * Math.hypot(r.value.re, r.value.im), 12);
    }
  });
});

describe('grading boundaries agree', () => {
  const ref = referenceSpectrum.parse({
    method: 'dmd',
    rank: 3,
    n: 3,
    m: 10,
    eigenvalues: [
      { re: 0.8, im: 0.05, condition: 1, sensitivity: 0 },
      { re: 0.8, im: -0.05, condition: 1, sensitivity: 0 },
      { re: 0.3, im: 0, condition: 1, sensitivity: 0 },
    ],
  });
  it('full credit never carries a near-miss flag, at exactly 1.00× tolerance and a hair beyond', () => {
    const tol = 1e-3 * Math.hypot(0.3, 0);
    for (const f of [1, 1 + 1e-12, 1 + 1e-10]) {
      const r = grade(ref, [{ re: 0.8, im: 0.05 }, { re: 0.8, im: -0.05 }, { re: 0.3 + f * tol, im: 0 }]);
      const m = r.parts[0].matches.find((x) => x.referenceIndex === 2);
      if (m?.credit === 1) {
        expect(m.status).toBe('full');
        expect(r.flags.map((x) => x.code)).not.toContain('near-miss');
      } else expect(m?.status).toBe('near-miss');
    }
  });
  it('a real value is never credited for a complex reference value whose imaginary part is beyond tolerance', () => {
    // tolerance 1e-3·|λ| ≈ 8e-4; the imaginary part 0.05 is far beyond it, but with a wide tolerance it would not be
    const r = grade(ref, [{ re: 0.8, im: 0 }, { re: 0.8, im: -0.05 }, { re: 0.3, im: 0 }], { relTol: 0.03 });
    const m = r.parts[0].matches.find((x) => x.referenceIndex === 0);
    expect(m?.credit ?? 0).toBe(0);
    expect(m?.note).toMatch(/real value cannot stand for a non-real/);
  });
});

describe.skipIf(!HAVE_NUMPY)('downloads carry the same bits (reference library: numpy.loadtxt and numpy.load)', () => {
  it('a CSV written by writeCsv reads back in NumPy bit for bit equal to the .npy of the same data', () => {
    const sc = generateScenario('wave-field', { seed: 4, noise: 1e-2 });
    const s = sc.source.kind === 'trajectory' ? sc.source.snapshots : null;
    if (!s) throw new Error('expected a trajectory');
    const data = Float64Array.from(s.data);
    data[0] = -0;
    data[1] = 5e-324;
    data[2] = 1 / 3;
    const mat = { rows: s.n, cols: s.k, data };
    const dir = mkdtempSync(join(tmpdir(), 'modewright-csv-'));
    try {
      writeFileSync(join(dir, 'd.csv'), writeCsv(mat));
      writeFileSync(join(dir, 'd.npy'), writeNpy(mat));
      const py = "import numpy as np,sys;a=np.loadtxt(sys.argv[1]+'/d.csv',delimiter=',',ndmin=2);b=np.load(sys.argv[1]+'/d.npy');print(a.shape==b.shape and a.tobytes()==b.tobytes())";
      const r = spawnSync('python3', ['-c', py, dir], { encoding: 'utf8' });
      expect(r.stdout.trim()).toBe('True');
      expect(Array.from(readCsv(writeCsv(mat), 'd.csv').data).map((v) => Object.is(v, -0))[0]).toBe(true);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
