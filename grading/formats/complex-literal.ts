/**
 * Complex number literals as numerical tools print them.
 *
 *   Python      (0.9+0.1j)   0.1j   (1+0j)   (-0-1j)   np.complex128(0.9+0.1j)
 *   NumPy       0.9+0.1j     0.8+0.j  (savetxt) (9.0e-01+-1.0e-01j)
 *   MATLAB      0.9000 + 0.1000i    0.9+0.1i (writematrix)
 *   GNU Octave  0.9000 - 0.1000i
 *   Julia       0.9 + 0.1im   1.0 + Inf*im
 *   plain reals 0.9   -1e-3   .5
 *
 * Non-finite values (inf, nan in any spelling) are recognised so that the
 * error can say what they are, and are then rejected.
 */

export interface ComplexNumber {
  re: number;
  im: number;
}

export type LiteralResult =
  | { ok: true; value: ComplexNumber; isComplex: boolean }
  | { ok: false; offset: number; message: string };

const NUMBER_RE = /^(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?/;
const NONFINITE_RE = /^(?:inf(?:inity)?|nan)/i;
const IMAG_SUFFIX_RE = /^\*?(?:im|i|j)(?![A-Za-z0-9_])/i;
const WRAPPER_RE = /^(?:np\.|numpy\.)?(?:complex(?:128|64)?|float(?:64|32)?|ComplexF64|ComplexF32|Float64|Complex)\(/;

interface NumberToken {
  value: number;
  end: number;
  nonFinite: boolean;
}

/** An unsigned decimal number or inf/nan at `pos`. */
function readUnsigned(s: string, pos: number): NumberToken | null {
  const rest = s.slice(pos);
  const m = NUMBER_RE.exec(rest);
  if (m) {
    const value = Number(m[0]);
    return { value, end: pos + m[0].length, nonFinite: !Number.isFinite(value) };
  }
  const n = NONFINITE_RE.exec(rest);
  // "inf" must not be the start of a word such as "info"; "nan" likewise.
  if (n && !/^[A-Za-z_]/.test(rest.slice(n[0].length).replace(IMAG_SUFFIX_RE, ''))) {
    return { value: /nan/i.test(n[0]) ? Number.NaN : Number.POSITIVE_INFINITY, end: pos + n[0].length, nonFinite: true };
  }
  return null;
}

function skipSpaces(s: string, pos: number): number {
  while (pos < s.length && (s[pos] === ' ' || s[pos] === '\t')) pos++;
  return pos;
}

/** Strip surrounding quotes, parentheses and wrappers such as np.complex128(…); returns the inner text and its offset. */
function unwrap(text: string): { inner: string; offset: number } | { error: string; offset: number } {
  let s = text;
  let offset = 0;
  for (let guard = 0; guard < 4; guard++) {
    const lead = s.length - s.trimStart().length;
    s = s.trim();
    offset += lead;
    if (s.length >= 2 && ((s[0] === '"' && s.endsWith('"')) || (s[0] === "'" && s.endsWith("'")))) {
      s = s.slice(1, -1);
      offset += 1;
      continue;
    }
    const w = WRAPPER_RE.exec(s);
    if (w) {
      if (!s.endsWith(')')) return { error: `a closing ")" after ${w[0]}`, offset: offset + s.length };
      s = s.slice(w[0].length, -1);
      offset += w[0].length;
      continue;
    }
    if (s.startsWith('(')) {
      if (!s.endsWith(')')) return { error: 'a closing ")"', offset: offset + s.length };
      s = s.slice(1, -1);
      offset += 1;
      continue;
    }
    break;
  }
  return { inner: s, offset };
}

const EXPECTED = 'a number such as 0.9, -1e-3, (0.9+0.1j), 0.9 + 0.1i or 0.9 + 0.1im';

/**
 * Parse one complex (or real) literal occupying the whole of `text`.
 * `offset` in a failure is a 0-based index into `text`.
 */
export function parseComplexLiteral(text: string): LiteralResult {
  const u = unwrap(text);
  if ('error' in u) return { ok: false, offset: u.offset, message: `expected ${u.error}` };
  const s = u.inner;
  const base = u.offset;
  const fail = (pos: number, what = EXPECTED): LiteralResult => {
    const got = s.slice(pos, pos + 12);
    return { ok: false, offset: base + pos, message: got ? `expected ${what}, found "${got}"` : `expected ${what}, found the end of the value` };
  };
  const nonFinite = (pos: number): LiteralResult => ({
    ok: false,
    offset: base + pos,
    message: 'infinite or NaN values are not accepted; every value must be a finite number',
  });
  if (s.length === 0) return fail(0);

  let pos = 0;
  let sign = 1;
  if (s[pos] === '+' || s[pos] === '-') {
    sign = s[pos] === '-' ? -1 : 1;
    pos = skipSpaces(s, pos + 1);
  }
  const first = readUnsigned(s, pos);
  if (!first) {
    // A bare imaginary unit such as "j" or "-im".
    const bare = IMAG_SUFFIX_RE.exec(s.slice(pos));
    if (bare && pos + bare[0].length === s.length && bare[0][0] !== '*') return { ok: true, value: { re: 0, im: sign }, isComplex: true };
    return fail(pos);
  }
  if (first.nonFinite) return nonFinite(pos);
  pos = first.end;
  const suffix = IMAG_SUFFIX_RE.exec(s.slice(pos));
  if (suffix) {
    pos += suffix[0].length;
    if (skipSpaces(s, pos) !== s.length) return fail(skipSpaces(s, pos), 'the end of the value');
    return { ok: true, value: { re: 0, im: sign * first.value }, isComplex: true };
  }
  const re = sign * first.value;
  pos = skipSpaces(s, pos);
  if (pos === s.length) return { ok: true, value: { re, im: 0 }, isComplex: false };

  // Real part followed by a signed imaginary part. NumPy's savetxt writes "+-".
  if (s[pos] !== '+' && s[pos] !== '-') return fail(pos, 'the end of the value or "+"/"-" and an imaginary part');
  let imSign = s[pos] === '-' ? -1 : 1;
  pos = skipSpaces(s, pos + 1);
  if (s[pos] === '+' || s[pos] === '-') {
    if (s[pos] === '-') imSign = -imSign;
    pos = skipSpaces(s, pos + 1);
  }
  const second = readUnsigned(s, pos);
  if (!second) {
    const bare = IMAG_SUFFIX_RE.exec(s.slice(pos));
    if (bare && pos + bare[0].length === s.length && bare[0][0] !== '*') return { ok: true, value: { re, im: imSign }, isComplex: true };
    return fail(pos, 'an imaginary part such as 0.1j, 0.1i or 0.1im');
  }
  if (second.nonFinite) return nonFinite(pos);
  pos = second.end;
  const suffix2 = IMAG_SUFFIX_RE.exec(s.slice(pos));
  if (!suffix2) return fail(pos, 'an imaginary unit (j, i or im) after the imaginary part');
  pos = skipSpaces(s, pos + suffix2[0].length);
  if (pos !== s.length) return fail(pos, 'the end of the value');
  const value = { re, im: imSign * second.value };
  if (!Number.isFinite(value.re) || !Number.isFinite(value.im)) return nonFinite(0);
  return { ok: true, value, isComplex: true };
}

/** Parse a plain real number cell (no imaginary part allowed). */
export function parseRealLiteral(text: string): LiteralResult {
  const r = parseComplexLiteral(text);
  if (r.ok && r.isComplex) {
    return { ok: false, offset: 0, message: 'expected a real number here (this column holds one part of a complex value), found a complex value' };
  }
  if (r.ok && !Number.isFinite(r.value.re)) return { ok: false, offset: 0, message: 'infinite or NaN values are not accepted; every value must be a finite number' };
  return r;
}
