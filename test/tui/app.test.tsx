import React from 'react';
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup, render } from 'ink-testing-library';
import { App } from '../../src/tui/App.js';
import { NotAvailableError, type DecodeResult } from '../../src/tui/core-modules.js';
import type { DecodedRecording, Services } from '../../src/tui/services.js';
import { realServices } from '../../src/tui/services.js';
import { planKeying } from '../../src/core/timing/plan.js';
import { RECORDINGS } from '../../scripts/make-recordings.js';

const ENTER = '\r';
const DOWN = '\u001b[B';

afterEach(() => cleanup());

async function waitFor(frame: () => string | undefined, check: (f: string) => boolean, what: string, timeoutMs = 15_000): Promise<string> {
  const t0 = Date.now();
  for (;;) {
    const f = frame() ?? '';
    if (check(f)) return f;
    if (Date.now() - t0 > timeoutMs) throw new Error(`timed out waiting for ${what}; last frame:\n${f}`);
    await new Promise((r) => setTimeout(r, 20));
  }
}

const tick = (ms = 30): Promise<void> => new Promise((r) => setTimeout(r, ms));

/** A receiver result made from the planner's marks of a known message (what a perfect receiver would report). */
function decodedFrom(text: string, doubtfulIndex: number | null): DecodeResult {
  const plan = planKeying(text, { wpm: 20 });
  return {
    text: plan.text, wpm: 20, farnsworthWpm: null, unitMs: plan.unitMs, totalMs: plan.totalMs, marks: plan.marks,
    toneHz: 700, snrDb: 20, warnings: [], durationMs: plan.totalMs + 500,
    characters: plan.characters.map((c, i) => ({ text: c.text, startMs: c.startMs, endMs: c.endMs, pattern: c.pattern, confidence: i === doubtfulIndex ? 0.2 : 0.97 })),
    envelope: { frameMs: 10, values: Float32Array.from({ length: 100 }, (_, i) => (i % 10 < 5 ? 1 : 0)), threshold: new Float32Array(100).fill(0.5) },
  };
}

interface Fake extends Services {
  exports: { path: string; force: boolean; format: string }[];
  release(): void;
}

function fakeServices(over: Partial<Services> = {}, exists = false): Fake {
  let release = (): void => undefined;
  const gate = new Promise<void>((r) => (release = r));
  const exports: Fake['exports'] = [];
  return {
    exports,
    release: () => release(),
    listRecordings: async () => ({
      dir: '/demo',
      files: [
        { path: '/demo/q7zkt-beacon.wav', name: 'q7zkt-beacon.wav', sizeBytes: 200_000 },
        { path: '/demo/q3abc-contact.wav', name: 'q3abc-contact.wav', sizeBytes: 300_000 },
      ],
    }),
    decode: async (path, onProgress): Promise<DecodedRecording> => {
      onProgress(0.5);
      await gate;
      return { path, channelNote: null, decode: decodedFrom('Q3ABC DE Q9XYZ', 1), timing: null, timingNote: 'the timing report is not available yet in this build' };
    },
    compare: async () => {
      throw new NotAvailableError('the comparison');
    },
    shape: async () => {
      throw new NotAvailableError('the keying-shape analysis');
    },
    fileExists: () => exists,
    exportPlan: async (_s, format, path, force) => {
      exports.push({ path, force, format });
      return `wrote ${path}`;
    },
    ...over,
  };
}

const SIZE = { columns: 80, rows: 24 };

describe('the app frame', () => {
  it('starts on Plan with the workspace keys in the header and footer', async () => {
    const { lastFrame } = render(<App services={fakeServices()} theme={{ color: false }} size={SIZE} />);
    const f = await waitFor(lastFrame, (x) => x.includes('Settings'), 'the Plan workspace');
    expect(f).toContain('[1 Plan]');
    expect(f).toContain('2 Read back');
    expect(f).toContain('3 Shape');
    expect(f).toContain('? help');
    expect(f.split('\n').length).toBeLessThanOrEqual(24);
    expect(f).not.toMatch(/\u001b\[/); // no colour codes when colour is off (NO_COLOR)
  });

  it('switches workspaces with 2 and 3 and back with 1', async () => {
    const { lastFrame, stdin } = render(<App services={fakeServices()} theme={{ color: false }} size={SIZE} />);
    await waitFor(lastFrame, (x) => x.includes('Settings'), 'Plan');
    stdin.write('2');
    await waitFor(lastFrame, (x) => x.includes('[2 Read back]') && x.includes('q7zkt-beacon.wav'), 'Read back with its list');
    stdin.write('3');
    await waitFor(lastFrame, (x) => x.includes('[3 Shape]') && x.includes('does not certify'), 'Shape');
    stdin.write('1');
    await waitFor(lastFrame, (x) => x.includes('[1 Plan]'), 'Plan again');
  });

  it('shows every key in the help overlay and closes it with any key', async () => {
    const { lastFrame, stdin } = render(<App services={fakeServices()} theme={{ color: false }} size={SIZE} />);
    await waitFor(lastFrame, (x) => x.includes('Settings'), 'Plan');
    stdin.write('?');
    const f = await waitFor(lastFrame, (x) => x.includes('every key'), 'the help');
    for (const k of ['Everywhere', 'Plan', 'Read back', 'Shape', 'Ctrl-C', 'export', 'meant to be sent', 'sweep']) expect(f).toContain(k);
    stdin.write(' ');
    await waitFor(lastFrame, (x) => x.includes('Settings'), 'the help to close');
  });
});

describe('Plan workspace', () => {
  it('edits the message and speed: PARIS at 20 wpm lasts 43 units = 2.58 s', async () => {
    const { lastFrame, stdin } = render(<App services={fakeServices()} theme={{ color: false }} size={SIZE} />);
    await waitFor(lastFrame, (x) => x.includes('Settings'), 'Plan');
    stdin.write(ENTER);
    stdin.write('\u0015'); // Ctrl-U clears the field
    stdin.write('PARIS');
    stdin.write(ENTER);
    stdin.write(DOWN);
    stdin.write(ENTER);
    stdin.write('\u0015');
    stdin.write('20');
    stdin.write(ENTER);
    // The PARIS standard word is 50 units with its 7-unit word gap, so the word alone is 43 units;
    // at 20 wpm a unit is 1200/20 = 60 ms (PARIS timing), 43 × 60 ms = 2.58 s.
    const f = await waitFor(lastFrame, (x) => x.includes('unit 60.0 ms'), 'the plan at 20 wpm');
    expect(f).toContain('Message     PARIS');
    expect(f).toContain('Duration 2.58 s');
    expect(f).toContain('5 characters');
    // Timeline strip at two columns per unit: P = .--. starts dot (2 columns), gap (2), dash (6).
    expect(f).toContain('██··██████··██████··██');
  });

  it('asks before replacing an existing file when exporting', async () => {
    const services = fakeServices({}, true);
    const { lastFrame, stdin } = render(<App services={services} theme={{ color: false }} size={SIZE} />);
    await waitFor(lastFrame, (x) => x.includes('Settings'), 'Plan');
    stdin.write('x');
    await waitFor(lastFrame, (x) => x.includes('Export as wav'), 'the export prompt');
    await waitFor(lastFrame, (x) => x.includes('licence'), 'the transmitting caution for WAV');
    stdin.write(ENTER);
    await waitFor(lastFrame, (x) => x.includes('already exists'), 'the replace question');
    expect(services.exports).toEqual([]);
    stdin.write('y');
    await waitFor(lastFrame, (x) => x.includes('wrote'), 'the written note');
    expect(services.exports).toEqual([{ path: 'vvv-q7zkt-b-jo01.wav', force: true, format: 'wav' }]);
  });
});

describe('Read back workspace', () => {
  it('shows progress, then the decoded text with the doubtful character marked', async () => {
    const services = fakeServices();
    const { lastFrame, stdin } = render(<App services={services} theme={{ color: false }} size={SIZE} start="read" />);
    await waitFor(lastFrame, (x) => x.includes('q7zkt-beacon.wav'), 'the list');
    stdin.write(DOWN);
    stdin.write(ENTER);
    await waitFor(lastFrame, (x) => x.includes('Decoding q3abc-contact.wav') && x.includes('50 %'), 'the progress bar');
    stdin.write('1'); // keys stay live while decoding, and the header says what runs behind
    await waitFor(lastFrame, (x) => x.includes('[1 Plan]') && x.includes('… decoding 50 %'), 'Plan during the decode');
    stdin.write('2');
    services.release();
    const f = await waitFor(lastFrame, (x) => x.includes('Q3ABC DE Q9XYZ'), 'the decoded text');
    const lines = f.split('\n');
    const row = lines.findIndex((l) => l.includes('Q3ABC DE Q9XYZ'));
    // Character 1 (the 3) had confidence 0.2: a ? stands under it.
    expect(lines[row + 1]![lines[row]!.indexOf('Q3ABC') + 1]).toBe('?');
    expect(f).toContain('12 characters · 1 doubtful (? under it)');
    expect(f).toContain('20.0 wpm');
    expect(f).toContain('tone 700 Hz');
    expect(f).toContain('the timing report is not available yet');
  });

  it('says plainly when the receiver is not available', async () => {
    const services = fakeServices({
      decode: async () => {
        throw new NotAvailableError('the receiver');
      },
    });
    const { lastFrame, stdin } = render(<App services={services} theme={{ color: false }} size={SIZE} start="read" />);
    await waitFor(lastFrame, (x) => x.includes('q7zkt-beacon.wav'), 'the list');
    stdin.write(ENTER);
    await waitFor(lastFrame, (x) => x.includes('not available yet'), 'the not-available note');
  });

  it('decodes a bundled demo recording with the real receiver', async () => {
    const spec = RECORDINGS.find((r) => r.file === 'beacon-after-fix.wav')!;
    const { lastFrame } = render(
      <App services={realServices()} theme={{ color: false }} size={{ columns: 100, rows: 30 }} target={`recordings/${spec.file}`} />,
    );
    // The text the recording was synthesized from (scripts/make-recordings.ts), normalised by the planner.
    const expected = planKeying(spec.text, { wpm: spec.wpm }).text;
    const f = await waitFor(lastFrame, (x) => x.includes(expected), 'the decoded beacon text', 40_000);
    expect(f).toContain('beacon-after-fix.wav');
    expect(f).toMatch(/1[78]\.\d wpm/); // sent at 18 wpm
    expect(f).toContain(`tone ${spec.toneHz} Hz`);
  });
});

describe('Shape workspace', () => {
  it('shows a clear not-available state', async () => {
    const { lastFrame, stdin } = render(<App services={fakeServices()} theme={{ color: false }} size={SIZE} start="shape" />);
    await waitFor(lastFrame, (x) => x.includes('[3 Shape]'), 'Shape');
    stdin.write('p');
    await waitFor(lastFrame, (x) => x.includes('Not available yet'), 'the not-available note');
  });
});
