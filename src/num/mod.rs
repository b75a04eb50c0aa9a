//! The numeric abstraction every kernel and filter is generic over.
//!
//! [`Sample`] is a value a filter stores (a sample or a tap). [`MulAcc<T>`] says how a sample
//! type multiplies taps of type `T`, what it accumulates in, and how the accumulator returns to
//! the sample type: one rounding step, then saturation.
//!
//! The third parameter of `MulAcc<T, W>` picks the accumulator width `W` ([`DefaultAcc`] unless
//! named):
//!
//! | sample `S` | taps `T` | `W` | accumulator | output step |
//! |---|---|---|---|---|
//! | `i16` (Q15) | `i16` (Q15) | [`DefaultAcc`] | `i64`, exact | `>> 15`, [`Rounding`], saturate to `i16` |
//! | `FixedI16<Fs>` | `FixedI16<Ft>` | [`DefaultAcc`] | `i64`, exact | `>> Ft`, [`Rounding`], saturate |
//! | `i16`, `FixedI16<Fs>` | `i16` (Q15) | [`Acc32<P>`](crate::headroom::Acc32) | `i32`, exact by a compile-time proof | as above |
//! | `i32` (Q31) | `i32` (Q31) | [`DefaultAcc`] | `i64`, exact while Σ\|h\| < 2 | `>> 31`, [`Rounding`], saturate to `i32` |
//! | `FixedI32<Fs>` | `FixedI32<Ft>` | [`DefaultAcc`] | `i64`, exact while in range | `>> Ft`, [`Rounding`], saturate |
//! | `i32`, `FixedI32<Fs>` | as above | [`Acc128`] | `i128`, exact for any taps | as above |
//! | `f32` | `f32` | [`DefaultAcc`] | `f32` | none |
//! | `f32` | `f64` | [`DefaultAcc`] | `f64` | nearest `f32` (ties to even) |
//! | `f64` | `f64` | [`DefaultAcc`] | `f64` | none |
//!
//! "Exact" is guaranteed, not hoped for: [`MulAcc::accumulator_fits`] decides from the taps
//! whether any input in the sample type's full range could overflow the accumulator, and every
//! constructor in this crate refuses such taps.

mod accumulator;
pub(crate) mod fixed_point;
mod float;
mod rounding;

pub use accumulator::{Acc128, DefaultAcc, RuntimeChecked};
pub use fixed_point::FixedPoint;
pub use rounding::Rounding;

pub(crate) mod sealed {
    /// Keeps the numeric traits closed: their contracts are proven for the listed types only.
    pub trait Sealed {}
}

/// A value type a filter can store as a sample or a tap.
///
/// Implemented for `i16` (Q15), `i32` (Q31), `fixed::FixedI16<F>`, `fixed::FixedI32<F>`
/// (including `I1F15`, `I1F31`), `f32` and `f64`. Sealed.
pub trait Sample: Copy + PartialEq + core::fmt::Debug + sealed::Sealed {
    /// The value zero, used to clear histories.
    const ZERO: Self;

    /// The value as an `f64`.
    ///
    /// **Accuracy:** exact for every implementing type (16- and 32-bit fixed-point values and
    /// `f32` are all representable in `f64`).
    ///
    /// ```
    /// use tapline::Sample;
    /// assert_eq!(i16::MIN.to_f64(), -1.0); // Q15: raw / 2^15
    /// assert_eq!(fixed::types::I4F12::from_bits(4096).to_f64(), 1.0);
    /// ```
    fn to_f64(self) -> f64;
}

/// How the sample type `Self` multiplies a tap of type `T`, accumulates, and returns to `Self`.
///
/// The methods are the whole arithmetic of a filter; kernels only call [`mul_acc`] in a loop
/// and [`finish`] once per output. See the [module table](self) for each implementation's
/// accumulator and output step.
///
/// [`mul_acc`]: MulAcc::mul_acc
/// [`finish`]: MulAcc::finish
pub trait MulAcc<T: Sample, W = DefaultAcc>: Sample {
    /// The accumulator: wide enough to hold the exact sum for any tap set that passes
    /// [`accumulator_fits`](MulAcc::accumulator_fits).
    type Acc: Copy + core::fmt::Debug;

    /// The empty sum.
    const ACC_ZERO: Self::Acc;

    /// `acc + tap · x`.
    ///
    /// **Fixed point:** the product is exact; the addition wraps in two's complement, which
    /// for taps that pass [`accumulator_fits`](MulAcc::accumulator_fits) means the final sum is
    /// exact (intermediate wraparound cancels). **Float:** one rounding for the product and one
    /// for the sum (no fused multiply-add).
    ///
    /// ```
    /// use tapline::MulAcc;
    /// // Q15: -1.0 × -1.0 = 2^30 in Q30, held exactly.
    /// assert_eq!(<i16 as MulAcc<i16>>::mul_acc(0, i16::MIN, i16::MIN), 1 << 30);
    /// ```
    fn mul_acc(acc: Self::Acc, tap: T, x: Self) -> Self::Acc;

    /// Returns the accumulator to the sample type, and whether it had to saturate.
    ///
    /// **Rounding (fixed point):** the accumulator is divided by 2^F, F = the tap type's
    /// fractional bits, with the given [`Rounding`]. **Saturation:** the quotient is clamped to
    /// the sample type's range; the flag is `true` when clamping changed it. Never wraps.
    /// **Float:** `rounding` is ignored; `f64` accumulators of `f32` samples round to the
    /// nearest `f32`; the flag is always `false` (overflow gives ±∞ as IEEE 754 says).
    ///
    /// ```
    /// use tapline::{MulAcc, Rounding};
    /// // Q15: 2^30 (= +1.0 in Q30) does not fit Q15 and saturates to 32767.
    /// assert_eq!(<i16 as MulAcc<i16>>::finish(1 << 30, Rounding::HalfUp), (i16::MAX, true));
    /// // 1.5 LSB: half-up gives 2, truncation 1, ties-to-even 2.
    /// let acc = 3 << 14;
    /// assert_eq!(<i16 as MulAcc<i16>>::finish(acc, Rounding::HalfUp), (2, false));
    /// assert_eq!(<i16 as MulAcc<i16>>::finish(acc, Rounding::Truncate), (1, false));
    /// assert_eq!(<i16 as MulAcc<i16>>::finish(acc, Rounding::HalfEven), (2, false));
    /// ```
    fn finish(acc: Self::Acc, rounding: Rounding) -> (Self, bool);

    /// `true` when no input sequence in the full range of `Self` can take the exact sum
    /// Σ h\[k\]·x\[n−k\] outside the accumulator's range, for these taps.
    ///
    /// **Fixed point:** exact two's-complement bound, computed in `i128`: the largest sum is
    /// Σ max(h·x_max, h·x_min), the smallest Σ min(h·x_max, h·x_min). Q15 taps of any realistic
    /// length pass; Q31 taps pass while Σ|h| is a little under 2. **Float:** always `true`.
    ///
    /// ```
    /// use tapline::MulAcc;
    /// assert!(<i32 as MulAcc<i32>>::accumulator_fits(&[i32::MAX, i32::MAX]));
    /// assert!(!<i32 as MulAcc<i32>>::accumulator_fits(&[i32::MIN, i32::MIN]));
    /// ```
    fn accumulator_fits(taps: &[T]) -> bool;

    /// The input as the filter admits it into its history, and whether it had to be changed.
    ///
    /// Every accumulator but [`Acc32`](crate::headroom::Acc32) admits every value unchanged.
    /// `Acc32<P>` clamps the input to the range its proof `P` was made for, so that the proof
    /// holds for any value the firmware passes; a clamp counts as a saturation.
    ///
    /// ```
    /// use tapline::MulAcc;
    /// assert_eq!(<i16 as MulAcc<i16>>::admit(i16::MIN), (i16::MIN, false));
    /// ```
    #[inline(always)]
    fn admit(x: Self) -> (Self, bool) {
        (x, false)
    }

    /// The block sum [`Fir`](crate::Fir) runs on a staged block: for every `i` with
    /// `i + taps.len() ≤ span.len()`, in ascending `i`, `emit(Σ_k taps[k]·span[i + L − 1 − k])`.
    ///
    /// The provided method is the portable [`dot_block`](crate::kernel::dot_block). An
    /// implementation may use a target kernel instead only if it is bit-identical to it: Q15
    /// samples with the proven 32-bit accumulator use the dual multiply-accumulate kernel in
    /// `kernel::arm` on Armv7E-M cores.
    ///
    /// ```
    /// use tapline::MulAcc;
    /// let mut out = [0i64; 2];
    /// let mut slots = out.iter_mut();
    /// <i16 as MulAcc<i16>>::dot_block(&[1, 1], &[1, 2, 3], |acc| {
    ///     if let Some(slot) = slots.next() { *slot = acc; }
    /// });
    /// assert_eq!(out, [3, 5]);
    /// ```
    #[inline(always)]
    fn dot_block(taps: &[T], span: &[Self], emit: impl FnMut(Self::Acc)) {
        crate::kernel::dot_block::<Self, T, W>(taps, span, emit);
    }

    /// The single-output sum the filters run per sample: `acc + Σ taps[k]·xs[len − 1 − k]`
    /// over `k < len = min(taps.len(), xs.len())` (the contract of
    /// [`dot_reversed`](crate::kernel::dot_reversed)).
    ///
    /// The provided method is the portable kernel; Q15, Q31 and `f32` use the assembly kernels
    /// of `kernel::arm` on Armv7E-M, which are bit-identical to it.
    ///
    /// ```
    /// use tapline::MulAcc;
    /// // h = [1, 2, 3] against the history 10, 20, 30 (newest last): 1·30 + 2·20 + 3·10.
    /// assert_eq!(<i16 as MulAcc<i16>>::dot_reversed(0, &[1, 2, 3], &[10, 20, 30]), 100);
    /// ```
    #[inline(always)]
    fn dot_reversed(acc: Self::Acc, taps: &[T], xs: &[Self]) -> Self::Acc {
        crate::kernel::dot_reversed::<Self, T, W>(acc, taps, xs)
    }
}
