/**
 * Nonlinear least squares by Levenberg–Marquardt: damped Gauss–Newton with Marquardt's
 * scaling of the damping by diag(JᵀJ) (Marquardt 1963, SIAM J. Appl. Math. 11:431), an
 * analytic Jacobian supplied by the caller, and parameter standard errors from
 * s²(JᵀJ)⁻¹ at the solution. Written here (rather than taken from ml-levenberg-marquardt) so
 * that package can serve as an independent reference in the benchmark.
 */

/** A model y ≈ f(x; p) with its analytic Jacobian row ∂f/∂p at x. */
export interface LeastSquaresModel {
  /** Model value at x for parameters p. */
  value(x: number, p: readonly number[]): number;
  /** Writes ∂f/∂p_j at x into out[j] (out has length p.length). */
  gradient(x: number, p: readonly number[], out: number[]): void;
  /** Optional: value and gradient in one pass (same contract as the two above). */
  evaluate?(x: number, p: readonly number[], out: number[]): number;
}

export interface LevenbergMarquardtOptions {
  /** Iteration cap (accepted + rejected steps). Default 500. */
  maxIterations?: number;
  /** Starting damping λ. Default 1e-3. */
  initialDamping?: number;
  /** Stop when every |δ_j| ≤ stepTolerance·(|p_j| + stepTolerance). Default 1e-12. */
  stepTolerance?: number;
  /** Stop when the relative fall in the residual sum of squares is below this. Default 1e-15. */
  sseTolerance?: number;
}

export interface LevenbergMarquardtResult {
  params: number[];
  /** Residual sum of squares at the solution. */
  sse: number;
  /** Number of observations minus number of parameters. */
  degreesOfFreedom: number;
  /** √(sse / df); NaN when df ≤ 0. */
  residualSd: number;
  /** s²(JᵀJ)⁻¹; null when JᵀJ is singular or df ≤ 0. */
  covariance: number[][] | null;
  /** √diag(covariance); null with covariance. */
  standardErrors: number[] | null;
  /** 1-norm condition number of the correlation-scaled JᵀJ at the solution (Infinity if singular). */
  conditionNumber: number;
  iterations: number;
  converged: boolean;
}

const DAMPING_UP = 10;
const DAMPING_DOWN = 10;
const DAMPING_MIN = 1e-20;
const DAMPING_MAX = 1e20;

function sumOfSquares(
  model: LeastSquaresModel,
  x: readonly number[],
  y: readonly number[],
  p: readonly number[],
): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) {
    const r = y[i] - model.value(x[i], p);
    s += r * r;
  }
  return Number.isFinite(s) ? s : Infinity;
}

/** Fills jtj (k×k, row-major) and jtr with JᵀJ and Jᵀr at p; returns the residual sum of squares. */
function normalEquations(
  model: LeastSquaresModel,
  x: readonly number[],
  y: readonly number[],
  p: readonly number[],
  jtj: Float64Array,
  jtr: Float64Array,
  row: number[],
): number {
  const k = p.length;
  jtj.fill(0);
  jtr.fill(0);
  let sse = 0;
  for (let i = 0; i < x.length; i++) {
    let f: number;
    if (model.evaluate) f = model.evaluate(x[i], p, row);
    else {
      model.gradient(x[i], p, row);
      f = model.value(x[i], p);
    }
    const r = y[i] - f;
    sse += r * r;
    for (let a = 0; a < k; a++) {
      const ra = row[a];
      jtr[a] += ra * r;
      for (let c = 0; c <= a; c++) jtj[a * k + c] += ra * row[c];
    }
  }
  for (let a = 0; a < k; a++) for (let c = a + 1; c < k; c++) jtj[a * k + c] = jtj[c * k + a];
  return Number.isFinite(sse) ? sse : Infinity;
}

/** Cholesky factor of the k×k row-major SPD matrix m into the lower triangle of l; false if not SPD. */
function choleskyFactorFlat(m: Float64Array, k: number, l: Float64Array): boolean {
  for (let i = 0; i < k; i++) {
    for (let j = 0; j <= i; j++) {
      let s = m[i * k + j];
      for (let q = 0; q < j; q++) s -= l[i * k + q] * l[j * k + q];
      if (i === j) {
        if (!(s > 0) || !Number.isFinite(s)) return false;
        l[i * k + i] = Math.sqrt(s);
      } else {
        l[i * k + j] = s / l[j * k + j];
      }
    }
  }
  return true;
}

/** Solves L·Lᵀ·z = v for the factor in l, into out (which may be v itself). */
function choleskySubstituteFlat(l: Float64Array, k: number, v: Float64Array, out: Float64Array): void {
  for (let i = 0; i < k; i++) {
    let s = v[i];
    for (let q = 0; q < i; q++) s -= l[i * k + q] * out[q];
    out[i] = s / l[i * k + i];
  }
  for (let i = k - 1; i >= 0; i--) {
    let s = out[i];
    for (let q = i + 1; q < k; q++) s -= l[q * k + i] * out[q];
    out[i] = s / l[i * k + i];
  }
}

/** Cholesky solve of the k×k row-major SPD matrix m against v into out, using l as scratch; false if not SPD. */
function choleskySolveFlat(m: Float64Array, v: Float64Array, k: number, l: Float64Array, out: Float64Array): boolean {
  if (!choleskyFactorFlat(m, k, l)) return false;
  choleskySubstituteFlat(l, k, v, out);
  return true;
}

/** Inverse of the k×k row-major SPD matrix m into inv, factored once and solved for each unit vector; false if not SPD. */
function invertSpdFlat(m: Float64Array, k: number, l: Float64Array, inv: Float64Array, col: Float64Array): boolean {
  if (!choleskyFactorFlat(m, k, l)) return false;
  for (let c = 0; c < k; c++) {
    for (let i = 0; i < k; i++) col[i] = i === c ? 1 : 0;
    choleskySubstituteFlat(l, k, col, col);
    for (let r = 0; r < k; r++) inv[r * k + c] = col[r];
  }
  return true;
}

function oneNormFlat(m: Float64Array, k: number): number {
  let best = 0;
  for (let c = 0; c < k; c++) {
    let s = 0;
    for (let r = 0; r < k; r++) s += Math.abs(m[r * k + c]);
    best = Math.max(best, s);
  }
  return best;
}

/**
 * 1-norm condition number of the k×k row-major JᵀJ after scaling it to unit diagonal (so units
 * do not matter); `scaled`, `l`, `inv` (k×k) and `col` (k) are scratch.
 */
function scaledConditionNumberFlat(jtj: Float64Array, k: number, scaled: Float64Array, l: Float64Array, inv: Float64Array, col: Float64Array): number {
  for (let i = 0; i < k; i++) {
    const di = Math.sqrt(jtj[i * k + i]);
    if (!(di > 0) || !Number.isFinite(di)) return Infinity;
    col[i] = di;
  }
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) scaled[i * k + j] = jtj[i * k + j] / (col[i] * col[j]);
  if (!invertSpdFlat(scaled, k, l, inv, col)) return Infinity;
  const c = oneNormFlat(scaled, k) * oneNormFlat(inv, k);
  return k === 0 ? 1 : Number.isFinite(c) ? c : Infinity;
}

/** The k×k row-major matrix times `factor`, as rows. */
function scaledRows(flat: Float64Array, k: number, factor: number): number[][] {
  const rows: number[][] = [];
  for (let i = 0; i < k; i++) {
    const r: number[] = [];
    for (let j = 0; j < k; j++) r.push(flat[i * k + j] * factor);
    rows.push(r);
  }
  return rows;
}

/**
 * Scratch matrices and vectors of one solve. Fits run by the thousand (every lead of a
 * collection), so the last size's set is kept and reused rather than allocated per call; a
 * solve started from inside a model callback (re-entrant) gets its own.
 */
interface Workspace {
  k: number;
  jtj: Float64Array;
  jtr: Float64Array;
  trialJtj: Float64Array;
  trialJtr: Float64Array;
  damped: Float64Array;
  scratch: Float64Array;
  delta: Float64Array;
  row: number[];
}

function newWorkspace(k: number): Workspace {
  return {
    k,
    jtj: new Float64Array(k * k),
    jtr: new Float64Array(k),
    trialJtj: new Float64Array(k * k),
    trialJtr: new Float64Array(k),
    damped: new Float64Array(k * k),
    scratch: new Float64Array(k * k),
    delta: new Float64Array(k),
    row: new Array<number>(k).fill(0),
  };
}

let sharedWorkspace: Workspace | null = null;
let sharedWorkspaceBusy = false;

/**
 * Minimizes Σ (y_i − f(x_i; p))² from the start `p0`.
 *
 * Each iteration solves (JᵀJ + λ·diag(JᵀJ)) δ = Jᵀr; a step that lowers the sum of squares is
 * taken and λ divided by 10, otherwise λ is multiplied by 10 and the step retried. Steps that
 * make the model non-finite count as failures. Converged means a small relative step or a
 * negligible fall in the sum of squares after a successful step. Never throws on bad data: a
 * problem it cannot make progress on returns `converged: false` with the best point found.
 *
 * Standard errors are √diag(s²(JᵀJ)⁻¹) with s² = SSE/(n − k), as in NIST StRD and R's nls.
 */
export function levenbergMarquardt(
  model: LeastSquaresModel,
  x: readonly number[],
  y: readonly number[],
  p0: readonly number[],
  options: LevenbergMarquardtOptions = {},
): LevenbergMarquardtResult {
  const k = p0.length;
  const shared = !sharedWorkspaceBusy;
  let ws: Workspace;
  if (shared) {
    if (!sharedWorkspace || sharedWorkspace.k !== k) sharedWorkspace = newWorkspace(k);
    ws = sharedWorkspace;
    sharedWorkspaceBusy = true;
  } else ws = newWorkspace(k);
  try {
    return solve(model, x, y, p0, options, ws);
  } finally {
    if (shared) sharedWorkspaceBusy = false;
  }
}

function solve(
  model: LeastSquaresModel,
  x: readonly number[],
  y: readonly number[],
  p0: readonly number[],
  options: LevenbergMarquardtOptions,
  ws: Workspace,
): LevenbergMarquardtResult {
  const maxIterations = options.maxIterations ?? 500;
  const stepTol = options.stepTolerance ?? 1e-12;
  const sseTol = options.sseTolerance ?? 1e-15;
  const k = p0.length;
  const n = x.length;
  const { damped, scratch, delta, row } = ws;
  let { jtj, jtr } = ws;
  // JᵀJ and Jᵀr at the trial point, made with its sum of squares (one model evaluation per
  // point serves both) and swapped in when the step is taken.
  let { trialJtj, trialJtr } = ws;
  let p = p0.slice();
  let trial = p0.slice();
  let sse = sumOfSquares(model, x, y, p);
  let lambda = options.initialDamping ?? 1e-3;
  let converged = false;
  let iterations = 0;
  // JᵀJ is kept at the current point p from here on.
  const haveJ = n > 0 && Number.isFinite(sse);

  if (haveJ) {
    normalEquations(model, x, y, p, jtj, jtr, row);
    while (iterations < maxIterations) {
      iterations++;
      if (sse === 0) {
        converged = true;
        break;
      }
      damped.set(jtj);
      for (let i = 0; i < k; i++) damped[i * k + i] += lambda * Math.max(jtj[i * k + i], 1e-300);
      let ok = choleskySolveFlat(damped, jtr, k, scratch, delta);
      for (let j = 0; ok && j < k; j++) if (!Number.isFinite(delta[j])) ok = false;
      if (!ok) {
        lambda *= DAMPING_UP;
        if (lambda > DAMPING_MAX) break;
        continue;
      }
      for (let j = 0; j < k; j++) trial[j] = p[j] + delta[j];
      const trialSse = normalEquations(model, x, y, trial, trialJtj, trialJtr, row);
      if (trialSse <= sse) {
        const fall = sse - trialSse;
        let smallStep = true;
        for (let j = 0; j < k; j++) if (Math.abs(delta[j]) > stepTol * (Math.abs(trial[j]) + stepTol)) smallStep = false;
        const swap = p;
        p = trial;
        trial = swap;
        const swapJtj = jtj;
        jtj = trialJtj;
        trialJtj = swapJtj;
        const swapJtr = jtr;
        jtr = trialJtr;
        trialJtr = swapJtr;
        sse = trialSse;
        lambda = Math.max(lambda / DAMPING_DOWN, DAMPING_MIN);
        if (smallStep || fall <= sseTol * sse) {
          converged = true;
          break;
        }
      } else {
        lambda *= DAMPING_UP;
        if (lambda > DAMPING_MAX) {
          // No descent direction left at machine precision: a stationary point.
          converged = true;
          break;
        }
      }
    }
  }

  const dof = n - k;
  const conditionNumber = haveJ && k > 0 ? scaledConditionNumberFlat(jtj, k, damped, scratch, trialJtj, delta) : Infinity;
  let covariance: number[][] | null = null;
  let standardErrors: number[] | null = null;
  if (dof > 0 && haveJ && Number.isFinite(sse) && invertSpdFlat(jtj, k, scratch, trialJtj, delta)) {
    const s2 = sse / dof;
    covariance = scaledRows(trialJtj, k, s2);
    standardErrors = covariance.map((r, i) => Math.sqrt(Math.max(r[i], 0)));
    if (standardErrors.some((v) => !Number.isFinite(v))) {
      covariance = null;
      standardErrors = null;
    }
  }
  return {
    params: p,
    sse,
    degreesOfFreedom: dof,
    residualSd: dof > 0 ? Math.sqrt(sse / dof) : Number.NaN,
    covariance,
    standardErrors,
    conditionNumber,
    iterations,
    converged: converged && Number.isFinite(sse),
  };
}
