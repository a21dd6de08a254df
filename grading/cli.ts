/**
 * Command line of the spectral engine: `npm run -s spectrum -- DATA [options]`.
 * The only file in grading/ (with grading/scoring/cli.ts) that touches the file system.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { basename } from 'node:path';
import { parseArgs } from 'node:util';
import { readPairSource, readMatrix, toSnapshots, fromSnapshots, type Layout } from './formats/dataset.js';
import { DatasetFormatError } from './formats/errors.js';
import { writeCsv } from './formats/csv.js';
import { writeNpy } from './formats/npy.js';
import { computeReference, type ReferenceRequest } from './methods/reference.js';
import { radialCentres } from './assignment.js';
import { SpectrumInputError, type Dictionary, type Kernel, type Ordering, type PairSource, type RankRule, type SpectrumOptions, type SpectrumResult, type Snapshots } from './methods/types.js';
import { generateScenario, scenarioMatrices, scenarioNames, type ScenarioName } from './scenarios/scenarios.js';

const HELP = `Usage: npm run -s spectrum -- DATA [options]
       npm run -s spectrum -- --scenario NAME --seed S [options]

Computes the spectrum of a snapshot dataset by exact DMD, EDMD or kernel EDMD.

Data
  DATA                    a .npy file (float64/float32, C or Fortran order) or a text file
                          (comma, semicolon or whitespace separated; optional header; # comments)
  --pairs YFILE           DATA holds X and YFILE holds Y (y_i = F(x_i)); without it DATA is one
                          trajectory and the pairs are consecutive snapshots
  --layout columns|rows   one snapshot per column (default) or per row
  --max-mb N              refuse files larger than N MiB (default 256)
  --scenario NAME         generate a demo dataset instead of reading DATA:
                          ${scenarioNames.join(', ')}
  --seed S                seed of the scenario (integer, default 1)
  --noise E               relative noise level of the scenario (default 0)
  --jitter J              relative parameter jitter of the scenario (default 0.02)
  --samples K             number of snapshots or samples of the scenario
  --write FILE            save the dataset as FILE.npy or FILE.csv (explicit pairs: Y goes to
                          FILE with ".y" before the extension)

Method
  --method M              dmd (default), edmd or kernel-edmd
  --rank R                truncation rank; "--rank optimal" uses the optimal hard threshold (DMD)
  --rank-tol T            keep σ_i > T·σ_1 (DMD) or σ_i² > T·σ_1² (kernel EDMD)
  --energy F              smallest rank keeping the fraction F of Σσ² (DMD)
  --kernel K              linear, polynomial (default) or gaussian (kernel EDMD)
  --degree P              polynomial degree of the kernel or the dictionary (default 2)
  --coef0 C               c in (c + γ xᵀy)^p (default 1)
  --gamma G               γ in (c + γ xᵀy)^p (default 1)
  --sigma S               width of the Gaussian kernel or of the radial dictionary
  --dictionary D          monomial (default), hermite or radial (EDMD; radial: the constant and
                          exp(−‖x − c‖²/(2σ²)) for each centre c, width --sigma; gaussian-radial
                          is the same)
  --centres-every S       radial centres: every S-th snapshot of X from the first (0-based
                          columns 0, S, 2S, …; one trajectory: X is every snapshot but the last)
  --centres-at LIST       radial centres: these 0-based columns of X, e.g. 0,17,42
  --centres FILE          radial centres from a file instead (same layout as DATA)
  --cutoff C              relative cut-off of EDMD's least-squares solve on Ψ_X (pivoted QR;
                          default 1e-10); sets the dictionary's numerical rank
  --no-band               skip the rank band (r−2 … r+2)
  --draws N               draws of the measured sensitivity (float32-level perturbations of
                          the data; default 3)
  --no-sensitivity        skip the measured sensitivity

Output
  --dt DT                 time step; adds continuous-time eigenvalues log(λ)/DT
  --order O               magnitude (default), amplitude, unit-circle or frequency
  --top K                 keep the leading K eigenvalues (a conjugate pair is never split)
  --pair-at-cut both|neither   what to do when K falls inside a conjugate pair (default both)
  --json                  print one JSON object (the reference-spectrum format)
  --help                  show this text

Exit status: 0 on success, 2 on bad input (one line on stderr saying what and where).
`;

class UsageError extends Error {}

function num(name: string, v: string | undefined, check: (x: number) => boolean, what: string): number | undefined {
  if (v === undefined) return undefined;
  const x = Number(v);
  if (v.trim() === '' || !Number.isFinite(x) || !check(x)) throw new UsageError(`--${name} expects ${what}, got "${v}"`);
  return x;
}

function oneOf<T extends string>(name: string, v: string | undefined, allowed: readonly T[]): T | undefined {
  if (v === undefined) return undefined;
  if (!(allowed as readonly string[]).includes(v)) throw new UsageError(`--${name} expects one of ${allowed.join(', ')}, got "${v}"`);
  return v as T;
}

function readFile(path: string): { name: string; bytes: Uint8Array } {
  try {
    return { name: basename(path), bytes: new Uint8Array(readFileSync(path)) };
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new UsageError(`${path}: cannot read the file (${code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a directory' : (code ?? String(e))})`);
  }
}

function saveSnapshots(path: string, s: Snapshots, layout: Layout): void {
  const mat = fromSnapshots(s, layout);
  if (/\.npy$/i.test(path)) writeFileSync(path, writeNpy(mat));
  else if (/\.csv$/i.test(path)) writeFileSync(path, writeCsv(mat));
  else throw new UsageError(`--write expects a file name ending in .npy or .csv, got "${path}"`);
}

function withSuffix(path: string, suffix: string): string {
  const m = /^(.*?)(\.[^./\\]+)$/.exec(path);
  return m ? `${m[1]}${suffix}${m[2]}` : `${path}${suffix}`;
}

function fmt(x: number): string {
  return Math.abs(x) >= 1e-3 && Math.abs(x) < 1e4 ? x.toFixed(6) : x.toExponential(4);
}

function table(result: SpectrumResult): string {
  const lines: string[] = [];
  lines.push(`method ${result.method}   n = ${result.n}   m = ${result.m}   rank = ${result.rank} (${result.truncation.rule}; at most ${result.maxRank})`);
  if (result.rankBand) lines.push(`rank band ${result.rankBand.ranks.join(', ')}`);
  if (result.leastSquares) lines.push(`dictionary rank ${result.leastSquares.dictionaryRank} of ${result.leastSquares.dictionarySize} (pivoted QR, relative cut-off ${result.leastSquares.cutoff})`);
  if (result.sensitivity) lines.push(`sensitivity: ${result.sensitivity.draws} draws of the data perturbed at float32 rounding (±${result.sensitivity.level.toExponential(2)} relative)`);
  const head = ['#', 'Re λ', 'Im λ', '|λ|', 'κ', 'amplitude', 'spread', 'sensitivity', 'status'];
  if (result.dt !== undefined) head.push('Re ω', 'Im ω');
  lines.push(head.join('\t'));
  result.eigenvalues.forEach((e, i) => {
    const status = e.undetermined ? 'not determined (dictionary rank)' : e.resolvedFromRank !== undefined ? `resolved from rank ${e.resolvedFromRank}` : '';
    const row = [String(i + 1), fmt(e.lambda.re), fmt(e.lambda.im), fmt(Math.hypot(e.lambda.re, e.lambda.im)), fmt(e.condition), Number.isFinite(e.amplitude) ? fmt(e.amplitude) : '-', e.spread !== undefined ? fmt(e.spread) : '-', e.sensitivity !== undefined ? fmt(e.sensitivity) : '-', status];
    if (result.dt !== undefined) row.push(e.continuous ? fmt(e.continuous.re) : 'none', e.continuous ? fmt(e.continuous.im) : 'none');
    lines.push(row.join('\t'));
  });
  for (const note of result.notes) lines.push(`note: ${note}`);
  return lines.join('\n');
}

async function main(argv: string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        method: { type: 'string' },
        pairs: { type: 'string' },
        layout: { type: 'string' },
        'max-mb': { type: 'string' },
        rank: { type: 'string' },
        'rank-tol': { type: 'string' },
        energy: { type: 'string' },
        kernel: { type: 'string' },
        degree: { type: 'string' },
        coef0: { type: 'string' },
        gamma: { type: 'string' },
        sigma: { type: 'string' },
        dictionary: { type: 'string' },
        centres: { type: 'string' },
        'centres-every': { type: 'string' },
        'centres-at': { type: 'string' },
        'no-band': { type: 'boolean' },
        'no-sensitivity': { type: 'boolean' },
        draws: { type: 'string' },
        cutoff: { type: 'string' },
        dt: { type: 'string' },
        order: { type: 'string' },
        top: { type: 'string' },
        'pair-at-cut': { type: 'string' },
        json: { type: 'boolean' },
        scenario: { type: 'string' },
        seed: { type: 'string' },
        noise: { type: 'string' },
        jitter: { type: 'string' },
        samples: { type: 'string' },
        write: { type: 'string' },
        help: { type: 'boolean', short: 'h' },
      },
    });
  } catch (e) {
    throw new UsageError(`${(e as Error).message.split('\n')[0]} (see --help)`);
  }
  const v = parsed.values;
  if (v.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const layout = oneOf('layout', v.layout, ['columns', 'rows'] as const) ?? 'columns';
  const maxMb = num('max-mb', v['max-mb'], (x) => x > 0, 'a positive number of MiB') ?? 256;
  const limits = { maxBytes: Math.floor(maxMb * 1024 * 1024) };
  let source: PairSource;
  let dataName: string;
  let scenarioMethod: 'dmd' | 'edmd' | 'kernel-edmd' | undefined;
  if (v.scenario !== undefined) {
    if (parsed.positionals.length > 0) throw new UsageError(`give either DATA or --scenario, not both (got DATA "${parsed.positionals[0]}")`);
    if (v.pairs !== undefined) throw new UsageError('--pairs cannot be combined with --scenario');
    const name = oneOf('scenario', v.scenario, scenarioNames) as ScenarioName;
    const seed = num('seed', v.seed, Number.isInteger, 'an integer') ?? 1;
    const sc = generateScenario(name, {
      seed,
      noise: num('noise', v.noise, (x) => x >= 0 && x < 10, 'a number in [0, 10)'),
      jitter: num('jitter', v.jitter, (x) => x >= 0 && x < 0.2, 'a number in [0, 0.2)'),
      samples: num('samples', v.samples, (x) => Number.isInteger(x) && x >= 2 && x <= 1_000_000, 'an integer from 2 to 1000000'),
    });
    source = sc.source;
    dataName = `scenario ${name} (seed ${seed})`;
    scenarioMethod = sc.method === 'edmd' ? 'edmd' : sc.method;
  } else {
    if (parsed.positionals.length === 0) throw new UsageError('no DATA file given (see --help)');
    if (parsed.positionals.length > 1) throw new UsageError(`expected one DATA file, got ${parsed.positionals.length}: ${parsed.positionals.join(' ')}`);
    const x = readFile(parsed.positionals[0]);
    const y = v.pairs !== undefined ? readFile(v.pairs) : undefined;
    source = readPairSource(x, y, { layout, ...limits });
    dataName = x.name;
  }
  if (v.write !== undefined) {
    if (source.kind === 'trajectory') saveSnapshots(v.write, source.snapshots, layout);
    else if (source.kind === 'pairs') {
      saveSnapshots(v.write, source.x, layout);
      saveSnapshots(withSuffix(v.write, '.y'), source.y, layout);
    } else {
      const mats = scenarioMatrices({ source } as never);
      saveSnapshots(v.write, mats.x, layout);
    }
  }

  const method = oneOf('method', v.method, ['dmd', 'edmd', 'kernel-edmd'] as const) ?? scenarioMethod ?? 'dmd';
  const common: SpectrumOptions = {
    dt: num('dt', v.dt, (x) => x > 0, 'a positive time step'),
    order: oneOf<Ordering>('order', v.order, ['magnitude', 'amplitude', 'unit-circle', 'frequency']),
    top: num('top', v.top, (x) => Number.isInteger(x) && x >= 1, 'a positive integer'),
    pairAtCut: oneOf('pair-at-cut', v['pair-at-cut'], ['both', 'neither'] as const),
    rankBand: !v['no-band'],
    sensitivity: v['no-sensitivity'] ? false : { draws: num('draws', v.draws, (x) => Number.isInteger(x) && x >= 1 && x <= 20, 'an integer from 1 to 20') ?? 3 },
  };
  const cutoff = num('cutoff', v.cutoff, (x) => x > 0 && x < 1, 'a number in (0, 1)');
  if (cutoff !== undefined && method !== 'edmd') throw new UsageError('--cutoff applies to EDMD only (--method edmd)');
  const rankRules = [v.rank !== undefined, v['rank-tol'] !== undefined, v.energy !== undefined].filter(Boolean).length;
  if (rankRules > 1) throw new UsageError('give only one of --rank, --rank-tol and --energy');
  const degree = num('degree', v.degree, (x) => Number.isInteger(x) && x >= 1 && x <= 20, 'an integer from 1 to 20') ?? 2;
  const sigma = num('sigma', v.sigma, (x) => x > 0, 'a positive width');
  let request: ReferenceRequest;
  if (method === 'dmd') {
    let truncation: RankRule | undefined;
    if (v.rank === 'optimal') truncation = { kind: 'optimal' };
    else if (v.rank !== undefined) truncation = { kind: 'rank', rank: num('rank', v.rank, (x) => Number.isInteger(x) && x >= 1, 'a positive integer or "optimal"') as number };
    else if (v['rank-tol'] !== undefined) truncation = { kind: 'tolerance', tol: num('rank-tol', v['rank-tol'], (x) => x >= 0 && x < 1, 'a number in [0, 1)') as number };
    else if (v.energy !== undefined) truncation = { kind: 'energy', fraction: num('energy', v.energy, (x) => x > 0 && x <= 1, 'a fraction in (0, 1]') as number };
    request = { method: 'dmd', options: { ...common, truncation } };
  } else if (method === 'edmd') {
    if (rankRules > 0) throw new UsageError('EDMD takes no --rank, --rank-tol or --energy: its size is that of the dictionary (use --degree)');
    const kind = oneOf('dictionary', v.dictionary, ['monomial', 'hermite', 'radial', 'gaussian-radial'] as const) ?? 'monomial';
    const centreOptions = [v.centres, v['centres-every'], v['centres-at']].filter((c) => c !== undefined).length;
    let dictionary: Dictionary;
    if (kind === 'radial' || kind === 'gaussian-radial') {
      if (centreOptions === 0) throw new UsageError(`--dictionary ${kind} needs its centres: --centres-every S, --centres-at LIST or --centres FILE`);
      if (centreOptions > 1) throw new UsageError('give only one of --centres-every, --centres-at and --centres');
      if (sigma === undefined) throw new UsageError(`--dictionary ${kind} needs --sigma S`);
      let centres: Snapshots;
      // Centres picked from X are columns of the data: the measured sensitivity perturbs them with it.
      let fromColumns: number[] | undefined;
      if (v.centres !== undefined) centres = toSnapshots(readMatrix(readFile(v.centres), limits), layout);
      else if (v['centres-every'] !== undefined) {
        const step = num('centres-every', v['centres-every'], (x) => Number.isInteger(x) && x >= 1, 'a positive integer step') as number;
        ({ centres, indices: fromColumns } = radialCentres(source, { kind: 'every', step }));
      } else {
        const raw = v['centres-at'] as string;
        const indices = raw.split(',').map((t, i) => {
          const x = Number(t);
          if (t.trim() === '' || !Number.isInteger(x) || x < 0) throw new UsageError(`--centres-at expects 0-based column indices separated by commas; entry ${i + 1} is "${t}"`);
          return x;
        });
        const twice = indices.findIndex((x, i) => indices.indexOf(x) !== i);
        if (twice >= 0) throw new UsageError(`--centres-at lists column ${indices[twice]} twice`);
        ({ centres, indices: fromColumns } = radialCentres(source, { kind: 'indices', indices }));
      }
      dictionary = { kind: 'gaussian-radial', centres, sigma, ...(fromColumns ? { fromColumns } : {}) };
    } else {
      if (centreOptions > 0) throw new UsageError(`--centres-every, --centres-at and --centres belong to --dictionary radial, not ${kind}`);
      dictionary = { kind, degree };
    }
    request = { method: 'edmd', options: { ...common, dictionary, cutoff } };
  } else {
    if (v.energy !== undefined || v.rank === 'optimal') throw new UsageError('kernel EDMD truncates by --rank R or --rank-tol T only');
    const kind = oneOf('kernel', v.kernel, ['linear', 'polynomial', 'gaussian'] as const) ?? 'polynomial';
    let kernel: Kernel;
    if (kind === 'linear') kernel = { kind };
    else if (kind === 'polynomial') {
      kernel = {
        kind,
        degree,
        coef0: num('coef0', v.coef0, () => true, 'a number') ?? 1,
        gamma: num('gamma', v.gamma, (x) => x > 0, 'a positive number') ?? 1,
      };
    } else {
      if (sigma === undefined) throw new UsageError('--kernel gaussian needs --sigma S');
      kernel = { kind, sigma };
    }
    const truncation =
      v.rank !== undefined
        ? { kind: 'rank' as const, rank: num('rank', v.rank, (x) => Number.isInteger(x) && x >= 1, 'a positive integer') as number }
        : v['rank-tol'] !== undefined
          ? { kind: 'tolerance' as const, tol: num('rank-tol', v['rank-tol'], (x) => x >= 0 && x < 1, 'a number in [0, 1)') as number }
          : undefined;
    request = { method: 'kernel-edmd', options: { ...common, kernel, truncation } };
  }
  const { reference, result } = await computeReference(source, request, { options: { data: dataName } });
  if (v.json) process.stdout.write(JSON.stringify(reference) + '\n');
  else process.stdout.write(`${dataName}\n${table(result)}\n`);
  return 0;
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    const bad = e instanceof UsageError || e instanceof DatasetFormatError || e instanceof SpectrumInputError || e instanceof RangeError;
    const msg = (e instanceof Error ? e.message : String(e)).replace(/\s*\n\s*/g, ' ');
    process.stderr.write(`spectrum: ${msg}\n`);
    process.exitCode = bad ? 2 : 1;
  },
);
