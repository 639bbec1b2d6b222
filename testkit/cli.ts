import { PassThrough } from 'node:stream';
import { main } from '../src/cli/main.js';
import type { CliIo } from '../src/cli/io.js';

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
  stdoutBytes: Buffer;
}

/** Runs the keyform CLI in-process with fake streams and returns its exit code and output. */
export async function runCli(argv: string[], options: { stdin?: string | Buffer; env?: Record<string, string> } = {}): Promise<CliRun> {
  const out: Buffer[] = [];
  const err: Buffer[] = [];
  const stdin = new PassThrough();
  stdin.end(options.stdin ?? '');
  const io: CliIo = {
    stdout: { write: (c) => out.push(Buffer.from(c)), isTTY: false },
    stderr: { write: (c) => err.push(Buffer.from(c)), isTTY: false },
    stdin,
    env: { NO_COLOR: '1', ...(options.env ?? {}) },
  };
  const code = await main(argv, io);
  const stdoutBytes = Buffer.concat(out);
  return { code, stdout: stdoutBytes.toString('utf8'), stderr: Buffer.concat(err).toString('utf8'), stdoutBytes };
}
