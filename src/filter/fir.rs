//! The direct-form FIR filter: y\[n\] = Σ_{k<N} h\[k\]·x\[n−k\].

use super::GroupDelay;
use super::shared::OutputStep;
use super::taps::{TapTable, span_for};
use crate::headroom::{AccTrace, CheckedTaps, ProvenTaps, proof_holds};
use crate::num::{
    Acc32, Acc32Checked, Acc128, DefaultAcc, FixedPoint, MulAcc, Rounding, RuntimeChecked, Sample,
};
use crate::{Error, Ring};
use core::marker::PhantomData;

/// A streaming FIR filter with `N` taps over samples of type `S`, taps of type `T` (by default
/// the same type) and the accumulator selected by `W` (by default [`DefaultAcc`]; see the
/// [`num`](crate::num) table).
///
/// The taps are borrowed, so a table in flash (`static`/`const`) costs no RAM. They are held
/// as `H`: by default `&'a [T; N]`, exactly `N` taps fixed when compiling; or, as
/// [`FirUpTo`], a slice of 1 to `N` taps known only at run time, `N` then being the capacity.
/// Both run the same code, kernels and output step and give the same bits; a filter of `L`
/// taps in a capacity of `N` sums over the newest `L` of its `N` inputs of history.
///
/// The filter's own RAM is the [`Ring`] of history (`2·N` samples: a mirrored copy keeps the
/// history one slice, which the block kernels need), one index, the rounding mode and a
/// saturation counter (`size_of::<Fir<i16, 32>>()` is 144 bytes on a 32-bit target: 128 of
/// history, 16 of bookkeeping). The history is sized by the capacity, not by the taps in use:
/// `L` taps in a capacity of `N` cost `2·(N − L)` samples more than a filter of exactly `L`,
/// and the slice one word (its length) more than a table reference.
///
/// * **Accumulator:** [`MulAcc::Acc`] of the sample type — `i64` for Q15 and Q31, exact.
///   [`new`](Fir::new) rejects taps that could overflow it for any input.
/// * **Rounding:** one step from accumulator to output, [`Rounding::HalfUp`] unless set with
///   [`with_rounding`](Fir::with_rounding).
/// * **Saturation:** outputs beyond the sample type's range clamp to its limits (never wrap) and
///   increment [`saturations`](Fir::saturations).
/// * **Group delay:** (N−1)/2 samples when the taps are symmetric or antisymmetric
///   ([`group_delay`](Fir::group_delay)).
/// * **Start-up:** the history starts at zero, so the first N−1 outputs are the response to a
///   signal that was zero before it.
///
/// Per-sample ([`push`](Fir::push)) and block ([`process`](Fir::process),
/// [`process_in_place`](Fir::process_in_place)) calls give bit-identical outputs for any way of
/// cutting the input into blocks.
///
/// ```
/// use tapline::{Fir, Rounding};
///
/// // Q15 taps in flash: a 3-tap smoother [0.25, 0.5, 0.25].
/// static SMOOTH: [i16; 3] = [8192, 16384, 8192];
/// let mut fir = Fir::<i16, 3>::new(&SMOOTH)?.with_rounding(Rounding::HalfEven);
///
/// // From an ADC interrupt, one sample at a time:
/// let y = fir.push(1000);
/// assert_eq!(y, 250);
///
/// // From a DMA half-buffer, in place:
/// let mut block = [1000i16; 4];
/// fir.process_in_place(&mut block);
/// assert_eq!(block, [750, 1000, 1000, 1000]);
///
/// // Full-scale edge: -1.0 steps saturate nowhere because Σ|h| = 1.
/// let mut edge = [i16::MIN; 3];
/// fir.process_in_place(&mut edge);
/// assert_eq!(edge[2], i16::MIN);
/// assert_eq!(fir.saturations(), 0);
/// assert_eq!(fir.group_delay().map(|d| d.samples()), Some(1.0));
/// # Ok::<(), tapline::Error>(())
/// ```
// `repr(C)`: the taps pointer first, then the history, then the output step: the layout the
// costs in `examples/qemu/COSTS.md` were measured with. Left to itself the compiler put the
// history first once the counter and rounding mode became one `OutputStep` field, and the
// measured per-sample cost of a 256-tap Q15 filter on the Cortex-M0 rose by 7 %.
#[repr(C)]
#[derive(Clone, Debug)]
pub struct Fir<'a, S: MulAcc<T, W>, const N: usize, T: Sample = S, W = DefaultAcc, H = &'a [T; N]> {
    taps: H,
    history: Ring<S, N>,
    output: OutputStep,
    // A value, not only a type: the run-time checked width carries the input range it clamps to
    // (zero-sized for every other width, so the layout above is unchanged for them).
    width: W,
    borrowed: PhantomData<&'a [T]>,
}

/// A [`Fir`] whose taps are a slice of 1 to `N` known only at run time (`N` is the capacity):
/// taps read from flash or EEPROM at start-up, designed on the device, or chosen by a setting.
/// The same filter, code and bits as a [`Fir`] of exactly that many taps.
///
/// * **Accumulator, rounding, saturation, group delay:** those of [`Fir`] for the taps in use.
/// * **RAM:** that of `Fir<S, N>` plus one word: the history always holds the last `N`
///   inputs (`2·N` samples, mirrored), so `L` taps cost `2·(N − L)` samples more than
///   `Fir<S, L>` (`size_of::<FirUpTo<i16, 128>>()` is 532 bytes on a 32-bit target, against
///   352 for `Fir<i16, 85>`).
/// * **Replacing taps** ([`set_taps`](Fir::set_taps)) keeps the history: it always holds the
///   last `N` inputs, so a longer tap set sums over real past inputs at once, and the outputs
///   from then on are those of a filter that had the new taps from the start (once `N` inputs
///   have arrived).
///
/// ```
/// use tapline::{Error, filter::FirUpTo};
///
/// // A calibration table read from flash at start-up: 5 taps used of a capacity of 8.
/// let stored: [i16; 8] = [6553, 6553, 6553, 6553, 6553, 0, 0, 0];
/// let used = 5;
/// let mut fir = FirUpTo::<i16, 8>::with_taps(&stored[..used])?;
/// assert_eq!(fir.tap_count(), 5);
/// let y: Vec<i16> = [1000; 6].iter().map(|&x| fir.push(x)).collect();
/// assert_eq!(y, [200, 400, 600, 800, 1000, 1000]);
///
/// // Full scale: Σh = 32765/32768, so i16::MIN passes without saturating.
/// let mut edge = [i16::MIN; 5];
/// fir.process_in_place(&mut edge);
/// assert_eq!(edge[4], -32765);
/// assert_eq!(fir.saturations(), 0);
///
/// assert_eq!(FirUpTo::<i16, 8>::with_taps(&[]).err(), Some(Error::NoTaps));
/// assert_eq!(FirUpTo::<i16, 4>::with_taps(&stored[..used]).err(),
///     Some(Error::TooManyTaps { capacity: 4, found: 5 }));
/// # Ok::<(), tapline::Error>(())
/// ```
pub type FirUpTo<'a, S, const N: usize, T = S, W = DefaultAcc> = Fir<'a, S, N, T, W, &'a [T]>;

impl<'a, S: MulAcc<T>, const N: usize, T: Sample> Fir<'a, S, N, T> {
    /// A filter with impulse response `taps` (h\[0\] multiplies the newest sample), the
    /// sample type's default accumulator, zero history, [`Rounding::HalfUp`] and a zero
    /// saturation counter.
    ///
    /// `N = 0` does not compile.
    ///
    /// # Errors
    /// [`Error::AccumulatorOverflow`] when some input in the full range of `S` could overflow
    /// the accumulator with these taps ([`MulAcc::accumulator_fits`]); possible for Q31 taps
    /// with Σ|h| near 2 or more (use [`with_accumulator`](Fir::with_accumulator) and
    /// [`Acc128`](crate::num::Acc128) for those), never for Q15 taps of any length that fits in
    /// memory.
    ///
    /// ```
    /// use tapline::{Error, Fir};
    /// static TOO_LOUD: [i32; 3] = [i32::MIN; 3]; // Σ|h| = 3 in Q31
    /// assert_eq!(Fir::<i32, 3>::new(&TOO_LOUD).unwrap_err(), Error::AccumulatorOverflow);
    /// ```
    pub fn new(taps: &'a [T; N]) -> Result<Self, Error> {
        Self::with_accumulator(taps)
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, T: Sample, W: RuntimeChecked> Fir<'a, S, N, T, W> {
    /// As [`new`](Fir::new), with the accumulator named by the type's `W` parameter
    /// ([`DefaultAcc`] or [`Acc128`](crate::num::Acc128)).
    ///
    /// # Errors
    /// [`Error::AccumulatorOverflow`] as in [`new`](Fir::new).
    ///
    /// ```
    /// use tapline::{Fir, num::Acc128};
    /// static GAIN_3: [i32; 3] = [i32::MIN; 3];
    /// let mut fir = Fir::<i32, 3, i32, Acc128>::with_accumulator(&GAIN_3)?;
    /// assert_eq!(fir.push(1 << 28), -(1 << 28));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_accumulator(taps: &'a [T; N]) -> Result<Self, Error> {
        Self::checked(taps)
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, T: Sample, W: RuntimeChecked> FirUpTo<'a, S, N, T, W> {
    /// A filter of capacity `N` with the run-time tap set `taps` (1 to `N` taps, h\[0\]
    /// multiplying the newest sample), the accumulator named by `W` ([`DefaultAcc`] unless
    /// named), zero history, [`Rounding::HalfUp`] and a zero saturation counter. Computes, bit
    /// for bit, what `Fir<S, L>` computes for the same `L` taps.
    ///
    /// # Errors
    /// [`Error::NoTaps`] for an empty slice, [`Error::TooManyTaps`] for more than `N`, and
    /// [`Error::AccumulatorOverflow`] as in [`new`](Fir::new).
    ///
    /// ```
    /// use tapline::{Error, filter::FirUpTo, num::Acc128};
    /// let loud = [i32::MIN; 3]; // Σ|h| = 3 in Q31: needs the 128-bit accumulator
    /// assert_eq!(FirUpTo::<i32, 4>::with_taps(&loud).err(), Some(Error::AccumulatorOverflow));
    /// let mut fir = FirUpTo::<i32, 4, i32, Acc128>::with_taps(&loud)?;
    /// assert_eq!(fir.push(1 << 28), -(1 << 28));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_taps(taps: &'a [T]) -> Result<Self, Error> {
        Self::checked(taps)
    }
}

impl<'a, S, const N: usize, T: Sample> Fir<'a, S, N, T>
where
    S: MulAcc<T> + MulAcc<T, Acc128>,
{
    /// The filter of [`new`](Fir::new) with the 128-bit accumulator
    /// [`Acc128`]: one line for what
    /// `Fir::<S, N, T, Acc128>::with_accumulator(taps)` spells out. For 32-bit samples
    /// (`i32`/Q31, `FixedI32<F>`), whose `i64` default refuses tap sets with Σ|h| near 2 or more.
    ///
    /// * **Accumulator:** `i128`, exact for any tap set that fits in memory.
    /// * **Rounding / saturation:** the one output step of every filter ([`Rounding::HalfUp`]
    ///   unless [`with_rounding`](Fir::with_rounding) says otherwise), clamped and counted.
    /// * **Cost:** about twice the additions of `i64` on a 32-bit core.
    ///
    /// # Errors
    /// None in practice: [`Error::AccumulatorOverflow`] only for a table too long to exist.
    ///
    /// ```
    /// use tapline::Fir;
    /// static LOUD: [i32; 3] = [i32::MIN; 3]; // Σ|h| = 3 in Q31: refused by Fir::new
    /// assert!(Fir::<i32, 3>::new(&LOUD).is_err());
    /// let mut fir = Fir::new_wide(&LOUD)?;
    /// assert_eq!(fir.push(1 << 28), -(1 << 28)); // (−1)·2^-3, exact
    /// // Full scale: 1 − 1/8 is exact; 2 − 1/8, summed exactly in 128 bits, clamps (counted).
    /// assert_eq!(fir.push(i32::MIN), 7 << 28);
    /// assert_eq!(fir.push(i32::MIN), i32::MAX);
    /// assert_eq!(fir.saturations(), 1);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn new_wide(taps: &'a [T; N]) -> Result<Fir<'a, S, N, T, Acc128>, Error> {
        Fir::with_accumulator(taps)
    }
}

impl<'a, S, const N: usize, T: Sample> FirUpTo<'a, S, N, T>
where
    S: MulAcc<T> + MulAcc<T, Acc128>,
{
    /// The run-time tap set of [`with_taps`](FirUpTo::with_taps) (1 to `N` taps) with the
    /// 128-bit accumulator [`Acc128`]: one line for
    /// `FirUpTo::<S, N, T, Acc128>::with_taps(taps)`. Numeric contract as
    /// [`new_wide`](Fir::new_wide).
    ///
    /// # Errors
    /// [`Error::NoTaps`], [`Error::TooManyTaps`].
    ///
    /// ```
    /// use tapline::{Error, filter::FirUpTo};
    /// let stored = [i32::MIN; 8]; // a table read at run time, Σ|h| = 5 in the 5 taps used
    /// let mut fir = FirUpTo::<i32, 8>::with_taps_wide(&stored[..5])?;
    /// assert_eq!(fir.push(-1 << 24), 1 << 24);
    /// assert_eq!(fir.push(i32::MIN), i32::MAX); // +1 + 2^-7 clamps to 1 − 2^-31
    /// assert_eq!(FirUpTo::<i32, 4>::with_taps_wide(&stored[..5]).err(),
    ///     Some(Error::TooManyTaps { capacity: 4, found: 5 }));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_taps_wide(taps: &'a [T]) -> Result<FirUpTo<'a, S, N, T, Acc128>, Error> {
        FirUpTo::with_taps(taps)
    }
}

impl<'a, S, const N: usize, T, W, H> Fir<'a, S, N, T, W, H>
where
    S: MulAcc<T, W>,
    T: Sample + 'a,
    W: RuntimeChecked,
    H: TapTable<'a, T, N>,
{
    /// The filter for `taps` once their count and accumulator are checked.
    fn checked(taps: H) -> Result<Self, Error> {
        check_taps::<S, T, W, N>(taps)?;
        Ok(Self::with_parts(taps, W::default()))
    }

    /// Replaces the taps without touching the history, so the output moves to the new response
    /// without a start-up transient. A run-time tap set ([`FirUpTo`]) may change its length
    /// (1 to `N`): the history always holds the last `N` inputs, so from this call on the
    /// outputs are those of a filter that had the new taps from the start (once `N` inputs have
    /// arrived). The saturation counter and rounding mode stay.
    ///
    /// # Errors
    /// [`Error::NoTaps`], [`Error::TooManyTaps`] (run-time tap sets only) and
    /// [`Error::AccumulatorOverflow`] as in [`new`](Fir::new); the old taps then stay.
    ///
    /// ```
    /// use tapline::{Error, filter::FirUpTo};
    /// let (short, long) = ([16384i16; 2], [8192i16; 4]);
    /// let mut fir = FirUpTo::<i16, 4>::with_taps(&short)?;
    /// for x in [400, 800, 1200] {
    ///     fir.push(x);
    /// }
    /// fir.set_taps(&long)?; // recalibrated: the history is kept
    /// // (400 + 800 + 1200 + 32767) / 4 = 8791.75, rounded half up
    /// assert_eq!(fir.push(i16::MAX), 8792);
    /// assert_eq!(fir.set_taps(&[]), Err(Error::NoTaps));
    /// assert_eq!(fir.tap_count(), 4);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn set_taps(&mut self, taps: H) -> Result<(), Error> {
        check_taps::<S, T, W, N>(taps)?;
        self.taps = taps;
        Ok(())
    }
}

/// The constructors' check: a tap count within capacity and an accumulator that cannot
/// overflow for any input ([`MulAcc::accumulator_fits`]).
pub(crate) fn check_taps<'a, S: MulAcc<T, W>, T: Sample + 'a, W, const N: usize>(
    taps: impl TapTable<'a, T, N>,
) -> Result<(), Error> {
    taps.within_capacity()?;
    if S::accumulator_fits(taps.as_slice()) {
        Ok(())
    } else {
        Err(Error::AccumulatorOverflow)
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, T: Sample + 'a, W, H: TapTable<'a, T, N>>
    Fir<'a, S, N, T, W, H>
{
    /// The filter for taps whose count and accumulator safety the caller has established
    /// (`new`'s run-time check, a compile-time proof or a run-time check).
    const fn with_parts(taps: H, width: W) -> Self {
        Fir {
            taps,
            history: Ring::new(S::ZERO),
            output: OutputStep::new(),
            width,
            borrowed: PhantomData,
        }
    }

    /// The same filter with another rounding mode for its output step (default
    /// [`Rounding::HalfUp`]). Fixed point only: a float output has no rounding step to choose.
    ///
    /// ```
    /// use tapline::{Fir, Rounding};
    /// static HALF: [i16; 1] = [16384]; // 0.5
    /// let mut fir = Fir::<i16, 1>::new(&HALF)?.with_rounding(Rounding::Truncate);
    /// assert_eq!((fir.push(-1), fir.rounding()), (-1, Rounding::Truncate)); // −½ LSB floors
    /// # Ok::<(), tapline::Error>(())
    /// ```
    ///
    /// ```compile_fail
    /// use tapline::{Fir, Rounding};
    /// fn float_rounding(fir: Fir<'_, f32, 2>) -> Fir<'_, f32, 2> {
    ///     fir.with_rounding(Rounding::Truncate) // floats have no rounding step
    /// }
    /// ```
    #[must_use]
    pub fn with_rounding(mut self, rounding: Rounding) -> Self
    where
        S: FixedPoint,
    {
        self.output.set_rounding(rounding);
        self
    }

    /// The rounding mode of the output step (fixed point only, as
    /// [`with_rounding`](Fir::with_rounding)).
    #[must_use]
    pub fn rounding(&self) -> Rounding
    where
        S: FixedPoint,
    {
        self.output.rounding()
    }

    /// Filters one sample: pushes `x` into the history and returns y\[n\].
    ///
    /// Cost: one multiply-accumulate per tap and one output step; no branches that depend on the data,
    /// no division, no panic. Saturation of the output is counted.
    ///
    /// ```
    /// use tapline::Fir;
    /// static GAIN_2: [i16; 2] = [i16::MAX, i16::MAX]; // Σh ≈ 2
    /// let mut fir = Fir::<i16, 2>::new(&GAIN_2)?;
    /// fir.push(20000);
    /// assert_eq!(fir.push(20000), i16::MAX); // 39999 saturates, it does not wrap
    /// assert_eq!(fir.saturations(), 1);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[inline]
    pub fn push(&mut self, x: S) -> S {
        self.push_with(x, |_| {})
    }

    /// [`push`](Fir::push), handing the accumulator to `inspect` before the output step.
    #[inline(always)]
    fn push_with(&mut self, x: S, inspect: impl FnOnce(S::Acc)) -> S {
        let (x, clamped) = S::admit_within(&self.width, x);
        self.history.push(x);
        let acc = self.accumulate();
        inspect(acc);
        self.output.finish_admitted::<S, T, W>(acc, clamped)
    }

    /// The exact (fixed point) or float accumulator for the current history, before rounding.
    #[inline]
    fn accumulate(&self) -> S::Acc {
        // With fewer taps than N the kernel reads only the newest `taps.len()` inputs.
        super::shared::history_dot::<S, T, W, N>(S::ACC_ZERO, &self.history, self.taps.as_slice())
    }

    /// Filters `input` into `output`, sample by sample, exactly as repeated [`push`](Fir::push).
    ///
    /// # Errors
    /// [`Error::OutputLength`] when `output.len() != input.len()`; nothing is processed then.
    ///
    /// ```
    /// use tapline::{Error, Fir};
    /// static TAPS: [f32; 2] = [0.5, 0.5];
    /// let mut fir = Fir::<f32, 2>::new(&TAPS)?;
    /// let mut out = [0.0; 3];
    /// fir.process(&[2.0, 4.0, f32::NAN], &mut out)?;
    /// assert_eq!(&out[..2], &[1.0, 3.0]);
    /// assert!(out[2].is_nan()); // NaN propagates, it does not panic
    /// assert_eq!(fir.process(&[1.0], &mut out), Err(Error::OutputLength { expected: 1, found: 3 }));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn process(&mut self, input: &[S], output: &mut [S]) -> Result<(), Error> {
        if input.len() != output.len() {
            return Err(Error::OutputLength {
                expected: input.len(),
                found: output.len(),
            });
        }
        // The ring stages up to N samples at a time (fewer when its write position is not at
        // the start), so a block runs as one or more chunks through the block kernel.
        let mut done = 0;
        while let (Some(part), Some(out)) = (input.get(done..), output.get_mut(done..)) {
            if part.is_empty() {
                break;
            }
            let k = self.stage(part);
            self.emit_staged(k, out);
            done += k;
        }
        Ok(())
    }

    /// Filters `buffer` in place (e.g. a DMA half-buffer), exactly as repeated
    /// [`push`](Fir::push).
    pub fn process_in_place(&mut self, buffer: &mut [S]) {
        let mut rest = buffer;
        while !rest.is_empty() {
            // Staging copies the inputs into the ring, so the outputs may then overwrite them.
            let k = self.stage(rest);
            let (chunk, after) = core::mem::take(&mut rest)
                .split_at_mut_checked(k)
                .unwrap_or((&mut [], &mut []));
            self.emit_staged(k, chunk);
            rest = after;
        }
    }

    /// Admits as many of `input` as the ring can stage at once (at least one), counting
    /// clamped inputs, and returns how many it took.
    #[inline]
    fn stage(&mut self, input: &[S]) -> usize {
        let mut clamped = 0u32;
        let width = &self.width;
        let k = self.history.stage(input.iter().map(|&x| {
            let (x, was_clamped) = S::admit_within(width, x);
            clamped = clamped.wrapping_add(u32::from(was_clamped));
            x
        }));
        self.output.count_events(clamped);
        k
    }

    /// Computes the outputs of the `k` staged samples into `out` with the block kernel (four
    /// outputs per pass over the taps) and commits them to the history.
    #[inline]
    fn emit_staged(&mut self, k: usize, out: &mut [S]) {
        let taps = self.taps.as_slice();
        let span = span_for::<S, N>(self.history.staged_span(k), taps.len());
        let rounding = self.output.rounding();
        // Counted in a local and added once: the counter's saturating add costs a store and a
        // load per call on cores without conditional execution.
        let saturated = if let Some(saturated) = S::dot_block_fused(taps, span, rounding, out) {
            saturated
        } else {
            let mut saturated = 0u32;
            let mut slots = out.iter_mut();
            S::dot_block(taps, span, |acc| {
                let (y, clamped) = S::finish(acc, rounding);
                saturated = saturated.wrapping_add(u32::from(clamped));
                if let Some(slot) = slots.next() {
                    *slot = y;
                }
            });
            saturated
        };
        self.output.count_events(saturated);
        self.history.commit(k);
    }

    /// Returns to the state [`new`](Fir::new) made: zero history, zero saturation count. Taps,
    /// rounding mode and accumulator width (with a checked input range) stay.
    pub fn reset(&mut self) {
        self.history.fill(S::ZERO);
        self.output.clear();
    }

    /// The taps, which are the impulse response: feeding a unit impulse gives h\[0\], h\[1\], …
    /// (in fixed point, scaled by the impulse's value and rounded to the sample format).
    #[must_use]
    pub fn taps(&self) -> H {
        self.taps
    }

    /// How many taps the filter uses: `N` for a whole table, 1 to `N` for a run-time tap set.
    #[must_use]
    pub fn tap_count(&self) -> usize {
        self.taps.as_slice().len()
    }

    /// The capacity `N`: the most taps the filter can hold, and the length of its history.
    #[must_use]
    pub const fn capacity(&self) -> usize {
        N
    }

    /// The accumulator width's value: zero-sized for every width but
    /// [`Acc32Checked`], which tells the input range its filter clamps to.
    #[must_use]
    pub fn width(&self) -> &W {
        &self.width
    }

    /// The history: the last `N` input samples, oldest first (the sum uses the newest
    /// [`tap_count`](Fir::tap_count) of them).
    #[must_use]
    pub fn history(&self) -> &Ring<S, N> {
        &self.history
    }

    /// How many outputs have saturated since construction, [`reset`](Fir::reset) or
    /// [`clear_saturations`](Fir::clear_saturations) — plus, for a proven 32-bit accumulator,
    /// inputs clamped to the proven range ([`MulAcc::admit`]). Stops at `u32::MAX`.
    #[must_use]
    pub fn saturations(&self) -> u32 {
        self.output.saturations()
    }

    /// Sets the saturation counter to zero and returns what it held.
    pub fn clear_saturations(&mut self) -> u32 {
        self.output.clear()
    }

    /// The constant group delay when the taps in use are symmetric or antisymmetric, (L−1)/2
    /// samples for L taps; `None` otherwise.
    #[must_use]
    pub fn group_delay(&self) -> Option<GroupDelay> {
        GroupDelay::of(self.taps.as_slice())
    }
}

impl<S, const N: usize, P> Fir<'static, S, N, i16, Acc32<P>>
where
    S: MulAcc<i16, Acc32<P>>,
    P: ProvenTaps,
{
    /// A Q15 filter with a 32-bit accumulator whose safety is proven when the firmware is
    /// compiled: building fails unless `P::TAPS` has exactly `N` entries and no input sequence
    /// in `P::INPUT` can take the sum outside `i32`. Inputs outside `P::INPUT` are clamped into
    /// it (and counted by [`saturations`](Fir::saturations)), so the proof covers every call.
    /// Rounding, saturation and results are those of the default `i64` path, bit for bit.
    ///
    /// ```
    /// use tapline::Fir;
    /// use tapline::headroom::{Acc32, Align, InputRange, ProvenTaps};
    ///
    /// struct Boost; // gain 4: too loud for i32 with full-scale input, fine for 12-bit codes
    /// impl ProvenTaps for Boost {
    ///     const TAPS: &'static [i16] = &[32767; 4];
    ///     const INPUT: InputRange = match InputRange::adc(12, Align::Right, 16) {
    ///         Ok(r) => r,
    ///         Err(_) => panic!("bad ADC description"),
    ///     };
    /// }
    /// let mut fir: Fir<'static, i16, 4, i16, Acc32<Boost>> = Fir::proven();
    /// assert_eq!(fir.push(2047), 2047); // 2047 · 32767/32768, rounded
    /// assert_eq!(fir.push(5000), 4094); // 5000 is out of range: used as 2047, and counted
    /// assert_eq!(fir.saturations(), 1);
    /// ```
    ///
    /// The same taps for full-scale 16-bit input do not compile:
    ///
    /// ```compile_fail
    /// use tapline::Fir;
    /// use tapline::headroom::{Acc32, InputRange, ProvenTaps};
    ///
    /// struct Boost;
    /// impl ProvenTaps for Boost {
    ///     const TAPS: &'static [i16] = &[32767; 4];
    ///     const INPUT: InputRange = InputRange::FULL;
    /// }
    /// let fir: Fir<'static, i16, 4, i16, Acc32<Boost>> = Fir::proven();
    /// ```
    #[must_use]
    pub const fn proven() -> Self {
        let taps: &'static [i16; N] = const {
            assert!(
                proof_holds::<P>(),
                "ProvenTaps: some input in INPUT can overflow the 32-bit accumulator"
            );
            match P::TAPS.first_chunk::<N>() {
                Some(taps) if P::TAPS.len() == N => taps,
                _ => panic!("ProvenTaps::TAPS must have exactly N entries"),
            }
        };
        Self::with_parts(taps, Acc32::marker())
    }
}

impl<'a, S: MulAcc<i16, Acc32Checked>, const N: usize> FirUpTo<'a, S, N, i16, Acc32Checked> {
    /// A Q15 filter of capacity `N` with the 32-bit accumulator, for taps that passed the
    /// run-time check [`CheckedTaps::check`]: inputs outside the checked range are clamped into
    /// it (and counted by [`saturations`](Fir::saturations)), so the check covers every call.
    /// Rounding, saturation and results are those of the default `i64` path for the same taps,
    /// bit for bit, for inputs within the range; the kernels are those of [`Fir::proven`].
    ///
    /// # Errors
    /// [`Error::NoTaps`] or [`Error::TooManyTaps`] when the checked taps are not 1 to `N`.
    ///
    /// ```
    /// use tapline::filter::FirUpTo;
    /// use tapline::headroom::{Acc32Checked, Align, CheckedTaps, InputRange};
    ///
    /// // Taps designed on the device, for a 12-bit ADC: gain 2 would be too loud at full scale.
    /// let taps = [i16::MAX, i16::MAX];
    /// let adc = InputRange::adc(12, Align::Right, 16)?;
    /// let checked = CheckedTaps::check(&taps, adc)?;
    /// let mut fir = FirUpTo::<i16, 32, i16, Acc32Checked>::with_checked(checked)?;
    /// assert_eq!(fir.push(-2048), -2048);
    /// assert_eq!(fir.push(i16::MIN), -4096); // clamped to -2048 and counted
    /// assert_eq!(fir.saturations(), 1);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_checked(checked: CheckedTaps<'a>) -> Result<Self, Error> {
        let taps = checked.taps();
        TapTable::<i16, N>::within_capacity(taps)?;
        Ok(Self::with_parts(taps, checked.width()))
    }

    /// Replaces the taps and the checked range after a new run-time check (a recalibration).
    /// The history is kept, each value clamped into the new range (each changed value counted
    /// as a saturation), so the new check covers the sums over it too; from this call on the
    /// outputs are those of a filter that had the new taps and range from the start (once `N`
    /// inputs have arrived, for inputs within both ranges).
    ///
    /// # Errors
    /// [`Error::NoTaps`] or [`Error::TooManyTaps`]; the old taps and range then stay.
    ///
    /// ```
    /// use tapline::filter::FirUpTo;
    /// use tapline::headroom::{Acc32Checked, CheckedTaps, InputRange};
    /// let wide = CheckedTaps::check(&[16384, 16384], InputRange::FULL)?;
    /// let mut fir = FirUpTo::<i16, 4, i16, Acc32Checked>::with_checked(wide)?;
    /// fir.push(i16::MIN);
    /// let narrow = CheckedTaps::check(&[32767; 3], InputRange::codes(-1000, 1000)?)?;
    /// fir.set_checked(narrow)?;
    /// assert_eq!(fir.saturations(), 1); // the -32768 in the history became -1000
    /// assert_eq!(fir.push(1000), 0); // 32767/32768 · (1000 − 1000 + 0)
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn set_checked(&mut self, checked: CheckedTaps<'a>) -> Result<(), Error> {
        let taps = checked.taps();
        TapTable::<i16, N>::within_capacity(taps)?;
        let width = checked.width();
        let mut clamped = 0u32;
        self.history.update_each(|x| {
            let (kept, changed) = S::admit_within(&width, x);
            clamped = clamped.wrapping_add(u32::from(changed));
            kept
        });
        self.output.count_events(clamped);
        self.taps = taps;
        self.width = width;
        Ok(())
    }
}

impl<'a, S, const N: usize, T, W, H> Fir<'a, S, N, T, W, H>
where
    S: MulAcc<T, W>,
    S::Acc: Into<i128>,
    T: Sample + 'a,
    H: TapTable<'a, T, N>,
{
    /// [`push`](Fir::push), also recording the accumulator in `trace`. Same output, same
    /// counters. For fixed-point accumulators (`i32`, `i64`, `i128`).
    #[inline]
    pub fn push_traced(&mut self, x: S, trace: &mut AccTrace) -> S {
        self.push_with(x, |acc| trace.record(acc.into()))
    }
}
