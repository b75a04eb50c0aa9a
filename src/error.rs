//! The one error type of the crate: configuration mistakes, reported once, at the call that
//! makes them.

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
    /// A passband edge outside (0, ½) cycles per sample, or one too narrow for the design.
    InvalidPassband,
    /// A frequency is outside its allowed range: band edges must lie strictly between 0 and half
    /// the sample rate, measured bands within 0..=fs/2, and the sample rate must be positive and
    /// finite.
    FrequencyOutOfRange,
    /// Band edges are not strictly increasing (a passband edge must lie below its stopband
    /// edge for a lowpass, a band's low edge below its high edge, bands in order).
    EdgesNotIncreasing,
    /// The band type needs an odd number of taps: an even-length symmetric filter has a forced
    /// zero at half the sample rate, so it cannot pass it (highpass, bandstop).
    #[non_exhaustive]
    OddLengthRequired {
        /// The (even) length that was asked for.
        found: usize,
    },
    /// Too few taps or points for the design.
    #[non_exhaustive]
    TooShort {
        /// The smallest length the design accepts.
        minimum: usize,
        /// The length that was passed.
        found: usize,
    },
    /// A Kaiser window's β is negative, not finite, or above
    /// [`MAX_KAISER_BETA`](crate::design::MAX_KAISER_BETA).
    KaiserBetaOutOfRange,
    /// An attenuation or ripple in dB is not a positive finite number (or an attenuation is
    /// above [`MAX_ATTENUATION_DB`](crate::design::MAX_ATTENUATION_DB)).
    InvalidDecibels,
    /// A transition width is not positive and finite, or is so narrow that the estimated
    /// length exceeds [`MAX_DESIGN_TAPS`](crate::design::MAX_DESIGN_TAPS).
    InvalidTransition,
    /// A Savitzky–Golay polynomial order is not below the window length, or is above
    /// [`MAX_POLYNOMIAL_ORDER`](crate::design::MAX_POLYNOMIAL_ORDER), or a derivative was asked of
    /// a polynomial of order 0.
    #[non_exhaustive]
    PolynomialOrder {
        /// The order that was asked for.
        order: usize,
        /// The window length.
        length: usize,
    },
    /// A band's desired gain is not finite or its weight is not a positive finite number.
    InvalidBandGain,
    /// An iterative design did not settle within its iteration cap (or its arithmetic broke
    /// down); the result is not returned. Try another length, weights or band edges.
    #[non_exhaustive]
    NoConvergence {
        /// Iterations run before giving up.
        iterations: u32,
    },
    /// A design measured against its spec still misses it after the allowed lengthening.
    #[non_exhaustive]
    SpecNotMet {
        /// The longest length tried.
        taps: usize,
    },
    /// A tap is not finite or lies outside the fixed-point format by more than one LSB.
    #[non_exhaustive]
    TapOutOfRange {
        /// Position of the first such tap.
        index: usize,
    },
    /// A filter was given no taps; it needs at least one.
    NoTaps,
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
                "the passband edge must lie strictly between 0 and 0.5 cycles per sample \
                 and leave room for the design",
            ),
            Error::FrequencyOutOfRange => f.write_str(
                "frequency out of range: band edges must lie strictly between 0 and half the \
                 sample rate, measured bands within 0..=fs/2, and the sample rate must be \
                 positive and finite",
            ),
            Error::EdgesNotIncreasing => f.write_str(
                "band edges must be strictly increasing (passband edge below stopband edge for \
                 a lowpass, low edge below high edge, bands in order)",
            ),
            Error::OddLengthRequired { found } => write!(
                f,
                "{found} taps requested, but this band type passes half the sample rate and so \
                 needs an odd number of taps"
            ),
            Error::TooShort { minimum, found } => write!(
                f,
                "{found} taps or points given, but this design needs at least {minimum}"
            ),
            Error::KaiserBetaOutOfRange => write!(
                f,
                "Kaiser beta must be finite and within 0..={}",
                crate::design::MAX_KAISER_BETA
            ),
            Error::InvalidDecibels => write!(
                f,
                "attenuation and ripple must be positive finite dB values (attenuation at most \
                 {} dB)",
                crate::design::MAX_ATTENUATION_DB
            ),
            Error::InvalidTransition => write!(
                f,
                "the transition width must be positive and finite and give at most {} taps",
                crate::design::MAX_DESIGN_TAPS
            ),
            Error::PolynomialOrder { order, length } => write!(
                f,
                "polynomial order {order} with a {length}-point window: the order must be below \
                 the window length and at most {}, and at least 1 for a derivative",
                crate::design::MAX_POLYNOMIAL_ORDER
            ),
            Error::InvalidBandGain => f.write_str(
                "each band needs a finite desired gain and a positive finite weight",
            ),
            Error::NoConvergence { iterations } => write!(
                f,
                "the design did not converge within {iterations} iterations: try another \
                 length, weights or band edges"
            ),
            Error::SpecNotMet { taps } => write!(
                f,
                "the design still misses its spec at {taps} taps: widen the transition band or \
                 relax the ripple or attenuation"
            ),
            Error::TapOutOfRange { index } => write!(
                f,
                "tap {index} is not finite or lies outside the fixed-point format's range"
            ),
            Error::NoTaps => f.write_str("a filter needs at least one tap; none were given"),
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
