/**
 * A small pool of large working arrays. A method that knows an array it
 * obtained here is dead (never returned to its caller, no reference kept) can
 * hand it back, so the next run of the same size reuses the memory instead of
 * leaving one more large buffer for the garbage collector. Reference spectra are
 * computed for many variants in a row; without the pool every run adds its m×m
 * temporaries to the process's peak memory until a collection happens.
 */

/** At most this many buffers are kept. */
const KEEP = 8;
/** Only buffers of at least this many bytes are worth keeping. */
const MIN_BYTES = 1 << 20;

const pool: (ArrayBuffer | SharedArrayBuffer)[] = [];

/**
 * A zeroed Float64Array of `length`, on a pooled buffer when one fits (at most twice the
 * size), else new. `shared`: in shared memory, so the helper thread can read it without a
 * copy (pool.ts); a shared request only takes shared buffers and an ordinary one ordinary ones.
 */
export function takeArray(length: number, shared = false): Float64Array {
  const bytes = length * 8;
  let best = -1;
  for (let i = 0; i < pool.length; i++) {
    const b = pool[i].byteLength;
    if ((pool[i] instanceof SharedArrayBuffer) !== shared) continue;
    if (b >= bytes && b <= 2 * bytes && (best < 0 || b < pool[best].byteLength)) best = i;
  }
  if (best < 0) return shared ? new Float64Array(new SharedArrayBuffer(bytes)) : new Float64Array(length);
  const buf = pool.splice(best, 1)[0];
  const a = new Float64Array(buf, 0, length);
  a.fill(0);
  return a;
}

/**
 * Hand arrays back (their whole buffers). Only for arrays that no one will read
 * again (nor the helper thread); small buffers are not kept.
 */
export function giveBack(...arrays: Float64Array[]): void {
  for (const a of arrays) {
    const buf = a.buffer;
    if (buf.byteLength < MIN_BYTES || pool.includes(buf)) continue;
    pool.push(buf);
    if (pool.length > KEEP) {
      // drop the smallest
      let s = 0;
      for (let i = 1; i < pool.length; i++) if (pool[i].byteLength < pool[s].byteLength) s = i;
      pool.splice(s, 1);
    }
  }
}

/** Test hook: empty the pool. */
export function clearPool(): void {
  pool.length = 0;
}
