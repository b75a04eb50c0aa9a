//! One set of taps over C interleaved channels (a scanning ADC's DMA buffer), each channel with
//! its own history.

use super::GroupDelay;
use super::shared::{OutputStep, history_dot, output_controls};
use super::taps::TapTable;
use crate::headroom::CheckedTaps;
use crate::num::{Acc32Checked, Acc128, DefaultAcc, MulAcc, RuntimeChecked, Sample};
use crate::{Error, Ring};
use core::marker::PhantomData;

/// A FIR with `N` taps applied to `C` channels whose samples arrive interleaved — frame after
/// frame of one sample per channel, `[ch0, ch1, …, ch(C−1), ch0, …]`, as a DMA controller
/// writes an ADC that scans C inputs. Each channel has its own [`Ring`] of history; the taps are
/// shared. `C = 0` does not compile.
///
/// * **What it computes:** for every channel, exactly what a separate [`Fir`](crate::Fir) on the
///   same taps computes from that channel's samples alone, bit for bit in fixed point.
/// * **Accumulator, rounding, saturation:** those of `Fir`; one counter for all channels
///   ([`saturations`](MultiChannelFir::saturations)).
/// * **Group delay:** (N−1)/2 samples of each channel for symmetric or antisymmetric taps
///   ([`group_delay`](MultiChannelFir::group_delay)).
/// * **RAM:** 2·C·N samples (C mirrored rings), C indices, the borrowed taps, rounding and one counter.
/// * **Taps known at run time:** [`MultiChannelFirUpTo`] holds a slice of 1 to `N` taps (`N`
///   the capacity), with the same code and bits as a filter of exactly that many taps.
///
/// ```
/// use tapline::MultiChannelFir;
///
/// // Four ADC inputs scanned in turn; a 2-tap average on each.
/// static PAIR: [i16; 2] = [16384, 16384];
/// let mut fir = MultiChannelFir::<i16, 2, 4>::new(&PAIR)?;
/// let mut dma = [100, 200, 300, i16::MIN, 300, 400, 500, i16::MIN];
/// fir.process_in_place(&mut dma)?;
/// assert_eq!(dma, [50, 100, 150, -16384, 200, 300, 400, i16::MIN]);
/// assert_eq!(fir.push([0; 4]), [150, 200, 250, -16384]);
/// // Half a frame is a configuration mistake, reported before anything is processed.
/// assert!(fir.process_in_place(&mut [0i16; 6]).is_err());
/// # Ok::<(), tapline::Error>(())
/// ```
///
/// No channels do not compile:
///
/// ```compile_fail
/// static TAPS: [i16; 2] = [1, 1];
/// let fir = tapline::MultiChannelFir::<i16, 2, 0>::new(&TAPS);
/// ```
#[derive(Clone, Debug)]
pub struct MultiChannelFir<
    'a,
    S: MulAcc<T, W>,
    const N: usize,
    const C: usize,
    T: Sample = S,
    W = DefaultAcc,
    H = &'a [T; N],
> {
    taps: H,
    channels: [Ring<S, N>; C],
    output: OutputStep,
    // A value: the run-time checked width carries its input range (zero-sized otherwise).
    width: W,
    borrowed: PhantomData<&'a [T]>,
}

/// A [`MultiChannelFir`] whose taps are a slice of 1 to `N` known only at run time (`N` is the
/// capacity): for every channel, what `MultiChannelFir<S, L, C>` computes for the same `L`
/// taps, bit for bit. RAM: that of `MultiChannelFir<S, N, C>` plus one word (C histories of
/// `2·N` samples each, whatever `L`); replacing taps
/// ([`set_taps`](MultiChannelFir::set_taps)) keeps every channel's history.
///
/// ```
/// use tapline::filter::MultiChannelFirUpTo;
/// // Three scanned inputs; the 2-tap average was chosen by a setting at start-up.
/// let pair = [16384i16; 2];
/// let mut fir = MultiChannelFirUpTo::<i16, 8, 3>::with_taps(&pair)?;
/// assert_eq!(fir.push([100, i16::MIN, 300]), [50, -16384, 150]);
/// assert_eq!(fir.push([100, i16::MIN, 300]), [100, i16::MIN, 300]); // full scale, no saturation
/// assert_eq!(fir.saturations(), 0);
/// # Ok::<(), tapline::Error>(())
/// ```
pub type MultiChannelFirUpTo<'a, S, const N: usize, const C: usize, T = S, W = DefaultAcc> =
    MultiChannelFir<'a, S, N, C, T, W, &'a [T]>;

impl<'a, S: MulAcc<T>, const N: usize, const C: usize, T: Sample> MultiChannelFir<'a, S, N, C, T> {
    /// A C-channel filter with impulse response `taps`, the default accumulator, zero
    /// histories, [`Rounding::HalfUp`](crate::Rounding::HalfUp).
    ///
    /// # Errors
    /// [`Error::AccumulatorOverflow`] as for [`Fir::new`](crate::Fir::new).
    pub fn new(taps: &'a [T; N]) -> Result<Self, Error> {
        Self::with_accumulator(taps)
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, const C: usize, T: Sample, W: RuntimeChecked>
    MultiChannelFir<'a, S, N, C, T, W>
{
    /// As [`new`](MultiChannelFir::new), with the accumulator named by the type's `W`.
    ///
    /// # Errors
    /// [`Error::AccumulatorOverflow`] as for [`Fir::new`](crate::Fir::new).
    pub fn with_accumulator(taps: &'a [T; N]) -> Result<Self, Error> {
        Self::checked(taps)
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, const C: usize, T: Sample, W: RuntimeChecked>
    MultiChannelFirUpTo<'a, S, N, C, T, W>
{
    /// A C-channel filter of capacity `N` with the run-time tap set `taps` (1 to `N`), the
    /// accumulator named by `W`, zero histories,
    /// [`Rounding::HalfUp`](crate::Rounding::HalfUp).
    ///
    /// # Errors
    /// [`Error::NoTaps`], [`Error::TooManyTaps`], and [`Error::AccumulatorOverflow`] as for
    /// [`Fir::new`](crate::Fir::new).
    ///
    /// ```
    /// use tapline::{Error, filter::MultiChannelFirUpTo};
    /// assert_eq!(MultiChannelFirUpTo::<i16, 2, 4>::with_taps(&[1, 2, 3]).err(),
    ///     Some(Error::TooManyTaps { capacity: 2, found: 3 }));
    /// assert_eq!(MultiChannelFirUpTo::<i16, 2, 4>::with_taps(&[]).err(), Some(Error::NoTaps));
    /// ```
    pub fn with_taps(taps: &'a [T]) -> Result<Self, Error> {
        Self::checked(taps)
    }
}

impl<'a, S, const N: usize, const C: usize, T: Sample> MultiChannelFir<'a, S, N, C, T>
where
    S: MulAcc<T> + MulAcc<T, Acc128>,
{
    /// The C-channel filter of [`new`](MultiChannelFir::new) with the 128-bit accumulator
    /// [`Acc128`]: one line for `MultiChannelFir::<S, N, C, T, Acc128>::with_accumulator(taps)`.
    /// For 32-bit samples; exact `i128` sums for any taps, the one output step
    /// (half up unless [`with_rounding`](MultiChannelFir::with_rounding) says otherwise),
    /// clamped and counted saturation, as [`Fir::new_wide`](crate::Fir::new_wide).
    ///
    /// # Errors
    /// None in practice: [`Error::AccumulatorOverflow`] only for a table too long to exist.
    ///
    /// ```
    /// use tapline::MultiChannelFir;
    /// static LOUD: [i32; 2] = [i32::MIN; 2]; // Σ|h| = 2: beyond the i64 default
    /// let mut f = MultiChannelFir::<i32, 2, 2>::new_wide(&LOUD)?;
    /// assert_eq!(f.push([-(1 << 20), 1 << 20]), [1 << 20, -(1 << 20)]);
    /// // Full scale on channel 0: 1 + 2^-11 clamps (counted); channel 1 is independent.
    /// assert_eq!(f.push([i32::MIN, 0]), [i32::MAX, -(1 << 20)]);
    /// assert_eq!(f.saturations(), 1);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn new_wide(taps: &'a [T; N]) -> Result<MultiChannelFir<'a, S, N, C, T, Acc128>, Error> {
        MultiChannelFir::with_accumulator(taps)
    }
}

impl<'a, S, const N: usize, const C: usize, T: Sample> MultiChannelFirUpTo<'a, S, N, C, T>
where
    S: MulAcc<T> + MulAcc<T, Acc128>,
{
    /// The run-time tap set of [`with_taps`](MultiChannelFirUpTo::with_taps) with the 128-bit
    /// accumulator [`Acc128`]: one line for
    /// `MultiChannelFirUpTo::<S, N, C, T, Acc128>::with_taps(taps)`; numeric contract as
    /// [`new_wide`](MultiChannelFir::new_wide).
    ///
    /// # Errors
    /// [`Error::NoTaps`], [`Error::TooManyTaps`].
    ///
    /// ```
    /// use tapline::{Error, filter::MultiChannelFirUpTo};
    /// let stored = [i32::MIN; 4];
    /// let mut f = MultiChannelFirUpTo::<i32, 4, 2>::with_taps_wide(&stored[..3])?;
    /// assert_eq!(f.push([i32::MIN, -(1 << 24)]), [i32::MAX, 1 << 24]);
    /// assert_eq!(MultiChannelFirUpTo::<i32, 4, 2>::with_taps_wide(&[]).err(), Some(Error::NoTaps));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_taps_wide(
        taps: &'a [T],
    ) -> Result<MultiChannelFirUpTo<'a, S, N, C, T, Acc128>, Error> {
        MultiChannelFirUpTo::with_taps(taps)
    }
}

impl<'a, S, const N: usize, const C: usize, T, W, H> MultiChannelFir<'a, S, N, C, T, W, H>
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

    /// Replaces the taps, keeping every channel's history (a run-time tap set may change its
    /// length, 1 to `N`); from this call on the outputs are those of a filter that had the new
    /// taps from the start (once `N` frames have arrived).
    ///
    /// # Errors
    /// [`Error::NoTaps`], [`Error::TooManyTaps`] (run-time tap sets only) and
    /// [`Error::AccumulatorOverflow`]; the old taps then stay.
    ///
    /// ```
    /// use tapline::filter::MultiChannelFirUpTo;
    /// let mut fir = MultiChannelFirUpTo::<i16, 4, 2>::with_taps(&[i16::MAX])?;
    /// fir.push([1000, -1000]);
    /// fir.set_taps(&[16384, 16384])?;
    /// assert_eq!(fir.push([3000, i16::MIN]), [2000, -16884]); // (−1000 − 32768) / 2
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn set_taps(&mut self, taps: H) -> Result<(), Error> {
        super::fir::check_taps::<S, T, W, N>(taps)?;
        self.taps = taps;
        Ok(())
    }
}

impl<'a, S: MulAcc<i16, Acc32Checked>, const N: usize, const C: usize>
    MultiChannelFirUpTo<'a, S, N, C, i16, Acc32Checked>
{
    /// A Q15 C-channel filter of capacity `N` with the 32-bit accumulator, for taps that passed
    /// [`CheckedTaps::check`]: every channel's inputs are clamped into the checked range
    /// (counted as saturations), so the check holds for every call; outputs are those of the
    /// default `i64` path, bit for bit, for inputs within the range.
    ///
    /// # Errors
    /// [`Error::NoTaps`] or [`Error::TooManyTaps`].
    ///
    /// ```
    /// use tapline::filter::MultiChannelFirUpTo;
    /// use tapline::headroom::{Acc32Checked, CheckedTaps, InputRange};
    /// let checked = CheckedTaps::check(&[32767; 2], InputRange::codes(0, 4095)?)?;
    /// let mut fir = MultiChannelFirUpTo::<i16, 4, 2, i16, Acc32Checked>::with_checked(checked)?;
    /// assert_eq!(fir.push([4095, i16::MIN]), [4095, 0]); // -32768 clamped to 0, counted
    /// assert_eq!(fir.saturations(), 1);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_checked(checked: CheckedTaps<'a>) -> Result<Self, Error> {
        let taps = checked.taps();
        TapTable::<i16, N>::within_capacity(taps)?;
        Ok(Self::with_parts(taps, checked.width()))
    }
}

impl<'a, S: MulAcc<T, W>, const N: usize, const C: usize, T: Sample + 'a, W, H>
    MultiChannelFir<'a, S, N, C, T, W, H>
where
    H: TapTable<'a, T, N>,
{
    output_controls!(output);

    fn with_parts(taps: H, width: W) -> Self {
        const { assert!(C > 0, "a multi-channel filter needs at least one channel") };
        MultiChannelFir {
            taps,
            channels: core::array::from_fn(|_| Ring::new(S::ZERO)),
            output: OutputStep::new(),
            width,
            borrowed: PhantomData,
        }
    }

    /// Filters one frame (one sample per channel) and returns one output per channel.
    #[inline]
    pub fn push(&mut self, frame: [S; C]) -> [S; C] {
        let mut out = frame;
        self.filter_frame(&mut out);
        out
    }

    /// Filters one frame in place: `frame[c]` goes through channel c.
    #[inline]
    fn filter_frame(&mut self, frame: &mut [S]) {
        for (history, v) in self.channels.iter_mut().zip(frame) {
            history.push(self.output.admit_within::<S, T, W>(&self.width, *v));
            let acc = history_dot::<S, T, W, N>(S::ACC_ZERO, history, self.taps.as_slice());
            *v = self.output.finish::<S, T, W>(acc);
        }
    }

    /// Filters an interleaved buffer into `output` (same layout), exactly as repeated
    /// [`push`](MultiChannelFir::push) of its frames.
    ///
    /// # Errors
    /// * [`Error::PartialFrame`] when `input.len()` is not a multiple of C;
    /// * [`Error::OutputLength`] when `output.len() != input.len()`.
    ///
    /// Nothing is processed on an error.
    pub fn process(&mut self, input: &[S], output: &mut [S]) -> Result<(), Error> {
        whole_frames::<C>(input.len())?;
        if output.len() != input.len() {
            return Err(Error::OutputLength {
                expected: input.len(),
                found: output.len(),
            });
        }
        output.copy_from_slice(input);
        self.process_in_place(output)
    }

    /// Filters an interleaved buffer in place (e.g. a DMA half-buffer).
    ///
    /// # Errors
    /// [`Error::PartialFrame`] when `buffer.len()` is not a multiple of C; nothing is processed
    /// then.
    pub fn process_in_place(&mut self, buffer: &mut [S]) -> Result<(), Error> {
        whole_frames::<C>(buffer.len())?;
        for frame in buffer.chunks_exact_mut(C) {
            self.filter_frame(frame);
        }
        Ok(())
    }

    /// Zero histories, zero saturation count; taps and rounding stay.
    pub fn reset(&mut self) {
        for history in &mut self.channels {
            history.fill(S::ZERO);
        }
        self.output.clear();
    }

    /// The number of channels C.
    #[must_use]
    pub const fn channels(&self) -> usize {
        C
    }

    /// Channel `channel`'s history (oldest first), or `None` past the last channel.
    #[must_use]
    pub fn history(&self, channel: usize) -> Option<&Ring<S, N>> {
        self.channels.get(channel)
    }

    /// The group delay of every channel, (N−1)/2 samples, for symmetric or antisymmetric taps.
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

/// `Ok` when `len` is a whole number of C-sample frames.
fn whole_frames<const C: usize>(len: usize) -> Result<(), Error> {
    if len % C == 0 {
        Ok(())
    } else {
        Err(Error::PartialFrame { len, channels: C })
    }
}
