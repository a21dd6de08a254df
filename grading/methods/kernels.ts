/**
 * Kernels evaluated elementwise from inner products and squared norms
 * (Williams, Rowley & Kevrekidis 2015, J. Comput. Dyn. 2:247–265):
 * linear xᵀy, polynomial (c + γ xᵀy)^p, Gaussian exp(−‖x−y‖²/(2σ²)) with
 * ‖x−y‖² = ‖x‖² + ‖y‖² − 2xᵀy.
 */
import { SpectrumInputError, type Kernel } from './types.js';

/** k from s = xᵀy, a = ‖x‖², b = ‖y‖². */
export type KernelFromInner = (s: number, a: number, b: number) => number;

export function checkKernel(k: Kernel): void {
  if (k.kind === 'polynomial') {
    if (!Number.isInteger(k.degree) || k.degree < 1) throw new SpectrumInputError(`polynomial kernel degree must be a positive integer, got ${k.degree}`);
    if (k.coef0 !== undefined && !Number.isFinite(k.coef0)) throw new SpectrumInputError(`polynomial kernel coef0 must be finite, got ${k.coef0}`);
    if (k.gamma !== undefined && !(Number.isFinite(k.gamma) && k.gamma > 0)) throw new SpectrumInputError(`polynomial kernel gamma must be positive, got ${k.gamma}`);
  }
  if (k.kind === 'gaussian' && !(Number.isFinite(k.sigma) && k.sigma > 0)) throw new SpectrumInputError(`Gaussian kernel sigma must be positive, got ${k.sigma}`);
}

export function kernelFromInner(k: Kernel): KernelFromInner {
  switch (k.kind) {
    case 'linear':
      return (s) => s;
    case 'polynomial': {
      const c = k.coef0 ?? 1;
      const g = k.gamma ?? 1;
      const p = k.degree;
      return (s) => powInt(c + g * s, p);
    }
    case 'gaussian': {
      const w = 1 / (2 * k.sigma * k.sigma);
      return (s, a, b) => Math.exp(-Math.max(a + b - 2 * s, 0) * w);
    }
  }
}

/**
 * Kernel matrix K_ij = k(u_i, v_j) (p×q column-major) from the inner products S_ij = u_iᵀv_j (p×q) and norms.
 * `out` may be `inner` itself (entry by entry, so in place is safe).
 */
export function kernelMatrix(
  kernel: Kernel, inner: Float64Array, p: number, q: number, uNorm2: Float64Array, vNorm2: Float64Array,
  out: Float64Array = new Float64Array(p * q),
): Float64Array {
  if (kernel.kind === 'polynomial') {
    // The hot case without a call per entry: (c + γ s)^p by repeated multiplication (binary powering).
    const c = kernel.coef0 ?? 1, g = kernel.gamma ?? 1, deg = kernel.degree;
    const n = p * q;
    if (deg === 1) for (let t = 0; t < n; t++) out[t] = c + g * inner[t];
    else if (deg === 2) for (let t = 0; t < n; t++) { const b = c + g * inner[t]; out[t] = b * b; }
    else for (let t = 0; t < n; t++) out[t] = powInt(c + g * inner[t], deg);
    return out;
  }
  const f = kernelFromInner(kernel);
  for (let j = 0; j < q; j++) for (let i = 0; i < p; i++) out[i + j * p] = f(inner[i + j * p], uNorm2[i], vNorm2[j]);
  return out;
}

/** x^p for a positive integer p by binary powering (the same products whichever caller). */
export function powInt(x: number, p: number): number {
  let result = 1, base = x, e = p;
  while (e > 0) {
    if (e & 1) result *= base;
    e >>= 1;
    if (e > 0) base *= base;
  }
  return result;
}
