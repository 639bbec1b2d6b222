/**
 * Receiver stages against analytic results, and the decoder against timing it must tolerate
 * (Farnsworth spacing, hand-sent jitter and speed drift, a tone off its expected frequency,
 * impulse noise).
 */
import { describe, expect, it } from 'vitest';
import { decodeSamples, findTone, lnI0, pickChannel } from '../../src/core/receive/index.js';
import { Mixer } from '../../src/core/receive/mixer.js';
import { keyingEnvelope } from '../../src/core/signal/edges.js';
import { applyFading, handTiming } from '../../src/core/signal/impair.js';
import { addNoise, noiseSigmaForSnr } from '../../src/core/signal/noise.js';
import { synthesizeTone } from '../../src/core/signal/synth.js';
import { farnsworthGaps } from '../../src/core/timing/speed.js';
import { planKeying } from '../../src/core/timing/plan.js';
import type { Interval } from '../../src/core/timeline.js';

const RATE = 8000;
const AMP = 10 ** (-6 / 20);

function keyed(marks: readonly Interval[], toneHz = 700, sampleRate = RATE): Float32Array {
  return synthesizeTone({ marks, sampleRate, toneHz, levelDb: -6, edge: 'raised-cosine', riseMs: 5, padMs: 400 }).samples;
}

describe('ln I0', () => {
  // I0(x) = Σ (x/2)^(2k) / (k!)² [analytic: the defining series, Abramowitz & Stegun 9.6.10].
  const series = (x: number): number => {
    let term = 1;
    let sum = 1;
    for (let k = 1; k < 400; k++) {
      term *= (x / 2) ** 2 / (k * k);
      sum += term;
    }
    return sum;
  };
  for (const x of [0, 0.5, 2, 3.7, 3.8, 5, 10, 30, 100]) {
    it(`matches the series at x = ${x}`, () => {
      expect(lnI0(x)).toBeCloseTo(Math.log(series(x)), 6);
      expect(lnI0(-x)).toBe(lnI0(x));
    });
  }
});

describe('tone search', () => {
  it('finds a bin-centred sine exactly and an off-bin one within 0.3 Hz', () => {
    for (const hz of [1000, 703.3]) {
      const x = new Float32Array(3 * RATE);
      for (let i = 0; i < x.length; i++) x[i] = 0.5 * Math.sin((2 * Math.PI * hz * i) / RATE);
      const t = findTone(x, RATE);
      expect(t.found).toBe(true);
      expect(Math.abs(t.toneHz - hz)).toBeLessThan(hz === 1000 ? 0.01 : 0.3);
    }
  });

  it('finds no tone in white noise', () => {
    const x = addNoise(new Float32Array(4 * RATE), 0.3, 11);
    expect(findTone(x, RATE).found).toBe(false);
  });
});

describe('mixer', () => {
  it('a sine of amplitude a at the tone gives frames of magnitude a/2; noise of variance v gives E|z|² = v/N', () => {
    // Mixing a·sin(ωn) with e^(−jωn) leaves (a/2j)·e^0 plus an image at −2ω that the boxcar
    // averages out over whole cycles [analytic]. 700 Hz at 8000 Hz: 20 samples = 1.75 cycles of the
    // tone, so use 80-sample frames (3.5 cycles… 7 cycles of the image at 1400 Hz).
    const m = new Mixer(RATE, 700, 80);
    const x = new Float32Array(RATE);
    for (let i = 0; i < x.length; i++) x[i] = 0.8 * Math.sin((2 * Math.PI * 700 * i) / RATE);
    const re = new Float64Array(200);
    const im = new Float64Array(200);
    const n = m.process(x, re, im);
    expect(n).toBe(100);
    for (let k = 0; k < n; k++) expect(Math.hypot(re[k]!, im[k]!)).toBeCloseTo(0.4, 6);
    const noise = addNoise(new Float32Array(RATE * 20), 0.5, 5);
    const m2 = new Mixer(RATE, 700, 20);
    const r2 = new Float64Array(RATE);
    const i2 = new Float64Array(RATE);
    const n2 = m2.process(noise, r2, i2);
    let p = 0;
    for (let k = 0; k < n2; k++) p += r2[k]! ** 2 + i2[k]! ** 2;
    expect(p / n2 / (0.25 / 20)).toBeGreaterThan(0.95);
    expect(p / n2 / (0.25 / 20)).toBeLessThan(1.05);
  });
});

/** Marks for patterns sent one after another at a unit of `u` ms with standard spacing (ITU-R M.1677-1 §2). */
function patternSender(u: number): { marks: Interval[]; send: (pattern: string) => void } {
  const marks: Interval[] = [];
  let t = 0;
  const send = (pattern: string): void => {
    for (const el of pattern) {
      const len = el === '-' ? 3 * u : u;
      marks.push([t, t + len]);
      t += len + u;
    }
    t += 2 * u;
  };
  return { marks, send };
}

describe('decoder', () => {
  const plan = planKeying('Q7ZKT DE Q3ABC TEST', { wpm: 20 });

  it('estimates the SNR as defined (key-down carrier over noise in 2500 Hz) within 1.5 dB', () => {
    for (const snrDb of [-6, 0, 10]) {
      const x = addNoise(keyed(plan.marks), noiseSigmaForSnr(AMP, RATE, snrDb), 30 + snrDb);
      const r = decodeSamples(x, RATE);
      expect(r.text).toBe(plan.text);
      expect(Math.abs(r.snrDb! - snrDb)).toBeLessThan(1.5);
    }
  });

  it('reads Farnsworth spacing (QEX 1990): 18 wpm characters at 8 wpm overall', () => {
    const f = planKeying('Q7ZKT DE Q3ABC', { wpm: 18, farnsworthWpm: 8 });
    expect(f.gapsMs.letter).toBeCloseTo(farnsworthGaps(18, 8).letterGapMs, 6);
    const r = decodeSamples(keyed(f.marks), RATE);
    expect(r.text).toBe('Q7ZKT DE Q3ABC');
    expect(Math.abs(r.wpm - 18)).toBeLessThan(1);
    expect(r.farnsworthWpm).not.toBeNull();
    expect(Math.abs(r.farnsworthWpm! - 8)).toBeLessThan(1);
  });

  it('reads hand-sent timing: dash/dot 2.6 and 3.8, 20 % jitter, speed drifting by 25 %', () => {
    const long = planKeying('Q7ZKT DE Q3ABC TEST RST 599 NAME Q3ABC', { wpm: 16 });
    for (const [dahRatio, seed] of [[2.6, 1], [3.8, 2]] as const) {
      const marks = handTiming(long.marks, { unitMs: long.unitMs, jitterPct: 20, driftPct: 25, dahRatio, wordGapUnits: 8, seed });
      const x = addNoise(keyed(marks), noiseSigmaForSnr(AMP, RATE, 15), seed);
      expect(decodeSamples(x, RATE).text).toBe(long.text);
    }
  });

  it('pulls in a tone 1.5 Hz away from the one it was given', () => {
    const long = planKeying('Q7ZKT DE Q3ABC TEST RST 599 NAME Q3ABC QTH', { wpm: 20 });
    const x = addNoise(keyed(long.marks, 681.5), noiseSigmaForSnr(AMP, RATE, 5), 8);
    const r = decodeSamples(x, RATE, { toneHz: 680 });
    // The first word is decoded from the pre-roll, before the tone loop has pulled in.
    expect(r.text.split(' ').slice(1).join(' ')).toBe(long.text.split(' ').slice(1).join(' '));
    expect(Math.abs(r.toneHz! - 681.5)).toBeLessThan(1);
  });

  it('follows a tone drifting by 30 Hz over 160 s', () => {
    const long = planKeying('Q7ZKT DE Q3ABC TEST RST 599 NAME Q3ABC QTH WIND RAIN COLD '.repeat(5), { wpm: 20 });
    const startMs = -400;
    const n = Math.ceil(((long.totalMs + 800) * RATE) / 1000);
    const env = keyingEnvelope({ marks: long.marks, sampleRate: RATE, edge: 'raised-cosine', riseMs: 5, startMs, lengthSamples: n });
    const x = new Float32Array(n);
    let phase = 0;
    for (let i = 0; i < n; i++) {
      const hz = 680 + (30 * i) / n;
      x[i] = AMP * env[i]! * Math.sin(phase);
      phase += (2 * Math.PI * hz) / RATE;
    }
    addNoise(x, noiseSigmaForSnr(AMP, RATE, 5), 8);
    const r = decodeSamples(x, RATE);
    expect(n / RATE).toBeGreaterThan(150);
    expect(r.text).toBe(long.text);
    expect(Math.abs(r.toneHz! - 710)).toBeLessThan(2);
  });

  it('ignores clicks shorter than an element', () => {
    const x = addNoise(keyed(plan.marks), noiseSigmaForSnr(AMP, RATE, 10), 3);
    // 3 ms bursts as strong as the tone in the middle of every word gap.
    for (let i = 1; i < plan.marks.length; i++) {
      const gapMs = plan.marks[i]![0] - plan.marks[i - 1]![1];
      if (gapMs < 5 * plan.unitMs) continue;
      const mid = Math.round(((plan.marks[i - 1]![1] + gapMs / 2 + 400 + 4.2) * RATE) / 1000);
      for (let k = 0; k < 24; k++) x[mid + k] = 0.5 * Math.sin((2 * Math.PI * 700 * k) / RATE);
    }
    expect(decodeSamples(x, RATE).text).toBe(plan.text);
  });

  it('prints an unknown pattern as * and keeps its dots and dashes', () => {
    const { marks, send } = patternSender(60);
    for (const p of ['--.-', '.....', '.-.-..', '-..', '.']) send(p); // Q 5 (unknown) D E
    const r = decodeSamples(keyed(marks), RATE);
    expect(r.text).toBe('Q5*DE');
    expect(r.characters[2]).toMatchObject({ text: '*', pattern: '.-.-..' });
    expect(r.warnings.join(' ')).toMatch(/not known characters/);
  });

  it('keeps an unknown run longer than six elements as one *, and 8 dots as <HH>', () => {
    const { marks, send } = patternSender(60);
    // Q, an unknown run of 7, E, the error signal (8 dots, a prosign in ITU-R M.1677-1), an unknown
    // run of 9 dots, and T.
    for (const p of ['--.-', '-.-.-.-', '.', '........', '.........', '-']) send(p);
    const r = decodeSamples(keyed(marks), RATE);
    expect(r.text).toBe('Q*E<HH>*T');
    expect(r.characters.map((c) => c.pattern)).toEqual(['--.-', '-.-.-.-', '.', '........', '.........', '-']);
  });

  it('reports no keyed signal for silence and for an empty input', () => {
    for (const x of [new Float32Array(0), new Float32Array(RATE * 3)]) {
      const r = decodeSamples(x, RATE);
      expect(r.text).toBe('');
      expect(r.toneHz).toBeNull();
      expect(r.warnings.join(' ')).toMatch(/no keyed signal found/);
    }
  });

  it('keeps a decimated envelope when asked', () => {
    const r = decodeSamples(keyed(plan.marks), RATE, { keepEnvelope: true });
    expect(r.envelope).toBeDefined();
    expect(r.envelope!.values.length).toBe(r.envelope!.threshold.length);
    expect(r.envelope!.frameMs * r.envelope!.values.length).toBeGreaterThan(r.durationMs - 6500);
  });

  it('reports progress up to 1', () => {
    const seen: number[] = [];
    decodeSamples(keyed(plan.marks), RATE, { onProgress: (f) => seen.push(f) });
    expect(seen.at(-1)).toBe(1);
    expect([...seen].sort((a, b) => a - b)).toEqual(seen);
  });

  it('picks the channel with the keyed tone', () => {
    const tone = keyed(plan.marks);
    const noise = addNoise(new Float32Array(tone.length), 0.05, 9);
    expect(pickChannel([noise, tone], RATE).index).toBe(1);
    expect(pickChannel([tone, noise], RATE).index).toBe(0);
  });
});

describe('impairments', () => {
  it('periodic fades reach −depth dB at half period and 0 dB at the peaks', () => {
    const x = new Float32Array(RATE * 4).fill(1);
    applyFading(x, RATE, { kind: 'periodic', depthDb: 20, periodS: 2 });
    expect(x[0]).toBeCloseTo(1, 6);
    expect(x[RATE]).toBeCloseTo(0.1, 3); // 10^(−20/20)
    expect(x[2 * RATE]).toBeCloseTo(1, 3);
  });

  it('Rayleigh fading keeps the mean power', () => {
    const x = new Float32Array(RATE * 120).fill(1);
    applyFading(x, RATE, { kind: 'rayleigh', dopplerHz: 0.5, seed: 4 });
    let p = 0;
    for (const v of x) p += v * v;
    expect(p / x.length).toBeCloseTo(1, 1);
  });

  it('hand timing without jitter or drift keeps the timeline', () => {
    const p = planKeying('Q7ZKT', { wpm: 20 });
    const out = handTiming(p.marks, { unitMs: p.unitMs, seed: 1 });
    out.forEach(([a, b], i) => {
      expect(a).toBeCloseTo(p.marks[i]![0], 9);
      expect(b).toBeCloseTo(p.marks[i]![1], 9);
    });
  });
});
