/**
 * One way of writing numbers everywhere: a real minus sign (U+2212), complex
 * values as `0.9512 − 0.2810i`, significant digits chosen by the caller.
 */
const MINUS = '\u2212';

function trimExp(s: string): string {
  // 1.20e-7 → 1.20×10⁻⁷ would be prettier, but the plain e-form copies into code as is.
  return s.replace('e+', 'e');
}

/** A real number with `digits` digits after the point (fixed) when moderate, otherwise in e-form; real minus sign. */
export function formatReal(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : `${MINUS}∞`;
  const a = Math.abs(x);
  let s: string;
  if (a !== 0 && (a < 10 ** -(digits - 1) || a >= 1e6)) s = trimExp(a.toExponential(Math.max(1, digits - 1)));
  else s = a.toFixed(digits);
  return (x < 0 && Number(s) !== 0 ? MINUS : '') + s;
}

/** `0.9512 − 0.2810i`; a purely real value keeps its `+ 0.0000i` so columns line up. */
export function formatComplex(re: number | null | undefined, im: number | null | undefined, digits = 4): string {
  if (re === null || re === undefined || im === null || im === undefined) return '—';
  const sign = im < 0 || Object.is(im, -0) ? MINUS : '+';
  return `${formatReal(re, digits)} ${sign} ${formatReal(Math.abs(im), digits)}i`;
}

/** Three significant digits in e-form for condition numbers and spreads: 1.23e4. */
export function formatSci(x: number | null | undefined): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return '∞';
  if (x === 0) return '0';
  const a = Math.abs(x);
  const s = a >= 0.01 && a < 1e4 ? a.toPrecision(3) : trimExp(a.toExponential(2));
  return (x < 0 ? MINUS : '') + s;
}

/** Bytes as "64 MB" (decimal units, as file managers show them). */
export function formatBytes(n: number): string {
  if (n < 1000) return `${n} B`;
  if (n < 1e6) return `${(n / 1e3).toFixed(n < 1e4 ? 1 : 0)} kB`;
  if (n < 1e9) return `${(n / 1e6).toFixed(n < 1e7 ? 1 : 0)} MB`;
  return `${(n / 1e9).toFixed(1)} GB`;
}
