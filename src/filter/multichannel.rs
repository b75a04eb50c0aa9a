//! One set of taps over C interleaved channels (a scanning ADC's DMA buffer), each channel with
//! its own history.

use super::GroupDelay;
use super::shared::{OutputStep, history_dot, output_controls};
use crate::num::{DefaultAcc, MulAcc, RuntimeChecked, Sample};
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
> {
    taps: &'a [T; N],
    channels: [Ring<S, N>; C],
    output: OutputStep,
    width: PhantomData<W>,
}

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
        const { assert!(C > 0, "a multi-channel filter needs at least one channel") };
        if !S::accumulator_fits(taps) {
            return Err(Error::AccumulatorOverflow);
        }
        Ok(MultiChannelFir {
            taps,
            channels: core::array::from_fn(|_| Ring::new(S::ZERO)),
            output: OutputStep::new(),
            width: PhantomData,
        })
    }
}

impl<S: MulAcc<T, W>, const N: usize, const C: usize, T: Sample, W>
    MultiChannelFir<'_, S, N, C, T, W>
{
    output_controls!(output);

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
            history.push(self.output.admit::<S, T, W>(*v));
            let acc = history_dot::<S, T, W, N>(S::ACC_ZERO, history, self.taps);
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
        GroupDelay::of(self.taps)
    }

    /// The taps.
    #[must_use]
    pub fn taps(&self) -> &[T; N] {
        self.taps
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
