//! The interpolating FIR: L outputs per input, y\[nL + p\] = Σ_j h\[p + jL\]·x\[n − j\] — the
//! FIR applied to the input with L − 1 zeros stuffed after each sample, without multiplying the
//! zeros.

use super::GroupDelay;
use super::shared::{
    OutputStep, Tail, history_dot_strided, output_controls, phase_output, phases_fit,
};
use crate::num::{Acc128, DefaultAcc, MulAcc, RuntimeChecked, Sample};
use crate::{Error, Ring};
use core::marker::PhantomData;
use core::num::NonZeroUsize;

/// A polyphase interpolating FIR: `N` taps, interpolation factor `L` (a const: a factor of 0
/// does not compile). Each input produces `L` outputs; output phase p uses the strided subset
/// of taps p, p + L, p + 2L, … against the newest ⌈N/L⌉ inputs, so an input costs N
/// multiply-accumulates in all, N/L per output.
///
/// * **What it computes:** exactly the plain [`Fir`](crate::Fir) on the same taps run over the
///   zero-stuffed input x\[0\], 0, …, 0, x\[1\], 0, … (L − 1 zeros after each sample), bit for bit
///   in fixed point. Zero-stuffing divides the signal's average by L, so taps designed for
///   interpolation have a DC gain of L (common practice) — in Q15 each phase's taps sum to
///   about 1.0.
/// * **Accumulator:** each phase is its own sum: the constructor checks each phase's taps
///   (not the whole table) against the accumulator, so Q31 tables of gain L ≥ 2 fit `i64` as
///   long as every phase does.
/// * **Rounding, saturation:** one rounding step per output, clamped and counted by
///   [`saturations`](Interpolator::saturations).
/// * **Group delay:** (N−1)/2 *output* samples for symmetric or antisymmetric taps
///   ([`group_delay`](Interpolator::group_delay)).
/// * **RAM:** the history is a `Ring` of N low-rate samples (2·N stored, mirrored), of which the newest ⌈N/L⌉ are read.
/// * **Finite signals:** [`flush`](Interpolator::flush) writes the outputs of the zero-padded
///   tail, N − L of them (where the convolution of the zero-stuffed signal ends), and readies
///   the interpolator for the next signal; streamed outputs plus the tail are
///   `scipy.signal.upfirdn(h, x, L)`, output for output and in number.
///
/// ```
/// use tapline::Interpolator;
///
/// // Linear interpolation by 2 in Q15: taps [0.5, 1.0 − 1 LSB, 0.5], DC gain ≈ 2.
/// static LINEAR_2: [i16; 3] = [16384, 32767, 16384];
/// let mut up = Interpolator::<i16, 3, 2>::new(&LINEAR_2)?;
/// assert_eq!(up.push(1000), [500, 1000]);
/// assert_eq!(up.push(3000), [2000, 3000]);
/// // Full scale: −1.0 → −1.0 (−32767/32768 · −32768 rounds to −32767) and the midpoint.
/// let mut out = [0i16; 4];
/// assert_eq!(up.process(&[i16::MIN, i16::MIN], &mut out)?, 4);
/// assert_eq!(out, [-14884, -32767, -32768, -32767]);
/// assert_eq!(up.saturations(), 0);
/// # Ok::<(), tapline::Error>(())
/// ```
#[derive(Clone, Debug)]
pub struct Interpolator<
    'a,
    S: MulAcc<T, W>,
    const N: usize,
    const L: usize,
    T: Sample = S,
    W = DefaultAcc,
> {
    taps: &'a [T; N],
    history: Ring<S, N>,
    output: OutputStep,
    width: PhantomData<W>,
}

impl<'a, S: MulAcc<T>, const N: usize, const L: usize, T: Sample> Interpolator<'a, S, N, L, T> {
    /// An interpolator with impulse response `taps` (at the output rate), the default
    /// accumulator, zero history, [`Rounding::HalfUp`](crate::Rounding::HalfUp).
    ///
    /// # Errors
    /// [`Error::AccumulatorOverflow`] when some phase's taps could overflow the accumulator
    /// for a full-scale input.
    ///
    /// ```
    /// use tapline::{Error, Interpolator};
    /// // Q31, gain 2 overall but each phase of [−1, −1, −1, −1] sums to −2: too loud for i64.
    /// static LOUD: [i32; 4] = [i32::MIN; 4];
    /// assert_eq!(Interpolator::<i32, 4, 2>::new(&LOUD).err(), Some(Error::AccumulatorOverflow));
    /// // Each phase of this one holds a single tap of −1.0: fine.
    /// assert!(Interpolator::<i32, 2, 2>::new(&[i32::MIN; 2]).is_ok());
    /// ```
    pub fn new(taps: &'a [T; N]) -> Result<Self, Error> {
        Self::with_accumulator(taps)
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, const L: usize, T: Sample, W: RuntimeChecked>
    Interpolator<'a, S, N, L, T, W>
{
    /// As [`new`](Interpolator::new), with the accumulator named by the type's `W` parameter.
    ///
    /// # Errors
    /// As [`new`](Interpolator::new).
    pub fn with_accumulator(taps: &'a [T; N]) -> Result<Self, Error> {
        const { assert!(L > 0, "an interpolation factor must be at least 1") };
        if !phases_fit::<S, T, W, N>(taps, L) {
            return Err(Error::AccumulatorOverflow);
        }
        Ok(Interpolator {
            taps,
            history: Ring::new(S::ZERO),
            output: OutputStep::new(),
            width: PhantomData,
        })
    }
}

impl<'a, S, const N: usize, const L: usize, T: Sample> Interpolator<'a, S, N, L, T>
where
    S: MulAcc<T> + MulAcc<T, Acc128>,
{
    /// The interpolator of [`new`](Interpolator::new) with the 128-bit accumulator
    /// [`Acc128`]: one line for `Interpolator::<S, N, L, T, Acc128>::with_accumulator(taps)`.
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
    /// use tapline::Interpolator;
    /// static LOUD: [i32; 4] = [i32::MIN; 4]; // each phase sums to −2 in Q31
    /// assert!(Interpolator::<i32, 4, 2>::new(&LOUD).is_err());
    /// let mut up = Interpolator::<i32, 4, 2>::new_wide(&LOUD)?;
    /// assert_eq!(up.push(1 << 20), [-(1 << 20); 2]);
    /// assert_eq!(up.push(1 << 20), [-(2 << 20); 2]); // each phase sums two taps: exact
    /// assert_eq!(up.push(i32::MIN), [i32::MAX - ((1 << 20) - 1); 2]); // 1 − 2^-11
    /// assert_eq!(up.push(i32::MIN), [i32::MAX; 2]); // +2.0, summed exactly, clamps
    /// assert_eq!(up.saturations(), 2);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn new_wide(taps: &'a [T; N]) -> Result<Interpolator<'a, S, N, L, T, Acc128>, Error> {
        Interpolator::with_accumulator(taps)
    }
}

impl<S: MulAcc<T, W>, const N: usize, const L: usize, T: Sample, W>
    Interpolator<'_, S, N, L, T, W>
{
    output_controls!(output);

    /// Takes one input and returns its L outputs, oldest first. Costs N multiply-accumulates
    /// and L output steps; saturations are counted.
    #[inline]
    pub fn push(&mut self, x: S) -> [S; L] {
        let x = self.output.admit::<S, T, W>(x);
        self.history.push(x);
        let (history, output, taps) = (&self.history, &mut self.output, self.taps.as_slice());
        core::array::from_fn(|p| {
            let phase = taps.get(p..).unwrap_or(&[]);
            let acc = history_dot_strided::<S, T, W, N>(S::ACC_ZERO, history, phase, L, 0, 1);
            output.finish::<S, T, W>(acc)
        })
    }

    /// Interpolates `input` into the front of `output` (L outputs per input, in order), exactly
    /// as repeated [`push`](Interpolator::push); returns how many outputs were written,
    /// `L · input.len()`.
    ///
    /// # Errors
    /// [`Error::OutputTooShort`] when `output` is shorter than `L · input.len()`; nothing is
    /// processed then.
    pub fn process(&mut self, input: &[S], output: &mut [S]) -> Result<usize, Error> {
        let needed = input.len().saturating_mul(L);
        if output.len() < needed {
            return Err(Error::OutputTooShort {
                needed,
                found: output.len(),
            });
        }
        for (&x, frame) in input.iter().zip(output.chunks_exact_mut(L)) {
            for (slot, y) in frame.iter_mut().zip(self.push(x)) {
                *slot = y;
            }
        }
        Ok(needed)
    }

    /// The tail of a finite signal: outputs at the up-sampled offsets 0, 1, … after the last
    /// input's L outputs, up to where the full convolution ends.
    const TAIL: Tail = Tail {
        first: 0,
        up: L,
        down: NonZeroUsize::MIN,
    };

    /// How many outputs [`flush`](Interpolator::flush) writes: N − L (0 when N ≤ L). For n
    /// inputs the stream gives n·L outputs and the tail the rest of the convolution of the
    /// zero-stuffed signal, (n − 1)·L + N in all: `scipy.signal.upfirdn(h, x, L)`'s length.
    /// With no input since construction, reset or flush the tail is N − L zeros. With N < L
    /// there is no tail, and the last L − N outputs of each input lie past upfirdn's end: its
    /// phases N … L − 1 hold no taps, so those outputs are zeros.
    ///
    /// ```
    /// use tapline::Interpolator;
    /// static TAPS: [i16; 8] = [i16::MIN; 8];
    /// assert_eq!(Interpolator::<i16, 8, 3>::new(&TAPS)?.tail_len(), 5);
    /// assert_eq!(Interpolator::<i16, 8, 8>::new(&TAPS)?.tail_len(), 0);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub fn tail_len(&self) -> usize {
        Self::TAIL.len(N)
    }

    /// Ends a finite signal: writes the [`tail_len`](Interpolator::tail_len) outputs that
    /// zero inputs after the last one would give, up to the end of the full convolution, to the
    /// front of `output` — without pushing the zeros: each output sums only the taps of its
    /// phase that still meet the signal — and returns how many. Rounded, saturated and counted
    /// as [`push`](Interpolator::push) does, bit for bit (the zero products add nothing).
    ///
    /// Afterwards the history is zero, ready for a new signal, as after
    /// [`reset`](Interpolator::reset), except that the saturation count keeps its value (the
    /// tail's saturations included).
    ///
    /// # Errors
    /// [`Error::OutputTooShort`] when `output` is shorter than the tail; nothing changes then.
    ///
    /// ```
    /// use tapline::{Error, Interpolator};
    /// // Linear interpolation by 2 of a 2-sample signal: upfirdn gives (2 − 1)·2 + 3 = 5 outputs.
    /// static LINEAR_2: [i16; 3] = [16384, 32767, 16384];
    /// let mut up = Interpolator::<i16, 3, 2>::new(&LINEAR_2)?;
    /// let mut out = [0i16; 5];
    /// assert_eq!(up.process(&[1000, i16::MIN], &mut out)?, 4);
    /// assert_eq!(up.flush(&mut []), Err(Error::OutputTooShort { needed: 1, found: 0 }));
    /// assert_eq!(up.flush(&mut out[4..])?, 1);
    /// assert_eq!(out, [500, 1000, -15884, -32767, -16384]); // the tail: ½ · −1.0
    /// assert_eq!(up.push(2000), [1000, 2000]); // a new signal, from zero history
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn flush(&mut self, output: &mut [S]) -> Result<usize, Error> {
        let (history, step, taps) = (&self.history, &mut self.output, self.taps.as_slice());
        let written = Self::TAIL.fill(N, output, |from| {
            phase_output::<S, T, W, N>(step, history, taps, from, L)
        })?;
        self.history.fill(S::ZERO);
        Ok(written)
    }

    /// Zero history, zero saturation count; taps and rounding stay.
    pub fn reset(&mut self) {
        self.history.fill(S::ZERO);
        self.output.clear();
    }

    /// The interpolation factor L.
    #[must_use]
    pub const fn factor(&self) -> usize {
        L
    }

    /// The group delay in *output* samples, (N−1)/2, when the taps are symmetric or
    /// antisymmetric; `None` otherwise.
    #[must_use]
    pub fn group_delay(&self) -> Option<GroupDelay> {
        GroupDelay::of(self.taps)
    }

    /// The taps (the impulse response at the output rate).
    #[must_use]
    pub fn taps(&self) -> &[T; N] {
        self.taps
    }
}
