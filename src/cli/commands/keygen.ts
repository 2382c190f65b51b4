import { writeKeyPair } from '../../io/keys.js';
import type { CommandIo, ExitCode } from '../io.js';

export async function keygenCommand(args: { out: string }, io: CommandIo): Promise<ExitCode> {
  const fp = await writeKeyPair(args.out);
  io.err(`wrote ${args.out}.key (private, mode 0600) and ${args.out}.pub (public)\n`);
  io.out(`${fp}\n`);
  return 0;
}
