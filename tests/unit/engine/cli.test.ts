import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { referenceSpectrum } from '../../../shared/reference';
import { readNpy } from '../../../grading/formats/npy';
import { readFileSync } from 'node:fs';

const ROOT = join(__dirname, '..', '..', '..');
const dir = mkdtempSync(join(tmpdir(), 'modewright-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function spectrum(args: string[]) {
  return spawnSync('npx', ['tsx', 'grading/cli.ts', ...args], { cwd: ROOT, encoding: 'utf8', timeout: 60_000 });
}

// A trajectory of x' = R x, R a rotation by 0.3 rad scaled by 0.9 (eigenvalues 0.9 e^{±0.3i}); written here.
function rotationCsv(): string {
  const rows: string[] = ['x1,x2,x3'];
  let x = [1, 0.2, 0.5];
  const c = 0.9 * Math.cos(0.3);
  const s = 0.9 * Math.sin(0.3);
  const cols: number[][] = [];
  for (let k = 0; k < 12; k++) {
    cols.push(x);
    x = [c * x[0] - s * x[1], s * x[0] + c * x[1], 0.5 * x[2]];
  }
  // one snapshot per row
  for (const v of cols) rows.push(v.join(','));
  return rows.join('\n') + '\n';
}

describe('Command line: npm run -s spectrum (grading/cli.ts)', () => {
  const file = join(dir, 'rot.csv');
  writeFileSync(file, rotationCsv());
  it('--json prints one reference-spectrum object in the requested order, continuous values with --dt', () => {
    const r = spectrum([file, '--layout', 'rows', '--json', '--dt', '0.1', '--order', 'magnitude']);
    expect(r.status, r.stderr).toBe(0);
    const lines = r.stdout.trim().split('\n');
    expect(lines).toHaveLength(1);
    const ref = referenceSpectrum.parse(JSON.parse(lines[0]));
    expect(ref.method).toBe('dmd');
    expect([ref.n, ref.m, ref.rank]).toEqual([3, 11, 3]);
    expect(ref.eigenvalues.map((e) => Math.hypot(e.re, e.im))).toEqual([expect.closeTo(0.9, 10), expect.closeTo(0.9, 10), expect.closeTo(0.5, 10)]);
    expect(ref.eigenvalues[0].im).toBeCloseTo(0.9 * Math.sin(0.3), 10);
    expect(ref.eigenvalues[1].im).toBe(-ref.eigenvalues[0].im);
    expect(ref.continuous?.[0].re).toBeCloseTo(Math.log(0.9) / 0.1, 8);
    expect(ref.continuous?.[0].im).toBeCloseTo(3, 8);
    expect(ref.hash).toMatch(/^[0-9a-f]{64}$/);
    expect(ref.eigenvalues.every((e) => e.condition >= 1 - 1e-9)).toBe(true);
  });
  it('no continuous values without --dt; --top splits no conjugate pair', () => {
    const r = spectrum([file, '--layout', 'rows', '--json', '--top', '1']);
    expect(r.status, r.stderr).toBe(0);
    const ref = referenceSpectrum.parse(JSON.parse(r.stdout));
    expect(ref.continuous).toBeUndefined();
    expect(ref.eigenvalues).toHaveLength(2);
    expect(ref.eigenvalues[0].im).toBe(-ref.eigenvalues[1].im);
  });
  it('kernel EDMD and EDMD run from the command line', () => {
    const k = spectrum([file, '--layout', 'rows', '--json', '--method', 'kernel-edmd', '--kernel', 'linear', '--rank', '3']);
    expect(k.status, k.stderr).toBe(0);
    expect(referenceSpectrum.parse(JSON.parse(k.stdout)).method).toBe('kernel-edmd');
    const e = spectrum([file, '--layout', 'rows', '--json', '--method', 'edmd', '--degree', '1']);
    expect(e.status, e.stderr).toBe(0);
    expect(referenceSpectrum.parse(JSON.parse(e.stdout)).rank).toBe(4);
  });
  it('--scenario with --write saves a .npy file and prints the spectrum', () => {
    const out = join(dir, 'wave.npy');
    const r = spectrum(['--scenario', 'wave-field', '--seed', '5', '--write', out, '--json']);
    expect(r.status, r.stderr).toBe(0);
    expect(existsSync(out)).toBe(true);
    const a = readNpy(new Uint8Array(readFileSync(out)), 'wave.npy');
    expect(a.shape).toEqual([64, 160]);
    expect(referenceSpectrum.parse(JSON.parse(r.stdout)).rank).toBe(4);
  });
  it('--help documents every option', () => {
    const r = spectrum(['--help']);
    expect(r.status).toBe(0);
    for (const opt of ['--method', '--pairs', '--layout', '--rank', '--rank-tol', '--energy', '--kernel', '--degree', '--coef0', '--gamma', '--sigma', '--dictionary', '--centres', '--centres-every', '--centres-at', '--dt', '--order', '--top', '--json', '--scenario', '--seed', '--write']) {
      expect(r.stdout).toContain(opt);
    }
  });
  const bad: [string, string[], RegExp][] = [
    ['a non-numeric cell', ['BAD'], /^spectrum: bad\.csv:3:3: non-numeric cell "oops"/],
    ['a rank above the maximum', ['ROT', '--layout', 'rows', '--rank', '7'], /the maximum is 3/],
    ['an unknown option', ['ROT', '--frobnicate'], /frobnicate/],
    ['a missing file', [join(dir, 'nope.csv')], /no such file/],
    ['an unknown method', ['ROT', '--method', 'svd'], /--method expects one of dmd, edmd, kernel-edmd/],
    ['X and Y of different shapes', ['ROT', '--pairs', 'BAD2', '--layout', 'rows'], /X and Y shapes disagree/],
    // 12 snapshots in one trajectory: X has 11 (0-based columns 0 … 10).
    ['a radial centre past the end of X', ['ROT', '--layout', 'rows', '--method', 'edmd', '--dictionary', 'radial', '--sigma', '1', '--centres-at', '0,11'], /radial centre 2 is snapshot 11 of X, but X has 11 snapshots \(0-based columns 0 … 10\)/],
    ['a radial dictionary without centres', ['ROT', '--layout', 'rows', '--method', 'edmd', '--dictionary', 'radial', '--sigma', '1'], /--dictionary radial needs its centres: --centres-every S, --centres-at LIST or --centres FILE/],
  ];
  writeFileSync(join(dir, 'bad.csv'), '1,2\n3,4\n5,oops\n');
  writeFileSync(join(dir, 'bad2.csv'), '1,2\n3,4\n');
  for (const [what, args, re] of bad) {
    it(`bad input (${what}): exit code 2 and one line on stderr`, () => {
      const r = spectrum(args.map((a) => (a === 'BAD' ? join(dir, 'bad.csv') : a === 'ROT' ? file : a === 'BAD2' ? join(dir, 'bad2.csv') : a)));
      expect(r.status).toBe(2);
      expect(r.stdout).toBe('');
      const lines = r.stderr.trim().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(re);
    });
  }
});
