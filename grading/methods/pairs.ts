/**
 * Snapshot pairs X = [x_1 … x_m], Y = [y_1 … y_m] from a PairSource, and their
 * inner products. A single trajectory D (n×(m+1)) uses one symmetric product
 * S = DᵀD: (XᵀX)_ij = S_ij and (YᵀX)_ij = S_{i+1,j} (numerics.md, "Data").
 */
import { backend } from '../linalg/backend.js';
import { takeArray } from '../linalg/scratch.js';
import { SpectrumInputError, type PairSource, type Snapshots } from './types.js';

export interface PairMatrices {
  /** n×m. */
  x: Float64Array;
  /** n×m. */
  y: Float64Array;
  n: number;
  m: number;
}

function checkSnapshots(s: Snapshots, what: string): void {
  if (!Number.isInteger(s.n) || !Number.isInteger(s.k) || s.n < 1 || s.k < 0) throw new SpectrumInputError(`${what}: shape ${s.n}×${s.k} is not valid`);
  if (s.data.length < s.n * s.k) throw new SpectrumInputError(`${what}: ${s.data.length} values for a ${s.n}×${s.k} matrix`);
  const t = backend().firstNonFinite(s.data, s.n * s.k);
  if (t >= 0) throw new SpectrumInputError(`${what}: entry (${(t % s.n) + 1}, ${Math.floor(t / s.n) + 1}) is not a finite number`);
}

/** Check shapes and finiteness; returns (n, m). */
export function validateSource(source: PairSource): { n: number; m: number } {
  switch (source.kind) {
    case 'trajectory': {
      checkSnapshots(source.snapshots, 'trajectory');
      if (source.snapshots.k < 2) throw new SpectrumInputError(`a trajectory needs at least 2 snapshots, found ${source.snapshots.k}`);
      return { n: source.snapshots.n, m: source.snapshots.k - 1 };
    }
    case 'trajectories': {
      if (source.list.length === 0) throw new SpectrumInputError('no trajectories given');
      const n = source.list[0].n;
      let m = 0;
      source.list.forEach((s, i) => {
        checkSnapshots(s, `trajectory ${i + 1}`);
        if (s.n !== n) throw new SpectrumInputError(`trajectory ${i + 1} has state dimension ${s.n}, trajectory 1 has ${n}`);
        if (s.k < 2) throw new SpectrumInputError(`trajectory ${i + 1} needs at least 2 snapshots, found ${s.k}`);
        m += s.k - 1;
      });
      return { n, m };
    }
    case 'pairs': {
      checkSnapshots(source.x, 'X');
      checkSnapshots(source.y, 'Y');
      if (source.x.n !== source.y.n || source.x.k !== source.y.k) {
        throw new SpectrumInputError(`X is ${source.x.n}×${source.x.k} but Y is ${source.y.n}×${source.y.k}; they must have the same shape`);
      }
      if (source.x.k < 1) throw new SpectrumInputError('X and Y hold no snapshot pairs');
      return { n: source.x.n, m: source.x.k };
    }
  }
}

/**
 * Explicit X and Y (n×m). A single trajectory gives views without copying.
 * `checked`: the shape from an earlier validateSource of this same source, to skip a second scan.
 */
export function pairMatrices(source: PairSource, checked?: { n: number; m: number }): PairMatrices {
  const { n, m } = checked ?? validateSource(source);
  if (source.kind === 'trajectory') {
    const d = source.snapshots.data;
    return { x: d.subarray(0, n * m), y: d.subarray(n, n * (m + 1)), n, m };
  }
  if (source.kind === 'pairs') return { x: source.x.data.subarray(0, n * m), y: source.y.data.subarray(0, n * m), n, m };
  const x = new Float64Array(n * m);
  const y = new Float64Array(n * m);
  let off = 0;
  for (const s of source.list) {
    const c = s.k - 1;
    x.set(s.data.subarray(0, n * c), off * n);
    y.set(s.data.subarray(n, n * s.k), off * n);
    off += c;
  }
  return { x, y, n, m };
}

/** Inner products of the pairs: XᵀX, YᵀX (m×m, column-major), ‖x_i‖², ‖y_i‖². */
export interface InnerProducts {
  m: number;
  xx: Float64Array;
  yx: Float64Array;
  xNorm2: Float64Array;
  yNorm2: Float64Array;
}

/**
 * Inner products with Gram reuse: one trajectory → one S = DᵀD; several
 * trajectories → per-block products DₐᵀD_b; explicit pairs → XᵀX and YᵀX.
 */
export async function innerProducts(source: PairSource, checked?: { n: number; m: number }): Promise<InnerProducts> {
  const { n, m } = checked ?? validateSource(source);
  const be = backend();
  if (source.kind === 'trajectory') {
    const k = m + 1;
    const s = await be.gram(source.snapshots.data, n, k);
    const yx = takeArray(m * m, true); // shared: products with Â hand half of it to the helper thread without a copy
    for (let j = 0; j < m; j++) for (let i = 0; i < m; i++) yx[i + j * m] = s[i + 1 + j * k];
    const xNorm2 = new Float64Array(m);
    const yNorm2 = new Float64Array(m);
    for (let i = 0; i < m; i++) {
      xNorm2[i] = s[i + i * k];
      yNorm2[i] = s[i + 1 + (i + 1) * k];
    }
    // XᵀX is the leading m×m block of S: compact it in place (entry (i, j) moves from i + jk down to
    // i + jm, never over an entry still to be read), so S's memory is reused rather than copied.
    for (let j = 1; j < m; j++) s.copyWithin(j * m, j * k, j * k + m);
    const xx = s.subarray(0, m * m);
    return { m, xx, yx, xNorm2, yNorm2 };
  }
  if (source.kind === 'trajectories') {
    const list = source.list;
    const starts: number[] = [];
    let off = 0;
    for (const s of list) {
      starts.push(off);
      off += s.k - 1;
    }
    const xx = new Float64Array(m * m);
    const yx = new Float64Array(m * m);
    const xNorm2 = new Float64Array(m);
    const yNorm2 = new Float64Array(m);
    for (let a = 0; a < list.length; a++) {
      for (let b = a; b < list.length; b++) {
        const da = list[a];
        const db = list[b];
        const s = a === b ? await be.gram(da.data, n, da.k) : await be.cross(da.data, db.data, n, da.k, db.k);
        const ka = da.k;
        const ma = da.k - 1;
        const mb = db.k - 1;
        // s_{p,q} = d_a[p]ᵀ d_b[q]
        for (let q = 0; q < mb; q++) {
          for (let p = 0; p < ma; p++) {
            const gi = starts[a] + p;
            const gj = starts[b] + q;
            const vxx = s[p + q * ka];
            xx[gi + gj * m] = vxx;
            xx[gj + gi * m] = vxx;
            yx[gi + gj * m] = s[p + 1 + q * ka]; // y_a[p]ᵀ x_b[q]
            yx[gj + gi * m] = s[p + (q + 1) * ka]; // y_b[q]ᵀ x_a[p]
          }
        }
        if (a === b) {
          for (let p = 0; p < ma; p++) {
            xNorm2[starts[a] + p] = s[p + p * ka];
            yNorm2[starts[a] + p] = s[p + 1 + (p + 1) * ka];
          }
        }
      }
    }
    return { m, xx, yx, xNorm2, yNorm2 };
  }
  return innerProductsDirect(source, { n, m });
}

/** Inner products by the direct formulas XᵀX = gram(X), YᵀX = cross(Y, X) on explicit X and Y. */
export async function innerProductsDirect(source: PairSource, checked?: { n: number; m: number }): Promise<InnerProducts> {
  const { x, y, n, m } = pairMatrices(source, checked);
  const be = backend();
  const xx = await be.gram(x, n, m);
  const yx = await be.cross(y, x, n, m, m);
  const xNorm2 = new Float64Array(m);
  const yNorm2 = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    xNorm2[i] = xx[i + i * m];
    let acc = 0;
    for (let t = 0; t < n; t++) acc += y[i * n + t] ** 2;
    yNorm2[i] = acc;
  }
  return { m, xx, yx, xNorm2, yNorm2 };
}
