import { spawnSync } from 'node:child_process';

/** Whether python3 with NumPy can be run here (tests that need it skip with a message otherwise). */
export function numpyAvailable(): boolean {
  const r = spawnSync('python3', ['-c', 'import numpy'], { encoding: 'utf8' });
  return r.status === 0;
}

export const NUMPY_MISSING = 'python3 with NumPy is not available on this machine; the reference-library comparison cannot run';

/** Run a python3 snippet that reads JSON from stdin and prints JSON. */
export function runNumpy<T>(script: string, input: unknown): T {
  const r = spawnSync('python3', ['-c', script], { input: JSON.stringify(input), encoding: 'utf8', maxBuffer: 256 << 20 });
  if (r.status !== 0) throw new Error(`python3 failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as T;
}

/** Seeded uniform numbers in [−0.5, 0.5) (Park–Miller). */
export function seeded(seed: number): () => number {
  let s = seed % 2147483647 || 1;
  return () => {
    s = (s * 16807) % 2147483647;
    return s / 2147483647 - 0.5;
  };
}

/** Euclidean norm of each column of the n×k column-major matrix d. */
export function colNorms(d: Float64Array, n: number, k: number): number[] {
  const out: number[] = [];
  for (let j = 0; j < k; j++) {
    let s = 0;
    for (let t = 0; t < n; t++) s += d[j * n + t] ** 2;
    out.push(Math.sqrt(s));
  }
  return out;
}

/** Run f with the environment variable set to value, restoring it afterwards. */
export async function withEnvAsync<T>(name: string, value: string, f: () => Promise<T>): Promise<T> {
  const before = process.env[name];
  process.env[name] = value;
  try {
    return await f();
  } finally {
    if (before === undefined) delete process.env[name];
    else process.env[name] = before;
  }
}
