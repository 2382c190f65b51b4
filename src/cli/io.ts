/** Where a command writes. Commands take this instead of touching process streams, so tests can capture them. */
export interface CommandIo {
  out(text: string): void;
  err(text: string): void;
  /** Whether stderr is a terminal (progress lines are shown only then). */
  errIsTty: boolean;
}

export const processIo: CommandIo = {
  out: (t) => void process.stdout.write(t),
  err: (t) => void process.stderr.write(t),
  errIsTty: Boolean(process.stderr.isTTY),
};

/** Exit codes: 0 fine, 1 the input is invalid or differs, 2 usage or unreadable input, 3 a bug in foldseal. */
export type ExitCode = 0 | 1 | 2 | 3;
