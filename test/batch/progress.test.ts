import { describe, expect, it } from 'vitest';
import { createProgress, formatElapsed, renderProgressLine } from '../../src/cli/progress.js';

function fakeStderr(isTTY: boolean): { write: (s: string | Uint8Array) => boolean; isTTY: boolean; columns: number; text: () => string } {
  let text = '';
  return { write: (s) => ((text += String(s)), true), isTTY, columns: 100, text: () => text };
}

describe('progress bar', () => {
  it('shows fraction, elapsed time and the real-time factor (audio seconds per wall second)', () => {
    // 3600 s of audio, 40 % done after 2 s: 1440 s / 2 s = 720× real time.
    const line = renderProgressLine('long.wav', 0.4, 2000, 3600, 100);
    expect(line).toMatch(/^long\.wav \[#+-+\]  40 % 0:02  720× real time$/);
    const bar = line.slice(line.indexOf('[') + 1, line.indexOf(']'));
    expect(bar.split('').filter((c) => c === '#').length / bar.length).toBeCloseTo(0.4, 1);
  });

  it('formats elapsed time as m:ss or h:mm:ss', () => {
    expect(formatElapsed(0)).toBe('0:00');
    expect(formatElapsed(61_000)).toBe('1:01');
    expect(formatElapsed(3_723_000)).toBe('1:02:03');
  });

  it('draws nothing when stderr is not a terminal', () => {
    const stderr = fakeStderr(false);
    let t = 0;
    const p = createProgress({ stderr, env: {} }, { label: 'x', showAfterMs: 0, now: () => t });
    t = 5000;
    p.update(0.5);
    p.done();
    expect(stderr.text()).toBe('');
  });

  it('stays quiet for short jobs, then draws on one line; no colour codes with NO_COLOR', () => {
    const stderr = fakeStderr(true);
    let t = 0;
    const p = createProgress({ stderr, env: { NO_COLOR: '1' } }, { label: 'x.wav', audioSeconds: 100, showAfterMs: 1000, now: () => t });
    t = 500;
    p.update(0.1);
    expect(stderr.text()).toBe('');
    t = 2000;
    p.update(0.5);
    // 50 s of audio in 2 s: 25× real time.
    expect(stderr.text()).toMatch(/^\r\x1b\[2Kx\.wav \[[#-]+\]  50 % 0:02  25× real time$/);
    expect(stderr.text()).not.toContain('\x1b[2m');
    p.done();
    expect(stderr.text().endsWith('\r\x1b[2K')).toBe(true);
  });

  it('dims the line when colour is allowed', () => {
    const stderr = fakeStderr(true);
    let t = 0;
    const p = createProgress({ stderr, env: {} }, { label: 'x', showAfterMs: 0, now: () => t });
    t = 10;
    p.update(0.2);
    expect(stderr.text()).toContain('\x1b[2m');
  });
});
