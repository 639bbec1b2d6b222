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
