//! What every streaming structure shares, written once: the output step with its saturation
//! counter, the convolution sums over a [`Ring`]'s two slices (plain, strided, folded), the
//! decimation phase, and the block loops that make block calls equal per-sample calls.

use crate::kernel::{Fold, FoldMulAcc, dot_folded, dot_reversed_strided};
use crate::num::fixed_point::clamp_masked;
use crate::num::{FixedPoint, MulAcc, Rounding, Sample};
use crate::{Error, Ring};

/// The one output step of the numeric contract — rounding mode and saturation counter — shared
/// by every structure so that they all round, clamp and count the same way.
#[derive(Clone, Copy, Debug)]
pub(crate) struct OutputStep {
    rounding: Rounding,
    saturations: u32,
}

impl OutputStep {
    pub(crate) const fn new() -> Self {
        OutputStep {
            rounding: Rounding::HalfUp,
            saturations: 0,
        }
    }

    /// The input as the history admits it ([`MulAcc::admit`]); a changed input is counted.
    #[inline(always)]
    pub(crate) fn admit<S: MulAcc<T, W>, T: Sample, W>(&mut self, x: S) -> S {
        let (x, clamped) = S::admit(x);
        self.count(clamped);
        x
    }

    /// The input as a filter holding its width's value admits it ([`MulAcc::admit_within`]); a
    /// changed input is counted.
    #[inline(always)]
    pub(crate) fn admit_within<S: MulAcc<T, W>, T: Sample, W>(&mut self, width: &W, x: S) -> S {
        let (x, clamped) = S::admit_within(width, x);
        self.count(clamped);
        x
    }

    /// [`MulAcc::finish`] with this step's rounding; a saturated output is counted.
    #[inline(always)]
    pub(crate) fn finish<S: MulAcc<T, W>, T: Sample, W>(&mut self, acc: S::Acc) -> S {
        let (y, saturated) = S::finish(acc, self.rounding);
        self.count(saturated);
        y
    }

    /// [`finish`](Self::finish) for a sample whose admission (`MulAcc::admit`) was held back
    /// until its output: both events update the counter once, after the sum, so it stays in a
    /// register across the kernel call (per-sample cost, `examples/qemu/COSTS.md`).
    #[inline(always)]
    pub(crate) fn finish_admitted<S: MulAcc<T, W>, T: Sample, W>(
        &mut self,
        acc: S::Acc,
        clamped: bool,
    ) -> S {
        let (y, saturated) = S::finish(acc, self.rounding);
        self.saturations = count_event(count_event(self.saturations, saturated), clamped);
        y
    }

    /// A raw fixed-point result clamped to `S`'s range; a clamp is counted.
    #[inline(always)]
    pub(crate) fn saturate<S: FixedPoint>(&mut self, raw: i64) -> S {
        let (clamped, saturated) = clamp_masked(raw, S::RAW_MIN, S::RAW_MAX);
        self.count(saturated);
        S::from_raw_truncating(clamped)
    }

    #[inline(always)]
    fn count(&mut self, event: bool) {
        self.saturations = count_event(self.saturations, event);
    }

    /// Adds `events` saturations at once: block paths count a block's events in a local.
    #[inline(always)]
    pub(crate) fn count_events(&mut self, events: u32) {
        self.saturations = count_events(self.saturations, events);
    }

    pub(crate) const fn rounding(&self) -> Rounding {
        self.rounding
    }

    pub(crate) fn set_rounding(&mut self, rounding: Rounding) {
        self.rounding = rounding;
    }

    pub(crate) const fn saturations(&self) -> u32 {
        self.saturations
    }

    pub(crate) fn clear(&mut self) -> u32 {
        core::mem::take(&mut self.saturations)
    }
}

/// The rounding and saturation accessors every structure offers, over its `OutputStep` field
/// (named by the path given, e.g. `output` or `core.output`): one text, so the contract reads the
/// same on every type.
macro_rules! output_controls {
    ($($field:ident).+) => {
        /// The same structure with another rounding mode for its output step (default
        /// [`Rounding::HalfUp`](crate::Rounding::HalfUp)). Fixed point only: a float output
        /// has no rounding step to choose.
        #[must_use]
        pub fn with_rounding(mut self, rounding: crate::Rounding) -> Self
        where
            S: crate::num::FixedPoint,
        {
            self.$($field).+.set_rounding(rounding);
            self
        }

        /// The rounding mode of the output step (fixed point only).
        #[must_use]
        pub fn rounding(&self) -> crate::Rounding
        where
            S: crate::num::FixedPoint,
        {
            self.$($field).+.rounding()
        }

        /// How many outputs have saturated (clamped to the sample type's range, never wrapped)
        /// since construction, `reset` or [`clear_saturations`](Self::clear_saturations).
        /// Stops at `u32::MAX`.
        #[must_use]
        pub fn saturations(&self) -> u32 {
            self.$($field).+.saturations()
        }

        /// Sets the saturation counter to zero and returns what it held.
        pub fn clear_saturations(&mut self) -> u32 {
            self.$($field).+.clear()
        }
    };
}
pub(crate) use output_controls;

/// `acc + Σ_k taps[k]·x[n−k]` over the history (x\[n\] its newest value), for
/// `k < min(taps.len(), N)`: the plain FIR sum, in ascending k.
#[inline]
pub(crate) fn history_dot<S: MulAcc<T, W>, T: Sample, W, const N: usize>(
    acc: S::Acc,
    history: &Ring<S, N>,
    taps: &[T],
) -> S::Acc {
    S::dot_reversed(acc, taps, history.window())
}

/// `acc + Σ_i taps[i·tap_step]·x[n − skip − i·x_step]` over the history, in ascending i, for as
/// long as both the taps and the history last.
#[inline]
pub(crate) fn history_dot_strided<S: MulAcc<T, W>, T: Sample, W, const N: usize>(
    acc: S::Acc,
    history: &Ring<S, N>,
    taps: &[T],
    tap_step: usize,
    skip: usize,
    x_step: usize,
) -> S::Acc {
    let window = history.window();
    let window = window.get(..N.saturating_sub(skip)).unwrap_or(&[]);
    dot_reversed_strided::<S, T, W>(acc, taps, tap_step, window, x_step)
}

/// One output of a polyphase structure: the taps `from`, `from + up`, … against the newest
/// inputs, finished (rounded, saturated, counted) by `step`.
#[inline(always)]
pub(crate) fn phase_output<S: MulAcc<T, W>, T: Sample, W, const N: usize>(
    step: &mut OutputStep,
    history: &Ring<S, N>,
    taps: &[T],
    from: usize,
    up: usize,
) -> S {
    let phase = taps.get(from..).unwrap_or(&[]);
    step.finish::<S, T, W>(history_dot_strided::<S, T, W, N>(
        S::ACC_ZERO,
        history,
        phase,
        up,
        0,
        1,
    ))
}

/// Whether each phase of `taps` taken with stride `step` (the taps p, p + step, p + 2·step, …
/// for every p < step) fits the accumulator for any full-range input
/// ([`MulAcc::accumulator_fits`]): a polyphase structure sums one phase per output. `N` bounds
/// a phase's length (longer phases are checked on their first `N` taps, all a history of `N`
/// reaches).
pub(crate) fn phases_fit<S: MulAcc<T, W>, T: Sample, W, const N: usize>(
    taps: &[T],
    step: usize,
) -> bool {
    let step = step.max(1);
    let mut phase_taps = [T::ZERO; N];
    (0..step.min(taps.len())).all(|p| {
        let mut count = 0;
        let phase = taps.get(p..).unwrap_or(&[]).iter().step_by(step);
        for (slot, &h) in phase_taps.iter_mut().zip(phase) {
            *slot = h;
            count += 1;
        }
        S::accumulator_fits(phase_taps.get(..count).unwrap_or(&[]))
    })
}

/// The folded linear-phase sum over a full history of N samples, h = `taps` (length N):
/// Σ_{k<⌊N/2⌋} h\[k\]·(x\[n−k\] ± x\[n−(N−1−k)\]) plus, for odd N and [`Fold::Sum`], the centre
/// term h\[c\]·x\[n−c\], c = (N−1)/2. (Antisymmetric taps have a zero centre, which is skipped.)
#[inline]
pub(crate) fn history_dot_folded<S: FoldMulAcc<T, W>, T: Sample, W, const N: usize>(
    history: &Ring<S, N>,
    taps: &[T],
    fold: Fold,
) -> S::Acc {
    let window = history.window();
    if S::PLAIN_IS_FASTER {
        // The same exact sum without the pre-add (see `FoldMulAcc::PLAIN_IS_FASTER`).
        return S::dot_reversed(S::ACC_ZERO, taps, window);
    }
    let half = N / 2;
    // Tap k pairs x[n−k] (the window read backward) with x[n−(N−1−k)] (read forward).
    let acc = dot_folded::<S, T, W>(
        S::ACC_ZERO,
        taps.get(..half).unwrap_or(&[]),
        window,
        window,
        fold,
    );
    if N % 2 == 1 && fold == Fold::Sum {
        history_dot_strided::<S, T, W, N>(
            acc,
            history,
            taps.get(half..half + 1).unwrap_or(&[]),
            1,
            half,
            1,
        )
    } else {
        acc
    }
}

/// The position within a group of `M` inputs; the group's last input produces the output.
#[derive(Clone, Copy, Debug, Default)]
pub(crate) struct Phase<const M: usize> {
    count: usize,
}

impl<const M: usize> Phase<M> {
    /// A phase that has already counted `count` inputs of its group (0 ≤ count < M): the first
    /// group completes after M − count inputs.
    pub(crate) const fn counted(count: usize) -> Self {
        Phase { count }
    }

    /// Counts one input; `true` when it completes a group of `M`.
    #[inline(always)]
    pub(crate) fn tick(&mut self) -> bool {
        self.count += 1;
        if self.count >= M {
            self.count = 0;
            true
        } else {
            false
        }
    }

    /// How many outputs `len` further inputs produce from here.
    pub(crate) const fn outputs_for(&self, len: usize) -> usize {
        (self.count + len) / M
    }

    /// Inputs taken since the last output (0 ≤ · < M).
    pub(crate) const fn position(&self) -> usize {
        self.count
    }
}

/// Where the zero-padded tail of a finite signal lies for a structure that up-samples by `up`
/// and keeps every `down`-th up-sampled output: offsets in up-sampled samples counted from the
/// up-sampled position of the next input, `first`, `first + down`, … below `K − up` (K the tap
/// count). That is where the full convolution of the zero-stuffed signal ends —
/// `scipy.signal.upfirdn`'s output length, ⌊((n−1)·up + K − 1)/down⌋ + 1 outputs for n inputs.
/// The output at offset t sums the taps t + up, t + 2·up, … against the newest inputs.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Tail {
    pub(crate) first: usize,
    pub(crate) up: usize,
    pub(crate) down: core::num::NonZeroUsize,
}

impl Tail {
    /// How many outputs the tail of a signal filtered by `taps` taps holds.
    pub(crate) fn len(self, taps: usize) -> usize {
        let end = taps.saturating_sub(self.up);
        if end <= self.first {
            0
        } else {
            (end - self.first - 1) / self.down + 1
        }
    }

    /// Writes the tail's outputs to the front of `output`, `value(taps_from)` computing the one
    /// whose taps start at `taps_from` (its offset + `up`), after checking once that `output`
    /// holds them all. Returns how many were written.
    pub(crate) fn fill<Y>(
        self,
        taps: usize,
        output: &mut [Y],
        mut value: impl FnMut(usize) -> Y,
    ) -> Result<usize, Error> {
        let needed = self.len(taps);
        if output.len() < needed {
            return Err(Error::OutputTooShort {
                needed,
                found: output.len(),
            });
        }
        let mut from = self.first.saturating_add(self.up);
        for slot in output.iter_mut().take(needed) {
            *slot = value(from);
            from = from.saturating_add(self.down.get());
        }
        Ok(needed)
    }
}

/// The front of a block call's output buffer, filled in turn: what a structure that produces
/// several outputs per input hands each of them to.
pub(crate) struct Slots<'o, Y>(core::slice::IterMut<'o, Y>);

impl<Y> Slots<'_, Y> {
    /// Writes `y` to the next slot (the caller checked the room beforehand).
    #[inline(always)]
    pub(crate) fn put(&mut self, y: Y) {
        if let Some(slot) = self.0.next() {
            *slot = y;
        }
    }
}

/// Runs `feed` over `input`, each call writing its outputs in turn to the front of `output`
/// through the [`Slots`], after checking once that `output` holds the `needed` outputs. Returns
/// how many were written.
pub(crate) fn fill_block<S: Copy, Y>(
    input: &[S],
    output: &mut [Y],
    needed: usize,
    mut feed: impl FnMut(S, &mut Slots<'_, Y>),
) -> Result<usize, Error> {
    if output.len() < needed {
        return Err(Error::OutputTooShort {
            needed,
            found: output.len(),
        });
    }
    let mut slots = Slots(output.iter_mut());
    for &x in input {
        feed(x, &mut slots);
    }
    Ok(needed)
}

/// [`fill_block`] for a structure whose `push` gives at most one output per input.
pub(crate) fn decimate_block<S: Copy, Y>(
    input: &[S],
    output: &mut [Y],
    needed: usize,
    mut push: impl FnMut(S) -> Option<Y>,
) -> Result<usize, Error> {
    fill_block(input, output, needed, |x, slots| {
        if let Some(y) = push(x) {
            slots.put(y);
        }
    })
}

/// Runs `push` over `buffer` and writes each `Some` output to the front of the same buffer
/// (an output never overtakes the input it comes from). Returns how many were written.
pub(crate) fn decimate_in_place<S: Copy>(
    buffer: &mut [S],
    mut push: impl FnMut(S) -> Option<S>,
) -> usize {
    let mut written = 0;
    for i in 0..buffer.len() {
        let Some(&x) = buffer.get(i) else { break };
        if let Some(y) = push(x) {
            if let Some(slot) = buffer.get_mut(written) {
                *slot = y;
            }
            written += 1;
        }
    }
    written
}

/// Runs `push` over `input` into `output`, one output per input, after checking once that the
/// lengths are equal.
pub(crate) fn map_block<S: Copy, Y>(
    input: &[S],
    output: &mut [Y],
    push: impl FnMut(S) -> Y,
) -> Result<(), Error> {
    if input.len() != output.len() {
        return Err(Error::OutputLength {
            expected: input.len(),
            found: output.len(),
        });
    }
    for (y, v) in output.iter_mut().zip(input.iter().copied().map(push)) {
        *y = v;
    }
    Ok(())
}

/// `counter + event`, stopping at `u32::MAX`, without a branch: the carry of the addition
/// becomes an all-ones mask, so every sample costs the same on any core.
#[inline(always)]
pub(crate) fn count_event(counter: u32, event: bool) -> u32 {
    count_events(counter, u32::from(event))
}

/// `counter + events`, stopping at `u32::MAX`, without a branch (see [`count_event`]). Block
/// paths count a block's events in a local and add them once.
#[inline(always)]
pub(crate) fn count_events(counter: u32, events: u32) -> u32 {
    let (sum, carried) = counter.overflowing_add(events);
    // Opaque to the optimiser, which would otherwise select on the carry with a branch.
    sum | crate::num::fixed_point::opaque(0u32.wrapping_sub(u32::from(carried)))
}
