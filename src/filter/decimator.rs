//! The decimating FIR: y\[m\] = Σ_k h\[k\]·x\[mM + M − 1 − k\], the full-rate FIR's output kept
//! at every M-th input and computed only there.

use super::GroupDelay;
use super::shared::{
    OutputStep, Phase, decimate_block, decimate_in_place, history_dot, output_controls,
};
use super::taps::TapTable;
use crate::headroom::CheckedTaps;
use crate::num::{Acc32Checked, DefaultAcc, MulAcc, RuntimeChecked, Sample};
use crate::{Error, Ring};
use core::marker::PhantomData;

/// The cadence every decimating structure shares: a history fed every input, a phase that
/// completes every `M` inputs, and the output step run only then.
#[derive(Clone, Debug)]
pub(crate) struct Decimation<S, const N: usize, const M: usize> {
    pub(crate) history: Ring<S, N>,
    phase: Phase<M>,
    pub(crate) output: OutputStep,
}

impl<S: Sample, const N: usize, const M: usize> Decimation<S, N, M> {
    pub(crate) fn new() -> Self {
        const { assert!(M > 0, "a decimation factor must be at least 1") };
        Decimation {
            history: Ring::new(S::ZERO),
            phase: Phase::default(),
            output: OutputStep::new(),
        }
    }

    /// Pushes `x`; on the M-th input of a group, finishes `sum(history)` into an output.
    #[inline(always)]
    pub(crate) fn push<T: Sample, W>(
        &mut self,
        x: S,
        sum: impl FnOnce(&Ring<S, N>) -> S::Acc,
    ) -> Option<S>
    where
        S: MulAcc<T, W>,
    {
        let x = self.output.admit::<S, T, W>(x);
        self.advance::<T, W>(x, sum)
    }

    /// [`push`](Self::push) for a structure that holds its width's value
    /// ([`MulAcc::admit_within`]).
    #[inline(always)]
    pub(crate) fn push_within<T: Sample, W>(
        &mut self,
        width: &W,
        x: S,
        sum: impl FnOnce(&Ring<S, N>) -> S::Acc,
    ) -> Option<S>
    where
        S: MulAcc<T, W>,
    {
        let x = self.output.admit_within::<S, T, W>(width, x);
        self.advance::<T, W>(x, sum)
    }

    /// Pushes an admitted `x`; on the M-th input of a group, finishes `sum(history)`.
    #[inline(always)]
    fn advance<T: Sample, W>(&mut self, x: S, sum: impl FnOnce(&Ring<S, N>) -> S::Acc) -> Option<S>
    where
        S: MulAcc<T, W>,
    {
        self.history.push(x);
        if self.phase.tick() {
            Some(self.output.finish::<S, T, W>(sum(&self.history)))
        } else {
            None
        }
    }

    pub(crate) const fn outputs_for(&self, len: usize) -> usize {
        self.phase.outputs_for(len)
    }

    pub(crate) const fn position(&self) -> usize {
        self.phase.position()
    }

    pub(crate) fn reset(&mut self) {
        self.history.fill(S::ZERO);
        self.phase = Phase::default();
        self.output.clear();
    }
}

/// A polyphase decimating FIR: `N` taps, decimation factor `M` (a const: a factor of 0 does not
/// compile).
///
/// Every input enters the history; only every M-th input computes an output, so the cost is N
/// multiply-accumulates per *output* (N/M per input) instead of N per input.
///
/// * **What it computes:** exactly the plain [`Fir`](crate::Fir) on the same taps followed by
///   keeping every M-th output — the one at the M-th, 2M-th, … input, i.e. full-rate outputs
///   y\[M−1\], y\[2M−1\], … — bit for bit in fixed point, and with the same float operations in
///   the same order for floats.
/// * **Accumulator, rounding, saturation:** those of `Fir` (one rounding step, clamped and
///   counted by [`saturations`](Decimator::saturations), never wrapped).
/// * **Group delay:** (N−1)/2 input samples for symmetric or antisymmetric taps, i.e.
///   (N−1)/(2M) output samples ([`group_delay`](Decimator::group_delay), in input samples).
/// * **RAM:** 2·N samples (the mirrored [`Ring`](crate::Ring)), one index, one phase counter, the borrowed taps, rounding, counter.
/// * **Taps known at run time:** [`DecimatorUpTo`] holds a slice of 1 to `N` taps (`N` the
///   capacity) with the same code and bits as a decimator of exactly that many taps; its
///   history stays `2·N` samples.
///
/// Per-sample ([`push`](Decimator::push)) and block ([`process`](Decimator::process),
/// [`process_in_place`](Decimator::process_in_place)) calls give the same outputs for any
/// split: the phase carries across blocks.
///
/// ```
/// use tapline::Decimator;
///
/// // 1 kHz → 250 Hz: a 4-tap average, decimated by 4, in Q15.
/// static AVERAGE_4: [i16; 4] = [8192; 4];
/// let mut dec = Decimator::<i16, 4, 4>::new(&AVERAGE_4)?;
/// assert_eq!(dec.push(100), None);
/// assert_eq!(dec.push(200), None);
/// assert_eq!(dec.push(300), None);
/// assert_eq!(dec.push(400), Some(250));
///
/// // A DMA half-buffer of 10 samples: 2 outputs now, and the phase carries on.
/// let mut out = [0i16; 3];
/// assert_eq!(dec.process(&[i16::MIN; 10], &mut out)?, 2);
/// assert_eq!(out[..2], [i16::MIN, i16::MIN]); // full scale, no saturation
/// assert_eq!(dec.outputs_for(2), 1); // two more inputs complete the next group
/// assert_eq!(dec.saturations(), 0);
/// # Ok::<(), tapline::Error>(())
/// ```
///
/// A factor of 0 does not compile:
///
/// ```compile_fail
/// static TAPS: [i16; 2] = [1, 1];
/// let dec = tapline::Decimator::<i16, 2, 0>::new(&TAPS);
/// ```
#[derive(Clone, Debug)]
pub struct Decimator<
    'a,
    S: MulAcc<T, W>,
    const N: usize,
    const M: usize,
    T: Sample = S,
    W = DefaultAcc,
    H = &'a [T; N],
> {
    taps: H,
    core: Decimation<S, N, M>,
    // A value: the run-time checked width carries its input range (zero-sized otherwise).
    width: W,
    borrowed: PhantomData<&'a [T]>,
}

/// A [`Decimator`] whose taps are a slice of 1 to `N` known only at run time (`N` is the
/// capacity): what `Decimator<S, L, M>` computes for the same `L` taps, bit for bit. RAM: that
/// of `Decimator<S, N, M>` plus one word; replacing taps ([`set_taps`](Decimator::set_taps))
/// keeps the history and the phase.
///
/// ```
/// use tapline::{Error, filter::DecimatorUpTo};
/// // A 4-tap average chosen at start-up, in a decimator by 2 that holds up to 16 taps.
/// let average = [8192i16; 4];
/// let mut dec = DecimatorUpTo::<i16, 16, 2>::with_taps(&average)?;
/// let out: Vec<i16> = [400, 800, 1200, 1600].iter().filter_map(|&x| dec.push(x)).collect();
/// assert_eq!(out, [300, 1000]); // (0+0+400+800)/4, (400+800+1200+1600)/4
/// assert_eq!(dec.process(&[i16::MIN; 4], &mut [0; 2])?, 2); // full scale, no saturation
/// assert_eq!(dec.saturations(), 0);
/// assert_eq!(DecimatorUpTo::<i16, 3, 2>::with_taps(&average).err(),
///     Some(Error::TooManyTaps { capacity: 3, found: 4 }));
/// # Ok::<(), tapline::Error>(())
/// ```
pub type DecimatorUpTo<'a, S, const N: usize, const M: usize, T = S, W = DefaultAcc> =
    Decimator<'a, S, N, M, T, W, &'a [T]>;

impl<'a, S: MulAcc<T>, const N: usize, const M: usize, T: Sample> Decimator<'a, S, N, M, T> {
    /// A decimator with impulse response `taps` (h\[0\] multiplies the newest sample), the
    /// default accumulator, zero history, phase 0, [`Rounding::HalfUp`](crate::Rounding::HalfUp).
    ///
    /// # Errors
    /// [`Error::AccumulatorOverflow`] as for [`Fir::new`](crate::Fir::new).
    ///
    /// ```
    /// use tapline::{Decimator, Error};
    /// static TOO_LOUD: [i32; 3] = [i32::MIN; 3];
    /// assert_eq!(Decimator::<i32, 3, 2>::new(&TOO_LOUD).err(), Some(Error::AccumulatorOverflow));
    /// ```
    pub fn new(taps: &'a [T; N]) -> Result<Self, Error> {
        Self::with_accumulator(taps)
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, const M: usize, T: Sample, W: RuntimeChecked>
    Decimator<'a, S, N, M, T, W>
{
    /// As [`new`](Decimator::new), with the accumulator named by the type's `W` parameter.
    ///
    /// # Errors
    /// [`Error::AccumulatorOverflow`] as for [`Fir::new`](crate::Fir::new).
    ///
    /// ```
    /// use tapline::{Decimator, num::Acc128};
    /// static GAIN_3: [i32; 3] = [i32::MIN; 3];
    /// let mut dec = Decimator::<i32, 3, 3, i32, Acc128>::with_accumulator(&GAIN_3)?;
    /// let outputs: Vec<_> = [1 << 20; 3].iter().filter_map(|&x| dec.push(x)).collect();
    /// assert_eq!(outputs, [-(3 << 20)]);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_accumulator(taps: &'a [T; N]) -> Result<Self, Error> {
        Self::checked(taps)
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, const M: usize, T: Sample, W: RuntimeChecked>
    DecimatorUpTo<'a, S, N, M, T, W>
{
    /// A decimator of capacity `N` with the run-time tap set `taps` (1 to `N`), the
    /// accumulator named by `W`, zero history, phase 0,
    /// [`Rounding::HalfUp`](crate::Rounding::HalfUp).
    ///
    /// # Errors
    /// [`Error::NoTaps`], [`Error::TooManyTaps`], and [`Error::AccumulatorOverflow`] as for
    /// [`Fir::new`](crate::Fir::new).
    ///
    /// ```
    /// use tapline::{Error, filter::DecimatorUpTo};
    /// assert_eq!(DecimatorUpTo::<i32, 4, 2>::with_taps(&[i32::MIN; 3]).err(),
    ///     Some(Error::AccumulatorOverflow));
    /// assert_eq!(DecimatorUpTo::<i32, 4, 2>::with_taps(&[]).err(), Some(Error::NoTaps));
    /// ```
    pub fn with_taps(taps: &'a [T]) -> Result<Self, Error> {
        Self::checked(taps)
    }
}

impl<'a, S, const N: usize, const M: usize, T, W, H> Decimator<'a, S, N, M, T, W, H>
where
    S: MulAcc<T, W>,
    T: Sample + 'a,
    W: RuntimeChecked,
    H: TapTable<'a, T, N>,
{
    fn checked(taps: H) -> Result<Self, Error> {
        super::fir::check_taps::<S, T, W, N>(taps)?;
        Ok(Self::with_parts(taps, W::default()))
    }

    /// Replaces the taps, keeping the history and the phase (a run-time tap set may change its
    /// length, 1 to `N`); from this call on the outputs are those of a decimator that had the
    /// new taps from the start (once `N` inputs have arrived).
    ///
    /// # Errors
    /// [`Error::NoTaps`], [`Error::TooManyTaps`] (run-time tap sets only) and
    /// [`Error::AccumulatorOverflow`]; the old taps then stay.
    ///
    /// ```
    /// use tapline::filter::DecimatorUpTo;
    /// let mut dec = DecimatorUpTo::<i16, 4, 2>::with_taps(&[i16::MAX])?;
    /// dec.push(1000);
    /// dec.set_taps(&[16384, 16384])?;
    /// assert_eq!(dec.push(i16::MIN), Some(-15884)); // (1000 − 32768) / 2
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn set_taps(&mut self, taps: H) -> Result<(), Error> {
        super::fir::check_taps::<S, T, W, N>(taps)?;
        self.taps = taps;
        Ok(())
    }
}

impl<'a, S: MulAcc<i16, Acc32Checked>, const N: usize, const M: usize>
    DecimatorUpTo<'a, S, N, M, i16, Acc32Checked>
{
    /// A Q15 decimator of capacity `N` with the 32-bit accumulator, for taps that passed
    /// [`CheckedTaps::check`]: inputs are clamped into the checked range (counted as
    /// saturations), so the check holds for every call; outputs are those of the default `i64`
    /// path, bit for bit, for inputs within the range.
    ///
    /// # Errors
    /// [`Error::NoTaps`] or [`Error::TooManyTaps`].
    ///
    /// ```
    /// use tapline::filter::DecimatorUpTo;
    /// use tapline::headroom::{Acc32Checked, CheckedTaps, InputRange};
    /// let checked = CheckedTaps::check(&[32767; 4], InputRange::codes(-2048, 2047)?)?;
    /// let mut dec = DecimatorUpTo::<i16, 8, 4, i16, Acc32Checked>::with_checked(checked)?;
    /// let out: Vec<i16> = [i16::MIN; 4].iter().filter_map(|&x| dec.push(x)).collect();
    /// assert_eq!(out, [-8192]); // each input clamped to -2048 (4 counted); 4 · -2048 · 32767/32768
    /// assert_eq!(dec.saturations(), 4);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_checked(checked: CheckedTaps<'a>) -> Result<Self, Error> {
        let taps = checked.taps();
        TapTable::<i16, N>::within_capacity(taps)?;
        Ok(Self::with_parts(taps, checked.width()))
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, const M: usize, T: Sample + 'a, W, H>
    Decimator<'a, S, N, M, T, W, H>
where
    H: TapTable<'a, T, N>,
{
    output_controls!(core.output);

    fn with_parts(taps: H, width: W) -> Self {
        Decimator {
            taps,
            core: Decimation::new(),
            width,
            borrowed: PhantomData,
        }
    }

    /// Takes one input; returns `Some(y)` on every M-th input (the M-th, 2M-th, … since
    /// construction or [`reset`](Decimator::reset)), `None` otherwise. Only the inputs that
    /// return `Some` cost N multiply-accumulates; the others cost one ring push.
    #[inline]
    pub fn push(&mut self, x: S) -> Option<S> {
        let taps = self.taps.as_slice();
        self.core.push_within::<T, W>(&self.width, x, |history| {
            history_dot::<S, T, W, N>(S::ACC_ZERO, history, taps)
        })
    }

    /// Decimates `input` into the front of `output`, exactly as repeated
    /// [`push`](Decimator::push), and returns how many outputs were written
    /// ([`outputs_for`](Decimator::outputs_for)`(input.len())`, counted before the call).
    ///
    /// # Errors
    /// [`Error::OutputTooShort`] when `output` has room for fewer outputs than the call
    /// produces; nothing is processed then.
    pub fn process(&mut self, input: &[S], output: &mut [S]) -> Result<usize, Error> {
        let needed = self.core.outputs_for(input.len());
        decimate_block(input, output, needed, |x| self.push(x))
    }

    /// Decimates `buffer` in place: the outputs overwrite the front of the buffer (an output
    /// never overtakes its input). Returns how many outputs were written; the rest of the
    /// buffer keeps its input values.
    pub fn process_in_place(&mut self, buffer: &mut [S]) -> usize {
        decimate_in_place(buffer, |x| self.push(x))
    }

    /// How many outputs the next `len` inputs produce, given the current phase.
    #[must_use]
    pub const fn outputs_for(&self, len: usize) -> usize {
        self.core.outputs_for(len)
    }

    /// Inputs taken since the last output, 0 ≤ · < M.
    #[must_use]
    pub const fn phase(&self) -> usize {
        self.core.position()
    }

    /// Zero history, phase 0, zero saturation count; taps and rounding stay.
    pub fn reset(&mut self) {
        self.core.reset();
    }

    /// The decimation factor M.
    #[must_use]
    pub const fn factor(&self) -> usize {
        M
    }

    /// The group delay in *input* samples, (N−1)/2, when the taps are symmetric or
    /// antisymmetric; `None` otherwise. Divide by M for output samples.
    #[must_use]
    pub fn group_delay(&self) -> Option<GroupDelay> {
        GroupDelay::of(self.taps.as_slice())
    }

    /// The taps.
    #[must_use]
    pub fn taps(&self) -> H {
        self.taps
    }

    /// How many taps are in use: `N` for a whole table, 1 to `N` for a run-time tap set.
    #[must_use]
    pub fn tap_count(&self) -> usize {
        self.taps.as_slice().len()
    }
}
