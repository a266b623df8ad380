/** What a command may touch of the outside world; passed in so tests can give their own streams. */
export interface CommandIo {
  /** A line (or lines) for the user on standard output. */
  readonly out: (text: string) => void;
  /** A line (or lines) of diagnostics on standard error. */
  readonly err: (text: string) => void;
  readonly stdout: NodeJS.WriteStream;
  readonly stderr: NodeJS.WriteStream;
  readonly stdin: NodeJS.ReadStream;
  readonly env: NodeJS.ProcessEnv;
}
