//! The error of a filter's configuration: what constructors and block calls return, reported
//! once, at the call that makes the mistake. Designing taps has its own error,
//! `design::DesignError`; the host tool has its own failure type.

use core::fmt;

/// A configuration mistake: a buffer of the wrong length, an empty input, or a tap set whose
/// accumulator could overflow.
///
/// The streaming paths ([`Fir::push`](crate::Fir::push)) never return errors; block calls check
/// their buffer lengths once per call.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum Error {
    /// An output buffer does not have the length the operation produces.
    OutputLength {
        /// The length the operation needs.
        expected: usize,
        /// The length that was passed.
        found: usize,
    },
    /// A convolution or correlation operand is empty; both need at least one element.
    EmptyInput,
    /// Some input sequence in the sample type's full range could drive the accumulator past its
    /// width with these taps. Use fewer or smaller taps (Σ|h| bounds the growth), or a wider
    /// sample/accumulator type.
    AccumulatorOverflow,
    /// An input range is empty (min > max) or an ADC description is impossible (0 bits, more
    /// bits than the sample word, or a word wider than 32 bits).
    InvalidRange,
    /// Two tap tables that must describe the same filter (ideal and quantized) differ in length.
    TapCountMismatch {
        /// Length of the ideal (float) taps.
        ideal: usize,
        /// Length of the quantized taps.
        quantized: usize,
    },
    /// An output buffer is shorter than what the call produces (decimators, interpolators).
    OutputTooShort {
        /// The number of outputs the call produces.
        needed: usize,
        /// The length that was passed.
        found: usize,
    },
    /// A decimator's start phase (the full-rate output index, modulo the factor, that it keeps
    /// first) is not below its decimation factor.
    StartPhaseTooLarge {
        /// The start phase asked for.
        phase: usize,
        /// The decimation factor M; a start phase is 0 to M − 1.
        factor: usize,
    },
    /// Taps that a folded (linear-phase) filter needs symmetric or antisymmetric are neither.
    NotLinearPhase,
    /// Taps that a half-band filter needs in half-band form are not: an odd count, with every
    /// tap an even, non-zero distance from the centre equal to zero.
    NotHalfBand,
    /// An interleaved buffer does not hold a whole number of frames (one sample per channel).
    PartialFrame {
        /// The buffer's length.
        len: usize,
        /// The channel count, of which the length must be a multiple.
        channels: usize,
    },
    /// An output shift larger than the register it shifts.
    ShiftTooLarge {
        /// The shift asked for.
        shift: u32,
        /// The largest shift allowed.
        max: u32,
    },
    /// A passband edge outside (0, half the sample rate) — for a CIC compensator, the CIC's
    /// output rate — or one too narrow for the design, or a sample rate that is not positive
    /// and finite.
    InvalidPassband,
    /// A filter was given no taps; it needs at least one.
    NoTaps,
    /// A rate-change factor of 0 (a resampler's up factor L or down factor M); each must be
    /// at least 1.
    ZeroFactor,
    /// More taps than the filter's capacity (its history length, the const `N`).
    TooManyTaps {
        /// The most taps the filter holds.
        capacity: usize,
        /// The number of taps passed.
        found: usize,
    },
    /// Q15 taps checked against an input range at run time can take the exact sum outside a
    /// 32-bit accumulator: `above` is how far the largest reachable sum lies beyond `i32::MAX`,
    /// `below` how far the smallest lies beneath `i32::MIN` (each 0 when that bound holds, and
    /// stopping at `u64::MAX`), in accumulator units (Q30 for Q15 taps and samples).
    Acc32Overflow {
        /// Excess of the largest reachable sum over `i32::MAX`, or 0.
        above: u64,
        /// Shortfall of the smallest reachable sum under `i32::MIN`, or 0.
        below: u64,
    },
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            Error::OutputLength { expected, found } => write!(
                f,
                "output buffer has {found} elements but the operation produces {expected}"
            ),
            Error::EmptyInput => f.write_str(
                "convolution input is empty: both the signal and the kernel need at least one element",
            ),
            Error::AccumulatorOverflow => f.write_str(
                "these taps can overflow the accumulator for some full-scale input: \
                 reduce the sum of |taps| or use a wider format",
            ),
            Error::InvalidRange => f.write_str(
                "invalid input range: min must not exceed max, and an ADC needs 1 to 32 bits \
                 within a sample word of at most 32 bits",
            ),
            Error::TapCountMismatch { ideal, quantized } => write!(
                f,
                "the ideal taps have {ideal} entries but the quantized taps {quantized}: \
                 they must describe the same filter"
            ),
            Error::OutputTooShort { needed, found } => write!(
                f,
                "output buffer has {found} elements but the call produces {needed}"
            ),
            Error::StartPhaseTooLarge { phase, factor } => write!(
                f,
                "start phase {phase} is not below the decimation factor {factor}: the first \
                 output kept must be one of the full-rate outputs 0 to {}",
                factor.saturating_sub(1)
            ),
            Error::NotLinearPhase => f.write_str(
                "the taps are neither symmetric nor antisymmetric, so they cannot be folded",
            ),
            Error::NotHalfBand => f.write_str(
                "the taps are not half-band: the count must be odd and every tap an even, \
                 non-zero distance from the centre must be zero",
            ),
            Error::PartialFrame { len, channels } => write!(
                f,
                "interleaved buffer of {len} samples is not a whole number of \
                 {channels}-channel frames"
            ),
            Error::ShiftTooLarge { shift, max } => write!(
                f,
                "output shift of {shift} bits is larger than the largest allowed, {max}"
            ),
            Error::InvalidPassband => f.write_str(
                "the passband edge must lie strictly between 0 and half the (output) sample \
                 rate and leave room for the design, and the sample rate must be positive and \
                 finite",
            ),
            Error::NoTaps => f.write_str("a filter needs at least one tap; none were given"),
            Error::ZeroFactor => {
                f.write_str("a rate-change factor of 0: up and down factors must be at least 1")
            }
            Error::TooManyTaps { capacity, found } => write!(
                f,
                "{found} taps given, but the filter holds at most {capacity}"
            ),
            Error::Acc32Overflow { above, below } => write!(
                f,
                "these taps can take the sum outside a 32-bit accumulator for inputs in the \
                 checked range: the largest sum exceeds i32::MAX by {above} and the smallest \
                 falls below i32::MIN by {below}; narrow the input range, reduce the sum of \
                 |taps|, or use the default 64-bit accumulator"
            ),
        }
    }
}

impl core::error::Error for Error {}
