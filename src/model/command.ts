/**
 * A model that is a program of the user's (Python, R, …), run per fold under foldseal's seal.
 * Its fits happen in the shell (src/io/command-model.ts, contract in docs/command-models.md):
 * a program is never run from the pure core, so this entry only names the kind, describes it
 * for the schema and docs, and refuses to be fitted here. `options` are passed to the program
 * as they are written.
 */
import { FitError } from '../problems/problem.js';
import { noChecks, type ModelImpl } from './types.js';

export const commandModel: ModelImpl<never> = {
  description:
    'a program of yours (model.command: its argument list, the files it depends on with their SHA-256, a time limit), fitted and ' +
    'asked for probabilities per fold through the contract of docs/command-models.md; it runs only with --allow-commands.',
  methods: () => 'a user-supplied program',
  options: {},
  check: noChecks,
  fit() {
    throw new FitError(
      'command-model',
      'a command model is fitted by running its program, which only the command line does',
      'run it with `foldseal run --allow-commands`',
    );
  },
  predict() {
    throw new FitError(
      'command-model',
      'a command model predicts by running its program, which only the command line does',
      'use `foldseal apply --allow-commands`',
    );
  },
};
