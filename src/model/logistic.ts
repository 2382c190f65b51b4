/**
 * L2-regularized logistic regression. Objective: Σ_i −log p(y_i | x_i) + (l2 / 2)·‖W‖², the
 * intercepts unpenalized. Two classes: one weight vector (sigmoid); more: one per class
 * (softmax), the last intercept fixed at 0 (it is not identifiable).
 *
 * Solver: Newton's method with backtracking line search, deterministic. Stopping rule (scale-aware):
 * the Newton decrement λ² = gᵀH⁻¹g — twice the decrease of the objective the full step predicts,
 * invariant to rescaling the features — is compared with the objective itself: once
 * λ²/2 ≤ tolerance × (1 + objective), one more full step is taken (convergence is quadratic, so
 * it lands at the floating-point floor) and the solver stops; it also stops when no step lowers
 * the objective (the floor itself).
 *
 * Wide data (at least as many features as training rows): the optimal weights lie in the span of
 * the training rows (stationarity: l2·w = −Xᵀr), so the fit is done exactly in an orthonormal
 * basis Q of that span (r ≤ rows directions, modified Gram–Schmidt with re-orthogonalization) on
 * the projected features XQᵀ, and w = Qᵀu. The penalty is unchanged (‖Qᵀu‖ = ‖u‖).
 */
import { choleskySolve } from './linalg.js';
import { rowPasses } from './logistic-rows.js';
import { noChecks, FitError, classCounts, type ModelImpl } from './types.js';
import type { Matrix } from '../table/matrix.js';

export interface LogisticParams {
  classCount: number;
  /** Classes present in training, in code order; the model spans only these. */
  present: number[];
  /** weights[c] has cols weights then the intercept, for each present class c. */
  weights: number[][];
  iterations: number;
}

/** Parameters of the dense Newton system above which a tall fit is refused (its Hessian would not fit the time). */
const MAX_PARAMETERS = 2000;

/** Features above which auto picks newton-cg for two classes on tall data. */
const CG_FROM = 64;

export const logistic: ModelImpl<LogisticParams> = {
  description: "L2-regularized logistic regression (softmax for more than two classes), fitted by Newton's method.",
  methods: (o) => `an L2-penalized logistic regression (λ = ${o.l2})`,
  options: {
    l2: {
      description: 'L2 penalty strength λ on the weights (not the intercept); the objective is the summed log-loss plus λ/2·‖w‖².',
      type: 'number',
      minimum: 0,
      default: 1,
    },
    tolerance: {
      description:
        'Scale-aware stopping rule of the Newton solver: once the Newton decrement λ² = gᵀH⁻¹g (twice the decrease the next full ' +
        'step predicts; unchanged by rescaling the features) satisfies λ²/2 ≤ tolerance × (1 + objective), one more full step ' +
        'is taken and the solver stops; it also stops when no step lowers the objective. With at least as many features as ' +
        'training rows the fit is done exactly in the span of the training rows.',
      type: 'number',
      exclusiveMinimum: 0,
      default: 1e-10,
    },
    solver: {
      description:
        'newton: the exact Newton system, O(rows × parameters²) per step. newton-cg (two classes): the Newton step solved by ' +
        'conjugate gradients with Hessian-vector products, O(rows × features) per inner step, for many features on tall data. ' +
        `auto: newton-cg for two classes with more than ${CG_FROM} features (on more rows than features), newton otherwise. ` +
        'The objective, the stopping rule and the floor are the same; the fitted weights agree to rounding.',
      type: 'string',
      enum: ['auto', 'newton', 'newton-cg'],
      default: 'auto',
    },
    'max-iterations': {
      description: 'Newton iterations allowed before giving up with an error.',
      type: 'integer',
      minimum: 1,
      default: 200,
    },
  },

  check: noChecks,
  fit(X, y, options, { classCount }) {
    const l2 = options.l2 as number;
    const tolerance = options.tolerance as number;
    const maxIterations = options['max-iterations'] as number;
    const counts = classCounts(y, classCount);
    const present = Array.from(counts.keys()).filter((c) => counts[c] > 0);
    const C = present.length;
    const p = X.cols;
    if (C === 1) return { classCount, present, weights: [new Array(p + 1).fill(0)], iterations: 0 };
    const local = new Int32Array(classCount).fill(-1);
    present.forEach((c, i) => {
      local[c] = i;
    });
    const yl = Int32Array.from(y, (c) => local[c]);
    const blocks = C === 2 ? 1 : C;
    if (p >= X.rows && l2 > 0) {
      // Wide: fit in the span of the training rows.
      const basis = rowBasis(X);
      const F = project(X, basis);
      const inner = newton(F, yl, C, l2, tolerance, maxIterations);
      const weights = inner.weights.map((u) => {
        const w = new Array<number>(p + 1).fill(0);
        for (let k = 0; k < basis.rank; k++) {
          const uk = u[k];
          const o = k * p;
          for (let j = 0; j < p; j++) w[j] += uk * basis.q[o + j];
        }
        w[p] = u[basis.rank];
        return w;
      });
      return { classCount, present, weights, iterations: inner.iterations };
    }
    const solver = options.solver as 'auto' | 'newton' | 'newton-cg' | undefined;
    if (C === 2 && (solver === 'newton-cg' || (solver !== 'newton' && p > CG_FROM)))
      return { classCount, present, ...newtonCg(X, yl, l2, tolerance, maxIterations) };
    const dim = blocks * (p + 1) - (C === 2 ? 0 : 1);
    if (dim > MAX_PARAMETERS)
      throw new FitError(
        'logistic-too-wide',
        `logistic would fit ${dim} parameters by Newton's method on ${X.rows} rows; at most ${MAX_PARAMETERS} are supported when ` +
          `there are more rows than features (newton-cg, for two classes, has no such limit)`,
        'add a select step before the model',
      );
    return { classCount, present, ...newton(X, yl, C, l2, tolerance, maxIterations) };
  },

  predict(m, X) {
    const out = new Float64Array(X.rows * m.classCount);
    const C = m.present.length;
    const scores = new Float64Array(C);
    const w = m.weights.map((v) => Float64Array.from(v));
    const p = X.cols;
    for (let r = 0; r < X.rows; r++) {
      const o = r * m.classCount;
      if (C === 1) {
        out[o + m.present[0]] = 1;
        continue;
      }
      if (C === 2) {
        const z = linear(X.data, r * p, p, w[0]);
        const q = 1 / (1 + Math.exp(-z));
        out[o + m.present[1]] = q;
        out[o + m.present[0]] = 1 - q;
        continue;
      }
      softmaxInto(X.data, r * p, p, w, scores);
      for (let c = 0; c < C; c++) out[o + m.present[c]] = scores[c];
    }
    return out;
  },
};

function linear(data: Float64Array, base: number, p: number, w: Float64Array): number {
  let z = w[p];
  for (let j = 0; j < p; j++) z += data[base + j] * w[j];
  return z;
}

function softmaxInto(data: Float64Array, base: number, p: number, w: Float64Array[], out: Float64Array): void {
  let max = -Infinity;
  for (let c = 0; c < w.length; c++) {
    out[c] = linear(data, base, p, w[c]);
    if (out[c] > max) max = out[c];
  }
  let s = 0;
  for (let c = 0; c < w.length; c++) {
    out[c] = Math.exp(out[c] - max);
    s += out[c];
  }
  for (let c = 0; c < w.length; c++) out[c] /= s;
}

/** Newton's method on the full parameter layout; weights[b] = p weights then the intercept. */
function newton(
  X: Matrix,
  yl: Int32Array,
  C: number,
  l2: number,
  tolerance: number,
  maxIterations: number,
): { weights: number[][]; iterations: number } {
  const p = X.cols;
  const width = p + 1;
  const blocks = C === 2 ? 1 : C;
  const dim = blocks * width - (C === 2 ? 0 : 1);
  const theta = new Float64Array(blocks * width);
  const columns = C === 2 ? columnMajor(X) : undefined;
  if (C === 2) {
    // Start from the intercept-only optimum's neighbourhood: the log-odds of the classes.
    let ones = 0;
    for (let i = 0; i < yl.length; i++) ones += yl[i];
    theta[p] = Math.log(ones / (yl.length - ones));
  }
  const evaluate = (t: Float64Array, derivatives: boolean) =>
    columns ? binaryLossGradHess(X, columns, yl, t, l2, derivatives) : lossGradHess(X, yl, C, t, l2, derivatives);
  let iterations = 0;
  let polished = false;
  for (;;) {
    const { loss, grad, hess } = evaluate(theta, true);
    const g = pack(grad, blocks, width, C);
    const h = packHessian(hess!, blocks, width, C, dim);
    // A tiny ridge keeps the step defined when l2 = 0 and the Hessian is near singular.
    let step = choleskySolve(h, g, dim);
    for (let ridge = 1e-10; step === null && ridge < 1e6; ridge *= 100) {
      for (let i = 0; i < dim; i++) h[i * dim + i] += ridge;
      step = choleskySolve(h, g, dim);
    }
    /* c8 ignore next -- the ridge loop above makes the matrix positive definite */
    if (step === null) throw new FitError('logistic-singular', 'logistic: the Newton system is singular');
    let decrement = 0;
    for (let i = 0; i < dim; i++) decrement += g[i] * step[i];
    checkFinite(loss, decrement);
    if (decrement / 2 <= tolerance * (1 + loss)) polished = true;
    if (iterations >= maxIterations) throw noConvergence(maxIterations, decrement, loss, tolerance, l2);
    const candidate = lineSearch(
      theta.length,
      polished,
      loss,
      decrement,
      (t, out) => unpack(theta, step, -t, out, blocks, width, C),
      (c) => evaluate(c, false).loss,
    );
    // No step lowers the loss any more: we are at the floating-point floor of the optimum.
    if (!candidate) break;
    theta.set(candidate);
    iterations++;
    // The rule was met and one more full step taken: stop (convergence is quadratic, so that step lands at the floor).
    if (polished) break;
  }
  const weights: number[][] = [];
  for (let b = 0; b < blocks; b++) weights.push(Array.from(theta.subarray(b * width, (b + 1) * width)));
  return { weights, iterations };
}

/** X's columns one after another, then a column of ones (the intercept's). */
function columnMajor(X: Matrix): Float64Array {
  const { rows, cols, data } = X;
  const out = new Float64Array(rows * (cols + 1));
  for (let r = 0; r < rows; r++) for (let j = 0; j < cols; j++) out[j * rows + r] = data[r * cols + j];
  out.fill(1, cols * rows);
  return out;
}

/**
 * Two classes: loss, gradient and Hessian XᵀVX with X's columns contiguous, so each Hessian
 * entry is one weighted dot product of two columns (the cost that matters on tall data).
 */
function binaryLossGradHess(X: Matrix, columns: Float64Array, y: Int32Array, theta: Float64Array, l2: number, withDerivatives: boolean) {
  const n = X.rows;
  const p = X.cols;
  const width = p + 1;
  const r = withDerivatives ? new Float64Array(n) : undefined;
  const v = withDerivatives ? new Float64Array(n) : undefined;
  const loss = binaryLoss(columns, y, theta, l2, n, p, new Float64Array(n), r, v);
  if (!withDerivatives) return { loss, grad: new Float64Array(0), hess: undefined };
  const grad = binaryGradient(columns, r!, theta, l2, n, p);
  const hess = new Float64Array(width * width);
  // XᵀVX in blocks of rows, so the block's columns stay in cache while every pair is summed; four
  // columns at a time share each load of v·x_a. The intercept is the last column, all ones.
  const BLOCK = 1024;
  const vx = new Float64Array(BLOCK);
  for (let i0 = 0; i0 < n; i0 += BLOCK) {
    const len = Math.min(BLOCK, n - i0);
    for (let a = 0; a <= p; a++) {
      const oa = a * n + i0;
      for (let i = 0; i < len; i++) vx[i] = v![i0 + i] * columns[oa + i];
      const row = a * width;
      let b = 0;
      for (; b + 3 <= a; b += 4) {
        const o0 = b * n + i0;
        const o1 = o0 + n;
        const o2 = o1 + n;
        const o3 = o2 + n;
        let s0 = 0;
        let s1 = 0;
        let s2 = 0;
        let s3 = 0;
        for (let i = 0; i < len; i++) {
          const x = vx[i];
          s0 += x * columns[o0 + i];
          s1 += x * columns[o1 + i];
          s2 += x * columns[o2 + i];
          s3 += x * columns[o3 + i];
        }
        hess[row + b] += s0;
        hess[row + b + 1] += s1;
        hess[row + b + 2] += s2;
        hess[row + b + 3] += s3;
      }
      for (; b <= a; b++) {
        const ob = b * n + i0;
        let s0 = 0;
        for (let i = 0; i < len; i++) s0 += vx[i] * columns[ob + i];
        hess[row + b] += s0;
      }
    }
  }
  for (let a = 0; a <= p; a++) for (let b = 0; b < a; b++) hess[b * width + a] = hess[a * width + b];
  for (let a = 0; a < p; a++) hess[a * width + a] += l2;
  return { loss, grad, hess };
}

/** An orthonormal basis (rank × p, row-major) of the span of X's rows: modified Gram–Schmidt, each vector orthogonalized twice. */
function rowBasis(X: Matrix): { q: Float64Array; rank: number } {
  const { rows, cols, data } = X;
  const q = new Float64Array(rows * cols);
  let rank = 0;
  const v = new Float64Array(cols);
  for (let r = 0; r < rows; r++) {
    let norm0 = 0;
    for (let j = 0; j < cols; j++) {
      v[j] = data[r * cols + j];
      norm0 += v[j] * v[j];
    }
    if (norm0 === 0) continue;
    for (let pass = 0; pass < 2; pass++) {
      for (let k = 0; k < rank; k++) {
        const o = k * cols;
        let d = 0;
        for (let j = 0; j < cols; j++) d += q[o + j] * v[j];
        for (let j = 0; j < cols; j++) v[j] -= d * q[o + j];
      }
    }
    let norm = 0;
    for (let j = 0; j < cols; j++) norm += v[j] * v[j];
    // A row (numerically) in the span of earlier rows adds no direction.
    if (norm <= 1e-20 * norm0) continue;
    const inv = 1 / Math.sqrt(norm);
    const o = rank * cols;
    for (let j = 0; j < cols; j++) q[o + j] = v[j] * inv;
    rank++;
  }
  return { q: q.subarray(0, rank * cols), rank };
}

/** X Qᵀ: the rows' coordinates in the basis. */
function project(X: Matrix, basis: { q: Float64Array; rank: number }): Matrix {
  const { rows, cols, data } = X;
  const out = new Float64Array(rows * basis.rank);
  for (let r = 0; r < rows; r++) {
    for (let k = 0; k < basis.rank; k++) {
      let s = 0;
      const o = k * cols;
      for (let j = 0; j < cols; j++) s += data[r * cols + j] * basis.q[o + j];
      out[r * basis.rank + k] = s;
    }
  }
  return { rows, cols: basis.rank, data: out };
}

/** Loss, gradient and (optionally) Hessian over the full parameter layout blocks × (p + 1). */
function lossGradHess(
  X: { rows: number; cols: number; data: Float64Array },
  y: Int32Array,
  C: number,
  theta: Float64Array,
  l2: number,
  withDerivatives: boolean,
) {
  const p = X.cols;
  const width = p + 1;
  const blocks = C === 2 ? 1 : C;
  const dimFull = blocks * width;
  const w = Array.from({ length: blocks }, (_, b) => theta.subarray(b * width, (b + 1) * width));
  const grad = new Float64Array(dimFull);
  const hess = withDerivatives ? new Float64Array(dimFull * dimFull) : undefined;
  let loss = 0;
  const prob = new Float64Array(blocks);
  const x = new Float64Array(width);
  for (let i = 0; i < X.rows; i++) {
    for (let j = 0; j < p; j++) x[j] = X.data[i * p + j];
    x[p] = 1;
    if (C === 2) {
      const z = linear(X.data, i * p, p, w[0]);
      const t = y[i] === 1 ? 1 : 0;
      // log(1 + e^z) − t·z, computed stably
      loss += (z > 0 ? z + Math.log1p(Math.exp(-z)) : Math.log1p(Math.exp(z))) - t * z;
      prob[0] = 1 / (1 + Math.exp(-z));
      if (withDerivatives) {
        const d = prob[0] - t;
        const v = prob[0] * (1 - prob[0]);
        for (let a = 0; a < width; a++) {
          grad[a] += d * x[a];
          const row = a * dimFull;
          for (let b = 0; b <= a; b++) hess![row + b] += v * x[a] * x[b];
        }
      }
    } else {
      softmaxInto(X.data, i * p, p, w as Float64Array[], prob);
      loss -= Math.log(Math.max(prob[y[i]], Number.MIN_VALUE));
      if (withDerivatives) {
        for (let c = 0; c < C; c++) {
          const d = prob[c] - (y[i] === c ? 1 : 0);
          for (let a = 0; a < width; a++) grad[c * width + a] += d * x[a];
          for (let e = 0; e <= c; e++) {
            const v = prob[c] * ((c === e ? 1 : 0) - prob[e]);
            for (let a = 0; a < width; a++) {
              const row = (c * width + a) * dimFull + e * width;
              for (let b = 0; b < width; b++) if (c * width + a >= e * width + b) hess![row + b] += v * x[a] * x[b];
            }
          }
        }
      }
    }
  }
  for (let b = 0; b < blocks; b++) {
    for (let j = 0; j < p; j++) {
      const k = b * width + j;
      loss += 0.5 * l2 * theta[k] * theta[k];
      if (withDerivatives) {
        grad[k] += l2 * theta[k];
        hess![k * dimFull + k] += l2;
      }
    }
  }
  if (hess) for (let a = 0; a < dimFull; a++) for (let b = a + 1; b < dimFull; b++) hess[a * dimFull + b] = hess[b * dimFull + a];
  return { loss, grad, hess };
}

/** Drops the last intercept (fixed at 0) from the full layout when C > 2. */
function pack(full: Float64Array, blocks: number, width: number, C: number): Float64Array {
  return C === 2 ? full : full.subarray(0, blocks * width - 1);
}

function packHessian(full: Float64Array, blocks: number, width: number, C: number, dim: number): Float64Array {
  const dimFull = blocks * width;
  if (C === 2) return full;
  const out = new Float64Array(dim * dim);
  for (let a = 0; a < dim; a++) out.set(full.subarray(a * dimFull, a * dimFull + dim), a * dim);
  return out;
}

function unpack(theta: Float64Array, step: Float64Array, scale: number, out: Float64Array, blocks: number, width: number, C: number): void {
  out.set(theta);
  const dim = C === 2 ? blocks * width : blocks * width - 1;
  for (let i = 0; i < dim; i++) out[i] += scale * step[i];
}

/**
 * Two classes, Newton's method with the step solved by preconditioned conjugate gradients on
 * Hessian-vector products Hv = Xᵀ(V·(Xv)) + l2·v (truncated Newton; Nocedal & Wright 2006, §7.1),
 * never the p × p Hessian. The inner solve stops at ‖r‖ ≤ η‖g‖ with η = min(0.5, √(‖g‖/‖g₀‖)) (a
 * forcing sequence that gives superlinear convergence), and at η = 1e-8 for the final polishing
 * step once the outer rule is met. Stopping rule and floor as in `newton`, with λ² = gᵀd for the
 * CG solution d. The passes over X's rows (scores, gradient sums, products) are `rowPasses`:
 * a WebAssembly kernel, or plain loops with the same bits.
 */
function newtonCg(
  X: Matrix,
  yl: Int32Array,
  l2: number,
  tolerance: number,
  maxIterations: number,
): { weights: number[][]; iterations: number } {
  const n = X.rows;
  const p = X.cols;
  const width = p + 1;
  const theta = new Float64Array(width);
  let ones = 0;
  for (let i = 0; i < n; i++) ones += yl[i];
  theta[p] = Math.log(ones / (n - ones));
  const rows = rowPasses(X);
  const { grad, diag } = rows;
  const hessianTimes = (d: Float64Array, out: Float64Array) => {
    rows.d.set(d);
    rows.hessian();
    out.set(rows.out);
    for (let j = 0; j < p; j++) out[j] += l2 * d[j];
  };
  /** The penalized loss at t; with `derivatives`, also its gradient, the rows' weights and the Hessian's diagonal. */
  const lossAt = (t: Float64Array, derivatives: boolean) => {
    rows.theta.set(t);
    rows.scores();
    const { z, r, w } = rows;
    let loss = 0;
    for (let i = 0; i < n; i++) {
      const zi = z[i];
      const y = yl[i] === 1 ? 1 : 0;
      // log(1 + e^z) − y·z, computed stably
      loss += (zi > 0 ? zi + Math.log1p(Math.exp(-zi)) : Math.log1p(Math.exp(zi))) - y * zi;
      if (!derivatives) continue;
      const q = 1 / (1 + Math.exp(-zi));
      r[i] = q - y;
      w[i] = q * (1 - q);
    }
    for (let j = 0; j < p; j++) loss += 0.5 * l2 * t[j] * t[j];
    if (derivatives) {
      rows.gradient();
      // The penalty's terms; a tiny floor keeps the diagonal (the Jacobi preconditioner) invertible when l2 = 0.
      for (let j = 0; j < p; j++) {
        grad[j] += l2 * t[j];
        diag[j] += l2 + 1e-12;
      }
      diag[p] += 1e-12;
    }
    return loss;
  };
  let iterations = 0;
  let polished = false;
  let first: number | undefined;
  try {
    for (;;) {
      const loss = lossAt(theta, true);
      // The gradient and the diagonal stay as they are until the next lossAt with derivatives.
      const g = grad;
      const m = diag;
      let gnorm = 0;
      for (let j = 0; j <= p; j++) gnorm += g[j] * g[j];
      gnorm = Math.sqrt(gnorm);
      first ??= gnorm;
      const eta = Math.min(0.5, Math.sqrt(gnorm / first));
      const inner = Math.max(2 * width, 50);
      let step = conjugateGradients(hessianTimes, g, m, eta * gnorm, inner);
      let decrement = 0;
      for (let j = 0; j <= p; j++) decrement += g[j] * step[j];
      checkFinite(loss, decrement);
      if (decrement / 2 <= tolerance * (1 + loss)) {
        polished = true;
        // The polishing step is solved tighter (its error is then far below the optimum's own rounding).
        step = conjugateGradients(hessianTimes, g, m, POLISH * gnorm, inner);
        decrement = 0;
        for (let j = 0; j <= p; j++) decrement += g[j] * step[j];
      }
      if (iterations >= maxIterations) throw noConvergence(maxIterations, decrement, loss, tolerance, l2);
      const candidate = lineSearch(
        width,
        polished,
        loss,
        decrement,
        (t, out) => {
          for (let k = 0; k <= p; k++) out[k] = theta[k] - t * step[k];
        },
        (c) => lossAt(c, false),
      );
      if (!candidate) break;
      theta.set(candidate);
      iterations++;
      // The rule was met and one more full step taken: stop.
      if (polished) break;
    }
  } finally {
    rows.release();
  }
  return { weights: [Array.from(theta)], iterations };
}

/** Relative residual of the polishing step's inner solve. */
const POLISH = 1e-8;

/** Preconditioned conjugate gradients for H d = g (H symmetric positive definite, given as a product). */
function conjugateGradients(
  times: (d: Float64Array, out: Float64Array) => void,
  g: Float64Array,
  diag: Float64Array,
  tolerance: number,
  maxSteps: number,
): Float64Array {
  const m = g.length;
  const d = new Float64Array(m);
  const res = Float64Array.from(g);
  const zr = new Float64Array(m);
  for (let j = 0; j < m; j++) zr[j] = res[j] / diag[j];
  const dir = Float64Array.from(zr);
  const hd = new Float64Array(m);
  let rz = 0;
  for (let j = 0; j < m; j++) rz += res[j] * zr[j];
  for (let k = 0; k < maxSteps; k++) {
    let rnorm = 0;
    for (let j = 0; j < m; j++) rnorm += res[j] * res[j];
    if (Math.sqrt(rnorm) <= tolerance) break;
    times(dir, hd);
    let dhd = 0;
    for (let j = 0; j < m; j++) dhd += dir[j] * hd[j];
    /* c8 ignore next -- H is positive definite; a non-positive curvature means rounding has taken over */
    if (!(dhd > 0)) break;
    const alpha = rz / dhd;
    for (let j = 0; j < m; j++) {
      d[j] += alpha * dir[j];
      res[j] -= alpha * hd[j];
      zr[j] = res[j] / diag[j];
    }
    let next = 0;
    for (let j = 0; j < m; j++) next += res[j] * zr[j];
    const beta = next / rz;
    rz = next;
    for (let j = 0; j < m; j++) dir[j] = zr[j] + beta * dir[j];
  }
  return d;
}

function checkFinite(loss: number, decrement: number): void {
  if (!Number.isFinite(loss) || !Number.isFinite(decrement))
    throw new FitError(
      'logistic-non-finite',
      'logistic: the loss or its gradient is not finite (feature values too large for the model to compute with)',
      'rescale the features (standardize, or log2p)',
    );
}

function noConvergence(maxIterations: number, decrement: number, loss: number, tolerance: number, l2: number): FitError {
  return new FitError(
    'logistic-no-convergence',
    `logistic did not converge in ${maxIterations} Newton steps (the next step would still lower the objective by ` +
      `${(decrement / 2).toExponential(3)}, more than tolerance × (1 + objective) = ${(tolerance * (1 + loss)).toExponential(3)})`,
    l2 === 0 ? 'the classes may be separable; set model.options.l2 above 0' : 'raise model.options.max-iterations or tolerance',
  );
}

/**
 * The point to move to: once polishing, the full step as is (the loss change is then below
 * rounding, so a line search could not tell a good step from a bad one); otherwise the first of
 * t = 1, ½, ¼, … whose loss falls by at least 1e-4·t·λ² (Armijo). Null when none does: the
 * floating-point floor of the optimum.
 */
function lineSearch(
  size: number,
  polished: boolean,
  loss: number,
  decrement: number,
  move: (t: number, out: Float64Array) => void,
  lossAt: (candidate: Float64Array) => number,
): Float64Array | null {
  const candidate = new Float64Array(size);
  if (polished) {
    move(1, candidate);
    return candidate;
  }
  for (let t = 1, tries = 0; tries < 60; tries++, t /= 2) {
    move(t, candidate);
    if (lossAt(candidate) <= loss - 1e-4 * t * decrement) return candidate;
  }
  return null;
}

/**
 * Two classes: the scores z = Xθ (columns contiguous, the intercept last), the penalized loss
 * Σ log(1 + e^z) − t·z + l2/2·‖w‖², and, when r and v are given, the residuals q − t and the
 * weights q(1 − q) of every row.
 */
function binaryLoss(
  columns: Float64Array,
  y: Int32Array,
  theta: Float64Array,
  l2: number,
  n: number,
  p: number,
  z: Float64Array,
  r?: Float64Array,
  v?: Float64Array,
): number {
  z.fill(theta[p]);
  for (let j = 0; j < p; j++) {
    const w = theta[j];
    if (w === 0) continue;
    const o = j * n;
    for (let i = 0; i < n; i++) z[i] += w * columns[o + i];
  }
  let loss = 0;
  for (let i = 0; i < n; i++) {
    const zi = z[i];
    const t = y[i] === 1 ? 1 : 0;
    // log(1 + e^z) − t·z, computed stably
    loss += (zi > 0 ? zi + Math.log1p(Math.exp(-zi)) : Math.log1p(Math.exp(zi))) - t * zi;
    if (r) {
      const q = 1 / (1 + Math.exp(-zi));
      r[i] = q - t;
      v![i] = q * (1 - q);
    }
  }
  for (let j = 0; j < p; j++) loss += 0.5 * l2 * theta[j] * theta[j];
  return loss;
}

/** Two classes: the gradient Xᵀr + l2·w (the intercept unpenalized; its column is all ones). */
function binaryGradient(columns: Float64Array, r: Float64Array, theta: Float64Array, l2: number, n: number, p: number): Float64Array {
  const grad = new Float64Array(p + 1);
  for (let j = 0; j <= p; j++) {
    const o = j * n;
    let s = 0;
    for (let i = 0; i < n; i++) s += r[i] * columns[o + i];
    grad[j] = s + (j < p ? l2 * theta[j] : 0);
  }
  return grad;
}
