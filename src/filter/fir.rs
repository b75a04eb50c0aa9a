//! The direct-form FIR filter: y\[n\] = Σ_{k<N} h\[k\]·x\[n−k\].

use super::GroupDelay;
use super::shared::OutputStep;
use crate::headroom::{AccTrace, ProvenTaps, proof_holds};
use crate::num::{Acc32, DefaultAcc, MulAcc, Rounding, RuntimeChecked, Sample};
use crate::{Error, Ring};

/// A streaming FIR filter with `N` taps over samples of type `S`, taps of type `T` (by default
/// the same type) and the accumulator selected by `W` (by default [`DefaultAcc`]; see the
/// [`num`](crate::num) table).
///
/// The taps are borrowed (`&'a [T; N]`), so a table in flash (`static`/`const`) costs no RAM.
/// The filter's own RAM is the [`Ring`] of history (`2·N` samples: a mirrored copy keeps the
/// history one slice, which the block kernels need), one index, the rounding mode and a
/// saturation counter (`size_of::<Fir<i16, 32>>()` is 144 bytes on a 32-bit target: 128 of
/// history, 16 of bookkeeping).
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
pub struct Fir<'a, S: MulAcc<T, W>, const N: usize, T: Sample = S, W = DefaultAcc> {
    taps: &'a [T; N],
    history: Ring<S, N>,
    output: OutputStep,
    width: core::marker::PhantomData<W>,
}

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
        if !S::accumulator_fits(taps) {
            return Err(Error::AccumulatorOverflow);
        }
        Ok(Self::with_checked_taps(taps))
    }

    /// Replaces the taps (same length `N`) without touching the history, so the output moves to
    /// the new response without a start-up transient.
    ///
    /// # Errors
    /// [`Error::AccumulatorOverflow`] as in [`new`](Fir::new); the old taps then stay.
    pub fn set_taps(&mut self, taps: &'a [T; N]) -> Result<(), Error> {
        if !S::accumulator_fits(taps) {
            return Err(Error::AccumulatorOverflow);
        }
        self.taps = taps;
        Ok(())
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, T: Sample, W> Fir<'a, S, N, T, W> {
    /// The filter for taps whose accumulator safety has been established by the caller
    /// (`new`'s run-time check or a compile-time proof).
    const fn with_checked_taps(taps: &'a [T; N]) -> Self {
        Fir {
            taps,
            history: Ring::new(S::ZERO),
            output: OutputStep::new(),
            width: core::marker::PhantomData,
        }
    }

    /// The same filter with another rounding mode for its output step.
    #[must_use]
    pub fn with_rounding(mut self, rounding: Rounding) -> Self {
        self.output.set_rounding(rounding);
        self
    }

    /// The rounding mode of the output step.
    #[must_use]
    pub fn rounding(&self) -> Rounding {
        self.output.rounding()
    }

    /// Filters one sample: pushes `x` into the history and returns y\[n\].
    ///
    /// Cost: N multiply-accumulates and one output step; no branches that depend on the data,
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
        let (x, clamped) = S::admit(x);
        self.history.push(x);
        let acc = self.accumulate();
        inspect(acc);
        self.output.finish_admitted::<S, T, W>(acc, clamped)
    }

    /// The exact (fixed point) or float accumulator for the current history, before rounding.
    #[inline]
    fn accumulate(&self) -> S::Acc {
        super::shared::history_dot::<S, T, W, N>(S::ACC_ZERO, &self.history, self.taps)
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
        let k = self.history.stage(input.iter().map(|&x| {
            let (x, was_clamped) = S::admit(x);
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
        let span = self.history.staged_span(k);
        let rounding = self.output.rounding();
        // Counted in a local and added once: the counter's saturating add costs a store and a
        // load per call on cores without conditional execution.
        let mut saturated = 0u32;
        let mut slots = out.iter_mut();
        S::dot_block(self.taps, span, |acc| {
            let (y, clamped) = S::finish(acc, rounding);
            saturated = saturated.wrapping_add(u32::from(clamped));
            if let Some(slot) = slots.next() {
                *slot = y;
            }
        });
        self.output.count_events(saturated);
        self.history.commit(k);
    }

    /// Returns to the state [`new`](Fir::new) made: zero history, zero saturation count. Taps
    /// and rounding mode stay.
    pub fn reset(&mut self) {
        self.history.fill(S::ZERO);
        self.output.clear();
    }

    /// The taps, which are the impulse response: feeding a unit impulse gives h\[0\], h\[1\], …
    /// (in fixed point, scaled by the impulse's value and rounded to the sample format).
    #[must_use]
    pub fn taps(&self) -> &'a [T; N] {
        self.taps
    }

    /// The history: the last `N` input samples, oldest first.
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

    /// The constant group delay when the taps are symmetric or antisymmetric, (N−1)/2 samples;
    /// `None` otherwise.
    #[must_use]
    pub fn group_delay(&self) -> Option<GroupDelay> {
        GroupDelay::of(self.taps)
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
        Self::with_checked_taps(taps)
    }
}

impl<S, const N: usize, T, W> Fir<'_, S, N, T, W>
where
    S: MulAcc<T, W>,
    S::Acc: Into<i128>,
    T: Sample,
{
    /// [`push`](Fir::push), also recording the accumulator in `trace`. Same output, same
    /// counters. For fixed-point accumulators (`i32`, `i64`, `i128`).
    #[inline]
    pub fn push_traced(&mut self, x: S, trace: &mut AccTrace) -> S {
        self.push_with(x, |acc| trace.record(acc.into()))
    }
}
