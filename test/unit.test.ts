/**
 * The quick test files, run in one process. Each test file costs tap about 1.5 s of start-up
 * (a process, the runner, coverage), more than these take together; the slow ones (CLI, threads,
 * reference libraries, the browser) stay files of their own and run side by side.
 */
import './architecture.part.js';
import './util/byte-builder.part.js';
import './util/sort-float64.part.js';
import './util/heap-flags.part.js';
import './model/apply-rows.part.js';
import './protocol/structure.part.js';
import './protocol/data-file-guess.part.js';
import './reconcile/hand-made.part.js';
import './manifest/compare.part.js';
import './check/lock.part.js';
import './run/four-fold.part.js';
import './run/predictions.part.js';
import './metric/identities.part.js';
import './stats/references.part.js';
import './split/properties.part.js';
import './table/read.part.js';
import './reconcile/reference.part.js';
import './split/sha256.part.js';
import './run/invariance.part.js';
import './model/select.part.js';
import './manifest/standards.part.js';
import './run/fast-paths.part.js';
import './model/models.part.js';
import './model/logistic-rows.part.js';
import './protocol/tune.part.js';
import './cli/hash.part.js';
import './protocol/bad-input.part.js';
import './audit/notes.part.js';
import './audit/screen.part.js';
import './protocol/schema.part.js';
import './stats/compare-logic.part.js';
import './cli/apply.part.js';
import './cli/apply-knn.part.js';
import './cli/sign-verify.part.js';
import './table/plain.part.js';
import './table/streamed.part.js';
import './table/streamed-file.part.js';
import './reconcile/known-rows.part.js';
import './model/knn-kernel.part.js';
import './table/csv-write.part.js';
