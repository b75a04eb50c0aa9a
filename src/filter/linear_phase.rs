//! The linear-phase FIR, folded: symmetric or antisymmetric taps share one multiply per pair of
//! samples, y\[n\] = Σ_{k<⌊N/2⌋} h\[k\]·(x\[n−k\] ± x\[n−(N−1−k)\]) (+ the centre term).

use super::GroupDelay;
use super::shared::{OutputStep, history_dot_folded, map_block, output_controls};
use crate::headroom::Symmetry;
use crate::kernel::{Fold, FoldMulAcc};
use crate::num::{Acc128, DefaultAcc, RuntimeChecked, Sample};
use crate::{Error, Ring};
use core::marker::PhantomData;

/// A streaming FIR with `N` symmetric (h\[k\] = h\[N−1−k\]) or antisymmetric
/// (h\[k\] = −h\[N−1−k\]) taps, computed in folded form: the two samples that meet the same tap
/// are added (or subtracted) first, so an output costs ⌈N/2⌉ multiplies for symmetric taps and
/// ⌊N/2⌋ for antisymmetric ones (whose centre tap, for odd N, is zero), instead of N.
///
/// * **Same numbers as [`Fir`](crate::Fir):** in fixed point the outputs are bit-identical to a
///   plain `Fir` on the same taps, for every rounding mode, saturating inputs included. The
///   pre-add needs one more bit than a sample; it is formed in the accumulator's type, and each
///   folded product is bounded by the same worst case the constructor proves for the sum (see
///   [`FoldMulAcc`](crate::kernel::FoldMulAcc)). Floats round the pre-add once more than the
///   plain filter (not bit-identical; within the same γ_N bound).
/// * **Accumulator:** as `Fir` — `i64` by default, [`Acc128`](crate::num::Acc128) by choice.
/// * **Rounding:** one step, [`Rounding::HalfUp`](crate::Rounding::HalfUp) unless set with
///   [`with_rounding`](LinearPhaseFir::with_rounding).
/// * **Saturation:** clamped, never wrapped, counted by
///   [`saturations`](LinearPhaseFir::saturations).
/// * **Group delay:** exactly (N−1)/2 samples at every frequency
///   ([`group_delay`](LinearPhaseFir::group_delay)).
/// * **RAM:** 2·N samples of history (the mirrored [`Ring`](crate::Ring)), one index, the borrowed taps, a fold flag, the rounding mode
///   and the counter.
///
/// Per-sample ([`push`](LinearPhaseFir::push)) and block ([`process`](LinearPhaseFir::process),
/// [`process_in_place`](LinearPhaseFir::process_in_place)) calls give the same bits for any block
/// split.
///
/// ```
/// use tapline::{Fir, LinearPhaseFir};
///
/// static SMOOTH: [i16; 5] = [4096, 8192, 8192, 8192, 4096]; // symmetric, Σh = 1.0
/// let mut folded = LinearPhaseFir::<i16, 5>::new(&SMOOTH)?;
/// let mut plain = Fir::<i16, 5>::new(&SMOOTH)?;
/// assert_eq!(folded.multiplies(), 3); // instead of 5
/// // Full-scale edge: the pre-add −1 + −1 needs 17 bits; the output still equals the plain FIR.
/// for x in [i16::MIN, i16::MIN, i16::MAX, i16::MIN, i16::MIN, 0] {
///     assert_eq!(folded.push(x), plain.push(x));
/// }
/// assert_eq!(folded.group_delay().samples(), 2.0);
/// # Ok::<(), tapline::Error>(())
/// ```
#[derive(Clone, Debug)]
pub struct LinearPhaseFir<'a, S: FoldMulAcc<T, W>, const N: usize, T: Sample = S, W = DefaultAcc> {
    taps: &'a [T; N],
    fold: Fold,
    history: Ring<S, N>,
    output: OutputStep,
    width: PhantomData<W>,
}

impl<'a, S: FoldMulAcc<T>, const N: usize, T: Sample> LinearPhaseFir<'a, S, N, T> {
    /// A folded filter with impulse response `taps` (h\[0\] multiplies the newest sample), the
    /// default accumulator, zero history, [`Rounding::HalfUp`](crate::Rounding::HalfUp).
    ///
    /// # Errors
    /// * [`Error::NotLinearPhase`] when the taps are neither symmetric nor antisymmetric
    ///   (compared exactly);
    /// * [`Error::AccumulatorOverflow`] as for [`Fir::new`](crate::Fir::new).
    ///
    /// ```
    /// use tapline::{Error, LinearPhaseFir};
    /// static SKEWED: [i16; 3] = [1, 2, 3];
    /// assert_eq!(LinearPhaseFir::<i16, 3>::new(&SKEWED).err(), Some(Error::NotLinearPhase));
    /// static SLOPE: [i16; 3] = [i16::MAX, 0, -i16::MAX]; // antisymmetric: a differentiator
    /// let mut d = LinearPhaseFir::<i16, 3>::new(&SLOPE)?;
    /// assert_eq!(d.multiplies(), 1);
    /// assert_eq!((d.push(i16::MIN), d.push(0), d.push(0)), (-32767, 0, 32767));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn new(taps: &'a [T; N]) -> Result<Self, Error> {
        Self::with_accumulator(taps)
    }
}

impl<'a, S, const N: usize, T: Sample> LinearPhaseFir<'a, S, N, T>
where
    S: FoldMulAcc<T> + FoldMulAcc<T, Acc128>,
{
    /// The folded filter of [`new`](LinearPhaseFir::new) with the 128-bit accumulator
    /// [`Acc128`]: one line for `LinearPhaseFir::<S, N, T, Acc128>::with_accumulator(taps)`.
    /// For 32-bit samples; exact `i128` sums (the pre-added pair included), outputs bit-identical
    /// to [`Fir::new_wide`](crate::Fir::new_wide) of the same taps, the one output step
    /// (half up unless [`with_rounding`](LinearPhaseFir::with_rounding) says otherwise),
    /// clamped and counted saturation.
    ///
    /// # Errors
    /// [`Error::NotLinearPhase`] as in [`new`](LinearPhaseFir::new).
    ///
    /// ```
    /// use tapline::{Error, LinearPhaseFir};
    /// static LOUD: [i32; 3] = [i32::MIN, i32::MIN, i32::MIN]; // Σ|h| = 3, symmetric
    /// let mut f = LinearPhaseFir::new_wide(&LOUD)?;
    /// assert_eq!(f.multiplies(), 2);
    /// assert_eq!(f.push(-(1 << 28)), 1 << 28);
    /// assert_eq!(f.push(i32::MIN), i32::MAX); // 1 + 1/8 clamps, counted
    /// assert_eq!(f.saturations(), 1);
    /// static SKEWED: [i32; 2] = [1, 2];
    /// assert_eq!(LinearPhaseFir::<i32, 2>::new_wide(&SKEWED).err(), Some(Error::NotLinearPhase));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn new_wide(taps: &'a [T; N]) -> Result<LinearPhaseFir<'a, S, N, T, Acc128>, Error> {
        LinearPhaseFir::with_accumulator(taps)
    }
}

impl<'a, S: FoldMulAcc<T, W>, const N: usize, T: Sample, W: RuntimeChecked>
    LinearPhaseFir<'a, S, N, T, W>
{
    /// As [`new`](LinearPhaseFir::new), with the accumulator named by the type's `W` parameter
    /// ([`DefaultAcc`] or [`Acc128`](crate::num::Acc128)).
    ///
    /// # Errors
    /// As [`new`](LinearPhaseFir::new).
    ///
    /// ```
    /// use tapline::{LinearPhaseFir, num::Acc128};
    /// static GAIN_2: [i32; 2] = [i32::MIN, i32::MIN]; // Σ|h| = 2: needs 128 bits
    /// let mut fir = LinearPhaseFir::<i32, 2, i32, Acc128>::with_accumulator(&GAIN_2)?;
    /// assert_eq!(fir.push(i32::MIN), i32::MAX); // +1.0 does not exist in Q31: clamped
    /// assert_eq!(fir.push(i32::MIN), i32::MAX); // +2.0, exact in 128 bits, clamped
    /// assert_eq!(fir.push(0), i32::MAX);
    /// assert_eq!(fir.saturations(), 3);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_accumulator(taps: &'a [T; N]) -> Result<Self, Error> {
        let fold = match Symmetry::of(taps) {
            Symmetry::Symmetric => Fold::Sum,
            Symmetry::Antisymmetric => Fold::Difference,
            Symmetry::None => return Err(Error::NotLinearPhase),
        };
        if !S::accumulator_fits(taps) {
            return Err(Error::AccumulatorOverflow);
        }
        Ok(LinearPhaseFir {
            taps,
            fold,
            history: Ring::new(S::ZERO),
            output: OutputStep::new(),
            width: PhantomData,
        })
    }
}

impl<S: FoldMulAcc<T, W>, const N: usize, T: Sample, W> LinearPhaseFir<'_, S, N, T, W> {
    output_controls!(output);

    /// Filters one sample: pushes `x` into the history and returns y\[n\], with ⌈N/2⌉ (or
    /// ⌊N/2⌋) multiplies and one output step. Saturation is counted; nothing panics.
    #[inline]
    pub fn push(&mut self, x: S) -> S {
        let x = self.output.admit::<S, T, W>(x);
        self.history.push(x);
        let acc = history_dot_folded::<S, T, W, N>(&self.history, self.taps, self.fold);
        self.output.finish::<S, T, W>(acc)
    }

    /// Filters `input` into `output`, exactly as repeated [`push`](LinearPhaseFir::push).
    ///
    /// # Errors
    /// [`Error::OutputLength`] when the lengths differ; nothing is processed then.
    pub fn process(&mut self, input: &[S], output: &mut [S]) -> Result<(), Error> {
        map_block(input, output, |x| self.push(x))
    }

    /// Filters `buffer` in place, exactly as repeated [`push`](LinearPhaseFir::push).
    pub fn process_in_place(&mut self, buffer: &mut [S]) {
        for v in buffer {
            *v = self.push(*v);
        }
    }

    /// Zero history and zero saturation count; taps and rounding stay.
    pub fn reset(&mut self) {
        self.history.fill(S::ZERO);
        self.output.clear();
    }

    /// [`Symmetry::Symmetric`] or [`Symmetry::Antisymmetric`], found at construction.
    #[must_use]
    pub fn symmetry(&self) -> Symmetry {
        match self.fold {
            Fold::Sum => Symmetry::Symmetric,
            Fold::Difference => Symmetry::Antisymmetric,
        }
    }

    /// Multiplies per output: ⌈N/2⌉ for symmetric taps, ⌊N/2⌋ for antisymmetric ones (a plain
    /// FIR needs N).
    #[must_use]
    pub const fn multiplies(&self) -> usize {
        match self.fold {
            Fold::Sum => N.div_ceil(2),
            Fold::Difference => N / 2,
        }
    }

    /// The constant group delay, (N−1)/2 samples.
    #[must_use]
    pub const fn group_delay(&self) -> GroupDelay {
        GroupDelay::from_half_samples(N - 1)
    }

    /// The taps, as given (all N of them).
    #[must_use]
    pub fn taps(&self) -> &[T; N] {
        self.taps
    }

    /// The history: the last N input samples, oldest first.
    #[must_use]
    pub fn history(&self) -> &Ring<S, N> {
        &self.history
    }
}
