// EDMD with a Gaussian radial dictionary as an assignment asks for it (grading/assignment.ts): the
// centres come from each variant's own X by the configured rule, and the stored reference says which.
//
// Reference library: NumPy 2.x / SciPy 1.x via python3 (tests/oracle/edmd_radial_oracle.py), an
// independent transcription of EDMD as least squares (Williams, Kevrekidis & Rowley 2015, J. Nonlinear
// Sci. 25:1307–1346: K solves Ψ_X K ≈ Ψ_Y) that rebuilds the centres from the student's downloaded
// bytes alone, solves by numpy.linalg.lstsq and takes numpy.linalg.eig; eigenvalues are paired by
// scipy.optimize.linear_sum_assignment and must agree to 1e-8 relative on these well-conditioned data
// (cond(Ψ_X) is reported by the oracle and checked to be small).
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { CentreRule, MethodConfig } from '../../../shared/assignment';
import { referenceSpectrum } from '../../../shared/reference';
import { computeVariantReference, materializeVariant, radialCentres, taskCli, type StoredDataset, type VariantRecipe } from '../../../grading/assignment';
import { writeNpy } from '../../../grading/formats/npy';
import { SpectrumInputError } from '../../../grading/methods/types';
import { NUMPY_MISSING, numpyAvailable, ORACLE_DIR } from './helpers';

const ROOT = join(__dirname, '..', '..', '..');
const hasNumpy = numpyAvailable();
if (!hasNumpy) console.warn(NUMPY_MISSING);
const dir = mkdtempSync(join(tmpdir(), 'modewright-radial-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A scenario dataset as the server stores it (the variant is regenerated from the recipe, so the bytes do not matter here). */
function scenarioDataset(name: 'drift-map' | 'vibration'): StoredDataset {
  return { name: `${name}.npy`, source: 'scenario', layout: 'columns', bytes: new Uint8Array(), scenario: { name, seed: 5, noise: 0 } };
}

interface OracleOut {
  eigenvalues: [number, number][];
  indices: number[];
  condPsiX: number;
  rankPsiX: number;
  maxRelErr: number;
  matched: number;
}

function oracle(folder: string, job: Record<string, unknown>): OracleOut {
  writeFileSync(join(folder, 'job.json'), JSON.stringify(job));
  const r = spawnSync('python3', [join(ORACLE_DIR, 'edmd_radial_oracle.py'), folder], { encoding: 'utf8', env: { ...process.env, OPENBLAS_NUM_THREADS: '1', OMP_NUM_THREADS: '1' } });
  if (r.status !== 0) throw new Error(`python3 edmd_radial_oracle.py failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as OracleOut;
}

const cases: { name: string; dataset: 'drift-map' | 'vibration'; sigma: number; centres: CentreRule; functions: number }[] = [
  // 400 one-step pairs in [−1, 1]²: columns 0, 20, …, 380 of X, 21 functions.
  { name: 'explicit pairs, every 20th snapshot of X', dataset: 'drift-map', sigma: 0.5, centres: { kind: 'every', step: 20 }, functions: 21 },
  // One trajectory of 200 snapshots: X is the first 199, so column 198 is the last possible centre.
  { name: 'one trajectory, listed snapshots up to the last column of X', dataset: 'vibration', sigma: 1, centres: { kind: 'indices', indices: [198, 0, 15, 40, 77, 120, 160] }, functions: 8 },
];

describe.skipIf(!hasNumpy)('radial-dictionary EDMD of a student variant against NumPy least squares', () => {
  for (const c of cases) {
    it(`${c.name}: same centres, eigenvalues within 1e-8 relative`, async () => {
      const recipe: VariantRecipe = { mode: 'per-student', seed: 1234567, noise: 0.001, jitter: 0.02 };
      const v = materializeVariant(scenarioDataset(c.dataset), recipe);
      const method: MethodConfig = { method: 'edmd', dictionary: 'radial', sigma: c.sigma, centres: c.centres };
      const { reference } = await computeVariantReference(v.source, { method, order: 'magnitude' }, { variantId: 1 });
      expect(reference.method).toBe('edmd');
      expect(reference.rank).toBe(c.functions);
      expect(reference.dictionaryRank).toBe(c.functions);

      // What a student downloads: the variant's canonical .npy bytes.
      const folder = mkdtempSync(join(dir, 'case-'));
      const ours = reference.eigenvalues;
      writeFileSync(join(folder, 'ours.npy'), writeNpy({ rows: ours.length, cols: 1, re: Float64Array.from(ours, (e) => e.re), im: Float64Array.from(ours, (e) => e.im) }, { vector: true }));
      writeFileSync(join(folder, 'x.npy'), v.npyX);
      if (v.npyY) writeFileSync(join(folder, 'y.npy'), v.npyY);
      const out = oracle(folder, { ...(v.npyY ? { x: 'x.npy', y: 'y.npy' } : { trajectory: 'x.npy' }), sigma: c.sigma, centres: c.centres, ours: 'ours.npy' });

      // The stored reference names the same snapshots as the centres the oracle rebuilt on its own.
      const stored = reference.options?.centres as { of: string; indexBase: number; indices: number[]; description: string };
      expect(stored).toMatchObject({ of: 'X', indexBase: 0, indices: out.indices });
      expect(stored.description).toMatch(/snapshot/);
      expect(out.indices).toHaveLength(c.functions - 1);
      // Well-conditioned: full rank and a small condition number of Ψ_X.
      expect(out.rankPsiX).toBe(c.functions);
      expect(out.condPsiX).toBeLessThan(1e5);
      expect(out.matched).toBe(c.functions);
      expect(out.maxRelErr).toBeLessThan(1e-8);
      // The constant function gives λ = 1 exactly (fact of the trade: the constant is in the dictionary).
      expect(ours.some((e) => e.re === 1 && e.im === 0)).toBe(true);
    });
  }

  it('the task’s CLI options reproduce the stored reference from the downloaded file', async () => {
    const c = cases[0];
    const v = materializeVariant(scenarioDataset(c.dataset), { mode: 'per-student', seed: 99, noise: 0.001, jitter: 0.02 });
    const method: MethodConfig = { method: 'edmd', dictionary: 'radial', sigma: c.sigma, centres: c.centres };
    const { reference } = await computeVariantReference(v.source, { method, order: 'magnitude' });
    const folder = mkdtempSync(join(dir, 'cli-'));
    writeFileSync(join(folder, 'x.npy'), v.npyX);
    writeFileSync(join(folder, 'y.npy'), v.npyY!);
    const cli = taskCli({ method, order: 'magnitude' }, null);
    const r = spawnSync('npx', ['tsx', 'grading/cli.ts', join(folder, 'x.npy'), '--pairs', join(folder, 'y.npy'), ...cli.split(' '), '--json'], { cwd: ROOT, encoding: 'utf8', timeout: 60_000 });
    expect(r.status, r.stderr).toBe(0);
    const fromCli = referenceSpectrum.parse(JSON.parse(r.stdout));
    expect(fromCli.rank).toBe(reference.rank);
    fromCli.eigenvalues.forEach((e, i) => {
      expect(Math.hypot(e.re - reference.eigenvalues[i].re, e.im - reference.eigenvalues[i].im)).toBeLessThanOrEqual(1e-12);
    });
  });
});

describe('radial centres from a variant', () => {
  const v = materializeVariant(scenarioDataset('vibration'), { mode: 'per-student', seed: 7, noise: 0, jitter: 0.02 });

  it('copies the chosen columns of X (a trajectory’s X leaves out its last snapshot)', () => {
    const { indices, centres } = radialCentres(v.source, { kind: 'every', step: 50 });
    expect(indices).toEqual([0, 50, 100, 150]);
    expect(centres.n).toBe(8);
    expect(Array.from(centres.data.subarray(8, 16))).toEqual(Array.from(v.x.data.subarray(50 * 8, 51 * 8)));
  });

  it('an index past the end of X is refused with where and why', async () => {
    expect(() => radialCentres(v.source, { kind: 'indices', indices: [3, 199] })).toThrow(new SpectrumInputError('radial centre 2 is snapshot 199 of X, but X has 199 snapshots (0-based columns 0 … 198)'));
    await expect(computeVariantReference(v.source, { method: { method: 'edmd', dictionary: 'radial', sigma: 1, centres: { kind: 'indices', indices: [500] } }, order: 'magnitude' })).rejects.toThrow(
      /radial centre 1 is snapshot 500 of X/,
    );
  });
});

describe('measured sensitivity of a radial dictionary whose centres are columns of X', () => {
  // Common practice, no source (numerics.md, "Conditioning"): a student who rounds her data to float32 rounds the
  // centres she picks from it too, so each perturbed copy takes its centres from its own X.
  it('each draw rebuilds the centres from the perturbed X: the same deviations as recomputing by hand, and not those of fixed centres', async () => {
    const { generateScenario } = await import('../../../grading/scenarios/scenarios');
    const { edmd } = await import('../../../grading/methods/edmd');
    const { perturbSource, deviations } = await import('../../../grading/methods/sensitivity');
    const sc = generateScenario('drift-map', { seed: 3, noise: 1e-3 });
    const { centres, indices } = radialCentres(sc.source, { kind: 'every', step: 15 });
    const base = { sigma: 0.6, centres } as const;
    const opts = { rankBand: false, sensitivity: { draws: 3, seed: 7 } };
    const withColumns = await edmd(sc.source, { ...opts, dictionary: { kind: 'gaussian-radial', ...base, fromColumns: indices } });
    const fixedCentres = await edmd(sc.source, { ...opts, dictionary: { kind: 'gaussian-radial', ...base } });
    const lam = withColumns.eigenvalues.map((e) => e.lambda);
    expect(fixedCentres.eigenvalues.map((e) => e.lambda)).toEqual(lam); // the plain run does not depend on it
    // By hand: each draw's perturbed copy, centres taken from its X, a plain EDMD run.
    const spectra = [];
    for (let d = 0; d < 3; d++) {
      const p = perturbSource(sc.source, 7, d);
      const c = radialCentres(p, { kind: 'every', step: 15 }).centres;
      const r = await edmd(p, { rankBand: false, dictionary: { kind: 'gaussian-radial', sigma: 0.6, centres: c } });
      spectra.push(r.eigenvalues.map((e) => e.lambda));
    }
    const dev = deviations(lam, spectra);
    const sens = withColumns.eigenvalues.map((e) => e.sensitivity ?? Number.NaN);
    const fixedSens = fixedCentres.eigenvalues.map((e) => e.sensitivity ?? Number.NaN);
    withColumns.eigenvalues.forEach((e, i) => {
      const byHand = e.partner >= 0 ? Math.max(dev[i], dev[e.partner]) : dev[i];
      // The engine's reruns reuse the unperturbed run's column scaling: the same estimator, equal up to round-off.
      expect(Math.abs(sens[i] - byHand)).toBeLessThanOrEqual(1e-3 * byHand + 1e-15);
    });
    expect(sens.some((s, i) => Math.abs(s - fixedSens[i]) > 1e-3 * Math.max(s, fixedSens[i]))).toBe(true);
  });
});
