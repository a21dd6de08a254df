/**
 * Drivers for the WebAssembly SIMD Gram micro-kernel (wasm-simd.ts), with the
 * same contract as the scalar kernels in kernels.ts: `out` += the partial
 * inner products of the rows [r0, r1), summed in row chunks of ROW_CHUNK
 * starting at r0. Per entry the arithmetic is the same as the scalar kernels
 * (running sum from 0 in row order inside a chunk, added to `out` once per
 * chunk, no fused multiply-add), so the results are bit-identical to
 * kernels.ts and it does not matter which thread uses which kernel.
 *
 * Memory: one wasm memory per thread, kept for reuse and grown on demand. It
 * holds packed row tiles of the input and a block of running sums, never the
 * whole snapshot matrix nor the whole output (see gramWith, crossWith; the
 * standard workload needs 4 MB per thread). The output stays in the caller's
 * array.
 *
 * Routing: `MODEWRIGHT_WASM=0` forces the scalar kernels. When WebAssembly SIMD
 * is missing, the module does not instantiate, the self-check against the
 * scalar kernel fails, or the memory cannot grow, the scalar kernels are used
 * (`wasmKernelError()` says why).
 */
import { ROW_CHUNK, crossRowsInto, gramRowsInto, productRowsInto } from './kernels.js';
import { gramSimdModuleBytes } from './wasm-simd.js';

type PanelFn = (ap: number, bp: number, np: number, rows: number, op: number, ldo: number) => void;

interface Simd {
  memory: WebAssembly.Memory;
  panel: PanelFn;
}

/** Products needing more wasm memory than this use the scalar kernels. */
const MAX_WASM_BYTES = 1 << 30;
const PAGE = 65536;

let simd: Simd | null | undefined;
let lastError: string | null = null;

/** True unless MODEWRIGHT_WASM=0. */
export function wasmWanted(): boolean {
  return process.env.MODEWRIGHT_WASM !== '0';
}

/** Why the wasm kernel is not in use on this thread, if it failed. */
export function wasmKernelError(): string | null {
  return lastError;
}

function instantiate(): Simd | null {
  try {
    if (typeof WebAssembly !== 'object') throw new Error('WebAssembly is not available');
    const bytes = gramSimdModuleBytes();
    if (!WebAssembly.validate(bytes)) throw new Error('WebAssembly SIMD is not supported (module does not validate)');
    const inst = new WebAssembly.Instance(new WebAssembly.Module(bytes), {});
    const s: Simd = { memory: inst.exports.memory as WebAssembly.Memory, panel: inst.exports.panel as PanelFn };
    selfCheck(s);
    return s;
  } catch (err) {
    lastError = err instanceof Error ? err.message : String(err);
    return null;
  }
}

/** A small odd-shaped product must match the scalar kernel bit for bit, else the wasm route is not used. */
function selfCheck(s: Simd): void {
  const n = 11, k = 7;
  const d = new Float64Array(n * k);
  for (let i = 0; i < d.length; i++) d[i] = Math.sin(1.7 * i + 0.3) * (1 + i / 13);
  const want = new Float64Array(k * k);
  gramRowsInto(d, n, k, 1, n, want);
  const got = new Float64Array(k * k);
  if (!gramWith(s, d, n, k, 1, n, got)) throw new Error('self-check could not run');
  for (let j = 0; j < k; j++) {
    for (let i = 0; i <= j; i++) {
      if (!Object.is(got[i + j * k], want[i + j * k])) throw new Error(`self-check: entry (${i}, ${j}) differs from the scalar kernel`);
    }
  }
}

function getSimd(): Simd | null {
  if (simd === undefined) simd = instantiate();
  return simd;
}

/** True when the wasm kernel is wanted and runs on this thread. */
export function wasmKernelAvailable(): boolean {
  return wasmWanted() && getSimd() !== null;
}

/** Grow the memory to at least `bytes`; false if too large or refused. */
function ensureBytes(s: Simd, bytes: number): boolean {
  if (bytes > MAX_WASM_BYTES) return false;
  const have = s.memory.buffer.byteLength;
  if (have >= bytes) return true;
  try {
    s.memory.grow(Math.ceil((bytes - have) / PAGE));
    return true;
  } catch (err) {
    lastError = `wasm memory could not grow to ${bytes} bytes: ${String(err)}`;
    return false;
  }
}

/**
 * Pack rows [t0, t0+rows) of the columns of panels [p0, p1) (column-major source,
 * leading dimension ld, kc columns) into 4-column panels at f64 index `at`:
 * panel p, row t, column c at at + (p·rows + t)·4 + c. Columns ≥ kc are zeros.
 */
function pack(src: Float64Array, ld: number, kc: number, t0: number, rows: number, p0: number, p1: number, mem: Float64Array, at: number): void {
  for (let p = p0; p < p1; p++) {
    const c = 4 * p;
    let o = at + p * rows * 4;
    if (c + 4 <= kc) {
      const s0 = c * ld + t0, s1 = s0 + ld, s2 = s1 + ld, s3 = s2 + ld;
      for (let t = 0; t < rows; t++, o += 4) {
        mem[o] = src[s0 + t]; mem[o + 1] = src[s1 + t]; mem[o + 2] = src[s2 + t]; mem[o + 3] = src[s3 + t];
      }
    } else {
      for (let t = 0; t < rows; t++, o += 4) {
        for (let q = 0; q < 4; q++) mem[o + q] = c + q < kc ? src[(c + q) * ld + t0 + t] : 0;
      }
    }
  }
}

/**
 * Bytes for the block of running sums: it sets the column-group width (4·kp ×
 * 4·g doubles), so fewer, wider groups repack the rows less often (measured:
 * the packing is the main cost outside the wasm kernel).
 */
const BLOCK_BYTES = 2 << 20;
/** Test override of the column-group width in panels (0: from BLOCK_BYTES). */
let groupPanels = 0;
/** Rows packed at a time inside a ROW_CHUNK (the running sums carry over between sub-chunks). */
const SUB_ROWS = 256;
/** A panels per inner block (they stay in L1/L2 while the group's B panels pass). */
const INNER_PANELS = 8;

/** Test hook for the column-group width in panels (any value ≥ 1 gives the same bits; 0 restores the default). */
export function setGroupPanels(g: number): void {
  groupPanels = Math.max(0, Math.floor(g));
}

/**
 * Per row chunk (ROW_CHUNK rows from r0, as the scalar kernel), per column group
 * [qb, qe) of panels: the running sums of the tiles (p, q), p ≤ q, live in a
 * block of 4·kp × 4·(qe−qb), zeroed at the start; the chunk is fed in
 * sub-chunks of SUB_ROWS rows (panels 0..qe packed for those rows); then the
 * block is added to `out` (i ≤ j only), which is the scalar kernel's
 * `out += s` per chunk. Wasm memory: SUB_ROWS × 4·kp + 4·kp × 4·g doubles
 * (standard workload, k = 1001, g = 65: 2 + 2 MB per thread); the price is
 * that each sub-chunk is packed about (1 + kp/g)/2 times (k ≤ 512: once).
 */
function gramWith(s: Simd, d: Float64Array, ld: number, k: number, r0: number, r1: number, out: Float64Array): boolean {
  if (k === 0 || r1 <= r0) return true;
  const kp = (k + 3) >> 2, k4 = 4 * kp;
  const g = Math.min(kp, groupPanels > 0 ? groupPanels : Math.max(4, Math.floor(BLOCK_BYTES / (k4 * 32))));
  const sub = Math.min(SUB_ROWS, r1 - r0);
  const blockAt = 0, packAt = 4 * g * k4; // f64 indices
  if (!ensureBytes(s, (packAt + sub * k4) * 8)) return false;
  const mem = new Float64Array(s.memory.buffer);
  for (let t0 = r0; t0 < r1; t0 += ROW_CHUNK) {
    const t1 = Math.min(r1, t0 + ROW_CHUNK);
    for (let qb = 0; qb < kp; qb += g) {
      const qe = Math.min(kp, qb + g);
      mem.fill(0, blockAt, blockAt + 4 * g * k4);
      for (let s0 = t0; s0 < t1; s0 += SUB_ROWS) {
        const rows = Math.min(t1, s0 + SUB_ROWS) - s0;
        const panelBytes = rows * 32;
        pack(d, ld, k, s0, rows, 0, qe, mem, packAt);
        for (let pb = 0; pb < qe; pb += INNER_PANELS) {
          for (let q = Math.max(qb, pb); q < qe; q++) {
            const p1 = Math.min(pb + INNER_PANELS, q + 1);
            s.panel(packAt * 8 + pb * panelBytes, packAt * 8 + q * panelBytes, p1 - pb, rows,
              (blockAt + 4 * pb + 4 * (q - qb) * k4) * 8, k4 * 8);
          }
        }
      }
      for (let j = 4 * qb; j < Math.min(k, 4 * qe); j++) {
        const o = j * k, b = blockAt + (j - 4 * qb) * k4;
        for (let i = 0; i <= j; i++) out[o + i] += mem[b + i];
      }
    }
  }
  return true;
}

/**
 * C = AᵀB per row chunk: A packed whole (ROW_CHUNK × 4·kap), B one panel at a
 * time, the running sums of one column block (4·kap × 4, zeroed first) added
 * to `out`. Wasm memory ROW_CHUNK × (4·kap + 4) + 16·kap doubles.
 */
function crossWith(
  s: Simd, a: Float64Array, lda: number, ka: number, b: Float64Array, ldb: number, kb: number,
  r0: number, r1: number, out: Float64Array,
): boolean {
  if (ka === 0 || kb === 0 || r1 <= r0) return true;
  const kap = (ka + 3) >> 2, ka4 = 4 * kap;
  const kbp = (kb + 3) >> 2;
  const chunk = Math.min(ROW_CHUNK, r1 - r0);
  const blockAt = 0, packB = 4 * ka4, packA = packB + 4 * chunk;
  if (!ensureBytes(s, (packA + chunk * ka4) * 8)) return false;
  const mem = new Float64Array(s.memory.buffer);
  for (let t0 = r0; t0 < r1; t0 += ROW_CHUNK) {
    const rows = Math.min(r1, t0 + ROW_CHUNK) - t0;
    pack(a, lda, ka, t0, rows, 0, kap, mem, packA);
    for (let q = 0; q < kbp; q++) {
      // B panel q goes to the single B slot (panel index 0 there).
      pack(b.subarray(4 * q * ldb), ldb, kb - 4 * q, t0, rows, 0, 1, mem, packB);
      mem.fill(0, blockAt, blockAt + 4 * ka4);
      s.panel(packA * 8, packB * 8, kap, rows, blockAt * 8, ka4 * 8);
      for (let c = 0; c < 4; c++) {
        const j = 4 * q + c;
        if (j >= kb) break;
        const o = j * ka, bb = blockAt + c * ka4;
        for (let i = 0; i < ka; i++) out[o + i] += mem[bb + i];
      }
    }
  }
  return true;
}

/**
 * Same contract as gramRowsInto (kernels.ts), upper triangle with the diagonal.
 * With `wasm` true and the wasm kernel available it runs in WebAssembly; otherwise,
 * or if the memory for this shape cannot be had, the scalar kernel runs. Same bits either way.
 * Returns true when the wasm kernel ran.
 */
export function gramRows(d: Float64Array, ld: number, k: number, r0: number, r1: number, out: Float64Array, wasm: boolean): boolean {
  const s = wasm ? getSimd() : null;
  if (s && gramWith(s, d, ld, k, r0, r1, out)) return true;
  gramRowsInto(d, ld, k, r0, r1, out);
  return false;
}

/** Same contract as crossRowsInto (kernels.ts); routing as gramRows. */
export function crossRows(
  a: Float64Array, lda: number, ka: number, b: Float64Array, ldb: number, kb: number,
  r0: number, r1: number, out: Float64Array, wasm: boolean,
): boolean {
  const s = wasm ? getSimd() : null;
  if (s && crossWith(s, a, lda, ka, b, ldb, kb, r0, r1, out)) return true;
  crossRowsInto(a, lda, ka, b, ldb, kb, r0, r1, out);
  return false;
}

/** Rows of A per block of the product (32 panels: with q = 1000 terms, 1 MB packed). */
const PRODUCT_ROWS = 128;

/**
 * C = A·B on the panel kernel, roles turned round: an "A panel" is four rows of
 * A over all q terms (packed [t][4]), a "B panel" four columns of B (packed
 * [t][4], once for the whole call), and the kernel's contraction runs over t.
 * Per block of PRODUCT_ROWS rows: pack the rows, zero a block of running sums
 * (rows × 4·kbp), one kernel call per B panel, copy the block out. Every entry
 * is summed from 0 in t order, as productRowsInto does.
 */
function productWith(
  sm: Simd, a: Float64Array, lda: number, q: number, b: Float64Array, s: number, r0: number, r1: number, out: Float64Array, ldc: number,
  oc: number,
): boolean {
  if (s === 0 || r1 <= r0) return true;
  if (q === 0) {
    for (let j = 0; j < s; j++) out.fill(0, j * ldc + oc, j * ldc + oc + r1 - r0);
    return true;
  }
  const kbp = (s + 3) >> 2;
  const rows = Math.min(PRODUCT_ROWS, (r1 - r0 + 3) & ~3);
  const bAt = 0, aAt = bAt + kbp * q * 4, oAt = aAt + rows * q; // f64 indices
  if (!ensureBytes(sm, (oAt + rows * 4 * kbp) * 8)) return false;
  const mem = new Float64Array(sm.memory.buffer);
  for (let p = 0; p < kbp; p++) {
    const o = bAt + p * q * 4;
    for (let c = 0; c < 4; c++) {
      const j = 4 * p + c;
      if (j < s) for (let t = 0; t < q; t++) mem[o + t * 4 + c] = b[j * q + t];
      else for (let t = 0; t < q; t++) mem[o + t * 4 + c] = 0;
    }
  }
  for (let i0 = r0; i0 < r1; i0 += rows) {
    const nr = Math.min(rows, r1 - i0);
    const np = (nr + 3) >> 2;
    for (let t = 0; t < q; t++) {
      const src = t * lda + i0;
      for (let i = 0; i < nr; i++) mem[aAt + ((i >> 2) * q + t) * 4 + (i & 3)] = a[src + i];
      for (let i = nr; i < 4 * np; i++) mem[aAt + ((i >> 2) * q + t) * 4 + (i & 3)] = 0;
    }
    mem.fill(0, oAt, oAt + rows * 4 * kbp);
    for (let p = 0; p < kbp; p++) {
      sm.panel(aAt * 8, (bAt + p * q * 4) * 8, np, q, (oAt + 4 * p * rows) * 8, rows * 8);
    }
    for (let j = 0; j < s; j++) {
      const o = j * ldc + i0 - r0 + oc, src = oAt + j * rows;
      for (let i = 0; i < nr; i++) out[o + i] = mem[src + i];
    }
  }
  return true;
}

/** Same contract as productRowsInto (kernels.ts); routing as gramRows. Same bits either way. */
export function productRows(
  a: Float64Array, lda: number, q: number, b: Float64Array, s: number, r0: number, r1: number, out: Float64Array, ldc: number, wasm: boolean,
  oc: number = r0,
): boolean {
  const sm = wasm ? getSimd() : null;
  if (sm && productWith(sm, a, lda, q, b, s, r0, r1, out, ldc, oc)) return true;
  productRowsInto(a, lda, q, b, s, r0, r1, out, ldc, oc);
  return false;
}

/** Drop this thread's wasm instance and memory (tests; the next product instantiates again). */
export function resetWasmKernel(): void {
  simd = undefined;
  lastError = null;
}

/** Test hook: behave as if instantiation had failed with `reason` (until resetWasmKernel). */
export function failWasmKernel(reason: string): void {
  simd = null;
  lastError = reason;
}
