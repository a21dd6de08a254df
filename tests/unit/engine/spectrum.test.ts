import { describe, expect, it } from 'vitest';
import { referenceSpectrum } from '../../../shared/reference';
import { exactDmd } from '../../../grading/methods/dmd';
import { kernelEdmd } from '../../../grading/methods/kernel-edmd';
import { canonicalJson, referenceHash, toReferenceSpectrum } from '../../../grading/methods/reference';
import { bandRanks, orderSpectrum, type RawSpectrum } from '../../../grading/methods/spectrum';
import { chooseRank } from '../../../grading/methods/truncation';
import { SpectrumInputError } from '../../../grading/methods/types';
import { generateScenario } from '../../../grading/scenarios/scenarios';
import { gaussianMatrix } from './helpers';

// Fact of the trade (common practice, no source): orderings, conjugate pairs, top-K cut (numerics.md "Time and ordering").
function raw(values: [number, number][], amp?: number[]): RawSpectrum {
  const k = values.length;
  return {
    re: Float64Array.from(values, (v) => v[0]),
    im: Float64Array.from(values, (v) => v[1]),
    condition: new Float64Array(k).fill(1),
    modeNorm: new Float64Array(k).fill(1),
    amplitude: Float64Array.from(amp ?? values.map(() => 1)),
  };
}

describe('Orderings and the top-K cut (common practice, no source)', () => {
  // 0.5, 0.8e^{±0.4i}, 0.95, −0.3, 1.05e^{±2i}
  const vals: [number, number][] = [
    [0.5, 0],
    [0.8 * Math.cos(0.4), 0.8 * Math.sin(0.4)],
    [0.8 * Math.cos(0.4), -0.8 * Math.sin(0.4)],
    [0.95, 0],
    [-0.3, 0],
    [1.05 * Math.cos(2), 1.05 * Math.sin(2)],
    [1.05 * Math.cos(2), -1.05 * Math.sin(2)],
  ];
  const mags = (o: ReturnType<typeof orderSpectrum>) => o.eigenvalues.map((e) => +Math.hypot(e.lambda.re, e.lambda.im).toFixed(6));
  it('magnitude: |λ| descending, conjugates adjacent with positive imaginary part first', () => {
    const o = orderSpectrum(raw(vals), { order: 'magnitude' });
    expect(mags(o)).toEqual([1.05, 1.05, 0.95, 0.8, 0.8, 0.5, 0.3]);
    expect(o.eigenvalues[0].lambda.im).toBeGreaterThan(0);
    expect(o.eigenvalues[0].partner).toBe(1);
    expect(o.eigenvalues[2].partner).toBe(-1);
  });
  it('unit-circle: closeness of |λ| to 1; a tie (0.95 and 1.05) goes to the larger |λ|', () => {
    expect(mags(orderSpectrum(raw(vals), { order: 'unit-circle' }))).toEqual([1.05, 1.05, 0.95, 0.8, 0.8, 0.5, 0.3]);
  });
  it('frequency: |arg λ| ascending (ties by |λ|)', () => {
    expect(mags(orderSpectrum(raw(vals), { order: 'frequency' }))).toEqual([0.95, 0.5, 0.8, 0.8, 1.05, 1.05, 0.3]);
  });
  it('amplitude: descending', () => {
    const o = orderSpectrum(raw(vals, [1, 5, 5, 2, 9, 0.1, 0.1]), { order: 'amplitude' });
    expect(mags(o)).toEqual([0.3, 0.8, 0.8, 0.95, 0.5, 1.05, 1.05]);
  });
  it('a cut inside a conjugate pair takes both by default, or neither, and says which', () => {
    const both = orderSpectrum(raw(vals), { order: 'magnitude', top: 1 });
    expect(both.eigenvalues).toHaveLength(2);
    expect(both.cut).toEqual({ requested: 1, returned: 2, pairAtCut: 'took-both' });
    expect(both.notes.join(' ')).toMatch(/both members were kept/);
    const neither = orderSpectrum(raw(vals), { order: 'magnitude', top: 4, pairAtCut: 'neither' });
    expect(mags(neither)).toEqual([1.05, 1.05, 0.95]);
    expect(neither.cut?.pairAtCut).toBe('took-neither');
    const clean = orderSpectrum(raw(vals), { order: 'magnitude', top: 3 });
    expect(clean.cut?.pairAtCut).toBe('no-split');
  });
  it('conjugate pairs are symmetrised exactly', () => {
    const o = orderSpectrum(raw([[0.5, 0.3 + 1e-15], [0.5 + 1e-16, -0.3]]), {});
    expect(o.eigenvalues[0].lambda.re).toBe(o.eigenvalues[1].lambda.re);
    expect(o.eigenvalues[0].lambda.im).toBe(-o.eigenvalues[1].lambda.im);
  });
});

describe('Truncation rules (numerics.md; Gavish & Donoho 2014 for the optimal rule)', () => {
  const sigma = Float64Array.from([10, 5, 1, 0.1, 1e-20]);
  it('energy fraction picks the smallest rank keeping the fraction of Σσ²', () => {
    // σ² = 100, 25, 1, 0.01: 100/126.01 = 0.794, 125/126.01 = 0.992
    expect(chooseRank(sigma, 5, 5, { kind: 'energy', fraction: 0.9 }).rank).toBe(2);
    expect(chooseRank(sigma, 5, 5, { kind: 'energy', fraction: 0.995 }).rank).toBe(3);
  });
  it('relative threshold keeps σ_i > tol·σ_1', () => {
    expect(chooseRank(sigma, 5, 5, { kind: 'tolerance', tol: 0.05 }).rank).toBe(3);
  });
  it('a rank above what the data allows is refused with the maximum', () => {
    expect(() => chooseRank(sigma, 5, 5, { kind: 'rank', rank: 5 })).toThrow(/the maximum is 4/);
    try {
      chooseRank(sigma, 5, 5, { kind: 'rank', rank: 5 });
    } catch (e) {
      expect((e as SpectrumInputError).maximum).toBe(4);
    }
  });
  it('exact DMD and kernel EDMD refuse too-large ranks with the maximum', async () => {
    const src = { kind: 'trajectory' as const, snapshots: { data: gaussianMatrix(1, 4, 30), n: 4, k: 30 } };
    await expect(exactDmd(src, { truncation: { kind: 'rank', rank: 6 } })).rejects.toThrow(/the maximum is 4/);
    await expect(kernelEdmd(src, { kernel: { kind: 'linear' }, truncation: { kind: 'rank', rank: 6 } })).rejects.toThrow(/the maximum is 4/);
  });
  it('band ranks r−2 … r+2 stay within [1, maxRank]', () => {
    expect(bandRanks(5, 10)).toEqual([3, 4, 5, 6, 7]);
    expect(bandRanks(2, 3)).toEqual([1, 2, 3]);
  });
});

describe('Rank-band sensitivity and the reference spectrum', () => {
  it('the spread of the leading pair is its largest move across the band ranks r−2 … r', async () => {
    const s = generateScenario('linear-field', { seed: 11 });
    const r = await exactDmd(s.source, { truncation: { kind: 'rank', rank: 7 } });
    expect(r.rankBand?.ranks).toEqual([5, 6, 7]);
    const lead = r.eigenvalues[0].lambda;
    let expected = 0;
    for (const q of [5, 6]) {
      const other = await exactDmd(s.source, { truncation: { kind: 'rank', rank: q }, rankBand: false });
      const same = other.eigenvalues.filter((e) => Math.sign(e.lambda.im) === Math.sign(lead.im));
      expected = Math.max(expected, Math.min(...same.map((e) => Math.hypot(e.lambda.re - lead.re, e.lambda.im - lead.im))));
    }
    expect(r.eigenvalues[0].spread).toBeCloseTo(expected, 12);
    expect(r.eigenvalues[1].spread).toBe(r.eigenvalues[0].spread);
  });
  it('toReferenceSpectrum fills spread, amplitude, modeNorm, rankBand, engineVersion and a sha256 of the canonical JSON', async () => {
    const s = generateScenario('vibration', { seed: 3 });
    const r = await exactDmd(s.source, { dt: s.dt });
    const ref = toReferenceSpectrum(r, { options: { scenario: 'vibration' } });
    expect(referenceSpectrum.safeParse(ref).success).toBe(true);
    expect(ref.eigenvalues.every((e) => e.spread !== undefined && e.amplitude !== undefined && e.modeNorm !== undefined)).toBe(true);
    expect(ref.rankBand).toEqual([6, 7, 8]);
    expect(ref.engineVersion).toMatch(/modewright-engine/);
    expect(ref.continuous).toHaveLength(8);
    expect(ref.hash).toBe(referenceHash(ref));
    // canonical JSON sorts keys at every level
    expect(canonicalJson({ b: 1, a: [{ d: 2, c: 3 }] })).toBe('{"a":[{"c":3,"d":2}],"b":1}');
    // the hash changes when an eigenvalue changes
    const changed = { ...ref, eigenvalues: ref.eigenvalues.map((e, i) => (i === 0 ? { ...e, re: e.re + 1e-12 } : e)) };
    expect(referenceHash(changed)).not.toBe(ref.hash);
  });
});

describe('Scenarios: seeded, varied, with analytic eigenvalues (invented demo data)', () => {
  it('the same seed gives the same bytes, another seed a different variant', () => {
    const a = generateScenario('wave-field', { seed: 1, noise: 0.01 });
    const b = generateScenario('wave-field', { seed: 1, noise: 0.01 });
    const c = generateScenario('wave-field', { seed: 2, noise: 0.01 });
    const da = a.source.kind === 'trajectory' ? a.source.snapshots.data : new Float64Array();
    const db = b.source.kind === 'trajectory' ? b.source.snapshots.data : new Float64Array();
    const dc = c.source.kind === 'trajectory' ? c.source.snapshots.data : new Float64Array();
    expect(Array.from(da)).toEqual(Array.from(db));
    expect(Array.from(da)).not.toEqual(Array.from(dc));
    expect(a.parameters.omega1).not.toBe(c.parameters.omega1);
  });
  for (const name of ['linear-field', 'wave-field', 'vibration'] as const) {
    it(`${name}: noise-free exact DMD recovers the analytic eigenvalues (internal consistency)`, async () => {
      const s = generateScenario(name, { seed: 9 });
      const r = await exactDmd(s.source, {});
      const got = r.eigenvalues.map((e) => e.lambda);
      expect(got).toHaveLength(s.analyticEigenvalues?.length ?? -1);
      for (const e of s.analyticEigenvalues ?? []) expect(Math.min(...got.map((g) => Math.hypot(g.re - e.re, g.im - e.im)))).toBeLessThan(1e-9);
    });
  }
  it('drift-map: kernel EDMD with a cubic kernel contains the invariant-subspace eigenvalues {1, a, a², a³, b}', async () => {
    const s = generateScenario('drift-map', { seed: 4 });
    const r = await kernelEdmd(s.source, { kernel: { kind: 'polynomial', degree: 3 } });
    const got = r.eigenvalues.map((e) => e.lambda);
    for (const e of s.analyticEigenvalues ?? []) expect(Math.min(...got.map((g) => Math.hypot(g.re - e.re, g.im - e.im)))).toBeLessThan(1e-9);
  });
  it('noisy variants: the optimal hard threshold still finds the latent rank of linear-field', async () => {
    const s = generateScenario('linear-field', { seed: 21, noise: 0.01 });
    const r = await exactDmd(s.source, { truncation: { kind: 'optimal' } });
    expect(r.rank).toBe(7);
  });
});

describe('Reference library (SciPy): the rank-band matcher is an optimal assignment', () => {
  it('matchEigenvalues gives the same total cost as scipy.optimize.linear_sum_assignment (tests/oracle/lsa_oracle.py)', async () => {
    const { numpyAvailable, NUMPY_MISSING, ORACLE_DIR } = await import('./helpers');
    if (!numpyAvailable()) {
      console.warn(NUMPY_MISSING);
      return;
    }
    const { spawnSync } = await import('node:child_process');
    const { join } = await import('node:path');
    const { matchEigenvalues } = await import('../../../grading/methods/spectrum');
    const g = gaussianMatrix(123, 2, 60);
    const matrices: number[][][] = [];
    const ours: number[] = [];
    for (const [p, q] of [
      [6, 6],
      [5, 8],
      [9, 4],
    ]) {
      const a = Array.from({ length: p }, (_, i) => ({ re: g[2 * i], im: g[2 * i + 1] }));
      const b = Array.from({ length: q }, (_, j) => ({ re: g[40 + 2 * (j % 10)] + 0.01 * j, im: g[41 + 2 * (j % 10)] }));
      const cost = a.map((x) => b.map((y) => Math.hypot(x.re - y.re, x.im - y.im)));
      matrices.push(cost);
      const m = matchEigenvalues(a, b);
      ours.push(m.reduce((s, j, i) => s + (j >= 0 ? cost[i][j] : 0), 0));
      expect(new Set(m.filter((j) => j >= 0)).size).toBe(Math.min(p, q));
    }
    const r = spawnSync('python3', [join(ORACLE_DIR, 'lsa_oracle.py')], { input: JSON.stringify(matrices), encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    const totals = JSON.parse(r.stdout) as number[];
    totals.forEach((t, i) => expect(ours[i]).toBeCloseTo(t, 12));
  });
});

describe('Method of snapshots floor (internal consistency)', () => {
  it('n ≫ m with σ_r/σ_1 ≈ 1e-9: the snapshot route refuses rank r, the auto route falls back to the SVD of X', async () => {
    const n = 80;
    const m = 6;
    const x = gaussianMatrix(31, n, m);
    // make column 6 almost a combination of columns 1 and 2
    for (let t = 0; t < n; t++) x[t + 5 * n] = x[t] + x[t + n] + 1e-9 * x[t + 2 * n] * (t % 3 === 0 ? 1 : -1);
    const y = gaussianMatrix(32, n, m);
    const src = { kind: 'pairs' as const, x: { data: x, n, k: m }, y: { data: y, n, k: m } };
    await expect(exactDmd(src, { truncation: { kind: 'rank', rank: 6 }, svd: 'snapshots' })).rejects.toThrow(/the maximum is 5/);
    const r = await exactDmd(src, { truncation: { kind: 'rank', rank: 6 }, rankBand: false });
    expect(r.rank).toBe(6);
    expect(r.options.svd).toBe('direct');
  });
});
