import { afterAll, describe, expect, it } from 'vitest';
import { closePool } from '../../../grading/linalg/pool.js';
import { clearPool, giveBack, takeArray } from '../../../grading/linalg/scratch.js';
import { kernelEdmd } from '../../../grading/methods/kernel-edmd.js';
import { seeded } from './numpy-helper.js';

afterAll(() => closePool());

// Common practice, no source: a buffer pool must hand out zeroed memory of the right kind and never change a result.
describe('pool of large working arrays', () => {
  it('reuses a handed-back buffer, zeroed, of the right kind and size', () => {
    clearPool();
    const a = takeArray(300_000);
    a.fill(3);
    giveBack(a);
    const b = takeArray(250_000);
    expect(b.buffer).toBe(a.buffer);
    expect(b.length).toBe(250_000);
    expect(b.every((x) => x === 0)).toBe(true);
    // too small a request for that buffer (more than twice smaller), a shared request, a small buffer: new memory
    giveBack(b);
    expect(takeArray(100_000).buffer).not.toBe(a.buffer);
    const s = takeArray(300_000, true);
    expect(s.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(s.buffer).not.toBe(a.buffer);
    giveBack(s);
    expect(takeArray(300_000, true).buffer).toBe(s.buffer);
    const small = takeArray(10);
    giveBack(small);
    expect(takeArray(10).buffer).not.toBe(small.buffer);
    clearPool();
  });

  it('kernel EDMD gives the same bits run after run while its m×m arrays go round the pool, also with another size in between', async () => {
    clearPool();
    const n = 12;
    const data = (k: number, seed: number) => {
      const r = seeded(seed);
      const d = new Float64Array(n * k);
      for (let j = 0; j < k; j++) for (let t = 0; t < n; t++) d[j * n + t] = Math.cos(0.3 * j * (t + 1)) + 0.05 * r();
      return { kind: 'trajectory' as const, snapshots: { data: d, n, k } };
    };
    const opts = { kernel: { kind: 'polynomial' as const, degree: 2 }, truncation: { kind: 'rank' as const, rank: 20 }, modes: true };
    const big = data(421, 3), other = data(390, 4);
    const values = async (src: ReturnType<typeof data>) => (await kernelEdmd(src, opts)).eigenvalues.flatMap((e) => [e.lambda.re, e.lambda.im, e.condition]);
    const first = await values(big);
    const otherFirst = await values(other);
    expect(await values(big)).toEqual(first);
    expect(await values(other)).toEqual(otherFirst);
    expect(await values(big)).toEqual(first);
    clearPool();
  });
});
