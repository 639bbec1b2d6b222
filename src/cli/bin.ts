#!/usr/bin/env node
import { main } from './main.js';
import { processIo } from './io.js';

// A closed pipe (`keyform … | head`) ends the program quietly instead of with an EPIPE trace.
for (const stream of [process.stdout, process.stderr]) {
  stream.on('error', (err: NodeJS.ErrnoException) => {
    if (err.code === 'EPIPE') process.exit(0);
    throw err;
  });
}

main(process.argv.slice(2), processIo()).then(
  (code) => {
    process.exitCode = code;
  },
  (err: unknown) => {
    process.stderr.write(`keyform: internal error: ${(err as Error)?.message ?? String(err)}\n`);
    process.exitCode = 1;
  },
);
