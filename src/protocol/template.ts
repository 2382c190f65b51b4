/** The text `foldseal init` writes: a protocol that validates as is, with short comments. Pure. */
export interface TemplateInput {
  name: string;
  dataFile: string;
  sha256: string;
  id?: string;
  label: string;
  group?: string;
  classCounts: number[];
  groupCount?: number;
  schemaPath: string;
  seed: number;
  layout?: 'samples-in-rows' | 'features-in-rows';
  samples?: { file: string; sha256: string };
  /** Columns left out of the features, each with why (a comment in the protocol). */
  exclude?: { column: string; reason: string }[];
  positive?: string;
  where?: Record<string, string[]>;
  classes?: Record<string, string[]>;
}

export function protocolTemplate(t: TemplateInput): string {
  const smallest = Math.min(...t.classCounts);
  const grouped = t.group !== undefined;
  const folds = Math.max(2, Math.min(5, grouped ? (t.groupCount ?? 5) : smallest));
  const q = (s: string) => JSON.stringify(s);
  const lines = [
    `# yaml-language-server: $schema=${t.schemaPath}`,
    `foldseal: 1`,
    `name: ${t.name}`,
    `description: ${q('Cross-validation protocol written by foldseal init; describe the study here.')}`,
    `data:`,
    `  file: ${q(t.dataFile)}`,
    `  sha256: ${q(t.sha256)}   # foldseal hash prints it; update it only when the data changes on purpose`,
    ...(t.layout === 'features-in-rows' ? ['  layout: features-in-rows   # one row per feature, one column per sample'] : []),
    ...(t.samples
      ? [
          `  samples:   # the sample sheet: id, label${grouped ? ', group' : ''} and covariates (never features)`,
          `    file: ${q(t.samples.file)}`,
          `    sha256: ${q(t.samples.sha256)}`,
        ]
      : []),
    ...(t.id ? [`  id: ${q(t.id)}`] : []),
    `  label: ${q(t.label)}`,
    ...(t.positive !== undefined ? [`  positive: ${q(t.positive)}`] : []),
    ...(grouped ? [`  group: ${q(t.group!)}`] : []),
    ...(t.where && Object.keys(t.where).length
      ? ['  where:   # only these rows are used', ...Object.entries(t.where).map(([c, v]) => `    ${q(c)}: ${JSON.stringify(v)}`)]
      : []),
    ...(t.classes
      ? [
          '  classes:   # label values that make up each class',
          ...Object.entries(t.classes).map(([c, v]) => `    ${q(c)}: ${JSON.stringify(v)}`),
        ]
      : []),
    ...(t.exclude?.length ? ['  features:', '    exclude:', ...t.exclude.map((e) => `      - ${q(e.column)}   # ${e.reason}`)] : []),
    `split:`,
    `  rule: ${grouped ? 'grouped-kfold' : 'stratified-kfold'}`,
    `  folds: ${folds}`,
    `  repeats: 1`,
    `  seed: ${t.seed}   # any fixed integer; changing it after seeing scores is seed-shopping`,
    `  assign: balanced`,
    `preprocess: [standardize]   # fitted on each training part only`,
    `model: {kind: gaussian-nb}`,
    `reconcile: {rule: mean-probability}`,
    `metrics: [accuracy, balanced-accuracy, roc-auc, mcc, log-loss]`,
    `verify: {tolerance: 0}`,
  ];
  return lines.join('\n') + '\n';
}

/** A slug from a file name: lower case, hyphens for everything else. */
export function slugFrom(stem: string): string {
  const s = stem
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 64);
  return s || 'protocol';
}
