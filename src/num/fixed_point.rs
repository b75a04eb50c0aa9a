//! Fixed-point samples: raw `i16`/`i32` (Q15/Q31) and the `fixed` crate's `FixedI16<F>` /
//! `FixedI32<F>`. The arithmetic is written once, generically over [`FixedRaw`]; a macro only
//! stamps out the four `MulAcc` pairings.

use super::{MulAcc, Rounding, Sample, sealed::Sealed};
use fixed::types::extra::{LeEqU16, LeEqU32};
use fixed::{FixedI16, FixedI32};

/// Raw two's-complement view of a fixed-point type: `value = raw / 2^FRAC`.
pub(crate) trait FixedRaw: Sample {
    /// Storage width in bits (16 or 32).
    const BITS: u32;
    /// Fractional bits.
    const FRAC: u32;
    /// Smallest and largest raw value.
    const RAW_MIN: i64 = -(1i64 << (Self::BITS - 1));
    const RAW_MAX: i64 = (1i64 << (Self::BITS - 1)) - 1;
    /// The raw bits, sign-extended.
    fn raw(self) -> i64;
    /// From raw bits already known to lie in `RAW_MIN..=RAW_MAX` (others are truncated).
    fn from_raw_in_range(raw: i64) -> Self;
}

macro_rules! fixed_raw {
    ($( [$($gen:tt)*] $ty:ty, $prim:ty, $frac:expr, $zero:expr, $get:expr, $make:expr; )*) => {$(
        impl<$($gen)*> Sealed for $ty {}
        impl<$($gen)*> FixedRaw for $ty {
            const BITS: u32 = <$prim>::BITS;
            const FRAC: u32 = $frac;
            #[inline(always)]
            fn raw(self) -> i64 { i64::from($get(self)) }
            #[inline(always)]
            fn from_raw_in_range(raw: i64) -> Self { $make(raw as $prim) }
        }
        impl<$($gen)*> Sample for $ty {
            const ZERO: Self = $zero;
            #[inline]
            fn to_f64(self) -> f64 {
                // Exact: |raw| < 2^53 and the divisor is a power of two.
                self.raw() as f64 / (1u64 << <Self as FixedRaw>::FRAC) as f64
            }
        }
    )*};
}

fixed_raw! {
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

macro_rules! fixed_mul_acc {
    ($( [$($gen:tt)*] $s:ty => $t:ty; )*) => {$(
        impl<$($gen)*> MulAcc<$t> for $s {
            type Acc = i64;
            const ACC_ZERO: i64 = 0;

            #[inline(always)]
            fn mul_acc(acc: i64, tap: $t, x: Self) -> i64 {
                // |tap·x| ≤ 2^62: exact in i64. Wrapping add: see the trait contract.
                acc.wrapping_add(tap.raw() * x.raw())
            }

            #[inline(always)]
            fn finish(acc: i64, rounding: Rounding) -> (Self, bool) {
                let q = rounding.shift(acc, <$t as FixedRaw>::FRAC);
                let clamped = q.clamp(Self::RAW_MIN, Self::RAW_MAX);
                (Self::from_raw_in_range(clamped), clamped != q)
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
