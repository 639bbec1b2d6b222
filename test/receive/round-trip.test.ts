/**
 * Round trip: every message the encoder turns into a WAV file decodes back to the same text, at any
 * speed from 5 to 60 wpm, with every edge shape, at sample rates from 8000 to 96000 Hz.
 * The WAV is made exactly as `keyform encode --out x.wav` makes it (planKeying → synthesizeTone →
 * 16-bit encodeWav) and read back through the WAV reader.
 */
import fc from 'fast-check';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { PATTERN_TO_TEXT, PROSIGNS, patternForChar, textForPattern } from '../../src/core/morse/alphabet.js';
import { decodeSamples } from '../../src/core/receive/index.js';
import { EDGE_KINDS, type EdgeKind } from '../../src/core/signal/edges.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { decodeWavBytes } from '../../src/io/wav-read.js';
import { encodeWav } from '../../src/io/wav-write.js';
import { runCli } from '../../testkit/cli.js';

/** Characters a receiver prints exactly as they are written (so the text compares directly). */
const SELF_SPELLED: string[] = [
  ...[...'ABCDEFGHIJKLMNOPQRSTUVWXYZÉ0123456789.,:?\'-/)"=@'].filter((c) => {
    const p = patternForChar(c);
    return p !== undefined && textForPattern(p) === c;
  }),
  ...Object.keys(PROSIGNS)
    .map((name) => `<${name}>`)
    .filter((t) => [...PATTERN_TO_TEXT.values()].includes(t)),
];

const word = fc.array(fc.constantFrom(...SELF_SPELLED), { minLength: 1, maxLength: 5 }).map((cs) => cs.join(''));
const message = fc
  .array(word, { minLength: 2, maxLength: 4 })
  .map((ws) => ws.join(' '))
  // At least five characters, so that speed is not ambiguous (a lone "T" at 20 wpm is an "E" at 60).
  .filter((m) => planKeying(m, { wpm: 20 }).characterCount >= 5);

const RATES = [8000, 11025, 16000, 22050, 44100, 48000, 96000];

describe('round trip through a WAV file', () => {
  it('the alphabet used for messages has letters, figures, signs and prosigns', () => {
    expect(SELF_SPELLED).toContain('Q');
    expect(SELF_SPELLED).toContain('7');
    expect(SELF_SPELLED).toContain('?');
    expect(SELF_SPELLED).toContain('<AR>');
    expect(SELF_SPELLED).toContain('<SK>');
    expect(SELF_SPELLED).not.toContain('+'); // printed as <AR>
  });

  it('decodes random messages at 5–60 wpm, all edge kinds, 8000–96000 Hz', () => {
    fc.assert(
      fc.property(
        message,
        fc.integer({ min: 5, max: 60 }),
        fc.constantFrom(...(EDGE_KINDS as EdgeKind[])),
        fc.constantFrom(...RATES),
        fc.integer({ min: 400, max: 1200 }),
        (text, wpm, edge, sampleRate, toneHz) => {
          const plan = planKeying(text, { wpm });
          const tone = synthesizeTone({ marks: plan.marks, sampleRate, toneHz, levelDb: -6, edge, riseMs: Math.min(5, plan.unitMs / 4), padMs: 250 });
          const wav = encodeWav({ sampleRate, channels: [tone.samples], encoding: 's16' });
          const audio = decodeWavBytes('x.wav', wav);
          const result = decodeSamples(audio.channels[0]!, audio.sampleRate);
          expect(result.text).toBe(plan.text);
          // Speed within 5 % of the plan's (unit = 1200 / wpm ms, PARIS).
          expect(Math.abs(result.wpm - wpm) / wpm).toBeLessThan(0.05);
          expect(Math.abs(result.toneHz! - toneHz)).toBeLessThan(2);
          expect(result.characters.map((c) => c.pattern).join(' ')).toBe(plan.characters.map((c) => c.pattern).join(' '));
        },
      ),
      { numRuns: 48, seed: 20261201 },
    );
  });

  it('marks land on the plan: each edge within 1 ms (edges are centred on the planned times)', () => {
    for (const [wpm, sampleRate] of [[12, 8000], [25, 44100], [40, 16000]] as const) {
      const plan = planKeying('Q3ABC DE Q7ZKT', { wpm });
      const tone = synthesizeTone({ marks: plan.marks, sampleRate, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 4, padMs: 250 });
      const result = decodeSamples(tone.samples, sampleRate);
      expect(result.marks).toHaveLength(plan.marks.length);
      result.marks.forEach(([a, b], i) => {
        const [pa, pb] = plan.marks[i]!;
        expect(Math.abs(a - (pa - tone.startMs))).toBeLessThan(1);
        expect(Math.abs(b - (pb - tone.startMs))).toBeLessThan(1);
      });
    }
  });
});

describe('round trip through the command line', () => {
  const dir = mkdtempSync(join(tmpdir(), 'keyform-rx-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('keyform encode --out x.wav, then keyform decode x.wav --json', async () => {
    const wav = join(dir, 'q7zkt.wav');
    const enc = await runCli(['encode', 'Q7ZKT TEST DE Q3ABC <AR>', '--wpm', '22', '--rate', '16000', '--out', wav]);
    expect(enc.code).toBe(0);
    const dec = await runCli(['decode', wav, '--json']);
    expect(dec.code).toBe(0);
    const json = JSON.parse(dec.stdout);
    expect(json.text).toBe('Q7ZKT TEST DE Q3ABC <AR>');
    expect(json.wpm).toBeCloseTo(22, 0);
    expect(json.toneHz).toBeCloseTo(700, 0);
    expect(Object.keys(json)).toEqual(expect.arrayContaining(['text', 'wpm', 'toneHz', 'snrDb', 'marks', 'characters', 'warnings']));
    expect(json.characters[0]).toMatchObject({ text: 'Q', pattern: '--.-' });
    expect(json.characters[0].confidence).toBeGreaterThan(0.9);
    expect(json.marks[0]).toHaveLength(2);
    const plain = await runCli(['decode', wav]);
    expect(plain.code).toBe(0);
    expect(plain.stdout).toBe('Q7ZKT TEST DE Q3ABC <AR>\n');
    expect(plain.stderr).toMatch(/2[12](\.\d)? wpm, tone (699|700)\.\d Hz, SNR/);
  });
});
