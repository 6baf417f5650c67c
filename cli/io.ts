/** What the CLI may touch of the outside world; `bin.ts` builds it from `process`, tests build their own. */
export interface Io {
  /** Data and help text. */
  stdout(text: string): void;
  /** Summaries, warnings and errors. */
  stderr(text: string): void;
  /** All of standard input, for the input name "-". Absent: "-" is refused. */
  readStdin?(): Promise<Uint8Array>;
  /** Whether stderr is a terminal (progress output only then). */
  readonly stderrIsTTY?: boolean;
  /** The CI environment variable (plain periodic progress lines when set and stderr is no terminal). */
  readonly ci?: string;
}
