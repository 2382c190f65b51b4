/**
 * Metrics of the predicted class. precision, recall and f1 use the positive class with two
 * classes and the macro average (over classes seen in truth or predictions) with more;
 * a 0/0 ratio counts as 0 (common practice). mcc is the multiclass form of Gorodkin (2004).
 */
import { confusion } from './confusion.js';
import { metric, type Scored } from './types.js';

const ratio = (a: number, b: number) => (b === 0 ? 0 : a / b);

function margins(s: Scored) {
  const k = s.classCount;
  const m = confusion(s);
  const truth = new Float64Array(k);
  const pred = new Float64Array(k);
  let diag = 0;
  for (let r = 0; r < k; r++)
    for (let c = 0; c < k; c++) {
      truth[r] += m[r * k + c];
      pred[c] += m[r * k + c];
      if (r === c) diag += m[r * k + c];
    }
  return { k, m, truth, pred, diag, n: s.truth.length };
}

function perClass(s: Scored, f: (tp: number, fp: number, fn: number) => number): number {
  const { k, m, truth, pred } = margins(s);
  if (k === 2) {
    const c = s.positive;
    return f(m[c * k + c], pred[c] - m[c * k + c], truth[c] - m[c * k + c]);
  }
  let total = 0;
  let used = 0;
  for (let c = 0; c < k; c++) {
    if (truth[c] === 0 && pred[c] === 0) continue;
    total += f(m[c * k + c], pred[c] - m[c * k + c], truth[c] - m[c * k + c]);
    used++;
  }
  return total / used;
}

export const accuracy = metric(
  'accuracy',
  'higher',
  'share of rows whose most probable class is the true one.',
  (s) => margins(s).diag / s.truth.length,
);

export const balancedAccuracy = metric(
  'balanced accuracy',
  'higher',
  'mean over the classes present of the share of that class predicted correctly (recall per class).',
  (s) => {
    const { k, m, truth } = margins(s);
    let total = 0;
    let used = 0;
    for (let c = 0; c < k; c++)
      if (truth[c] > 0) {
        total += m[c * k + c] / truth[c];
        used++;
      }
    return total / used;
  },
);

export const precision = metric(
  'precision',
  'higher',
  'TP / (TP + FP) of the positive class with two classes, the macro average with more.',
  (s) => perClass(s, (tp, fp) => ratio(tp, tp + fp)),
);
export const recall = metric(
  'recall',
  'higher',
  'TP / (TP + FN) of the positive class with two classes (sensitivity), the macro average with more.',
  (s) => perClass(s, (tp, _fp, fn) => ratio(tp, tp + fn)),
);
export const f1 = metric(
  'F1 score',
  'higher',
  'harmonic mean of precision and recall, 2TP / (2TP + FP + FN); macro average with more than two classes.',
  (s) => perClass(s, (tp, fp, fn) => ratio(2 * tp, 2 * tp + fp + fn)),
);

export const mcc = metric(
  'Matthews correlation coefficient',
  'higher',
  "Matthews correlation coefficient (Gorodkin's multiclass form); 0 when a margin is constant.",
  (s) => {
    const { k, truth, pred, diag, n } = margins(s);
    let tp = 0;
    let tt = 0;
    let pp = 0;
    for (let c = 0; c < k; c++) {
      tp += truth[c] * pred[c];
      tt += truth[c] * truth[c];
      pp += pred[c] * pred[c];
    }
    const denominator = Math.sqrt((n * n - pp) * (n * n - tt));
    return denominator === 0 ? 0 : (diag * n - tp) / denominator;
  },
);

export const kappa = metric("Cohen's kappa", 'higher', "Cohen's kappa: agreement of predicted and true classes beyond chance.", (s) => {
  const { k, truth, pred, diag, n } = margins(s);
  let expected = 0;
  for (let c = 0; c < k; c++) expected += (truth[c] / n) * (pred[c] / n);
  return expected === 1 ? null : (diag / n - expected) / (1 - expected);
});
