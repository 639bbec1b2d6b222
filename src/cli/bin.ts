#!/usr/bin/env node
import { main } from './main.js';
import { processIo } from './io.js';

main(process.argv.slice(2), processIo()).then(
  (code) => {
    process.exitCode = code;
  },
  (err: unknown) => {
    process.stderr.write(`keyform: internal error: ${(err as Error)?.message ?? String(err)}\n`);
    process.exitCode = 1;
  },
);
