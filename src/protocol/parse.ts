/** Text → located problems and, when the shape is right, a typed Protocol. Pure: reads nothing. */
import { error, warning, hasErrors, type Problem } from '../problems/problem.js';
import { hasKey, locate, parseYaml, type SourceDocument } from './document.js';
import { normalizeProtocol } from './normalize.js';
import type { ValidateFunction } from 'ajv/dist/2020.js';
import { schemaProblems } from './schema-problems.js';
import { isPinned, ruleNeedsSeed, type Protocol } from './types.js';
import { splitRules } from '../split/registry.js';

export interface ParsedProtocol {
  file: string;
  source?: SourceDocument;
  /** The document as plain data (what the canonical form and the hash are taken of). */
  raw?: unknown;
  protocol?: Protocol;
  problems: Problem[];
}

export const PROTOCOL_SCHEMA = 'protocol.schema.json';

/** `validate`: the protocol schema's validator (the shell loads it: io/schemas.ts). */
export function parseProtocol(text: string, file: string, validate: ValidateFunction): ParsedProtocol {
  const { source, value, problems } = parseYaml(text, file);
  if (hasErrors(problems)) return { file, source, problems };
  if (value === null || value === undefined || typeof value !== 'object' || Array.isArray(value)) {
    problems.push(
      error('not-a-protocol', 'a protocol is a YAML mapping with the key `foldseal: 1` at the top', {
        file,
        position: { line: 1, col: 1 },
      }),
    );
    return { file, source, problems };
  }
  if (!validate(value)) {
    problems.push(...schemaProblems(validate.errors ?? [], source));
    return { file, source, raw: value, problems };
  }
  const protocol = normalizeProtocol(value);
  problems.push(...structureProblems(protocol, source));
  return { file, source, raw: value, protocol: hasErrors(problems) ? undefined : protocol, problems };
}

/** Cross-field rules the schema does not express readably. */
function structureProblems(p: Protocol, source: SourceDocument): Problem[] {
  const file = source.file;
  const out: Problem[] = [];
  const at = (path: (string | number)[], key = false) => ({ file, path, position: locate(source, path, key) });
  const has = (key: string) => hasKey(source, ['split'], key);
  if (!isPinned(p.split)) {
    if (!has('rule')) {
      out.push(
        error('missing-field', 'split needs either `rule` (with its settings) or `pinned`', {
          ...at(['split'], true),
          hint: 'e.g. rule: stratified-kfold, folds: 5, seed: 20261201',
        }),
      );
      return out;
    }
    const { rule } = p.split;
    if (ruleNeedsSeed(rule) && p.split.seed === undefined) {
      out.push(
        error('missing-seed', `split rule ${rule} draws its folds from a seed, and none is given`, {
          ...at(['split'], true),
          hint: 'add `seed:` with any non-negative integer; foldseal never picks one for you',
        }),
      );
    }
    const uses = splitRules[rule].uses;
    if (!uses.seed && has('seed')) out.push(warning('unused-field', `split rule ${rule} does not use a seed`, at(['split', 'seed'], true)));
    if (uses.testFraction) {
      if (p.split.testFraction === undefined)
        out.push(error('missing-field', `split rule ${rule} needs \`test-fraction\``, at(['split'], true)));
      else if (!hasSixDecimals(p.split.testFraction))
        out.push(
          error('bad-format', `test-fraction ${p.split.testFraction} has more than 6 decimal places`, at(['split', 'test-fraction'])),
        );
    } else if (has('test-fraction'))
      out.push(error('unused-field', `split rule ${rule} does not use \`test-fraction\``, at(['split', 'test-fraction'], true)));
    if (!uses.folds && has('folds')) {
      const why =
        splitRules[rule].tests === 'fold-1' ? 'fold 1 is the test part, fold 2 the training part' : 'it sets the number of folds itself';
      out.push(warning('unused-field', `split rule ${rule} does not use \`folds\` (${why})`, at(['split', 'folds'], true)));
    }
    if (!uses.repeats && p.split.repeats > 1)
      out.push(error('out-of-range', `split rule ${rule} has exactly one assignment; repeats must be 1`, at(['split', 'repeats'])));
    if (!uses.assign && has('assign'))
      out.push(warning('unused-field', `split rule ${rule} does not use \`assign\``, at(['split', 'assign'], true)));
  } else {
    for (const key of ['rule', 'folds', 'repeats', 'seed', 'assign', 'test-fraction']) {
      if (has(key))
        out.push(
          error(
            'pinned-with-rule',
            `split has both \`pinned\` and \`${key}\`; a pinned assignment replaces the rule`,
            at(['split', key], true),
          ),
        );
    }
  }
  const stats = p.statistics;
  if (stats && !hasSixDecimals(stats.level))
    out.push(error('bad-format', `statistics.level ${stats.level} has more than 6 decimal places`, at(['statistics', 'level'])));
  if (stats?.permutation && !p.metrics.includes(stats.permutation.metric))
    out.push(
      error(
        'permutation-metric-not-reported',
        `the permutation test's metric ${stats.permutation.metric} is not among the protocol's metrics`,
        {
          ...at(['statistics', 'permutation', 'metric']),
          hint: `add ${stats.permutation.metric} to metrics, or test one of: ${p.metrics.join(', ')}`,
        },
      ),
    );
  if (stats?.permutation?.within === 'group' && p.data.group === undefined)
    out.push(
      error('missing-group', 'statistics.permutation.within: group needs data.group to name the group column', {
        ...at(['statistics', 'permutation', 'within']),
      }),
    );
  if (p.reconcile.tie !== undefined && p.reconcile.rule !== 'majority-vote') {
    out.push(
      warning('unused-field', `reconcile.tie only applies to majority-vote, not ${p.reconcile.rule}`, at(['reconcile', 'tie'], true)),
    );
  }
  if (p.data.layout === 'features-in-rows' && !p.data.samples)
    out.push(
      error('layout-needs-samples', 'a features-in-rows data file holds no labels: name a sample sheet under data.samples', {
        ...at(['data', 'layout']),
        hint: 'samples: {file: samples.csv, sha256: "…"} with the id column (data.id) and the label column (data.label)',
      }),
    );
  if (p.data.classes) {
    const classOf = new Map<string, string>();
    for (const [name, values] of Object.entries(p.data.classes))
      values.forEach((v, i) => {
        const other = classOf.get(v);
        if (other !== undefined)
          out.push(
            error(
              'label-in-two-classes',
              `label value "${v}" is listed in class "${other}" and in class "${name}"`,
              at(['data', 'classes', name, i]),
            ),
          );
        else classOf.set(v, name);
      });
  }
  if (p.data.samples && p.data.id === undefined)
    out.push(
      error('samples-without-id', 'a sample sheet is joined by id: name its id column in data.id', {
        ...at(['data', 'samples'], true),
      }),
    );
  if (p.data.id === undefined && !p.data.samples) {
    out.push(
      warning('no-id-column', 'data.id is not set: row numbers become the ids, so the folds depend on row order', {
        ...at(['data'], true),
        hint: 'name a column with a stable unique id per row',
      }),
    );
  }
  return out;
}

function hasSixDecimals(x: number): boolean {
  const scaled = x * 1e6;
  return Math.abs(scaled - Math.round(scaled)) < 1e-6;
}
