//! Pre-added products for folded (linear-phase) kernels: `tap·(a ± b)` with one multiply.
//!
//! A symmetric filter multiplies x\[n−k\] and x\[n−(N−1−k)\] by the same tap, so adding the two
//! samples first halves the multiplies. The pre-add needs one bit more than a sample (i16 + i16
//! needs 17 bits, i32 + i32 needs 33), which is why it lives here, beside the accumulator: the sum
//! is formed in the accumulator's integer type, where it is exact.
//!
//! **Why the folded sum is bit-identical to the plain one (fixed point).** The exact folded sum
//! Σ h\[k\]·(x\[n−k\] ± x\[n−(N−1−k)\]) equals the plain FIR's exact sum term for term, and the
//! filter's constructor proves with [`MulAcc::accumulator_fits`] on the full tap set that this
//! sum cannot leave the accumulator for any input. A folded product needs no more: it is at most
//! the two terms h·x\[n−k\] and h·x\[n−(N−1−k)\] at their extremes, and every other term's
//! extreme is ≥ 0, so it is bounded by the same worst case. (A Q31 product of 2^63 —
//! (−1 − 1)·(−1), one past `i64::MAX` — needs a tap of −1.0 twice, Σ|h| ≥ 2, which the `i64`
//! check refuses.) The products and sums are nevertheless taken modulo 2^64 (`wrapping_mul`,
//! `wrapping_add`) as a second line: nothing can panic, and arithmetic modulo 2^64 of a result
//! known to lie in `i64` gives that result exactly. With [`Acc128`] the pre-add (≤ 2^32) and its
//! product (≤ 2^63) are exact outright. Q15 folded products are at most 2^31.

use crate::num::{Acc128, DefaultAcc, FixedPoint, MulAcc, Sample};
use fixed::types::extra::{LeEqU16, LeEqU32};
use fixed::{FixedI16, FixedI32};

/// `acc + tap·(a + b)` and `acc + tap·(a − b)` with a single multiply, for the sample types and
/// accumulators of [`MulAcc`].
///
/// * **Fixed point:** exact, by the modular argument in the [module docs](self): a folded filter
///   gives the same bits as the plain filter on the same taps.
/// * **Float:** the pre-add is one more rounding than the plain product pair; the result differs
///   from the plain filter's by at most the γ_N bound of its sum (not bit-identical).
///
/// Implemented for every `MulAcc` pairing with the default accumulator and with [`Acc128`].
///
/// ```
/// use tapline::kernel::FoldMulAcc;
/// // Q31 full scale: (−1 + −1)·(−1) = 2.0 in Q62 is 2^63, one past i64::MAX (possible only for
/// // taps a filter refuses): it wraps to i64::MIN …
/// let acc = <i32 as FoldMulAcc<i32>>::mul_acc_sum(0, i32::MIN, i32::MIN, i32::MIN);
/// assert_eq!(acc, i64::MIN);
/// // … and a term of −1.0 brings the exact sum 2^63 − 2^62 = 2^62 back into range with the
/// // right bits, as arithmetic modulo 2^64 guarantees.
/// let acc = <i32 as FoldMulAcc<i32>>::mul_acc_difference(acc, i32::MIN, 0, i32::MIN);
/// assert_eq!(acc, 1 << 62);
/// ```
pub trait FoldMulAcc<T: Sample, W = DefaultAcc>: MulAcc<T, W> {
    /// `true` where the plain (unfolded) single-output kernel is faster than the folded sum
    /// and gives the same bits (the folded and plain exact sums are equal, see the module
    /// docs): 16-bit samples on 32-bit cores, where a pre-added pair needs 17 bits and its
    /// product a 64-bit multiply (a library call on the Cortex-M0: 31.5 against 11.2
    /// instructions per tap, `examples/qemu/COSTS.md`) while a plain product fits 32 bits; and
    /// Q31 on Armv7E-M, whose long multiply-accumulate kernel beats the pre-add. Always `false`
    /// for floats, whose folded sum rounds differently.
    const PLAIN_IS_FASTER: bool = false;

    /// `acc + tap·(a + b)`.
    fn mul_acc_sum(acc: Self::Acc, tap: T, a: Self, b: Self) -> Self::Acc;
    /// `acc + tap·(a − b)`.
    fn mul_acc_difference(acc: Self::Acc, tap: T, a: Self, b: Self) -> Self::Acc;
}

macro_rules! fold_i64 {
    ($( [$($gen:tt)*] $s:ty => $t:ty, $plain:expr; )*) => {$(
        impl<$($gen)*> FoldMulAcc<$t> for $s {
            const PLAIN_IS_FASTER: bool = $plain;

            #[inline(always)]
            fn mul_acc_sum(acc: i64, tap: $t, a: Self, b: Self) -> i64 {
                // Pre-add exact in i64; the product is taken modulo 2^64 (see the module docs).
                acc.wrapping_add(tap.raw().wrapping_mul(a.raw() + b.raw()))
            }
            #[inline(always)]
            fn mul_acc_difference(acc: i64, tap: $t, a: Self, b: Self) -> i64 {
                acc.wrapping_add(tap.raw().wrapping_mul(a.raw() - b.raw()))
            }
        }
    )*};
}

fold_i64! {
    [] i16 => i16, cfg!(target_pointer_width = "32");
    [] i32 => i32, cfg!(all(target_arch = "arm", tapline_arm_dsp));
    [Fs: LeEqU16, Ft: LeEqU16] FixedI16<Fs> => FixedI16<Ft>, cfg!(target_pointer_width = "32");
    [Fs: LeEqU32, Ft: LeEqU32] FixedI32<Fs> => FixedI32<Ft>, false;
}

macro_rules! fold_i128 {
    ($( [$($gen:tt)*] $s:ty => $t:ty; )*) => {$(
        impl<$($gen)*> FoldMulAcc<$t, Acc128> for $s {
            #[inline(always)]
            fn mul_acc_sum(acc: i128, tap: $t, a: Self, b: Self) -> i128 {
                // |a + b| ≤ 2^32 and |tap| ≤ 2^31: the product is exact in i128.
                acc.wrapping_add(i128::from(tap.raw()) * i128::from(a.raw() + b.raw()))
            }
            #[inline(always)]
            fn mul_acc_difference(acc: i128, tap: $t, a: Self, b: Self) -> i128 {
                acc.wrapping_add(i128::from(tap.raw()) * i128::from(a.raw() - b.raw()))
            }
        }
    )*};
}

fold_i128! {
    [] i32 => i32;
    [Fs: LeEqU32, Ft: LeEqU32] FixedI32<Fs> => FixedI32<Ft>;
}

macro_rules! fold_float {
    ($( $s:ty => $t:ty; )*) => {$(
        impl FoldMulAcc<$t> for $s {
            #[inline(always)]
            fn mul_acc_sum(acc: $t, tap: $t, a: Self, b: Self) -> $t {
                acc + tap * (<$t>::from(a) + <$t>::from(b))
            }
            #[inline(always)]
            fn mul_acc_difference(acc: $t, tap: $t, a: Self, b: Self) -> $t {
                acc + tap * (<$t>::from(a) - <$t>::from(b))
            }
        }
    )*};
}

fold_float! {
    f32 => f32;
    f32 => f64;
    f64 => f64;
}
