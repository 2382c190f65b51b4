/**
 * Runs cases of the bad-input table in this process (the binary's own entry is covered by
 * test/cli/run.test.ts): exit code, message, no stack trace, no hang, no partial output.
 */
import { existsSync, readdirSync } from 'node:fs';
import t from 'tap';
import { cli, tempDir } from '../helpers.js';
import type { BadInput } from './bad-inputs.cases.js';

export function runBadInputs(cases: readonly BadInput[]): void {
  for (const c of cases) {
    t.test(c.name, async (t) => {
      const dir = tempDir(c.files ?? {});
      c.setup?.(dir);
      const before = new Set(readdirSync(dir));
      const started = Date.now();
      const r = await cli(c.args, dir);
      t.ok(Date.now() - started < 10_000, 'finishes within 10 s');
      const text = r.stderr + r.stdout;
      t.equal(r.code, c.exit, `exit ${c.exit}: ${text.slice(0, 400)}`);
      t.notMatch(text, /internal error|\n\s+at .*:\d+:\d+\)?\n/, 'no stack trace');
      t.match(text, c.match);
      if (c.exit !== 0) {
        const added = readdirSync(dir).filter((e) => !before.has(e));
        t.same(added, [], 'nothing written');
      }
      t.ok(!existsSync(`${dir}/res`) || c.exit === 0, 'no results folder after a failure');
    });
  }
}
