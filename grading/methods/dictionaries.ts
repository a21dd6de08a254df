/**
 * EDMD dictionaries (Williams, Kevrekidis & Rowley 2015, J. Nonlinear Sci.
 * 25:1307–1346, §3): monomials of total degree ≤ p (N = C(d+p, p)),
 * products of probabilists' Hermite polynomials He_k (He_0 = 1, He_1 = x,
 * He_{k+1} = x He_k − k He_{k−1}) of total degree ≤ p, and Gaussian radial
 * functions exp(−‖x−c‖²/(2σ²)) on given centres; the constant is always included.
 */
import { SpectrumInputError, type Dictionary } from './types.js';

export interface EvaluatedDictionary {
  /** Number of functions N. */
  size: number;
  /** Human-readable names, e.g. "x1^2 x2". */
  labels: string[];
  /** Ψ (k×N column-major) at the k points of a column-major n×k matrix. */
  evaluate(points: Float64Array, k: number): Float64Array;
}

/** C(a, b) as a float (exact for the sizes we allow). */
export function binomial(a: number, b: number): number {
  let r = 1;
  for (let i = 1; i <= b; i++) r = (r * (a - b + i)) / i;
  return Math.round(r);
}

/** All multi-indices α ∈ ℕ^d with |α| ≤ p, graded by degree, lexicographically descending within a degree. */
export function multiIndices(d: number, p: number): number[][] {
  const out: number[][] = [];
  const rec = (prefix: number[], left: number, slots: number, degree: number) => {
    if (slots === 0) {
      if (left === 0) out.push(prefix.slice());
      return;
    }
    for (let e = left; e >= 0; e--) {
      prefix.push(e);
      rec(prefix, left - e, slots - 1, degree);
      prefix.pop();
    }
  };
  for (let deg = 0; deg <= p; deg++) rec([], deg, d, deg);
  return out;
}

function label(alpha: number[], fn: string): string {
  const parts = alpha.flatMap((e, i) => (e === 0 ? [] : [fn === 'x' ? `x${i + 1}${e > 1 ? `^${e}` : ''}` : `He${e}(x${i + 1})`]));
  return parts.length === 0 ? '1' : parts.join(' ');
}

/** The dictionary for n state variables. */
export function buildDictionary(dict: Dictionary, n: number, maxSize = 2000): EvaluatedDictionary {
  if (dict.kind === 'monomial' || dict.kind === 'hermite') {
    const p = dict.degree;
    if (!Number.isInteger(p) || p < 1) throw new SpectrumInputError(`dictionary degree must be a positive integer, got ${p}`);
    const size = binomial(n + p, p);
    if (size > maxSize) throw new SpectrumInputError(`a ${dict.kind} dictionary of degree ${p} in ${n} variables has ${size} functions, more than the limit of ${maxSize}`);
    const alphas = multiIndices(n, p);
    const hermite = dict.kind === 'hermite';
    return {
      size,
      labels: alphas.map((a) => label(a, hermite ? 'He' : 'x')),
      evaluate(points, k) {
        const psi = new Float64Array(k * size);
        const pow = new Float64Array((p + 1) * n);
        for (let i = 0; i < k; i++) {
          for (let v = 0; v < n; v++) {
            const xv = points[i * n + v];
            pow[v * (p + 1)] = 1;
            if (p >= 1) pow[v * (p + 1) + 1] = xv;
            for (let e = 2; e <= p; e++) {
              pow[v * (p + 1) + e] = hermite
                ? xv * pow[v * (p + 1) + e - 1] - (e - 1) * pow[v * (p + 1) + e - 2]
                : xv * pow[v * (p + 1) + e - 1];
            }
          }
          for (let f = 0; f < size; f++) {
            const a = alphas[f];
            let val = 1;
            for (let v = 0; v < n; v++) if (a[v] !== 0) val *= pow[v * (p + 1) + a[v]];
            psi[i + f * k] = val;
          }
        }
        return psi;
      },
    };
  }
  const c = dict.centres;
  if (c.n !== n) throw new SpectrumInputError(`the radial centres have dimension ${c.n}, the data has ${n}`);
  if (!(dict.sigma > 0 && Number.isFinite(dict.sigma))) throw new SpectrumInputError(`radial width sigma must be positive, got ${dict.sigma}`);
  const size = c.k + 1;
  if (size > maxSize) throw new SpectrumInputError(`${c.k} radial centres give ${size} functions, more than the limit of ${maxSize}`);
  const w = 1 / (2 * dict.sigma * dict.sigma);
  return {
    size,
    labels: ['1', ...Array.from({ length: c.k }, (_, j) => `rbf(c${j + 1})`)],
    evaluate(points, k) {
      const psi = new Float64Array(k * size);
      for (let i = 0; i < k; i++) {
        psi[i] = 1;
        for (let j = 0; j < c.k; j++) {
          let d2 = 0;
          for (let v = 0; v < n; v++) d2 += (points[i * n + v] - c.data[j * n + v]) ** 2;
          psi[i + (j + 1) * k] = Math.exp(-d2 * w);
        }
      }
      return psi;
    },
  };
}
