/**
 * L2-regularized logistic regression. Objective: Σ_i −log p(y_i | x_i) + (l2 / 2)·‖W‖², the
 * intercepts unpenalized. Two classes: one weight vector (sigmoid); more: one per class
 * (softmax), the last intercept fixed at 0 (it is not identifiable). Solver: Newton's method
 * with backtracking line search, deterministic, stopped when the largest absolute component of the
 * gradient of the mean loss (objective / rows) is below `tolerance` (default 1e-10) — then one more
 * step is taken — or when no step lowers the objective any further (the floating-point floor).
 */
import { choleskySolve } from './linalg.js';
import { FitError, classCounts, type ModelImpl } from './types.js';

export interface LogisticParams {
  classCount: number;
  /** Classes present in training, in code order; the model spans only these. */
  present: number[];
  /** weights[c] has cols weights then the intercept, for each present class c. */
  weights: number[][];
  iterations: number;
}

const MAX_PARAMETERS = 1200;

export const logistic: ModelImpl<LogisticParams> = {
  fit(X, y, options, { classCount }) {
    const l2 = (options.l2 as number | undefined) ?? 1;
    const tolerance = (options.tolerance as number | undefined) ?? 1e-10;
    const maxIterations = (options['max-iterations'] as number | undefined) ?? 200;
    const counts = classCounts(y, classCount);
    const present = Array.from(counts.keys()).filter((c) => counts[c] > 0);
    const C = present.length;
    const p = X.cols;
    const width = p + 1;
    if (C === 1) return { classCount, present, weights: [new Array(width).fill(0)], iterations: 0 };
    const blocks = C === 2 ? 1 : C; // weight vectors
    const dim = blocks * width - (C === 2 ? 0 : 1);
    if (dim > MAX_PARAMETERS) throw new FitError('logistic-too-wide', `logistic would fit ${dim} parameters; at most ${MAX_PARAMETERS} are supported`, 'add a select step before the model');
    const local = new Int32Array(classCount).fill(-1);
    present.forEach((c, i) => (local[c] = i));
    const yl = Int32Array.from(y, (c) => local[c]);
    const theta = new Float64Array(blocks * width);
    const objective = (t: Float64Array) => lossGradHess(X, yl, C, t, l2, false).loss;
    let iterations = 0;
    let polished = false;
    for (;;) {
      const { loss, grad, hess } = lossGradHess(X, yl, C, theta, l2, true);
      const g = pack(grad, blocks, width, C);
      let gmax = 0;
      for (let i = 0; i < g.length; i++) gmax = Math.max(gmax, Math.abs(g[i]));
      // The tolerance applies to the gradient of the mean loss, so it means the same for 100 rows as for 100,000.
      // Once within tolerance, one more Newton step: convergence is quadratic, so it costs one
      // iteration and lands at the floating-point floor instead of just inside the tolerance.
      if (gmax / X.rows < tolerance) { if (polished) break; polished = true; }
      if (iterations >= maxIterations) throw new FitError('logistic-no-convergence', `logistic did not reach gradient tolerance ${tolerance} in ${maxIterations} Newton steps (largest mean-loss gradient ${(gmax / X.rows).toExponential(3)})`, l2 === 0 ? 'the classes may be separable; set model.options.l2 above 0' : 'raise max-iterations or tolerance');
      const h = packHessian(hess!, blocks, width, C, dim);
      // A tiny ridge keeps the step defined when l2 = 0 and the Hessian is near singular.
      let step = choleskySolve(h, g, dim);
      for (let ridge = 1e-10; step === null && ridge < 1e6; ridge *= 100) {
        for (let i = 0; i < dim; i++) h[i * dim + i] += ridge;
        step = choleskySolve(h, g, dim);
      }
      /* c8 ignore next -- the ridge loop above makes the matrix positive definite */
      if (step === null) throw new FitError('logistic-singular', 'logistic: the Newton system is singular');
      let t = 1;
      const candidate = new Float64Array(theta.length);
      let slope = 0;
      for (let i = 0; i < dim; i++) slope += g[i] * step[i];
      let decreased = false;
      // Inside the tolerance the full Newton step is taken as is: the loss change is then below
      // rounding, so a line search could not tell a good step from a bad one.
      if (polished) { unpack(theta, step, -1, candidate, blocks, width, C); decreased = true; }
      for (let tries = 0; tries < 60 && !decreased; tries++) {
        unpack(theta, step, -t, candidate, blocks, width, C);
        if (objective(candidate) <= loss - 1e-4 * t * slope) { decreased = true; break; }
        t /= 2;
      }
      // No step lowers the loss any more: we are at the floating-point floor of the optimum.
      if (!decreased) break;
      theta.set(candidate);
      iterations++;
    }
    const weights: number[][] = [];
    for (let b = 0; b < blocks; b++) weights.push(Array.from(theta.subarray(b * width, (b + 1) * width)));
    return { classCount, present, weights, iterations };
  },

  predict(m, X) {
    const out = new Float64Array(X.rows * m.classCount);
    const C = m.present.length;
    const scores = new Float64Array(C);
    const w = m.weights.map((v) => Float64Array.from(v));
    const p = X.cols;
    for (let r = 0; r < X.rows; r++) {
      const o = r * m.classCount;
      if (C === 1) { out[o + m.present[0]] = 1; continue; }
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
  for (let c = 0; c < w.length; c++) { out[c] = linear(data, base, p, w[c]); if (out[c] > max) max = out[c]; }
  let s = 0;
  for (let c = 0; c < w.length; c++) { out[c] = Math.exp(out[c] - max); s += out[c]; }
  for (let c = 0; c < w.length; c++) out[c] /= s;
}

/** Loss, gradient and (optionally) Hessian over the full parameter layout blocks × (p + 1). */
function lossGradHess(X: { rows: number; cols: number; data: Float64Array }, y: Int32Array, C: number, theta: Float64Array, l2: number, withDerivatives: boolean) {
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
      if (withDerivatives) { grad[k] += l2 * theta[k]; hess![k * dimFull + k] += l2; }
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
