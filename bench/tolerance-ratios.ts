/**
 * The note's measurement for issue 8: per demo scenario, noise level and method, the median over graded
 * reference eigenvalues of (tolerance the scorer reports) / (stated tolerance max(absTol, relTol·|λ|)), with the
 * default settings, before (engine and scorer of commit BEFORE, extracted with `git archive` into a temporary
 * directory) and after (this checkout); plus how many values each grades.
 *
 *   npx tsx bench/tolerance-ratios.ts [--before COMMIT]      (default 5be3602, main before issue 8)
 */
import { execSync } from 'node:child_process';
import { mkdtempSync, rmSync, symlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { scenarioNames } from '../grading/scenarios/scenarios.js';

const root = join(import.meta.dirname, '..');
const argv = process.argv.slice(2);
const before = argv[0] === '--before' ? argv[1] : '5be3602';

type AnyFn = (...a: any[]) => any; // eslint-disable-line @typescript-eslint/no-explicit-any
interface Side {
  exactDmd: AnyFn;
  edmd: AnyFn;
  kernelEdmd: AnyFn;
  toReferenceSpectrum: AnyFn;
  referenceTolerances: AnyFn;
  gradingSettings: { parse: AnyFn };
  generateScenario: AnyFn;
}

async function load(dir: string): Promise<Side> {
  const imp = (p: string) => import(pathToFileURL(join(dir, p)).href);
  const [dmd, edmd, kedmd, ref, score, report, sc] = await Promise.all([
    imp('grading/methods/dmd.ts'),
    imp('grading/methods/edmd.ts'),
    imp('grading/methods/kernel-edmd.ts'),
    imp('grading/methods/reference.ts'),
    imp('grading/scoring/score.ts'),
    imp('shared/score-report.ts'),
    imp('grading/scenarios/scenarios.ts'),
  ]);
  return { exactDmd: dmd.exactDmd, edmd: edmd.edmd, kernelEdmd: kedmd.kernelEdmd, toReferenceSpectrum: ref.toReferenceSpectrum, referenceTolerances: score.referenceTolerances, gradingSettings: report.gradingSettings, generateScenario: sc.generateScenario };
}

function median(xs: number[]): number {
  if (xs.length === 0) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : 0.5 * (s[h - 1] + s[h]);
}

async function ratios(side: Side, scenario: string, noise: number, method: string, isNew: boolean): Promise<{ median: number; max: number; graded: number; total: number }> {
  const sc = side.generateScenario(scenario, { seed: 3, noise });
  const extra = isNew ? { sensitivity: true } : {};
  const degree = method === 'edmd' && scenario === 'wave-field' ? 1 : 2;
  const result =
    method === 'dmd'
      ? await side.exactDmd(sc.source, { ...extra })
      : method === 'edmd'
        ? await side.edmd(sc.source, { dictionary: { kind: 'monomial', degree }, ...extra })
        : await side.kernelEdmd(sc.source, { kernel: { kind: 'polynomial', degree: 2 }, ...extra });
  const ref = side.toReferenceSpectrum(result);
  const settings = side.gradingSettings.parse({});
  const refs = side.referenceTolerances(ref, settings, 'discrete', null) as { value: { re: number; im: number }; tolerance: number; excludedReason: string | null }[];
  const graded = refs.filter((r) => !r.excludedReason);
  const rs = graded.map((r) => r.tolerance / Math.max(settings.absTol, settings.relTol * Math.hypot(r.value.re, r.value.im)));
  return { median: median(rs), max: rs.length ? Math.max(...rs) : NaN, graded: graded.length, total: refs.length };
}

async function main(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'modewright-before-'));
  try {
    execSync(`git archive ${before} grading shared | tar -x -C ${dir}`, { cwd: root });
    symlinkSync(join(root, 'node_modules'), join(dir, 'node_modules'));
    execSync(`cp ${join(root, 'package.json')} ${dir}/`);
    const old = await load(dir);
    const cur = await load(root);
    console.log(`median (max) of reported / stated tolerance over graded values, default settings; before = ${before}, after = this checkout`);
    console.log(['scenario', 'noise', 'method', 'before', 'graded', 'after', 'graded'].join('\t'));
    for (const scenario of scenarioNames) {
      for (const noise of [0, 1e-3, 1e-2]) {
        for (const method of ['dmd', 'edmd', 'kernel-edmd']) {
          const b = await ratios(old, scenario, noise, method, false);
          const a = await ratios(cur, scenario, noise, method, true);
          const f = (x: number) => (Number.isFinite(x) ? (x >= 100 ? x.toExponential(1) : x.toFixed(2)) : '-');
          console.log([scenario, noise, method, `${f(b.median)} (${f(b.max)})`, `${b.graded}/${b.total}`, `${f(a.median)} (${f(a.max)})`, `${a.graded}/${a.total}`].join('\t'));
        }
      }
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  process.exit(0);
}

main().catch((e: unknown) => {
  console.error(e);
  process.exit(1);
});
