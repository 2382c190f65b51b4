/**
 * The report's plots as Vega-Lite specifications (plain data): ROC and precision–recall curves per
 * fold and pooled per repeat, and a reliability plot. foldseal's palette: ink, teal, amber, plum on
 * white, told apart by dash pattern too, so they survive greyscale printing and colour-blindness. Pure.
 */
import { curves, reliability, scoresFor, type CurvePoint } from './curves.js';
import type { OutOfFold } from './predictions.js';

export const PALETTE = { ink: '#1f2a30', teal: '#0f6e78', amber: '#b8730f', plum: '#6d4a8a', fold: '#9aa5ab', chance: '#6b767c' } as const;
const SERIES = [PALETTE.teal, PALETTE.amber, PALETTE.plum, PALETTE.ink];
const DASHES = [
  [1, 0],
  [6, 3],
  [2, 2],
  [8, 2, 2, 2],
];

export interface Plot {
  id: string;
  title: string;
  /** The plot in words, for screen readers and for readers of a printout without the figure. */
  alt: string;
  spec: Record<string, unknown>;
}

const CONFIG = {
  font: 'Helvetica, Arial, sans-serif',
  view: { stroke: PALETTE.fold },
  axis: { labelColor: PALETTE.ink, titleColor: PALETTE.ink, gridColor: '#e3e7e9', domainColor: PALETTE.chance, tickColor: PALETTE.chance },
  legend: { labelColor: PALETTE.ink, titleColor: PALETTE.ink, orient: 'bottom' },
  title: { color: PALETTE.ink, anchor: 'start', fontSize: 13 },
};

const axis = (title: string) => ({ type: 'quantitative', scale: { domain: [0, 1] }, title });

function curveSpec(
  title: string,
  description: string,
  x: string,
  y: string,
  folds: Record<string, unknown>[],
  pooled: Record<string, unknown>[],
  chance: Record<string, unknown>,
) {
  const repeats = [...new Set(pooled.map((p) => p.series as string))];
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title,
    description,
    width: 300,
    height: 300,
    config: CONFIG,
    layer: [
      chance,
      {
        data: { values: folds },
        mark: { type: 'line', strokeWidth: 0.8, opacity: 0.6, color: PALETTE.fold },
        encoding: { x: { field: 'x', ...axis(x) }, y: { field: 'y', ...axis(y) }, detail: { field: 'series' }, order: { field: 'i' } },
      },
      {
        data: { values: pooled },
        mark: { type: 'line', strokeWidth: 2 },
        encoding: {
          x: { field: 'x', ...axis(x) },
          y: { field: 'y', ...axis(y) },
          order: { field: 'i' },
          color: { field: 'series', title: null, scale: { domain: repeats, range: SERIES.slice(0, repeats.length) } },
          strokeDash: { field: 'series', title: null, scale: { domain: repeats, range: DASHES.slice(0, repeats.length) } },
        },
      },
    ],
  };
}

/** The dashed diagonal y = x: chance on a ROC plot, perfect calibration on a reliability plot. */
function diagonalLayer(): Record<string, unknown> {
  return {
    data: {
      values: [
        { x: 0, y: 0 },
        { x: 1, y: 1 },
      ],
    },
    mark: { type: 'line', strokeDash: [3, 3], color: PALETTE.chance, strokeWidth: 1 },
    encoding: { x: { field: 'x', type: 'quantitative' }, y: { field: 'y', type: 'quantitative' } },
  };
}

function points(list: CurvePoint[], series: string): Record<string, unknown>[] {
  return list.map((p, i) => ({ x: p.x, y: p.y, series, i }));
}

/** Which class the curves are about: the positive class with two classes; with more, one-vs-rest of each class pooled. */
export function curvePlots(o: OutOfFold, positive: number): Plot[] {
  const k = o.classes.length;
  const repeats = Math.max(...Array.from(o.repeat));
  const twoClasses = k === 2;
  const targets = twoClasses ? [positive] : o.classes.map((_, c) => c);
  const roc = { fold: [] as Record<string, unknown>[], pooled: [] as Record<string, unknown>[] };
  const pr = { fold: [] as Record<string, unknown>[], pooled: [] as Record<string, unknown>[] };
  let prevalence = 0;
  for (const c of targets) {
    if (twoClasses) {
      const folds = new Set(Array.from(o.fold).map((f, r) => `${o.repeat[r]}/${f}`));
      for (const key of folds) {
        const [rep, fold] = key.split('/').map(Number);
        const s = scoresFor(o, c, (r) => o.repeat[r] === rep && o.fold[r] === fold);
        const cv = curves(s.score, s.positive);
        roc.fold.push(...points(cv.roc, `fold ${key}`));
        pr.fold.push(...points(cv.pr, `fold ${key}`));
      }
    }
    for (let rep = 1; rep <= (twoClasses ? repeats : 1); rep++) {
      const s = scoresFor(o, c, (r) => o.repeat[r] === rep);
      const cv = curves(s.score, s.positive);
      const name = twoClasses ? `pooled, repeat ${rep}` : `${o.classes[c]} vs rest (repeat 1)`;
      roc.pooled.push(...points(cv.roc, name));
      pr.pooled.push(...points(cv.pr, name));
      prevalence = s.positive.reduce((a, b) => a + b, 0) / Math.max(1, s.positive.length);
    }
  }
  const about = twoClasses ? `class ${o.classes[positive]}` : 'each class against the rest';
  const diagonal = diagonalLayer();
  const base = {
    data: { values: [{ y: prevalence }] },
    mark: { type: 'rule', strokeDash: [3, 3], color: PALETTE.chance, strokeWidth: 1 },
    encoding: { y: { field: 'y', type: 'quantitative' } },
  };
  const foldWords = twoClasses ? 'Thin grey lines: each test fold. ' : '';
  return [
    {
      id: 'roc',
      title: 'ROC curve',
      alt: `ROC curve of ${about}: true-positive rate against false-positive rate. ${foldWords}Thick lines: all out-of-fold predictions ${twoClasses ? 'of each repeat' : ''}. Dashed diagonal: chance.`,
      spec: curveSpec(
        `ROC curve (${about})`,
        `ROC curves of ${about}`,
        'False-positive rate',
        'True-positive rate',
        roc.fold,
        roc.pooled,
        diagonal,
      ),
    },
    {
      id: 'pr',
      title: 'Precision–recall curve',
      alt: `Precision–recall curve of ${about}. ${foldWords}Thick lines: all out-of-fold predictions. Dashed line: the share of the class (precision of a random ranking).`,
      spec: curveSpec(
        `Precision–recall (${about})`,
        `Precision–recall curves of ${about}`,
        'Recall',
        'Precision',
        pr.fold,
        pr.pooled,
        twoClasses ? base : diagonal,
      ),
    },
  ];
}

export function reliabilityPlot(o: OutOfFold, positive: number): Plot {
  const k = o.classes.length;
  const c = k === 2 ? positive : 0;
  const all = scoresFor(o, c, () => true);
  const bins = reliability(all.score, all.positive);
  return {
    id: 'calibration',
    title: 'Reliability (calibration)',
    alt:
      `Reliability of the predicted probability of class ${o.classes[c]}, out-of-fold predictions of every repeat in ten bins: ` +
      bins.map((b) => `predicted ${b.predicted.toFixed(2)}, observed ${b.observed.toFixed(2)} (${b.rows} rows)`).join('; ') +
      '. The dashed diagonal is perfect calibration.',
    spec: {
      $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
      title: `Reliability (class ${o.classes[c]})`,
      description: `Reliability plot of class ${o.classes[c]}`,
      width: 300,
      height: 300,
      config: CONFIG,
      layer: [
        diagonalLayer(),
        {
          data: { values: bins },
          mark: { type: 'line', color: PALETTE.teal, strokeWidth: 2, point: { filled: true, color: PALETTE.teal } },
          encoding: {
            x: { field: 'predicted', ...axis('Mean predicted probability') },
            y: { field: 'observed', ...axis('Observed share') },
          },
        },
        {
          data: { values: bins },
          mark: { type: 'text', dy: -10, color: PALETTE.ink, fontSize: 9 },
          encoding: {
            x: { field: 'predicted', type: 'quantitative' },
            y: { field: 'observed', type: 'quantitative' },
            text: { field: 'rows' },
          },
        },
      ],
    },
  };
}
