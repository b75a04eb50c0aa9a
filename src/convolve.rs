//! Finite convolution and cross-correlation of two slices into a caller's buffer.
//!
//! Lengths follow the usual three spans (the same conventions as `numpy.convolve` /
//! `numpy.correlate`), with L = `signal.len()`, K = `kernel.len()`:
//!
//! | [`Span`] | output length | output\[i\] is full\[…\] |
//! |---|---|---|
//! | `Full` | L + K − 1 | i |
//! | `Same` | max(L, K) | i + ⌊(min(L, K) − 1)/2⌋; for a correlation with K > L: i + ⌊L/2⌋ |
//! | `Valid` | max(L, K) − min(L, K) + 1 | i + min(L, K) − 1 |
//!
//! (The `Same` exception mirrors numpy, which correlates a longer kernel by swapping the
//! operands and reversing the result, so the centred window is mirrored too.)
//!
//! Numeric behaviour is that of [`Fir`](crate::Fir): exact accumulation for fixed point, one
//! rounding step, saturation (counted in the returned value), float in ascending kernel index.
//! [`convolve`] and [`correlate`] take every sample type and round fixed point half up (the
//! default of every filter, [`Rounding::HalfUp`]); [`convolve_with_rounding`] and
//! [`correlate_with_rounding`] choose the rounding and exist for fixed point only, since a
//! float result has no rounding step to choose.

use crate::Error;
use crate::kernel::dot;
use crate::num::{DefaultAcc, FixedPoint, MulAcc, Rounding, Sample};

/// Which part of the full result to produce.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Span {
    /// Every output where the operands overlap at all: L + K − 1 values.
    Full,
    /// The central max(L, K) values of the full result.
    Same,
    /// Only outputs where the shorter operand overlaps the longer one completely.
    Valid,
}

impl Span {
    /// For [`convolve`] of a signal of length `l` with a kernel of length `k` (both ≥ 1): the
    /// output length and the index in the full result of the first output. For an empty
    /// operand the length is 0 (the operations themselves return [`Error::EmptyInput`]);
    /// lengths beyond `usize::MAX` saturate. Never panics.
    ///
    /// ```
    /// use tapline::Span;
    /// assert_eq!(Span::Same.layout(5, 4), (5, 1));
    /// assert_eq!(Span::Valid.layout(3, 5), (3, 2));
    /// ```
    #[must_use]
    pub const fn layout(self, l: usize, k: usize) -> (usize, usize) {
        let (short, long) = if l < k { (l, k) } else { (k, l) };
        if short == 0 {
            return (0, 0);
        }
        match self {
            Span::Full => (l.saturating_add(k) - 1, 0),
            Span::Same => (long, (short - 1) / 2),
            Span::Valid => (long - short + 1, short - 1),
        }
    }

    /// For [`correlate`]: as [`layout`](Span::layout), except that `Same` with a kernel longer
    /// than the signal starts at ⌊l/2⌋ (numpy's mirrored window).
    ///
    /// ```
    /// use tapline::Span;
    /// assert_eq!(Span::Same.correlation_layout(4, 6), (6, 2));
    /// assert_eq!(Span::Same.correlation_layout(6, 4), Span::Same.layout(6, 4));
    /// ```
    #[must_use]
    pub const fn correlation_layout(self, l: usize, k: usize) -> (usize, usize) {
        match self {
            Span::Same if k > l => (k, l / 2),
            _ => self.layout(l, k),
        }
    }
}

/// Checks the operands, the output length against `layout`, and that `kernel` cannot overflow
/// the accumulator; returns the index of the first full output.
fn check<S: MulAcc<T>, T: Sample>(
    signal: &[S],
    kernel: &[T],
    out: &[S],
    layout: fn(Span, usize, usize) -> (usize, usize),
    span: Span,
) -> Result<usize, Error> {
    if signal.is_empty() || kernel.is_empty() {
        return Err(Error::EmptyInput);
    }
    let (len, first) = layout(span, signal.len(), kernel.len());
    if out.len() != len {
        return Err(Error::OutputLength {
            expected: len,
            found: out.len(),
        });
    }
    if !S::accumulator_fits(kernel) {
        return Err(Error::AccumulatorOverflow);
    }
    Ok(first)
}

/// Writes `out[i]` = the output step of `sum(first + i)` and returns how many saturated.
fn finish_each<S: MulAcc<T>, T: Sample>(
    out: &mut [S],
    first: usize,
    rounding: Rounding,
    sum: impl Fn(usize) -> S::Acc,
) -> usize {
    let mut saturated = 0;
    for (n, y) in (first..).zip(out.iter_mut()) {
        let (v, sat) = S::finish(sum(n), rounding);
        *y = v;
        saturated += usize::from(sat);
    }
    saturated
}

/// Writes the requested span of `full[n] = Σ_k kernel[k] · signal[n − k]` into `out` and
/// returns how many outputs saturated.
///
/// **Accumulator / rounding / saturation:** as [`MulAcc`] for `S` and `T`: exact sums for fixed
/// point, then one [`Rounding::HalfUp`] step (ties toward +∞; choose another mode with
/// [`convolve_with_rounding`]) and a clamp to the range of `S`. **Float:** ascending kernel
/// index, no FMA, no rounding step; NaN and ∞ propagate.
///
/// # Errors
/// * [`Error::EmptyInput`] if either operand is empty;
/// * [`Error::OutputLength`] if `out` is not the length the span produces;
/// * [`Error::AccumulatorOverflow`] if `kernel` could overflow the accumulator for some signal
///   in the full range of `S`.
///
/// ```
/// use tapline::{convolve, Span};
/// let mut out = [0.0f64; 4];
/// convolve(&[1.0, 2.0, 3.0], &[0.0, 1.0], &mut out, Span::Full)?;
/// assert_eq!(out, [0.0, 1.0, 2.0, 3.0]);
///
/// // Q15: (-1.0) * (-1.0) = +1.0 does not fit and saturates to 1 − 2^-15.
/// let mut q = [0i16; 1];
/// let saturated = convolve(&[i16::MIN], &[i16::MIN], &mut q, Span::Full)?;
/// assert_eq!((q[0], saturated), (i16::MAX, 1));
/// // Half an LSB rounds up: 1 · 0.5 in Q15 is 0.5 LSB → 1.
/// convolve(&[1i16], &[16384i16], &mut q, Span::Full)?;
/// assert_eq!(q[0], 1);
/// # Ok::<(), tapline::Error>(())
/// ```
pub fn convolve<S: MulAcc<T>, T: Sample>(
    signal: &[S],
    kernel: &[T],
    out: &mut [S],
    span: Span,
) -> Result<usize, Error> {
    finite(signal, kernel, out, span, Rounding::HalfUp, Op::Convolve)
}

/// [`convolve`] with the output step's rounding mode chosen: fixed point only.
///
/// **Rounding:** `rounding` applies once per output, to the exact sum ÷ 2^F (F = the tap
/// format's fractional bits). **Saturation / errors:** as [`convolve`].
///
/// ```
/// use tapline::{convolve_with_rounding, Rounding, Span};
/// let mut q = [0i16; 1];
/// // 1 · 0.5 in Q15 is exactly half an LSB: truncation drops it, half-up keeps it.
/// convolve_with_rounding(&[1i16], &[16384i16], &mut q, Span::Full, Rounding::Truncate)?;
/// assert_eq!(q[0], 0);
/// // Full scale still saturates, whatever the rounding.
/// let n = convolve_with_rounding(&[i16::MIN], &[i16::MIN], &mut q, Span::Full, Rounding::HalfEven)?;
/// assert_eq!((q[0], n), (i16::MAX, 1));
/// # Ok::<(), tapline::Error>(())
/// ```
///
/// Floats have no rounding step to choose, so they cannot call it:
///
/// ```compile_fail
/// use tapline::{convolve_with_rounding, Rounding, Span};
/// let mut out = [0.0f32; 2];
/// convolve_with_rounding(&[1.0f32], &[1.0f32, 2.0], &mut out, Span::Full, Rounding::HalfUp);
/// ```
pub fn convolve_with_rounding<S: MulAcc<T> + FixedPoint, T: Sample>(
    signal: &[S],
    kernel: &[T],
    out: &mut [S],
    span: Span,
    rounding: Rounding,
) -> Result<usize, Error> {
    finite(signal, kernel, out, span, rounding, Op::Convolve)
}

/// Writes the requested span of the cross-correlation
/// `full[n] = Σ_k kernel[k] · signal[n + k − (K − 1)]` into `out` (the convolution of `signal`
/// with `kernel` reversed, as `numpy.correlate` defines it for real data) and returns how many
/// outputs saturated. With [`Span::Valid`] and K ≤ L this is Σ_k kernel\[k\]·signal\[i + k\]:
/// sliding the kernel along the signal, e.g. to find a known pulse shape.
///
/// Numeric behaviour (fixed point rounded [`Rounding::HalfUp`]; see
/// [`correlate_with_rounding`]) and errors as [`convolve`].
///
/// ```
/// use tapline::{correlate, Span};
/// let mut out = [0i32; 3];
/// // Find the pulse [1, 2] (Q31 ½ and 1−2^-31… kept small here) in a signal: peak at index 1.
/// let pulse = [1 << 29, 1 << 30];
/// correlate(&[0, 1 << 20, 2 << 20, 0], &pulse, &mut out, Span::Valid)?;
/// assert!(out[1] > out[0] && out[1] > out[2]);
/// // Floats need no rounding argument either.
/// let mut f = [0.0f32; 2];
/// correlate(&[1.0f32, 2.0], &[1.0f32], &mut f, Span::Full)?;
/// assert_eq!(f, [1.0, 2.0]);
/// # Ok::<(), tapline::Error>(())
/// ```
pub fn correlate<S: MulAcc<T>, T: Sample>(
    signal: &[S],
    kernel: &[T],
    out: &mut [S],
    span: Span,
) -> Result<usize, Error> {
    finite(signal, kernel, out, span, Rounding::HalfUp, Op::Correlate)
}

/// [`correlate`] with the output step's rounding mode chosen: fixed point only (as
/// [`convolve_with_rounding`]).
///
/// ```
/// use tapline::{correlate_with_rounding, Rounding, Span};
/// let mut q = [0i16; 1];
/// // −0.5 LSB: half-up gives 0, truncation (toward −∞) gives −1.
/// correlate_with_rounding(&[-1i16], &[16384i16], &mut q, Span::Full, Rounding::Truncate)?;
/// assert_eq!(q[0], -1);
/// correlate_with_rounding(&[i16::MIN], &[i16::MIN], &mut q, Span::Full, Rounding::HalfUp)?;
/// assert_eq!(q[0], i16::MAX);
/// # Ok::<(), tapline::Error>(())
/// ```
///
/// ```compile_fail
/// use tapline::{correlate_with_rounding, Rounding, Span};
/// let mut out = [0.0f64; 1];
/// correlate_with_rounding(&[1.0f64], &[1.0f64], &mut out, Span::Full, Rounding::Truncate);
/// ```
pub fn correlate_with_rounding<S: MulAcc<T> + FixedPoint, T: Sample>(
    signal: &[S],
    kernel: &[T],
    out: &mut [S],
    span: Span,
    rounding: Rounding,
) -> Result<usize, Error> {
    finite(signal, kernel, out, span, rounding, Op::Correlate)
}

/// Which of the two operations [`finite`] computes.
#[derive(Clone, Copy)]
enum Op {
    Convolve,
    Correlate,
}

/// Convolution or correlation with a rounding mode; floats ignore it (their `finish` has no
/// rounding step).
fn finite<S: MulAcc<T>, T: Sample>(
    signal: &[S],
    kernel: &[T],
    out: &mut [S],
    span: Span,
    rounding: Rounding,
    op: Op,
) -> Result<usize, Error> {
    let layout = match op {
        Op::Convolve => Span::layout,
        Op::Correlate => Span::correlation_layout,
    };
    let first = check(signal, kernel, out, layout, span)?;
    let (l, k) = (signal.len(), kernel.len());
    Ok(match op {
        Op::Convolve => finish_each(out, first, rounding, |n| {
            // Kernel indices that meet a signal sample: max(0, n−L+1) ..= min(n, K−1).
            let k_lo = (n + 1).saturating_sub(l);
            let k_hi = n.min(k - 1);
            let taps = kernel.get(k_lo..=k_hi).unwrap_or(&[]);
            let xs = signal.get(n - k_hi..=n - k_lo).unwrap_or(&[]);
            // The dispatched sum (`kernel::Kernels`): the target's kernel where there is one.
            S::dot_reversed(S::ACC_ZERO, taps, xs)
        }),
        Op::Correlate => finish_each(out, first, rounding, |n| {
            // Kernel indices with a signal sample: max(0, K−1−n) ..= min(K−1, L+K−2−n).
            let k_lo = (k - 1).saturating_sub(n);
            let k_hi = (k - 1).min(l + k - 2 - n);
            let taps = kernel.get(k_lo..=k_hi).unwrap_or(&[]);
            let start = n + k_lo + 1 - k;
            let xs = signal.get(start..).unwrap_or(&[]);
            dot::<S, T, DefaultAcc>(S::ACC_ZERO, taps, xs)
        }),
    })
}
