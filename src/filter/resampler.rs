//! The rational resampler: rate × L/M, y\[j\] = Σ_k h\[k\]·u\[jM − k\] with u the input with
//! L − 1 zeros stuffed after each sample — computed polyphase, one phase of the taps against
//! real inputs per output, never the zero products nor the outputs that would be dropped.

use super::GroupDelay;
use super::shared::{
    OutputStep, Tail, fill_block, history_dot_strided, output_controls, phase_output, phases_fit,
};
use crate::num::{Acc128, DefaultAcc, MulAcc, RuntimeChecked, Sample};
use crate::{Error, Ring};
use core::marker::PhantomData;
use core::num::{NonZeroU16, NonZeroU128, NonZeroUsize};

/// A polyphase rational resampler: the input rate times `L/M`, with prototype taps h (K of
/// them, at the up-sampled rate L·f_in) and a history [`Ring`] of capacity `C` input samples,
/// which must hold ⌈K/L⌉ of them.
///
/// * **What it computes:** y\[j\] = Σ_k h\[k\]·u\[jM − k\] for j = 0, 1, 2, …, where u\[iL\] =
///   x\[i\] and u is zero elsewhere (the input zero-stuffed by L), x zero before time 0 — the
///   definition `scipy.signal.upfirdn(h, x, up=L, down=M)` uses, from its first output on.
///   Output j sums only the taps of phase p = jM mod L (h\[p\], h\[p+L\], …) against the newest
///   inputs x\[⌊jM/L⌋\], x\[⌊jM/L⌋ − 1\], …: ⌈(K−p)/L⌉ ≤ ⌈K/L⌉ multiply-accumulates per output.
/// * **Timing:** output j is produced by the push of input ⌊jM/L⌋ (the first input that it
///   needs), so each input produces ⌊L/M⌋ or ⌈L/M⌉ outputs and the first input always produces
///   y\[0\].
/// * **Factors:** `L` (up) and `M` (down) are run-time values, 1 to 65535, given to the
///   constructor: the rate pair of a sensor is often chosen at start-up (an output-data-rate
///   register, a host link's rate), and an output costs the same either way — one compare and
///   one add move the phase, no division. (A compile-time pair would not buy a returned array
///   either: stable Rust cannot size one ⌈L/M⌉ from two const parameters, so the per-sample
///   call hands its outputs to a closure.) L/M is **not** reduced and need not be coprime: the
///   taps are at the rate L·f_in, so 2/2 is a different filter from 1/1 (it uses only the even
///   taps), exactly as `upfirdn` computes it.
/// * **Gain:** not scaled by L. Zero-stuffing divides the signal's average by L, so the taps
///   carry the gain: a prototype with DC gain L (each phase summing to about 1.0) passes DC at
///   unit gain, as with [`Interpolator`](crate::Interpolator) and `upfirdn`.
/// * **Accumulator:** exact (`i64` by default for 16- and 32-bit samples, `i128` by choice
///   through `W`); each phase is its own sum, so the constructor checks each of the L phases'
///   taps (not the whole table) against the accumulator for any full-range input.
/// * **Rounding, saturation:** one rounding step per output (sum ÷ 2^F, F the tap format's
///   fractional bits, [`Rounding`](crate::Rounding) selectable, `HalfUp` default), clamped to the
///   sample type and counted by [`saturations`](Resampler::saturations), never wrapped. Floats
///   accumulate in tap order without rounding mode or FMA; NaN/∞ propagate.
/// * **RAM:** the ring's 2·C samples, the borrowed taps, the two factors, the phase, rounding
///   and counter.
/// * **Finite signals:** [`flush`](Resampler::flush) writes the outputs of the zero-padded
///   tail (up to where the convolution of the zero-stuffed signal ends) and readies the
///   resampler for the next signal; streamed outputs plus the tail are
///   `scipy.signal.upfirdn(h, x, L, M)`, output for output and in number.
///
/// Per-sample ([`push`](Resampler::push)) and block ([`process`](Resampler::process)) calls
/// give the same outputs for any split: the phase carries across calls.
///
/// ```
/// use tapline::Resampler;
///
/// // Rate × 3/2 in Q15 with linear-interpolation taps (DC gain 3, each phase ≈ 1.0):
/// // every 2 inputs give 3 outputs.
/// static LINEAR_3: [i16; 5] = [10923, 21845, 32767, 21845, 10923];
/// let mut rs = Resampler::<i16, 2>::new(&LINEAR_3, 3, 2)?;
/// let mut out = [0i16; 8];
/// assert_eq!(rs.process(&[3000; 4], &mut out)?, 6);
/// assert_eq!(out[..6], [1000, 3000, 3000, 3000, 3000, 3000]);
/// // Full scale: phase 1 sums to exactly 1.0, so −1.0 comes out as −1.0, no saturation.
/// assert_eq!(rs.process(&[i16::MIN; 4], &mut out)?, 6);
/// assert_eq!(out[4..6], [-32767, -32768]);
/// assert_eq!(rs.saturations(), 0);
/// # Ok::<(), tapline::Error>(())
/// ```
#[derive(Clone, Debug)]
pub struct Resampler<'a, S: MulAcc<T, W>, const C: usize, T: Sample = S, W = DefaultAcc> {
    taps: &'a [T],
    history: Ring<S, C>,
    up: usize,
    // Non-zero in the type, so the divisions by M carry no divide-by-zero panic path.
    down: NonZeroU16,
    /// The up-sampled index of the next output, counted from the up-sampled position of the
    /// next input (0 ≤ · < M between calls): it is the phase p when it falls below L.
    next: usize,
    output: OutputStep,
    width: PhantomData<W>,
}

impl<'a, S: MulAcc<T>, const C: usize, T: Sample> Resampler<'a, S, C, T> {
    /// A resampler by `up`/`down` (L/M) with prototype taps `taps` (at the up-sampled rate,
    /// h\[0\] first), the default accumulator, zero history, phase 0 (the first input produces
    /// y\[0\]), [`Rounding::HalfUp`](crate::Rounding::HalfUp).
    ///
    /// # Errors
    /// [`Error::ZeroFactor`] when `up` or `down` is 0; [`Error::NoTaps`] for no taps;
    /// [`Error::TooManyTaps`] when ⌈K/L⌉ exceeds the capacity `C` (`capacity` is then C·L, the
    /// most taps this history serves at this L); [`Error::AccumulatorOverflow`] when some phase's
    /// taps could overflow the accumulator for a full-scale input.
    ///
    /// ```
    /// use tapline::{Error, Resampler};
    /// static TAPS: [i32; 5] = [1 << 30; 5];
    /// assert_eq!(Resampler::<i32, 2>::new(&TAPS, 0, 2).err(), Some(Error::ZeroFactor));
    /// assert_eq!(Resampler::<i32, 2>::new(&TAPS, 2, 0).err(), Some(Error::ZeroFactor));
    /// assert_eq!(Resampler::<i32, 2>::new(&[], 2, 1).err(), Some(Error::NoTaps));
    /// // ⌈5/2⌉ = 3 inputs needed, 2 held:
    /// assert_eq!(Resampler::<i32, 2>::new(&TAPS, 2, 1).err(),
    ///     Some(Error::TooManyTaps { capacity: 4, found: 5 }));
    /// assert!(Resampler::<i32, 2>::new(&TAPS, 3, 1).is_ok());
    /// // Q31: each phase of four −1.0 taps at L = 1 sums to −4, too loud for i64 at full
    /// // scale; at L = 4 each phase holds one tap.
    /// static LOUD: [i32; 4] = [i32::MIN; 4];
    /// assert_eq!(Resampler::<i32, 4>::new(&LOUD, 1, 3).err(), Some(Error::AccumulatorOverflow));
    /// assert!(Resampler::<i32, 1>::new(&LOUD, 4, 3).is_ok());
    /// ```
    pub fn new(taps: &'a [T], up: u16, down: u16) -> Result<Self, Error> {
        Self::with_accumulator(taps, up, down)
    }
}

impl<'a, S, const C: usize, T: Sample> Resampler<'a, S, C, T>
where
    S: MulAcc<T> + MulAcc<T, Acc128>,
{
    /// The resampler of [`new`](Resampler::new) with the 128-bit accumulator [`Acc128`]: one
    /// line for `Resampler::<S, C, T, Acc128>::with_accumulator(taps, up, down)`.
    ///
    /// * **Accumulator:** `i128`, exact for any tap set that fits in memory.
    /// * **Rounding / saturation:** the one output step of every filter
    ///   ([`Rounding::HalfUp`](crate::Rounding::HalfUp) unless `with_rounding` says
    ///   otherwise), clamped and counted.
    /// * **Cost:** about twice the additions of `i64` on a 32-bit core.
    ///
    /// # Errors
    /// As [`new`](Resampler::new), except that [`Error::AccumulatorOverflow`] comes only for a
    /// table too long to exist.
    ///
    /// ```
    /// use tapline::Resampler;
    /// static LOUD: [i32; 4] = [i32::MIN; 4]; // one phase of four −1.0 taps at L = 1
    /// assert!(Resampler::<i32, 4>::new(&LOUD, 1, 2).is_err());
    /// let mut rs = Resampler::<i32, 4>::new_wide(&LOUD, 1, 2)?;
    /// let mut out = [0i32; 2];
    /// assert_eq!(rs.process(&[1 << 20; 4], &mut out)?, 2);
    /// assert_eq!(out, [-(1 << 20), -(3 << 20)]); // y[0], y[2]: exact
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn new_wide(
        taps: &'a [T],
        up: u16,
        down: u16,
    ) -> Result<Resampler<'a, S, C, T, Acc128>, Error> {
        Resampler::with_accumulator(taps, up, down)
    }
}

impl<'a, S: MulAcc<T, W>, const C: usize, T: Sample, W: RuntimeChecked> Resampler<'a, S, C, T, W> {
    /// As [`new`](Resampler::new), with the accumulator named by the type's `W` parameter.
    ///
    /// # Errors
    /// As [`new`](Resampler::new).
    ///
    /// ```
    /// use tapline::{Resampler, num::Acc128};
    /// // Q31 at L = 1: one phase of four −1.0 taps needs i128 for full-scale inputs.
    /// static LOUD: [i32; 4] = [i32::MIN; 4];
    /// let mut rs = Resampler::<i32, 4, i32, Acc128>::with_accumulator(&LOUD, 1, 2)?;
    /// let mut out = [0i32; 2];
    /// assert_eq!(rs.process(&[i32::MIN; 4], &mut out)?, 2);
    /// assert_eq!(out, [i32::MAX, i32::MAX]); // +2.0 and +4.0 clamp to full scale
    /// assert_eq!(rs.saturations(), 2);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_accumulator(taps: &'a [T], up: u16, down: u16) -> Result<Self, Error> {
        let (up, Some(down)) = (usize::from(up), NonZeroU16::new(down)) else {
            return Err(Error::ZeroFactor);
        };
        if up == 0 {
            return Err(Error::ZeroFactor);
        }
        if taps.is_empty() {
            return Err(Error::NoTaps);
        }
        if taps.len().div_ceil(up) > C {
            return Err(Error::TooManyTaps {
                capacity: C.saturating_mul(up),
                found: taps.len(),
            });
        }
        if !phases_fit::<S, T, W, C>(taps, up) {
            return Err(Error::AccumulatorOverflow);
        }
        Ok(Resampler {
            taps,
            history: Ring::new(S::ZERO),
            up,
            down,
            next: 0,
            output: OutputStep::new(),
            width: PhantomData,
        })
    }
}

impl<S: MulAcc<T, W>, const C: usize, T: Sample, W> Resampler<'_, S, C, T, W> {
    output_controls!(output);

    /// Takes one input and hands each output it produces to `emit`, oldest first: the outputs
    /// j with ⌊jM/L⌋ equal to this input's index, ⌊L/M⌋ or ⌈L/M⌉ of them. Returns how many.
    /// Each output costs at most ⌈K/L⌉ multiply-accumulates and one output step; saturations
    /// are counted.
    ///
    /// ```
    /// use tapline::Resampler;
    /// // Rate × 1/3 with a 3-tap average in Q15 (DC gain 1.0 − 1 LSB): y[j] = the average
    /// // of x[3j], x[3j−1], x[3j−2], produced by x[3j].
    /// static AVERAGE_3: [i16; 3] = [10923, 10922, 10922];
    /// let mut rs = Resampler::<i16, 3>::new(&AVERAGE_3, 1, 3)?;
    /// let mut got = Vec::new();
    /// for x in [i16::MIN, 300, 600, 900] {
    ///     rs.push(x, |y| got.push(y));
    /// }
    /// assert_eq!(got, [-10923, 600]); // y[0] from x[0] alone; (300 + 600 + 900) / 3
    /// assert_eq!(rs.push(0, |_| {}), 0);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[inline]
    pub fn push(&mut self, x: S, mut emit: impl FnMut(S)) -> usize {
        let x = self.output.admit::<S, T, W>(x);
        self.history.push(x);
        let mut produced = 0;
        while self.next < self.up {
            let phase = self.taps.get(self.next..).unwrap_or(&[]);
            let acc =
                history_dot_strided::<S, T, W, C>(S::ACC_ZERO, &self.history, phase, self.up, 0, 1);
            emit(self.output.finish::<S, T, W>(acc));
            self.next += usize::from(self.down.get());
            produced += 1;
        }
        self.next -= self.up;
        produced
    }

    /// Resamples `input` into the front of `output`, exactly as repeated
    /// [`push`](Resampler::push), and returns how many outputs were written
    /// ([`outputs_for`](Resampler::outputs_for)`(input.len())`, counted before the call).
    ///
    /// # Errors
    /// [`Error::OutputTooShort`] when `output` has room for fewer outputs than the call
    /// produces; nothing is processed then.
    ///
    /// ```
    /// use tapline::{Error, Resampler};
    /// // Rate × 4 by sample-and-hold taps (each phase one tap of 1.0 − 1 LSB).
    /// static HOLD_4: [i16; 4] = [i16::MAX; 4];
    /// let mut rs = Resampler::<i16, 1>::new(&HOLD_4, 4, 1)?;
    /// let mut out = [0i16; 8];
    /// assert_eq!(rs.process(&[i16::MIN, 2], &mut out)?, 8);
    /// assert_eq!(out, [-32767, -32767, -32767, -32767, 2, 2, 2, 2]);
    /// assert_eq!(rs.process(&[1, 2, 3], &mut out),
    ///     Err(Error::OutputTooShort { needed: 12, found: 8 }));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn process(&mut self, input: &[S], output: &mut [S]) -> Result<usize, Error> {
        let needed = self.outputs_for(input.len());
        fill_block(input, output, needed, |x, slots| {
            self.push(x, |y| slots.put(y));
        })
    }

    /// How many outputs the next `len` inputs produce, given the current phase (stops at
    /// `usize::MAX`).
    ///
    /// ```
    /// use tapline::Resampler;
    /// static TAPS: [i16; 6] = [5461; 6];
    /// let mut rs = Resampler::<i16, 2>::new(&TAPS, 3, 4)?;
    /// assert_eq!(rs.outputs_for(4), 3); // 4 inputs at × 3/4
    /// assert_eq!(rs.outputs_for(1), 1); // the first input gives y[0]
    /// for _ in 0..3 {
    ///     assert_eq!(rs.push(i16::MIN, |_| {}), 1); // y[0], y[1], y[2] at up-sampled 0, 4, 8
    /// }
    /// assert_eq!(rs.outputs_for(1), 0); // y[3] (up-sampled 12) needs input 4, not input 3
    /// assert_eq!(rs.outputs_for(2), 1);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub fn outputs_for(&self, len: usize) -> usize {
        // Outputs sit at up-sampled offsets next, next + M, … below len·L; in u128 no product
        // of two usizes overflows.
        let span = (len as u128) * (self.up as u128);
        let next = self.next as u128;
        let down = NonZeroU128::from(self.down);
        if span <= next {
            return 0;
        }
        usize::try_from((span - next - 1) / down + 1).unwrap_or(usize::MAX)
    }

    /// The most outputs one input produces, ⌈L/M⌉: the room a per-sample caller needs.
    ///
    /// ```
    /// use tapline::Resampler;
    /// static TAPS: [i16; 5] = [i16::MAX; 5];
    /// assert_eq!(Resampler::<i16, 5>::new(&TAPS, 5, 4)?.max_outputs_per_input(), 2);
    /// assert_eq!(Resampler::<i16, 5>::new(&TAPS, 1, 3)?.max_outputs_per_input(), 1);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub fn max_outputs_per_input(&self) -> usize {
        let down = NonZeroUsize::from(self.down);
        (self.up + down.get() - 1) / down
    }

    /// The tail of the signal so far: outputs at up-sampled offsets `next`, `next` + M, … from
    /// the next input's up-sampled position.
    fn tail(&self) -> Tail {
        Tail {
            first: self.next,
            up: self.up,
            down: NonZeroUsize::from(self.down),
        }
    }

    /// How many outputs [`flush`](Resampler::flush) writes now: the outputs j whose
    /// up-sampled index jM lies past the last input's L up-sampled samples but within the full
    /// convolution, jM ≤ (n − 1)·L + K − 1 for n inputs and K taps. The stream's outputs plus
    /// these are `scipy.signal.upfirdn(h, x, L, M)`'s length, ⌊((n − 1)·L + K − 1)/M⌋ + 1.
    /// With no input since construction, reset or flush (n = 0) the tail is that many zeros
    /// when K > L, none otherwise. With K < L the stream's last outputs can already lie past
    /// upfirdn's end (phases K … L − 1 hold no taps, so they are zeros) and the tail is empty.
    ///
    /// ```
    /// use tapline::Resampler;
    /// static TAPS: [i16; 24] = [1365; 24];
    /// let mut rs = Resampler::<i16, 8>::new(&TAPS, 3, 2)?;
    /// assert_eq!(rs.process(&[i16::MIN; 5], &mut [0; 8])?, 8); // 2j < 15: j = 0 … 7
    /// assert_eq!(rs.tail_len(), 10); // 2j ≤ 4·3 + 23 = 35: j = 8 … 17, upfirdn's 18 in all
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub fn tail_len(&self) -> usize {
        self.tail().len(self.taps.len())
    }

    /// Ends a finite signal: writes the [`tail_len`](Resampler::tail_len) outputs that zero
    /// inputs after the last one would give, up to the end of the full convolution, to the
    /// front of `output` — without pushing the zeros: each output sums only the taps of its
    /// phase that still meet the signal — and returns how many. Rounded, saturated and counted
    /// as [`push`](Resampler::push) does, bit for bit (the zero products add nothing).
    ///
    /// Afterwards the resampler is ready for a new signal: zero history, phase 0 (the next
    /// input produces y\[0\]), as after [`reset`](Resampler::reset), except that the
    /// saturation count keeps its value (the tail's saturations included).
    ///
    /// # Errors
    /// [`Error::OutputTooShort`] when `output` is shorter than the tail; nothing changes then.
    ///
    /// ```
    /// use tapline::{Error, Resampler};
    /// // Rate × 3/2 of a 2-sample signal, linear-interpolation taps: upfirdn gives
    /// // ⌊(3 + 4)/2⌋ + 1 = 4 outputs, 3 while streaming and 1 in the tail.
    /// static LINEAR_3: [i16; 5] = [10923, 21845, 32767, 21845, 10923];
    /// let mut rs = Resampler::<i16, 2>::new(&LINEAR_3, 3, 2)?;
    /// let mut out = [0i16; 4];
    /// assert_eq!(rs.process(&[3000, i16::MIN], &mut out)?, 3);
    /// assert_eq!(rs.flush(&mut []), Err(Error::OutputTooShort { needed: 1, found: 0 }));
    /// assert_eq!(rs.flush(&mut out[3..])?, 1);
    /// assert_eq!(out, [1000, 3000, -20845, -21845]); // the tail: ⅔ · −1.0
    /// assert_eq!(rs.outputs_for(1), 2); // a new signal: y[0] again from its first input
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn flush(&mut self, output: &mut [S]) -> Result<usize, Error> {
        let tail = self.tail();
        let (history, step, taps) = (&self.history, &mut self.output, self.taps);
        let written = tail.fill(taps.len(), output, |from| {
            phase_output::<S, T, W, C>(step, history, taps, from, tail.up)
        })?;
        self.history.fill(S::ZERO);
        self.next = 0;
        Ok(written)
    }

    /// Zero history, phase 0 (the next input produces y\[0\] again), zero saturation count;
    /// taps, factors and rounding stay.
    ///
    /// ```
    /// use tapline::Resampler;
    /// static TAPS: [i16; 2] = [i16::MIN, i16::MIN];
    /// let mut rs = Resampler::<i16, 1>::new(&TAPS, 2, 3)?;
    /// assert_eq!(rs.push(i16::MIN, |_| {}), 1); // −1 · −1 = +1.0 saturates
    /// assert_eq!(rs.saturations(), 1);
    /// rs.reset();
    /// assert_eq!((rs.saturations(), rs.outputs_for(1)), (0, 1));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn reset(&mut self) {
        self.history.fill(S::ZERO);
        self.next = 0;
        self.output.clear();
    }

    /// The factors (L, M): the output rate is the input rate × L/M.
    ///
    /// ```
    /// use tapline::Resampler;
    /// static TAPS: [f32; 1] = [1.0];
    /// assert_eq!(Resampler::<f32, 1>::new(&TAPS, 3, 4)?.factors(), (3, 4));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub fn factors(&self) -> (usize, usize) {
        (self.up, usize::from(self.down.get()))
    }

    /// The group delay in *up-sampled* samples (rate L·f_in), (K−1)/2, when the taps are
    /// symmetric or antisymmetric; `None` otherwise. Divide by M for output samples, by L for
    /// input samples.
    ///
    /// ```
    /// use tapline::Resampler;
    /// static TAPS: [i16; 5] = [i16::MIN, 0, 4, 0, i16::MIN];
    /// let rs = Resampler::<i16, 3>::new(&TAPS, 2, 3)?;
    /// assert_eq!(rs.group_delay().map(|d| d.samples()), Some(2.0));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub fn group_delay(&self) -> Option<GroupDelay> {
        GroupDelay::of(self.taps)
    }

    /// The prototype taps (at the up-sampled rate).
    ///
    /// ```
    /// use tapline::Resampler;
    /// static TAPS: [i16; 2] = [i16::MIN, i16::MAX];
    /// assert_eq!(Resampler::<i16, 1>::new(&TAPS, 2, 1)?.taps(), &TAPS);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub fn taps(&self) -> &[T] {
        self.taps
    }
}
