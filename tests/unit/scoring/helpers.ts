import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { expect } from 'vitest';
import { referenceSpectrum, type ReferenceSpectrum } from '../../../shared/reference';
import { scoreReport, type ScoreReport } from '../../../shared/score-report';
import type { ComplexNumber } from '../../../grading/formats/submission';

export const fixtureDir = fileURLToPath(new URL('../../fixtures/submissions/', import.meta.url));
export const repoRoot = fileURLToPath(new URL('../../../', import.meta.url));

export function fixtureBytes(name: string): Uint8Array {
  return new Uint8Array(readFileSync(fixtureDir + name));
}

export function loadReference(): ReferenceSpectrum {
  return referenceSpectrum.parse(JSON.parse(readFileSync(fixtureDir + 'REF.json', 'utf8')));
}

/** The values every well-formed fixture holds, in file order (see README.md there). */
export const fixtureValues: ComplexNumber[] = [
  { re: 0.95, im: 0.2 },
  { re: 0.3, im: 0 },
  { re: 0.5, im: -0.1 },
  { re: 0.8, im: 0 },
  { re: 0.95, im: -0.2 },
  { re: 0.5, im: 0.1 },
];

/** Every report must validate against its own schema, and survive JSON. */
export function expectValidReport(report: ScoreReport): ScoreReport {
  const parsed = scoreReport.safeParse(report);
  if (!parsed.success) throw new Error(`report does not match its schema: ${JSON.stringify(parsed.error.issues.slice(0, 3))}`);
  const again = scoreReport.safeParse(JSON.parse(JSON.stringify(report)));
  expect(again.success).toBe(true);
  return parsed.data;
}
