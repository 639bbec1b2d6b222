/**
 * Fuzzing the logic-capture reader (`keyform timing capture.csv`) with mutated CSV exports: every case
 * must end in key-down intervals (finite, each starting no later than it ends, in time order) or a
 * one-line InputError naming the input — never another exception. The streaming file reader must agree
 * with the in-memory one on every case it is given.
 *
 * CI runs a few thousand cases with a fixed seed; `npm run fuzz` (FUZZ_RUNS=200000) runs longer.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/core/errors.js';
import { parseCapture, readCaptureFile, type Capture } from '../../src/io/capture.js';

const RUNS = Number(process.env.FUZZ_RUNS ?? 3000);
const TIMEOUT_MS = Math.max(60_000, RUNS * 5);
const SEED = Number(process.env.FUZZ_SEED ?? 20261201);
const NAME = 'cap.csv';
const dir = mkdtempSync(join(tmpdir(), 'keyform-capfuzz-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A valid export: a header in one of the accepted spellings, then one row per edge (or per sample). */
const validCapture = fc
  .record({
    header: fc.constantFrom('time_s,state', 'Time [ms],key', 't (us),level', 'time,value', 'Time [s],Channel 0,Channel 1', 'state,startMs,durationMs'),
    edges: fc.array(fc.double({ min: 0.001, max: 500, noNaN: true }), { minLength: 1, maxLength: 40 }),
    words: fc.constantFrom(['1', '0'], ['high', 'low'], ['down', 'up'], ['on', 'off']),
    crlf: fc.boolean(),
  })
  .map(({ header, edges, words, crlf }) => {
    const lines = [header];
    let t = 0;
    edges.forEach((dt, i) => {
      t += dt;
      const state = i % 2 === 0 ? words[0] : words[1];
      if (header.startsWith('state,')) lines.push(`${i % 2 === 0 ? 'down' : 'up'},${t.toFixed(3)},${dt.toFixed(3)}`);
      else if (header.includes('Channel 1')) lines.push(`${t.toFixed(6)},${state},0`);
      else lines.push(`${t.toFixed(6)},${state}`);
    });
    return lines.join(crlf ? '\r\n' : '\n') + '\n';
  });

/** Damage as a file can carry it: characters inserted, cut or replaced, lines repeated or swapped, junk, odd numbers. */
const mutation = fc.oneof(
  fc.record({ kind: fc.constant('insert' as const), at: fc.double({ min: 0, max: 1, noNaN: true }), text: fc.constantFrom('"', ',', '\n', '#', ';', '\t', '\u0000', '\uFEFF', 'NaN', '-', 'e9', ' ', 'x') }),
  fc.record({ kind: fc.constant('cut' as const), at: fc.double({ min: 0, max: 1, noNaN: true }), length: fc.integer({ min: 1, max: 40 }) }),
  fc.record({ kind: fc.constant('number' as const), with: fc.constantFrom('NaN', 'Infinity', '-1', '1e309', '', '0x10', '1,5', '-0', '9'.repeat(40)) }),
  fc.record({ kind: fc.constant('lines' as const), op: fc.constantFrom('repeat', 'swap', 'reverse', 'drop-header'), at: fc.double({ min: 0, max: 1, noNaN: true }) }),
  fc.record({ kind: fc.constant('junk' as const), text: fc.string({ maxLength: 60 }) }),
);

type Mutation = typeof mutation extends fc.Arbitrary<infer M> ? M : never;

function mutate(text: string, ms: readonly Mutation[]): string {
  let s = text;
  for (const m of ms) {
    const pos = 'at' in m ? Math.floor(m.at * s.length) : 0;
    if (m.kind === 'insert') s = s.slice(0, pos) + m.text + s.slice(pos);
    else if (m.kind === 'cut') s = s.slice(0, pos) + s.slice(pos + m.length);
    else if (m.kind === 'number') s = s.replace(/\d+\.\d+/, m.with);
    else if (m.kind === 'junk') s += m.text;
    else {
      const lines = s.split('\n');
      const i = Math.min(lines.length - 1, Math.floor(m.at * lines.length));
      if (m.op === 'repeat') lines.splice(i, 0, lines[i]!);
      else if (m.op === 'swap' && i + 1 < lines.length) [lines[i], lines[i + 1]] = [lines[i + 1]!, lines[i]!];
      else if (m.op === 'reverse') lines.reverse();
      else if (m.op === 'drop-header') lines.shift();
      s = lines.join('\n');
    }
  }
  return s;
}

/** The capture's intervals must be usable as they are: finite, each in order, one after another. */
function checkCapture(c: Capture): void {
  let last = -Infinity;
  for (const [a, b] of c.marks) {
    expect(Number.isFinite(a) && Number.isFinite(b)).toBe(true);
    expect(a).toBeLessThanOrEqual(b);
    expect(a).toBeGreaterThanOrEqual(last);
    last = b;
  }
  for (const w of c.warnings) expect(w).not.toContain('\n');
}

function outcome(run: () => Capture): { marks: Capture['marks'] } | { error: string } {
  try {
    const c = run();
    checkCapture(c);
    return { marks: c.marks };
  } catch (err) {
    if (!(err instanceof InputError)) throw new Error(`escaped ${String((err as Error)?.name)}: ${String((err as Error)?.message)}`);
    expect(err.message).not.toContain('\n');
    expect(err.message.startsWith(`${NAME}: `)).toBe(true);
    expect(err.exitCode).toBe(2);
    return { error: err.message };
  }
}

describe('fuzzing the logic-capture reader', () => {
  it(`mutated CSV exports: intervals or a one-line InputError (${RUNS} cases)`, () => {
    fc.assert(
      fc.property(validCapture, fc.array(mutation, { maxLength: 5 }), (text, ms) => {
        outcome(() => parseCapture(mutate(text, ms), { name: NAME }));
      }),
      { numRuns: RUNS, seed: SEED + 20 },
    );
  }, TIMEOUT_MS);

  it(`the streaming file reader gives what the in-memory reader gives (${Math.max(50, Math.round(RUNS / 20))} cases)`, async () => {
    let i = 0;
    await fc.assert(
      fc.asyncProperty(validCapture, fc.array(mutation, { maxLength: 5 }), async (text, ms) => {
        const damaged = mutate(text, ms);
        const path = join(dir, `case-${i++}.csv`);
        writeFileSync(path, damaged);
        const inMemory = outcome(() => parseCapture(damaged, { name: NAME }));
        let streamed: { marks: Capture['marks'] } | { error: string };
        try {
          const c = await readCaptureFile(path);
          checkCapture(c);
          streamed = { marks: c.marks };
        } catch (err) {
          if (!(err instanceof InputError)) throw new Error(`escaped ${String((err as Error)?.name)}: ${String((err as Error)?.message)}`);
          streamed = { error: err.message.replace(`${path}: `, `${NAME}: `) };
        }
        if ('marks' in inMemory) expect(streamed).toEqual(inMemory);
        else expect('error' in streamed).toBe(true);
      }),
      { numRuns: Math.max(50, Math.round(RUNS / 20)), seed: SEED + 21 },
    );
  }, TIMEOUT_MS);

  it('the unmutated exports are read to the edges they were written from', () => {
    const c = parseCapture('time_ms,state\n0,1\n60,0\n120,1\n300,0\n', { name: NAME });
    expect(c.marks).toEqual([[0, 60], [120, 300]]);
  });
});
