//! The error of a design: a spec, band, window or length that cannot be designed, a design
//! that does not settle or does not meet its spec, taps that do not fit a format — and the
//! filter configuration cases a design can run into ([`DesignError::Filter`]).

use crate::Error;
use core::fmt;

/// Why a design (a window, a band, a spec, an equiripple exchange, a quantization) could not be
/// made. Firmware that only filters never sees it: filters return [`Error`].
///
/// ```
/// use tapline::design::{DesignError, Window};
/// let mut w = [0.0f32; 8];
/// // Edge case: a negative Kaiser β is refused.
/// assert_eq!(Window::Kaiser { beta: -1.0 }.fill(&mut w), Err(DesignError::KaiserBetaOutOfRange));
/// // A configuration error of the filter layer converts, so `?` works across both.
/// let e: DesignError = tapline::Error::InvalidRange.into();
/// assert_eq!(e, DesignError::Filter(tapline::Error::InvalidRange));
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum DesignError {
    /// A filter configuration case a design can hit: a result buffer of the wrong size
    /// ([`Error::OutputLength`]), tap tables of different lengths
    /// ([`Error::TapCountMismatch`]).
    Filter(Error),
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
    /// [`MAX_KAISER_BETA`](super::MAX_KAISER_BETA).
    KaiserBetaOutOfRange,
    /// An attenuation or ripple in dB is not a positive finite number (or an attenuation is
    /// above [`MAX_ATTENUATION_DB`](super::MAX_ATTENUATION_DB)).
    InvalidDecibels,
    /// A transition width is not positive and finite, or is so narrow that the estimated
    /// length exceeds [`MAX_DESIGN_TAPS`](super::MAX_DESIGN_TAPS).
    InvalidTransition,
    /// A Savitzky–Golay polynomial order is not below the window length, or is above
    /// [`MAX_POLYNOMIAL_ORDER`](super::MAX_POLYNOMIAL_ORDER).
    #[non_exhaustive]
    PolynomialOrder {
        /// The order that was asked for.
        order: usize,
        /// The window length.
        length: usize,
    },
    /// A Savitzky–Golay derivative above the polynomial order: the fitted polynomial's
    /// higher derivatives are identically 0.
    #[non_exhaustive]
    DerivativeOrder {
        /// The derivative that was asked for.
        derivative: usize,
        /// The polynomial order.
        order: usize,
    },
    /// A sample spacing is not positive and finite, or so small or large that the derivative
    /// scale (m·spacing)^−d leaves the float type.
    InvalidSpacing,
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
    /// A tap is not finite.
    #[non_exhaustive]
    TapOutOfRange {
        /// Position of the first such tap.
        index: usize,
    },
    /// A finite tap lies beyond the fixed-point format's range by more than one LSB: the
    /// float design's taps are larger than the format can hold (an overshooting design, or
    /// taps scaled for a gain above 1).
    #[non_exhaustive]
    TapBeyondFormat {
        /// Position of the largest tap (by magnitude).
        index: usize,
        /// The number of taps.
        taps: usize,
        /// The largest tap's magnitude in the format's LSBs, rounded up.
        lsb: u64,
        /// The format's largest magnitude in LSBs (2^F for Q15/Q31).
        limit_lsb: u64,
    },
}

impl From<Error> for DesignError {
    fn from(e: Error) -> DesignError {
        DesignError::Filter(e)
    }
}

impl fmt::Display for DesignError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            DesignError::Filter(e) => fmt::Display::fmt(&e, f),
            DesignError::FrequencyOutOfRange => f.write_str(
                "frequency out of range: band edges must lie strictly between 0 and half the \
                 sample rate, measured bands within 0..=fs/2, and the sample rate must be \
                 positive and finite",
            ),
            DesignError::EdgesNotIncreasing => f.write_str(
                "band edges must be strictly increasing (passband edge below stopband edge for \
                 a lowpass, low edge below high edge, bands in order)",
            ),
            DesignError::OddLengthRequired { found } => write!(
                f,
                "{found} taps requested, but this band type passes half the sample rate and so \
                 needs an odd number of taps"
            ),
            DesignError::TooShort { minimum, found } => write!(
                f,
                "{found} taps or points given, but this design needs at least {minimum}"
            ),
            DesignError::KaiserBetaOutOfRange => write!(
                f,
                "Kaiser beta must be finite and within 0..={}",
                super::MAX_KAISER_BETA
            ),
            DesignError::InvalidDecibels => write!(
                f,
                "attenuation and ripple must be positive finite dB values (attenuation at most \
                 {} dB)",
                super::MAX_ATTENUATION_DB
            ),
            DesignError::InvalidTransition => write!(
                f,
                "the transition width must be positive and finite and give at most {} taps",
                super::MAX_DESIGN_TAPS
            ),
            DesignError::PolynomialOrder { order, length } => write!(
                f,
                "polynomial order {order} with a {length}-point window: the order must be below \
                 the window length and at most {}",
                super::MAX_POLYNOMIAL_ORDER
            ),
            DesignError::DerivativeOrder { derivative, order } => write!(
                f,
                "derivative {derivative} of a polynomial of order {order}: the derivative must \
                 be at most the order"
            ),
            DesignError::InvalidSpacing => f.write_str(
                "the sample spacing must be positive and finite, and not so extreme that the \
                 derivative scale overflows or vanishes",
            ),
            DesignError::InvalidBandGain => {
                f.write_str("each band needs a finite desired gain and a positive finite weight")
            }
            DesignError::NoConvergence { iterations } => write!(
                f,
                "the design did not converge within {iterations} iterations: try another \
                 length, weights or band edges"
            ),
            DesignError::SpecNotMet { taps } => write!(
                f,
                "the design still misses its spec at {taps} taps: widen the transition band or \
                 relax the ripple or attenuation"
            ),
            DesignError::TapOutOfRange { index } => write!(f, "tap {index} is not finite"),
            DesignError::TapBeyondFormat {
                index,
                taps,
                lsb,
                limit_lsb,
            } => write!(
                f,
                "the float design's largest tap, tap {index} of {taps}, is {lsb} LSB, beyond the \
                 fixed-point format's range of {limit_lsb} LSB (|tap| ≤ 1): the design overshoots \
                 somewhere (its gain exceeds what the format can hold), so no taps of this \
                 length fit; choose another length or let the search choose it"
            ),
        }
    }
}

impl core::error::Error for DesignError {}
