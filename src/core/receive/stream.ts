import { InputError, checkRange } from '../errors.js';
import type { Interval, Timeline } from '../timeline.js';
import { Assembler, type DecodedCharacter } from './assemble.js';
import { estimateTimingCandidates, withLevels, type TimingEstimate } from './estimate-timing.js';
import { Mixer } from './mixer.js';
import { LevelSlicer } from './slicer.js';
import { SnrEstimator } from './snr.js';
import { findTone } from './tone.js';
import { fitToneLineFrames, ToneTracker, type ToneLine } from './tone-track.js';
import { buildCodeTrie, type CodeTrie } from './trie.js';
import { SequenceDecoder, type DurationModel, type Segment } from './viterbi.js';
import { FRACTIONAL_ZERO } from './fractional.js';

export interface DecodeResult extends Timeline {
  /** Carrier tone [Hz], or null when no keyed signal was found. */
  toneHz: number | null;
  /** Estimated SNR [dB]: key-down carrier power over noise power in 2500 Hz; null without signal. */
  snrDb: number | null;
  characters: DecodedCharacter[];
  warnings: string[];
  /** Length of the audio [ms]. */
  durationMs: number;
  /** Matched-filter envelope and slicer threshold, decimated for plotting (only with `keepEnvelope`). */
  envelope?: { frameMs: number; values: Float32Array; threshold: Float32Array };
}

export interface DecodeOptions {
  /** Carrier tone [Hz]; found automatically when omitted. */
  toneHz?: number;
  /** Keep a decimated envelope in the result, for plots. */
  keepEnvelope?: boolean;
  /** Progress 0…1 (decodeSamples, or a StreamDecoder told `expectedSamples`). */
  onProgress?: (fraction: number) => void;
  /** Called with each piece of text as it becomes final (a character, with a leading space after a word gap). */
  onText?: (text: string) => void;
  /** Total input length [samples], when known, for `onProgress`. */
  expectedSamples?: number;
}

/** Audio buffered to find the tone and the speed before decoding starts [ms]. */
export const PREROLL_MS = 6000;
/** Target length of a mixer frame [ms]. */
const FRAME_MS = 2.5;
/** Slots per unit at the starting speed. */
const SLOTS_PER_UNIT = 4;
/** How far the tracked tone may wander from the first estimate [Hz], and how fast [Hz/s]. */
const TONE_RANGE_HZ = 300;
const TONE_RATE_MAX = 20;
/** The mixer is retuned when the tracked tone has moved this far [Hz] (0.1 Hz turns a 120 ms block by 4°). */
const RETUNE_HZ = 0.1;
/** Pre-roll frames mixed at one tone when the tone drifts [frames]. */
const PREROLL_RETUNE_FRAMES = 20;
/** Bounds of the tracked timing spread (standard deviation of ln duration). */
const SPREAD_MIN = 0.15;
const SPREAD_MAX = 0.4;
/** Candidate speeds tried on the pre-roll. */
const CANDIDATES = 6;
/** Grid fit (see TimingEstimate.fit) above which the pre-roll needs no likelihood test. */
const TRUSTED_FIT = 0.6;
/** Candidate speeds tested against the best-fitting one: from 0.3 to 3.5 times its unit. */
const RANGE_LO = 0.3;
const RANGE_HI = 3.5;
/** Decisions are final this many units after the fact. */
const LAG_UNITS = 40;
/** Traceback period [slots]. */
const COMMIT_EVERY = 16;
/**
 * commit's realEnd when there is none: −1, a small integer as the slots are, rather than Infinity,
 * which made the engine recompile commit at every recording's end.
 */
const NO_END_SLOT = -1;
/** Reference bandwidth of keyform's SNR [Hz]. */
const SNR_BANDWIDTH_HZ = 2500;
/** Most envelope points kept for plotting. */
const MAX_ENVELOPE_POINTS = 20000;

const TRIE: CodeTrie = buildCodeTrie();

/**
 * Streaming receiver: push chunks of mono samples, then `finish()`.
 *
 * Chain: pre-roll (tone search with fft.js, speed and level estimate) → quadrature mixer and
 * boxcar decimator (frames of about 2.5 ms) → slots of about a quarter unit → level slicer
 * (signal/noise tracking, hysteresis) and tone tracking → sequence decoder (soft decisions, Viterbi
 * over the code tree with speed tracking) → characters. State is bounded: the pre-roll buffer,
 * fixed rings, and the output (marks, characters).
 * @example const d = new StreamDecoder(8000, { onText: (t) => out.write(t) }); d.push(chunk); d.finish().text //=> 'Q7ZKT'
 */
export class StreamDecoder {
  private readonly sampleRate: number;
  private readonly options: DecodeOptions;
  /**
   * options.keepEnvelope, read once: the per-slot code reads this field rather than the caller's
   * options object, whose shape differs from one caller (and recording) to the next, which would
   * make the engine compile that code again.
   */
  private readonly keepEnvelope: boolean;
  private readonly warnings: string[] = [];
  private phase: 'search' | 'run' | 'done' = 'search';
  private preroll: Float32Array;
  private preLen = 0;
  // A fraction field from the start (see FRACTIONAL_ZERO): the millisecond arithmetic below (sample ×
  // 1000 passes 2^31 after 45 s at 48 kHz) is then compiled for fractions once, instead of for small
  // integers first and again when they overflow. The fields below that hold fractions start so too.
  private originSample = FRACTIONAL_ZERO;
  private samplesIn = 0;
  private noSignalReason: string | null = null;

  private mixer: Mixer | null = null;
  private frameRe = new Float64Array(0);
  private frameIm = new Float64Array(0);
  /** Each frame's image gain (see Mixer.process), to take the image out of the edge-refining ring. */
  private frameGRe = new Float64Array(0);
  private frameGIm = new Float64Array(0);
  private frameMs = FRAME_MS;
  private framesPerSlot = 1;
  private slotMs = FRAME_MS;
  private slotRe = FRACTIONAL_ZERO;
  private slotIm = FRACTIONAL_ZERO;
  private slotFill = 0;
  /** The slot being taken [re, im], and the decoder's observation of it [yRe, yIm, q] (see slot). */
  private readonly slotZ = new Float64Array(2);
  private readonly slotY = new Float64Array(3);
  /** The tone tracker's measurement at the slot [mixerHz, stepRad, varianceRad2] (see trackTone). */
  private readonly toneStep = new Float64Array(3);
  private slicer: LevelSlicer | null = null;
  private decoder: SequenceDecoder | null = null;
  private assembler: Assembler;
  private committedSlot = 0;
  private zRe = new Float64Array(0);
  private zIm = new Float64Array(0);
  private toneStartHz = FRACTIONAL_ZERO;
  private replaying = false;
  /** Tone and drift fitted over the pre-roll, and the tracker that follows them afterwards. */
  private toneLine: ToneLine = { startHz: 0, rateHzPerS: 0, segments: 0 };
  private tracker: ToneTracker | null = null;
  /** Ring of frame amplitudes (as long as the decoder's history), for refining mark edges. */
  private frameAmp = new Float32Array(0);
  private frameCount = 0;
  /** frameCount modulo the ring's length: where the next frame goes. */
  private frameSlot = 0;
  private lastMarkEndMs = FRACTIONAL_ZERO;
  /** Where refineEdges put the edges of the last mark [ms] (NaN at first: a field for fractional numbers). */
  private refinedStartMs = NaN;
  private refinedEndMs = NaN;
  private afterElementGap = false;
  private prevOn = false;
  private prevRe = FRACTIONAL_ZERO;
  private prevIm = FRACTIONAL_ZERO;
  private lagSlots = 0;
  private model: DurationModel | null = null;
  private snr = new SnrEstimator();
  private stats = { unitSum: FRACTIONAL_ZERO, unitCount: 0, letterGapSum: FRACTIONAL_ZERO, letterGapCount: 0 };
  private envValues: number[] = [];
  private envThreshold: number[] = [];
  private envDecim = 1;
  private envAcc = 0;
  private envThrAcc = 0;
  private envCount = 0;

  /**
   * @param sampleRate - Sample rate [Hz], 8000…192000.
   * @param options - Tone, envelope, progress and live-text callbacks.
   */
  constructor(sampleRate: number, options: DecodeOptions = {}) {
    checkRange('sample rate', sampleRate, 8000, 192_000, 'Hz');
    if (options.toneHz !== undefined && !(options.toneHz > 0 && options.toneHz < sampleRate / 2)) {
      throw new InputError(`tone must be above 0 and below sampleRate/2 = ${sampleRate / 2} Hz (got ${options.toneHz})`);
    }
    this.sampleRate = sampleRate;
    this.options = options;
    this.keepEnvelope = options.keepEnvelope === true;
    this.preroll = new Float32Array(Math.round((PREROLL_MS / 1000) * sampleRate));
    this.assembler = new Assembler(TRIE, options.onText);
  }

  /** Feeds the next chunk of samples (mono, any length). */
  push(chunk: Float32Array): void {
    if (this.phase === 'done') throw new Error('StreamDecoder: push() after finish()');
    this.samplesIn += chunk.length;
    let rest = chunk;
    while (this.phase === 'search' && rest.length > 0) {
      const take = Math.min(rest.length, this.preroll.length - this.preLen);
      this.preroll.set(rest.subarray(0, take), this.preLen);
      this.preLen += take;
      rest = rest.subarray(take);
      if (this.preLen === this.preroll.length) this.tryLock(false);
    }
    if (this.phase === 'run' && rest.length > 0) this.mix(rest);
    if (this.options.onProgress && this.options.expectedSamples) {
      this.options.onProgress(Math.min(1, this.samplesIn / this.options.expectedSamples));
    }
  }

  /** Ends the stream and returns everything decoded. */
  finish(): DecodeResult {
    if (this.phase === 'search') this.tryLock(true);
    if (this.phase === 'run') {
      // The recording may stop right after the last mark: run the decoder on through a word gap
      // of evidence-free slots, so the last character can close like any other; nothing that
      // starts after the real end is kept.
      const decoder = this.decoder!;
      const realEnd = decoder.t;
      const pad = Math.ceil(1.5 * this.model!.wordGap) + 2;
      for (let i = 0; i < pad; i++) decoder.step(0, 0, 0);
      this.commit(true, realEnd);
      this.assembler.flush();
    }
    this.phase = 'done';
    return this.result();
  }

  // ---- pre-roll: tone, speed, levels --------------------------------------------------------

  private tryLock(final: boolean): void {
    const samples = this.preroll.subarray(0, this.preLen);
    let toneHz = this.options.toneHz;
    if (toneHz === undefined) {
      const found = findTone(samples, this.sampleRate);
      if (!found.found) {
        if (final) {
          this.noSignalReason = 'no keyed signal found (no tone stands out of the noise)';
          this.phase = 'done';
          return;
        }
        // Keep searching: drop the older half of the pre-roll.
        const half = this.preroll.length >> 1;
        this.preroll.copyWithin(0, half, this.preLen);
        this.preLen -= half;
        this.originSample += half;
        return;
      }
      toneHz = found.toneHz;
    }
    this.toneStartHz = toneHz;
    const spf = Math.max(1, Math.round((this.sampleRate * FRAME_MS) / 1000));
    this.frameMs = (spf * 1000) / this.sampleRate;
    let mixer = new Mixer(this.sampleRate, toneHz, spf);
    this.ensureFrameBuffers(samples.length);
    let nFrames = mixer.process(samples, this.frameRe, this.frameIm, this.frameGRe, this.frameGIm);
    // A drifting tone: fit a line to it over the pre-roll's frames, and mix the pre-roll again
    // along that line, a few frames at a time.
    const line = fitToneLineFrames(this.frameRe, this.frameIm, nFrames, 1000 / this.frameMs, toneHz);
    const drifting = line.segments > 0 && Math.abs(line.rateHzPerS) * (samples.length / this.sampleRate) > 1;
    this.toneLine = drifting ? line : { startHz: toneHz, rateHzPerS: 0, segments: 0 };
    if (drifting) {
      mixer = new Mixer(this.sampleRate, line.startHz, spf);
      nFrames = 0;
      const block = PREROLL_RETUNE_FRAMES * spf;
      for (let a = 0; a < samples.length; a += block) {
        mixer.setTone(line.startHz + line.rateHzPerS * ((a + block / 2) / this.sampleRate));
        nFrames += mixer.process(
          samples.subarray(a, Math.min(samples.length, a + block)),
          this.frameRe.subarray(nFrames), this.frameIm.subarray(nFrames), this.frameGRe.subarray(nFrames), this.frameGIm.subarray(nFrames),
        );
      }
    }
    const est = this.bestCandidate(estimateTimingCandidates(this.frameRe, this.frameIm, nFrames, this.frameMs, CANDIDATES), nFrames);
    if (!est) {
      if (!final && this.options.toneHz === undefined) {
        // A tone but no keying yet (e.g. a steady carrier or the start of the recording): keep looking.
        const half = this.preroll.length >> 1;
        this.preroll.copyWithin(0, half, this.preLen);
        this.preLen -= half;
        this.originSample += half;
        return;
      }
      this.noSignalReason = `no keyed signal found (${this.options.toneHz === undefined ? `a tone near ${toneHz.toFixed(1)} Hz, but` : `at ${toneHz} Hz:`} no keying)`;
      this.toneStartHz = toneHz;
      this.phase = 'done';
      return;
    }
    this.mixer = mixer;
    this.start(est);
    const endS = samples.length / this.sampleRate;
    const toneNow = this.toneLine.startHz + this.toneLine.rateHzPerS * endS;
    mixer.setTone(toneNow);
    this.tracker = new ToneTracker({
      toneHz: toneNow, rateHzPerS: this.toneLine.rateHzPerS, stepS: this.slotMs / 1000,
      toneSigmaHz: 2, rateSigmaHzPerS: drifting ? 0.5 : 1,
    });
    this.tracker.setLimits(Math.max(1, this.toneStartHz - TONE_RANGE_HZ), Math.min(this.sampleRate / 2 - 1, this.toneStartHz + TONE_RANGE_HZ), TONE_RATE_MAX);
    this.phase = 'run';
    // The pre-roll was mixed before any tracking: retuning now would not change these frames (and
    // nothing mixes while they are replayed, so the frame buffers are read in place).
    this.replaying = true;
    this.frames(this.frameRe, this.frameIm, this.frameGRe, this.frameGIm, nFrames);
    this.replaying = false;
    this.preroll = new Float32Array(0);
    this.preLen = 0;
  }

  /**
   * Runs the pre-roll through the slicer and sequence decoder at each candidate speed and keeps the
   * candidate under which the data is most likely (the decoder's best path score): speed treated as
   * one more hidden variable of the model.
   */
  private bestCandidate(candidates: TimingEstimate[], nFrames: number): TimingEstimate | null {
    if (candidates.length <= 1) return candidates[0] ?? null;
    // Clean keying: the runs themselves are trustworthy, and the grid's best fit is the answer.
    if (candidates[0]!.fit >= TRUSTED_FIT) return candidates[0]!;
    // A finer slot grid lets the search fit noise better, so the likelihood favours fast
    // candidates: only speeds near the best-fitting one compete.
    const first = candidates[0]!;
    candidates = candidates.filter((c) => c === first || (c.unitMs >= RANGE_LO * first.unitMs && c.unitMs <= RANGE_HI * first.unitMs && c.dahMs / c.ditMs >= 2 && c.dahMs / c.ditMs <= 4.5));
    let best: TimingEstimate | null = null;
    let bestScore = -Infinity;
    // Same levels for every candidate, so that the scores differ by timing alone.
    const { signalPow, noisePow } = candidates[0]!;
    // And the same slot grid: a finer grid fits noise better and would favour fast candidates.
    const commonK = Math.min(...candidates.map((c) => this.framesPerSlotFor(c.unitMs)));
    for (const candidate of candidates) {
      const est = withLevels(candidate, signalPow, noisePow);
      const chain = this.makeChain(est, commonK, first.unitMs);
      const k = chain.framesPerSlot;
      const slots = Math.floor(nFrames / k);
      const z = this.slotZ;
      const y = this.slotY;
      for (let s = 0; s < slots; s++) {
        let zr = 0;
        let zi = 0;
        for (let f = s * k; f < (s + 1) * k; f++) {
          zr += this.frameRe[f]!;
          zi += this.frameIm[f]!;
        }
        z[0] = zr;
        z[1] = zi;
        chain.slicer.stepFrom(z);
        const A2 = chain.slicer.signalPow;
        const N = chain.slicer.noisePow;
        const A = Math.sqrt(A2);
        y[0] = (A / N) * zr;
        y[1] = (A / N) * zi;
        y[2] = A2 / N;
        chain.decoder.stepFrom(y);
      }
      const score = chain.decoder.bestScore();
      if (score > bestScore) {
        bestScore = score;
        best = est;
      }
    }
    return best;
  }

  /** Slot length, slicer, duration model and decoder for a timing estimate. */
  private framesPerSlotFor(unitMs: number): number {
    return Math.max(1, Math.round(unitMs / SLOTS_PER_UNIT / this.frameMs));
  }

  private makeChain(est: TimingEstimate, framesPerSlotOverride?: number, slicerUnitMs?: number): { framesPerSlot: number; slotMs: number; slicer: LevelSlicer; decoder: SequenceDecoder; model: DurationModel; unitSlots: number } {
    const framesPerSlot = framesPerSlotOverride ?? this.framesPerSlotFor(est.unitMs);
    const slotMs = framesPerSlot * this.frameMs;
    const k = framesPerSlot;
    const unitSlots = est.unitMs / slotMs;
    const slicer = new LevelSlicer({
      windowSlots: Math.max(1, Math.round((slicerUnitMs ?? est.unitMs) / slotMs)),
      slotMs,
      signalPow: est.signalPow * k * k, // coherent sum of k frames
      noisePow: est.noisePow * k, // noise adds in power
      framesPerSlot: k,
    });
    // Start from the standard ratios (ITU-R M.1677-1 §2) around the estimated unit, nudged by
    // what the pre-roll showed; stretched letter gaps (Farnsworth, QEX 1990) are taken as they are.
    const u = unitSlots;
    const farnsworth = est.letterGapMs > 4.5 * est.unitMs;
    const letterGap = farnsworth ? est.letterGapMs / slotMs : 3 * u;
    const model: DurationModel = {
      dit: clamp(est.ditMs / slotMs, 0.8 * u, 1.25 * u),
      dah: clamp(est.dahMs / slotMs, 2.6 * u, 3.6 * u),
      elementGap: clamp(est.elementGapMs / slotMs, 0.8 * u, 1.25 * u),
      letterGap,
      wordGap: farnsworth ? Math.max((7 / 3) * letterGap, est.wordGapMs / slotMs) : 7 * u,
      // The decoder's default spreads (SPREAD in viterbi.ts), present from the start: a model given
      // them only at its first decided segment took a second shape, and code compiled for one shape
      // was thrown away when the next file's model arrived with the other. Written out here rather
      // than copied from there: the copy made the engine recompile account() in the second file.
      spread: { dit: 0.3, dah: 0.3, elementGap: 0.35, letterGap: 0.35, wordGap: 0.35 },
    };
    constrainModel(model);
    return { framesPerSlot, slotMs, slicer, decoder: new SequenceDecoder(TRIE, model, 2048), model, unitSlots };
  }

  private start(est: TimingEstimate): void {
    const chain = this.makeChain(est);
    this.framesPerSlot = chain.framesPerSlot;
    this.slotMs = chain.slotMs;
    this.slicer = chain.slicer;
    this.model = chain.model;
    this.decoder = chain.decoder;
    const unitSlots = chain.unitSlots;
    this.lagSlots = Math.min(1024, Math.max(64, Math.round(LAG_UNITS * unitSlots), Math.round(2.5 * this.model.wordGap)));
    this.zRe = new Float64Array(this.decoder.historySlots);
    this.zIm = new Float64Array(this.decoder.historySlots);
    this.frameAmp = new Float32Array(this.decoder.historySlots * this.framesPerSlot);
    this.frameCount = 0;
    this.frameSlot = 0;
  }

  // ---- streaming chain ----------------------------------------------------------------------

  private ensureFrameBuffers(samples: number): void {
    const need = Math.ceil(samples / Math.max(1, Math.round((this.sampleRate * FRAME_MS) / 1000))) + 2;
    if (this.frameRe.length < need) {
      this.frameRe = new Float64Array(need);
      this.frameIm = new Float64Array(need);
      this.frameGRe = new Float64Array(need);
      this.frameGIm = new Float64Array(need);
    }
  }

  private mix(chunk: Float32Array): void {
    const mixer = this.mixer!;
    // One slot at a time, so that a retune by the tone tracker applies from the next slot on. Each
    // range ends where the stream's current slot ends (samplesToSlotEnd), not where the chunk's
    // blocks would: the retunes then fall on the same samples, and the output is the same, however
    // the stream is cut into chunks (a file read a block at a time, or a pipe read as its data come).
    const block = mixer.samplesPerFrame * this.framesPerSlot;
    if (block > mixer.capacity) {
      this.ensureFrameBuffers(block);
      for (let off = 0; off < chunk.length; ) {
        const end = Math.min(chunk.length, off + this.samplesToSlotEnd());
        const n = mixer.processRange(chunk, off, end, this.frameRe, this.frameIm, this.frameGRe, this.frameGIm);
        this.frames(this.frameRe, this.frameIm, this.frameGRe, this.frameGIm, n);
        off = end;
      }
      return;
    }
    // The samples go into the mixer's memory many slots at a time, and each slot's frames are read
    // where the mixer leaves them: the same ranges as above, with no copy per slot.
    const piece = block * Math.floor(mixer.capacity / block);
    for (let p0 = 0; p0 < chunk.length; p0 += piece) {
      const p1 = Math.min(chunk.length, p0 + piece);
      mixer.load(chunk, p0, p1);
      for (let off = p0; off < p1; ) {
        const end = Math.min(p1, off + this.samplesToSlotEnd());
        const n = mixer.mixLoaded(off - p0, end - p0);
        this.frames(mixer.frameRe, mixer.frameIm, mixer.frameGainRe, mixer.frameGainIm, n);
        off = end;
      }
    }
  }

  /** Samples still to mix before the current slot ends: its frames not yet taken, less the frame begun. */
  private samplesToSlotEnd(): number {
    const mixer = this.mixer!;
    return (this.framesPerSlot - this.slotFill) * mixer.samplesPerFrame - mixer.samplesInFrame;
  }

  /**
   * Mixer frames 0…n−1 of `re`/`im` with their image gains `gr`/`gi`. Takes the arrays rather than a
   * frame's four numbers per call: numbers passed to a call the engine does not inline are boxed
   * on the heap, over a million times per hour of audio.
   */
  private frames(re: Float64Array, im: Float64Array, gr: Float64Array, gi: Float64Array, n: number): void {
    for (let i = 0; i < n; i++) {
      const zr = re[i]!;
      const zi = im[i]!;
      const gRe = gr[i]!;
      const gIm = gi[i]!;
      // The ring keeps the carrier's amplitude with the image at twice the tone taken out
      // (c = (z − G·conj(z)) / (1 − |G|²), see Mixer.process): left in, it ripples the frame amplitude
      // by up to ±10 % at 700 Hz and shifts the edges by a few tenths of a millisecond.
      const g2 = gRe * gRe + gIm * gIm;
      const cr = (zr - (gRe * zr + gIm * zi)) / (1 - g2);
      const ci = (zi - (gIm * zr - gRe * zi)) / (1 - g2);
      this.frameAmp[this.frameSlot] = g2 < 0.25 ? Math.sqrt(cr * cr + ci * ci) : Math.sqrt(zr * zr + zi * zi);
      this.frameCount++;
      if (++this.frameSlot === this.frameAmp.length) this.frameSlot = 0;
      this.slotRe += zr;
      this.slotIm += zi;
      if (++this.slotFill === this.framesPerSlot) {
        const sr = this.slotRe;
        const si = this.slotIm;
        this.slotRe = 0;
        this.slotIm = 0;
        this.slotFill = 0;
        this.slotZ[0] = sr;
        this.slotZ[1] = si;
        this.slot();
      }
    }
  }

  /**
   * One slot, its value in slotZ. Arrays rather than arguments, here and in the calls it makes, as
   * numbers passed to a call the engine does not inline are boxed on the heap (several objects per
   * slot otherwise).
   */
  private slot(): void {
    const decoder = this.decoder!;
    const slicer = this.slicer!;
    const z = this.slotZ;
    const zr = z[0]!;
    const zi = z[1]!;
    const on = slicer.stepFrom(z);
    const A2 = slicer.signalPow;
    const N = slicer.noisePow;
    const A = Math.sqrt(A2);
    const y = this.slotY;
    y[0] = (A / N) * zr;
    y[1] = (A / N) * zi;
    y[2] = A2 / N;
    decoder.stepFrom(y);
    const ti = decoder.t % decoder.historySlots;
    this.zRe[ti] = zr;
    this.zIm[ti] = zi;
    this.trackTone(on);
    if (this.keepEnvelope) this.keepEnvelopePoint(slicer.envelope, slicer.threshold);
    if (decoder.t % COMMIT_EVERY === 0) this.commit(false);
  }

  /**
   * Tone tracking: the phase step between consecutive key-down slots measures the tone's offset
   * from the mixer; a Kalman filter (ToneTracker) follows the tone and its drift rate, and the
   * mixer is retuned to it.
   */
  private trackTone(on: boolean): void {
    const zr = this.slotZ[0]!;
    const zi = this.slotZ[1]!;
    if (!this.replaying) {
      const tracker = this.tracker!;
      const mixer = this.mixer!;
      tracker.step();
      const p1 = zr * zr + zi * zi;
      const p0 = this.prevRe * this.prevRe + this.prevIm * this.prevIm;
      if (on && this.prevOn && p1 > 0 && p0 > 0) {
        const cr = zr * this.prevRe + zi * this.prevIm;
        const ci = zi * this.prevRe - zr * this.prevIm;
        // Phase noise of a slot with carrier-to-noise ratio ρ ≈ 1/(2ρ) [analytic, high SNR], at most
        // that of a uniform phase; ρ from the slot's own power p less the noise power N. Written out
        // for both slots: a call here would box its numbers on the heap.
        const N = this.slicer!.noisePow;
        const m = this.toneStep;
        m[0] = mixer.toneHz;
        m[1] = Math.atan2(ci, cr);
        m[2] = Math.min(PHASE_VARIANCE_MAX, N / (2 * Math.max(p1 - N, 1e-3 * N))) + Math.min(PHASE_VARIANCE_MAX, N / (2 * Math.max(p0 - N, 1e-3 * N)));
        tracker.measureFrom(m);
      }
      tracker.clamp();
      // Retune (a table rebuild) only when the tracked tone has moved a little.
      if (Math.abs(tracker.toneHz - mixer.toneHz) > RETUNE_HZ) mixer.setTone(tracker.toneHz);
    }
    this.prevOn = on;
    this.prevRe = zr;
    this.prevIm = zi;
  }

  private keepEnvelopePoint(value: number, threshold: number): void {
    this.envAcc = Math.max(this.envAcc, value);
    this.envThrAcc += threshold;
    if (++this.envCount < this.envDecim) return;
    this.envValues.push(this.envAcc);
    this.envThreshold.push(this.envThrAcc / this.envCount);
    this.envAcc = 0;
    this.envThrAcc = 0;
    this.envCount = 0;
    if (this.envValues.length >= MAX_ENVELOPE_POINTS) {
      const v: number[] = [];
      const th: number[] = [];
      for (let i = 0; i + 1 < this.envValues.length; i += 2) {
        v.push(Math.max(this.envValues[i]!, this.envValues[i + 1]!));
        th.push(0.5 * (this.envThreshold[i]! + this.envThreshold[i + 1]!));
      }
      this.envValues = v;
      this.envThreshold = th;
      this.envDecim *= 2;
    }
  }

  /** Milliseconds from the start of the audio at the end of slot `slot`. */
  private slotToMs(slot: number): number {
    return ((this.originSample + slot * this.framesPerSlot * this.mixer!.samplesPerFrame) * 1000) / this.sampleRate;
  }

  /** Makes the decisions older than the lag final (all of them at the end). */
  private commit(final: boolean, realEnd = NO_END_SLOT): void {
    const decoder = this.decoder!;
    const limit = final ? decoder.t : decoder.t - this.lagSlots;
    if (limit <= this.committedSlot) return;
    const segments = decoder.traceback(this.committedSlot, limit);
    // An indexed loop, not for…of: leaving a for…of by `break` calls the iterator's return(), which
    // the first recording reaches only after the engine has compiled this method.
    for (let i = 0; i < segments.length; i++) {
      const s = segments[i]!;
      if (s.endSlot <= this.committedSlot) continue;
      // (Each comparison made for every segment, at the end of the recording and before it.)
      if (s.startSlot >= realEnd && realEnd !== NO_END_SLOT) break;
      // Cut by what is already committed and by the end of the recording, in place (traceback makes
      // new objects at every call). Both stores run for every segment, not first when one is cut.
      s.startSlot = Math.max(s.startSlot, this.committedSlot);
      s.endSlot = s.endSlot > realEnd && realEnd !== NO_END_SLOT ? realEnd : s.endSlot;
      let startMs = this.slotToMs(s.startSlot);
      let endMs = this.slotToMs(s.endSlot);
      if (s.kind === 'mark') {
        this.refineEdges(s.startSlot, s.endSlot, startMs, endMs);
        startMs = this.refinedStartMs;
        endMs = this.refinedEndMs;
      }
      this.account(s, s.kind === 'mark' ? (endMs - startMs) / this.slotMs : s.endSlot - s.startSlot);
      // Element gaps for the speed figure: between the refined edges of the marks around them.
      if (s.kind === 'mark') {
        if (this.afterElementGap) {
          this.stats.unitSum += (startMs - this.lastMarkEndMs) / this.slotMs;
          this.stats.unitCount++;
        }
        this.lastMarkEndMs = endMs;
      }
      this.afterElementGap = s.kind === 'element-gap';
      const llr = s.kind === 'idle' ? -10 : decoder.markLlr(s.startSlot, s.endSlot);
      const confidence = s.kind === 'mark' ? 1 / (1 + Math.exp(-llr)) : 1 / (1 + Math.exp(llr));
      this.assembler.feed(s, round(startMs), round(endMs), confidence);
      this.committedSlot = s.endSlot;
    }
    if (!final) this.trackSpeed();
  }

  /**
   * Moves a mark's edges from slot boundaries to where the envelope crosses halfway between the
   * local key-up level and the mark's own level — the 50 % point, where keyform's synthesizer
   * centres its edges. Works on the ring of frame powers (frames of about 2.5 ms): the key-up power
   * σ² is measured on the frames just outside the decided mark, the noise-corrected amplitude
   * √max(0, |z|² − σ²) of each frame is compared with half the mark's (E|s + n|² = s² + σ² for
   * noise n independent of the carrier s [analytic], so this is unbiased where the amplitude of
   * |z| would be pulled up by the noise), and the crossing is interpolated linearly between frame
   * centres (the boxcar frame's group delay: half a frame, less half a sample). Only within one slot (about a quarter
   * unit) of the decided edge; left on the slot boundaries when the mark does not stand clear of
   * the noise or no single clean crossing is found.
   * @param aSlot - First slot of the decided mark. @param bSlot - Slot after its end.
   * @param startMs - Decided start [ms]. @param endMs - Decided end [ms].
   * The refined edges go to refinedStartMs and refinedEndMs [ms] (fields rather than a new array:
   * no allocation per mark, and numbers of one kind in one place for the engine).
   */
  private refineEdges(aSlot: number, bSlot: number, startMs: number, endMs: number): void {
    // The decided edges, unless a clean crossing is found below (stored first: the early returns
    // are rare, and a store first reached in one of them would make the engine compile this again).
    this.refinedStartMs = startMs;
    this.refinedEndMs = endMs;
    const k = this.framesPerSlot;
    const R = this.frameAmp.length;
    const f0 = aSlot * k;
    const f1 = bSlot * k;
    if (this.frameCount - (f0 - 2 * k) > R || f0 - 2 * k < 0 || f1 + k > this.frameCount) return;
    // Key-up power: the frames one to two slots outside the decided edges (inside the gaps around
    // the mark when the decision is within a slot of the truth), or the slicer's figure.
    let gapSum = 0;
    let gapCount = 0;
    for (let f = f0 - 2 * k; f < f0 - k; f++, gapCount++) gapSum += this.framePow(f);
    for (let f = f1 + k; f < Math.min(f1 + 2 * k, this.frameCount); f++, gapCount++) gapSum += this.framePow(f);
    const noisePow = gapCount > 0 ? gapSum / gapCount : this.slicer!.noisePow / k;
    // First pass: the mark's level from the frames a slot inside the decided edges.
    const inner = f1 - f0 > 2 * k ? k : 1;
    const p1 = this.meanFramePow(f0 + inner, f1 - inner - 1);
    if (p1 === null) return;
    const markAmp = Math.sqrt(Math.max(0, p1 - noisePow));
    // Mark amplitude at least 3 times the noise's RMS amplitude, or the crossing is left alone.
    if (markAmp < 3 * Math.sqrt(noisePow)) return;
    let rise = this.frameCrossing(0.5 * markAmp, f0 - k, f0 + k, true, startMs, noisePow);
    let fall = this.frameCrossing(0.5 * markAmp, f1 - k, f1 + k, false, endMs, noisePow);
    // Second pass: the decided edges may be a slot off, so the first level can include edge frames;
    // take it again over the middle half of the refined mark (clear of both edges) and recross.
    if (rise !== null && fall !== null && fall > rise) {
      const quarter = (fall - rise) / 4;
      const p2 = this.meanFramePow(Math.ceil(this.frameAt(rise + quarter)), Math.floor(this.frameAt(fall - quarter)));
      if (p2 !== null) {
        const amp2 = Math.sqrt(Math.max(0, p2 - noisePow));
        if (amp2 >= 3 * Math.sqrt(noisePow)) {
          rise = this.frameCrossing(0.5 * amp2, f0 - k, f0 + k, true, rise, noisePow) ?? rise;
          fall = this.frameCrossing(0.5 * amp2, f1 - k, f1 + k, false, fall, noisePow) ?? fall;
        }
      }
    }
    const s = rise ?? startMs;
    const e = fall ?? endMs;
    if (e > s) {
      this.refinedStartMs = s;
      this.refinedEndMs = e;
    }
  }

  // Helpers of refineEdges, as methods rather than callbacks made at each call: the engine keeps
  // a method's compiled code from one recording to the next (a batch of many files would
  // otherwise compile them again for every file).

  /** Power of frame f, from the ring. */
  private framePow(f: number): number {
    const a = this.frameAmp[f % this.frameAmp.length]!;
    return a * a;
  }

  /** Mean power of frames from…to (inclusive), or null when the range is empty. */
  private meanFramePow(from: number, to: number): number | null {
    let sum = 0;
    for (let f = from; f <= to; f++) sum += this.framePow(f);
    return to >= from ? sum / (to - from + 1) : null;
  }

  /** Centre of frame f [ms]: a frame averages samples f·spf … (f+1)·spf − 1, so half a sample before (f + ½)·spf. */
  private frameCentreMs(f: number): number {
    return ((this.originSample + (f + 0.5) * this.mixer!.samplesPerFrame - 0.5) * 1000) / this.sampleRate;
  }

  /** Fractional frame whose centre is at `ms`. */
  private frameAt(ms: number): number {
    return ((ms * this.sampleRate) / 1000 - this.originSample + 0.5) / this.mixer!.samplesPerFrame - 0.5;
  }

  /**
   * Where the noise-corrected frame amplitude √max(0, |z|² − noisePow) crosses `half` upwards
   * (`rising`) or downwards between frames from…to, interpolated linearly between frame centres;
   * of several crossings the one nearest `near` [ms]; null when there is none.
   */
  private frameCrossing(half: number, from: number, to: number, rising: boolean, near: number, noisePow: number): number | null {
    let best: number | null = null;
    for (let f = Math.max(1, from); f <= to; f++) {
      const p = Math.sqrt(Math.max(0, this.framePow(f - 1) - noisePow));
      const q = Math.sqrt(Math.max(0, this.framePow(f) - noisePow));
      const hit = rising ? p < half && q >= half : p >= half && q < half;
      if (!hit) continue;
      const c0 = this.frameCentreMs(f - 1);
      const t = c0 + ((half - p) / (q - p)) * (this.frameCentreMs(f) - c0);
      if (best === null || Math.abs(t - near) < Math.abs(best - near)) best = t;
    }
    return best;
  }

  /** Updates level statistics and the duration model from a decided segment. */
  private account(s: Segment, d: number): void {
    const H = this.decoder!.historySlots;
    const st = this.stats;
    if (s.kind === 'mark' || s.kind === 'element-gap' || s.kind === 'letter-gap' || s.kind === 'word-gap') {
      for (let k = s.startSlot + 2; k <= s.endSlot - 1; k++) {
        const i = k % H;
        const p = this.zRe[i]! ** 2 + this.zIm[i]! ** 2;
        if (s.kind === 'mark') this.snr.addMark(p);
        else this.snr.addGap(p);
      }
    } else {
      const i = s.endSlot % H;
      this.snr.addGap(this.zRe[i]! ** 2 + this.zIm[i]! ** 2);
    }
    const m = this.model!;
    // Timing spread (jitter) of each class, tracked as the mean square of ln(d / mean): machine
    // keying earns tight priors, hand keying wide ones.
    const sp = m.spread!; // makeChain gives every model its spreads
    switch (s.kind) {
      case 'mark':
        if (TRIE.symbol[s.node] === 1) {
          trackClass(m, sp, 'dah', d);
          st.unitSum += d / 3;
        } else {
          trackClass(m, sp, 'dit', d);
          st.unitSum += d;
        }
        st.unitCount++;
        break;
      case 'element-gap':
        trackClass(m, sp, 'elementGap', d);
        break;
      case 'letter-gap':
        trackClass(m, sp, 'letterGap', d);
        st.letterGapSum += d;
        st.letterGapCount++;
        break;
      case 'word-gap':
        if (d < 1.3 * m.wordGap) m.wordGap += MEAN_RATE * (d - m.wordGap);
        break;
      default:
        break;
    }
  }

  private trackSpeed(): void {
    constrainModel(this.model!);
    this.decoder!.setModel(this.model!);
  }

  // ---- result -------------------------------------------------------------------------------

  private result(): DecodeResult {
    const durationMs = round((this.samplesIn * 1000) / this.sampleRate);
    const warnings = [...this.warnings];
    const a = this.assembler;
    if (this.noSignalReason !== null || !this.mixer) {
      warnings.push(this.noSignalReason ?? 'no keyed signal found');
      return {
        text: '', wpm: 0, farnsworthWpm: null, unitMs: 0, totalMs: 0, marks: [], toneHz: null, snrDb: null,
        characters: [], warnings, durationMs,
      };
    }
    const st = this.stats;
    const unitMs = st.unitCount > 0 ? (st.unitSum / st.unitCount) * this.slotMs : (this.model!.dit) * this.slotMs;
    const wpm = Math.round((1200 / unitMs) * 10) / 10;
    let farnsworthWpm: number | null = null;
    if (st.letterGapCount > 0) {
      const letterGapMs = (st.letterGapSum / st.letterGapCount) * this.slotMs;
      if (letterGapMs > 4.5 * unitMs) {
        // Invert tc = 3·ta/19 and ta = (60c − 37.2s)/(s·c) [QEX 1990] for the overall speed s.
        const taS = (19 * letterGapMs) / 3 / 1000;
        farnsworthWpm = Math.round(((60 * wpm) / (taS * wpm + 37.2)) * 10) / 10;
      }
    }
    let snrDb: number | null = null;
    const ratio = this.snr.ratio();
    if (ratio !== null) {
      const n = this.framesPerSlot * this.mixer.samplesPerFrame;
      // A slot sums n samples of x·e^(−jωt)/spf: a sine of amplitude a gives |z|² = (a·k/2)², white
      // noise of variance v gives k·v/spf. Carrier power a²/2 over noise v·2500/(fs/2) [analytic].
      snrDb = Math.round(10 * Math.log10((ratio * this.sampleRate) / (n * SNR_BANDWIDTH_HZ)) * 10) / 10;
    }
    if (a.characters.length === 0) warnings.push('no keyed signal found (a tone, but no characters could be decoded)');
    if (a.characters.some((c) => c.text === '*')) warnings.push('some patterns are not known characters (printed as *)');
    if (snrDb !== null && snrDb < -10) warnings.push(`weak signal (SNR ${snrDb} dB in 2500 Hz): expect errors`);
    const marks = a.marks;
    const result: DecodeResult = {
      text: a.decodedText,
      wpm,
      farnsworthWpm,
      unitMs: round(unitMs),
      totalMs: marks.length > 0 ? marks[marks.length - 1]![1] : 0,
      marks,
      toneHz: Math.round(this.mixer.toneHz * 10) / 10,
      snrDb,
      characters: a.characters,
      warnings,
      durationMs,
    };
    if (this.options.keepEnvelope) {
      result.envelope = {
        frameMs: this.slotMs * this.envDecim,
        values: Float32Array.from(this.envValues),
        threshold: Float32Array.from(this.envThreshold),
      };
    }
    return result;
  }
}

/**
 * Keeps a duration model plausible (in place): dash/dot ratio 1.8…4.5 around the unit, element
 * gaps 0.5…1.8 units, letter gaps at least 2.2 units, word gaps at least 1.6 letter gaps
 * (ITU-R M.1677-1 §2 with room for hand-sent timing; Farnsworth stretches only the long gaps).
 * @param m - Mean lengths [slots], changed in place. @returns The same object.
 * @example constrainModel({ dit: 4, dah: 4, elementGap: 4, letterGap: 4, wordGap: 4 }).dah //=> 7.2 (1.8 dots)
 */
export function constrainModel(m: DurationModel): DurationModel {
  const unit = (m.dit + m.elementGap + m.dah / 3) / 3;
  m.dit = clamp(m.dit, 0.5 * unit, 1.8 * unit);
  m.dah = clamp(m.dah, Math.max(2.2 * unit, 1.8 * m.dit), 4.5 * unit);
  m.elementGap = clamp(m.elementGap, 0.5 * unit, 1.8 * unit);
  m.letterGap = Math.max(m.letterGap, 2.2 * unit, 1.8 * m.elementGap);
  m.wordGap = Math.max(m.wordGap, 1.6 * m.letterGap, 5 * unit);
  for (const key of ['dit', 'dah', 'elementGap', 'letterGap', 'wordGap'] as const) m[key] = Math.max(1, m[key]);
  return m;
}

/** How far each decided segment moves its class's mean length (exponential average). */
const MEAN_RATE = 0.12;

/** One decided segment of a class: its spread (against the mean so far), then its mean, in place. */
function trackClass(m: DurationModel, sp: NonNullable<DurationModel['spread']>, key: 'dit' | 'dah' | 'elementGap' | 'letterGap', d: number): void {
  sp[key] = trackedSpread(sp[key], d, m[key]);
  m[key] += MEAN_RATE * (d - m[key]);
}

/** A uniform phase's variance, π²/3 [rad²]: the most a slot's phase noise can be (see trackTone). */
const PHASE_VARIANCE_MAX = (Math.PI * Math.PI) / 3;

/**
 * One step of a class's tracked timing spread, the running mean square of ln(d / mean) plus the
 * variance that rounding d to whole slots adds (1/12 slot², on the log scale 1/(12·mean²)), kept
 * within SPREAD_MIN…SPREAD_MAX.
 */
function trackedSpread(spread: number, d: number, mean: number): number {
  const dev = Math.log(Math.max(d, 0.5) / mean);
  const v = spread * spread + 0.05 * (dev * dev + 1 / (12 * mean * mean) - spread * spread);
  return Math.min(SPREAD_MAX, Math.max(SPREAD_MIN, Math.sqrt(Math.max(0, v))));
}

const round = (ms: number): number => Math.round(ms * 10) / 10;
const clamp = (x: number, lo: number, hi: number): number => Math.min(hi, Math.max(lo, x));

export type { Interval };
