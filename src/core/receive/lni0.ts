/**
 * Natural logarithm of the modified Bessel function I0(x), the log-likelihood kernel of a
 * sinusoid of unknown phase in Gaussian noise. Polynomial approximations of Abramowitz & Stegun,
 * Handbook of Mathematical Functions, 9.8.1 and 9.8.2 (coefficients from memory; relative error
 * of I0 below 2e-7), evaluated in the log domain so large arguments do not overflow.
 * @param x - Argument, any real (I0 is even).
 * @returns ln I0(x).
 * @example lnI0(0) //=> 0
 */
export function lnI0(x: number): number {
  const a = Math.abs(x);
  if (a < 3.75) {
    const t = (a / 3.75) * (a / 3.75);
    return Math.log(1 + t * (3.5156229 + t * (3.0899424 + t * (1.2067492 + t * (0.2659732 + t * (0.0360768 + t * 0.0045813))))));
  }
  const t = 3.75 / a;
  const poly =
    0.39894228 + t * (0.01328592 + t * (0.00225319 + t * (-0.00157565 + t * (0.00916281 + t * (-0.02057706 + t * (0.02635537 + t * (-0.01647633 + t * 0.00392377)))))));
  return a - 0.5 * Math.log(a) + Math.log(poly);
}

/** Step and reach of the table behind lnI0Fast. */
const FAST_STEP = 1 / 64;
const FAST_MAX = 64;
const FAST_TABLE: Float64Array = (() => {
  const n = Math.round(FAST_MAX / FAST_STEP) + 2;
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) t[i] = lnI0(i * FAST_STEP);
  return t;
})();

/**
 * ln I0(x) for the sequence decoder's inner loop: linear interpolation in a table of lnI0 at steps
 * of 1/64 up to 64 (the second derivative of ln I0 is at most 1/2, so the interpolation error is
 * below (1/64)²/16 ≈ 1.6e-5 [analytic]), and beyond it the asymptotic expansion
 * x − ½·ln(2πx) + 1/(8x) + 9/(128x²) (Abramowitz & Stegun 9.7.1, from memory; error below 1e-6 there).
 * @param x - Argument, any real.
 * @returns ln I0(x), within 2e-5 of lnI0.
 * @example lnI0Fast(0) //=> 0
 */
export function lnI0Fast(x: number): number {
  const a = x < 0 ? -x : x;
  if (a < FAST_MAX) {
    const u = a * 64;
    const i = u | 0;
    const f = u - i;
    const t0 = FAST_TABLE[i]!;
    return t0 + f * (FAST_TABLE[i + 1]! - t0);
  }
  return lnI0Asymptotic(a);
}

/** ln I0(a) for a ≥ 64 by the asymptotic expansion (see lnI0Fast). */
function lnI0Asymptotic(a: number): number {
  return a - 0.5 * Math.log(2 * Math.PI * a) + 1 / (8 * a) + 9 / (128 * a * a);
}

/**
 * The table behind lnI0Fast (lnI0 at steps of 1/64 from 0 to just past 64), for the sequence
 * decoder's WebAssembly step, which interpolates in the same numbers. Not to be written to.
 */
export function lnI0FastTable(): Float64Array {
  return FAST_TABLE;
}
