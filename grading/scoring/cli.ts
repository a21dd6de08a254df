/**
 * Command line front end of the scorer (the one place in grading/scoring that
 * reads files). `npm run -s grade -- --help` documents it.
 */
import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { referenceSpectrum } from '../../shared/reference';
import { gradingSettings, referenceExtras, type GradingSettingsInput, type ScoreReport } from '../../shared/score-report';
import { formatSubmissionError, readSubmission } from '../formats/submission';
import { gradeSubmission } from './score';

const HELP = `Usage: npm run -s grade -- --reference REF.json --submission FILE [options]

Grades a student's submission against a reference spectrum and prints a
score report. The score is provisional until staff release it.

Required:
  --reference REF.json   the reference spectrum, as printed by
                         "npm run -s spectrum -- DATA --json"; it may also carry
                         "modes", "eigenfunctions" and "prediction" for those parts
  --submission FILE      a submitted file; repeat for several parts. Text tables
                         (CSV/TSV/whitespace; re/im columns or complex values),
                         console printouts (Python, NumPy, MATLAB, Octave, Julia),
                         JSON, or NumPy .npy (complex128, or float64 n×2). A file
                         named after a part (eigenvalues.csv, modes.npy) is that
                         part; a lone file is the eigenvalues.

Options:
  --settings FILE        grading settings as JSON (tolerances, rules, parts with
                         weights); the options below override it
  --abs-tol A            absolute tolerance per eigenvalue (default 1e-6)
  --rel-tol R            relative tolerance, R × |λ| (default 1e-3)
  --domain D             discrete (λ, default) or continuous (ω = log(λ)/dt)
  --dt DT                time step for the continuous domain (default: the
                         reference's dt)
  --json                 print the score report as JSON instead of a summary
  -h, --help             print this help

By default every eigenvalue in the reference is graded with equal weight
(10 points in all).

Exit status: 0 graded; 2 the submission is malformed (one line on stderr names
the file, part, line, column and what was expected); 1 any other error (bad
options, unreadable reference or settings).`;

class UsageError extends Error {}

function fail(message: string, code: number): never {
  process.stderr.write(`${message.replace(/\s*\n\s*/g, ' ')}\n`);
  process.exit(code);
}

function num(name: string, v: string | undefined): number | undefined {
  if (v === undefined) return undefined;
  const x = Number(v);
  if (v.trim() === '' || !Number.isFinite(x)) throw new UsageError(`--${name} expects a finite number, got "${v}"`);
  return x;
}

function readJson(path: string, what: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new UsageError(`cannot read the ${what} file ${path}: ${(e as Error).message}`);
  }
  try {
    return JSON.parse(text) as unknown;
  } catch (e) {
    throw new UsageError(`the ${what} file ${path} is not valid JSON: ${(e as Error).message}`);
  }
}

function issues(e: { issues: { path: PropertyKey[]; message: string }[] }): string {
  return e.issues
    .slice(0, 3)
    .map((i) => `${i.path.map(String).join('.') || '(top level)'}: ${i.message}`)
    .join('; ');
}

const c = (z: { re: number; im: number }) => {
  const p = (x: number) => Number(x.toPrecision(6)).toString();
  return z.im === 0 ? p(z.re) : `${p(z.re)} ${z.im < 0 ? '-' : '+'} ${p(Math.abs(z.im))}i`;
};

const pts = (x: number) => String(Number(x.toFixed(3)));

function summary(r: ScoreReport): string {
  const out: string[] = [];
  out.push(`Score: ${pts(r.points)} / ${pts(r.maxPoints)} points (provisional until released by staff)`);
  for (const p of r.parts) {
    out.push('');
    out.push(`Part "${p.name}" (${p.kind}${p.domain ? `, ${p.domain} time` : ''}): ${pts(p.points)} / ${pts(p.maxPoints)}${p.submitted ? '' : ' — not submitted'}`);
    for (const m of p.matches) {
      out.push(
        `  #${m.submittedIndex + 1} ${c(m.submitted)}  ->  ref ${m.referenceIndex + 1} ${c(m.reference)}   distance ${m.distance.toExponential(2)}, tolerance ${m.tolerance.toExponential(2)} (${m.toleranceSource}), credit ${(m.credit * 100).toFixed(0)}%  [${m.status}]${m.resolvedFromRank !== undefined ? ` (resolved from rank ${m.resolvedFromRank})` : ''}${m.note ? ` — ${m.note}` : ''}`,
      );
    }
    for (const m of p.missing) out.push(`  missing: ref ${m.referenceIndex + 1} ${c(m.reference)} (tolerance ${m.tolerance.toExponential(2)})`);
    for (const e of p.extra) out.push(`  extra: #${e.submittedIndex + 1} ${c(e.submitted)}`);
    if (p.excluded.length > 0) out.push(`  ${p.excluded.length} reference value${p.excluded.length === 1 ? ' was' : 's were'} not graded:`);
    for (const e of p.excluded) out.push(`  not graded: ref ${e.referenceIndex + 1} ${c(e.reference)}: ${e.reason}`);
    for (const v of p.vectors) {
      out.push(`  ref ${v.referenceIndex + 1}: ${v.similarity === null ? 'not compared' : `similarity ${v.similarity.toFixed(4)}`}, credit ${(v.credit * 100).toFixed(0)}%${v.note ? ` (${v.note})` : ''}`);
    }
    if (p.relativeError !== undefined && p.relativeError !== null) out.push(`  relative error ${p.relativeError.toExponential(3)}`);
    for (const n of p.notes) out.push(`  ${n}`);
  }
  if (r.flags.length > 0) {
    out.push('');
    out.push('Flags:');
    for (const f of r.flags) out.push(`  [${f.code}] ${f.message}`);
  }
  if (r.warnings.length > 0) {
    out.push('');
    out.push('Reader warnings:');
    for (const w of r.warnings) out.push(`  ${w.file}${w.line ? `, line ${w.line}` : ''}${w.column ? `, column ${w.column}` : ''}: ${w.message}`);
  }
  out.push('');
  out.push(`Computed by scorer ${r.computedFrom.scorerVersion} from reference ${r.computedFrom.referenceHash ?? '(no hash)'} (${r.computedFrom.referenceMethod}, rank ${r.computedFrom.referenceRank}, engine ${r.computedFrom.engineVersion ?? 'unknown'}).`);
  return out.join('\n');
}

function main(argv: string[]): void {
  let args;
  try {
    args = parseArgs({
      args: argv,
      options: {
        reference: { type: 'string' },
        submission: { type: 'string', multiple: true },
        settings: { type: 'string' },
        'abs-tol': { type: 'string' },
        'rel-tol': { type: 'string' },
        domain: { type: 'string' },
        dt: { type: 'string' },
        json: { type: 'boolean', default: false },
        help: { type: 'boolean', short: 'h', default: false },
      },
      strict: true,
      allowPositionals: false,
    });
  } catch (e) {
    fail(`${(e as Error).message} (see --help)`, 1);
  }
  const v = args.values;
  if (v.help) {
    process.stdout.write(`${HELP}\n`);
    return;
  }
  try {
    if (!v.reference) throw new UsageError('--reference REF.json is required (see --help)');
    if (!v.submission || v.submission.length === 0) throw new UsageError('--submission FILE is required (see --help)');
    if (v.domain !== undefined && v.domain !== 'discrete' && v.domain !== 'continuous') throw new UsageError(`--domain expects discrete or continuous, got "${v.domain}"`);

    const refJson = readJson(v.reference, 'reference');
    const ref = referenceSpectrum.safeParse(refJson);
    if (!ref.success) throw new UsageError(`the reference file ${v.reference} does not have the shape of a reference spectrum: ${issues(ref.error)}`);
    const extras = referenceExtras.safeParse(refJson);
    if (!extras.success) throw new UsageError(`the reference file ${v.reference} has malformed modes/eigenfunctions/prediction: ${issues(extras.error)}`);

    let settingsInput: GradingSettingsInput = {};
    if (v.settings) settingsInput = readJson(v.settings, 'settings') as GradingSettingsInput;
    const overrides: Partial<GradingSettingsInput> = {};
    const absTol = num('abs-tol', v['abs-tol']);
    const relTol = num('rel-tol', v['rel-tol']);
    const dt = num('dt', v.dt);
    if (absTol !== undefined) overrides.absTol = absTol;
    if (relTol !== undefined) overrides.relTol = relTol;
    if (dt !== undefined) overrides.dt = dt;
    if (v.domain) overrides.domain = v.domain as 'discrete' | 'continuous';
    const settings = gradingSettings.safeParse({ ...(settingsInput as object), ...overrides });
    if (!settings.success) throw new UsageError(`invalid grading settings: ${issues(settings.error)}`);

    const files = v.submission.map((path) => {
      try {
        return { name: path.split(/[\\/]/).pop() ?? path, bytes: new Uint8Array(readFileSync(path)) };
      } catch (e) {
        throw new UsageError(`cannot read the submission file ${path}: ${(e as Error).message}`);
      }
    });
    const read = readSubmission(files, { parts: settings.data.parts });
    if (!read.ok) fail(`error: ${formatSubmissionError(read.error)}`, 2);

    const report = gradeSubmission({ reference: ref.data, extras: extras.data, submission: read.submission, settings: settings.data });
    process.stdout.write(v.json ? `${JSON.stringify(report, null, 2)}\n` : `${summary(report)}\n`);
  } catch (e) {
    if (e instanceof UsageError) fail(`error: ${e.message}`, 1);
    throw e;
  }
}

main(process.argv.slice(2));
