import { readTextPart } from './submission-text';
import { readJsonFile } from './submission-json';
import { readNpyPart } from './submission-npy';
import {
  LocatedError,
  type ExpectedPart,
  type ReadOptions,
  type ReadResult,
  type Submission,
  type SubmissionFile,
  type SubmissionPart,
} from './submission-types';
import type { ReaderWarning } from '../../shared/score-report';

export * from './submission-types';

/**
 * Read a submission: one or more files, each holding one part (named by its
 * file name, e.g. `eigenvalues.csv`, or the assignment's first part) or, for
 * JSON, several parts under named keys. Pure: bytes in, values or a located
 * error out.
 */

const DEFAULT_PARTS: ExpectedPart[] = [{ name: 'eigenvalues', kind: 'eigenvalues' }];

function stem(fileName: string): string {
  const base = fileName.split(/[\\/]/).pop() ?? fileName;
  return base.replace(/\.[^.]*$/, '').toLowerCase();
}

function extension(fileName: string): string {
  const m = /\.([^.\\/]+)$/.exec(fileName);
  return m ? m[1].toLowerCase() : '';
}

function isNpy(bytes: Uint8Array): boolean {
  return bytes.length >= 6 && bytes[0] === 0x93 && String.fromCharCode(...bytes.slice(1, 6)) === 'NUMPY';
}

function decodeText(bytes: Uint8Array, file: string, part: string): string {
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw Object.assign(new LocatedError('expected a text file in UTF-8 (or a .npy file), found binary data', 1, 1), { part, file });
  }
}

export function readSubmission(files: SubmissionFile[], options: ReadOptions = {}): ReadResult {
  const expected = options.parts && options.parts.length > 0 ? options.parts : DEFAULT_PARTS;
  const maxValues = options.maxValues ?? 20000;
  const maxBytes = options.maxBytes ?? 8 * 1024 * 1024;
  const byName = new Map(expected.map((p) => [p.name.toLowerCase(), p]));
  const defaultPart = expected.find((p) => p.kind === 'eigenvalues') ?? expected[0];
  const parts: Record<string, SubmissionPart> = {};
  const warnings: ReaderWarning[] = [];

  if (files.length === 0) {
    return { ok: false, error: { file: '(none)', part: defaultPart.name, line: 1, column: 1, message: 'expected at least one file, found none' } };
  }

  // A file named after a part is that part; one file named otherwise is the default part, unless a file claims it.
  const unnamed = files.filter((f) => !byName.has(stem(f.name)));
  const defaultClaimed = files.some((f) => stem(f.name) === defaultPart.name.toLowerCase());
  for (const file of files) {
    // Which part this file is, unless it is a JSON object naming its parts.
    const named = byName.get(stem(file.name));
    const target = named ?? (unnamed.length === 1 && !defaultClaimed ? defaultPart : undefined);
    const partLabel = target?.name ?? stem(file.name);
    try {
      if (file.bytes.length > maxBytes) throw new LocatedError(`expected a file of at most ${maxBytes} bytes, found ${file.bytes.length}`, 1, 1);
      const ext = extension(file.name);
      const add = (p: ExpectedPart, vectors: SubmissionPart['vectors'], line = 1, column = 1) => {
        if (parts[p.name]) throw new LocatedError(`expected the part "${p.name}" once, but ${parts[p.name].file} already holds it`, line, column);
        if ((p.kind === 'eigenvalues' || p.kind === 'prediction') && vectors.length !== 1) {
          throw new LocatedError(`expected one vector of values, found ${vectors.length} columns`, line, column);
        }
        parts[p.name] = { name: p.name, kind: p.kind, file: file.name, vectors };
      };
      const noTarget = () =>
        new LocatedError(`expected the file name to name a part of this assignment (${expected.map((p) => `${p.name}.*`).join(', ')})`, 1, 1);

      if (isNpy(file.bytes) || ext === 'npy') {
        if (!target) throw noTarget();
        add(target, readNpyPart(file.bytes, file.name, target.kind, maxValues));
        continue;
      }
      const text = decodeText(file.bytes, file.name, partLabel);
      const trimmed = text.replace(/^\uFEFF/, '').trimStart();
      let json: ReturnType<typeof readJsonFile> | null = null;
      if (ext === 'json' || trimmed.startsWith('{')) {
        json = readJsonFile(text, (k) => byName.get(k.toLowerCase())?.kind, target?.kind ?? defaultPart.kind, maxValues);
      } else if (trimmed.startsWith('[')) {
        // A JSON list, or a list as Python/Julia/NumPy print it (not JSON).
        try {
          json = readJsonFile(text, (k) => byName.get(k.toLowerCase())?.kind, target?.kind ?? defaultPart.kind, maxValues);
        } catch (e) {
          // Nested lists and objects only make sense as JSON: report the JSON problem.
          if (/^\[\s*[[{"]/.test(trimmed)) throw e;
          json = null;
        }
      }
      if (json) {
        for (const w of json.warnings) warnings.push({ part: partLabel, file: file.name, ...w });
        for (const [key, v] of json.parts) {
          if (key === '') {
            if (!target) throw noTarget();
            add(target, v.vectors, v.line, v.column);
          } else {
            const p = byName.get(key.toLowerCase());
            if (p) add(p, v.vectors, v.line, v.column);
          }
        }
        continue;
      }
      if (!target) throw noTarget();
      const out = readTextPart(text, target.kind, maxValues);
      add(target, out.vectors);
      for (const w of out.warnings) warnings.push({ part: target.name, file: file.name, ...w });
    } catch (e) {
      if (e instanceof LocatedError) {
        return { ok: false, error: { file: file.name, part: partLabel, line: e.line, column: e.column, message: e.message } };
      }
      throw e;
    }
  }
  const submission: Submission = { parts, warnings };
  return { ok: true, submission };
}

/** Convenience for one file of text (tests, the command line). */
export function readSubmissionText(text: string, fileName = 'submission.txt', options: ReadOptions = {}): ReadResult {
  return readSubmission([{ name: fileName, bytes: new TextEncoder().encode(text) }], options);
}
