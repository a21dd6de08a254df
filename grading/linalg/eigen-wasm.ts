/**
 * WebAssembly SIMD (f64x2) kernels for the O(k²)-per-step parts of the
 * partial symmetric eigensolver (symmetric-eigen.ts), assembled here with
 * wasm-asm.ts:
 *
 *   sweep(wp, k, c0, pvp, pwp, vp, pp)
 *     Householder tridiagonalisation, one step: for the trailing columns
 *     c ≥ c0 of the lower triangle of W (k×k, column-major at byte offset wp),
 *     apply the pending rank-2 update W −= pv·pwᵀ + pw·pvᵀ and accumulate
 *     p += W·v (W symmetric, only its lower triangle stored and read), two
 *     columns per pass over the rows, two rows per SIMD lane pair.
 *   backTransform(wp, k, taup, zp, r)
 *     Z ← H_0 H_1 … H_{k−3} Z for Z (k×r at zp) with the reflectors stored
 *     below the subdiagonal of W (H_j = I − tau_j·v vᵀ, v = [1, W[j+2…, j]]),
 *     four columns of Z per pass over a reflector.
 *   orthogonalise(xp, zp, k, from, to)
 *     x ← x − Σ_q (z_qᵀx) z_q over columns q ∈ [from, to) of Z (k×·), four
 *     columns per pass (classical inside a group of four, modified across).
 *
 * All offsets are bytes into the exported memory. The arithmetic is the
 * scalar JavaScript route's, with the sums over rows split into two lanes (even
 * and odd rows) that are added at the end; results agree with the scalar route
 * to rounding, not bit for bit. The scalar route stays in symmetric-eigen.ts
 * and is used when `MODEWRIGHT_WASM=0` or wasm SIMD is unavailable.
 */
import {
  F64, I32, Locals, V128, block, brIf, f64, f64x2, get, i32, ifThen, moduleBytes, set, tee, whileLoop,
  type Code, type FuncDef,
} from './wasm-asm.js';

const ld = (addr: Code, off = 0): Code => [addr, f64.load(off)];
const ldv = (addr: Code, off = 0): Code => [addr, f64x2.load(off)];
const add = (...xs: Code[]): Code => [xs[0], ...xs.slice(1).map((x) => [x, f64.add])];
const mul = (a: Code, b: Code): Code => [a, b, f64.mul];
const sub = (a: Code, b: Code): Code => [a, b, f64.sub];
const vadd = (a: Code, b: Code): Code => [a, b, f64x2.add];
const vmul = (a: Code, b: Code): Code => [a, b, f64x2.mul];
const vsub = (a: Code, b: Code): Code => [a, b, f64x2.sub];
const iadd = (a: Code, b: Code): Code => [a, b, i32.add];
const imul = (a: Code, b: Code): Code => [a, b, i32.mul];
const ic = (v: number): Code => i32.const(v);
const hsum = (v: number): Code => [get(v), f64x2.lane(0), get(v), f64x2.lane(1), f64.add];

function sweepFunc(): FuncDef {
  const L = new Locals(I32, I32, I32, I32, I32, I32, I32);
  const [WP, K, C0, PVP, PWP, VP, PP] = [0, 1, 2, 3, 4, 5, 6];
  const c = L.add(I32), k8 = L.add(I32), cb = L.add(I32), o0 = L.add(I32), o1 = L.add(I32), t = L.add(I32);
  const [b0, g0, b1, g1, v0, v1, x00, x10, x11, a0, a1, pvi, pwi, vi, y0, y1] = Array.from({ length: 16 }, () => L.add(F64));
  const [B0, G0, B1, G1, V0, V1, PV, PW, VV, Y0, Y1, A0, A1] = Array.from({ length: 13 }, () => L.add(V128));
  const body: Code[] = [
    get(C0), set(c),
    get(K), ic(3), i32.shl, set(k8),
    whileLoop([get(c), ic(1), i32.add, get(K), i32.ltS],
      get(c), ic(3), i32.shl, set(cb),
      iadd(get(WP), [imul(get(c), get(K)), ic(3), i32.shl]), set(o0),
      iadd(get(o0), get(k8)), set(o1),
      ld(iadd(get(PVP), get(cb))), set(b0), ld(iadd(get(PWP), get(cb))), set(g0),
      ld(iadd(get(PVP), get(cb)), 8), set(b1), ld(iadd(get(PWP), get(cb)), 8), set(g1),
      ld(iadd(get(VP), get(cb))), set(v0), ld(iadd(get(VP), get(cb)), 8), set(v1),
      // diagonal 2×2 block
      sub(ld(iadd(get(o0), get(cb))), mul(mul(f64.const(2), get(b0)), get(g0))), set(x00),
      sub(ld(iadd(get(o0), get(cb)), 8), add(mul(get(b1), get(g0)), mul(get(g1), get(b0)))), set(x10),
      sub(ld(iadd(get(o1), get(cb)), 8), mul(mul(f64.const(2), get(b1)), get(g1))), set(x11),
      iadd(get(o0), get(cb)), get(x00), f64.store(0),
      iadd(get(o0), get(cb)), get(x10), f64.store(8),
      iadd(get(o1), get(cb)), get(x11), f64.store(8),
      add(mul(get(x00), get(v0)), mul(get(x10), get(v1))), set(a0),
      add(mul(get(x10), get(v0)), mul(get(x11), get(v1))), set(a1),
      get(b0), f64x2.splat, set(B0), get(g0), f64x2.splat, set(G0),
      get(b1), f64x2.splat, set(B1), get(g1), f64x2.splat, set(G1),
      get(v0), f64x2.splat, set(V0), get(v1), f64x2.splat, set(V1),
      f64x2.zero(), set(A0), f64x2.zero(), set(A1),
      iadd(get(cb), ic(16)), set(t),
      whileLoop([iadd(get(t), ic(16)), get(k8), i32.leS],
        ldv(iadd(get(PVP), get(t))), set(PV), ldv(iadd(get(PWP), get(t))), set(PW), ldv(iadd(get(VP), get(t))), set(VV),
        iadd(get(o0), get(t)), vsub(ldv(iadd(get(o0), get(t))), vadd(vmul(get(PV), get(G0)), vmul(get(PW), get(B0)))), tee(Y0), f64x2.store(0),
        iadd(get(o1), get(t)), vsub(ldv(iadd(get(o1), get(t))), vadd(vmul(get(PV), get(G1)), vmul(get(PW), get(B1)))), tee(Y1), f64x2.store(0),
        iadd(get(PP), get(t)), vadd(ldv(iadd(get(PP), get(t))), vadd(vmul(get(Y0), get(V0)), vmul(get(Y1), get(V1)))), f64x2.store(0),
        vadd(get(A0), vmul(get(Y0), get(VV))), set(A0),
        vadd(get(A1), vmul(get(Y1), get(VV))), set(A1),
        iadd(get(t), ic(16)), set(t),
      ),
      [get(t), get(k8), i32.ltS],
      ifThen(
        ld(iadd(get(PVP), get(t))), set(pvi), ld(iadd(get(PWP), get(t))), set(pwi), ld(iadd(get(VP), get(t))), set(vi),
        iadd(get(o0), get(t)), sub(ld(iadd(get(o0), get(t))), add(mul(get(pvi), get(g0)), mul(get(pwi), get(b0)))), tee(y0), f64.store(0),
        iadd(get(o1), get(t)), sub(ld(iadd(get(o1), get(t))), add(mul(get(pvi), get(g1)), mul(get(pwi), get(b1)))), tee(y1), f64.store(0),
        iadd(get(PP), get(t)), add(ld(iadd(get(PP), get(t))), add(mul(get(y0), get(v0)), mul(get(y1), get(v1)))), f64.store(0),
        add(get(a0), mul(get(y0), get(vi))), set(a0),
        add(get(a1), mul(get(y1), get(vi))), set(a1),
      ),
      iadd(get(PP), get(cb)), add(ld(iadd(get(PP), get(cb))), add(get(a0), hsum(A0))), f64.store(0),
      iadd(get(PP), get(cb)), add(ld(iadd(get(PP), get(cb)), 8), add(get(a1), hsum(A1))), f64.store(8),
      iadd(get(c), ic(2)), set(c),
    ),
    // a last single column
    [get(c), get(K), i32.ltS],
    ifThen(
      get(c), ic(3), i32.shl, set(cb),
      iadd(get(WP), [imul(get(c), get(K)), ic(3), i32.shl]), set(o0),
      iadd(get(o0), get(cb)),
      sub(ld(iadd(get(o0), get(cb))), mul(mul(f64.const(2), ld(iadd(get(PVP), get(cb)))), ld(iadd(get(PWP), get(cb))))), tee(x00),
      f64.store(0),
      iadd(get(PP), get(cb)), add(ld(iadd(get(PP), get(cb))), mul(get(x00), ld(iadd(get(VP), get(cb))))), f64.store(0),
    ),
  ];
  return { name: 'sweep', locals: L, body };
}

/**
 * Shared by backTransform and orthogonalise: for `nc` columns at z0…z(nc−1)
 * (byte offsets of each column's first row) and a vector u at byte offset uo,
 * rows [t0, k): dots s_c = Σ u_i z_ci (lanes summed at the end), then the
 * caller scales them, then z_ci −= s_c u_i.
 */
interface ColumnsBlock {
  dots: (zs: number[], uo: number, t0: Code, k8: number, s: number[], S: number[], U: number, t: number, ui: number) => Code;
  axpy: (zs: number[], uo: number, t0: Code, k8: number, s: number[], SS: number[], U: number, t: number, ui: number) => Code;
}

const columns: ColumnsBlock = {
  dots: (zs, uo, t0, k8, s, S, U, t, ui) => [
    ...S.map((v) => [f64x2.zero(), set(v)]),
    t0, set(t),
    whileLoop([iadd(get(t), ic(16)), get(k8), i32.leS],
      ldv(iadd(get(uo), get(t))), set(U),
      ...zs.map((z, c) => [vadd(get(S[c]), vmul(get(U), ldv(iadd(get(z), get(t))))), set(S[c])]),
      iadd(get(t), ic(16)), set(t),
    ),
    [get(t), get(k8), i32.ltS],
    ifThen(
      ld(iadd(get(uo), get(t))), set(ui),
      ...zs.map((z, c) => [add(get(s[c]), mul(get(ui), ld(iadd(get(z), get(t))))), set(s[c])]),
    ),
    ...zs.map((_, c) => [add(get(s[c]), hsum(S[c])), set(s[c])]),
  ],
  axpy: (zs, uo, t0, k8, s, SS, U, t, ui) => [
    ...zs.map((_, c) => [get(s[c]), f64x2.splat, set(SS[c])]),
    t0, set(t),
    whileLoop([iadd(get(t), ic(16)), get(k8), i32.leS],
      ldv(iadd(get(uo), get(t))), set(U),
      ...zs.map((z, c) => [iadd(get(z), get(t)), vsub(ldv(iadd(get(z), get(t))), vmul(get(SS[c]), get(U))), f64x2.store(0)]),
      iadd(get(t), ic(16)), set(t),
    ),
    [get(t), get(k8), i32.ltS],
    ifThen(
      ld(iadd(get(uo), get(t))), set(ui),
      ...zs.map((z, c) => [iadd(get(z), get(t)), sub(ld(iadd(get(z), get(t))), mul(get(s[c]), get(ui))), f64.store(0)]),
    ),
  ],
};

/** z[0…] ← byte offsets of columns c, c+1, … of the k-row matrix at zp. */
const columnPointers = (z: number[], zp: number, c: number, k: number, k8: number): Code => [
  iadd(get(zp), [imul(get(c), get(k)), ic(3), i32.shl]), set(z[0]),
  ...z.slice(1).map((zc, q) => [iadd(get(z[q]), get(k8)), set(zc)]),
];

/** Locals of a four-column group: column pointers, a scalar of u, the dots (scalar and two-lane), a vector of u. */
function groupLocals(L: Locals): { zs: number[]; ui: number; s: number[]; S: number[]; U: number } {
  const four = (t: typeof I32 | typeof F64 | typeof V128) => [L.add(t), L.add(t), L.add(t), L.add(t)];
  const zs = four(I32);
  const ui = L.add(F64);
  return { zs, ui, s: four(F64), S: four(V128), U: L.add(V128) };
}

function backTransformFunc(): FuncDef {
  const L = new Locals(I32, I32, I32, I32, I32);
  const [WP, K, TAUP, ZP, R] = [0, 1, 2, 3, 4];
  const j = L.add(I32), k8 = L.add(I32), cj = L.add(I32), jb = L.add(I32), c = L.add(I32), t = L.add(I32);
  const tj = L.add(F64);
  const { zs, ui, s, S, U } = groupLocals(L);
  const group = (nc: number): Code => {
    const z = zs.slice(0, nc);
    return [
      columnPointers(z, ZP, c, K, k8),
      ...z.map((zc, q) => [ld(iadd(get(zc), get(jb))), set(s[q])]),
      columns.dots(z, cj, iadd(get(jb), ic(8)), k8, s, S.slice(0, nc), U, t, ui),
      ...z.map((zc, q) => [
        mul(get(s[q]), get(tj)), set(s[q]),
        iadd(get(zc), get(jb)), sub(ld(iadd(get(zc), get(jb))), get(s[q])), f64.store(0),
      ]),
      columns.axpy(z, cj, iadd(get(jb), ic(8)), k8, s, S.slice(0, nc), U, t, ui),
      iadd(get(c), ic(nc)), set(c),
    ];
  };
  const body: Code[] = [
    get(K), ic(3), i32.shl, set(k8),
    get(K), ic(3), i32.sub, set(j),
    whileLoop([get(j), ic(0), i32.geS],
      ld(iadd(get(TAUP), [get(j), ic(3), i32.shl])), set(tj),
      block(
        [get(tj), f64.const(0), f64.eq], brIf(0),
        iadd(get(WP), [imul(get(j), get(K)), ic(3), i32.shl]), set(cj),
        iadd(get(j), ic(1)), ic(3), i32.shl, set(jb),
        ic(0), set(c),
        whileLoop([iadd(get(c), ic(4)), get(R), i32.leS], group(4)),
        whileLoop([get(c), get(R), i32.ltS], group(1)),
      ),
      iadd(get(j), ic(-1)), set(j),
    ),
  ];
  return { name: 'backTransform', locals: L, body };
}

function orthogonaliseFunc(): FuncDef {
  const L = new Locals(I32, I32, I32, I32, I32);
  const [XP, ZP, K, FROM, TO] = [0, 1, 2, 3, 4];
  const k8 = L.add(I32), c = L.add(I32), t = L.add(I32);
  const { zs, ui, s, S, U } = groupLocals(L);
  // x ← x − Σ_c s_c z_c: the "vector" u is each z column in turn, the updated column is x.
  const group = (nc: number): Code => {
    const z = zs.slice(0, nc);
    return [
      columnPointers(z, ZP, c, K, k8),
      ...z.map((_, q) => [f64.const(0), set(s[q])]),
      columns.dots(z, XP, ic(0), k8, s, S.slice(0, nc), U, t, ui),
      ...z.map((zc, q) => columns.axpy([XP], zc, ic(0), k8, [s[q]], [S[0]], U, t, ui)),
      iadd(get(c), ic(nc)), set(c),
    ];
  };
  const body: Code[] = [
    get(K), ic(3), i32.shl, set(k8),
    get(FROM), set(c),
    whileLoop([iadd(get(c), ic(4)), get(TO), i32.leS], group(4)),
    whileLoop([get(c), get(TO), i32.ltS], group(1)),
  ];
  return { name: 'orthogonalise', locals: L, body };
}

export function eigenSimdModuleBytes(): Uint8Array<ArrayBuffer> {
  return moduleBytes([sweepFunc(), backTransformFunc(), orthogonaliseFunc()]);
}

type Fn7 = (a: number, b: number, c: number, d: number, e: number, f: number, g: number) => void;
type Fn5 = (a: number, b: number, c: number, d: number, e: number) => void;

export interface EigenKernels {
  memory: WebAssembly.Memory;
  sweep: Fn7;
  backTransform: Fn5;
  orthogonalise: Fn5;
}

let kernels: EigenKernels | null | undefined;
let lastError: string | null = null;

/** The kernels on this thread, or null when MODEWRIGHT_WASM=0 or wasm SIMD is unavailable (`eigenKernelError()` says why). */
export function eigenKernels(): EigenKernels | null {
  if (process.env.MODEWRIGHT_WASM === '0') return null;
  if (kernels !== undefined) return kernels;
  try {
    if (typeof WebAssembly !== 'object') throw new Error('WebAssembly is not available');
    const bytes = eigenSimdModuleBytes();
    if (!WebAssembly.validate(bytes)) throw new Error('WebAssembly SIMD is not supported (eigen module does not validate)');
    const inst = new WebAssembly.Instance(new WebAssembly.Module(bytes), {});
    const ex = inst.exports;
    kernels = { memory: ex.memory as WebAssembly.Memory, sweep: ex.sweep as Fn7, backTransform: ex.backTransform as Fn5, orthogonalise: ex.orthogonalise as Fn5 };
  } catch (err) {
    lastError = err instanceof Error ? err.message : String(err);
    kernels = null;
  }
  return kernels;
}

export function eigenKernelError(): string | null {
  return lastError;
}

const PAGE = 65536;
/** Shapes needing more wasm memory than this use the scalar route. */
export const MAX_EIGEN_WASM_BYTES = 1 << 30;

/** Grow the kernels' memory to at least `bytes`; returns a fresh Float64Array view, or null if refused. */
export function eigenMemory(kr: EigenKernels, bytes: number): Float64Array | null {
  if (bytes > MAX_EIGEN_WASM_BYTES) return null;
  const have = kr.memory.buffer.byteLength;
  if (have < bytes) {
    try {
      kr.memory.grow(Math.ceil((bytes - have) / PAGE));
    } catch (err) {
      lastError = `wasm memory could not grow to ${bytes} bytes: ${String(err)}`;
      return null;
    }
  }
  return new Float64Array(kr.memory.buffer);
}
