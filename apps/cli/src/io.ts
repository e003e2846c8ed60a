/** What a command may touch of the outside world; injected so that tests run commands in-process. */
export interface CliIo {
  stdout(text: string): void;
  stderr(text: string): void;
  readFile(path: string): Promise<string>;
  writeFile(path: string, text: string): Promise<void>;
}

/** Bad input: printed as "loopwright <command>: <message>" and exit code 2. */
export class UsageError extends Error {
  override name = 'UsageError';
}

export interface Command {
  name: string;
  summary: string;
  /** Full help text, printed by `loopwright <command> --help`. */
  help: string;
  /** Parses its own words (it knows which flags take values) with parseArgs from ../args.ts. */
  run(argv: string[], io: CliIo): Promise<number>;
}

export interface ParsedArgs {
  positional: string[];
  /** Flags given once or more; `--set A=1 --set B=2` gives ['A=1', 'B=2']. Bare flags give ['']. */
  flags: Map<string, string[]>;
}
