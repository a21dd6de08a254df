/**
 * A small WebAssembly assembler: enough of the binary format to write the
 * engine's SIMD kernels in TypeScript, with no compiler toolchain at build or
 * load time. Opcode numbers and encodings: WebAssembly core specification 2.0,
 * sections 5.2 (LEB128 integers), 5.4 (instructions, SIMD under the 0xFD
 * prefix) and 5.5 (modules).
 *
 * A function body is written as a list of instructions built by the helpers
 * below (`get`, `f64x2.add`, `loop(...)`, …); structured control flow takes
 * its body as nested lists, so blocks always close.
 */

export type Code = number | Code[];

export const I32 = 0x7f;
export const F64 = 0x7c;
export const V128 = 0x7b;
export type ValType = typeof I32 | typeof F64 | typeof V128;

export function uleb(v: number): number[] {
  const out: number[] = [];
  do {
    let byte = v & 0x7f;
    v >>>= 7;
    if (v !== 0) byte |= 0x80;
    out.push(byte);
  } while (v !== 0);
  return out;
}

/** Signed LEB128 of a 32-bit integer. */
export function sleb(v: number): number[] {
  const out: number[] = [];
  v |= 0;
  for (;;) {
    const byte = v & 0x7f;
    v >>= 7;
    const done = (v === 0 && (byte & 0x40) === 0) || (v === -1 && (byte & 0x40) !== 0);
    out.push(done ? byte : byte | 0x80);
    if (done) return out;
  }
}

function flatten(code: Code, out: number[]): number[] {
  if (typeof code === 'number') out.push(code);
  else for (const c of code) flatten(c, out);
  return out;
}

const memarg = (align: number, offset: number): number[] => [...uleb(align), ...uleb(offset)];
const simd = (op: number): number[] => [0xfd, ...uleb(op)];

export const get = (i: number): Code => [0x20, ...uleb(i)];
export const set = (i: number): Code => [0x21, ...uleb(i)];
export const tee = (i: number): Code => [0x22, ...uleb(i)];

export const i32 = {
  const: (v: number): Code => [0x41, ...sleb(v)],
  add: 0x6a, sub: 0x6b, mul: 0x6c, shl: 0x74,
  eqz: 0x45, eq: 0x46, ne: 0x47, ltS: 0x48, gtS: 0x4a, leS: 0x4c, geS: 0x4e,
};

export const f64 = {
  const: (v: number): Code => {
    const b = new Uint8Array(new Float64Array([v]).buffer);
    return [0x44, ...b];
  },
  load: (offset = 0): Code => [0x2b, ...memarg(3, offset)],
  store: (offset = 0): Code => [0x39, ...memarg(3, offset)],
  add: 0xa0, sub: 0xa1, mul: 0xa2, div: 0xa3, neg: 0x9a, eq: 0x61,
};

export const f64x2 = {
  /** v128.load (unaligned addresses are allowed; the hint says 8-byte alignment). */
  load: (offset = 0): Code => [...simd(0), ...memarg(3, offset)],
  store: (offset = 0): Code => [...simd(11), ...memarg(3, offset)],
  splat: simd(20),
  lane: (l: number): Code => [...simd(33), l],
  add: simd(240), sub: simd(241), mul: simd(242),
  zero: (): Code => [...simd(12), ...new Array<number>(16).fill(0)],
};

const EMPTY = 0x40;
export const block = (...body: Code[]): Code => [0x02, EMPTY, body, 0x0b];
export const loop = (...body: Code[]): Code => [0x03, EMPTY, body, 0x0b];
export const ifThen = (...body: Code[]): Code => [0x04, EMPTY, body, 0x0b];
export const br = (depth: number): Code => [0x0c, ...uleb(depth)];
export const brIf = (depth: number): Code => [0x0d, ...uleb(depth)];

/**
 * `while (cond) { body }` as block/loop: `cond` leaves an i32 on the stack;
 * inside `body`, depth 0 is the loop (continue) and depth 1 the block (break).
 */
export const whileLoop = (cond: Code, ...body: Code[]): Code => block(loop(cond, i32.eqz, brIf(1), ...body, br(0)));

/** Locals of a function: parameters first, then declared locals, by index. */
export class Locals {
  readonly params: ValType[];
  readonly declared: ValType[] = [];
  constructor(...params: ValType[]) {
    this.params = params;
  }
  add(type: ValType): number {
    this.declared.push(type);
    return this.params.length + this.declared.length - 1;
  }
}

export interface FuncDef {
  name: string;
  locals: Locals;
  body: Code[];
}

function section(id: number, body: number[]): number[] {
  return [id, ...uleb(body.length), ...body];
}

function name(s: string): number[] {
  const bytes = Array.from(new TextEncoder().encode(s));
  return [...uleb(bytes.length), ...bytes];
}

/** A module exporting its memory as "memory" (`pages` of 64 KiB to start) and every function by name; functions return nothing. */
export function moduleBytes(funcs: FuncDef[], pages = 1): Uint8Array<ArrayBuffer> {
  const types: number[] = [...uleb(funcs.length)];
  for (const f of funcs) types.push(0x60, ...uleb(f.locals.params.length), ...f.locals.params, 0);
  const fsec: number[] = [...uleb(funcs.length)];
  funcs.forEach((_, i) => fsec.push(...uleb(i)));
  const exps: number[] = [...uleb(funcs.length + 1), ...name('memory'), 0x02, 0];
  funcs.forEach((f, i) => exps.push(...name(f.name), 0x00, ...uleb(i)));
  const code: number[] = [...uleb(funcs.length)];
  for (const f of funcs) {
    const decl: number[] = [...uleb(f.locals.declared.length)];
    for (const t of f.locals.declared) decl.push(1, t);
    const body = [...decl, ...flatten(f.body, []), 0x0b];
    code.push(...uleb(body.length), ...body);
  }
  return new Uint8Array([
    0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00,
    ...section(1, types), ...section(3, fsec), ...section(5, [1, 0x00, ...uleb(pages)]),
    ...section(7, exps), ...section(10, code),
  ]);
}
