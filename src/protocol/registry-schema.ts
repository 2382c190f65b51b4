/**
 * The parts of the protocol schema the registries describe: the model kinds and their options,
 * the split rules, the preprocessing steps and their settings, the metric names. scripts/sync-schema.mjs
 * writes them into schema/protocol.schema.json (`npm run docs`), and a test fails when the file
 * and the entries disagree. Pure.
 */
import { metricItemSchema } from '../metric/registry.js';
import { modelSchema } from '../model/registry.js';
import { stepItemSchema } from '../preprocess/registry.js';
import { splitRuleSchema } from '../split/registry.js';

type Json = Record<string, any>;

/** Each generated part: where it sits in the schema (a path of property names), and its content. */
export function registryParts(): { path: string[]; value: Json }[] {
  return [
    { path: ['properties', 'model'], value: modelSchema() },
    { path: ['properties', 'split', 'properties', 'rule'], value: splitRuleSchema() },
    { path: ['properties', 'preprocess', 'items'], value: stepItemSchema() },
    { path: ['properties', 'metrics', 'items'], value: metricItemSchema() },
    { path: ['properties', 'tune', 'properties', 'split', 'properties', 'rule'], value: splitRuleSchema() },
    {
      path: ['properties', 'tune', 'properties', 'metric'],
      value: { ...metricItemSchema(), description: "The metric whose mean over the inner folds picks each outer fold's candidate." },
    },
    {
      path: ['properties', 'statistics', 'properties', 'permutation', 'properties', 'metric'],
      value: { ...metricItemSchema(), description: "The metric whose mean over folds is tested; one of the protocol's metrics." },
    },
  ];
}

/** The schema with every generated part replaced by the registries' version (a new object; the input is not changed). */
export function withRegistryParts(schema: Json): Json {
  const out = structuredClone(schema);
  for (const { path, value } of registryParts()) {
    let at = out;
    for (const key of path.slice(0, -1)) at = at[key];
    at[path[path.length - 1]] = value;
  }
  return out;
}
