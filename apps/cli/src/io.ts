/** What a command may touch of the outside world; injected so that tests run commands in-process. */
export interface CliIo {
  stdout(text: string): void;
  stderr(text: string): void;
  readFile(path: string): Promise<string>;
  writeFile(path: string, text: string): Promise<void>;
  /** All of standard input as text (for a FILE given as "-"); absent where there is none. */
  readStdin?(): Promise<string>;
}

/** Bad input: printed as "loopwright <command>: <message>" and exit code 2; `at` names the flag or field at fault. */
export class UsageError extends Error {
  override name = 'UsageError';
  constructor(
    message: string,
    readonly at: string | null = null,
  ) {
    super(message);
  }
}

/** A result could not be written (exit code 2; the message names the path). */
export class WriteError extends Error {
  override name = 'WriteError';
  constructor(
    message: string,
    readonly at: string,
  ) {
    super(message);
  }
}

export interface Command {
  name: string;
  summary: string;
  /** Full help text, printed by `loopwright <command> --help`. */
  help: string;
  /**
   * Parses its own words (it knows which flags take values) with parseArgs from ../args.ts.
   * `budget.deadline` (performance.now() ms, from --time-limit) goes to every study it runs.
   */
  run(argv: string[], io: CliIo, budget?: { deadline?: number }): Promise<number>;
}

export interface ParsedArgs {
  positional: string[];
  /** Flags given once or more; `--set A=1 --set B=2` gives ['A=1', 'B=2']. Bare flags give ['']. */
  flags: Map<string, string[]>;
}
