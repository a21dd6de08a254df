/**
 * Benchmark workloads: seeded synthetic snapshot data (invented for the
 * benchmark: a few damped travelling and standing patterns plus noise).
 */
export interface Workload {
  name: string;
  method: 'kernel-edmd' | 'dmd';
  /** Number of snapshot pairs m (the trajectory has m + 1 snapshots). */
  m: number;
  /** State dimension. */
  n: number;
  rank: number;
  seed: number;
}

export const WORKLOADS: Workload[] = [
  { name: 'typical', method: 'kernel-edmd', m: 400, n: 4096, rank: 100, seed: 11 },
  { name: 'standard', method: 'kernel-edmd', m: 1000, n: 16384, rank: 150, seed: 12 },
  { name: 'dmd-standard', method: 'dmd', m: 1000, n: 16384, rank: 150, seed: 13 },
];

/** Small deterministic generator (xorshift-style), uniform in [0, 1). */
function rng(seed: number): () => number {
  let s = (seed * 2654435761) >>> 0 || 1;
  return () => {
    s ^= s << 13; s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5; s >>>= 0;
    return s / 4294967296;
  };
}

/**
 * One trajectory D (n × (m+1), column-major): 20 oscillating patterns with
 * eigenvalues inside the unit disc and noise of 1e-3 relative size; each
 * snapshot has norm about 1, so the polynomial kernel (1 + xᵀy)² is well scaled.
 */
export function buildTrajectory(w: Workload, out?: Float64Array): Float64Array {
  const { n, m } = w;
  const k = m + 1;
  const rand = rng(w.seed);
  const q = 10; // complex pairs → 20 real patterns (231 quadratic features ≥ rank 150)
  const pat = new Float64Array(2 * q * n);
  const scale = 1 / Math.sqrt(n * q);
  for (let i = 0; i < pat.length; i++) pat[i] = (rand() - 0.5) * 2 * Math.sqrt(3) * scale;
  const rho: number[] = [], theta: number[] = [], amp: number[] = [];
  for (let p = 0; p < q; p++) {
    rho.push(0.995 - 0.01 * p * rand());
    theta.push(0.05 + 0.4 * rand());
    amp.push(1 - 0.05 * p);
  }
  const d = out ?? new Float64Array(n * k);
  for (let t = 0; t < k; t++) {
    const col = t * n;
    for (let i = 0; i < n; i++) d[col + i] = 1e-3 * scale * (rand() - 0.5);
    for (let p = 0; p < q; p++) {
      const mag = amp[p] * Math.pow(rho[p], t);
      const c = mag * Math.cos(theta[p] * t), s = mag * Math.sin(theta[p] * t);
      const a = 2 * p * n, b = a + n;
      for (let i = 0; i < n; i++) d[col + i] += c * pat[a + i] - s * pat[b + i];
    }
  }
  return d;
}
