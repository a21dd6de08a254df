import { describe, expect, it } from 'vitest';
import { kernelFromInner, kernelMatrix, powInt } from '../../../grading/methods/kernels';
import type { Kernel } from '../../../grading/methods/types';

// The kernels of Williams, Rowley & Kevrekidis 2015 (J. Comput. Dyn. 2:247–265): linear xᵀy,
// polynomial (c + γ xᵀy)^p, Gaussian exp(−‖x−y‖²/(2σ²)), evaluated here straight from the vectors.
function direct(kernel: Kernel, x: number[], y: number[]): number {
  const dot = x.reduce((s, v, i) => s + v * y[i], 0);
  switch (kernel.kind) {
    case 'linear':
      return dot;
    case 'polynomial':
      return Math.pow((kernel.coef0 ?? 1) + (kernel.gamma ?? 1) * dot, kernel.degree);
    case 'gaussian':
      return Math.exp(-x.reduce((s, v, i) => s + (v - y[i]) ** 2, 0) / (2 * kernel.sigma ** 2));
  }
}

describe('kernel matrices from inner products equal the kernels evaluated on the vectors (published formulas, Williams, Rowley & Kevrekidis 2015)', () => {
  const u = [[0.3, -1.2, 0.5], [1.1, 0.4, -0.7], [-0.2, 0.9, 0.05], [0.6, 0.6, 0.6]];
  const v = [[0.8, 0.1, -0.4], [-1.0, 0.3, 0.2], [0.25, -0.5, 1.5]];
  const inner = new Float64Array(u.length * v.length);
  u.forEach((x, i) => v.forEach((y, j) => (inner[i + j * u.length] = x.reduce((s, a, t) => s + a * y[t], 0))));
  const nu = Float64Array.from(u, (x) => x.reduce((s, a) => s + a * a, 0));
  const nv = Float64Array.from(v, (y) => y.reduce((s, a) => s + a * a, 0));
  const kernels: Kernel[] = [
    { kind: 'linear' },
    ...[1, 2, 3, 4, 5, 7].map((degree) => ({ kind: 'polynomial' as const, degree })),
    { kind: 'polynomial', degree: 3, coef0: 0.5, gamma: 2 },
    { kind: 'polynomial', degree: 2, coef0: 0, gamma: 0.1 },
    { kind: 'gaussian', sigma: 0.8 },
  ];
  for (const kernel of kernels) {
    it(JSON.stringify(kernel), () => {
      const km = kernelMatrix(kernel, inner, u.length, v.length, nu, nv);
      const f = kernelFromInner(kernel);
      u.forEach((x, i) => v.forEach((y, j) => {
        const want = direct(kernel, x, y);
        expect(Math.abs(km[i + j * u.length] - want)).toBeLessThanOrEqual(1e-13 * Math.max(1, Math.abs(want)));
        expect(f(inner[i + j * u.length], nu[i], nv[j])).toBe(km[i + j * u.length]);
      }));
    });
  }

  it('integer powers by repeated multiplication agree with Math.pow to a few units in the last place (common practice, no source)', () => {
    for (const x of [-2.5, -1, -0.3, 0, 0.7, 1, 1.0000001, 3.2, 1e5]) {
      for (let p = 1; p <= 9; p++) expect(Math.abs(powInt(x, p) - Math.pow(x, p))).toBeLessThanOrEqual(8 * Number.EPSILON * Math.abs(Math.pow(x, p)));
    }
    expect(powInt(1.5, 2)).toBe(1.5 * 1.5);
  });
});
