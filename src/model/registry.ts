/** model.kind → implementation. Adding a model: one file here and one line below (plus its options in the schema). */

import { bernoulliNb } from './bernoulli-nb.js';
import { commandModel } from './command.js';
import { gaussianNb } from './gaussian-nb.js';
import { knn } from './knn.js';
import { linearSvm } from './linear-svm.js';
import { logistic } from './logistic.js';
import { multinomialNb } from './multinomial-nb.js';
import { shrunkenCentroid } from './shrunken-centroid.js';
import { tunable, type ModelImpl } from './types.js';

const entries = {
  'gaussian-nb': gaussianNb,
  'multinomial-nb': multinomialNb,
  'bernoulli-nb': bernoulliNb,
  logistic,
  knn,
  'shrunken-centroid': shrunkenCentroid,
  'linear-svm': linearSvm,
  command: commandModel,
};

/** The model kinds: the registry's keys. */
export type ModelKind = keyof typeof entries;

/** model.kind → its entry (fit, predict, options with defaults and ranges, description). */
export const models: Record<ModelKind, ModelImpl<any>> = entries;

/** The protocol's options with every default of the model's entry filled in: the one place defaults are read. */
export function withDefaults(kind: ModelKind, options: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [name, spec] of Object.entries(models[kind].options)) if (spec.default !== undefined) out[name] = spec.default;
  return { ...out, ...options };
}

/**
 * Protocol options → the options a fit sees: defaults filled in, class-keyed maps (options of
 * type `object`: class label → number) as arrays in class order.
 */
export function fitOptions(kind: ModelKind, options: Record<string, unknown>, classes: readonly string[]): Record<string, unknown> {
  const full = withDefaults(kind, options);
  for (const [name, spec] of Object.entries(models[kind].options)) {
    const map = full[name] as Record<string, number> | undefined;
    if (spec.type === 'object' && map !== undefined) full[name] = classes.map((c) => map[c]);
  }
  return full;
}

/** The protocol schema's `model` property, generated from the entries (scripts/sync-schema.mjs writes it; a test compares). */
export function modelSchema(): Record<string, unknown> {
  return {
    description: 'The classifier fitted in each fold.',
    type: 'object',
    additionalProperties: false,
    required: ['kind'],
    properties: {
      kind: {
        description: `Model family: ${Object.entries(models)
          .map(([k, m]) => `${k} — ${m.description}`)
          .join(' ')}`,
        enum: Object.keys(models),
      },
      options: { description: 'Options of the chosen kind (see docs/protocol.md).', type: 'object', default: {} },
      command: {
        description:
          'kind: command only. The program and what it depends on; it is run only when the user passes --allow-commands (docs/command-models.md).',
        type: 'object',
        additionalProperties: false,
        required: ['run', 'files'],
        properties: {
          run: {
            description:
              "The argument list, no shell: a program and its arguments. foldseal appends `fit FOLDER` or `predict FOLDER`. Relative paths are resolved against the protocol's folder, where the program runs.",
            type: 'array',
            minItems: 1,
            items: { type: 'string', minLength: 1 },
          },
          files: {
            description:
              'Every file the program depends on (its scripts, an environment lock such as requirements.txt or renv.lock), each with its SHA-256; checked before any run like the data, and again after.',
            type: 'array',
            minItems: 1,
            items: {
              type: 'object',
              additionalProperties: false,
              required: ['file', 'sha256'],
              properties: {
                file: { description: "A file, relative to the protocol's folder.", type: 'string', minLength: 1 },
                sha256: { description: 'Its SHA-256 (`foldseal hash FILE`).', type: 'string', pattern: '^[0-9a-f]{64}$' },
              },
            },
          },
          'time-limit': {
            description: 'Seconds one fit or one prediction may take before the program is stopped and the run fails.',
            type: 'number',
            exclusiveMinimum: 0,
            default: 3600,
          },
        },
      },
    },
    allOf: Object.entries(models).map(([kind, m]) => ({
      if: { properties: { kind: { const: kind } } },
      // biome-ignore lint/suspicious/noThenProperty: JSON Schema's if/then keyword, a plain object never awaited
      then:
        kind === 'command'
          ? // The program's own settings, passed to it as written.
            { required: ['command'], properties: { options: { type: 'object' } } }
          : {
              properties: {
                options: {
                  type: 'object',
                  additionalProperties: false,
                  properties: Object.fromEntries(Object.entries(m.options).map(([name, spec]) => [name, tunable({ ...spec })])),
                },
              },
            },
    })),
  };
}
