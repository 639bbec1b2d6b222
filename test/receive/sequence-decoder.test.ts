import { describe, expect, it } from 'vitest';
import { buildCodeTrie } from '../../src/core/receive/trie.js';
import { SequenceDecoder } from '../../src/core/receive/viterbi.js';

describe('sequence decoder given an unusable duration model', () => {
  it('keeps decoding (no class longer than its ring can hold, nor one that is not a number, reaches the step)', () => {
    // The step runs in WebAssembly over one memory: a table reaching past the ring would read and
    // write other arrays. Such a class is left out instead (its table empty).
    const d = new SequenceDecoder(buildCodeTrie(), { dit: 4, dah: 12, elementGap: 4, letterGap: 12, wordGap: 1e6 }, 256);
    for (let t = 1; t <= 600; t++) d.step(t % 20 < 8 ? 3 : 0, 0, 2);
    expect(Number.isFinite(d.bestScore())).toBe(true);
    d.setModel({ dit: Number.NaN, dah: 12, elementGap: 4, letterGap: 12, wordGap: 28 });
    for (let t = 1; t <= 300; t++) d.step(t % 20 < 8 ? 3 : 0, 0, 2);
    const tables = d['tables'] as Record<string, { min: number; max: number }>;
    expect(Object.values(tables).every((t) => t.min >= 1 && t.max <= 256 / 4)).toBe(true);
    expect(tables.dot).toEqual(expect.objectContaining({ min: 1, max: 0 }));
    expect(d.traceback(0).length).toBeGreaterThan(0);
  });
});
