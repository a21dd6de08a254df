/**
 * A WebAssembly SIMD (f64x2) micro-kernel for the Gram products, assembled
 * here from opcodes (no compiler toolchain at build or load time).
 *
 * Scheme (see kernels-wasm.ts for the drivers): a row chunk of the snapshot
 * matrix is packed into the module's memory as 4-column panels, row-major
 * inside a panel (panel p, row t, column c at ((p·rows + t)·4 + c)·8 bytes).
 * `panel` then computes 4×4 tiles of AᵀB: lanes hold two neighbouring
 * columns i, i+1 of A at one row t, the B value is splatted, so every entry
 * (i, j) is its own running sum s ← s + a_ti·b_tj in row order. The running
 * sums live in a block in memory between calls: a call loads them, adds its
 * rows and stores them back (loads and stores are exact), so a row chunk can
 * be fed in several sub-chunks; the driver zeroes the block at the start of a
 * chunk and adds it to the output once per chunk. That is exactly the
 * arithmetic of the scalar JavaScript kernels (kernels.ts: no fused
 * multiply-add, same chunks, same order), so both give bit-identical results.
 *
 * The one exported function, in WAT notation:
 *
 *   (func $panel (param $ap i32) (param $bp i32) (param $np i32)
 *                (param $rows i32) (param $op i32) (param $ldo i32)
 *     ;; for each of $np A-panels (contiguous, $rows·32 bytes each, from $ap):
 *     ;;   acc[c][h] = load(op + c·ldo + 16h) (c = 0..3 columns of the B panel at $bp, h = 0..1 lane pairs)
 *     ;;   for t in 0..$rows: a0 = load(a), a1 = load(a+16)
 *     ;;     for c: bv = load64_splat(b + 8c); acc[c][0] += a0·bv; acc[c][1] += a1·bv
 *     ;;     a += 32; b += 32
 *     ;;   for c, h: store(op + c·ldo + 16h, acc[c][h])
 *     ;;   op += 32
 *   )
 *
 * All addresses are byte offsets into the exported memory "memory" (1 page
 * initially; the drivers grow it). Opcode numbers: WebAssembly core
 * specification 2.0, sections 5.4 (instructions) and 5.5 (modules); SIMD
 * instructions are the 0xFD-prefixed ones (v128.load 0, v128.load64_splat 10,
 * v128.store 11, f64x2.add 240, f64x2.mul 242).
 * Tile shape 4×4 (8 f64x2 accumulators, 2 A vectors, 1 splat: 11 of the 16
 * vector registers of x86-64) was measured at ~10·10⁹ multiply-adds per second
 * on one core against ~2.6·10⁹ for the scalar kernel.
 */
import { uleb } from './wasm-asm.js';

function section(id: number, body: number[]): number[] {
  return [id, ...uleb(body.length), ...body];
}

function name(s: string): number[] {
  const bytes = Array.from(new TextEncoder().encode(s));
  return [...uleb(bytes.length), ...bytes];
}

const I32 = 0x7f;
const V128 = 0x7b;
const get = (i: number): number[] => [0x20, ...uleb(i)];
const set = (i: number): number[] => [0x21, ...uleb(i)];
const simd = (op: number): number[] => [0xfd, ...uleb(op)];
/** memarg: alignment exponent, then offset. */
const mem = (align: number, offset: number): number[] => [...uleb(align), ...uleb(offset)];
const v128Load = (offset: number): number[] => [...simd(0), ...mem(3, offset)];
const v128Store = (offset: number): number[] => [...simd(11), ...mem(3, offset)];
const load64Splat = (offset: number): number[] => [...simd(10), ...mem(3, offset)];
const f64x2Add = simd(240);
const f64x2Mul = simd(242);
const i32Const = (v: number): number[] => [0x41, ...uleb(v)]; // only small non-negative values (< 64) are used
const I32_ADD = 0x6a;
const I32_SUB = 0x6b;
const I32_EQZ = 0x45;
const BLOCK = [0x02, 0x40];
const LOOP = [0x03, 0x40];
const END = 0x0b;
const brIf = (depth: number): number[] => [0x0d, ...uleb(depth)];

// Locals: params 0..5, then i32 6..9, then v128 10..20.
const AP = 0, BP = 1, NP = 2, ROWS = 3, OP = 4, LDO = 5;
const A = 6, B = 7, T = 8, OC = 9;
const ACC = (c: number, h: number): number => 10 + 2 * c + h;
const A0 = 18, A1 = 19, BV = 20;

function panelBody(): number[] {
  const code: number[] = [];
  const emit = (...parts: (number | number[])[]): void => {
    for (const p of parts) {
      if (typeof p === 'number') code.push(p);
      else code.push(...p);
    }
  };
  emit(get(AP), set(A));
  emit(BLOCK); // $done
  emit(get(NP), I32_EQZ, brIf(0));
  emit(LOOP); // $ploop
  emit(get(OP), set(OC));
  for (let c = 0; c < 4; c++) {
    for (let h = 0; h < 2; h++) emit(get(OC), v128Load(16 * h), set(ACC(c, h)));
    if (c < 3) emit(get(OC), get(LDO), I32_ADD, set(OC));
  }
  emit(get(BP), set(B), get(ROWS), set(T));
  emit(BLOCK); // $tdone
  emit(get(T), I32_EQZ, brIf(0));
  emit(LOOP); // $tloop
  emit(get(A), v128Load(0), set(A0), get(A), v128Load(16), set(A1));
  for (let c = 0; c < 4; c++) {
    emit(get(B), load64Splat(8 * c), set(BV));
    for (let h = 0; h < 2; h++) {
      emit(get(ACC(c, h)), get(h === 0 ? A0 : A1), get(BV), f64x2Mul, f64x2Add, set(ACC(c, h)));
    }
  }
  emit(get(A), i32Const(32), I32_ADD, set(A));
  emit(get(B), i32Const(32), I32_ADD, set(B));
  emit(get(T), i32Const(1), I32_SUB, set(T), get(T), brIf(0));
  emit(END); // $tloop
  emit(END); // $tdone
  emit(get(OP), set(OC));
  for (let c = 0; c < 4; c++) {
    for (let h = 0; h < 2; h++) {
      emit(get(OC), get(ACC(c, h)), v128Store(16 * h));
    }
    if (c < 3) emit(get(OC), get(LDO), I32_ADD, set(OC));
  }
  emit(get(OP), i32Const(32), I32_ADD, set(OP));
  emit(get(NP), i32Const(1), I32_SUB, set(NP), get(NP), brIf(0));
  emit(END); // $ploop
  emit(END); // $done
  emit(END); // function
  const locals = [2, ...uleb(4), I32, ...uleb(11), V128];
  const body = [...locals, ...code];
  return [...uleb(body.length), ...body];
}

/** The module bytes (a few hundred bytes). */
export function gramSimdModuleBytes(): Uint8Array<ArrayBuffer> {
  const types = section(1, [1, 0x60, 6, I32, I32, I32, I32, I32, I32, 0]);
  const funcs = section(3, [1, 0]);
  const memory = section(5, [1, 0x00, ...uleb(1)]);
  const exports = section(7, [2, ...name('memory'), 0x02, 0, ...name('panel'), 0x00, 0]);
  const code = section(10, [1, ...panelBody()]);
  return new Uint8Array([0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00, ...types, ...funcs, ...memory, ...exports, ...code]);
}
