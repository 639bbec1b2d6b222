/** What a command may touch of the outside world; tests pass fakes. */
export interface CliIo {
  stdout: { write(chunk: string | Uint8Array): unknown; isTTY?: boolean; columns?: number; rows?: number };
  stderr: { write(chunk: string | Uint8Array): unknown; isTTY?: boolean; columns?: number };
  stdin: NodeJS.ReadableStream & { isTTY?: boolean };
  env: Record<string, string | undefined>;
}

export function processIo(): CliIo {
  return { stdout: process.stdout, stderr: process.stderr, stdin: process.stdin, env: process.env };
}

/** Context handed to every command. */
export interface CommandContext {
  io: CliIo;
  /** Set a non-zero exit code without throwing (1: the operation ran but a check did not pass). */
  setExitCode(code: number): void;
  /** Print a diagnostic line on stderr as `keyform: …`. */
  warn(message: string): void;
  /** Whether colour may be used on stdout (TTY and no NO_COLOR). */
  color: boolean;
}
