/**
 * Shared types of the spectral methods (exact DMD, EDMD, kernel EDMD).
 * Matrices are column-major Float64Arrays; a snapshot matrix n×k stores
 * snapshot j at data[j*n .. j*n+n).
 */
import type { Complex, ComplexMatrix } from '../linalg/complex.js';

export type { Complex, ComplexMatrix };

/** A column-major n×k snapshot matrix (one snapshot per column). */
export interface Snapshots {
  data: Float64Array;
  n: number;
  k: number;
}

/** Where the snapshot pairs (x_i, y_i = F(x_i)) come from. */
export type PairSource =
  | { kind: 'trajectory'; snapshots: Snapshots }
  | { kind: 'trajectories'; list: Snapshots[] }
  | { kind: 'pairs'; x: Snapshots; y: Snapshots };

/** How the truncation rank is chosen. */
export type RankRule =
  /** A given rank r. */
  | { kind: 'rank'; rank: number }
  /** Smallest r keeping the given fraction of Σσ². */
  | { kind: 'energy'; fraction: number }
  /** σ_i > tol·σ_1 (kernel EDMD: σ_i² > tol·σ_1²). */
  | { kind: 'tolerance'; tol: number }
  /** Gavish & Donoho (2014) optimal hard threshold for unknown noise. */
  | { kind: 'optimal' }
  /** Numerical rank: σ_i > max(rows, cols)·ε·σ_1. */
  | { kind: 'numerical' };

export type Ordering = 'magnitude' | 'amplitude' | 'unit-circle' | 'frequency';

export interface SpectrumOptions {
  /** Time step between snapshots; gives continuous-time eigenvalues log(λ)/dt. */
  dt?: number;
  /** Order of the eigenvalues in the result (default 'magnitude'). */
  order?: Ordering;
  /** Keep only the leading K eigenvalues in that order; conjugate pairs are never split. */
  top?: number;
  /** When the cut at `top` would split a conjugate pair: take both (default) or neither. */
  pairAtCut?: 'both' | 'neither';
  /** Compute the rank band r−2…r+2 (default true for DMD and kernel EDMD). */
  rankBand?: boolean;
  /**
   * true: return the Koopman modes (n×r) and eigenfunctions on the samples;
   * undefined (default): compute mode norms and amplitudes but return no matrices;
   * false: skip the modes (mode norms and amplitudes are NaN) unless order is 'amplitude'.
   */
  modes?: boolean;
  /**
   * Measured sensitivity: recompute the spectrum from the data perturbed at the level of float32 rounding
   * (each entry times 1 + δ, δ uniform in ±2⁻²⁴, seeded draws) at the same rank, pair the values by optimal
   * assignment and record each value's largest deviation (numerics.md, "Conditioning"). Off by default in the
   * method functions; computeReference (reference.ts) turns it on.
   */
  sensitivity?: boolean | SensitivityOptions;
}

export interface SensitivityOptions {
  /** Number of perturbed draws (default 3). */
  draws?: number;
  /** Seed of the draws (default 1). */
  seed?: number;
}

export interface DmdOptions extends SpectrumOptions {
  /** Truncation of the SVD of X (default: numerical rank). */
  truncation?: RankRule;
  /** 'snapshots' = V, Σ from eig(XᵀX); 'direct' = SVD of X; 'auto' = snapshots when n ≥ 2m (default). */
  svd?: 'auto' | 'snapshots' | 'direct';
}

export type Dictionary =
  | { kind: 'monomial'; degree: number }
  | { kind: 'hermite'; degree: number }
  | {
      kind: 'gaussian-radial';
      centres: Snapshots;
      sigma: number;
      /**
       * When the centres are columns of the data's X (0-based, in centre order): the measured sensitivity then takes
       * them from each perturbed copy, as a student who rounds her data rounds her centres too.
       */
      fromColumns?: number[];
    };

export interface EdmdOptions extends SpectrumOptions {
  dictionary: Dictionary;
  /** Refuse dictionaries larger than this (default 2000 functions). */
  maxDictionarySize?: number;
  /** Points (n×p) at which to evaluate the eigenfunctions. */
  points?: Snapshots;
  /**
   * Relative cut-off of the least-squares solve Ψ_X K ≈ Ψ_Y by pivoted QR (default 1e-10): the factorisation
   * stops at the first pivot at or below cutoff × the first one, after the columns are scaled to unit norm.
   */
  cutoff?: number;
}

export type Kernel =
  | { kind: 'linear' }
  /** (c + γ xᵀy)^p; c defaults to 1, γ to 1. */
  | { kind: 'polynomial'; degree: number; coef0?: number; gamma?: number }
  /** exp(−‖x−y‖²/(2σ²)). */
  | { kind: 'gaussian'; sigma: number };

export interface KernelEdmdOptions extends SpectrumOptions {
  kernel: Kernel;
  /** Truncation of Ĝ = QΣ²Qᵀ: by rank or by σ_i² > tol·σ_1² (default tolerance 1e-12). */
  truncation?: { kind: 'rank'; rank: number } | { kind: 'tolerance'; tol: number };
  /** Points (n×p) at which to evaluate the eigenfunctions. */
  points?: Snapshots;
}

export type MethodName = 'dmd' | 'edmd' | 'kernel-edmd';

/** One eigenvalue with what the reference records about it. */
export interface EigenEntry {
  lambda: Complex;
  /** κ = ‖w‖‖v‖/|wᴴv| of the reduced operator. */
  condition: number;
  /** ‖ξ_j‖ of the Koopman/DMD mode (eigenvector scaled to unit norm for DMD). */
  modeNorm: number;
  /** ‖ξ_j‖·|b_j| (DMD: b = Φ⁺x_1; EDMD/kernel EDMD: b_j = φ_j(x_1)). */
  amplitude: number;
  /** log(λ)/dt; null when λ = 0 (no continuous counterpart); absent without dt. */
  continuous?: Complex | null;
  /** Max distance to this eigenvalue's match across the rank band. */
  spread?: number;
  /** Index of the conjugate partner in `eigenvalues`, or -1 for a real eigenvalue. */
  partner: number;
  /** Largest deviation under float32-level perturbation of the data (with options.sensitivity). */
  sensitivity?: number;
  /** Distance to this value's partner at each band rank other than r (null: no partner there). */
  bandDistances?: { rank: number; distance: number | null }[];
  /** Lowest band rank from which this value has a partner, when it has none at the lower band ranks. */
  resolvedFromRank?: number;
  /** Set when the data cannot determine this value whatever the tolerance. */
  undetermined?: { reason: 'dictionary-rank'; message: string };
}

export interface SpectrumResult {
  method: MethodName;
  /** State dimension. */
  n: number;
  /** Number of snapshot pairs. */
  m: number;
  /** Truncation rank r (EDMD: dictionary size N). */
  rank: number;
  /** Largest rank the data allows. */
  maxRank: number;
  /** Eigenvalues in the requested order (after any top-K cut). */
  eigenvalues: EigenEntry[];
  order: Ordering;
  /** Singular values used for truncation (DMD: of X; kernel EDMD: σ from Ĝ = QΣ²Qᵀ; EDMD: of Ψ_X/√m). */
  singularValues: Float64Array;
  truncation: { rule: RankRule['kind']; rank: number; threshold?: number };
  /** What happened at the top-K cut. */
  cut?: { requested: number; returned: number; pairAtCut: 'took-both' | 'took-neither' | 'no-split' };
  rankBand?: { ranks: number[] };
  dt?: number;
  /** Koopman/DMD modes n×r, column j ↔ eigenvalues[j] (only with modes: true). */
  modes?: ComplexMatrix;
  /** Eigenfunctions on the samples m×r, column j ↔ eigenvalues[j] (only with modes: true). */
  eigenfunctions?: ComplexMatrix;
  /** Eigenfunctions at options.points (p×r), kernel EDMD and EDMD. */
  eigenfunctionsAt?: ComplexMatrix;
  /** Options the engine ran with, for the record. */
  options: Record<string, unknown>;
  /** Plain-language notes (λ = 0 without continuous value, cut decisions, …). */
  notes: string[];
  /** How the sensitivity was measured (with options.sensitivity). */
  sensitivity?: { model: 'float32-rounding'; level: number; draws: number; seed: number };
  /** EDMD: the least-squares solve on Ψ_X and the dictionary's numerical rank on the data. */
  leastSquares?: { solver: 'pivoted-qr'; cutoff: number; dictionarySize: number; dictionaryRank: number; dropped: string[] };
}

/** Raised for a data/option problem the user can fix; `maximum` is set for a refused rank. */
export class SpectrumInputError extends Error {
  readonly maximum?: number;
  constructor(message: string, maximum?: number) {
    super(message);
    this.name = 'SpectrumInputError';
    this.maximum = maximum;
  }
}
