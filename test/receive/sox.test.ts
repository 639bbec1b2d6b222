/**
 * Recordings made by an independent tool: Debian's `sox` synthesises each dot and dash as a sine
 * burst and each space as silence, and joins them. The sequence comes from the ITU-R M.1677-1
 * patterns typed below (not from keyform's alphabet or planner), with the spacing of §2 of the
 * Recommendation: dash = 3 dots, 1 dot between elements, 3 between letters, 7 between words.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeSamples, pickChannel } from '../../src/core/receive/index.js';
import { decodeWavBytes } from '../../src/io/wav-read.js';
import { runCli } from '../../testkit/cli.js';

/** ITU-R M.1677-1 Part I §1.1 patterns for the characters these tests send. */
const M1677: Record<string, string> = {
  A: '.-', B: '-...', C: '-.-.', D: '-..', E: '.', K: '-.-', Q: '--.-', R: '.-.', S: '...', T: '-', Z: '--..', '3': '...--', '7': '--...', '/': '-..-.',
};

const dir = mkdtempSync(join(tmpdir(), 'keyform-sox-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function sox(args: string[]): void {
  execFileSync('sox', args, { stdio: ['ignore', 'ignore', 'pipe'] });
}

/**
 * Builds a keyed-tone WAV with sox: `synth <s> sine <Hz>` for marks, `trim 0 <s>` of silence for
 * spaces, joined by one `sox a.wav b.wav … out.wav`. PARIS timing: unit = 1.2 / wpm s.
 */
function soxMessage(name: string, text: string, opts: { wpm: number; toneHz: number; rate: number; bits?: number }): string {
  const unitS = 1.2 / opts.wpm;
  const bits = String(opts.bits ?? 16);
  const seg = (key: string, args: string[]): string => {
    const f = join(dir, `${name}-${key}.wav`);
    sox(['-n', '-r', String(opts.rate), '-b', bits, '-c', '1', f, ...args]);
    return f;
  };
  const dit = seg('dit', ['synth', unitS.toFixed(6), 'sine', String(opts.toneHz)]);
  const dah = seg('dah', ['synth', (3 * unitS).toFixed(6), 'sine', String(opts.toneHz)]);
  const gap = (units: number): string => seg(`gap${units}`, ['trim', '0', (units * unitS).toFixed(6)]);
  const parts: string[] = [gap(5)];
  text.split(' ').forEach((word, w) => {
    if (w > 0) parts.push(gap(7));
    [...word].forEach((ch, c) => {
      if (c > 0) parts.push(gap(3));
      [...M1677[ch]!].forEach((el, e) => {
        if (e > 0) parts.push(gap(1));
        parts.push(el === '-' ? dah : dit);
      });
    });
  });
  parts.push(gap(5));
  const out = join(dir, `${name}.wav`);
  sox([...parts, out]);
  return out;
}

describe('decoding audio made by sox', () => {
  it('8000 Hz 16-bit, 600 Hz tone, 18 wpm', () => {
    const file = soxMessage('a', 'Q7ZKT DE Q3ABC', { wpm: 18, toneHz: 600, rate: 8000 });
    const audio = decodeWavBytes(file, readFileSync(file));
    const r = decodeSamples(audio.channels[0]!, audio.sampleRate);
    expect(r.text).toBe('Q7ZKT DE Q3ABC');
    expect(r.wpm).toBeGreaterThan(18 * 0.95);
    expect(r.wpm).toBeLessThan(18 * 1.05);
    expect(r.toneHz).toBeGreaterThan(598);
    expect(r.toneHz).toBeLessThan(602);
    // Every mark sox made lasts 1 or 3 units (§2 of the Recommendation); the measured lengths
    // come back within 2 ms, and the gaps inside characters within 2 ms of one unit.
    const unitMs = 1200 / 18;
    for (const [a, b] of r.marks) expect(Math.min(Math.abs(b - a - unitMs), Math.abs(b - a - 3 * unitMs))).toBeLessThan(2);
    for (const c of r.characters) {
      const inside = r.marks.filter(([a, b]) => a >= c.startMs && b <= c.endMs);
      for (let i = 1; i < inside.length; i++) expect(Math.abs(inside[i]![0] - inside[i - 1]![1] - unitMs)).toBeLessThan(2);
    }
  });

  it('44100 Hz 24-bit, 850 Hz tone, 30 wpm', () => {
    const file = soxMessage('b', 'TEST DE Q7ZKT/B', { wpm: 30, toneHz: 850, rate: 44100, bits: 24 });
    const audio = decodeWavBytes(file, readFileSync(file));
    expect(audio.encoding).toBe('24-bit PCM');
    const r = decodeSamples(audio.channels[0]!, audio.sampleRate);
    expect(r.text).toBe('TEST DE Q7ZKT/B');
    expect(Math.abs(r.wpm - 30)).toBeLessThan(1.5);
  });

  it('with white noise mixed in by sox (-m), and the stereo pair picked by channel', async () => {
    const clean = soxMessage('c', 'Q3ABC DE Q7ZKT', { wpm: 20, toneHz: 700, rate: 8000 });
    const seconds = readFileSync(clean).length / 16000;
    const noise = join(dir, 'noise.wav');
    // sox's own seeded white noise (-R: repeatable), about −20 dBFS RMS, far stronger than the
    // quantisation floor: the tone (−0 dBFS peak) stands about 9 dB over it in 2500 Hz.
    sox(['-R', '-n', '-r', '8000', '-b', '16', '-c', '1', noise, 'synth', seconds.toFixed(3), 'whitenoise', 'vol', '0.17']);
    const noisy = join(dir, 'noisy.wav');
    sox(['-m', '-v', '0.5', clean, '-v', '1', noise, noisy]);
    const audio = decodeWavBytes(noisy, readFileSync(noisy));
    const r = decodeSamples(audio.channels[0]!, audio.sampleRate);
    expect(r.text).toBe('Q3ABC DE Q7ZKT');
    expect(r.snrDb).not.toBeNull();
    // Stereo: noise alone on the left, the keyed tone plus noise on the right.
    const stereo = join(dir, 'stereo.wav');
    sox(['-M', noise, noisy, stereo]);
    const two = decodeWavBytes(stereo, readFileSync(stereo));
    expect(two.channels).toHaveLength(2);
    expect(pickChannel(two.channels, two.sampleRate).index).toBe(1);
    const cli = await runCli(['decode', stereo]);
    expect(cli.code).toBe(0);
    expect(cli.stdout).toBe('Q3ABC DE Q7ZKT\n');
    expect(cli.stderr).toMatch(/using channel 2 of 2/);
  });
});
