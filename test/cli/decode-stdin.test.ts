import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { encodeWav } from '../../src/io/wav-write.js';
import { runCli } from '../../testkit/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-stdin-'));

describe('keyform decode - (stdin)', () => {
  it('decodes raw s16le PCM converted by sox (an independent tool) from a pipe', async () => {
    const wav = join(dir, 'msg.wav');
    expect((await runCli(['encode', 'Q7ZKT DE Q3ABC', '--rate', '8000', '--out', wav])).code).toBe(0);
    // Debian's sox strips the header and writes raw signed 16-bit little-endian samples.
    const raw = execFileSync('sox', [wav, '-t', 'raw', '-e', 'signed', '-b', '16', '-L', '-']);
    const run = await runCli(['decode', '-', '--raw', 's16le', '--rate', '8000'], { stdin: raw });
    expect(run.code).toBe(0);
    expect(run.stdout.trim()).toBe('Q7ZKT DE Q3ABC');
    expect(run.stderr).toMatch(/20(\.\d)? wpm, tone 700\.\d Hz/);
  });

  it('decodes a WAV stream on stdin, with --json', async () => {
    const wav = join(dir, 'msg2.wav');
    await runCli(['encode', 'TEST <AR>', '--rate', '16000', '--wpm', '25', '--out', wav]);
    const run = await runCli(['decode', '-', '--json'], { stdin: readFileSync(wav) });
    expect(run.code).toBe(0);
    const json = JSON.parse(run.stdout);
    expect(json.text).toBe('TEST <AR>');
    expect(json.wpm).toBeCloseTo(25, 0);
  });

  it('asks for the rate of raw PCM in one line', async () => {
    const run = await runCli(['decode', '-', '--raw', 's16le'], { stdin: Buffer.alloc(1000) });
    expect(run.code).toBe(2);
    expect(run.stderr).toBe('keyform: raw PCM needs its sample rate: give --rate HZ\n');
  });

  it('refuses a header whose block size disagrees with its channels, without reserving memory for it', async () => {
    // 2000 channels of 16-bit samples would need a block of 4000 bytes; this header says 2.
    const wav = encodeWav({ sampleRate: 8000, channels: [new Float32Array(100_000)] });
    wav.writeUInt16LE(2000, 22);
    const path = join(dir, 'lying.wav');
    writeFileSync(path, wav);
    const run = await runCli(['decode', path]);
    expect(run.code).toBe(2);
    expect(run.stderr.trim().split('\n')).toHaveLength(1);
    expect(run.stderr).toMatch(/WAV header says 2000 channels|block size 2 does not match 2000 channel/);
  });
});
