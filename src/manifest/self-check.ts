/**
 * A manifest checked against itself, before anything is re-run: the recorded hashes must be the
 * hashes of what the manifest embeds, and the counts must agree. A signature vouches for the
 * bytes; this vouches that the bytes tell one consistent story. Pure.
 */
import { createHash } from 'node:crypto';
import { error, type Problem, type ProblemCode } from '../problems/problem.js';
import { csvCells } from '../table/csv-write.js';
import { canonicalJson, canonicalSha256 } from './canonical.js';

/** `resultsJson`: the text of results.json next to the manifest, when it is there. */
export function selfCheck(m: any, file: string, resultsJson?: string): Problem[] {
  const out: Problem[] = [];
  const bad = (code: ProblemCode, message: string) => out.push(error(code, message, { file }));
  const protocolSha = canonicalSha256(m.protocol.document);
  if (protocolSha !== m.protocol.sha256)
    bad('manifest-protocol-hash', `protocol.sha256 is ${m.protocol.sha256}, but the embedded protocol document hashes to ${protocolSha}`);
  const triples = m.split.assignment as [string, number, number][];
  const ids = triples.map((t) => t[0]);
  const csv =
    'id,repeat,fold\n' +
    csvCells(ids)
      .map((id, i) => `${id},${triples[i][1]},${triples[i][2]}\n`)
      .join('');
  const csvSha = createHash('sha256').update(csv).digest('hex');
  if (csvSha !== m.split['assignment-sha256'])
    bad(
      'manifest-assignment-hash',
      `split.assignment-sha256 is ${m.split['assignment-sha256']}, but the embedded assignment's CSV hashes to ${csvSha}`,
    );
  const rows = m.data.rows as number;
  const repeats = m.split.repeats as number;
  const folds = m.split.folds as number;
  const perRepeat = new Map<number, Set<string>>();
  let outOfRange = 0;
  for (const [id, r, f] of triples) {
    if (!Number.isInteger(r) || r < 1 || r > repeats || !Number.isInteger(f) || f < 1 || f > folds) {
      outOfRange++;
      continue;
    }
    const set = perRepeat.get(r) ?? new Set<string>();
    set.add(id);
    perRepeat.set(r, set);
  }
  if (outOfRange)
    bad(
      'manifest-assignment-range',
      `${outOfRange} assignment entr${outOfRange === 1 ? 'y names' : 'ies name'} a repeat or fold outside ${repeats} repeats × ` +
        `${folds} folds`,
    );
  const counts = [...Array(repeats)].map((_, i) => perRepeat.get(i + 1)?.size ?? 0);
  if (triples.length !== rows * repeats || counts.some((c) => c !== rows))
    bad(
      'manifest-rows',
      `data.rows is ${rows}, but the assignment holds ${counts.join(', ')} distinct ids per repeat in ${triples.length} entries`,
    );
  const classCounts = m.data['class-counts'] as Record<string, number>;
  const classes = m.data.classes as string[];
  const sum = Object.values(classCounts).reduce((a, b) => a + b, 0);
  if (sum !== rows || canonicalJson(Object.keys(classCounts).sort()) !== canonicalJson([...classes].sort()))
    bad(
      'manifest-class-counts',
      `data.class-counts (${Object.entries(classCounts)
        .map(([c, n]) => `${c}: ${n}`)
        .join(', ')}) do not add up to data.rows (${rows}) over data.classes`,
    );
  if (resultsJson !== undefined) {
    let results: unknown;
    try {
      results = JSON.parse(resultsJson);
    } catch {
      results = undefined;
    }
    if (results === undefined || canonicalJson(results) !== canonicalJson(m.results))
      bad('manifest-results-differ', 'the results embedded in the manifest are not those of results.json next to it');
  }
  return out;
}
