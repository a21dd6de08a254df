/**
 * Invented demo datasets, each seeded so that every student can get a
 * variant (noise level, small parameter jitter). Each reports its analytic
 * discrete-time eigenvalues where they exist.
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import type { Complex } from '../linalg/complex.js';
import type { PairSource, Snapshots } from '../methods/types.js';
import { createRng, type Rng } from './prng.js';

export interface ScenarioOptions {
  seed: number;
  /** Standard deviation of additive white noise relative to the signal's RMS (default 0). */
  noise?: number;
  /** Relative jitter of the physical parameters (default 0.02). */
  jitter?: number;
  /** Number of snapshots / samples (scenario default when absent). */
  samples?: number;
}

export interface Scenario {
  name: ScenarioName;
  description: string;
  dt: number;
  source: PairSource;
  /** Analytic discrete-time eigenvalues (of the linear part or of a Koopman-invariant subspace). */
  analyticEigenvalues?: Complex[];
  /** Suggested method for the dataset. */
  method: 'dmd' | 'edmd' | 'kernel-edmd';
  parameters: Record<string, number>;
}

export const scenarioNames = ['linear-field', 'drift-map', 'wave-field', 'vibration'] as const;
export type ScenarioName = (typeof scenarioNames)[number];

function jittered(rng: Rng, value: number, jitter: number): number {
  return value * (1 + jitter * (2 * rng.uniform() - 1));
}

function addNoise(rng: Rng, data: Float64Array, noise: number): void {
  if (!(noise > 0)) return;
  let ss = 0;
  for (const v of data) ss += v * v;
  const scale = noise * Math.sqrt(ss / Math.max(data.length, 1));
  for (let i = 0; i < data.length; i++) data[i] += scale * rng.normal();
}

const expc = (re: number, im: number): Complex => ({ re: Math.exp(re) * Math.cos(im), im: Math.exp(re) * Math.sin(im) });

/**
 * "linear-field": three damped rotations and one decaying direction in a
 * latent space of dimension 7, mixed into n = 24 sensors by a random matrix.
 */
function linearField(o: Required<ScenarioOptions>): Scenario {
  const rng = createRng(o.seed);
  const n = 24;
  const dt = 0.05;
  const k = o.samples || 120;
  const rates = [-0.2, -0.45, -0.9].map((v) => jittered(rng, v, o.jitter));
  const freqs = [1.1, 2.3, 3.7].map((v) => jittered(rng, v, o.jitter));
  const decay = jittered(rng, -1.6, o.jitter);
  const d = 7;
  const mix = new Float64Array(n * d);
  for (let i = 0; i < n * d; i++) mix[i] = rng.normal() / Math.sqrt(n);
  const z = new Float64Array(d);
  for (let i = 0; i < d; i++) z[i] = rng.between(0.5, 1.5);
  const data = new Float64Array(n * k);
  const eig: Complex[] = [];
  for (let b = 0; b < 3; b++) {
    const l = expc(rates[b] * dt, freqs[b] * 2 * Math.PI * dt);
    eig.push(l, { re: l.re, im: -l.im });
  }
  eig.push({ re: Math.exp(decay * dt), im: 0 });
  for (let j = 0; j < k; j++) {
    for (let t = 0; t < n; t++) {
      let acc = 0;
      for (let c = 0; c < d; c++) acc += mix[t + c * n] * z[c];
      data[t + j * n] = acc;
    }
    for (let b = 0; b < 3; b++) {
      const l = eig[2 * b];
      const p = z[2 * b];
      const q = z[2 * b + 1];
      z[2 * b] = l.re * p - l.im * q;
      z[2 * b + 1] = l.im * p + l.re * q;
    }
    z[6] *= eig[6].re;
  }
  addNoise(rng, data, o.noise);
  return {
    name: 'linear-field',
    description: 'three damped rotations and one decaying direction seen through 24 mixed sensors',
    dt,
    source: { kind: 'trajectory', snapshots: { data, n, k } },
    analyticEigenvalues: eig,
    method: 'dmd',
    parameters: { rate1: rates[0], rate2: rates[1], rate3: rates[2], freq1: freqs[0], freq2: freqs[1], freq3: freqs[2], decay, noise: o.noise },
  };
}

/**
 * "drift-map": an ensemble of one-step pairs of the invented 2-D map
 * u' = a·u, v' = b·v + c·u³, whose polynomials span{1, u, u², u³, v} form a
 * Koopman-invariant subspace with eigenvalues {1, a, a², a³, b}.
 */
function driftMap(o: Required<ScenarioOptions>): Scenario {
  const rng = createRng(o.seed);
  const a = jittered(rng, 0.85, o.jitter);
  const b = jittered(rng, 0.6, o.jitter);
  const c = jittered(rng, 0.4, o.jitter);
  const m = o.samples || 400;
  const x = new Float64Array(2 * m);
  const y = new Float64Array(2 * m);
  for (let i = 0; i < m; i++) {
    const u = rng.between(-1, 1);
    const v = rng.between(-1, 1);
    x[2 * i] = u;
    x[2 * i + 1] = v;
    y[2 * i] = a * u;
    y[2 * i + 1] = b * v + c * u * u * u;
  }
  addNoise(rng, y, o.noise);
  return {
    name: 'drift-map',
    description: 'ensemble of one-step pairs of the map (u, v) → (a·u, b·v + c·u³)',
    dt: 1,
    source: { kind: 'pairs', x: { data: x, n: 2, k: m }, y: { data: y, n: 2, k: m } },
    analyticEigenvalues: [1, a, a * a, a ** 3, b].map((re) => ({ re, im: 0 })),
    method: 'kernel-edmd',
    parameters: { a, b, c, noise: o.noise },
  };
}

/**
 * "wave-field": two travelling, decaying waves on a periodic 1-D grid of 64
 * points, u(ξ,t) = Σ A e^{−γt} cos(κξ − ωt + φ); each wave contributes the
 * pair e^{(−γ ± iω)dt}.
 */
function waveField(o: Required<ScenarioOptions>): Scenario {
  const rng = createRng(o.seed);
  const n = 64;
  const dt = 0.02;
  const k = o.samples || 160;
  const waves = [
    { amp: 1, kappa: 2, omega: jittered(rng, 9, o.jitter), gamma: jittered(rng, 0.3, o.jitter), phase: rng.between(0, 2 * Math.PI) },
    { amp: 0.6, kappa: 5, omega: jittered(rng, 23, o.jitter), gamma: jittered(rng, 1.1, o.jitter), phase: rng.between(0, 2 * Math.PI) },
  ];
  const data = new Float64Array(n * k);
  for (let j = 0; j < k; j++) {
    const t = j * dt;
    for (let i = 0; i < n; i++) {
      const xi = (2 * Math.PI * i) / n;
      let v = 0;
      for (const w of waves) v += w.amp * Math.exp(-w.gamma * t) * Math.cos(w.kappa * xi - w.omega * t + w.phase);
      data[i + j * n] = v;
    }
  }
  addNoise(rng, data, o.noise);
  const eig: Complex[] = [];
  for (const w of waves) {
    const l = expc(-w.gamma * dt, w.omega * dt);
    eig.push(l, { re: l.re, im: -l.im });
  }
  return {
    name: 'wave-field',
    description: 'two travelling, decaying waves on a periodic grid of 64 points',
    dt,
    source: { kind: 'trajectory', snapshots: { data, n, k } },
    analyticEigenvalues: eig,
    method: 'dmd',
    parameters: { omega1: waves[0].omega, gamma1: waves[0].gamma, omega2: waves[1].omega, gamma2: waves[1].gamma, noise: o.noise },
  };
}

/**
 * "vibration": a chain of 4 unit masses between fixed walls with jittered
 * springs and light Rayleigh damping C = αI + βK; state [q; q̇] (n = 8).
 * Modal solution: s = −ζω ± iω√(1−ζ²), λ = e^{s dt}.
 */
function vibration(o: Required<ScenarioOptions>): Scenario {
  const rng = createRng(o.seed);
  const d = 4;
  const dt = 0.05;
  const k = o.samples || 200;
  const springs = Array.from({ length: d + 1 }, () => jittered(rng, 10, 5 * o.jitter));
  const alpha = jittered(rng, 0.02, o.jitter);
  const beta = jittered(rng, 0.004, o.jitter);
  const kmat = new Matrix(d, d);
  for (let i = 0; i < d; i++) {
    kmat.set(i, i, springs[i] + springs[i + 1]);
    if (i + 1 < d) {
      kmat.set(i, i + 1, -springs[i + 1]);
      kmat.set(i + 1, i, -springs[i + 1]);
    }
  }
  const evd = new EigenvalueDecomposition(kmat, { assumeSymmetric: true });
  const w2 = evd.realEigenvalues;
  const modesM = evd.eigenvectorMatrix;
  const q0 = Array.from({ length: d }, () => rng.between(-1, 1));
  const v0 = Array.from({ length: d }, () => rng.between(-1, 1));
  // modal coordinates
  const a0 = w2.map((_, c) => q0.reduce((s, q, i) => s + modesM.get(i, c) * q, 0));
  const b0 = w2.map((_, c) => v0.reduce((s, v, i) => s + modesM.get(i, c) * v, 0));
  const eig: Complex[] = [];
  const n = 2 * d;
  const data = new Float64Array(n * k);
  const modal = w2.map((wsq, c) => {
    const w = Math.sqrt(wsq);
    const zeta = alpha / (2 * w) + (beta * w) / 2;
    const sr = -zeta * w;
    const wd = w * Math.sqrt(1 - zeta * zeta);
    const l = expc(sr * dt, wd * dt);
    eig.push(l, { re: l.re, im: -l.im });
    // q_c(t) = e^{sr t}(A cos wd t + B sin wd t), A = a0, B = (b0 − sr a0)/wd
    return { sr, wd, A: a0[c], B: (b0[c] - sr * a0[c]) / wd };
  });
  for (let j = 0; j < k; j++) {
    const t = j * dt;
    const qc = modal.map((p) => Math.exp(p.sr * t) * (p.A * Math.cos(p.wd * t) + p.B * Math.sin(p.wd * t)));
    const vc = modal.map(
      (p) => Math.exp(p.sr * t) * ((p.sr * p.A + p.wd * p.B) * Math.cos(p.wd * t) + (p.sr * p.B - p.wd * p.A) * Math.sin(p.wd * t)),
    );
    for (let i = 0; i < d; i++) {
      let q = 0;
      let v = 0;
      for (let c = 0; c < d; c++) {
        q += modesM.get(i, c) * qc[c];
        v += modesM.get(i, c) * vc[c];
      }
      data[i + j * n] = q;
      data[d + i + j * n] = v;
    }
  }
  addNoise(rng, data, o.noise);
  return {
    name: 'vibration',
    description: 'four masses on jittered springs with light Rayleigh damping; state is positions then velocities',
    dt,
    source: { kind: 'trajectory', snapshots: { data, n, k } },
    analyticEigenvalues: eig,
    method: 'dmd',
    parameters: { alpha, beta, ...Object.fromEntries(springs.map((s, i) => [`spring${i + 1}`, s])), noise: o.noise },
  };
}

/** Generate the named scenario for a seed and variant parameters. */
export function generateScenario(name: ScenarioName, options: ScenarioOptions): Scenario {
  const o: Required<ScenarioOptions> = { seed: options.seed, noise: options.noise ?? 0, jitter: options.jitter ?? 0.02, samples: options.samples ?? 0 };
  if (!Number.isFinite(o.seed)) throw new RangeError(`seed must be a number, got ${options.seed}`);
  if (!(o.noise >= 0 && o.noise < 10)) throw new RangeError(`noise must be in [0, 10), got ${o.noise}`);
  if (!(o.jitter >= 0 && o.jitter < 0.2)) throw new RangeError(`jitter must be in [0, 0.2), got ${o.jitter}`);
  if (!(Number.isInteger(o.samples) && o.samples >= 0 && o.samples <= 1_000_000)) throw new RangeError(`samples must be an integer in [2, 1000000], got ${o.samples}`);
  switch (name) {
    case 'linear-field':
      return linearField(o);
    case 'drift-map':
      return driftMap(o);
    case 'wave-field':
      return waveField(o);
    case 'vibration':
      return vibration(o);
  }
}

/** The snapshot matrices to save: one trajectory, or X and Y. */
export function scenarioMatrices(s: Scenario): { x: Snapshots; y?: Snapshots } {
  const src = s.source;
  if (src.kind === 'trajectory') return { x: src.snapshots };
  if (src.kind === 'pairs') return { x: src.x, y: src.y };
  throw new RangeError('scenario with several trajectories cannot be written as one file');
}
