/**
 * Seeded random numbers and white Gaussian noise for tests, benchmarks and demo recordings.
 * Deterministic: the same seed gives the same noise on every machine.
 */

/** Mulberry32: a small, fast 32-bit PRNG. Returns a function giving uniform numbers in [0, 1). */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates (Box–Muller) from a uniform source. */
export function gaussianSource(random: () => number): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u = 0;
    while (u <= 1e-300) u = random();
    const v = random();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}

/** Reference noise bandwidth of keyform's SNR figures [Hz]. */
export const SNR_BANDWIDTH_HZ = 2500;

/**
 * Standard deviation of white noise (per sample) that gives a stated SNR, where keyform's SNR is
 * **key-down carrier power over noise power in a 2500 Hz bandwidth**. A sine of peak `amplitude`
 * has power amplitude²/2; white noise of variance σ² spreads evenly over 0…sampleRate/2, so the
 * share in `bandwidthHz` is σ²·bandwidthHz/(sampleRate/2) [analytic].
 * @example noiseSigmaForSnr(1, 8000, 0) //=> 0.8 (σ² = 0.5 · 4000/2500)
 */
export function noiseSigmaForSnr(amplitude: number, sampleRate: number, snrDb: number, bandwidthHz = SNR_BANDWIDTH_HZ): number {
  const carrierPower = (amplitude * amplitude) / 2;
  const noiseInBand = carrierPower / 10 ** (snrDb / 10);
  return Math.sqrt((noiseInBand * (sampleRate / 2)) / bandwidthHz);
}

/** Adds white Gaussian noise of standard deviation `sigma` to `samples` in place. */
export function addNoise(samples: Float32Array, sigma: number, seed: number): Float32Array {
  const g = gaussianSource(seededRandom(seed));
  for (let i = 0; i < samples.length; i++) samples[i] = samples[i]! + sigma * g();
  return samples;
}
