/**
 * Online learning of an asserted structure: recursive least squares on its regression rows.
 *
 * Under certainty equivalence the asserted equation is the law of the series; as each new
 * observation y_t arrives, the structure's regression row (φ_t, target_t) for time t becomes
 * formable, and one RLS step (Ljung & Söderström 1983; see linalg/rls.ts) updates θ. Terms a
 * sparse fit switched off stay exactly zero: RLS runs on the active terms only. The learner
 * starts from the batch least-squares fit of the active terms on the estimation sample, so at
 * λ = 1 learning row by row ends exactly where a batch fit on all rows would (asserted in tests).
 *
 * A structure nonlinear in θ (`Structure.linearized`) gives its Gauss–Newton rows at a θ: the
 * learner starts from the structure's own estimate on the sample (least squares on the rows at
 * that θ returns it) and forms each new row at its current θ, so each step is a recursive
 * Gauss–Newton step; at λ = 1 it ends near, not exactly at, a batch refit.
 */
import type { Series } from '../data/series.js';
import type { Regression, Structure } from '../models/structure.js';
import { lstsq } from '../linalg/lstsq.js';
import { Rls, type RlsJson, type RlsStep } from '../linalg/rls.js';
import { zeros, type DesignMatrix } from '../linalg/matrix.js';
import { ModelError } from '../data/errors.js';

export interface LearnStep {
  /** Time index of the row learnt. */
  t: number;
  /** Innovation (target − φᵀθ before the update) and its predicted variance. */
  innovation: number;
  variance: number;
}

export interface LearnerOptions {
  /** Forgetting factor λ ∈ (0, 1] (default 1). */
  lambda?: number;
  traceMax?: number;
}

export class Learner {
  private constructor(
    readonly structure: Structure,
    /** Which of the structure's terms are learnt (the rest stay zero). */
    readonly active: boolean[],
    readonly rls: Rls,
    /** Next time index whose row has not been learnt yet. */
    public next: number,
  ) {}

  /**
   * Starts from the batch fit of the active terms on rows t in [from, to) of `series`; learning
   * continues with row `to`.
   */
  static start(structure: Structure, active: boolean[], series: Series, from: number, to: number, options: LearnerOptions = {}): Learner {
    const at = structure.linearized ? structure.estimate(series, from, to).theta : undefined;
    const reg = structure.regression(series, from, to, at);
    const cols = activeColumns(active);
    const names = cols.map((j) => structure.terms[j]);
    const phi = selectColumns(reg.phi, cols);
    if (reg.y.length <= cols.length) {
      throw new ModelError('series-too-short', `online learning needs more rows (${reg.y.length}) than active terms (${cols.length})`, {
        expected: `at least ${cols.length + 1} rows`,
      });
    }
    const fit = lstsq(phi, reg.y, names);
    const rls = Rls.fromFit(fit, options);
    return new Learner(structure, active, rls, to);
  }

  /** Restores a learner saved with `toJSON`. */
  static fromJSON(structure: Structure, json: LearnerJson): Learner {
    return new Learner(structure, json.active, Rls.fromJSON(json.rls), json.next);
  }

  toJSON(): LearnerJson {
    return { active: [...this.active], rls: this.rls.toJSON(), next: this.next };
  }

  /** Full-length θ in the structure's term order (inactive terms exactly zero). */
  get theta(): Float64Array {
    const out = new Float64Array(this.structure.terms.length);
    const th = this.rls.theta;
    let k = 0;
    for (let j = 0; j < out.length; j++) if (this.active[j]) out[j] = th[k++];
    return out;
  }

  /** Covariance of θ (σ̂²P) in full term order, zero rows/columns for inactive terms. */
  get cov(): Float64Array {
    const p = this.structure.terms.length;
    const cols = activeColumns(this.active);
    const k = cols.length;
    const P = this.rls.P;
    const s2 = this.rls.sigma2;
    const out = new Float64Array(p * p);
    for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) out[cols[a] * p + cols[b]] = s2 * P[a * k + b];
    return out;
  }

  get sigma2(): number {
    return this.rls.sigma2;
  }

  /**
   * Learns every row from `this.next` up to (not including) `to` that `series` can form, one RLS
   * step each, and returns the steps (innovations for drift detection and evaluation).
   */
  learn(series: Series, to: number = series.values.length): LearnStep[] {
    const steps: LearnStep[] = [];
    this.learnTo(series, to, steps);
    return steps;
  }

  /**
   * The same RLS steps as `learn`, without recording them: for callers that only need the
   * learner's state at `to` (calibration re-runs from its origins).
   */
  advance(series: Series, to: number = series.values.length): void {
    this.learnTo(series, to, null);
  }

  private learnTo(series: Series, to: number, steps: LearnStep[] | null): void {
    if (to <= this.next) return;
    if (!this.structure.linearized) {
      this.learnRows(this.structure.regression(series, this.next, to), steps);
    } else {
      // Each row at the θ the previous step left.
      for (let t = this.next; t < to; t++) this.learnRows(this.structure.regression(series, t, t + 1, this.theta), steps);
    }
    if (this.next < to) this.next = to;
  }

  private learnRows(reg: Regression, steps: LearnStep[] | null): void {
    const cols = (this.columns ??= activeColumns(this.active));
    const p = reg.phi.cols;
    const phi = new Float64Array(cols.length);
    // One record for every step's results (read before the next step overwrites them).
    const s: RlsStep = { prediction: 0, innovation: 0, innovationVariance: 0, gain: new Float64Array(cols.length) };
    for (let r = 0; r < reg.y.length; r++) {
      for (let a = 0; a < cols.length; a++) phi[a] = reg.phi.data[r * p + cols[a]];
      this.rls.update(phi, reg.y[r], s);
      if (steps !== null) steps.push({ t: reg.index[r], innovation: s.innovation, variance: s.innovationVariance });
      this.next = reg.index[r] + 1;
    }
  }

  /** Positions of the active terms (`active` is fixed for the learner's life). */
  private columns: number[] | null = null;
}

export interface LearnerJson {
  active: boolean[];
  rls: RlsJson;
  next: number;
}

function activeColumns(active: boolean[]): number[] {
  const out: number[] = [];
  active.forEach((a, j) => {
    if (a) out.push(j);
  });
  return out;
}

function selectColumns(m: DesignMatrix, cols: number[]): DesignMatrix {
  const out = zeros(m.rows, cols.length);
  for (let i = 0; i < m.rows; i++) for (let a = 0; a < cols.length; a++) out.data[i * cols.length + a] = m.data[i * m.cols + cols[a]];
  return out;
}
