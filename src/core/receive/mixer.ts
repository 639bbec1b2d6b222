import { FRACTIONAL_ZERO } from './fractional.js';
import { mixerModule } from './wasm/module.js';

/**
 * Quadrature mixer and first decimation stage: multiplies the input by e^(−j·2π·toneHz·n/sampleRate)
 * and sums `samplesPerFrame` products into one complex frame (a boxcar, i.e. first-order CIC,
 * decimator). The oscillator is split in two: a table of e^(−jωn) for the n inside one frame, and
 * a phasor that advances once per frame, so each input sample costs two multiply-adds with no
 * dependency between samples. Everything after the mixer runs at the frame rate. The sample loop is
 * WebAssembly (wasm/mixer.as.ts: the real and imaginary products in one pair of float64 lanes),
 * over the mixer's own memory, which holds its state and table.
 */
/** Slots of Mixer.st (float64 at byte 8·slot of the mixer's memory; see wasm/mixer.as.ts). */
const P_RE = 0;
const P_IM = 1;
const STEP_RE = 2;
const STEP_IM = 3;
const ACC_RE = 4;
const ACC_IM = 5;
const IMG_RE = 6;
const IMG_IM = 7;
/** Byte offsets in the mixer's memory (wasm/mixer.as.ts): samples summed so far (int32), the table. */
const COUNT_AT = 64;
const TABLE_AT = 128;
/** Samples copied into the mixer's memory at a time (at least two frames). */
const PIECE_SAMPLES = 65536;

/** The sample loop's export (wasm/mixer.as.ts). */
type MixExport = (input: number, len: number, n: number, output: number, maxFrames: number, gains: number) => number;

export class Mixer {
  readonly samplesPerFrame: number;
  /**
   * Running state, a view of the first 64 bytes of the mixer's memory:
   * [P_RE, P_IM] e^(−jω·n0) at the start of the current frame; [STEP_RE, STEP_IM] e^(−jω·samplesPerFrame),
   * the phasor's step per frame; [ACC_RE, ACC_IM] the current frame's sums so far; [IMG_RE, IMG_IM]
   * D = (1/n)·Σ e^(−j·2ω·m) over one frame, the boxcar's gain at the image (twice the tone).
   */
  private readonly st: Float64Array;
  /** Samples summed into the current frame so far (one int32 of the memory). */
  private readonly count: Int32Array;
  /** e^(−jωk), k = 0…n−1, as (re, im) pairs. */
  private readonly table: Float64Array;
  /** Where the samples to mix go, and the frames come out (re, im, gain re, gain im). */
  private readonly input: Float32Array;
  private readonly inputAt: number;
  /** Samples the mixer's memory holds at once (see load): at least two frames. */
  readonly capacity: number;
  private readonly outputAt: number;
  private readonly maxFrames: number;
  /**
   * The frames of the last mixLoaded (and image gains), views of the mixer's memory: valid until the
   * next call.
   */
  readonly frameRe: Float64Array;
  readonly frameIm: Float64Array;
  readonly frameGainRe: Float64Array;
  readonly frameGainIm: Float64Array;
  private readonly mixSamples: MixExport;
  private toneHzValue = FRACTIONAL_ZERO;

  /**
   * @param sampleRate - Input sample rate [Hz].
   * @param toneHz - Mixing frequency [Hz], 0…sampleRate/2.
   * @param samplesPerFrame - Decimation factor (samples summed per frame), ≥ 1.
   * @example new Mixer(8000, 700, 20).process(sineAt700Hz, re, im) // frames of |z| = amplitude / 2
   */
  constructor(
    readonly sampleRate: number,
    toneHz: number,
    samplesPerFrame: number,
  ) {
    const n = (this.samplesPerFrame = Math.max(1, Math.round(samplesPerFrame)));
    // Memory laid out as wasm/mixer.as.ts reads it; its size is fixed, so the views stay valid.
    this.capacity = Math.max(PIECE_SAMPLES, 2 * n);
    this.maxFrames = Math.ceil(this.capacity / n) + 2;
    this.inputAt = align16(TABLE_AT + 16 * n);
    this.outputAt = align16(this.inputAt + 4 * this.capacity);
    const bytes = this.outputAt + 32 * this.maxFrames;
    const pages = Math.ceil(bytes / 65536);
    const memory = new WebAssembly.Memory({ initial: pages, maximum: pages });
    const instance = new WebAssembly.Instance(mixerModule(), { env: { memory } });
    this.mixSamples = instance.exports.mix as MixExport;
    const buf = memory.buffer;
    this.st = new Float64Array(buf, 0, 8);
    this.count = new Int32Array(buf, COUNT_AT, 1);
    this.table = new Float64Array(buf, TABLE_AT, 2 * n);
    this.input = new Float32Array(buf, this.inputAt, this.capacity);
    const f = this.maxFrames;
    this.frameRe = new Float64Array(buf, this.outputAt, f);
    this.frameIm = new Float64Array(buf, this.outputAt + 8 * f, f);
    this.frameGainRe = new Float64Array(buf, this.outputAt + 16 * f, f);
    this.frameGainIm = new Float64Array(buf, this.outputAt + 24 * f, f);
    this.st[P_RE] = 1; // the phasor starts at e^0
    this.setTone(toneHz);
  }

  /** Samples summed into the frame in progress (0…samplesPerFrame − 1): where the next sample falls in its frame. */
  get samplesInFrame(): number {
    return this.count[0]!;
  }

  /** Current mixing frequency [Hz]. */
  get toneHz(): number {
    return this.toneHzValue;
  }

  /** Retunes the oscillator [Hz]; the phase stays continuous at the next frame boundary. */
  setTone(toneHz: number): void {
    this.toneHzValue = toneHz;
    const w = (2 * Math.PI * toneHz) / this.sampleRate;
    const n = this.samplesPerFrame;
    // By rotation (a complex multiply per entry, exact cos/sin every 32 entries): retuning is
    // frequent while the tone tracker follows a drift, and trigonometry per entry would cost
    // as much as mixing the samples.
    const cr = Math.cos(w);
    const ci = -Math.sin(w);
    let re = 1;
    let im = 0;
    for (let i = 0; i < n; i++) {
      if ((i & 31) === 0) {
        re = Math.cos(w * i);
        im = -Math.sin(w * i);
      }
      this.table[2 * i] = re;
      this.table[2 * i + 1] = im;
      const nr = re * cr - im * ci;
      im = re * ci + im * cr;
      re = nr;
    }
    this.st[STEP_RE] = Math.cos(w * n);
    this.st[STEP_IM] = -Math.sin(w * n);
    // Geometric sum in closed form: (1 − e^(−j2ωn)) / (n·(1 − e^(−j2ω))), or 1 where 2ω is a multiple of 2π.
    const den = Math.sin(w);
    if (Math.abs(den) < 1e-12) {
      this.st[IMG_RE] = 1;
      this.st[IMG_IM] = 0;
    } else {
      const mag = Math.sin(w * n) / (n * den);
      this.st[IMG_RE] = mag * Math.cos(w * (n - 1));
      this.st[IMG_IM] = -mag * Math.sin(w * (n - 1));
    }
  }

  /**
   * Mixes a chunk; writes complete frames (sum / samplesPerFrame) to `outRe`/`outIm` from index 0
   * and returns how many were written. The arrays must hold ⌈chunk.length / samplesPerFrame⌉ + 1.
   * With `gainRe`/`gainIm`, also writes each frame's image gain G: a real carrier at the mixing
   * tone, a·cos(ωn + θ), gives the frame z = c + G·conj(c) with c = (a/2)·e^(jθ) (analytic: the
   * e^(−j(ωn+θ)) half lands at −2ω, where the boxcar does not null it), so
   * c = (z − G·conj(z)) / (1 − |G|²).
   */
  process(chunk: Float32Array, outRe: Float64Array, outIm: Float64Array, gainRe?: Float64Array, gainIm?: Float64Array): number {
    return this.processRange(chunk, 0, chunk.length, outRe, outIm, gainRe, gainIm);
  }

  /**
   * As process, for chunk[from…to). The samples are copied into the mixer's memory, a piece at a
   * time; a piece ends at the end of a frame, where the sample loop closes its partial sums anyway,
   * so the frames do not depend on the piece size.
   */
  processRange(chunk: Float32Array, from: number, to: number, outRe: Float64Array, outIm: Float64Array, gainRe?: Float64Array, gainIm?: Float64Array): number {
    const n = this.samplesPerFrame;
    const gains = gainRe !== undefined && gainIm !== undefined;
    let frames = 0;
    for (let a = from; a < to; ) {
      let len = to - a;
      if (len > this.capacity) {
        const toFrameEnd = n - this.count[0]!;
        len = toFrameEnd + n * Math.floor((this.capacity - toFrameEnd) / n);
      }
      this.load(chunk, a, a + len);
      const got = this.mixSamples.call(null, this.inputAt, len, n, this.outputAt, this.maxFrames, gains ? 1 : 0);
      for (let k = 0; k < got; k++) {
        outRe[frames + k] = this.frameRe[k]!;
        outIm[frames + k] = this.frameIm[k]!;
      }
      if (gains) {
        for (let k = 0; k < got; k++) {
          gainRe[frames + k] = this.frameGainRe[k]!;
          gainIm[frames + k] = this.frameGainIm[k]!;
        }
      }
      frames += got;
      a += len;
    }
    return frames;
  }

  /** Copies chunk[from…to), at most `capacity` samples, into the mixer's memory for mixLoaded. */
  load(chunk: Float32Array, from: number, to: number): void {
    if (to - from > this.capacity) throw new RangeError(`Mixer.load: ${to - from} samples, more than the ${this.capacity} it holds`);
    this.input.set(chunk.subarray(from, to));
  }

  /**
   * Mixes the loaded samples [from…to) (offsets into what load copied) as processRange would,
   * with image gains, leaving the frames in frameRe, frameIm, frameGainRe and frameGainIm (no copy
   * out); returns how many. For a caller that mixes a block in many short ranges (a slot at a time).
   */
  mixLoaded(from: number, to: number): number {
    return this.mixSamples.call(null, this.inputAt + 4 * from, to - from, this.samplesPerFrame, this.outputAt, this.maxFrames, 1);
  }
}

function align16(bytes: number): number {
  return Math.ceil(bytes / 16) * 16;
}
