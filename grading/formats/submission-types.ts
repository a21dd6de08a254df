import type { ComplexNumber } from './complex-literal';
import type { PartKind, ReaderWarning } from '../../shared/score-report';

export type { ComplexNumber };

/** One uploaded file. */
export interface SubmissionFile {
  name: string;
  bytes: Uint8Array;
}

/** What the assignment expects a part to be. */
export interface ExpectedPart {
  name: string;
  kind: PartKind;
}

/** A part as read: one vector (eigenvalues, prediction) or several (modes, eigenfunctions: one per column). */
export interface SubmissionPart {
  name: string;
  kind: PartKind;
  file: string;
  vectors: ComplexNumber[][];
}

export interface Submission {
  parts: Record<string, SubmissionPart>;
  warnings: ReaderWarning[];
}

/** A rejection: always names the file, the part, the line and column, and what was expected. */
export interface SubmissionError {
  file: string;
  part: string;
  line: number;
  column: number;
  message: string;
}

export type ReadResult = { ok: true; submission: Submission } | { ok: false; error: SubmissionError };

export interface ReadOptions {
  /** Parts the assignment expects; the first eigenvalues part is the default for an unnamed file. Default: one eigenvalues part. */
  parts?: ExpectedPart[];
  /** Largest number of values accepted in one part. Default 20000. */
  maxValues?: number;
  /** Largest file accepted, in bytes. Default 8 MiB. */
  maxBytes?: number;
}

/** Thrown inside the readers, caught by readSubmission and turned into a SubmissionError. */
export class LocatedError extends Error {
  constructor(
    message: string,
    readonly line: number,
    readonly column: number,
  ) {
    super(message);
  }
}

/** One line for people: `file, part "eigenvalues", line 3, column 5: expected …`. */
export function formatSubmissionError(e: SubmissionError): string {
  return `${e.file}, part "${e.part}", line ${e.line}, column ${e.column}: ${e.message}`;
}

export interface PartReadOutput {
  vectors: ComplexNumber[][];
  warnings: { line?: number; column?: number; message: string }[];
}

export const singleVectorKinds: ReadonlySet<PartKind> = new Set(['eigenvalues', 'prediction']);
