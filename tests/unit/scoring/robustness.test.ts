import { readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { gradeSubmission } from '../../../grading/scoring/score';
import { readSubmission, type ReadResult } from '../../../grading/formats/submission';
import type { GradingSettingsInput } from '../../../shared/score-report';
import { expectValidReport, fixtureBytes, fixtureDir, loadReference } from './helpers';

const ref = loadReference();
const fixtures = readdirSync(fixtureDir).filter((f) => f !== 'README.md' && f !== 'REF.json');
const settings: GradingSettingsInput[] = [
  {},
  { domain: 'continuous', conjugatePolicy: 'one-for-both', extraPenalty: 1 },
  { unstablePolicy: 'exclude', unstableSpreadLimit: 0, parts: [{ name: 'eigenvalues', kind: 'eigenvalues', weight: 4 }, { name: 'modes', kind: 'modes', weight: 2 }, { name: 'prediction', kind: 'prediction', weight: 1 }] },
];

/** Either a valid report, or an error that names file, part, a positive line and column and what was expected. */
function check(read: ReadResult, s: GradingSettingsInput): void {
  if (!read.ok) {
    expect(read.error.line).toBeGreaterThanOrEqual(1);
    expect(read.error.column).toBeGreaterThanOrEqual(1);
    expect(read.error.part.length).toBeGreaterThan(0);
    expect(read.error.message).toMatch(/expected|not accepted/);
    return;
  }
  const report = expectValidReport(gradeSubmission({ reference: ref, submission: read.submission, settings: s }));
  expect(report.points).toBeLessThanOrEqual(report.maxPoints + 1e-9);
}

const parts = [
  { name: 'eigenvalues', kind: 'eigenvalues' as const },
  { name: 'modes', kind: 'modes' as const },
  { name: 'prediction', kind: 'prediction' as const },
];

describe('fast-check: random and mutated submissions never crash the scorer', () => {
  it('mutated fixture files give a report or a located error', () => {
    const mutation = fc.record({
      file: fc.constantFrom(...fixtures),
      edits: fc.array(
        fc.record({
          at: fc.nat(),
          remove: fc.nat({ max: 6 }),
          insert: fc.oneof(fc.string({ maxLength: 6 }), fc.constantFrom('j', 'i', 'im', '+', '-', 'e', 'e+400', ',', '\t', '\n', '(', ')', '[', ']', '{', '}', '"', 'nan', 'inf', ' ', '.', '1', '#', '%', '*', 'NaN', '+-')),
        }),
        { minLength: 1, maxLength: 5 },
      ),
      s: fc.constantFrom(...settings),
    });
    fc.assert(
      fc.property(mutation, ({ file, edits, s }) => {
        let bytes = Array.from(fixtureBytes(file));
        for (const e of edits) {
          const at = e.at % (bytes.length + 1);
          bytes = [...bytes.slice(0, at), ...new TextEncoder().encode(e.insert), ...bytes.slice(at + e.remove)];
        }
        check(readSubmission([{ name: file, bytes: new Uint8Array(bytes) }], { parts: s.parts ?? undefined }), s);
      }),
      { numRuns: 3000 },
    );
  });

  it('random text and random bytes give a report or a located error', () => {
    const alphabet = fc.constantFrom(...'0123456789.+-eEjiIm ,\t\n()[]{}":;#%abcnfNIa*'.split(''));
    fc.assert(
      fc.property(
        fc.oneof(fc.array(alphabet, { maxLength: 120 }).map((a) => new TextEncoder().encode(a.join(''))), fc.uint8Array({ maxLength: 200 })),
        fc.constantFrom('ev.txt', 'ev.csv', 'ev.json', 'ev.npy', 'modes.csv'),
        fc.constantFrom(...settings),
        (bytes, name, s) => check(readSubmission([{ name, bytes }], { parts: s.parts ?? parts.slice(0, 1) }), s),
      ),
      { numRuns: 3000 },
    );
  });

  it('random numeric submissions (any count, huge and tiny values) always give a valid report', () => {
    const value = fc.record({ re: fc.double({ noNaN: true, noDefaultInfinity: true }), im: fc.double({ noNaN: true, noDefaultInfinity: true }) });
    fc.assert(
      fc.property(fc.array(value, { maxLength: 14 }), fc.constantFrom(...settings), (values, s) => {
        const text = JSON.stringify(values);
        check(readSubmission([{ name: 'eigenvalues.json', bytes: new TextEncoder().encode(text) }], { parts: s.parts ?? undefined }), s);
      }),
      { numRuns: 2000 },
    );
  });
});
