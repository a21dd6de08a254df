/**
 * `npm run bench`: our engine against a straightforward NumPy transcription of
 * the same steps, on the same seeded data, in the same run.
 *
 *   npm run bench                 readable table
 *   npm run -s bench -- --json    one JSON line per workload
 *   options: --reps N (default 5), --only NAME[,NAME], --no-sensitivity
 *
 * After each workload a second row times the same run with the measured sensitivity of issue 8 (3 draws of
 * float32-level perturbed data, eigenvalues only at the same rank): "sens/run" is that run's time over the
 * plain run's, so the step itself costs sens/run − 1 plain runs.
 *
 * Each workload's data is built once and written to bench/out/NAME.npy. Our
 * side runs in a child process per workload (so peak_rss_mb is that workload
 * alone); NumPy runs in a python3 subprocess with OPENBLAS_CORETYPE and
 * OPENBLAS_L2_SIZE removed from its environment. Both sides do one untimed
 * warm-up run, then REPS timed runs; the figures are medians.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, statSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { linearSumAssignment } from 'linear-sum-assignment';
import { buildTrajectory, WORKLOADS, type Workload } from './workloads.js';
import { writeNpyFortran } from './npy-lean.js';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..');
const outDir = join(here, 'out');

interface SideResult {
  times: number[];
  re: number[];
  im: number[];
  maxrss_mb?: number;
  route?: string;
  threads?: boolean;
  helperError?: string | null;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : 0.5 * (s[h - 1] + s[h]);
}

/** Max over matched pairs of |λ_ours − λ_numpy| / |λ_numpy|, after optimal assignment on |Δλ|. */
export function eigenvalueAgreement(a: SideResult, b: SideResult): { maxRel: number; maxAbs: number; count: number } {
  const na = a.re.length, nb = b.re.length;
  if (na === 0 || nb === 0) return { maxRel: NaN, maxAbs: NaN, count: 0 };
  const cost: number[][] = [];
  for (let i = 0; i < na; i++) {
    const row: number[] = [];
    for (let j = 0; j < nb; j++) row.push(Math.hypot(a.re[i] - b.re[j], a.im[i] - b.im[j]));
    cost.push(row);
  }
  const { rowAssignments } = linearSumAssignment(cost, { maximaze: false });
  let maxRel = 0, maxAbs = 0, count = 0;
  for (let i = 0; i < na; i++) {
    const j = rowAssignments[i];
    if (j < 0) continue;
    const dev = cost[i][j];
    const mag = Math.hypot(b.re[j], b.im[j]);
    maxAbs = Math.max(maxAbs, dev);
    maxRel = Math.max(maxRel, mag > 0 ? dev / mag : dev);
    count++;
  }
  return { maxRel, maxAbs, count };
}

function parseArgs(argv: string[]): { json: boolean; reps: number; only: string[] | null; sensitivity: boolean } {
  let json = false, reps = 5, sensitivity = true;
  let only: string[] | null = null;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--json') json = true;
    else if (a === '--reps') reps = Math.max(1, Number(argv[++i]) || 5);
    else if (a === '--only') only = (argv[++i] ?? '').split(',').filter(Boolean);
    else if (a === '--no-sensitivity') sensitivity = false;
    else throw new Error(`unknown option ${a} (known: --json, --reps N, --only NAME[,NAME], --no-sensitivity)`);
  }
  return { json, reps, only, sensitivity };
}

function ensureData(w: Workload): string {
  mkdirSync(outDir, { recursive: true });
  const file = join(outDir, `${w.name}-seed${w.seed}-${w.n}x${w.m + 1}.npy`);
  const bytes = 8 * w.n * (w.m + 1);
  if (!existsSync(file) || statSync(file).size < bytes) writeNpyFortran(file, buildTrajectory(w), w.n, w.m + 1);
  return file;
}

function runJson(cmd: string, args: string[], env: NodeJS.ProcessEnv, what: string): SideResult {
  const res = spawnSync(cmd, args, { cwd: root, env, encoding: 'utf8', maxBuffer: 64 << 20 });
  if (res.error) throw new Error(`${what}: could not start ${cmd}: ${res.error.message}`);
  if (res.status !== 0) throw new Error(`${what}: ${cmd} exited with ${res.status}\n${res.stderr}`);
  const line = res.stdout.trim().split('\n').pop() ?? '';
  return JSON.parse(line) as SideResult;
}

function main(): void {
  const { json, reps, only, sensitivity } = parseArgs(process.argv.slice(2));
  const workloads = WORKLOADS.filter((w) => !only || only.includes(w.name));
  const numpyEnv = { ...process.env };
  delete numpyEnv.OPENBLAS_CORETYPE;
  delete numpyEnv.OPENBLAS_L2_SIZE;
  const tsx = join(root, 'node_modules', '.bin', 'tsx');
  const notes: string[] = [];
  const head = ['workload', 'problem', 'ours s', 'NumPy s', 'ours/NumPy', 'peak RSS MB'];
  const widths = [13, 36, 8, 8, 10, 11];
  const fmt = (r: string[]) => r.map((c, i) => (i < 2 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join('  ');
  if (!json) {
    console.log(`Modewright engine vs NumPy, ${reps} timed runs each after one warm-up (medians), ${availableParallelism()} cores`);
    console.log(fmt(head));
    console.log(widths.map((x) => '-'.repeat(x)).join('  '));
  }
  let failed = 0;
  for (const w of workloads) {
    try {
      runWorkload(w);
    } catch (err) {
      failed++;
      process.stderr.write(`${w.name}: ${err instanceof Error ? err.message : String(err)}\n`);
    }
  }
  function runWorkload(w: Workload): void {
    const file = ensureData(w);
    const ours = runJson(tsx, [join(here, 'engine-child.ts'), file, JSON.stringify(w), String(reps)], process.env, `${w.name} (ours)`);
    const np = runJson('python3', [join(here, 'numpy_kernel_edmd.py'), file, w.method, String(w.rank), String(reps), '2'], numpyEnv, `${w.name} (NumPy)`);
    const oursS = median(ours.times), npS = median(np.times);
    const agree = eigenvalueAgreement(ours, np);
    const record = {
      workload: w.name,
      ours_s: Number(oursS.toFixed(4)),
      numpy_s: Number(npS.toFixed(4)),
      ratio: Number((oursS / npS).toFixed(2)),
      peak_rss_mb: Number((ours.maxrss_mb ?? NaN).toFixed(1)),
    };
    if (json) process.stdout.write(JSON.stringify(record) + '\n');
    else console.log(fmt([w.name, `${w.method} m=${w.m} n=${w.n} r=${w.rank}`, oursS.toFixed(3), npS.toFixed(3), record.ratio.toFixed(2), record.peak_rss_mb.toFixed(0)]));
    if (sensitivity) {
      const withSens = runJson(tsx, [join(here, 'engine-child.ts'), file, JSON.stringify(w), String(reps), '3'], process.env, `${w.name} (ours, with sensitivity)`);
      const sensS = median(withSens.times);
      const rec = { workload: `${w.name}+sensitivity`, ours_s: Number(sensS.toFixed(4)), sens_over_run: Number((sensS / oursS).toFixed(2)), peak_rss_mb: Number((withSens.maxrss_mb ?? NaN).toFixed(1)) };
      if (json) process.stdout.write(JSON.stringify(rec) + '\n');
      else console.log(fmt([`  +sensitivity`, `same, 3 float32-level draws`, sensS.toFixed(3), '', `${rec.sens_over_run.toFixed(2)}× run`, rec.peak_rss_mb.toFixed(0)]));
    }
    notes.push(
      `${w.name}: eigenvalue agreement with NumPy: max relative deviation ${agree.maxRel.toExponential(2)} (max absolute ${agree.maxAbs.toExponential(2)}) over ${agree.count} matched pairs; `
      + `our route: ${ours.route}; helper thread: ${ours.threads ? 'yes' : `no${ours.helperError ? ` (${ours.helperError})` : ''}`}`,
    );
  }
  const out = json ? (t: string) => process.stderr.write(t + '\n') : (t: string) => console.log(t);
  if (!json) out('');
  for (const n of notes) out(n);
  out('NumPy side: Gram products the straightforward way, full eigh, eig; exact DMD by the method of snapshots (eigh of XᵀX, U = XVΣ⁻¹).');
  if (failed) process.exitCode = 1;
}

main();
