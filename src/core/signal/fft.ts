import FFT from 'fft.js';

/** Largest transform kept for reuse [points]: its tables are about 1.5 MB. */
const REUSE_MAX_SIZE = 1 << 16;
const bySize = new Map<number, FFT>();
let primed = false;

/**
 * A fft.js transform of `size` points (a power of two, ≥ 2). Sizes up to 65,536 are made once and
 * reused: the receiver and the shape analysis ask for the same few sizes for every recording, and a
 * transform the engine's compiled code has seen, kept alive, does not send that code back to be
 * compiled again when a recording's own transform is collected (as a new one per recording did).
 * The transforms keep no state between calls, so sharing one is safe within a thread.
 * @example fftOfSize(1024).realTransform(out, frame)
 */
export function fftOfSize(size: number): FFT {
  if (!primed) {
    primed = true;
    primeTransforms();
  }
  if (size > REUSE_MAX_SIZE) return new FFT(size);
  let fft = bySize.get(size);
  if (!fft) {
    fft = new FFT(size);
    bySize.set(size, fft);
  }
  return fft;
}

/**
 * Runs each fft.js entry point keyform uses ten times, on a transform whose size takes the radix-4
 * path and one whose size takes the radix-2 path, so that the engine has recorded every operation in
 * them before it compiles them: otherwise a path first met in a later recording (another size, the
 * inverse) sends the compiled code back to slow code and has it compiled again. Run before the first
 * transform is handed out, not at load, so that start-up and commands that never transform do not
 * pay its 10 ms.
 */
function primeTransforms(): void {
  for (const size of [16, 32]) {
    const fft = fftOfSize(size);
    const data = new Float64Array(size).map((_, i) => Math.sin(i));
    const complex = fft.createComplexArray();
    const out = fft.createComplexArray();
    for (let round = 0; round < 10; round++) {
      fft.realTransform(out, data);
      fft.completeSpectrum(out);
      fft.transform(complex, out);
      fft.inverseTransform(out, complex);
    }
  }
}
