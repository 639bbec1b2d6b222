/**
 * Zero for a field that is going to hold fractions: −0. The engine stores a field in the form of the
 * first value put in it; 0 is a small integer, −0 is not, so a field started at −0 is a floating-point
 * field from the start. Started at 0 and given a fraction later, the field changes form, the engine
 * retires the object's shape for a new one, and code compiled for the old shape (in a batch worker:
 * for the previous recording's objects) is thrown away and compiled again. −0 equals 0 in every
 * comparison and sum this code makes (−0 + x is x; −0 + 0 is 0).
 */
export const FRACTIONAL_ZERO = -0;
