/**
 * 16-bit PCM to float32 (see ../wav-stream.ts), in AssemblyScript, compiled to WebAssembly by
 * `npm run build:wasm` into pcm.wasm.ts (committed; a test checks that it matches this source).
 * Why: at 48 kHz converting the samples took about a quarter of a decode; a lookup table's
 * 256 KiB compete for the cache with the decoder, and eight samples at a time in vector lanes
 * need no table.
 *
 * The scaling is the whole-file reader's (wav-decoder's): v / 32768 below zero, v / 32767 from zero
 * up, rounded to float32. It is computed as v × (1/32768) or v × (1/32767) in float64 and then
 * rounded to float32, which gives the same float32 as the division for every one of the 65,536
 * values (the reader's tests check them all): v × 2⁻¹⁵ is exact, and the product with 1/32767 never
 * lands on the other side of a float32 rounding boundary.
 *
 * Memory is the host's: `n` little-endian int16 at byte offset `src`, float32 out at `dst`.
 */

const POS: f64 = 1.0 / 32767.0;
const NEG: f64 = 1.0 / 32768.0;

export function s16ToF32(src: usize, dst: usize, n: i32): void {
  const pos = f64x2.splat(POS);
  const neg = f64x2.splat(NEG);
  const zero = f64x2.splat(0);
  let i = 0;
  for (; i + 8 <= n; i += 8) {
    const v = v128.load(src + (<usize>i << 1));
    const lo = i32x4.extend_low_i16x8_s(v);
    const hi = i32x4.extend_high_i16x8_s(v);
    const a = f64x2.convert_low_i32x4_s(lo);
    const b = f64x2.convert_low_i32x4_s(i32x4.shuffle(lo, lo, 2, 3, 0, 1));
    const c = f64x2.convert_low_i32x4_s(hi);
    const d = f64x2.convert_low_i32x4_s(i32x4.shuffle(hi, hi, 2, 3, 0, 1));
    // Each lane times 1/32768 where it is negative, else 1/32767; then to float32 (two per half).
    const fa = f32x4.demote_f64x2_zero(f64x2.mul(a, v128.bitselect(neg, pos, f64x2.lt(a, zero))));
    const fb = f32x4.demote_f64x2_zero(f64x2.mul(b, v128.bitselect(neg, pos, f64x2.lt(b, zero))));
    const fc = f32x4.demote_f64x2_zero(f64x2.mul(c, v128.bitselect(neg, pos, f64x2.lt(c, zero))));
    const fd = f32x4.demote_f64x2_zero(f64x2.mul(d, v128.bitselect(neg, pos, f64x2.lt(d, zero))));
    v128.store(dst + (<usize>i << 2), i64x2.shuffle(fa, fb, 0, 2));
    v128.store(dst + (<usize>i << 2), i64x2.shuffle(fc, fd, 0, 2), 16);
  }
  for (; i < n; i++) {
    const v = <f64>load<i16>(src + (<usize>i << 1));
    store<f32>(dst + (<usize>i << 2), <f32>(v * (v < 0 ? NEG : POS)));
  }
}
