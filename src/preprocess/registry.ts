/** preprocess step → entry. Adding a step: one file here, one line below, and its reference test. */
import { impute } from './impute.js';
import { log2p } from './log2p.js';
import { select } from './select.js';
import { standardize } from './standardize.js';
import type { TransformImpl } from './types.js';
import { tunable } from '../model/types.js';

const entries = { standardize, log2p, impute, select };

/** The step names: the registry's keys. */
export type StepName = keyof typeof entries;

type SettingsOf<T> = T extends TransformImpl<any, infer S> ? S : never;

/** A step as the protocol declares it, normalized: its name and its settings. */
export type PreprocessStep = { [K in StepName]: { step: K } & SettingsOf<(typeof entries)[K]> }[StepName];

export const transforms: Record<StepName, TransformImpl<any, any>> = entries;

/** A schema-valid protocol entry (`name` or `{name: {settings}}`) → the normalized step. */
export function readStep(raw: string | Record<string, Record<string, unknown>>): PreprocessStep {
  if (typeof raw === 'string') return { step: raw } as PreprocessStep;
  const [name, settings] = Object.entries(raw)[0];
  return { step: name, ...settings } as PreprocessStep;
}

/** The protocol schema's `preprocess.items`, generated from the entries. */
export function stepItemSchema(): Record<string, unknown> {
  const bare = Object.entries(transforms).filter(([, t]) => Object.keys(t.settings).length === 0);
  const withSettings = Object.entries(transforms).filter(([, t]) => Object.keys(t.settings).length > 0);
  return {
    oneOf: [
      {
        description: `A step without settings: ${bare.map(([name, t]) => `${name} — ${t.description}`).join(' ')}`,
        enum: bare.map(([name]) => name),
      },
      ...withSettings.map(([name, t]) => ({
        type: 'object',
        additionalProperties: false,
        required: [name],
        description: `${name}: ${t.description}`,
        properties: {
          [name]: {
            type: 'object',
            additionalProperties: false,
            required: Object.keys(t.settings),
            description: `Settings of ${name}.`,
            properties: Object.fromEntries(Object.entries(t.settings).map(([name, spec]) => [name, tunable({ ...spec })])),
          },
        },
      })),
    ],
  };
}
