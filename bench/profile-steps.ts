/** Per-step timings of kernelEdmd on a bench .npy (development aid): tsx bench/profile-steps.ts FILE RANK REPS */
import { backend } from '../grading/linalg/backend.js';
import { generalEigen } from '../grading/linalg/eigen.js';
import { rcmatmul } from '../grading/linalg/complex.js';
import { closePool, warmUp } from '../grading/linalg/pool.js';
import { kernelEdmd, kernelGramMatrices } from '../grading/methods/kernel-edmd.js';
import { innerProducts, validateSource } from '../grading/methods/pairs.js';
import { readNpyShared } from './npy-lean.js';

const [file, rankText, repsText] = process.argv.slice(2);
const r = Number(rankText), reps = Number(repsText ?? 5);
const { data, rows, cols } = readNpyShared(file);
await warmUp();
const source = { kind: 'trajectory' as const, snapshots: { data, n: rows, k: cols } };
const kernel = { kind: 'polynomial' as const, degree: 2 };
const t: Record<string, number[]> = {};
const lap = (name: string, t0: number) => { (t[name] ??= []).push(performance.now() - t0); return performance.now(); };
for (let rep = 0; rep < reps + 1; rep++) {
  let t0 = performance.now();
  validateSource(source); t0 = lap('validate', t0);
  const ip = await innerProducts(source); t0 = lap('innerProducts', t0);
  const { g, a } = kernelGramMatrices(kernel, ip); t0 = lap('kernelMatrices', t0);
  const eig = backend().symmetricEigen(g, ip.m, r); t0 = lap('symEig', t0);
  const m = ip.m, q = eig.vectors, sigma = eig.values.map(Math.sqrt);
  const p1 = await backend().cross(a, q, m, m, r);
  const proj = await backend().cross(p1, q, m, r, r);
  const k = new Float64Array(r * r);
  for (let c = 0; c < r; c++) for (let b = 0; b < r; b++) k[b + c * r] = proj[b + c * r] / (sigma[b] * sigma[c]);
  t0 = lap('Khat', t0);
  const ev = generalEigen(k, r); t0 = lap('generalEigen', t0);
  const qs = new Float64Array(m * r);
  for (let c = 0; c < r; c++) for (let i = 0; i < m; i++) qs[i + c * m] = q[i + c * m] * sigma[c];
  rcmatmul(qs, m, r, ev.right); t0 = lap('phiX', t0);
  const t1 = performance.now();
  await kernelEdmd(source, { kernel, truncation: { kind: 'rank', rank: r }, rankBand: false, modes: false });
  lap('kernelEdmd total', t1);
}
await closePool();
for (const [k, v] of Object.entries(t)) { const s = v.slice(1).sort((x, y) => x - y); console.log(k.padEnd(20), 'median', s[s.length >> 1].toFixed(1), 'min', s[0].toFixed(1), 'ms'); }
