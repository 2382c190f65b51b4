/** Half a of the bad-input table (bad-inputs.cases.ts); two files so the halves run side by side. */
import { badInputs } from './bad-inputs.cases.js';
import { runBadInputs } from './bad-inputs.run.js';

runBadInputs(badInputs.slice(0, Math.ceil(badInputs.length / 2)));
