/**
 * Tone drift: a drifting oscillator (tens of hertz over a recording) and one warming up (a few
 * hertz per second at first) must decode as cleanly as a steady one. The drifting tones are
 * synthesized with a known frequency law, so the tracked tone is checked against that law.
 */
import { describe, expect, it } from 'vitest';
import { decodeSamples } from '../../src/core/receive/index.js';
import { fitToneLine, ToneTracker } from '../../src/core/receive/tone-track.js';
import { synthesizeDriftingTone } from '../../src/core/signal/impair.js';
import { addNoise, gaussianSource, noiseSigmaForSnr, seededRandom } from '../../src/core/signal/noise.js';
import { planKeying } from '../../src/core/timing/plan.js';

const RATE = 8000;
const AMP = 10 ** (-6 / 20);

function drifting(text: string, wpm: number, snrDb: number, offsetHz: (t: number, lengthS: number) => number, seed: number): { x: Float32Array; plan: ReturnType<typeof planKeying>; lengthS: number } {
  const plan = planKeying(text, { wpm });
  const lengthS = (plan.totalMs + 800) / 1000;
  const x = synthesizeDriftingTone({ marks: plan.marks, sampleRate: RATE, toneHz: 700, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 400 }, (t) => offsetHz(t, lengthS)).samples;
  addNoise(x, noiseSigmaForSnr(AMP, RATE, snrDb), seed);
  return { x, plan, lengthS };
}

describe('tone drift', () => {
  it('follows 40 Hz of linear drift over 20 s at 20 wpm, +10 dB, either way', () => {
    for (const sign of [1, -1]) {
      const { x, plan, lengthS } = drifting('Q7ZKT DE Q3ABC TEST RST 599 NAME', 20, 10, (t, T) => (sign * 40 * t) / T, 4);
      expect(lengthS).toBeGreaterThan(18);
      expect(lengthS).toBeLessThan(23);
      const r = decodeSamples(x, RATE);
      expect(r.text).toBe(plan.text);
      // The tone at the end of the recording is 700 ± 40 Hz by construction.
      expect(Math.abs(r.toneHz! - (700 + sign * 40))).toBeLessThan(2);
    }
  });

  it('follows an oscillator warming up: 30 Hz with a 10 s time constant (3 Hz/s at first), +5 dB', () => {
    const { x, plan, lengthS } = drifting('Q3ABC DE Q7ZKT GOOD SIGNAL RST 579 NAME Q7ZKT QTH WIND', 20, 5, (t) => 30 * (1 - Math.exp(-t / 10)), 9);
    const r = decodeSamples(x, RATE);
    expect(r.text).toBe(plan.text);
    expect(Math.abs(r.toneHz! - (700 + 30 * (1 - Math.exp(-lengthS / 10))))).toBeLessThan(2);
  });

  it('follows 5 Hz/s for 40 s at 25 wpm (200 Hz in all)', () => {
    const { x, plan, lengthS } = drifting('Q7ZKT DE Q3ABC TEST RST 599 NAME Q3ABC QTH WIND RAIN COLD FIVE WATTS LOOP WIRE', 25, 10, (t) => 5 * t, 12);
    expect(5 * lengthS).toBeGreaterThan(150);
    const r = decodeSamples(x, RATE);
    expect(r.text).toBe(plan.text);
  });

  it('fits the drift of the pre-roll: 2 Hz/s read within 0.1 Hz/s, the starting tone within 0.5 Hz', () => {
    const { x } = drifting('Q7ZKT DE Q3ABC TEST', 20, 20, (t) => 2 * t, 3);
    const line = fitToneLine(x.subarray(0, 6 * RATE), RATE, 706);
    expect(line.segments).toBeGreaterThanOrEqual(3);
    expect(Math.abs(line.rateHzPerS - 2)).toBeLessThan(0.1);
    expect(Math.abs(line.startHz - 700)).toBeLessThan(0.5);
  });

  it('the Kalman tracker converges on a ramp from phase steps with the noise it is told', () => {
    // Phase step over a slot of dt seconds for a tone offset Δf: 2π·Δf·dt [analytic]; noise of 0.1 rad.
    const dt = 0.015;
    const k = new ToneTracker({ toneHz: 700, rateHzPerS: 0, stepS: dt, toneSigmaHz: 3, rateSigmaHzPerS: 2 });
    const g = gaussianSource(seededRandom(2));
    let mixer = 700;
    for (let i = 1; i <= 1000; i++) {
      const trueHz = 700 + 3 * i * dt; // 3 Hz/s
      k.step();
      k.measure(mixer, 2 * Math.PI * (trueHz - mixer) * dt + 0.1 * g(), 0.01);
      mixer = k.toneHz;
    }
    expect(Math.abs(k.toneHz - (700 + 3 * 1000 * dt))).toBeLessThan(0.5);
    expect(Math.abs(k.rateHzPerS - 3)).toBeLessThan(0.3);
  });
});
