/**
 * The WebAssembly the core runs is compiled from its AssemblyScript source in the repository
 * (scripts/wasm-build.ts, `npm run build:wasm`) and committed as base64: this checks that the
 * committed bytes are what the source compiles to, so no one edits one without the other.
 */
import { describe, expect, it } from 'vitest';
import { compileWasm, wasmModuleText, WASM_SOURCES } from '../../scripts/wasm-build.js';
import { readFileSync } from 'node:fs';

describe('committed WebAssembly modules', () => {
  for (const w of WASM_SOURCES) {
    it(`${w.output} is what ${w.source} compiles to`, async () => {
      const bytes = await compileWasm(w.source);
      // A module starts with the magic bytes \0asm and version 1 (WebAssembly Core Specification 5.5.16).
      expect([...bytes.slice(0, 8)]).toEqual([0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00]);
      expect(readFileSync(w.output, 'utf8')).toBe(wasmModuleText(w.source, w.constant, bytes));
    }, 60_000);
  }
});
