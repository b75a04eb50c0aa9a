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
//! | `i16`, `FixedI16<Fs>` | `i16` (Q15) | [`Acc32<P>`](Acc32) | `i32`, exact by a compile-time proof | as above |
//! | `i16`, `FixedI16<Fs>` | `i16` (Q15) | [`Acc32Checked`] | `i32`, exact by a run-time check | as above |
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
//!
//! **Layer rule:** this module is arithmetic only and imports nothing of this crate but itself
//! (the `fixed` crate is its one dependency). It chooses no kernel: [`Kernels`] only *names* the
//! two slice sums every filter runs, with their contracts; which code computes them on which
//! target is decided once per sample/tap/accumulator combination in the kernel layer
//! (`kernel/select.rs`), the only place that knows about target kernels. Because `Kernels` is a
//! supertrait of [`MulAcc`], every `S: MulAcc<T, W>` bound can call them, and a new arithmetic
//! does not compile until the kernel layer has chosen its kernels.

mod accumulator;
pub(crate) mod fixed_point;
mod float;
mod rounding;

pub use accumulator::{Acc32, Acc32Checked, Acc128, DefaultAcc, RuntimeChecked};
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
/// accumulator and output step. The slice sums built from them come with the supertrait
/// [`Kernels`], so any `S: MulAcc<T, W>` can run them.
///
/// [`mul_acc`]: MulAcc::mul_acc
/// [`finish`]: MulAcc::finish
pub trait MulAcc<T: Sample, W = DefaultAcc>: Kernels<T, W> {
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
    /// Every accumulator but [`Acc32`] admits every value unchanged.
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

    /// [`admit`](MulAcc::admit) for a filter that holds its width's value: the same for every
    /// width but [`Acc32Checked`], whose range is a run-time value carried by `width` (its
    /// [`admit`](MulAcc::admit) alone knows no range and admits every value unchanged). The
    /// filters call this one.
    ///
    /// ```
    /// use tapline::MulAcc;
    /// use tapline::headroom::{Acc32Checked, CheckedTaps, InputRange};
    /// let checked = CheckedTaps::check(&[32767; 4], InputRange::codes(-100, 100)?)?;
    /// let width = checked.width();
    /// assert_eq!(<i16 as MulAcc<i16, Acc32Checked>>::admit_within(&width, i16::MIN), (-100, true));
    /// assert_eq!(<i16 as MulAcc<i16, Acc32Checked>>::admit_within(&width, 7), (7, false));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[inline(always)]
    fn admit_within(width: &W, x: Self) -> (Self, bool) {
        let _ = width;
        Self::admit(x)
    }
}

/// The two slice sums every filter runs, named here with their exact contracts and computed by
/// the kernel layer, which holds one impl per sample/tap/accumulator combination and chooses
/// there, per target, between the portable loops and the assembly kernels (each bit-identical
/// to its portable twin). A supertrait of [`MulAcc`]: every `S: MulAcc<T, W>` bound reaches
/// them, so generic code written against `MulAcc` calls them unchanged.
///
/// **Numerics:** exactly the sums [`MulAcc::mul_acc`] builds term by term from
/// [`MulAcc::ACC_ZERO`] (or the `acc` given), in ascending tap index: fixed point is exact for
/// taps that pass [`MulAcc::accumulator_fits`]; floats round per operation, in that order, on
/// every target. Nothing here rounds to the output or saturates ([`MulAcc::finish`] does).
///
/// Name the trait to call a sum directly; `W` defaults to [`DefaultAcc`] as in `MulAcc`:
///
/// ```
/// use tapline::num::Kernels;
/// // h = [1, 2, 3] against the history 10, 20, 30 (newest last): 1·30 + 2·20 + 3·10.
/// assert_eq!(<i16 as Kernels<i16>>::dot_reversed(0, &[1, 2, 3], &[10, 20, 30]), 100);
/// ```
pub trait Kernels<T: Sample, W = DefaultAcc>: Sample {
    /// The block sum a filter runs on a staged block: for every `i` with
    /// `i + taps.len() ≤ span.len()`, in ascending `i`, `emit(Σ_k taps[k]·span[i + L − 1 − k])`
    /// (L = `taps.len()`), each output summed from `ACC_ZERO`. No outputs when `taps` is empty
    /// or `span` is shorter than `taps`.
    ///
    /// ```
    /// use tapline::num::Kernels;
    /// let mut out = [0i64; 2];
    /// let mut slots = out.iter_mut();
    /// <i16 as Kernels<i16>>::dot_block(&[1, 1], &[1, 2, 3], |acc| {
    ///     if let Some(slot) = slots.next() { *slot = acc; }
    /// });
    /// assert_eq!(out, [3, 5]);
    /// ```
    fn dot_block(taps: &[T], span: &[Self], emit: impl FnMut(<Self as MulAcc<T, W>>::Acc))
    where
        Self: MulAcc<T, W>;

    /// [`dot_block`](Kernels::dot_block) with the output step fused in, where this target has
    /// such a kernel for this combination: each sum finished as [`MulAcc::finish`] does with
    /// `rounding`, into the next slot of `out` (outputs past the end of `out` are computed and
    /// counted, not stored), returning `Some(how many saturated)`. `None` (the default, and
    /// every combination but Q15 with the proven 32-bit sum on Armv7E-M, which uses one `QADD`
    /// of the rounding offset and one `SSAT` with the shift) means nothing was computed: the
    /// caller finishes the sums of `dot_block` itself.
    ///
    /// **Numerics:** when `Some`, exactly `MulAcc::finish` on each sum of `dot_block`.
    ///
    /// ```
    /// use tapline::{Rounding, num::Kernels};
    /// let mut out = [0i16; 2];
    /// // The default accumulator has no fused kernel: nothing is computed.
    /// let fused = <i16 as Kernels<i16>>::dot_block_fused(&[16384], &[1, 2], Rounding::HalfUp, &mut out);
    /// assert_eq!((fused, out), (None, [0, 0]));
    /// ```
    #[inline(always)]
    fn dot_block_fused(
        taps: &[T],
        span: &[Self],
        rounding: Rounding,
        out: &mut [Self],
    ) -> Option<u32>
    where
        Self: MulAcc<T, W>,
    {
        let _ = (taps, span, rounding, out);
        None
    }

    /// The single-output sum a filter runs per sample: `acc + Σ taps[k]·xs[len − 1 − k]` over
    /// `k < len = min(taps.len(), xs.len())` (taps forward against `xs` read backward from its
    /// last element: with `xs` a history ordered oldest→newest, the convolution sum).
    ///
    /// ```
    /// use tapline::num::{Acc128, Kernels};
    /// // Q31 full scale: (−1)·(−1) twice is 2.0 in Q62, beyond i64 and exact in i128.
    /// let acc = <i32 as Kernels<i32, Acc128>>::dot_reversed(0, &[i32::MIN; 2], &[i32::MIN; 2]);
    /// assert_eq!(acc, 1 << 63);
    /// ```
    fn dot_reversed(
        acc: <Self as MulAcc<T, W>>::Acc,
        taps: &[T],
        xs: &[Self],
    ) -> <Self as MulAcc<T, W>>::Acc
    where
        Self: MulAcc<T, W>;
}
