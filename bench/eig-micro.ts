/**
 * Micro-benchmark of the general eigensolver (development aid, not a test):
 * npx tsx bench/eig-micro.ts [SIZE ...] [--reps N]
 * "old" is the previous route (ml-matrix EigenvalueDecomposition, then a complex
 * LU inverse of V for the left eigenvectors); "new" is generalEigen. Seeded
 * random dense matrices (entries uniform in [−0.5, 0.5)); warm JIT; medians.
 */
import { cadjoint, cinverse, columnNorm, type ComplexMatrix } from '../grading/linalg/complex.js';
import { eigenvaluesOnly, generalEigen, rightEigenMlMatrix } from '../grading/linalg/eigen.js';

const args = process.argv.slice(2);
const repsAt = args.indexOf('--reps');
const reps = repsAt >= 0 ? Number(args[repsAt + 1]) : 15;
const sizes = args.filter((_, i) => repsAt < 0 || (i !== repsAt && i !== repsAt + 1)).map(Number);
if (sizes.length === 0) sizes.push(100);
if (!(Number.isInteger(reps) && reps >= 1) || sizes.some((s) => !(Number.isInteger(s) && s >= 1))) {
  console.error('usage: npx tsx bench/eig-micro.ts [SIZE ...] [--reps N]   (positive integers)');
  process.exit(2);
}

function randomMatrix(k: number, seed: number): Float64Array {
  let s = seed % 2147483647 || 1;
  const a = new Float64Array(k * k);
  for (let t = 0; t < a.length; t++) {
    s = (s * 16807) % 2147483647;
    a[t] = s / 2147483647 - 0.5;
  }
  return a;
}

/** The previous generalEigen: ml-matrix right eigenpairs, W = (V⁻¹)ᴴ by complex LU, κ_j = ‖w_j‖‖v_j‖. */
function oldGeneralEigen(a: Float64Array, k: number): { left: ComplexMatrix; condition: Float64Array } {
  const { vectors } = rightEigenMlMatrix(a, k);
  const left = cadjoint(cinverse(vectors));
  const condition = new Float64Array(k);
  for (let c = 0; c < k; c++) condition[c] = columnNorm(left, c) * columnNorm(vectors, c);
  return { left, condition };
}

function median(xs: number[]): number {
  const s = [...xs].sort((x, y) => x - y);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : 0.5 * (s[h - 1] + s[h]);
}

function timed(f: () => unknown): number {
  const t0 = performance.now();
  f();
  return performance.now() - t0;
}

console.log('Medians (fastest run in brackets); the routes take turns, so a busy machine slows both alike.');
console.log('size      old ms           new ms     ratio   eigenvalues only ms');
for (const k of sizes) {
  const mats = Array.from({ length: 4 }, (_, i) => randomMatrix(k, 1000 + 17 * k + i));
  const runs = { old: [] as number[], new: [] as number[], values: [] as number[] };
  // Warm-up: let the JIT compile both routes before timing.
  const warm = Math.max(5, Math.min(30, Math.round(2e6 / (k * k * k))));
  for (let r = -warm; r < reps; r++) {
    const a = mats[(r + warm) % mats.length];
    const tOld = timed(() => oldGeneralEigen(a, k));
    const tNew = timed(() => generalEigen(a, k));
    const tVal = timed(() => eigenvaluesOnly(a, k));
    if (r < 0) continue;
    runs.old.push(tOld);
    runs.new.push(tNew);
    runs.values.push(tVal);
  }
  const f = (xs: number[]) => `${median(xs).toFixed(2).padStart(7)} [${Math.min(...xs).toFixed(2).padStart(6)}]`;
  console.log(`${String(k).padStart(4)}  ${f(runs.old)}  ${f(runs.new)}  ${(median(runs.old) / median(runs.new)).toFixed(1).padStart(5)}  ${f(runs.values)}`);
}
