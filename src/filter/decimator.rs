//! The decimating FIR: y\[m\] = Σ_k h\[k\]·x\[mM + M − 1 − k\], the full-rate FIR's output kept
//! at every M-th input and computed only there.

use super::GroupDelay;
use super::shared::{
    OutputStep, Phase, Tail, decimate_block, decimate_in_place, history_dot, output_controls,
};
use super::taps::TapTable;
use crate::headroom::CheckedTaps;
use crate::num::{Acc32Checked, Acc128, DefaultAcc, MulAcc, RuntimeChecked, Sample};
use crate::{Error, Ring};
use core::marker::PhantomData;
use core::num::NonZeroUsize;

/// The cadence every decimating structure shares: a history fed every input, a phase that
/// completes every `M` inputs, and the output step run only then.
#[derive(Clone, Debug)]
pub(crate) struct Decimation<S, const N: usize, const M: usize> {
    pub(crate) history: Ring<S, N>,
    phase: Phase<M>,
    /// The inputs the phase counts as taken at construction, reset and flush: M − 1 − the
    /// start phase. Read only there, never by `push`.
    restart: usize,
    pub(crate) output: OutputStep,
}

impl<S: Sample, const N: usize, const M: usize> Decimation<S, N, M> {
    /// M as the divisor of the tail's count (M > 0 is asserted at construction).
    const DOWN: NonZeroUsize = match NonZeroUsize::new(M) {
        Some(m) => m,
        None => NonZeroUsize::MIN,
    };

    pub(crate) fn new() -> Self {
        const { assert!(M > 0, "a decimation factor must be at least 1") };
        Decimation {
            history: Ring::new(S::ZERO),
            phase: Phase::default(),
            restart: 0,
            output: OutputStep::new(),
        }
    }

    /// Keeps full-rate output `phase` first (then `phase` + M, …), counting from the next
    /// input; the history stays.
    pub(crate) fn set_start_phase(&mut self, phase: usize) -> Result<(), Error> {
        if phase >= M {
            return Err(Error::StartPhaseTooLarge { phase, factor: M });
        }
        self.restart = M - 1 - phase;
        self.phase = Phase::counted(self.restart);
        Ok(())
    }

    pub(crate) const fn start_phase(&self) -> usize {
        M - 1 - self.restart
    }

    /// The zero-padded tail after the inputs so far: the next output lies M − 1 − (inputs
    /// counted in its group) full-rate samples after the next input's.
    pub(crate) const fn tail(&self) -> Tail {
        Tail {
            first: M - 1 - self.phase.position(),
            up: 1,
            down: Self::DOWN,
        }
    }

    /// Writes the tail of the signal filtered by `taps` ([`Tail`]), then restarts: zero
    /// history, the start phase again; the saturation count keeps the tail's events.
    pub(crate) fn flush<T: Sample, W>(
        &mut self,
        taps: &[T],
        output: &mut [S],
    ) -> Result<usize, Error>
    where
        S: MulAcc<T, W>,
    {
        let tail = self.tail();
        let (history, step) = (&self.history, &mut self.output);
        let written = tail.fill(taps.len(), output, |from| {
            let acc =
                history_dot::<S, T, W, N>(S::ACC_ZERO, history, taps.get(from..).unwrap_or(&[]));
            step.finish::<S, T, W>(acc)
        })?;
        self.restart();
        Ok(written)
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

    /// Zero history and the start phase; the saturation count stays.
    fn restart(&mut self) {
        self.history.fill(S::ZERO);
        self.phase = Phase::counted(self.restart);
    }

    pub(crate) fn reset(&mut self) {
        self.restart();
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
///   keeping every M-th output — by default the one at the M-th, 2M-th, … input, i.e.
///   full-rate outputs y\[M−1\], y\[2M−1\], …; from any start phase p < M, y\[p\],
///   y\[p+M\], … ([`with_start_phase`](Decimator::with_start_phase); p = 0 is
///   `scipy.signal.upfirdn`'s choice) — bit for bit in fixed point, and with the same float
///   operations in the same order for floats.
/// * **Finite signals:** [`flush`](Decimator::flush) writes the outputs of the zero-padded
///   tail (the full convolution's last K − 1 samples, K the tap count) and readies the
///   decimator for the next signal; streamed outputs plus the tail are `upfirdn`'s, output
///   for output and in number.
/// * **Accumulator, rounding, saturation:** those of `Fir` (one rounding step, clamped and
///   counted by [`saturations`](Decimator::saturations), never wrapped).
/// * **Group delay:** (N−1)/2 input samples for symmetric or antisymmetric taps, i.e.
///   (N−1)/(2M) output samples ([`group_delay`](Decimator::group_delay), in input samples).
/// * **RAM:** 2·N samples (the mirrored [`Ring`](crate::Ring)), one index, one phase counter,
///   the start phase (one word), the borrowed taps, rounding, counter.
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
    /// default accumulator, zero history, start phase M − 1 (the first output at the M-th
    /// input), [`Rounding::HalfUp`](crate::Rounding::HalfUp).
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

impl<'a, S, const N: usize, const M: usize, T: Sample> Decimator<'a, S, N, M, T>
where
    S: MulAcc<T> + MulAcc<T, Acc128>,
{
    /// The decimator of [`new`](Decimator::new) with the 128-bit accumulator [`Acc128`]: one
    /// line for `Decimator::<S, N, M, T, Acc128>::with_accumulator(taps)`, for 32-bit samples
    /// whose `i64` default refuses tap sets with Σ|h| near 2 or more. Start phase M − 1.
    ///
    /// * **Accumulator:** `i128`, exact for any tap set that fits in memory.
    /// * **Rounding / saturation:** the one output step of every filter ([`Rounding::HalfUp`](crate::Rounding::HalfUp)
    ///   unless `with_rounding` says otherwise), clamped and counted.
    /// * **Cost:** about twice the additions of `i64` on a 32-bit core.
    ///
    /// # Errors
    /// None in practice: [`Error::AccumulatorOverflow`] only for a table too long to exist.
    ///
    /// ```
    /// use tapline::Decimator;
    /// static GAIN_3: [i32; 3] = [i32::MIN; 3]; // Σ|h| = 3 in Q31: refused by Decimator::new
    /// assert!(Decimator::<i32, 3, 3>::new(&GAIN_3).is_err());
    /// let mut dec = Decimator::<i32, 3, 3>::new_wide(&GAIN_3)?;
    /// let outputs: Vec<_> = [1 << 20; 3].iter().filter_map(|&x| dec.push(x)).collect();
    /// assert_eq!(outputs, [-(3 << 20)]); // exact: −3 · 2^-11
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn new_wide(taps: &'a [T; N]) -> Result<Decimator<'a, S, N, M, T, Acc128>, Error> {
        Decimator::with_accumulator(taps)
    }
}

impl<'a, S, const N: usize, const M: usize, T: Sample> DecimatorUpTo<'a, S, N, M, T>
where
    S: MulAcc<T> + MulAcc<T, Acc128>,
{
    /// The run-time tap set of [`with_taps`](DecimatorUpTo::with_taps) (1 to `N` taps) with
    /// the 128-bit accumulator [`Acc128`]: one line for
    /// `DecimatorUpTo::<S, N, M, T, Acc128>::with_taps(taps)`. Numeric contract as
    /// [`new_wide`](Decimator::new_wide).
    ///
    /// # Errors
    /// [`Error::NoTaps`], [`Error::TooManyTaps`]; [`Error::AccumulatorOverflow`] only for a
    /// table too long to exist.
    ///
    /// ```
    /// use tapline::filter::DecimatorUpTo;
    /// let loud = [i32::MIN; 3];
    /// let mut dec = DecimatorUpTo::<i32, 8, 3>::with_taps_wide(&loud)?;
    /// let outputs: Vec<_> = [i32::MIN; 3].iter().filter_map(|&x| dec.push(x)).collect();
    /// assert_eq!(outputs, [i32::MAX]); // +3.0, summed exactly, clamps (counted)
    /// assert_eq!(dec.saturations(), 1);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_taps_wide(taps: &'a [T]) -> Result<DecimatorUpTo<'a, S, N, M, T, Acc128>, Error> {
        DecimatorUpTo::with_taps(taps)
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, const M: usize, T: Sample, W: RuntimeChecked>
    DecimatorUpTo<'a, S, N, M, T, W>
{
    /// A decimator of capacity `N` with the run-time tap set `taps` (1 to `N`), the
    /// accumulator named by `W`, zero history, start phase M − 1,
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

    /// Takes one input; returns `Some(y)` on every M-th input (by default the M-th, 2M-th, …
    /// since construction, [`reset`](Decimator::reset) or [`flush`](Decimator::flush); the
    /// (p+1)-th, (p+1+M)-th, … from start phase p), `None` otherwise. Only the inputs that
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

    /// Inputs taken since the last output, 0 ≤ · < M. After construction, [`reset`] and
    /// [`flush`] it is M − 1 − [`start_phase`], as if an output had been kept M full-rate
    /// samples before the first.
    ///
    /// [`reset`]: Decimator::reset
    /// [`flush`]: Decimator::flush
    /// [`start_phase`]: Decimator::start_phase
    #[must_use]
    pub const fn phase(&self) -> usize {
        self.core.position()
    }

    /// The same decimator keeping full-rate output `phase` first, then `phase` + M,
    /// `phase` + 2M, …: 0 gives the outputs of `scipy.signal.upfirdn(h, x, 1, M)` (y\[0\],
    /// y\[M\], …); M − 1, the default, the output at every M-th input (y\[M−1\], y\[2M−1\], …:
    /// one output per DMA block of M samples, at its end). Costs nothing per sample: it only
    /// sets where the input count starts (see [`set_start_phase`](Decimator::set_start_phase)).
    ///
    /// # Errors
    /// [`Error::StartPhaseTooLarge`] when `phase` ≥ M.
    ///
    /// ```
    /// use tapline::{Decimator, Error};
    /// // Thirds (1/3 each), decimated by 3, keeping full-rate outputs 0, 3, 6, … like upfirdn.
    /// static THIRDS: [i16; 3] = [10923; 3];
    /// let mut dec = Decimator::<i16, 3, 3>::new(&THIRDS)?.with_start_phase(0)?;
    /// assert_eq!(dec.start_phase(), 0);
    /// assert_eq!(dec.push(i16::MIN), Some(-10923)); // y[0]: −1.0 · 10923/32768, exact
    /// assert_eq!(dec.push(300), None);
    /// assert_eq!(dec.push(600), None);
    /// assert_eq!(dec.push(900), Some(600)); // y[3] = 1800 · 10923/32768 = 600.02
    /// assert_eq!(Decimator::<i16, 3, 3>::new(&THIRDS)?.with_start_phase(3).err(),
    ///     Some(Error::StartPhaseTooLarge { phase: 3, factor: 3 }));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_start_phase(mut self, phase: usize) -> Result<Self, Error> {
        self.set_start_phase(phase)?;
        Ok(self)
    }

    /// Sets the start phase (see [`with_start_phase`](Decimator::with_start_phase)) and
    /// restarts the count from it: the next input is taken as full-rate index 0, so it is the
    /// (`phase` + 1)-th input from now that returns an output. The history, taps and saturation
    /// count stay; [`reset`](Decimator::reset) and [`flush`](Decimator::flush) return to this
    /// phase.
    ///
    /// # Errors
    /// [`Error::StartPhaseTooLarge`] when `phase` ≥ M; nothing changes then.
    ///
    /// ```
    /// use tapline::{Decimator, Error};
    /// static NEGATE: [i16; 1] = [i16::MIN]; // −1.0
    /// let mut dec = Decimator::<i16, 1, 2>::new(&NEGATE)?;
    /// assert_eq!(dec.push(1000), None); // default start phase 1: outputs 1, 3, …
    /// assert_eq!(dec.set_start_phase(2), Err(Error::StartPhaseTooLarge { phase: 2, factor: 2 }));
    /// dec.set_start_phase(0)?; // the next input is full-rate index 0 and is kept
    /// assert_eq!(dec.push(i16::MIN), Some(i16::MAX)); // −1 · −1 = +1.0 saturates, counted
    /// assert_eq!((dec.push(5), dec.push(7)), (None, Some(-7)));
    /// assert_eq!(dec.saturations(), 1);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn set_start_phase(&mut self, phase: usize) -> Result<(), Error> {
        self.core.set_start_phase(phase)
    }

    /// Which full-rate output (modulo M) is kept first: 0 to M − 1, M − 1 by default.
    ///
    /// ```
    /// use tapline::Decimator;
    /// static TAPS: [i16; 2] = [i16::MIN; 2];
    /// assert_eq!(Decimator::<i16, 2, 4>::new(&TAPS)?.start_phase(), 3);
    /// assert_eq!(Decimator::<i16, 2, 4>::new(&TAPS)?.with_start_phase(0)?.start_phase(), 0);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub const fn start_phase(&self) -> usize {
        self.core.start_phase()
    }

    /// How many outputs [`flush`](Decimator::flush) writes now: those of the full-rate
    /// outputs after the last input — n … n + K − 2 for n inputs and K taps, where the zero-padded
    /// convolution of a finite signal ends — that the phase keeps. With start phase 0 the
    /// streamed outputs plus these are `scipy.signal.upfirdn(h, x, 1, M)`'s length,
    /// ⌊(n + K − 2)/M⌋ + 1. With no input since construction, reset or flush (n = 0) the tail
    /// is the kept ones of K − 1 zero outputs.
    ///
    /// ```
    /// use tapline::Decimator;
    /// static TAPS: [i16; 7] = [i16::MAX; 7];
    /// let mut dec = Decimator::<i16, 7, 3>::new(&TAPS)?.with_start_phase(0)?;
    /// assert_eq!(dec.outputs_for(10), 4); // full-rate 0, 3, 6, 9 while streaming
    /// dec.process(&[i16::MIN; 10], &mut [0; 4])?;
    /// assert_eq!(dec.tail_len(), 2); // 12 and 15 of 0 … 15
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub fn tail_len(&self) -> usize {
        self.core.tail().len(self.tap_count())
    }

    /// Ends a finite signal: writes the [`tail_len`](Decimator::tail_len) outputs that K − 1
    /// zero inputs after the last one would give (K the tap count) to the front of `output`,
    /// without pushing the zeros — each sums only the taps that still meet the signal — and
    /// returns how many. Outputs are rounded, saturated and counted as [`push`](Decimator::push)
    /// does, bit for bit (the same sums: the zero products add nothing).
    ///
    /// Afterwards the decimator is ready for a new signal: zero history, the count back at the
    /// start phase, as after [`reset`](Decimator::reset), except that the saturation count
    /// keeps its value (the tail's saturations included). Costs one output's
    /// multiply-accumulates per tail output (at most K − 1 each) and one history clear.
    ///
    /// # Errors
    /// [`Error::OutputTooShort`] when `output` is shorter than the tail; nothing changes then.
    ///
    /// ```
    /// use tapline::{Decimator, Error};
    /// // 5 inputs, a 4-tap average by 2 from full-rate output 0: upfirdn gives
    /// // ⌊(5 + 4 − 2)/2⌋ + 1 = 4 outputs, 3 while streaming and 1 in the tail.
    /// static AVERAGE_4: [i16; 4] = [8192; 4];
    /// let mut dec = Decimator::<i16, 4, 2>::new(&AVERAGE_4)?.with_start_phase(0)?;
    /// let mut out = [0i16; 4];
    /// assert_eq!(dec.process(&[400, 800, 1200, 1600, i16::MIN], &mut out)?, 3);
    /// assert_eq!(dec.flush(&mut []), Err(Error::OutputTooShort { needed: 1, found: 0 }));
    /// assert_eq!(dec.flush(&mut out[3..])?, 1);
    /// assert_eq!(out, [100, 600, -7292, -7792]); // the last: (1600 − 32768) / 4
    /// // A new signal starts at full-rate index 0 again.
    /// assert_eq!(dec.push(4000), Some(1000));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn flush(&mut self, output: &mut [S]) -> Result<usize, Error> {
        self.core.flush::<T, W>(self.taps.as_slice(), output)
    }

    /// Zero history, the count back at the start phase, zero saturation count; taps, start
    /// phase and rounding stay.
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
