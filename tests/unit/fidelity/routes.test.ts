// Grading fidelity on the four demo scenarios at noise 0, 1e-3 and 1e-2, each method (issue 8, "Done when").
// Source: Reference library — the valid routes are computed by NumPy/SciPy in this test (tests/oracle/valid_routes.py
// says which); the wrong answers are computed by our engine at a wrong rank or kernel degree. The rules checked
// are those of /work/shared/design/numerics.md ("Grading a list of eigenvalues").
import { beforeAll, describe, expect, it } from 'vitest';
import { computeReference } from '../../../grading/methods/reference';
import { generateScenario } from '../../../grading/scenarios/scenarios';
import type { ComplexNumber } from '../../../grading/formats/submission-types';
import { buildCases, grade, numpyAvailable, NUMPY_MISSING, requestFor, validRoutes, type Case } from './helpers';

const HAVE_NUMPY = numpyAvailable();
if (!HAVE_NUMPY) console.warn(NUMPY_MISSING);

let cases: Case[] = [];
let routes: Record<string, Record<string, [number, number][]>> = {};

const values = (c: Case): ComplexNumber[] => c.reference.eigenvalues.map((e) => ({ re: e.re, im: e.im }));
const gradedIndices = (c: Case) => {
  const r = grade(c.reference, values(c));
  const out = new Set(r.parts[0].excluded.map((e) => e.referenceIndex));
  return c.reference.eigenvalues.map((_, i) => i).filter((i) => !out.has(i));
};

beforeAll(async () => {
  cases = await buildCases();
  if (HAVE_NUMPY) routes = validRoutes(cases);
}, 300_000);

describe.skipIf(!HAVE_NUMPY)('valid routes in NumPy/SciPy (reference library) get full credit', () => {
  it('every scenario × noise {0, 1e-3, 1e-2} × method {DMD, EDMD, kernel EDMD}, every route', () => {
    expect(cases).toHaveLength(36);
    const failures: string[] = [];
    let graded = 0;
    for (const c of cases) {
      const idx = gradedIndices(c);
      if (idx.length === 0) {
        // Nothing is determined (EDMD with more functions than samples on noisy data): said so, nothing graded.
        const r = grade(c.reference, values(c));
        expect(r.flags.map((f) => f.code), c.id).toContain('undetermined-reference');
        expect(r.parts[0].excluded.every((e) => e.code === 'undetermined-dictionary'), c.id).toBe(true);
        continue;
      }
      graded++;
      const byRoute = routes[c.id];
      expect(Object.keys(byRoute).length, c.id).toBeGreaterThanOrEqual(3);
      for (const [name, vals] of Object.entries(byRoute)) {
        const r = grade(
          c.reference,
          vals.map(([re, im]) => ({ re, im })),
        );
        if (Math.abs(r.points - r.maxPoints) > 1e-9) failures.push(`${c.id}, ${name}: ${r.points}/${r.maxPoints}`);
        expect(r.flags.some((f) => f.code === 'near-miss'), `${c.id}, ${name}`).toBe(false);
      }
    }
    expect(failures).toEqual([]);
    expect(graded).toBeGreaterThanOrEqual(34);
  });
});

describe('wrong answers lose credit', () => {
  it('a determined value moved by 10× the stated tolerance loses exactly its share (each case with graded values)', () => {
    for (const c of cases) {
      const idx = gradedIndices(c);
      if (idx.length === 0) continue;
      // the graded value of largest |λ|, moved outwards along its ray (nothing else lies there)
      const j = idx.reduce((a, b) => (Math.hypot(c.reference.eigenvalues[b].re, c.reference.eigenvalues[b].im) > Math.hypot(c.reference.eigenvalues[a].re, c.reference.eigenvalues[a].im) ? b : a));
      const z = c.reference.eigenvalues[j];
      const mag = Math.hypot(z.re, z.im);
      const stated = Math.max(1e-6, 1e-3 * mag); // default absTol, relTol
      const f = (mag + 10 * stated) / mag;
      const moved = values(c).map((v, k) => (k === j ? { re: v.re * f, im: v.im * f } : v));
      const r = grade(c.reference, moved);
      expect(r.points, c.id).toBeCloseTo(10 - 10 / idx.length, 6);
      const m = r.parts[0].matches.find((x) => x.referenceIndex === j);
      if (m) expect(m.credit, c.id).toBe(0);
    }
  });

  it('a wrong rank (r − 2, r − 1, r + 1, r + 2) loses credit: DMD and kernel EDMD at noise 1e-3', async () => {
    // References at a rank below the numerical maximum, so that both directions exist.
    const setups = [
      { scenario: 'linear-field', method: 'dmd', rank: 7 },
      { scenario: 'wave-field', method: 'dmd', rank: 4 },
      { scenario: 'vibration', method: 'dmd', rank: 6 },
      { scenario: 'vibration', method: 'kernel-edmd', rank: 20 },
      { scenario: 'linear-field', method: 'kernel-edmd', rank: 36 },
    ] as const;
    for (const s of setups) {
      const sc = generateScenario(s.scenario, { seed: 3, noise: 1e-3 });
      const { reference } = await computeReference(sc.source, requestFor(s.method, 2, s.rank));
      for (const q of [s.rank - 2, s.rank - 1, s.rank + 1, s.rank + 2]) {
        const { reference: wrong } = await computeReference(sc.source, { ...requestFor(s.method, 2, q), options: { ...requestFor(s.method, 2, q).options, rankBand: false, sensitivity: false } } as never);
        const submitted = wrong.eigenvalues.map((e) => ({ re: e.re, im: e.im }));
        // Below r a value is missing under the default settings; above r the extra value costs credit in an
        // assignment that asks for exactly r values (extraPenalty 1).
        const r = grade(reference, submitted, q > s.rank ? { extraPenalty: 1 } : {});
        expect(r.points, `${s.scenario} ${s.method} rank ${q} for ${s.rank}`).toBeLessThan(r.maxPoints - 1e-6);
      }
    }
  });

  it('a wrong kernel degree (3 for 2) loses credit: kernel EDMD on every scenario at noise 1e-3', async () => {
    for (const c of cases.filter((x) => x.method === 'kernel-edmd' && x.noise === 1e-3)) {
      const { reference: wrong } = await computeReference(c.source, { method: 'kernel-edmd', options: { kernel: { kind: 'polynomial', degree: 3 }, truncation: { kind: 'rank', rank: c.reference.rank }, rankBand: false, sensitivity: false } });
      const r = grade(
        c.reference,
        wrong.eigenvalues.map((e) => ({ re: e.re, im: e.im })),
      );
      expect(r.points, c.id).toBeLessThan(r.maxPoints - 1e-6);
    }
  });
});
