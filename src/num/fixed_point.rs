//! Fixed-point samples: raw `i16`/`i32` (Q15/Q31) and the `fixed` crate's `FixedI16<F>` /
//! `FixedI32<F>`. The arithmetic is written once, generically over [`FixedPoint`]; macros only
//! stamp out the pairings of sample, tap and accumulator types.

use super::{Acc128, MulAcc, Rounding, Sample, sealed::Sealed};
use fixed::types::extra::{LeEqU16, LeEqU32};
use fixed::{FixedI16, FixedI32};

/// A two's-complement fixed-point type: `value = raw / 2^FRAC`, `raw` a `BITS`-bit integer.
///
/// Implemented for `i16` (Q15: `FRAC` = 15), `i32` (Q31: 31), `FixedI16<F>` and `FixedI32<F>`.
/// Sealed.
///
/// ```
/// use tapline::num::FixedPoint;
/// use fixed::types::I4F12;
/// assert_eq!((<i16 as FixedPoint>::FRAC, <I4F12 as FixedPoint>::FRAC), (15, 12));
/// assert_eq!(<i32 as FixedPoint>::RAW_MIN, -(1 << 31));
/// assert_eq!(I4F12::from_num(-0.5).raw(), -2048);
/// ```
pub trait FixedPoint: Sample {
    /// Storage width in bits (16 or 32).
    const BITS: u32;
    /// Fractional bits.
    const FRAC: u32;
    /// Smallest raw value, −2^(BITS−1).
    const RAW_MIN: i64 = -(1i64 << (Self::BITS - 1));
    /// Largest raw value, 2^(BITS−1) − 1.
    const RAW_MAX: i64 = (1i64 << (Self::BITS - 1)) - 1;
    /// The raw bits, sign-extended.
    fn raw(self) -> i64;
    /// From raw bits. **Overflow:** values outside `RAW_MIN..=RAW_MAX` saturate to the nearer
    /// limit.
    fn from_raw(raw: i64) -> Self;
    /// From the low `BITS` bits of `raw` (two's-complement truncation, no clamp): for values
    /// already known to be in range, without the cost of checking again.
    fn from_raw_truncating(raw: i64) -> Self;
}

macro_rules! fixed_point {
    ($( [$($gen:tt)*] $ty:ty, $prim:ty, $frac:expr, $zero:expr, $get:expr, $make:expr; )*) => {$(
        impl<$($gen)*> Sealed for $ty {}
        impl<$($gen)*> FixedPoint for $ty {
            const BITS: u32 = <$prim>::BITS;
            const FRAC: u32 = $frac;
            #[inline(always)]
            fn raw(self) -> i64 { i64::from($get(self)) }
            #[inline(always)]
            fn from_raw_truncating(raw: i64) -> Self {
                $make(raw as $prim)
            }
            #[inline(always)]
            fn from_raw(raw: i64) -> Self {
                // In range after clamping, so the narrowing is lossless.
                $make(raw.clamp(Self::RAW_MIN, Self::RAW_MAX) as $prim)
            }
        }
        impl<$($gen)*> Sample for $ty {
            const ZERO: Self = $zero;
            #[inline]
            fn to_f64(self) -> f64 {
                // Exact: |raw| < 2^53 and the divisor is a power of two.
                self.raw() as f64 / (1u64 << <Self as FixedPoint>::FRAC) as f64
            }
        }
    )*};
}

fixed_point! {
    [] i16, i16, 15, 0, |v: i16| v, |r: i16| r;
    [] i32, i32, 31, 0, |v: i32| v, |r: i32| r;
    [F: LeEqU16] FixedI16<F>, i16, FixedI16::<F>::FRAC_NBITS, FixedI16::<F>::ZERO,
        FixedI16::<F>::to_bits, FixedI16::<F>::from_bits;
    [F: LeEqU32] FixedI32<F>, i32, FixedI32::<F>::FRAC_NBITS, FixedI32::<F>::ZERO,
        FixedI32::<F>::to_bits, FixedI32::<F>::from_bits;
}

/// Exact range of Σ h·x over all inputs x in `[x_min, x_max]`, as `(lowest, highest)`.
///
/// Each term reaches its extremes at an end of the input range; the sum of the per-term
/// extremes is attained by the sequence that picks the matching end for each tap.
pub(crate) fn sum_range(taps: impl Iterator<Item = i64>, x_min: i64, x_max: i64) -> (i128, i128) {
    taps.fold((0i128, 0i128), |(lo, hi), h| {
        let a = i128::from(h) * i128::from(x_min);
        let b = i128::from(h) * i128::from(x_max);
        (lo + a.min(b), hi + a.max(b))
    })
}

/// The output step shared by every fixed-point accumulator: one rounding, then saturation.
#[inline(always)]
pub(crate) fn finish_fixed<S: FixedPoint>(
    acc: i128,
    tap_frac: u32,
    rounding: Rounding,
) -> (S, bool) {
    let q = rounding.shift_wide(acc, tap_frac);
    let clamped = q.clamp(i128::from(S::RAW_MIN), i128::from(S::RAW_MAX));
    (S::from_raw(clamped as i64), clamped != q)
}

/// The same for an `i64` accumulator, kept apart so 32-bit cores never touch 128-bit values on
/// the default path.
#[inline(always)]
pub(crate) fn finish_fixed_i64<S: FixedPoint>(
    acc: i64,
    tap_frac: u32,
    rounding: Rounding,
) -> (S, bool) {
    let q = rounding.shift(acc, tap_frac);
    let (value, clamped) = clamp_masked(q, S::RAW_MIN, S::RAW_MAX);
    (S::from_raw_truncating(value), clamped)
}

/// The output step of a 32-bit accumulator (Q15 samples and taps, the proven path), done in
/// 32-bit arithmetic: bit-identical to [`finish_fixed_i64`] on the same value (the unit test
/// compares them), about half the instructions on a 32-bit core.
#[inline(always)]
pub(crate) fn finish_fixed_i32<S: FixedPoint>(acc: i32, rounding: Rounding) -> (S, bool) {
    const FRAC: u32 = 15;
    let floor = acc >> FRAC;
    let rest = acc & ((1 << FRAC) - 1);
    let (offset, even) = rounding.offset_and_parity_i32(1 << (FRAC - 1));
    // |floor| ≤ 2^16 and the carry is 0 or 1: no overflow.
    let q = floor + ((rest + offset + (floor & even)) >> FRAC);
    // The 64-bit masked clamp: a 32-bit version of it measured one instruction more per
    // saturated output on the Cortex-M0 (the optimiser found a branch), so it is not used.
    let (value, clamped) = clamp_masked(i64::from(q), S::RAW_MIN, S::RAW_MAX);
    (S::from_raw_truncating(value), clamped)
}

/// `q` clamped to `[min, max]` (min ≤ max) with masks instead of compare-and-branch, so every
/// value costs the same instructions even on cores without conditional execution (Cortex-M0);
/// the flag says whether clamping acted. Exact for every `i64`.
#[inline(always)]
pub(crate) fn clamp_masked(q: i64, min: i64, max: i64) -> (i64, bool) {
    // `black_box` hides the masks' origin from the optimiser, which would otherwise turn
    // them back into compare-and-select — a branch on cores without conditional execution.
    // It changes no value, only keeps the cost the same for every input.
    let below = opaque(less_mask(q, min)); // all ones when q < min
    let above = opaque(less_mask(max, q)); // all ones when q > max
    let out = below | above;
    let value = (q & !out) | (min & below) | (max & above);
    (value, out & 1 == 1)
}

/// A value the optimiser may not reason about, where that is needed to keep a mask from
/// becoming a branch: on cores without conditional execution (Cortex-M0, RISC-V) it goes
/// through `black_box`, which costs a store and a load. Armv7E-M executes selects with `IT`
/// blocks at a fixed cost, so there it is the value itself (the constant-time check in
/// `examples/qemu` measures both).
#[inline(always)]
pub(crate) fn opaque<T>(value: T) -> T {
    if cfg!(tapline_arm_dsp) {
        value
    } else {
        core::hint::black_box(value)
    }
}

/// All ones when `x < y`, else zero, for any two `i64`: the sign of x − y, corrected where the
/// subtraction overflows (H. S. Warren, *Hacker's Delight*, 2nd ed., 2012, §2-12, from memory).
#[inline(always)]
fn less_mask(x: i64, y: i64) -> i64 {
    let d = x.wrapping_sub(y);
    (d ^ ((x ^ y) & (d ^ x))) >> 63
}

/// The exact product of a tap and a sample. Two 16-bit operands multiply in 32 bits (|p| ≤ 2^30
/// fits): a Cortex-M0 has a 32-bit multiply but no 64-bit one, and would otherwise call a
/// library routine per tap. The condition is a constant, so only one arm is compiled in.
#[inline(always)]
fn product<T: FixedPoint, S: FixedPoint>(tap: T, x: S) -> i64 {
    if T::BITS <= 16 && S::BITS <= 16 {
        i64::from((tap.raw() as i32) * (x.raw() as i32))
    } else {
        tap.raw() * x.raw()
    }
}

macro_rules! fixed_mul_acc {
    ($( [$($gen:tt)*] $s:ty => $t:ty; )*) => {$(
        impl<$($gen)*> MulAcc<$t> for $s {
            type Acc = i64;
            const ACC_ZERO: i64 = 0;

            #[inline(always)]
            fn mul_acc(acc: i64, tap: $t, x: Self) -> i64 {
                // |tap·x| ≤ 2^62: exact in i64. Wrapping add: see the trait contract.
                acc.wrapping_add(product(tap, x))
            }

            #[inline(always)]
            fn finish(acc: i64, rounding: Rounding) -> (Self, bool) {
                finish_fixed_i64(acc, <$t as FixedPoint>::FRAC, rounding)
            }

            fn accumulator_fits(taps: &[$t]) -> bool {
                let (lo, hi) = sum_range(taps.iter().map(|t| t.raw()), Self::RAW_MIN, Self::RAW_MAX);
                lo >= i128::from(i64::MIN) && hi <= i128::from(i64::MAX)
            }
        }
    )*};
}

fixed_mul_acc! {
    [] i16 => i16;
    [] i32 => i32;
    [Fs: LeEqU16, Ft: LeEqU16] FixedI16<Fs> => FixedI16<Ft>;
    [Fs: LeEqU32, Ft: LeEqU32] FixedI32<Fs> => FixedI32<Ft>;
}

macro_rules! wide_mul_acc {
    ($( [$($gen:tt)*] $s:ty => $t:ty; )*) => {$(
        impl<$($gen)*> MulAcc<$t, Acc128> for $s {
            type Acc = i128;
            const ACC_ZERO: i128 = 0;

            #[inline(always)]
            fn mul_acc(acc: i128, tap: $t, x: Self) -> i128 {
                // Exact: |Σ| ≤ N·2^62 < 2^127 for any N that fits in memory.
                acc.wrapping_add(i128::from(tap.raw() * x.raw()))
            }

            #[inline(always)]
            fn finish(acc: i128, rounding: Rounding) -> (Self, bool) {
                finish_fixed(acc, <$t as FixedPoint>::FRAC, rounding)
            }

            fn accumulator_fits(taps: &[$t]) -> bool {
                // 2^64 taps of magnitude 2^31 times inputs of 2^31 stay below 2^126.
                (taps.len() as u128) < (1u128 << 64)
            }
        }
    )*};
}

wide_mul_acc! {
    [] i32 => i32;
    [Fs: LeEqU32, Ft: LeEqU32] FixedI32<Fs> => FixedI32<Ft>;
}

#[cfg(test)]
mod tests {
    extern crate std;
    use super::{clamp_masked, finish_fixed_i32, finish_fixed_i64};
    use crate::Rounding;
    use std::{vec, vec::Vec};

    /// The 32-bit output step equals the 64-bit one for every rounding mode: all accumulators
    /// around the rounding ties and the clamp limits, the ends of `i32`, and a stride through
    /// the whole range.
    #[test]
    fn i32_output_step_equals_i64_output_step() {
        let mut values: Vec<i32> = vec![i32::MIN, i32::MIN + 1, i32::MAX - 1, i32::MAX, 0];
        for centre in [
            0i64,
            32767 << 15,
            -(32768 << 15),
            1 << 14,
            3 << 14,
            -(1 << 14),
        ] {
            for d in -70_000i64..70_000 {
                if let Ok(v) = i32::try_from(centre + d) {
                    values.push(v);
                }
            }
        }
        values.extend((i32::MIN..=i32::MAX).step_by(65_521));
        for mode in Rounding::ALL {
            for &acc in &values {
                let wide: (i16, bool) = finish_fixed_i64(i64::from(acc), 15, mode);
                let narrow: (i16, bool) = finish_fixed_i32(acc, mode);
                assert_eq!(narrow, wide, "acc {acc}, {mode:?}");
            }
        }
    }

    /// The masked clamp equals `i64::clamp` everywhere, the ends of `i64` included (where a
    /// plain subtraction would wrap).
    #[test]
    fn masked_clamp_equals_clamp_at_the_extremes() {
        let values = [
            i64::MIN,
            i64::MIN + 1,
            -(1 << 62),
            -32769,
            -32768,
            -1,
            0,
            1,
            32767,
            32768,
            1 << 62,
            i64::MAX - 1,
            i64::MAX,
        ];
        for (min, max) in [
            (-32768, 32767),
            (i64::from(i32::MIN), i64::from(i32::MAX)),
            (i64::MIN, i64::MAX),
            (0, 0),
        ] {
            for &q in &values {
                let want = q.clamp(min, max);
                assert_eq!(
                    clamp_masked(q, min, max),
                    (want, want != q),
                    "q={q} in {min}..={max}"
                );
            }
        }
    }
}
