/**
 * A small JSON parser that remembers where every value starts (line and
 * column, 1-based), so that a rejection can point at the offending value.
 * It also recognises NaN, Infinity and -Infinity (which Python's json module
 * writes) so that it can reject them by name.
 */

export type JsonNode =
  | { kind: 'number'; value: number; line: number; column: number }
  | { kind: 'nonfinite'; text: string; line: number; column: number }
  | { kind: 'string'; value: string; line: number; column: number }
  | { kind: 'bool'; value: boolean; line: number; column: number }
  | { kind: 'null'; line: number; column: number }
  | { kind: 'array'; items: JsonNode[]; line: number; column: number }
  | { kind: 'object'; entries: { key: string; value: JsonNode; line: number; column: number }[]; line: number; column: number };

export class JsonSyntaxError extends Error {
  constructor(
    message: string,
    readonly line: number,
    readonly column: number,
  ) {
    super(message);
  }
}

const MAX_DEPTH = 64;

export interface JsonParseResult {
  root: JsonNode;
  /** Where non-blank text after the JSON value starts, if there is any. */
  trailing: { line: number; column: number } | null;
}

export function parseJsonWithPositions(text: string): JsonParseResult {
  let pos = 0;
  let line = 1;
  let lineStart = 0;

  const col = () => pos - lineStart + 1;
  const describe = () => {
    if (pos >= text.length) return 'the end of the file';
    const ch = text[pos];
    return ch === '\n' ? 'a line break' : `"${text.slice(pos, pos + 10).split('\n')[0]}"`;
  };
  const fail = (expected: string): never => {
    throw new JsonSyntaxError(`expected ${expected}, found ${describe()}`, line, col());
  };
  const skip = () => {
    while (pos < text.length) {
      const ch = text[pos];
      if (ch === '\n') {
        pos++;
        line++;
        lineStart = pos;
      } else if (ch === ' ' || ch === '\t' || ch === '\r') pos++;
      else break;
    }
  };

  const value = (depth: number): JsonNode => {
    skip();
    if (depth > MAX_DEPTH) fail(`nesting no deeper than ${MAX_DEPTH}`);
    const at = { line, column: col() };
    const ch = text[pos];
    if (ch === '[') {
      pos++;
      const items: JsonNode[] = [];
      skip();
      if (text[pos] === ']') {
        pos++;
        return { kind: 'array', items, ...at };
      }
      for (;;) {
        items.push(value(depth + 1));
        skip();
        if (text[pos] === ',') {
          pos++;
          continue;
        }
        if (text[pos] === ']') {
          pos++;
          return { kind: 'array', items, ...at };
        }
        fail('"," or "]"');
      }
    }
    if (ch === '{') {
      pos++;
      const entries: { key: string; value: JsonNode; line: number; column: number }[] = [];
      skip();
      if (text[pos] === '}') {
        pos++;
        return { kind: 'object', entries, ...at };
      }
      for (;;) {
        skip();
        const keyAt = { line, column: col() };
        if (text[pos] !== '"') fail('a quoted key');
        const key = str();
        skip();
        if (text[pos] !== ':') fail('":"');
        pos++;
        entries.push({ key, value: value(depth + 1), ...keyAt });
        skip();
        if (text[pos] === ',') {
          pos++;
          continue;
        }
        if (text[pos] === '}') {
          pos++;
          return { kind: 'object', entries, ...at };
        }
        fail('"," or "}"');
      }
    }
    if (ch === '"') return { kind: 'string', value: str(), ...at };
    for (const [word, node] of [
      ['true', { kind: 'bool', value: true }],
      ['false', { kind: 'bool', value: false }],
      ['null', { kind: 'null' }],
    ] as const) {
      if (text.startsWith(word, pos)) {
        pos += word.length;
        return { ...node, ...at } as JsonNode;
      }
    }
    const nf = /^-?(?:NaN|Infinity|inf|nan)/.exec(text.slice(pos, pos + 10));
    if (nf) {
      pos += nf[0].length;
      return { kind: 'nonfinite', text: nf[0], ...at };
    }
    const m = /^-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/.exec(text.slice(pos, pos + 400));
    if (m) {
      pos += m[0].length;
      const v = Number(m[0]);
      if (!Number.isFinite(v)) return { kind: 'nonfinite', text: m[0], ...at };
      return { kind: 'number', value: v, ...at };
    }
    return fail('a JSON value (number, string, array or object)');
  };

  const str = (): string => {
    const start = pos;
    pos++;
    let out = '';
    while (pos < text.length) {
      const ch = text[pos];
      if (ch === '"') {
        pos++;
        return out;
      }
      if (ch === '\n') break;
      if (ch === '\\') {
        const e = text[pos + 1];
        const map: Record<string, string> = { '"': '"', '\\': '\\', '/': '/', b: '\b', f: '\f', n: '\n', r: '\r', t: '\t' };
        if (e !== undefined && e in map) {
          out += map[e];
          pos += 2;
          continue;
        }
        if (e === 'u' && /^[0-9a-fA-F]{4}$/.test(text.slice(pos + 2, pos + 6))) {
          out += String.fromCharCode(parseInt(text.slice(pos + 2, pos + 6), 16));
          pos += 6;
          continue;
        }
        fail('a valid escape sequence in a string');
      }
      out += ch;
      pos++;
    }
    pos = start;
    return fail('a string closed by " on the same line');
  };

  if (text.charCodeAt(0) === 0xfeff) {
    pos = 1;
    lineStart = 1;
  }
  const root = value(0);
  skip();
  return { root, trailing: pos < text.length ? { line, column: col() } : null };
}
