import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeNpy } from '../../../grading/formats/npy';
import { computeReference, type ReferenceRequest } from '../../../grading/methods/reference';
import { pairMatrices } from '../../../grading/methods/pairs';
import type { PairSource } from '../../../grading/methods/types';
import { generateScenario, scenarioNames, type ScenarioName } from '../../../grading/scenarios/scenarios';
import { gradeSubmission } from '../../../grading/scoring/score';
import type { ComplexNumber, Submission } from '../../../grading/formats/submission-types';
import type { ReferenceSpectrum } from '../../../shared/reference';
import type { GradingSettingsInput, ScoreReport } from '../../../shared/score-report';

export const ORACLE_DIR = join(__dirname, '..', '..', 'oracle');
export { numpyAvailable, NUMPY_MISSING } from '../engine/helpers';
export const NOISES = [0, 1e-3, 1e-2] as const;
export type MethodName = 'dmd' | 'edmd' | 'kernel-edmd';
export const METHODS: MethodName[] = ['dmd', 'edmd', 'kernel-edmd'];

export interface Case {
  id: string;
  scenario: ScenarioName;
  noise: number;
  method: MethodName;
  source: PairSource;
  degree: number;
  request: ReferenceRequest;
  reference: ReferenceSpectrum;
}

/** EDMD degree per scenario: 2, except the 64-point wave field (degree 2 would be 2145 functions, over the limit). */
export const edmdDegree = (s: ScenarioName) => (s === 'wave-field' ? 1 : 2);

export function requestFor(method: MethodName, degree: number, rank?: number): ReferenceRequest {
  if (method === 'dmd') return { method, options: rank ? { truncation: { kind: 'rank', rank } } : {} };
  if (method === 'edmd') return { method, options: { dictionary: { kind: 'monomial', degree } } };
  return { method, options: { kernel: { kind: 'polynomial', degree }, ...(rank ? { truncation: { kind: 'rank', rank } } : {}) } };
}

export async function buildCases(seed = 3): Promise<Case[]> {
  const cases: Case[] = [];
  for (const scenario of scenarioNames) {
    for (const noise of NOISES) {
      const sc = generateScenario(scenario, { seed, noise });
      for (const method of METHODS) {
        const degree = method === 'edmd' ? edmdDegree(scenario) : 2;
        const request = requestFor(method, degree);
        const { reference } = await computeReference(sc.source, request);
        cases.push({ id: `${scenario} noise ${noise} ${method}`, scenario, noise, method, source: sc.source, degree, request, reference });
      }
    }
  }
  return cases;
}

/** Run tests/oracle/valid_routes.py on the cases' data: route name → eigenvalues, per case id. */
export function validRoutes(cases: Case[]): Record<string, Record<string, [number, number][]>> {
  const dir = mkdtempSync(join(tmpdir(), 'modewright-routes-'));
  try {
    const jobs = cases.map((c, i) => {
      const { x, y, n, m } = pairMatrices(c.source);
      writeFileSync(join(dir, `x${i}.npy`), writeNpy({ rows: n, cols: m, data: Float64Array.from(x) }));
      writeFileSync(join(dir, `y${i}.npy`), writeNpy({ rows: n, cols: m, data: Float64Array.from(y) }));
      return { id: c.id, method: c.method, x: `x${i}.npy`, y: `y${i}.npy`, rank: c.reference.rank, degree: c.degree };
    });
    writeFileSync(join(dir, 'jobs.json'), JSON.stringify(jobs));
    // one BLAS thread: the machine is shared and the matrices are small
    const env = { ...process.env, OPENBLAS_NUM_THREADS: '1', OMP_NUM_THREADS: '1' };
    const r = spawnSync('python3', [join(ORACLE_DIR, 'valid_routes.py'), dir], { encoding: 'utf8', maxBuffer: 256 << 20, env });
    if (r.status !== 0) throw new Error(`python3 valid_routes.py failed: ${r.stderr}`);
    return JSON.parse(r.stdout);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

export function submission(values: ComplexNumber[]): Submission {
  return { parts: { eigenvalues: { name: 'eigenvalues', kind: 'eigenvalues', file: 'eigenvalues.txt', vectors: [values] } } as Submission['parts'], warnings: [] };
}

export function grade(reference: ReferenceSpectrum, values: ComplexNumber[], settings: GradingSettingsInput = {}): ScoreReport {
  return gradeSubmission({ reference, submission: submission(values), settings });
}
