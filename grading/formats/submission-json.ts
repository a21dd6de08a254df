import { parseComplexLiteral, type ComplexNumber } from './complex-literal';
import { parseJsonWithPositions, type JsonNode } from './submission-json-parse';
import { LocatedError, singleVectorKinds, type PartReadOutput } from './submission-types';
import type { PartKind } from '../../shared/score-report';

/**
 * JSON submissions. A value is a number, `[re, im]`, `{"re": …, "im": …}`
 * (also real/imag) or a string literal such as "(0.9+0.1j)". A part is a list
 * of values, or `{"re": [...], "im": [...]}`; a modes or eigenfunctions part
 * may be a list of such vectors (one per eigenvalue). The file is one part,
 * or an object whose keys name the parts.
 */

const NONFINITE = 'infinite or NaN values are not accepted; every value must be a finite number';
const VALUE_EXPECTED = 'a number, [re, im], {"re": …, "im": …} or a string such as "0.9+0.1j"';

function key(n: Extract<JsonNode, { kind: 'object' }>, names: RegExp): JsonNode | undefined {
  return n.entries.find((e) => names.test(e.key))?.value;
}
const RE_KEY = /^(?:re|real)$/i;
const IM_KEY = /^(?:im|imag|imaginary)$/i;

function describe(n: JsonNode): string {
  switch (n.kind) {
    case 'array':
      return `a list of ${n.items.length}`;
    case 'object':
      return `an object with keys ${n.entries.map((e) => `"${e.key}"`).slice(0, 4).join(', ') || '(none)'}`;
    case 'string':
      return `the string "${n.value.slice(0, 20)}"`;
    case 'nonfinite':
      return n.text;
    case 'null':
      return 'null';
    case 'bool':
      return String(n.value);
    default:
      return String(n.value);
  }
}

function real(n: JsonNode, what: string): number {
  if (n.kind === 'number') return n.value;
  if (n.kind === 'nonfinite') throw new LocatedError(NONFINITE, n.line, n.column);
  throw new LocatedError(`expected ${what} as a number, found ${describe(n)}`, n.line, n.column);
}

function complexValue(n: JsonNode): ComplexNumber {
  if (n.kind === 'number') return { re: n.value, im: 0 };
  if (n.kind === 'nonfinite') throw new LocatedError(NONFINITE, n.line, n.column);
  if (n.kind === 'array') {
    if (n.items.length !== 2) throw new LocatedError(`expected [re, im] with two numbers, found ${describe(n)}`, n.line, n.column);
    return { re: real(n.items[0], 'the real part'), im: real(n.items[1], 'the imaginary part') };
  }
  if (n.kind === 'object') {
    const re = key(n, RE_KEY);
    const im = key(n, IM_KEY);
    if (!re) throw new LocatedError(`expected {"re": …, "im": …}, found ${describe(n)}`, n.line, n.column);
    return { re: real(re, 'the real part'), im: im ? real(im, 'the imaginary part') : 0 };
  }
  if (n.kind === 'string') {
    const r = parseComplexLiteral(n.value);
    if (!r.ok) throw new LocatedError(r.message, n.line, n.column + 1 + r.offset);
    return r.value;
  }
  throw new LocatedError(`expected ${VALUE_EXPECTED}, found ${describe(n)}`, n.line, n.column);
}

/** True when a list element is itself a vector (not a single [re, im] pair). */
function isVectorNode(n: JsonNode): boolean {
  if (n.kind === 'array') return !(n.items.length === 2 && n.items.every((x) => x.kind === 'number' || x.kind === 'nonfinite'));
  if (n.kind === 'object') {
    const re = key(n, RE_KEY);
    return re !== undefined && re.kind === 'array';
  }
  return false;
}

function vector(n: JsonNode, maxValues: number): ComplexNumber[] {
  if (n.kind === 'object') {
    const re = key(n, RE_KEY);
    const im = key(n, IM_KEY);
    if (re && re.kind === 'array') {
      if (im && im.kind !== 'array') throw new LocatedError(`expected "im" to be a list like "re", found ${describe(im)}`, im.line, im.column);
      if (im && im.kind === 'array' && im.items.length !== re.items.length) {
        throw new LocatedError(`expected as many imaginary parts as real parts (${re.items.length}), found ${im.items.length}`, im.line, im.column);
      }
      if (re.items.length > maxValues) throw new LocatedError(`expected at most ${maxValues} values, found ${re.items.length}`, re.line, re.column);
      return re.items.map((r, i) => ({
        re: real(r, 'a real part'),
        im: im && im.kind === 'array' ? real(im.items[i], 'an imaginary part') : 0,
      }));
    }
  }
  if (n.kind !== 'array') throw new LocatedError(`expected a list of values or {"re": [...], "im": [...]}, found ${describe(n)}`, n.line, n.column);
  if (n.items.length > maxValues) throw new LocatedError(`expected at most ${maxValues} values, found ${n.items.length}`, n.line, n.column);
  return n.items.map(complexValue);
}

export function readJsonPartNode(n: JsonNode, kind: PartKind, maxValues: number): ComplexNumber[][] {
  const many = !singleVectorKinds.has(kind) && ((n.kind === 'array' && n.items.length > 0 && n.items.every(isVectorNode)) || (n.kind === 'object' && key(n, RE_KEY)?.kind === 'array' && (key(n, RE_KEY) as Extract<JsonNode, { kind: 'array' }>).items.some((x) => x.kind === 'array')));
  if (many && n.kind === 'array') return n.items.map((x) => vector(x, maxValues));
  if (many && n.kind === 'object') {
    // {"re": [[…], […]], "im": [[…], […]]}: one list per vector.
    const re = key(n, RE_KEY) as Extract<JsonNode, { kind: 'array' }>;
    const im = key(n, IM_KEY);
    return re.items.map((r, i) => {
      const imNode = im && im.kind === 'array' ? im.items[i] : undefined;
      const obj: JsonNode = { kind: 'object', line: r.line, column: r.column, entries: [{ key: 're', value: r, line: r.line, column: r.column }] };
      if (imNode) obj.entries.push({ key: 'im', value: imNode, line: imNode.line, column: imNode.column });
      return vector(obj, maxValues);
    });
  }
  const v = vector(n, maxValues);
  if (v.length === 0) throw new LocatedError('expected at least one value, found an empty list', n.line, n.column);
  return [v];
}

export interface JsonFileOutput {
  /** Part name → vectors; the key '' stands for "the file's one part". */
  parts: Map<string, { vectors: ComplexNumber[][]; line: number; column: number }>;
  warnings: PartReadOutput['warnings'];
}

export function readJsonFile(text: string, kindOf: (part: string) => PartKind | undefined, defaultKind: PartKind, maxValues: number): JsonFileOutput {
  const { root, trailing } = (() => {
    try {
      return parseJsonWithPositions(text);
    } catch (e) {
      if (e instanceof Error && 'line' in e && 'column' in e) throw new LocatedError(e.message, e.line as number, e.column as number);
      throw e;
    }
  })();
  const warnings: PartReadOutput['warnings'] = [];
  if (trailing) warnings.push({ ...trailing, message: 'ignored text after the end of the JSON value' });
  const parts = new Map<string, { vectors: ComplexNumber[][]; line: number; column: number }>();
  const isPartObject = root.kind === 'object' && !root.entries.some((e) => RE_KEY.test(e.key) || IM_KEY.test(e.key));
  if (root.kind === 'object' && isPartObject) {
    for (const e of root.entries) {
      const kind = kindOf(e.key);
      if (!kind) {
        warnings.push({ line: e.line, column: e.column, message: `ignored the key "${e.key.slice(0, 40)}": the assignment expects no part of that name` });
        continue;
      }
      if (parts.has(e.key)) throw new LocatedError(`expected each part once, found "${e.key}" twice`, e.line, e.column);
      parts.set(e.key, { vectors: readJsonPartNode(e.value, kind, maxValues), line: e.line, column: e.column });
    }
    if (parts.size === 0) throw new LocatedError(`expected a list of values or an object whose keys name the parts, found ${describe(root)}`, root.line, root.column);
  } else {
    parts.set('', { vectors: readJsonPartNode(root, defaultKind, maxValues), line: root.line, column: root.column });
  }
  return { parts, warnings };
}
