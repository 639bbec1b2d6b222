/**
 * Fuzzing the WAV readers with mutated headers and bodies. Every case must end in audio or a one-line
 * InputError naming the input: never another exception, a hang, or output larger than the input allows.
 *
 * CI runs a few thousand cases per property with a fixed seed; `npm run fuzz` (FUZZ_RUNS=200000) runs longer.
 * Another seed: FUZZ_SEED=123 npx vitest run test/fuzz
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/core/errors.js';
import { seededRandom } from '../../src/core/signal/noise.js';
import { analyzeRecording, decodeAudioSource } from '../../src/cli/analyze-recording.js';
import type { BatchRow } from '../../src/cli/batch-row.js';
import { openAudio, openWavBytes, readAllAudio, type AudioSource } from '../../src/io/audio-source.js';
import { decodeWavBytes } from '../../src/io/wav-read.js';
import { RawPcmParser, WavStreamParser } from '../../src/io/wav-stream.js';
import { encodeWav, type WavEncoding } from '../../src/io/wav-write.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { damagedRecording, mutatedWav } from '../../testkit/wav-mutate.js';

const RUNS = Number(process.env.FUZZ_RUNS ?? 3000);
/** Per-test time limit, scaled for long runs (npm run fuzz) [ms]. */
const TIMEOUT_MS = Math.max(60_000, RUNS * 5);
/** Longer recordings for the receiver: a twentieth as many cases. */
const LONG_RUNS = Math.max(50, Math.round(RUNS / 20));
const SEED = Number(process.env.FUZZ_SEED ?? 20261201);
const NAME = 'fuzz.wav';

/** Checks that `err` is the one acceptable failure: a one-line InputError naming the input. */
function expectOneLineInputError(err: unknown, named = true): void {
  if (!(err instanceof InputError)) throw new Error(`escaped ${String((err as Error)?.name)}: ${String((err as Error)?.message)}`);
  expect(err.message).not.toContain('\n');
  // Errors about the file name it; an option the file makes impossible (a tone above half its rate) need not.
  if (named) expect(err.message.startsWith(`${NAME}: `)).toBe(true);
  expect(err.exitCode).toBe(2);
}

/** Streams `bytes` through the push parser in seeded random pieces; returns the number of frames out. */
function streamFrames(bytes: Uint8Array, pieceSeed: number): { frames: number; channelCount: number } {
  const random = seededRandom(pieceSeed);
  const parser = new WavStreamParser(NAME);
  let frames = 0;
  for (let pos = 0; pos < bytes.length; ) {
    const n = 1 + Math.floor(random() * 300);
    for (const c of parser.push(bytes.subarray(pos, pos + n))) {
      for (const ch of c) {
        expect(ch.length).toBe(c[0]!.length);
        for (const v of ch) if (!Number.isFinite(v)) throw new Error('non-finite sample escaped');
      }
      frames += c[0]!.length;
    }
    pos += n;
  }
  parser.finish();
  return { frames, channelCount: parser.format!.channelCount };
}

/** `bytes` in seeded random pieces of 1–300 bytes, as a pipe delivers them. */
function* pieces(bytes: Uint8Array, pieceSeed: number): Generator<Uint8Array> {
  const random = seededRandom(pieceSeed);
  for (let pos = 0; pos < bytes.length; ) {
    const n = 1 + Math.floor(random() * 300);
    yield bytes.subarray(pos, pos + n);
    pos += n;
  }
}

/**
 * The streaming path of openAudio over `bytes` arriving as a pipe in seeded random pieces; every
 * other seed with reused chunk arrays (as `batch` and `decode` read), which must not change a sample.
 */
function openStreamed(bytes: Uint8Array, pieceSeed: number): Promise<AudioSource> {
  async function* pipe(): AsyncGenerator<Uint8Array> {
    yield* pieces(bytes, pieceSeed);
  }
  return openAudio('-', { stdin: pipe(), reuseChunks: (pieceSeed & 1) === 1 });
}

describe('fuzzing the WAV readers', () => {
  it(`streaming parser: result or one-line InputError, output bounded by the input (${RUNS} cases)`, () => {
    fc.assert(
      fc.property(mutatedWav(), fc.integer({ min: 1, max: 2 ** 31 - 1 }), (bytes, pieceSeed) => {
        try {
          const { frames, channelCount } = streamFrames(bytes, pieceSeed);
          // Every sample needs at least one byte of input: no output is sized from a header field.
          expect(frames * channelCount).toBeLessThanOrEqual(bytes.length);
        } catch (err) {
          if (err instanceof Error && /escaped|non-finite/.test(err.message)) throw err;
          expectOneLineInputError(err);
        }
      }),
      { numRuns: RUNS, seed: SEED },
    );
  }, TIMEOUT_MS);

  it(`whole-file path of openAudio: result or one-line InputError, same samples as the streaming parser (${RUNS} cases)`, async () => {
    await fc.assert(
      fc.asyncProperty(mutatedWav(), fc.integer({ min: 1, max: 2 ** 31 - 1 }), async (bytes, pieceSeed) => {
        let whole: Float32Array[] | null = null;
        try {
          whole = await readAllAudio(openWavBytes(NAME, bytes));
        } catch (err) {
          expectOneLineInputError(err);
        }
        if (whole === null) return;
        const total = whole.reduce((s, c) => s + c.length, 0);
        expect(total).toBeLessThanOrEqual(bytes.length);
        for (const ch of whole) for (const v of ch) expect(Number.isFinite(v)).toBe(true);
        // Whatever the whole-file path (wav-decoder for intact files) accepts, the streaming path reads
        // to the same samples, bit for bit, in any pieces.
        const streamed = await readAllAudio(await openStreamed(bytes, pieceSeed));
        expect(streamed).toEqual(whole);
      }),
      { numRuns: RUNS, seed: SEED + 1 },
    );
  }, TIMEOUT_MS);

  it(`whole-file reader (decodeWavBytes): result or one-line InputError once the header passes the streaming check (${RUNS} cases)`, () => {
    fc.assert(
      fc.property(mutatedWav(), (bytes) => {
        // The header check guards the allocation wav-decoder makes from the header's channel count.
        const header = new WavStreamParser(NAME, { headerOnly: true });
        try {
          header.push(bytes);
          header.finish();
        } catch (err) {
          expectOneLineInputError(err);
          return;
        }
        try {
          const audio = decodeWavBytes(NAME, bytes);
          expect(audio.channels.reduce((s, c) => s + c.length, 0)).toBeLessThanOrEqual(bytes.length);
        } catch (err) {
          expectOneLineInputError(err);
        }
      }),
      { numRuns: RUNS, seed: SEED + 2 },
    );
  }, TIMEOUT_MS);

  it(`raw PCM parser: any bytes in any pieces give whole frames or nothing (${RUNS} cases)`, () => {
    fc.assert(
      fc.property(
        fc.uint8Array({ maxLength: 2000 }),
        fc.constantFrom('s16le' as const, 'f32le' as const),
        fc.integer({ min: 1, max: 8 }),
        fc.integer({ min: 1, max: 64 }),
        (bytes, encoding, channelCount, piece) => {
          const parser = new RawPcmParser('-', { encoding, sampleRate: 8000, channelCount });
          let frames = 0;
          for (let pos = 0; pos < bytes.length; pos += piece) {
            for (const c of parser.push(bytes.subarray(pos, pos + piece))) {
              frames += c[0]!.length;
              for (const ch of c) for (const v of ch) expect(Number.isFinite(v)).toBe(true);
            }
          }
          // Frames = whole frames in the input [analytic].
          expect(frames).toBe(Math.floor(bytes.length / ((encoding === 's16le' ? 2 : 4) * channelCount)));
          try {
            parser.finish();
          } catch (err) {
            expect(err).toBeInstanceOf(InputError);
            expect(bytes.length).toBe(0);
          }
        },
      ),
      { numRuns: RUNS, seed: SEED + 3 },
    );
  }, TIMEOUT_MS);

  it(`receiver behind the readers: every mutated file ends in a decode result or a one-line InputError (${RUNS} cases)`, async () => {
    await fc.assert(
      fc.asyncProperty(mutatedWav(), fc.option(fc.integer({ min: 100, max: 5000 })), async (bytes, toneHz) => {
        let result;
        try {
          ({ result } = await decodeAudioSource(openWavBytes(NAME, bytes), { toneHz: toneHz ?? undefined }));
        } catch (err) {
          expectOneLineInputError(err, toneHz === null);
          return;
        }
        expect(typeof result.text).toBe('string');
        expect(Number.isFinite(result.durationMs)).toBe(true);
        for (const [a, b] of result.marks) expect(a <= b).toBe(true);
      }),
      { numRuns: RUNS, seed: SEED + 4 },
    );
  }, TIMEOUT_MS);

  it(`receiver on damaged keyed recordings (dropouts, bursts, random bytes, NaN runs, cut short): result or one-line InputError (${LONG_RUNS} cases)`, async () => {
    const plan = planKeying('Q7ZKT TEST Q7ZKT', { wpm: 25 });
    const full = synthesizeTone({ marks: plan.marks, sampleRate: 8000, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 200 }).samples;
    const keyed = (seconds: number): Float32Array => full.subarray(0, Math.min(full.length, Math.round(seconds * 8000)));
    await fc.assert(
      fc.asyncProperty(damagedRecording(keyed), async (bytes) => {
        try {
          const { result } = await decodeAudioSource(openWavBytes(NAME, bytes));
          expect(typeof result.text).toBe('string');
          for (const [a, b] of result.marks) expect(a <= b && Number.isFinite(a) && Number.isFinite(b)).toBe(true);
        } catch (err) {
          expectOneLineInputError(err);
        }
      }),
      { numRuns: LONG_RUNS, seed: SEED + 5 },
    );
  }, TIMEOUT_MS);

  it(`whole batch analysis (decode, timing, shape) of damaged keyed recordings and mutated files: a row, never an internal error (${LONG_RUNS} + ${LONG_RUNS} cases)`, async () => {
    // What `batch` does with every file. The timing and shape stages turn their failures into
    // warnings, so an exception there would hide as "internal error: …" in a warning: none may appear.
    const plan = planKeying('Q7ZKT TEST Q7ZKT', { wpm: 25 });
    const full = synthesizeTone({ marks: plan.marks, sampleRate: 8000, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 200 }).samples;
    const keyed = (seconds: number): Float32Array => full.subarray(0, Math.min(full.length, Math.round(seconds * 8000)));
    const check = (row: BatchRow): void => {
      expect(['ok', 'no signal', 'mask fail', 'not judged', 'error']).toContain(row.verdict);
      for (const line of [row.error ?? '', ...row.warnings]) {
        expect(line).not.toContain('\n');
        expect(line).not.toMatch(/internal error/);
      }
      if (row.verdict === 'error') expect(row.error).toMatch(/^stdin: /);
      for (const v of [row.durationS, row.wpm, row.toneHz, row.snrDb, row.riseMs, row.occupiedBandwidthHz, row.jitterPct]) {
        if (v !== null) expect(Number.isFinite(v)).toBe(true);
      }
    };
    const analyze = (bytes: Uint8Array, seed: number): Promise<BatchRow> =>
      analyzeRecording('-', { stdin: (async function* () { yield* pieces(bytes, seed); })(), shapeSeconds: 2 });
    await fc.assert(
      fc.asyncProperty(damagedRecording(keyed), fc.integer(), async (bytes, seed) => check(await analyze(bytes, seed))),
      { numRuns: LONG_RUNS, seed: SEED + 6 },
    );
    await fc.assert(
      fc.asyncProperty(mutatedWav(), fc.integer(), async (bytes, seed) => check(await analyze(bytes, seed))),
      { numRuns: LONG_RUNS, seed: SEED + 7 },
    );
  }, TIMEOUT_MS);

  it('the unmutated inputs of the fuzzer are read correctly (the fuzz starts from valid files)', () => {
    for (const encoding of ['u8', 's16', 's24', 's32', 'f32'] as WavEncoding[]) {
      const bytes = encodeWav({ sampleRate: 8000, channels: [new Float32Array(100).fill(0.5)], encoding });
      const { frames } = streamFrames(bytes, 7);
      expect(frames).toBe(100);
    }
  });
});
