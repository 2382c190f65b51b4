/**
 * The passes over the training rows that logistic's newton-cg solver makes, on fixed vectors:
 * the scores z = Xθ, the gradient's and the Hessian diagonal's sums from per-row residuals r and
 * weights w, and the Hessian-vector product Xᵀ(w ∘ Xd). Two implementations give the same
 * bits: the WebAssembly kernel (kernels/logistic-passes.wat; X copied into its memory once per
 * fit), and the plain loops below, taken without WebAssembly (node --jitless), when the rows do
 * not fit the kernel's memory, or on request. The order of every sum is written down in the
 * kernel's text. Pure apart from the thread's kernel instance.
 */
import { wasmBase64 } from './kernels/logistic-passes.wasm.js';
import { instantiate, type Kernel, reserve } from './kernels/instance.js';
import type { Matrix } from '../table/matrix.js';

export interface RowPasses {
  /** Inputs and outputs: length n (z, r, w) or p + 1 (the rest; the intercept's entry last). */
  readonly z: Float64Array;
  readonly r: Float64Array;
  readonly w: Float64Array;
  readonly theta: Float64Array;
  readonly d: Float64Array;
  readonly out: Float64Array;
  readonly grad: Float64Array;
  readonly diag: Float64Array;
  /** z_i = x_i·θ + θ_p. */
  scores(): void;
  /** grad = Σ r_i (x_i, 1), diag = Σ w_i (x_i², 1). */
  gradient(): void;
  /** out = Σ w_i (x_i·d + d_p)(x_i, 1). */
  hessian(): void;
  /** Lets go of the kernel's memory when this fit grew it past what a thread keeps. */
  release(): void;
}

/** Rows whose copy would exceed this many bytes of the kernel's memory are passed over in plain JavaScript. */
export const WASM_LIMIT = 1 << 30;
/** Memory a thread's instance keeps between fits; a larger fit's instance is dropped after it. */
const KEEP = 256 << 20;

interface PassKernel extends Kernel {
  scores: (x: number, n: number, p: number, theta: number, z: number) => void;
  gradient: (x: number, n: number, p: number, r: number, w: number, grad: number, diag: number) => void;
  hessian: (x: number, n: number, p: number, v: number, d: number, out: number) => void;
}
/** This thread's instance; null where WebAssembly is not available. */
let kernel: PassKernel | null | undefined;

export function rowPasses(X: Matrix, plain = false): RowPasses {
  return (!plain && wasmPasses(X)) || plainPasses(X);
}

function wasmPasses(X: Matrix): RowPasses | null {
  const n = X.rows;
  const p = X.cols;
  const total = 8 * (n * p + 3 * n + 5 * (p + 1));
  if (total > WASM_LIMIT) return null;
  if (kernel === undefined) kernel = instantiate<PassKernel>(wasmBase64);
  if (kernel === null) return null;
  const k = kernel;
  /* c8 ignore next -- the system refused the memory: the plain loops need none of it */
  if (!reserve(k.memory, total)) return null;
  const buffer = k.memory.buffer;
  let at = 0;
  const take = (length: number) => {
    const view = new Float64Array(buffer, at, length);
    at += 8 * length;
    return view;
  };
  take(n * p).set(X.data);
  const [z, r, w] = [take(n), take(n), take(n)];
  const [theta, d, out, grad, diag] = [take(p + 1), take(p + 1), take(p + 1), take(p + 1), take(p + 1)];
  return {
    z,
    r,
    w,
    theta,
    d,
    out,
    grad,
    diag,
    scores: () => k.scores(0, n, p, theta.byteOffset, z.byteOffset),
    gradient: () => k.gradient(0, n, p, r.byteOffset, w.byteOffset, grad.byteOffset, diag.byteOffset),
    hessian: () => k.hessian(0, n, p, w.byteOffset, d.byteOffset, out.byteOffset),
    release: () => {
      if (kernel === k && k.memory.buffer.byteLength > KEEP) kernel = undefined;
    },
  };
}

/** Σ_j data[b + j]·d[j] over one row: four partial sums (the columns past the last four in the first), added as (s0 + s1) + (s2 + s3). */
function rowDot(data: Float64Array, b: number, d: Float64Array, p: number): number {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let j = 0;
  for (; j + 4 <= p; j += 4) {
    s0 += data[b + j] * d[j];
    s1 += data[b + j + 1] * d[j + 1];
    s2 += data[b + j + 2] * d[j + 2];
    s3 += data[b + j + 3] * d[j + 3];
  }
  for (; j < p; j++) s0 += data[b + j] * d[j];
  return s0 + s1 + (s2 + s3);
}

function plainPasses(X: Matrix): RowPasses {
  const n = X.rows;
  const p = X.cols;
  const data = X.data;
  const [z, r, w] = [new Float64Array(n), new Float64Array(n), new Float64Array(n)];
  const vector = () => new Float64Array(p + 1);
  const [theta, d, out, grad, diag] = [vector(), vector(), vector(), vector(), vector()];
  return {
    z,
    r,
    w,
    theta,
    d,
    out,
    grad,
    diag,
    scores() {
      for (let i = 0; i < n; i++) z[i] = rowDot(data, i * p, theta, p) + theta[p];
    },
    gradient() {
      grad.fill(0);
      diag.fill(0);
      let i = 0;
      for (; i + 4 <= n; i += 4) {
        const b0 = i * p;
        const b1 = b0 + p;
        const b2 = b1 + p;
        const b3 = b2 + p;
        const [r0, r1, r2, r3] = [r[i], r[i + 1], r[i + 2], r[i + 3]];
        const [w0, w1, w2, w3] = [w[i], w[i + 1], w[i + 2], w[i + 3]];
        for (let j = 0; j < p; j++) {
          const x0 = data[b0 + j];
          const x1 = data[b1 + j];
          const x2 = data[b2 + j];
          const x3 = data[b3 + j];
          grad[j] += r0 * x0 + r1 * x1 + (r2 * x2 + r3 * x3);
          diag[j] += w0 * x0 * x0 + w1 * x1 * x1 + (w2 * x2 * x2 + w3 * x3 * x3);
        }
        for (let k = i; k < i + 4; k++) {
          grad[p] += r[k];
          diag[p] += w[k];
        }
      }
      const last = i;
      for (; i < n; i++) {
        const b = i * p;
        for (let j = 0; j < p; j++) {
          const x = data[b + j];
          grad[j] += r[i] * x;
          diag[j] += w[i] * x * x;
        }
      }
      for (let k = last; k < n; k++) {
        grad[p] += r[k];
        diag[p] += w[k];
      }
    },
    hessian() {
      out.fill(0);
      // Four rows at a time: their four dot products, then one sweep of `out` for all four.
      let i = 0;
      for (; i + 4 <= n; i += 4) {
        const b0 = i * p;
        const b1 = b0 + p;
        const b2 = b1 + p;
        const b3 = b2 + p;
        const w0 = w[i] * (rowDot(data, b0, d, p) + d[p]);
        const w1 = w[i + 1] * (rowDot(data, b1, d, p) + d[p]);
        const w2 = w[i + 2] * (rowDot(data, b2, d, p) + d[p]);
        const w3 = w[i + 3] * (rowDot(data, b3, d, p) + d[p]);
        for (let j = 0; j < p; j++) out[j] += w0 * data[b0 + j] + w1 * data[b1 + j] + (w2 * data[b2 + j] + w3 * data[b3 + j]);
        out[p] += w0 + w1 + (w2 + w3);
      }
      for (; i < n; i++) {
        const b = i * p;
        const wi = w[i] * (rowDot(data, b, d, p) + d[p]);
        for (let j = 0; j < p; j++) out[j] += wi * data[b + j];
        out[p] += wi;
      }
    },
    release() {},
  };
}
