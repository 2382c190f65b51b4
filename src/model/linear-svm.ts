/**
 * Linear support vector machine with Platt-scaled probabilities.
 *
 * Margin: the L2-regularized squared hinge loss, Σ_i max(0, 1 − t_i·f(x_i))² + (l2/2)·‖w̃‖²,
 * with t_i = ±1 and f(x) = w·x + b; w̃ = (w, b): the intercept is penalized like the weights
 * (it is the weight of a constant feature 1). More than two classes: one machine per class
 * against the rest. Solved exactly by Newton's method on the generalized Hessian
 * l2·I + 2·Σ_active x̃x̃ᵀ (the loss is piecewise quadratic), stopping when a step changes no
 * active row and the decrement is at the floating-point floor.
 *
 * Probabilities (Platt 1999): on each machine's training decisions f_i, fit
 * p = 1 / (1 + exp(A·f + B)) by Newton's method on the cross-entropy against Platt's smoothed
 * targets (N₊ + 1)/(N₊ + 2) and 1/(N₋ + 2); more than two classes: the per-class p normalized to
 * sum 1.
 */
import type { Matrix } from '../table/matrix.js';
import { choleskySolve } from './linalg.js';
import { noChecks, classCounts, type ModelImpl } from './types.js';

export interface LinearSvmParams {
  classCount: number;
  /** Classes present in training, in code order. */
  present: number[];
  /** One machine for two classes (positive = the second present class), else one per present class: p weights then the intercept. */
  weights: number[][];
  /** Platt's [A, B] per machine. */
  platt: number[][];
}

export const linearSvm: ModelImpl<LinearSvmParams> = {
  description:
    'Linear support vector machine (squared hinge, L2, intercept penalized) with Platt-scaled probabilities; one machine per ' +
    'class against the rest.',
  methods: (o) => `a linear support vector machine (squared hinge loss, L2 penalty λ = ${o.l2}) with Platt-scaled probabilities`,
  options: {
    l2: {
      description: 'L2 penalty λ on the weights and the intercept; the objective is the summed squared hinge loss plus λ/2·‖(w, b)‖².',
      type: 'number',
      exclusiveMinimum: 0,
      default: 1,
    },
  },

  check: noChecks,
  fit(X, y, options, { classCount }) {
    const l2 = options.l2 as number;
    const counts = classCounts(y, classCount);
    const present = Array.from(counts.keys()).filter((c) => counts[c] > 0);
    if (present.length === 1) return { classCount, present, weights: [], platt: [] };
    const targets = present.length === 2 ? [present[1]] : present;
    const weights: number[][] = [];
    const platt: number[][] = [];
    for (const c of targets) {
      const t = Float64Array.from(y, (v) => (v === c ? 1 : -1));
      const w = squaredHinge(X, t, l2);
      weights.push(Array.from(w));
      platt.push(plattFit(decisions(X, w), t));
    }
    return { classCount, present, weights, platt };
  },

  predict(m, X) {
    const k = m.classCount;
    const out = new Float64Array(X.rows * k);
    if (m.present.length === 1) {
      for (let r = 0; r < X.rows; r++) out[r * k + m.present[0]] = 1;
      return out;
    }
    const probs = m.weights.map((w, i) => {
      const d = decisions(X, Float64Array.from(w));
      const [A, B] = m.platt[i];
      return d.map((f) => sigmoidOf(A * f + B));
    });
    for (let r = 0; r < X.rows; r++) {
      if (m.present.length === 2) {
        out[r * k + m.present[1]] = probs[0][r];
        out[r * k + m.present[0]] = 1 - probs[0][r];
        continue;
      }
      let s = 0;
      for (let i = 0; i < probs.length; i++) s += probs[i][r];
      for (let i = 0; i < probs.length; i++) out[r * k + m.present[i]] = probs[i][r] / s;
    }
    return out;
  },
};

/** 1 / (1 + e^z), computed without overflow. */
function sigmoidOf(z: number): number {
  return z >= 0 ? Math.exp(-z) / (1 + Math.exp(-z)) : 1 / (1 + Math.exp(z));
}

function decisions(X: Matrix, w: Float64Array): Float64Array {
  const { rows, cols, data } = X;
  const out = new Float64Array(rows);
  for (let r = 0; r < rows; r++) {
    let s = w[cols];
    for (let j = 0; j < cols; j++) s += w[j] * data[r * cols + j];
    out[r] = s;
  }
  return out;
}

function squaredHinge(X: Matrix, t: Float64Array, l2: number): Float64Array {
  const { rows, cols, data } = X;
  const d = cols + 1;
  const w = new Float64Array(d);
  const objective = (v: Float64Array) => {
    let f = 0;
    for (let j = 0; j < d; j++) f += 0.5 * l2 * v[j] * v[j];
    const z = decisions(X, v);
    for (let i = 0; i < rows; i++) {
      const m = 1 - t[i] * z[i];
      if (m > 0) f += m * m;
    }
    return f;
  };
  for (let iteration = 0; iteration < 500; iteration++) {
    const z = decisions(X, w);
    const g = new Float64Array(d);
    const h = new Float64Array(d * d);
    for (let j = 0; j < d; j++) {
      g[j] = l2 * w[j];
      h[j * d + j] = l2;
    }
    for (let i = 0; i < rows; i++) {
      const m = 1 - t[i] * z[i];
      if (m <= 0) continue;
      const o = i * cols;
      for (let a = 0; a < d; a++) {
        const xa = a < cols ? data[o + a] : 1;
        g[a] -= 2 * m * t[i] * xa;
        for (let b = 0; b <= a; b++) h[a * d + b] += 2 * xa * (b < cols ? data[o + b] : 1);
      }
    }
    for (let a = 0; a < d; a++) for (let b = 0; b < a; b++) h[b * d + a] = h[a * d + b];
    const step = choleskySolve(h, g, d);
    /* c8 ignore next -- l2 > 0 makes the generalized Hessian positive definite: reaching this is a bug */
    if (step === null) throw new Error('linear-svm: the Newton system is singular');
    let decrement = 0;
    for (let j = 0; j < d; j++) decrement += g[j] * step[j];
    const f0 = objective(w);
    if (decrement / 2 <= 1e-15 * (1 + f0)) break;
    // Backtracking on the piecewise quadratic objective; a full step is exact once the active set settles.
    let s = 1;
    const next = new Float64Array(d);
    for (let tries = 0; tries < 60; tries++, s /= 2) {
      for (let j = 0; j < d; j++) next[j] = w[j] - s * step[j];
      if (objective(next) <= f0 - 1e-4 * s * decrement) break;
    }
    if (objective(next) >= f0) break;
    w.set(next);
  }
  return w;
}

/** Platt's sigmoid on decisions f against labels t (±1), by Newton's method with backtracking (after Lin, Lin & Weng 2007). */
function plattFit(f: Float64Array, t: Float64Array): number[] {
  let positives = 0;
  for (const v of t) if (v > 0) positives++;
  const negatives = t.length - positives;
  const hi = (positives + 1) / (positives + 2);
  const lo = 1 / (negatives + 2);
  const target = Float64Array.from(t, (v) => (v > 0 ? hi : lo));
  const loss = (A: number, B: number) => {
    let s = 0;
    for (let i = 0; i < f.length; i++) {
      const z = A * f[i] + B;
      // −[τ log p + (1 − τ) log(1 − p)] with p = 1/(1 + e^z), stably.
      s += z >= 0 ? target[i] * z + Math.log1p(Math.exp(-z)) : (target[i] - 1) * z + Math.log1p(Math.exp(z));
    }
    return s;
  };
  let A = 0;
  let B = Math.log((negatives + 1) / (positives + 1));
  let value = loss(A, B);
  for (let iteration = 0; iteration < 100; iteration++) {
    let gA = 0;
    let gB = 0;
    let hAA = 1e-12;
    let hAB = 0;
    let hBB = 1e-12;
    for (let i = 0; i < f.length; i++) {
      const p = sigmoidOf(A * f[i] + B);
      const r = target[i] - p;
      const v = p * (1 - p);
      gA += f[i] * r;
      gB += r;
      hAA += f[i] * f[i] * v;
      hAB += f[i] * v;
      hBB += v;
    }
    if (Math.abs(gA) < 1e-12 && Math.abs(gB) < 1e-12) break;
    const det = hAA * hBB - hAB * hAB;
    const dA = -(hBB * gA - hAB * gB) / det;
    const dB = -(-hAB * gA + hAA * gB) / det;
    let s = 1;
    let moved = false;
    for (let tries = 0; tries < 60; tries++, s /= 2) {
      const next = loss(A + s * dA, B + s * dB);
      if (next < value + 1e-4 * s * (gA * dA + gB * dB)) {
        A += s * dA;
        B += s * dB;
        value = next;
        moved = true;
        break;
      }
    }
    if (!moved) break;
  }
  return [A, B];
}
