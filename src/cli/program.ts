/** Command-line surface: names, options and help text. Each action calls a typed command function. */
import { Command, Option } from 'commander';
import { packageVersion } from '../io/package-root.js';
import type { CommandIo, ExitCode } from './io.js';
import { showAllProblems } from './report-problems.js';
// Commands load when chosen: a quick `validate` does not pay for the runner and the signer.
import type { DataLayout, ReconcileRule, TieRule } from '../protocol/types.js';
import type { InitArgs } from './commands/init.js';
import type { RunArgs } from './commands/run.js';

export function buildProgram(io: CommandIo, done: (code: ExitCode) => void): Command {
  const program = new Command('foldseal')
    .description('Sealed, re-runnable cross-validation: hashed data, spec-defined folds, in-fold fitting, signed results.')
    .version(packageVersion(), '-V, --version', 'print the foldseal version')
    .helpOption('-h, --help', 'show help')
    .option('--all-problems', `print every problem (by default, after ${50} of one kind the rest are counted)`)
    .hook('preAction', (cmd) => {
      showAllProblems(Boolean(cmd.opts().allProblems));
    })
    .showSuggestionAfterError(true)
    .configureOutput({ writeOut: (s) => io.out(s), writeErr: (s) => io.err(s) })
    // Set before the subcommands are added so they inherit it: main maps commander's exits to ours.
    .exitOverride();

  const formatOption = () => new Option('--format <format>', 'output format').choices(['text', 'json']).default('text');
  const commandsOption = () =>
    new Option('--allow-commands', "run the program a protocol's command model names (read it first: it runs as you, with your files)");

  const outsideOption = () =>
    new Option(
      '--allow-outside',
      'let the protocol name files outside its folder, the working folder and FOLDSEAL_TRUSTED (only for files you trust)',
    );

  /** What `run` and `merge` share: where the results folder goes and what is written into it. */
  const resultsFolderOptions = (command: Command) =>
    command
      .option('--out <dir>', 'results folder (default: results/<protocol name>)')
      .option('--force', 'replace an existing results folder that foldseal wrote (never any other folder)')
      .option('--refit', 'also fit one model on every labeled row and save it in models.json')
      .option('--key <file>', 'sign manifest.json with this Ed25519 private key (from foldseal keygen)')
      .option('--report', 'also write report.html (see foldseal report) into the results folder');

  program
    .command('validate')
    .description('check protocols against the schema and their data; report every problem at file:line:col')
    .argument('<protocol...>', 'protocol YAML files')
    .addOption(formatOption())
    .addOption(outsideOption())
    .addHelpText(
      'after',
      '\nExamples:\n  foldseal validate protocols/demo.yaml\n  foldseal validate protocols/*.yaml --format json\n\nExit: 0 valid, ' +
        '1 invalid, 2 usage error or unreadable file.',
    )
    .action(async (protocols: string[], o: { format: 'text' | 'json'; allowOutside?: boolean }) =>
      done(await (await import('./commands/validate.js')).validateCommand({ protocols, ...o }, io)),
    );

  program
    .command('hash')
    .description('print the SHA-256 of files, in the same form as sha256sum')
    .argument('<file...>', 'files to hash')
    .addHelpText('after', '\nExample:\n  foldseal hash protocols/data/trial.csv')
    .action(async (files: string[]) => done(await (await import('./commands/hash.js')).hashCommand({ files }, io)));

  const collect = (value: string, previous: string[] = []) => [...previous, value];
  program
    .command('init')
    .description('write a protocol for a data file (CSV/TSV, gzip allowed; with a sample sheet), hash filled in, that validates as is')
    .argument('<data>', 'CSV or TSV data file, samples in rows or (with --samples) features in rows')
    .requiredOption('--label <column>', 'column holding the class label (in the sample sheet when there is one)')
    .option('--id <column>', 'column holding a unique row id (needed with --samples)')
    .option('--group <column>', 'column whose equal values must stay in one fold')
    .option('--samples <file>', 'sample sheet with the id, label and group; the orientation of DATA is detected from it')
    .option('--exclude <column>', 'leave this column out of the features (repeatable)', collect)
    .option('--positive <class>', 'positive class of binary metrics')
    .option('--where <column=values>', 'keep only rows whose COLUMN is one of VALUE,VALUE… (repeatable)', collect)
    .option('--class <class=values>', 'the label values VALUE,VALUE… make up class CLASS (repeat for every class)', collect)
    .option('--out <file>', 'where to write the protocol (default: <data name>.protocol.yaml)')
    .option('--force', 'replace an existing protocol file')
    .addHelpText(
      'after',
      '\nExamples:\n  foldseal init data/trial.csv --label outcome --id plot_id --out protocols/trial.yaml\n' +
        '  foldseal init expr.tsv.gz --samples samples.csv --id sample --label cell_type --where cell_type=B,T\n\n' +
        'Numeric-looking codes, ids and covariates (age, batch, …) are left out of the features, with a note.',
    )
    .action(async (data: string, o: Omit<InitArgs, 'data'>) =>
      done(await (await import('./commands/init.js')).initCommand({ data, ...o }, io)),
    );

  program
    .command('folds')
    .description('compute the fold assignment (split-v1) and write it as CSV id,repeat,fold; summary on stderr')
    .argument('<protocol>', 'protocol YAML file')
    .option('--out <file>', 'write the CSV here instead of stdout')
    .option('--inner', "write the tune section's inner splits instead: outer-repeat,outer-fold,id,repeat,fold")
    .addOption(outsideOption())
    .addHelpText(
      'after',
      '\nExamples:\n  foldseal folds protocols/demo.yaml --out demo.folds.csv\n  foldseal folds protocols/demo-tuned.yaml --inner --out demo.inner.csv',
    )
    .action(async (protocol: string, o: { out?: string; allowOutside?: boolean; inner?: boolean }) =>
      done(await (await import('./commands/folds.js')).foldsCommand({ protocol, ...o }, io)),
    );

  resultsFolderOptions(
    program
      .command('run')
      .description('cross-validate: fit preprocessing and model inside every fold, score, write predictions and results')
      .argument('<protocol>', 'protocol YAML file'),
  )
    .option(
      '--shard <i/n>',
      'compute only shard I of N of the work (fold fits, permutations) and write its part to --out FILE; see foldseal merge',
    )
    .addOption(commandsOption())
    .option('--jobs <n>', "a command model's programs run at once (default: the number of cores)", (v) => Number.parseInt(v, 10))
    .addOption(outsideOption())
    .addHelpText(
      'after',
      '\nExample:\n  foldseal run protocols/demo.yaml --out results/demo\n\nThe folder is written to a temporary sibling and ' +
        'renamed at the end, so it is never half-written.\n--force replaces only a folder foldseal wrote (its manifest and the ' +
        'files it lists); any other non-empty folder is refused.',
    )
    .action(async (protocol: string, o: Omit<RunArgs, 'protocol'>) => {
      // A large table's second thread starts now, while the run's modules load.
      const early = await import('../io/early-row-thread.js');
      if (o.shard === undefined) early.startEarlyRowThread(protocol, Boolean(o.allowOutside));
      try {
        done(await (await import('./commands/run.js')).runCommand({ protocol, ...o }, io));
      } finally {
        await early.closeEarlyRowThread();
      }
    });

  resultsFolderOptions(
    program
      .command('merge')
      .description('put the parts of a sharded run (run --shard I/N) together into the results folder one run writes')
      .argument('<protocol>', 'the protocol the parts were run from')
      .argument('<parts...>', 'the part files, one per shard, in any order'),
  )
    .addOption(outsideOption())
    .addHelpText(
      'after',
      '\nExample:\n  for i in 1 2 3 4; do foldseal run p.yaml --shard $i/4 --out parts/$i.json; done\n  foldseal merge p.yaml parts/*.json ' +
        "--out results/p\n\nThe merged folder equals what foldseal run writes, byte for byte, apart from the manifest's creation time " +
        'and signature.\nA part of another protocol, data or assignment, a missing shard or a shard given twice is refused by name.\n' +
        'Exit: 0 merged, 1 refused or invalid, 2 usage error or unreadable file.',
    )
    .action(
      async (
        protocol: string,
        parts: string[],
        o: { out?: string; force?: boolean; refit?: boolean; key?: string; allowOutside?: boolean; report?: boolean },
      ) => done(await (await import('./commands/merge.js')).mergeCommand({ protocol, parts, ...o }, io)),
    );

  program
    .command('report')
    .description('write a self-contained HTML report of a results folder: methods paragraph, tables, curves, features, audit, signature')
    .argument('<results-dir>', 'folder written by foldseal run')
    .option('--out <file>', 'where to write the report (default: RESULTS_DIR/report.html)')
    .option('--force', 'replace an existing report file')
    .option('--methods', 'print only the methods paragraph, for pasting into a manuscript')
    .option('--protocol <file>', 'the protocol the results came from: its data are audited for the report (reads the data)')
    .option('--pdf <file>', 'also print the report to this PDF with a headless Chromium (needs playwright-core)')
    .option('--browser <path>', 'the Chromium binary for --pdf', '/usr/bin/chromium')
    .addOption(outsideOption())
    .addHelpText(
      'after',
      '\nExamples:\n  foldseal report results/demo\n  foldseal report results/demo --methods\n  foldseal report results/demo ' +
        '--protocol protocols/demo.yaml --out demo-report.html\n\nThe page makes no network request: plots are inline SVG, ' +
        'no scripts or fonts are loaded.\nExit: 0 written, 1 a result file does not match its recorded hash, 2 usage or unreadable input.',
    )
    .action(
      async (
        results: string,
        o: { out?: string; force?: boolean; methods?: boolean; protocol?: string; allowOutside?: boolean; pdf?: string; browser?: string },
      ) => done(await (await import('./commands/report.js')).reportCommand({ results, ...o }, io)),
    );

  program
    .command('apply')
    .description('predict a table of new rows with the saved fold models of a results folder')
    .argument('<results-dir>', 'folder written by foldseal run')
    .argument('<table>', 'CSV or TSV (gzip allowed): the id column and the features the fold models read; a label column is scored')
    .option('--out <file>', 'write the predictions here instead of stdout')
    .addOption(
      new Option('--rule <rule>', "reconcile rule (default: the protocol's)").choices(['mean-probability', 'majority-vote', 'refit']),
    )
    .addOption(new Option('--tie <rule>', 'tie rule for majority-vote').choices(['mean-probability', 'abstain', 'class-order']))
    .addOption(
      new Option(
        '--layout <layout>',
        'samples-in-rows or features-in-rows (one row per feature, one column per sample); default: detected from the header',
      ).choices(['samples-in-rows', 'features-in-rows']),
    )
    .option('--data <file>', "a copy of the run's data file, for k-nearest-neighbour models (they reference their training rows)")
    .option('--allow-outside', "let the run's data be read from outside the review folders")
    .addOption(commandsOption())
    .addHelpText(
      'after',
      '\nExamples:\n  foldseal apply results/demo protocols/data/seedlings-new.csv --out applied.csv\n  foldseal apply ' +
        'results/demo new.csv --rule majority-vote --tie abstain --out voted.csv\n\nmodels.json and predictions.csv are checked ' +
        'against the hashes in results.json first. k-nearest-neighbour models reference their training rows: ' +
        "apply reads the run's data again through the protocol the manifest records (or --data FILE) and checks its hash.",
    )
    .action(
      async (
        results: string,
        table: string,
        o: {
          out?: string;
          rule?: ReconcileRule;
          tie?: TieRule;
          layout?: DataLayout;
          allowCommands?: boolean;
          data?: string;
          allowOutside?: boolean;
        },
      ) => done(await (await import('./commands/apply.js')).applyCommand({ results, table, ...o }, io)),
    );

  program
    .command('compare')
    .description('paired comparison of two cross-validations of the same data on the same folds: B against A, per metric')
    .argument('<a>', 'results folder (or its manifest.json), or a protocol to run in memory')
    .argument('<b>', 'results folder (or its manifest.json), or a protocol to run in memory')
    .option('--level <level>', 'confidence level of the intervals; the tests are read at 1 − level', '0.95')
    .option('--metric <metric>', 'the metric the one-line verdict is about (default: the first metric both report)')
    .addOption(commandsOption())
    .addOption(formatOption())
    .addOption(outsideOption())
    .addHelpText(
      'after',
      '\nExamples:\n  foldseal compare results/demo results/demo-knn\n  foldseal compare protocols/demo.yaml ' +
        'protocols/demo-knn.yaml --metric roc-auc --format json\n\nBoth must use the same data (by hash) and the same fold ' +
        'assignment, or the comparison is refused.\nExit: 0 compared (whatever the verdict), 1 refused or invalid, 2 usage error.',
    )
    .action(
      async (
        a: string,
        b: string,
        o: { level: string; metric?: string; format: 'text' | 'json'; allowOutside?: boolean; allowCommands?: boolean },
      ) => done(await (await import('./commands/compare.js')).compareCommand({ a, b, ...o }, io)),
    );

  program
    .command('audit')
    .description('look for the ways a cross-validated score can be too good: copies, split subjects, label proxies, confounding')
    .argument('<protocol>', 'protocol YAML file')
    .option('--no-selection-bias', 'skip the selection-bias demonstration (two extra cross-validations)')
    .addOption(formatOption())
    .addOption(outsideOption())
    .addHelpText(
      'after',
      '\nExamples:\n  foldseal audit protocols/demo.yaml\n  foldseal audit protocols/demo-expression.yaml --format json\n\n' +
        'Findings are warnings (a likely leak for this design) or notes (seen, not a leak here); thresholds in docs/audit.md.\n' +
        'Exit: 0 no warning, 1 possible leaks or an invalid protocol, 2 usage error or unreadable file.',
    )
    .action(async (protocol: string, o: { format: 'text' | 'json'; allowOutside?: boolean; selectionBias?: boolean }) =>
      done(await (await import('./commands/audit.js')).auditCommand({ protocol, ...o }, io)),
    );

  program
    .command('keygen')
    .description('make an Ed25519 key pair for signing manifests; prints the key fingerprint')
    .requiredOption('--out <prefix>', 'writes PREFIX.key (private, mode 0600) and PREFIX.pub (public)')
    .addHelpText(
      'after',
      '\nExample:\n  foldseal keygen --out ~/.foldseal/lab\n\nThe fingerprint is the SHA-256 of the raw 32-byte public key; ' +
        'publish it with the .pub file.',
    )
    .action(async (o: { out: string }) => done(await (await import('./commands/keygen.js')).keygenCommand(o, io)));

  program
    .command('verify')
    .description('check a manifest: signature, result files, and (with --rerun) a fresh run of its protocol')
    .argument('<manifest>', 'manifest.json written by foldseal run')
    .option('--key <file>', "the author's public key (.pub); pins the signer")
    .option('--allow-unpinned', 'accept a signature made by the key embedded in the manifest, or no signature')
    .option('--rerun', 're-run the protocol on local data and compare assignment, metrics and predictions')
    .option('--data <file>', 'data file for the re-run (its content is compared by hash with the recorded one)')
    .option('--protocol <file>', 're-run this protocol file instead of the embedded copy')
    .option('--allow-unsigned', 're-run a manifest that is not signed by a pinned key (a re-run reads the files it names)')
    .option('--allow-outside', 'let the re-run read files outside the review folder (see README, Security model)')
    .option('--strict', 'a result file missing next to the manifest is an error')
    .addOption(commandsOption())
    .addOption(formatOption())
    .addHelpText(
      'after',
      '\nExamples:\n  foldseal verify results/demo/manifest.json --key author.pub\n  foldseal verify results/demo/manifest.json ' +
        '--key author.pub --rerun\n\nExit: 0 verified (identical), 1 a check failed or the re-run differs, 2 usage or unreadable input.',
    )
    .action(
      async (
        manifest: string,
        o: {
          key?: string;
          allowUnpinned?: boolean;
          allowUnsigned?: boolean;
          allowOutside?: boolean;
          rerun?: boolean;
          data?: string;
          protocol?: string;
          strict?: boolean;
          allowCommands?: boolean;
          format: 'text' | 'json';
        },
      ) => done(await (await import('./commands/verify.js')).verifyCommand({ manifest, ...o }, io)),
    );

  program
    .command('check')
    .description('repository gate: validate every protocol and check data, pinned splits, sealed rows and the lock')
    .argument('[dir]', 'repository folder', '.')
    .addOption(formatOption())
    .option('--staged', 'only protocols touched by the staged git change, and those sharing their data')
    .option('--allow-outside', 'let protocols name files outside DIR and FOLDSEAL_TRUSTED')
    .addHelpText(
      'after',
      '\nExamples:\n  foldseal check\n  foldseal check --staged          # in a pre-commit hook\n  foldseal check . --format json ' +
        '  # for CI annotations\n\nExit: 0 clean, 1 findings, 2 usage error (a corrupt lock, not a git repository).',
    )
    .action(async (dir: string, o: { format: 'text' | 'json'; staged?: boolean; allowOutside?: boolean }) =>
      done(await (await import('./commands/check.js')).checkCommand({ dir, ...o }, io)),
    );

  program
    .command('lock')
    .description('record the current protocols, data hashes and fold assignments in foldseal.lock.json; prints what changed')
    .argument('[dir]', 'repository folder', '.')
    .option('--allow-outside', 'let protocols name files outside DIR and FOLDSEAL_TRUSTED')
    .addHelpText(
      'after',
      '\nExample:\n  foldseal lock && git add foldseal.lock.json\n\nThe lock keeps its sealed and policy sections; commit it so ' +
        'the change is reviewed.',
    )
    .action(async (dir: string, o: { allowOutside?: boolean }) =>
      done(await (await import('./commands/lock.js')).lockCommand({ dir, ...o }, io)),
    );

  return program;
}
