/**
 * Bench-only .npy I/O for large float64 matrices: writes Fortran order and
 * reads straight into shared memory (one copy of the data, which the engine's
 * helper thread then uses without copying). The product's own reader lives in
 * grading/formats/npy.ts.
 */
import { closeSync, openSync, readSync, writeSync } from 'node:fs';
import { sharedFloat64 } from '../grading/linalg/pool.js';

export function writeNpyFortran(path: string, data: Float64Array, rows: number, cols: number): void {
  let dict = `{'descr': '<f8', 'fortran_order': True, 'shape': (${rows}, ${cols}), }`;
  const pad = (64 - ((10 + dict.length + 1) % 64)) % 64;
  dict += ' '.repeat(pad) + '\n';
  const head = Buffer.alloc(10 + dict.length);
  head.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]);
  head.writeUInt16LE(dict.length, 8);
  head.write(dict, 10, 'latin1');
  const fd = openSync(path, 'w');
  try {
    writeSync(fd, head);
    const bytes = new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
    for (let off = 0; off < bytes.length; off += 1 << 26) writeSync(fd, bytes, off, Math.min(1 << 26, bytes.length - off));
  } finally {
    closeSync(fd);
  }
}

export function readNpyShared(path: string): { data: Float64Array; rows: number; cols: number } {
  const fd = openSync(path, 'r');
  try {
    const pre = Buffer.alloc(10);
    readSync(fd, pre, 0, 10, 0);
    if (pre[0] !== 0x93 || pre.toString('latin1', 1, 6) !== 'NUMPY' || pre[6] !== 1) throw new Error(`${path}: not a version-1 .npy file`);
    const hlen = pre.readUInt16LE(8);
    const head = Buffer.alloc(hlen);
    readSync(fd, head, 0, hlen, 10);
    const h = head.toString('latin1');
    const shape = /'shape': \((\d+), (\d+)\)/.exec(h);
    if (!h.includes("'descr': '<f8'") || !h.includes("'fortran_order': True") || !shape) throw new Error(`${path}: expected a Fortran-order <f8 matrix, header ${h.trim()}`);
    const rows = Number(shape[1]), cols = Number(shape[2]);
    const data = sharedFloat64(rows * cols);
    const bytes = new Uint8Array(data.buffer);
    let pos = 0;
    while (pos < bytes.length) {
      const got = readSync(fd, bytes, pos, Math.min(1 << 26, bytes.length - pos), 10 + hlen + pos);
      if (got <= 0) throw new Error(`${path}: file ends after ${pos} of ${bytes.length} data bytes`);
      pos += got;
    }
    return { data, rows, cols };
  } finally {
    closeSync(fd);
  }
}
