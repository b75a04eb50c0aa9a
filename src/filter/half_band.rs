//! The half-band decimator by 2: a decimating FIR whose taps at even, non-zero distance from the
//! centre are zero, and are skipped.

use super::GroupDelay;
use super::decimator::Decimation;
use super::shared::{decimate_block, decimate_in_place, history_dot_strided, output_controls};
use crate::num::{Acc128, DefaultAcc, MulAcc, RuntimeChecked, Sample};
use crate::{Error, Ring};
use core::marker::PhantomData;

/// A half-band decimator by 2 with `N` taps (N odd; an even N does not compile).
///
/// A half-band lowpass (cutoff at a quarter of the input rate) has every tap at an even,
/// non-zero distance from the centre equal to zero, and the centre tap equal to ½ (common
/// practice; R. Lyons, *Understanding Digital Signal Processing*, §5.7). This structure checks
/// the zeros at construction and never multiplies them: an output costs one multiply per tap at
/// odd distance from the centre plus one for the centre — (N+1)/2 + 1 when N+1 is a multiple
/// of 4 — instead of N, and only every second input computes an output.
///
/// * **What it computes:** exactly [`Decimator`](crate::Decimator) with M = 2 on the same taps
///   (the plain FIR's output at the 2nd, 4th, … input), bit for bit in fixed point. The
///   centre tap is not required to be ½: any value is used as given.
/// * **Accumulator, rounding, saturation:** those of [`Fir`](crate::Fir); saturations counted by
///   [`saturations`](HalfBandDecimator::saturations).
/// * **Group delay:** (N−1)/2 input samples for symmetric taps
///   ([`group_delay`](HalfBandDecimator::group_delay)), (N−1)/4 output samples.
///
/// ```
/// use tapline::HalfBandDecimator;
///
/// // 7 taps, N + 1 = 8: the taps at distance 2 from the centre are zero, the centre is ½.
/// static HALF_BAND: [i16; 7] = [-2048, 0, 10240, 16384, 10240, 0, -2048];
/// let mut hb = HalfBandDecimator::<i16, 7>::new(&HALF_BAND)?;
/// assert_eq!(hb.multiplies(), 5); // instead of 7
/// let mut out = [0i16; 4];
/// assert_eq!(hb.process(&[i16::MIN; 8], &mut out)?, 4);
/// assert_eq!(out[3], i16::MIN); // DC gain 1: settled full scale passes exactly
/// // but during start-up the first six taps sum to 1.0625: −1.0625 clamps, and is counted.
/// assert_eq!(out[2], i16::MIN);
/// assert_eq!(hb.saturations(), 1);
/// # Ok::<(), tapline::Error>(())
/// ```
///
/// An even tap count does not compile:
///
/// ```compile_fail
/// static TAPS: [i16; 4] = [1, 2, 2, 1];
/// let hb = tapline::HalfBandDecimator::<i16, 4>::new(&TAPS);
/// ```
#[derive(Clone, Debug)]
pub struct HalfBandDecimator<'a, S: MulAcc<T, W>, const N: usize, T: Sample = S, W = DefaultAcc> {
    taps: &'a [T; N],
    core: Decimation<S, N, 2>,
    width: PhantomData<W>,
}

impl<'a, S: MulAcc<T>, const N: usize, T: Sample> HalfBandDecimator<'a, S, N, T> {
    /// A half-band decimator with impulse response `taps`, the default accumulator, zero
    /// history, phase 0, [`Rounding::HalfUp`](crate::Rounding::HalfUp).
    ///
    /// # Errors
    /// * [`Error::NotHalfBand`] when a tap at even, non-zero distance from the centre is not
    ///   zero;
    /// * [`Error::AccumulatorOverflow`] as for [`Fir::new`](crate::Fir::new).
    ///
    /// ```
    /// use tapline::{Error, HalfBandDecimator};
    /// static NOT_HALF_BAND: [i16; 5] = [1, 2, 3, 2, 1];
    /// assert_eq!(HalfBandDecimator::<i16, 5>::new(&NOT_HALF_BAND).err(), Some(Error::NotHalfBand));
    /// ```
    pub fn new(taps: &'a [T; N]) -> Result<Self, Error> {
        Self::with_accumulator(taps)
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, T: Sample, W: RuntimeChecked>
    HalfBandDecimator<'a, S, N, T, W>
{
    /// As [`new`](HalfBandDecimator::new), with the accumulator named by the type's `W`.
    ///
    /// # Errors
    /// As [`new`](HalfBandDecimator::new).
    pub fn with_accumulator(taps: &'a [T; N]) -> Result<Self, Error> {
        const { assert!(N % 2 == 1, "a half-band filter has an odd number of taps") };
        let centre = (N - 1) / 2;
        let zeros_hold = taps
            .iter()
            .enumerate()
            .all(|(k, &h)| k == centre || k.abs_diff(centre) % 2 == 1 || h == T::ZERO);
        if !zeros_hold {
            return Err(Error::NotHalfBand);
        }
        if !S::accumulator_fits(taps) {
            return Err(Error::AccumulatorOverflow);
        }
        Ok(HalfBandDecimator {
            taps,
            core: Decimation::new(),
            width: PhantomData,
        })
    }
}

impl<'a, S, const N: usize, T: Sample> HalfBandDecimator<'a, S, N, T>
where
    S: MulAcc<T> + MulAcc<T, Acc128>,
{
    /// The half-band decimator of [`new`](HalfBandDecimator::new) with the 128-bit
    /// accumulator [`Acc128`]: one line for
    /// `HalfBandDecimator::<S, N, T, Acc128>::with_accumulator(taps)`.
    ///
    /// * **Accumulator:** `i128`, exact for any tap set that fits in memory.
    /// * **Rounding / saturation:** the one output step of every filter ([`Rounding::HalfUp`](crate::Rounding::HalfUp)
    ///   unless `with_rounding` says otherwise), clamped and counted.
    /// * **Cost:** about twice the additions of `i64` on a 32-bit core.
    ///
    /// # Errors
    /// [`Error::NotHalfBand`] as for [`new`](HalfBandDecimator::new);
    /// [`Error::AccumulatorOverflow`] only for a table too long to exist.
    ///
    /// ```
    /// use tapline::HalfBandDecimator;
    /// // Q31 [−1, −1, −1]: half-band (no even, non-zero distance), Σ|h| = 3.
    /// static LOUD: [i32; 3] = [i32::MIN; 3];
    /// assert!(HalfBandDecimator::<i32, 3>::new(&LOUD).is_err());
    /// assert!(HalfBandDecimator::<i32, 3>::new_wide(&LOUD).is_ok());
    /// ```
    pub fn new_wide(taps: &'a [T; N]) -> Result<HalfBandDecimator<'a, S, N, T, Acc128>, Error> {
        HalfBandDecimator::with_accumulator(taps)
    }
}

impl<S: MulAcc<T, W>, const N: usize, T: Sample, W> HalfBandDecimator<'_, S, N, T, W> {
    output_controls!(core.output);

    /// The first tap at odd distance from the centre: 0 when the centre index is odd.
    const FIRST_ODD: usize = ((N - 1) / 2 + 1) % 2;

    /// Takes one input; returns `Some(y)` on every second input, `None` otherwise.
    #[inline]
    pub fn push(&mut self, x: S) -> Option<S> {
        let taps = self.taps.as_slice();
        self.core
            .push::<T, W>(x, |history| Self::sum(history, taps))
    }

    /// Σ over the taps at odd distance from the centre (every second tap against every second
    /// sample), plus the centre tap.
    #[inline(always)]
    fn sum(history: &Ring<S, N>, taps: &[T]) -> S::Acc {
        let centre = (N - 1) / 2;
        let odd = taps.get(Self::FIRST_ODD..).unwrap_or(&[]);
        let acc =
            history_dot_strided::<S, T, W, N>(S::ACC_ZERO, history, odd, 2, Self::FIRST_ODD, 2);
        let middle = taps.get(centre..=centre).unwrap_or(&[]);
        history_dot_strided::<S, T, W, N>(acc, history, middle, 1, centre, 1)
    }

    /// Decimates `input` into the front of `output`, exactly as repeated
    /// [`push`](HalfBandDecimator::push); returns how many outputs were written.
    ///
    /// # Errors
    /// [`Error::OutputTooShort`] when `output` has room for fewer outputs than the call
    /// produces; nothing is processed then.
    pub fn process(&mut self, input: &[S], output: &mut [S]) -> Result<usize, Error> {
        let needed = self.core.outputs_for(input.len());
        decimate_block(input, output, needed, |x| self.push(x))
    }

    /// Decimates `buffer` in place, outputs to its front; returns how many were written.
    pub fn process_in_place(&mut self, buffer: &mut [S]) -> usize {
        decimate_in_place(buffer, |x| self.push(x))
    }

    /// How many outputs the next `len` inputs produce, given the current phase.
    #[must_use]
    pub const fn outputs_for(&self, len: usize) -> usize {
        self.core.outputs_for(len)
    }

    /// Multiplies per output: the taps at odd distance from the centre, plus the centre.
    #[must_use]
    pub const fn multiplies(&self) -> usize {
        (N - Self::FIRST_ODD).div_ceil(2) + 1
    }

    /// Keeps full-rate output `phase` (0 or 1) first, then every second one, counting from
    /// the next input; as [`Decimator::with_start_phase`](crate::Decimator::with_start_phase).
    /// The default is 1 (an output on every second input); 0 is what
    /// `scipy.signal.upfirdn(h, x, 1, 2)` keeps.
    ///
    /// # Errors
    /// [`Error::StartPhaseTooLarge`] when `phase` ≥ 2.
    ///
    /// ```
    /// use tapline::{Error, HalfBandDecimator};
    /// static HALF_BAND: [i16; 3] = [8192, 16384, 8192]; // ¼, ½, ¼
    /// let mut hb = HalfBandDecimator::<i16, 3>::new(&HALF_BAND)?.with_start_phase(0)?;
    /// assert_eq!(hb.start_phase(), 0);
    /// assert_eq!(hb.push(4000), Some(1000)); // y[0] = h[0] · x[0] = ¼ · 4000
    /// assert_eq!(hb.push(4000), None);
    /// assert_eq!(HalfBandDecimator::<i16, 3>::new(&HALF_BAND)?.with_start_phase(2).err(),
    ///     Some(Error::StartPhaseTooLarge { phase: 2, factor: 2 }));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_start_phase(mut self, phase: usize) -> Result<Self, Error> {
        self.set_start_phase(phase)?;
        Ok(self)
    }

    /// Sets the start phase and restarts the count from it, as
    /// [`Decimator::set_start_phase`](crate::Decimator::set_start_phase); history, taps and
    /// saturation count stay.
    ///
    /// # Errors
    /// [`Error::StartPhaseTooLarge`] when `phase` ≥ 2; nothing changes then.
    ///
    /// ```
    /// use tapline::HalfBandDecimator;
    /// static HALF_BAND: [i16; 3] = [8192, 16384, 8192];
    /// let mut hb = HalfBandDecimator::<i16, 3>::new(&HALF_BAND)?;
    /// assert_eq!(hb.push(4000), None); // default start phase 1
    /// hb.set_start_phase(0)?;
    /// assert_eq!(hb.push(4000), Some(3000)); // ½ · 4000 + ¼ · 4000
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn set_start_phase(&mut self, phase: usize) -> Result<(), Error> {
        self.core.set_start_phase(phase)
    }

    /// Which full-rate output (modulo 2) is kept first: 1 by default.
    ///
    /// ```
    /// use tapline::HalfBandDecimator;
    /// static HALF_BAND: [i16; 3] = [8192, 16384, 8192];
    /// assert_eq!(HalfBandDecimator::<i16, 3>::new(&HALF_BAND)?.start_phase(), 1);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub const fn start_phase(&self) -> usize {
        self.core.start_phase()
    }

    /// How many outputs [`flush`](HalfBandDecimator::flush) writes now: the kept ones of the
    /// N − 1 full-rate outputs after the last input, as
    /// [`Decimator::tail_len`](crate::Decimator::tail_len).
    ///
    /// ```
    /// use tapline::HalfBandDecimator;
    /// static HALF_BAND: [i16; 3] = [8192, 16384, 8192];
    /// let mut hb = HalfBandDecimator::<i16, 3>::new(&HALF_BAND)?.with_start_phase(0)?;
    /// hb.process(&[100; 5], &mut [0; 3])?; // full-rate 0, 2, 4
    /// assert_eq!(hb.tail_len(), 1); // 6 of 0 … 6
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub fn tail_len(&self) -> usize {
        self.core.tail().len(N)
    }

    /// Ends a finite signal: writes the [`tail_len`](HalfBandDecimator::tail_len) outputs that
    /// N − 1 zero inputs would give, without pushing them, and returns how many; then zero
    /// history and the start phase again, the saturation count kept, as
    /// [`Decimator::flush`](crate::Decimator::flush). The tail sums every tap against the
    /// history (the zero taps add nothing), so the bits are those of
    /// [`push`](HalfBandDecimator::push).
    ///
    /// # Errors
    /// [`Error::OutputTooShort`] when `output` is shorter than the tail; nothing changes then.
    ///
    /// ```
    /// use tapline::HalfBandDecimator;
    /// static HALF_BAND: [i16; 3] = [8192, 16384, 8192];
    /// let mut hb = HalfBandDecimator::<i16, 3>::new(&HALF_BAND)?.with_start_phase(0)?;
    /// let mut out = [0i16; 4];
    /// assert_eq!(hb.process(&[400, 800, 1200, 1600, 2000], &mut out)?, 3);
    /// assert_eq!(hb.flush(&mut out[3..])?, 1);
    /// assert_eq!(out, [100, 800, 1600, 500]); // the last: ¼ · 2000
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn flush(&mut self, output: &mut [S]) -> Result<usize, Error> {
        self.core.flush::<T, W>(self.taps, output)
    }

    /// Zero history, the count back at the start phase, zero saturation count; taps, start
    /// phase and rounding stay.
    pub fn reset(&mut self) {
        self.core.reset();
    }

    /// The group delay in input samples, (N−1)/2, for symmetric or antisymmetric taps.
    #[must_use]
    pub fn group_delay(&self) -> Option<GroupDelay> {
        GroupDelay::of(self.taps)
    }

    /// The taps, zeros included.
    #[must_use]
    pub fn taps(&self) -> &[T; N] {
        self.taps
    }
}
