/**
 * The quadrature mixer's sample loop (see ../mixer.ts), in AssemblyScript, compiled to WebAssembly
 * by `npm run build:wasm` into mixer.wasm.ts (committed; a test checks that it matches this source).
 * Why: at 48 kHz the mixer touches every sample, and two float64 lanes at a time do the real and
 * the imaginary product together (about 1.2 against 2.5 ns a sample, copying the samples in
 * included); and a module's compiled code is shared by all threads of a process.
 *
 * The arithmetic is the JavaScript mixer's, operation for operation, in float64: the same four
 * partial sums per frame, added in the same order, the same frame output, image gain and phasor
 * step; WebAssembly's +, −, × and ÷ are IEEE 754's, as JavaScript's are, and it never fuses a
 * multiply with an add, so the frames are the same to the last bit.
 *
 * Memory is the host's, laid out by it (byte offsets):
 *   0     state, 8 float64: phasor re, im; phasor step re, im; the current frame's sums re, im;
 *         image gain D re, im (see mixer.ts)
 *   64    samples summed into the current frame so far (int32)
 *   128   table: e^(−jωk) for k = 0…n−1, as (re, im) float64 pairs
 *   IN    the samples to mix (float32), written by the host
 *   OUT   frames: re, then im, then image gain re, then im, each `maxFrames` float64
 */

const P_RE: usize = 0;
const P_IM: usize = 8;
const STEP_RE: usize = 16;
const STEP_IM: usize = 24;
const ACC_RE: usize = 32;
const ACC_IM: usize = 40;
const IMG_RE: usize = 48;
const IMG_IM: usize = 56;
const COUNT: usize = 64;
const TABLE: usize = 128;

/**
 * Mixes `len` samples from byte offset `input` with frames of `n` samples; writes each complete
 * frame (and, with `gains` ≠ 0, its image gain) at `output`, whose four arrays hold `maxFrames`
 * each, and returns how many frames were written.
 */
export function mix(input: usize, len: i32, n: i32, output: usize, maxFrames: i32, gains: i32): i32 {
  const outRe = output;
  const outIm = output + (<usize>maxFrames << 3);
  const gainRe = outIm + (<usize>maxFrames << 3);
  const gainIm = gainRe + (<usize>maxFrames << 3);
  const nf = <f64>n;
  let acc0 = f64x2.replace_lane(f64x2.splat(load<f64>(ACC_RE)), 1, load<f64>(ACC_IM));
  let count = load<i32>(COUNT);
  let frames = 0;
  let i = 0;
  while (i < len) {
    let stop = i + (n - count);
    if (stop > len) stop = len;
    // Four independent partial sums (re and im together in one pair), as in mixer.ts.
    let acc1 = f64x2.splat(0);
    let acc2 = f64x2.splat(0);
    let acc3 = f64x2.splat(0);
    for (; i + 3 < stop; i += 4, count += 4) {
      const x = input + (<usize>i << 2);
      const t = TABLE + (<usize>count << 4);
      acc0 = f64x2.add(acc0, f64x2.mul(f64x2.splat(<f64>load<f32>(x)), v128.load(t)));
      acc1 = f64x2.add(acc1, f64x2.mul(f64x2.splat(<f64>load<f32>(x, 4)), v128.load(t, 16)));
      acc2 = f64x2.add(acc2, f64x2.mul(f64x2.splat(<f64>load<f32>(x, 8)), v128.load(t, 32)));
      acc3 = f64x2.add(acc3, f64x2.mul(f64x2.splat(<f64>load<f32>(x, 12)), v128.load(t, 48)));
    }
    for (; i < stop; i++, count++) {
      acc0 = f64x2.add(acc0, f64x2.mul(f64x2.splat(<f64>load<f32>(input + (<usize>i << 2))), v128.load(TABLE + (<usize>count << 4))));
    }
    // re += re1 + re2 + re3 (left to right), and the same for im.
    acc0 = f64x2.add(acc0, f64x2.add(f64x2.add(acc1, acc2), acc3));
    if (count == n) {
      const re = f64x2.extract_lane(acc0, 0);
      const im = f64x2.extract_lane(acc0, 1);
      const pr = load<f64>(P_RE);
      const pi = load<f64>(P_IM);
      const at = <usize>frames << 3;
      store<f64>(outRe + at, (re * pr - im * pi) / nf);
      store<f64>(outIm + at, (re * pi + im * pr) / nf);
      if (gains != 0) {
        const p2r = pr * pr - pi * pi;
        const p2i = 2 * pr * pi;
        store<f64>(gainRe + at, load<f64>(IMG_RE) * p2r - load<f64>(IMG_IM) * p2i);
        store<f64>(gainIm + at, load<f64>(IMG_RE) * p2i + load<f64>(IMG_IM) * p2r);
      }
      frames++;
      acc0 = f64x2.splat(0);
      count = 0;
      let nr = pr * load<f64>(STEP_RE) - pi * load<f64>(STEP_IM);
      let ni = pr * load<f64>(STEP_IM) + pi * load<f64>(STEP_RE);
      const g = 1.5 - 0.5 * (nr * nr + ni * ni);
      nr *= g;
      ni *= g;
      store<f64>(P_RE, nr);
      store<f64>(P_IM, ni);
    }
  }
  store<f64>(ACC_RE, f64x2.extract_lane(acc0, 0));
  store<f64>(ACC_IM, f64x2.extract_lane(acc0, 1));
  store<i32>(COUNT, count);
  return frames;
}
