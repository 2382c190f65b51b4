/**
 * One side of a paired comparison: what a run's results.json and predictions.csv say, as plain
 * data. Built the same way from a results folder and from a protocol run in memory. Pure.
 */
import { readDelimited, textColumn } from '../table/delimited.js';
import { parseNumberBytes } from '../table/number.js';

export interface FoldValues {
  repeat: number;
  fold: number;
  trainRows: number;
  testRows: number;
  metrics: Record<string, number | null>;
}

export interface ComparedSide {
  /** How the side was named on the command line. */
  source: string;
  name: string;
  protocolSha256: string;
  dataSha256: string;
  assignmentSha256: string;
  repeats: number;
  classes: string[];
  positive: string;
  metrics: string[];
  folds: FoldValues[];
  /** The out-of-fold predictions, one row per tested (id, repeat). */
  predictions: {
    ids: string[];
    repeat: Int32Array;
    truth: Int32Array;
    predicted: Int32Array;
    /** Probability of the positive class. */
    positive: Float64Array;
  };
}

/** `results` is results.json as parsed; `predictions` the bytes of predictions.csv (id,repeat,fold,truth,predicted,p_…). */
export function sideFromResults(source: string, results: any, predictions: Uint8Array): ComparedSide {
  const classes: string[] = results.classes;
  const code = new Map(classes.map((c, i) => [c, i]));
  const t = readDelimited(predictions, 0x2c, 'predictions.csv').table!;
  const num = (r: number, c: number) => parseNumberBytes(t.bytes, t.starts[r * t.cols + c], t.ends[r * t.cols + c]);
  const positiveColumn = 5 + classes.indexOf(results.positive);
  const truth = textColumn(t, 3);
  const predicted = textColumn(t, 4);
  return {
    source,
    name: results.protocol.name,
    protocolSha256: results.protocol.sha256,
    dataSha256: results.data.sha256,
    assignmentSha256: results.split['assignment-sha256'],
    repeats: results.split.repeats,
    classes,
    positive: results.positive,
    metrics: results.metrics,
    folds: results.folds.map((f: any) => ({
      repeat: f.repeat,
      fold: f.fold,
      trainRows: f['train-rows'],
      testRows: f['test-rows'],
      metrics: f.metrics,
    })),
    predictions: {
      ids: textColumn(t, 0),
      repeat: Int32Array.from({ length: t.rows }, (_, r) => num(r, 1)),
      truth: Int32Array.from(truth, (c) => code.get(c) ?? -1),
      predicted: Int32Array.from(predicted, (c) => code.get(c) ?? -1),
      positive: Float64Array.from({ length: t.rows }, (_, r) => num(r, positiveColumn)),
    },
  };
}
