/**
 * Worker-thread entry of the engine pool: computes references and variant
 * bytes off the API server's event loop. Pure calls into grading/.
 */
import { computeVariantReference, materializeVariant, variantCsv, type StoredDataset, type TaskRun, type VariantRecipe } from '../../grading/assignment.js';
import { DatasetFormatError } from '../../grading/formats/errors.js';
import { SpectrumInputError } from '../../grading/methods/types.js';
import { generateScenario } from '../../grading/scenarios/scenarios.js';

export type EngineTask =
  | { kind: 'reference'; dataset: StoredDataset; recipe: VariantRecipe; task: TaskRun; meta: Record<string, unknown> }
  | { kind: 'materialize'; dataset: StoredDataset; recipe: VariantRecipe; csv: boolean }
  | { kind: 'warm-up' };

export interface EngineFailure {
  failed: true;
  /** A problem of the data or the task (no retry will change it). */
  permanent: boolean;
  message: string;
}

export default async function run(t: EngineTask): Promise<unknown> {
  if (t.kind === 'warm-up') {
    // Load the engine's modules and kernels once, before the first real job.
    const sc = generateScenario('drift-map', { seed: 1, samples: 40 });
    await computeVariantReference(sc.source, { method: { method: 'kernel-edmd', kernel: 'polynomial', degree: 2, rankRule: { kind: 'rank', rank: 5 } }, order: 'magnitude' });
    return { ok: true };
  }
  try {
    const v = materializeVariant(t.dataset, t.recipe);
    if (t.kind === 'materialize') {
      return {
        checksum: v.checksum,
        npyX: v.npyX,
        npyY: v.npyY ?? null,
        csvX: t.csv ? variantCsv(v.x) : null,
        csvY: t.csv && v.y ? variantCsv(v.y) : null,
        shape: [v.x.n, v.x.k],
        parameters: v.parameters,
        dt: v.dt,
      };
    }
    const dt = t.task.dt ?? v.dt ?? undefined;
    const computed = await computeVariantReference(v.source, { ...t.task, dt }, t.meta);
    return { checksum: v.checksum, parameters: v.parameters, ...computed };
  } catch (e) {
    const permanent = e instanceof SpectrumInputError || e instanceof DatasetFormatError || e instanceof RangeError;
    const failure: EngineFailure = { failed: true, permanent, message: e instanceof Error ? e.message : String(e) };
    return failure;
  }
}
