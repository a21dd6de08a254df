/**
 * Gram products on snapshot matrices (column-major, one snapshot contiguous).
 * Straightforward reference versions; the fast versions must give identical
 * results up to floating-point summation order.
 */

/** S = DᵀD, D of shape n×k. Returns k×k column-major, exactly symmetric. */
export async function gramSymmetric(d: Float64Array, n: number, k: number): Promise<Float64Array> {
  return gramSymmetricSync(d, n, k);
}

export function gramSymmetricSync(d: Float64Array, n: number, k: number): Float64Array {
  checkShape(d, n, k, 'D');
  const s = new Float64Array(k * k);
  for (let j = 0; j < k; j++) {
    const oj = j * n;
    for (let i = 0; i <= j; i++) {
      const oi = i * n;
      let acc = 0;
      for (let t = 0; t < n; t++) acc += d[oi + t] * d[oj + t];
      s[i + j * k] = acc;
      s[j + i * k] = acc;
    }
  }
  return s;
}

/** C = AᵀB, A of shape n×ka, B of shape n×kb. Returns ka×kb column-major. */
export async function gramCross(a: Float64Array, b: Float64Array, n: number, ka: number, kb: number): Promise<Float64Array> {
  return gramCrossSync(a, b, n, ka, kb);
}

export function gramCrossSync(a: Float64Array, b: Float64Array, n: number, ka: number, kb: number): Float64Array {
  checkShape(a, n, ka, 'A');
  checkShape(b, n, kb, 'B');
  const c = new Float64Array(ka * kb);
  for (let j = 0; j < kb; j++) {
    const oj = j * n;
    for (let i = 0; i < ka; i++) {
      const oi = i * n;
      let acc = 0;
      for (let t = 0; t < n; t++) acc += a[oi + t] * b[oj + t];
      c[i + j * ka] = acc;
    }
  }
  return c;
}

function checkShape(x: Float64Array, n: number, k: number, name: string): void {
  if (x.length < n * k) throw new RangeError(`${name} has ${x.length} entries, expected at least ${n}×${k} = ${n * k}`);
}
