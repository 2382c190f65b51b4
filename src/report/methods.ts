/**
 * The methods paragraph: the validation design, in-fold preprocessing, model, reconciliation,
 * metrics with their intervals, software and hashes, in plain scientific English, from the
 * protocol a run used and the results it wrote. It states only what the run did. Pure.
 */
import { metrics as metricEntries, type MetricName } from '../metric/registry.js';
import { fitOptions, models } from '../model/registry.js';
import { transforms } from '../preprocess/registry.js';
import { isPinned, type Protocol } from '../protocol/types.js';
import { partsFor } from '../protocol/grid.js';
import { splitRules } from '../split/registry.js';

export interface MethodsInput {
  protocol: Protocol;
  /** results.json as written by `run`. */
  results: any;
  toolVersion: string;
  /** SHA-256 of manifest.json's bytes. */
  manifestSha256: string;
}

const fmt = (v: number | null | undefined, digits = 3) => (v === null || v === undefined ? 'undefined' : v.toFixed(digits));
const count = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

function listJoin(items: string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

function capitalize(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

function design(p: Protocol, r: any): string {
  const classCounts = r.data.classes.map((c: string, i: number) => `${r.data['class-counts'][i]} ${c}`).join(', ');
  const samples = `${r.data.rows} samples (${classCounts}) and ${count(r.data.features.length, 'feature')}`;
  if (isPinned(p.split))
    return (
      `Performance was estimated on ${samples} with a fixed, pre-registered assignment of samples to ` +
      `${r.split.folds} folds (${r.split.repeats > 1 ? `${r.split.repeats} repeats, ` : ''}file SHA-256 ${r.split['assignment-sha256']}).`
    );
  const rule = splitRules[p.split.rule];
  const how = rule.methods({ folds: p.split.folds, repeats: p.split.repeats, testFraction: p.split.testFraction, group: p.data.group });
  const seeded = rule.uses.seed
    ? ` Samples were assigned to folds by the ${r.split.version} rule of foldseal from SHA-256 keys of their ${rule.keysIds ? 'ids' : `${p.data.group ?? 'group'} values`} with seed ${p.split.seed}` +
      ` (${p.split.assign} assignment), so the assignment does not depend on row order or software version.`
    : ` The folds follow from the sample ids alone (${r.split.version} rule).`;
  return `Performance was estimated on ${samples} by ${how}.${seeded}`;
}

function listOr(items: readonly (number | string)[]): string {
  return items.length <= 1 ? items.join('') : `${items.slice(0, -1).join(', ')} or ${items[items.length - 1]}`;
}

function pipeline(p: Protocol, r: any): string {
  // A tuned setting reads as its candidates ("the 5, 10 or 20 features …", "k = 5, 9 or 15").
  const shown = { ...p, grid: p.grid.map((g) => ({ ...g, values: [listOr(g.values)] })) };
  const parts = partsFor(shown, new Int32Array(p.grid.length));
  const steps = parts.preprocess.map((s) => transforms[s.step].methods(s));
  const c = p.model.command;
  const model = c
    ? `the user-supplied program \`${c.run.join(' ')}\` (run by foldseal once per fold through its command-model contract, with a seed derived from the split seed; its files ${listJoin(c.files.map((f) => `${f.file} (SHA-256 ${f.sha256.slice(0, 12)}…)`))}${versionsText(r)})`
    : models[p.model.kind].methods(fitOptions(p.model.kind, parts.model.options, r.classes));
  const before = steps.length
    ? `Within each training part, ${listJoin(steps)}; then ${model} was fitted`
    : `In each training part, ${model} was fitted`;
  return `${before}. Every preprocessing, selection and fitting step used the training part only; the test part was used only to score. ${tuning(p, r)}`;
}

function versionsText(r: any): string {
  const reports = (r.model?.command?.versions ?? []).filter((v: unknown) => v !== null) as Record<string, unknown>[];
  if (!reports.length) return '';
  return `; it reported ${reports
    .map((v) =>
      Object.entries(v)
        .map(([k, x]) => `${k} ${x}`)
        .join(', '),
    )
    .join(' / ')}`;
}

function tuning(p: Protocol, r: any): string {
  const t = p.tune;
  if (p.model.command && !t) return 'foldseal tuned no setting; any tuning inside the program saw only the training part it was given.';
  if (!t || !r.tuning) return 'No hyperparameters were tuned.';
  const rule = splitRules[t.split.rule];
  const inner = rule.methods({ folds: t.split.folds, repeats: t.split.repeats, testFraction: t.split.testFraction, group: p.data.group });
  const order = t.prefer.map((q) => `${q.order === 'first-listed' ? 'the first listed' : `the ${q.order}`} ${q.name}`);
  const counts = Object.entries(r.tuning['chosen-counts'] as Record<string, { value: number | string; folds: number }[]>).map(
    ([name, byValue]) => `${name} ${listJoin(byValue.filter((c) => c.folds > 0).map((c) => `${c.value} (${count(c.folds, 'fold')})`))}`,
  );
  return (
    `The tuned settings (${listJoin(p.grid.map((g) => g.name))}; ${count(r.tuning.candidates.length, 'combination')}) were chosen by nested ` +
    `cross-validation: within each outer training part only, every combination was scored by its mean ${metricEntries[t.metric].title} ` +
    `over ${inner} of that part (${r.split.version} §9 keys, seed ${t.split.seed ?? 'none'}), ties going to ${listJoin(order)}, and the ` +
    `winner was refitted on the whole training part. The values chosen were ${listJoin(counts)}. The reported metrics are therefore ` +
    'nested estimates: no test part influenced the choice of settings used to predict it.'
  );
}

function reconciliation(p: Protocol): string {
  const rule = p.reconcile.rule;
  if (rule === 'refit')
    return p.tune
      ? 'For new samples, the same search was run on all labelled samples and one model with the winning settings was refitted on them.'
      : 'For new samples, one model was refitted on all labelled samples with the same pipeline.';
  return rule === 'majority-vote'
    ? `For new samples, the fold models' predicted classes were combined by majority vote${p.reconcile.tie ? ` (ties: ${p.reconcile.tie})` : ''}.`
    : `For new samples, the fold models' class probabilities were averaged${p.tune ? ', each fold model with its own chosen settings' : ''}.`;
}

function metricsText(r: any): string {
  const names: MetricName[] = r.metrics;
  const st = r.statistics;
  const level = st ? `${Math.round(st.level * 100)} %` : '';
  const parts = names.map((m) => {
    const s = r.summary[m];
    let text = `${metricEntries[m].title} ${fmt(s.mean)} (SD ${fmt(s.sd)} over folds; pooled ${fmt(s.pooled)}`;
    const iv = st?.intervals?.[m];
    if (iv?.pooled?.bca) text += `, ${level} BCa bootstrap interval ${fmt(iv.pooled.bca[0])}–${fmt(iv.pooled.bca[1])}`;
    if (iv?.pooled?.delong) text += `, DeLong interval ${fmt(iv.pooled.delong[0])}–${fmt(iv.pooled.delong[1])}`;
    if (iv?.folds?.corrected)
      text += `; corrected resampled t interval of the mean ${fmt(iv.folds.corrected[0])}–${fmt(iv.folds.corrected[1])}`;
    return `${text})`;
  });
  const folds = r.folds.length;
  let out =
    `Metrics are reported as the mean over the ${count(folds, 'test fold')} and pooled over all out-of-fold predictions of each repeat: ` +
    `${parts.join('; ')}. Always predicting the training part's most common class gave an accuracy of ${fmt(r.baseline['accuracy-mean'])}.`;
  // A statistics section may ask for a permutation test alone: no bootstrap, intervals over the folds only.
  const source = st?.bootstrap
    ? `stratified bootstrap with ${st.bootstrap.replicates} replicates, seed ${st.bootstrap.seed}`
    : 'over the folds only, without a bootstrap';
  if (st) out += ` Intervals are at the ${level} level (${source}; ${st.version} resampling rule).`;
  const perm = st?.permutation;
  if (perm)
    out +=
      ` A permutation test (${perm.count} permutations of the labels${perm.within === 'group' ? ' within groups' : ''}, seed ${perm.seed}, ` +
      `the whole pipeline refitted in every fold of every permutation) gave p = ${perm['p-value'].toPrecision(3)} for ${metricEntries[perm.metric as MetricName].title}.`;
  return out;
}

export function methodsParagraph(m: MethodsInput): string {
  const p = m.protocol;
  const r = m.results;
  return [
    design(p, r),
    pipeline(p, r),
    reconciliation(p),
    metricsText(r),
    `The analysis was run with foldseal ${m.toolVersion}; the data file had SHA-256 ${r.data.sha256}, the protocol ${r.protocol.sha256}, ` +
      `and the result manifest ${m.manifestSha256}.`,
  ]
    .map(capitalize)
    .join(' ');
}
