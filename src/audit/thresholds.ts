/**
 * Every threshold of the leakage audit, in one place (docs/audit.md quotes them). They are
 * screening thresholds, chosen to stay silent on clean open datasets (the breast-cancer table
 * bundled with scikit-learn has no finding) and to catch the planted leaks of the tests; a
 * finding is a reason to look, not a verdict.
 */
export const AUDIT_THRESHOLDS = {
  /** Near duplicates: Pearson correlation of two rows' standardized feature profiles at or above this. */
  nearCorrelation: 0.98,
  /** …computed only with at least this many features (with fewer, unrelated rows correlate by chance)… */
  nearMinFeatures: 20,
  /** …and when rows² × features / 2 stays under this many multiply-adds (about a second here). */
  nearMaxWork: 2e9,
  /** A feature separates the classes almost perfectly: its ROC AUC (or 1 − AUC) for every pair of classes at or above this. */
  proxyAuc: 0.99,
  /** Row position or numeric ids ordered by class: ROC AUC (or 1 − AUC) for every pair of classes at or above this. */
  orderAuc: 0.9,
  /** Ids that name their class: this share of rows or more have a class name as a word of the id. */
  idNamesClass: 0.9,
  /** A covariate confounded with the label: Cramér's V at or above this… */
  cramerV: 0.5,
  /** …with the chi-square test of independence below this p-value. */
  chiSquareP: 0.001,
  /** A covariate with more distinct values than this (or than half the rows) is compared by ROC AUC, not as categories. */
  maxCategories: 50,
  /** `run`'s quick audit searches near duplicates only up to this much work (about 50 ms here); `audit` up to nearMaxWork. */
  quickNearWork: 5e7,
  /** `run`'s quick audit leaves out the per-feature separation check above this many cells (rows × features); `audit` runs it always. */
  quickMaxCells: 2e6,
  /** A numeric covariate associated with the label: ROC AUC (or 1 − AUC) for every pair of classes at or above this. */
  covariateAuc: 0.9,
} as const;

/** Column names that say a row belongs to a subject whose rows must stay in one fold (case-insensitive, as a word). */
export const SUBJECT_NAMES = [
  'patient',
  'subject',
  'donor',
  'individual',
  'participant',
  'person',
  'animal',
  'mouse',
  'family',
  'litter',
  'specimen',
  'biopsy',
] as const;

export function namesSubject(column: string): boolean {
  const words = column.toLowerCase().split(/[^a-z0-9]+|(?<=[a-z])(?=[0-9])/);
  return SUBJECT_NAMES.some((w) => words.includes(w) || words.includes(`${w}s`) || words.includes(`${w}id`));
}
