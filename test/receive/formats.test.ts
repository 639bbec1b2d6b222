/**
 * Every sample format and channel layout the issue lists decodes; malformed and compressed files
 * end in one line naming the file and the reason (exit 2); silence and noise are not errors.
 * Conversions and compressed files are made by Debian's sox, independently of keyform's writer.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { encodeWav, type WavEncoding } from '../../src/io/wav-write.js';
import { runCli } from '../../testkit/cli.js';

const TEXT = 'Q7ZKT DE Q3ABC';
const dir = mkdtempSync(join(tmpdir(), 'keyform-fmt-'));
let base = '';
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function keyed(sampleRate: number): Float32Array {
  const plan = planKeying(TEXT, { wpm: 24 });
  return synthesizeTone({ marks: plan.marks, sampleRate, toneHz: 650, levelDb: -3, edge: 'raised-cosine', riseMs: 4, padMs: 300 }).samples;
}

const sox = (args: string[]): void => {
  execFileSync('sox', args, { stdio: ['ignore', 'ignore', 'pipe'] });
};

async function decodeFile(file: string): Promise<{ code: number; text: string; stderr: string; json: Record<string, unknown> | null }> {
  const r = await runCli(['decode', file, '--json']);
  return { code: r.code, text: r.code === 0 ? JSON.parse(r.stdout).text : '', stderr: r.stderr, json: r.code === 0 ? JSON.parse(r.stdout) : null };
}

beforeAll(() => {
  base = join(dir, 'base.wav');
  writeFileSync(base, encodeWav({ sampleRate: 16000, channels: [keyed(16000)], encoding: 's16' }));
});

describe('sample formats', () => {
  for (const encoding of ['u8', 's16', 's24', 's32', 'f32'] as WavEncoding[]) {
    it(`keyform's own ${encoding} file`, async () => {
      const file = join(dir, `own-${encoding}.wav`);
      writeFileSync(file, encodeWav({ sampleRate: 11025, channels: [keyed(11025)], encoding }));
      const r = await decodeFile(file);
      expect(r.code).toBe(0);
      expect(r.text).toBe(TEXT);
    });
  }

  const conversions: [string, string[], string][] = [
    ['8-bit unsigned', ['-e', 'unsigned-integer', '-b', '8'], '8-bit PCM'],
    ['24-bit signed', ['-e', 'signed-integer', '-b', '24'], '24-bit PCM'],
    ['32-bit signed', ['-e', 'signed-integer', '-b', '32'], '32-bit PCM'],
    ['32-bit float', ['-e', 'floating-point', '-b', '32'], '32-bit float'],
  ];
  for (const [name, args, encoding] of conversions) {
    it(`${name} written by sox`, async () => {
      const file = join(dir, `sox-${args.join('')}.wav`);
      sox([base, ...args, file]);
      const r = await decodeFile(file);
      expect(r.code).toBe(0);
      expect(r.text).toBe(TEXT);
      expect(r.json!.encoding).toBe(encoding);
    });
  }

  it('8000 Hz and 192000 Hz', async () => {
    for (const rate of [8000, 192000]) {
      const file = join(dir, `rate-${rate}.wav`);
      writeFileSync(file, encodeWav({ sampleRate: rate, channels: [keyed(rate)], encoding: 's16' }));
      const r = await decodeFile(file);
      expect(r.text).toBe(TEXT);
      expect(r.json!.sampleRate).toBe(rate);
    }
  });
});

describe('channel layouts', () => {
  it('four channels from sox -M: the keyed one is found, and --channel chooses', async () => {
    const silence = join(dir, 'silence16k.wav');
    sox(['-n', '-r', '16000', '-b', '16', '-c', '1', silence, 'trim', '0', String(readFileSync(base).length / 32000)]);
    const quad = join(dir, 'quad.wav');
    sox(['-M', silence, silence, base, silence, quad]);
    const auto = await runCli(['decode', quad]);
    expect(auto.code).toBe(0);
    expect(auto.stdout).toBe(`${TEXT}\n`);
    expect(auto.stderr).toMatch(/using channel 3 of 4/);
    const chosen = await runCli(['decode', quad, '--channel', '3', '--json']);
    expect(JSON.parse(chosen.stdout)).toMatchObject({ text: TEXT, channel: 3, channels: 4 });
    const empty = await runCli(['decode', quad, '--channel', '1']);
    expect(empty.code).toBe(0);
    expect(empty.stdout).toBe('\n');
    const missing = await runCli(['decode', quad, '--channel', '5']);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toBe(`keyform: ${quad}: --channel 5 does not exist (the file has 4 channels)\n`);
  });
});

describe('bad input is one line and exit 2', () => {
  const expectOneLine = (r: { code: number; stderr: string; stdout: string }, file: string, reason: RegExp): void => {
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.split('\n').filter(Boolean)).toHaveLength(1);
    expect(r.stderr.startsWith(`keyform: ${file}: `)).toBe(true);
    expect(r.stderr).toMatch(reason);
    expect(r.stderr).not.toMatch(/at .*\.ts:\d+/);
  };

  it('a text file', async () => {
    const file = join(dir, 'notes.wav');
    writeFileSync(file, 'these are not samples\n');
    expectOneLine(await runCli(['decode', file]), file, /not a WAV file/);
  });

  it('a truncated header', async () => {
    const file = join(dir, 'cut.wav');
    writeFileSync(file, readFileSync(base).subarray(0, 30));
    expectOneLine(await runCli(['decode', file]), file, /truncated|no fmt/);
  });

  it('an empty file and a missing file', async () => {
    const file = join(dir, 'empty.wav');
    writeFileSync(file, '');
    expectOneLine(await runCli(['decode', file]), file, /empty file/);
    const none = join(dir, 'nowhere.wav');
    expectOneLine(await runCli(['decode', none]), none, /no such file/);
  });

  for (const [name, encoding] of [['µ-law', 'u-law'], ['A-law', 'a-law'], ['IMA ADPCM', 'ima-adpcm']] as const) {
    it(`compressed: ${name} (sox -e ${encoding})`, async () => {
      const file = join(dir, `${encoding}.wav`);
      sox([base, '-e', encoding, file]);
      expectOneLine(await runCli(['decode', file]), file, /unsupported WAV encoding/);
    });
  }
});

describe('no signal is not an error', () => {
  it('silence: exit 0, empty text, a warning', async () => {
    const file = join(dir, 'quiet.wav');
    sox(['-n', '-r', '8000', '-b', '16', '-c', '1', file, 'trim', '0', '4']);
    const r = await runCli(['decode', file, '--json']);
    expect(r.code).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.text).toBe('');
    expect(json.marks).toEqual([]);
    expect(json.warnings.join(' ')).toMatch(/no keyed signal found/);
  });

  it('white noise (sox, seeded): exit 0, empty text, a warning', async () => {
    const file = join(dir, 'hiss.wav');
    sox(['-R', '-n', '-r', '8000', '-b', '16', '-c', '1', file, 'synth', '8', 'whitenoise', 'vol', '0.3']);
    const r = await runCli(['decode', file]);
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('\n');
    expect(r.stderr).toMatch(/no keyed signal found/);
  });
});
