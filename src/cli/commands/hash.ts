import { sha256File } from '../../io/hash.js';
import { fileProblem } from '../../io/files.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';

/** Prints `<hex>  <path>` per file, byte for byte as sha256sum does (including its escaping of odd names). */
export async function hashCommand(args: { files: string[] }, io: CommandIo): Promise<ExitCode> {
  let code: ExitCode = 0;
  for (const file of args.files) {
    try {
      const hex = await sha256File(file);
      // sha256sum escapes backslashes and newlines in names and then prefixes the line with a backslash.
      const odd = /[\\\n\r]/.test(file);
      const name = odd ? file.replaceAll('\\', '\\\\').replaceAll('\n', '\\n').replaceAll('\r', '\\r') : file;
      io.out(`${odd ? '\\' : ''}${hex}  ${name}\n`);
    } catch (e) {
      reportProblems(io, [fileProblem(e as NodeJS.ErrnoException, file, { file })], 'text');
      code = 2;
    }
  }
  return code;
}
