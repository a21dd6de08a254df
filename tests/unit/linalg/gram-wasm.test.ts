import { afterAll, afterEach, describe, expect, it } from 'vitest';
import {
  gramCross, gramCrossReference, gramCrossSync, gramSymmetric, gramSymmetricReference, gramSymmetricSync,
} from '../../../grading/linalg/gram.js';
import {
  crossRows, failWasmKernel, gramRows, resetWasmKernel, setGroupPanels, wasmKernelAvailable, wasmKernelError, wasmWanted,
} from '../../../grading/linalg/kernels-wasm.js';
import { crossRowsInto, gramRowsInto } from '../../../grading/linalg/kernels.js';
import { closePool, helperKernel, sharedFloat64, warmUp } from '../../../grading/linalg/pool.js';
import { gramSimdModuleBytes } from '../../../grading/linalg/wasm-simd.js';
import { colNorms, seeded, withEnvAsync } from './numpy-helper.js';

function randomMatrix(n: number, k: number, seed: number, into?: Float64Array): Float64Array {
  const r = seeded(seed);
  const d = into ?? new Float64Array(n * k);
  for (let i = 0; i < n * k; i++) d[i] = r() - 0.3 + 0.2 * Math.sin(i);
  return d;
}

/** |fast − reference| ≤ 1e-13·‖a_i‖‖b_j‖ (relative to the Cauchy–Schwarz scale of the entry). */
function expectRelative(fast: Float64Array, ref: Float64Array, na: number[], nb: number[]): void {
  expect(fast.length).toBe(ref.length);
  const ka = na.length;
  for (let j = 0; j < nb.length; j++) {
    for (let i = 0; i < ka; i++) {
      const scale = na[i] * nb[j];
      const dev = Math.abs(fast[i + j * ka] - ref[i + j * ka]);
      if (dev > 1e-13 * scale) throw new Error(`entry (${i}, ${j}) differs by ${dev}, relative ${dev / scale} > 1e-13`);
    }
  }
}

function expectSameBits(x: Float64Array, y: Float64Array, what: string): void {
  expect(x.length).toBe(y.length);
  for (let i = 0; i < x.length; i++) {
    if (!Object.is(x[i], y[i])) throw new Error(`${what}: entry ${i} is ${x[i]} against ${y[i]}`);
  }
}

function withEnv<T>(name: string, value: string | undefined, f: () => T): T {
  const before = process.env[name];
  if (value === undefined) delete process.env[name];
  else process.env[name] = value;
  try {
    return f();
  } finally {
    if (before === undefined) delete process.env[name];
    else process.env[name] = before;
  }
}


// Odd shapes: n and k not multiples of 4 or of the 1024-row chunk, k = 1, n = 1.
const SHAPES: [number, number][] = [[1, 1], [1, 7], [5, 1], [3, 4], [13, 9], [1030, 6], [2049, 13], [4097, 5], [700, 17], [1025, 35]];

afterEach(() => {
  resetWasmKernel();
  setGroupPanels(0);
});

afterAll(async () => {
  await closePool();
});

describe('WebAssembly SIMD Gram kernel (common practice, no source — the defining formula AᵀB as one dot product per entry; the scalar kernels of kernels.ts as the bit-for-bit comparison)', () => {
  it('the hand-assembled module validates and instantiates in this Node.js (wasm SIMD present)', () => {
    expect(WebAssembly.validate(gramSimdModuleBytes())).toBe(true);
    expect(wasmKernelAvailable()).toBe(true);
    expect(wasmKernelError()).toBeNull();
  });

  for (const [n, k] of SHAPES) {
    it(`gram rows: wasm equals the scalar kernel bit for bit (also with a non-zero start and an offset row range), n=${n}, k=${k}`, () => {
      const d = randomMatrix(n, k, 31 + n + 7 * k);
      const start = randomMatrix(k, k, 3 + k);
      for (const [r0, r1] of [[0, n], [n >> 1, n], [0, n >> 1]]) {
        const js = start.slice();
        const wasm = start.slice();
        gramRowsInto(d, n, k, r0, r1, js);
        expect(gramRows(d, n, k, r0, r1, wasm, true)).toBe(true);
        for (let j = 0; j < k; j++) {
          for (let i = 0; i <= j; i++) {
            if (!Object.is(js[i + j * k], wasm[i + j * k])) throw new Error(`rows [${r0}, ${r1}): entry (${i}, ${j}) differs`);
          }
        }
      }
    });

    it(`cross rows: wasm equals the scalar kernel bit for bit, n=${n}, ka=${k}, kb=${k + 2} and kb=1`, () => {
      for (const kb of [k + 2, 1]) {
        const a = randomMatrix(n, k, 5 + n);
        const b = randomMatrix(n, kb, 9 + kb);
        const start = randomMatrix(k, kb, 1 + k);
        const js = start.slice();
        const wasm = start.slice();
        crossRowsInto(a, n, k, b, n, kb, 0, n, js);
        expect(crossRows(a, n, k, b, n, kb, 0, n, wasm, true)).toBe(true);
        expectSameBits(wasm, js, `cross ${n}×${k}ᵀ·${n}×${kb}`);
      }
    });

    it(`public products on the wasm route: relative 1e-13 from the straightforward formula, S exactly symmetric, same bits as MODEWRIGHT_WASM=0, n=${n}, k=${k}`, async () => {
      expect(wasmWanted()).toBe(true);
      const d = randomMatrix(n, k, 77 + n + k);
      const nrm = colNorms(d, n, k);
      const s = gramSymmetricSync(d, n, k);
      expectRelative(s, gramSymmetricReference(d, n, k), nrm, nrm);
      for (let j = 0; j < k; j++) for (let i = 0; i < j; i++) expect(s[i + j * k]).toBe(s[j + i * k]);
      expectSameBits(await gramSymmetric(d, n, k), s, 'gramSymmetric vs gramSymmetricSync');
      const sJs = withEnv('MODEWRIGHT_WASM', '0', () => gramSymmetricSync(d, n, k));
      expectSameBits(s, sJs, 'wasm vs scalar route');

      const b = randomMatrix(n, k + 3, 13 + k);
      const c = gramCrossSync(d, b, n, k, k + 3);
      expectRelative(c, gramCrossReference(d, b, n, k, k + 3), nrm, colNorms(b, n, k + 3));
      expectSameBits(await gramCross(d, b, n, k, k + 3), c, 'gramCross vs gramCrossSync');
      expectSameBits(c, withEnv('MODEWRIGHT_WASM', '0', () => gramCrossSync(d, b, n, k, k + 3)), 'cross: wasm vs scalar route');
    });
  }

  it('the cache-blocking width changes nothing in the result', () => {
    const n = 2100, k = 61;
    const d = randomMatrix(n, k, 4);
    const ref = new Float64Array(k * k);
    gramRowsInto(d, n, k, 0, n, ref);
    for (const g of [1, 2, 3, 8, 100, 0]) {
      setGroupPanels(g);
      const out = new Float64Array(k * k);
      gramRows(d, n, k, 0, n, out, true);
      for (let j = 0; j < k; j++) for (let i = 0; i <= j; i++) expect(Object.is(out[i + j * k], ref[i + j * k])).toBe(true);
    }
  });

  it('MODEWRIGHT_WASM=0 forces the scalar kernels', () => {
    withEnv('MODEWRIGHT_WASM', '0', () => {
      expect(wasmWanted()).toBe(false);
      expect(wasmKernelAvailable()).toBe(false);
    });
    const d = randomMatrix(9, 3, 1);
    expect(gramRows(d, 9, 3, 0, 9, new Float64Array(9), false)).toBe(false);
    expect(crossRows(d, 9, 3, d, 9, 3, 0, 9, new Float64Array(9), false)).toBe(false);
  });

  it('when instantiation fails, the scalar kernels run and the results are the same', async () => {
    const n = 1500, k = 23;
    const d = randomMatrix(n, k, 8);
    const withWasm = gramSymmetricSync(d, n, k);
    const cWasm = gramCrossSync(d, d.subarray(n), n, k - 1, k - 1);
    failWasmKernel('simulated: no SIMD');
    expect(wasmKernelAvailable()).toBe(false);
    expect(wasmKernelError()).toBe('simulated: no SIMD');
    expect(gramRows(d, n, k, 0, n, new Float64Array(k * k), true)).toBe(false);
    expectSameBits(gramSymmetricSync(d, n, k), withWasm, 'fallback gram');
    expectSameBits(await gramCross(d, d.subarray(n), n, k - 1, k - 1), cWasm, 'fallback cross');
  });
});

describe('WebAssembly SIMD Gram kernel with the helper thread (common practice, no source — the single-thread route as the bit-for-bit comparison)', () => {
  it('the helper runs its half in wasm, and threaded, single-thread and scalar routes agree bit for bit (copied and shared input)', async () => {
    expect(await warmUp()).toBe(true);
    const n = 3001, k = 75; // above the threading threshold
    const d = randomMatrix(n, k, 99);
    const sync = gramSymmetricSync(d, n, k);
    expectSameBits(await gramSymmetric(d, n, k), sync, 'threaded, copied input');
    expect(helperKernel()).toBe('wasm');
    const shared = randomMatrix(n, k, 99, sharedFloat64(n * k));
    expectSameBits(await gramSymmetric(shared, n, k), sync, 'threaded, shared input');
    expect(helperKernel()).toBe('wasm');
    const scalarThreaded = await withEnvAsync('MODEWRIGHT_WASM', '0', () => gramSymmetric(d, n, k));
    expect(helperKernel()).toBe('js');
    expectSameBits(scalarThreaded, sync, 'threaded scalar route');
    const single = await withEnvAsync('MODEWRIGHT_THREADS', '1', () => gramSymmetric(d, n, k));
    expectSameBits(single, sync, 'MODEWRIGHT_THREADS=1');

    const y = d.subarray(n); // Y = D[:, 1:], X = D[:, :k−1]
    const cs = gramCrossSync(y, d, n, k - 1, k - 1);
    expectSameBits(await gramCross(y, d, n, k - 1, k - 1), cs, 'threaded cross');
    expect(helperKernel()).toBe('wasm');
    expectSameBits(await withEnvAsync('MODEWRIGHT_WASM', '0', () => gramCross(y, d, n, k - 1, k - 1)), cs, 'threaded scalar cross');
    expectRelative(cs, gramCrossReference(y, d, n, k - 1, k - 1), colNorms(y, n, k - 1), colNorms(d, n, k - 1));
  });
});
