/** Reading a results folder written by `foldseal run`: results.json, and files checked against the hashes it records. */
import { join } from 'node:path';
import { error, FoldsealError, type ProblemCode } from '../problems/problem.js';
import { RESULTS_VERSION } from '../run/results.js';
import { fileProblem, readRegular } from './files.js';
import { sha256Bytes } from './hash.js';
import { shown } from './validate.js';

/** A file's bytes; an unreadable file is a usage error (exit 2). */
export async function readInput(path: string): Promise<Buffer> {
  try {
    return await readRegular(path);
  } catch (e) {
    throw new FoldsealError(fileProblem(e as NodeJS.ErrnoException, shown(path), { file: shown(path) }), 2);
  }
}

export function parseJson(bytes: Buffer, path: string): any {
  try {
    return JSON.parse(bytes.toString('utf8'));
  } catch (e) {
    throw new FoldsealError(error('not-json', `${shown(path)} is not valid JSON (${(e as Error).message})`, { file: shown(path) }), 1);
  }
}

/** results.json of a results folder, in the format this foldseal reads. */
export async function readResults(dir: string): Promise<any> {
  const path = join(dir, 'results.json');
  const results = parseJson(await readInput(path), path);
  if (results?.['foldseal-results'] !== RESULTS_VERSION) {
    throw new FoldsealError(
      error(
        'results-version',
        `${shown(path)} has results format ${JSON.stringify(results?.['foldseal-results'])}; this foldseal reads format ${RESULTS_VERSION}`,
        { file: shown(path) },
      ),
      1,
    );
  }
  return results;
}

/** A file of the folder whose bytes must match the SHA-256 results.json records for it. */
export async function readRecorded(dir: string, name: string, results: any, code: ProblemCode, hint?: string): Promise<Buffer> {
  const path = join(dir, name);
  const bytes = await readInput(path);
  if (sha256Bytes(bytes) !== results.files?.[name]) {
    throw new FoldsealError(
      error(code, `${shown(path)} does not match the SHA-256 recorded in results.json${hint ? ' (it was changed after the run)' : ''}`, {
        file: shown(path),
        hint,
      }),
      1,
    );
  }
  return bytes;
}
