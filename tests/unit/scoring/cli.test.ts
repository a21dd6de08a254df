import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { scoreReport } from '../../../shared/score-report';
import { fixtureDir, repoRoot } from './helpers';

function grade(...args: string[]) {
  const r = spawnSync('npx', ['tsx', 'grading/scoring/cli.ts', ...args], { cwd: repoRoot, encoding: 'utf8' });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}
const REF = join(fixtureDir, 'REF.json');
const tmp = mkdtempSync(join(tmpdir(), 'modewright-grade-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('npm run grade (grading/scoring/cli.ts)', () => {
  it('--json prints a score report with points, maxPoints and flags', () => {
    const r = grade('--reference', REF, '--submission', join(fixtureDir, 'numpy-savetxt-complex.txt'), '--json');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const report = scoreReport.parse(JSON.parse(r.stdout));
    expect(report).toMatchObject({ points: 10, maxPoints: 10, flags: [] });
    expect(report.parts[0].matches).toHaveLength(6);
  });

  it('flags as {code, message}, and --abs-tol / --rel-tol change the grading', () => {
    const file = join(tmp, 'ev.txt');
    writeFileSync(file, '0.955+0.2j\n0.95-0.2j\n0.8\n0.5+0.1j\n0.5-0.1j\n0.3\n9\n');
    const strict = scoreReport.parse(JSON.parse(grade('--reference', REF, '--submission', file, '--json').stdout));
    expect(strict.points).toBeCloseTo(10 - 10 / 6, 9);
    expect(strict.flags.map((f) => f.code)).toEqual(expect.arrayContaining(['missing-values', 'extra-values']));
    for (const f of strict.flags) expect(Object.keys(f).sort()).toEqual(expect.arrayContaining(['code', 'message']));
    const loose = scoreReport.parse(JSON.parse(grade('--reference', REF, '--submission', file, '--json', '--abs-tol', '0.01').stdout));
    expect(loose.points).toBe(10);
    expect(loose.computedFrom.settings.absTol).toBe(0.01);
    const rel = scoreReport.parse(JSON.parse(grade('--reference', REF, '--submission', file, '--json', '--rel-tol', '0.01').stdout));
    expect(rel.points).toBe(10);
  });

  it('--domain continuous --dt grades ω values', () => {
    const file = join(tmp, 'omega.json');
    const omega = [
      [-0.2960967982998565, 2.0749622643520267],
      [-0.2960967982998565, -2.0749622643520267],
      [-2.231435513142097, 0],
      [-6.735368239833046, 1.9739555984988078],
      [-6.735368239833046, -1.9739555984988078],
      [-12.03972804325936, 0],
    ];
    writeFileSync(file, JSON.stringify(omega));
    const asked = scoreReport.parse(JSON.parse(grade('--reference', REF, '--submission', file, '--json', '--domain', 'continuous', '--dt', '0.1').stdout));
    expect(asked.points).toBe(10);
    const discrete = scoreReport.parse(JSON.parse(grade('--reference', REF, '--submission', file, '--json').stdout));
    expect(discrete.points).toBe(0);
    expect(discrete.flags.map((f) => f.code)).toContain('wrong-domain');
  });

  it('a malformed submission exits with code 2 and one line on stderr naming the line and what was expected', () => {
    const r = grade('--reference', REF, '--submission', join(fixtureDir, 'malformed-letter.csv'), '--json');
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    const lines = r.stderr.split('\n').filter((l) => l !== '');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/malformed-letter\.csv, part "eigenvalues", line 4, column 5: expected a number/);
  });

  it('without --json prints a readable summary', () => {
    const r = grade('--reference', REF, '--submission', join(fixtureDir, 'matlab-disp.txt'));
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^Score: 10 \/ 10 points \(provisional/);
    expect(r.stdout).toMatch(/tolerance/);
  });

  it('--settings reads an assignment with several parts, one file per part', () => {
    const settings = join(tmp, 'settings.json');
    writeFileSync(settings, JSON.stringify({ parts: [{ name: 'eigenvalues', kind: 'eigenvalues', weight: 6 }, { name: 'prediction', kind: 'prediction', weight: 4 }] }));
    const ref = join(tmp, 'ref-with-snapshot.json');
    writeFileSync(ref, JSON.stringify({ ...JSON.parse(readFileSync(REF, 'utf8')), prediction: [{ re: 1, im: 0 }, { re: 2, im: 0 }] }));
    const pred = join(tmp, 'prediction.txt');
    writeFileSync(pred, '1\n2\n');
    const r = grade('--reference', ref, '--submission', join(fixtureDir, 'julia-writedlm.txt'), '--submission', pred, '--settings', settings, '--json');
    expect(r.stderr).toBe('');
    const report = scoreReport.parse(JSON.parse(r.stdout));
    // eigenvalues 6 (julia-writedlm.txt, the one file not named after a part) + prediction 4
    expect(report.points).toBe(10);
    expect(report.parts.map((p) => [p.name, p.points])).toEqual([
      ['eigenvalues', 6],
      ['prediction', 4],
    ]);
  });

  it('--help documents every option', () => {
    const r = grade('--help');
    expect(r.code).toBe(0);
    for (const opt of ['--reference', '--submission', '--settings', '--abs-tol', '--rel-tol', '--domain', '--dt', '--json', '--help']) expect(r.stdout).toContain(opt);
  });

  it('bad options and an unreadable reference exit 1 with a message', () => {
    expect(grade('--submission', REF).code).toBe(1);
    const r = grade('--reference', join(tmp, 'nope.json'), '--submission', REF);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/cannot read the reference file/);
    expect(grade('--reference', REF, '--submission', REF, '--abs-tol', 'x').stderr).toMatch(/--abs-tol expects a finite number/);
  });
});
