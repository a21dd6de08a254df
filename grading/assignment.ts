/**
 * What the site asks of the engine for an assignment, without I/O:
 * - a dataset's bytes → its pair source (through the engine's readers);
 * - a variant recipe (dataset, seed, noise, jitter) → the variant's snapshots,
 *   their canonical .npy bytes and sha256 checksum (deterministic: the same
 *   recipe gives the same bytes on any machine, so bytes are regenerated
 *   rather than stored per student);
 * - an assignment's method configuration → the engine call, the reference
 *   spectrum and the vectors the scorer needs (modes, eigenfunction values);
 *   a radial dictionary's centres are taken from the variant's own X by the
 *   configured rule (radialCentres), so each student rebuilds them exactly;
 * - the task as the spectrum CLI's options.
 */
import { createHash } from 'node:crypto';
import { centreIndices, describeCentreRule, type CentreRule, type MethodConfig } from '../shared/assignment.js';
import type { ReferenceSpectrum } from '../shared/reference.js';
import type { ReferenceExtras } from '../shared/score-report.js';
import { readPairSource, type Layout } from './formats/dataset.js';
import { writeNpy } from './formats/npy.js';
import { writeCsv } from './formats/csv.js';
import { computeReference, type ReferenceRequest } from './methods/reference.js';
import { SpectrumInputError, type Ordering, type PairSource, type RankRule, type Snapshots } from './methods/types.js';
import { generateScenario, type ScenarioName } from './scenarios/scenarios.js';
import { createRng } from './scenarios/prng.js';

export interface StoredDataset {
  /** Name used in error messages (the uploaded file's name). */
  name: string;
  source: 'upload' | 'scenario';
  layout: Layout;
  bytes: Uint8Array;
  /** Y of explicit pairs. */
  bytesY?: Uint8Array | null;
  scenario?: { name: ScenarioName; seed: number; noise: number; samples?: number } | null;
}

export interface VariantRecipe {
  /** 'same': the dataset as stored; 'per-student': seeded noise and, for scenarios, parameter jitter. */
  mode: 'same' | 'per-student';
  seed: number;
  noise: number;
  jitter: number;
}

export interface MaterializedVariant {
  source: PairSource;
  x: Snapshots;
  y?: Snapshots;
  /** Canonical float64 .npy (Fortran order: one snapshot per column) of X, and of Y for pairs. */
  npyX: Uint8Array;
  npyY?: Uint8Array;
  /** sha256 over npyX (then npyY), hex. */
  checksum: string;
  /** Scenario parameters after jitter, or the noise level. */
  parameters: Record<string, number>;
  dt: number | null;
}

/** A dataset's stored bytes → its pairs, through the engine's readers (located errors on bad input). */
export function datasetSource(d: StoredDataset, maxBytes?: number): PairSource {
  const limits = maxBytes !== undefined ? { maxBytes } : {};
  const yName = d.name.replace(/(\.[A-Za-z0-9]+)?$/, '.y$1');
  return readPairSource({ name: d.name, bytes: d.bytes }, d.bytesY ? { name: yName, bytes: d.bytesY } : undefined, { layout: d.layout, ...limits });
}

function addRelativeNoise(data: Float64Array, level: number, rng: ReturnType<typeof createRng>): void {
  if (!(level > 0)) return;
  let ss = 0;
  for (let i = 0; i < data.length; i++) ss += data[i] * data[i];
  const scale = level * Math.sqrt(ss / Math.max(1, data.length));
  for (let i = 0; i < data.length; i++) data[i] += scale * rng.normal();
}

function snapshotsOf(src: PairSource): { x: Snapshots; y?: Snapshots } {
  if (src.kind === 'trajectory') return { x: src.snapshots };
  if (src.kind === 'pairs') return { x: src.x, y: src.y };
  throw new RangeError('datasets of several trajectories are not supported for assignments');
}

/** The variant's snapshots, canonical bytes and checksum. Deterministic in (dataset bytes, recipe). */
export function materializeVariant(d: StoredDataset, recipe: VariantRecipe): MaterializedVariant {
  let source: PairSource;
  let parameters: Record<string, number>;
  let dt: number | null = null;
  if (d.source === 'scenario' && d.scenario && recipe.mode === 'per-student') {
    const sc = generateScenario(d.scenario.name, { seed: recipe.seed, noise: recipe.noise, jitter: recipe.jitter, samples: d.scenario.samples });
    source = sc.source;
    parameters = sc.parameters;
    dt = sc.dt;
  } else {
    source = datasetSource(d);
    parameters = { noise: recipe.mode === 'per-student' ? recipe.noise : 0 };
    if (recipe.mode === 'per-student' && recipe.noise > 0) {
      const rng = createRng(recipe.seed);
      const s = snapshotsOf(source);
      const x = { ...s.x, data: Float64Array.from(s.x.data) };
      addRelativeNoise(x.data, recipe.noise, rng);
      if (s.y) {
        const y = { ...s.y, data: Float64Array.from(s.y.data) };
        addRelativeNoise(y.data, recipe.noise, rng);
        source = { kind: 'pairs', x, y };
      } else source = { kind: 'trajectory', snapshots: x };
    }
  }
  const { x, y } = snapshotsOf(source);
  const npyX = writeNpy({ rows: x.n, cols: x.k, data: x.data });
  const npyY = y ? writeNpy({ rows: y.n, cols: y.k, data: y.data }) : undefined;
  const h = createHash('sha256').update(npyX);
  if (npyY) h.update(npyY);
  return { source, x, y, npyX, npyY, checksum: h.digest('hex'), parameters, dt };
}

/** CSV of a variant's snapshots: one snapshot per column, round-trip precision. */
export function variantCsv(s: Snapshots): string {
  return writeCsv({ rows: s.n, cols: s.k, data: s.data });
}

export interface TaskRun {
  method: MethodConfig;
  dt?: number;
  order: Ordering;
  top?: number;
  /** Compute mode vectors / eigenfunction values for the scorer. */
  wantModes?: boolean;
  /** Eigenfunction values at the first `eigenfunctionPoints` snapshots of X. */
  eigenfunctionPoints?: number;
}

function dmdRule(r: MethodConfig & { method: 'dmd' }): RankRule {
  const rr = r.rankRule;
  if (rr.kind === 'rank') return { kind: 'rank', rank: rr.rank };
  if (rr.kind === 'energy') return { kind: 'energy', fraction: rr.fraction };
  if (rr.kind === 'tolerance') return { kind: 'tolerance', tol: rr.tol };
  return { kind: 'optimal' };
}

/** X of a pair source (a single trajectory D gives X = D[:, 0:m]), without copying. */
function xOf(source: PairSource): Snapshots {
  if (source.kind === 'trajectory') return { n: source.snapshots.n, k: Math.max(0, source.snapshots.k - 1), data: source.snapshots.data };
  if (source.kind === 'pairs') return source.x;
  throw new SpectrumInputError('radial centres are taken from one trajectory or one set of pairs; several trajectories are not supported');
}

export interface RadialCentres {
  /** 0-based columns of X that are the centres, in dictionary order. */
  indices: number[];
  /** The centres (n×k, one per column), copied from X. */
  centres: Snapshots;
  /** The rule in words, with the indices it gave. */
  description: string;
}

/** The centres of a radial dictionary: the columns of the data's X that the rule picks (located error for an index past the end). */
export function radialCentres(source: PairSource, rule: CentreRule): RadialCentres {
  const x = xOf(source);
  const indices = centreIndices(rule, x.k);
  const bad = indices.findIndex((i) => !Number.isInteger(i) || i < 0 || i >= x.k);
  if (bad >= 0) {
    throw new SpectrumInputError(`radial centre ${bad + 1} is snapshot ${indices[bad]} of X, but X has ${x.k} snapshot${x.k === 1 ? '' : 's'} (0-based columns 0 … ${x.k - 1})`);
  }
  if (indices.length === 0) throw new SpectrumInputError('the centre rule picks no snapshot of X');
  const data = new Float64Array(x.n * indices.length);
  indices.forEach((col, j) => data.set(x.data.subarray(col * x.n, col * x.n + x.n), j * x.n));
  return { indices, centres: { n: x.n, k: indices.length, data }, description: describeCentreRule(rule, x.k) };
}

/**
 * The configured method as the engine's reference request (the same options the spectrum CLI builds).
 * A radial dictionary needs the data (`source`): its centres are columns of X.
 */
export function referenceRequest(t: TaskRun, source?: PairSource): ReferenceRequest {
  const wantVectors = Boolean(t.wantModes || t.eigenfunctionPoints);
  const common = { dt: t.dt, order: t.order, top: t.top, rankBand: true, modes: wantVectors ? true : undefined };
  const m = t.method;
  if (m.method === 'dmd') return { method: 'dmd', options: { ...common, truncation: dmdRule(m) } };
  if (m.method === 'edmd') {
    if (m.dictionary === 'radial') {
      if (!source) throw new TypeError('referenceRequest: a radial dictionary takes its centres from the data; pass the source');
      if (m.sigma === undefined || m.centres === undefined) throw new SpectrumInputError('a radial dictionary needs its width sigma and its centre rule');
      const c = radialCentres(source, m.centres);
      return { method: 'edmd', options: { ...common, dictionary: { kind: 'gaussian-radial', sigma: m.sigma, centres: c.centres, fromColumns: c.indices } } };
    }
    if (m.degree === undefined) throw new SpectrumInputError(`a ${m.dictionary} dictionary needs its degree`);
    return { method: 'edmd', options: { ...common, dictionary: { kind: m.dictionary, degree: m.degree } } };
  }
  const kernel =
    m.kernel === 'linear'
      ? ({ kind: 'linear' } as const)
      : m.kernel === 'polynomial'
        ? ({ kind: 'polynomial', degree: m.degree ?? 2, coef0: m.coef0 ?? 1, gamma: m.gamma ?? 1 } as const)
        : ({ kind: 'gaussian', sigma: m.sigma ?? 1 } as const);
  const truncation = m.rankRule.kind === 'rank' ? ({ kind: 'rank', rank: m.rankRule.rank } as const) : m.rankRule.kind === 'tolerance' ? ({ kind: 'tolerance', tol: m.rankRule.tol } as const) : undefined;
  return { method: 'kernel-edmd', options: { ...common, kernel, truncation } };
}

export interface ComputedReference {
  reference: ReferenceSpectrum;
  extras: ReferenceExtras;
  singularValues: number[];
  /** Mode shapes of the leading values, real and imaginary parts (for pictures), at most 8. */
  modeShapes: { re: number[]; im: number[] }[];
}

function column(mat: { rows: number; re: Float64Array; im: Float64Array }, j: number, count = mat.rows) {
  const out: { re: number; im: number }[] = [];
  for (let i = 0; i < count; i++) out.push({ re: mat.re[j * mat.rows + i], im: mat.im[j * mat.rows + i] });
  return out;
}

/** The reference of one variant under one configuration (with rank band and measured sensitivity): spectrum, vectors for the scorer, singular values. */
export async function computeVariantReference(source: PairSource, t: TaskRun, meta: Record<string, unknown> = {}): Promise<ComputedReference> {
  // Modes are always computed: the preview draws them.
  const m = t.method;
  let recorded = meta;
  if (m.method === 'edmd' && m.dictionary === 'radial' && m.centres) {
    // The stored reference says which snapshots are the centres (the engine records only their number).
    const c = radialCentres(source, m.centres);
    recorded = { ...meta, centres: { of: 'X', indexBase: 0, rule: m.centres, indices: c.indices, description: c.description } };
  }
  const { reference, result } = await computeReference(source, referenceRequest({ ...t, wantModes: true }, source), { options: recorded });
  const extras: ReferenceExtras = {};
  const r = result.eigenvalues.length;
  if (t.wantModes && result.modes) extras.modes = Array.from({ length: r }, (_, j) => column(result.modes!, j));
  if (t.eigenfunctionPoints && result.eigenfunctions) {
    const p = Math.min(t.eigenfunctionPoints, result.eigenfunctions.rows);
    extras.eigenfunctions = Array.from({ length: r }, (_, j) => column(result.eigenfunctions!, j, p));
  }
  const modeShapes: ComputedReference['modeShapes'] = [];
  if (result.modes) {
    const n = result.modes.rows;
    for (let j = 0; j < Math.min(8, r); j++) {
      const re: number[] = [];
      const im: number[] = [];
      for (let i = 0; i < n; i++) {
        re.push(result.modes.re[j * n + i]);
        im.push(result.modes.im[j * n + i]);
      }
      modeShapes.push({ re, im });
    }
  }
  return { reference, extras, singularValues: Array.from(result.singularValues), modeShapes };
}

/** The task as spectrum CLI options (for a student's script). */
export function taskCli(t: { method: MethodConfig; dt?: number; order: Ordering; top?: number }, rank: number | null): string {
  const m = t.method;
  const parts = [`--method ${m.method}`];
  if (m.method === 'dmd' || m.method === 'kernel-edmd') {
    const rr = m.rankRule;
    if (rank !== null && rr.kind !== 'rank') parts.push(`--rank ${rank}`);
    else if (rr.kind === 'rank') parts.push(`--rank ${rr.rank}`);
    else if (rr.kind === 'energy') parts.push(`--energy ${rr.fraction}`);
    else if (rr.kind === 'tolerance') parts.push(`--rank-tol ${rr.tol}`);
    else parts.push('--rank optimal');
  }
  if (m.method === 'edmd') {
    parts.push(`--dictionary ${m.dictionary}`);
    if (m.dictionary === 'radial') {
      parts.push(`--sigma ${m.sigma}`);
      if (m.centres?.kind === 'every') parts.push(`--centres-every ${m.centres.step}`);
      else if (m.centres?.kind === 'indices') parts.push(`--centres-at ${m.centres.indices.join(',')}`);
    } else parts.push(`--degree ${m.degree}`);
  }
  if (m.method === 'kernel-edmd') {
    parts.push(`--kernel ${m.kernel}`);
    if (m.kernel === 'polynomial') parts.push(`--degree ${m.degree ?? 2}`, `--coef0 ${m.coef0 ?? 1}`, `--gamma ${m.gamma ?? 1}`);
    if (m.kernel === 'gaussian') parts.push(`--sigma ${m.sigma}`);
  }
  if (t.dt !== undefined) parts.push(`--dt ${t.dt}`);
  parts.push(`--order ${t.order}`);
  if (t.top !== undefined) parts.push(`--top ${t.top}`);
  return parts.join(' ');
}
