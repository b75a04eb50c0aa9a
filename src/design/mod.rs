//! Filter design: from a spec (sample rate, band edges, ripple, attenuation) to taps, to
//! quantized taps, to the response those taps really have.
//!
//! ```text
//!  Spec ──► Kaiser estimate (β, length) ──► windowed sinc ──► float taps ──► quantize ──► Q15/Q31
//!    │                                      Parks–McClellan (std)  │                       │
//!    └──────────────────── measure: ripple, attenuation, −3 dB, DC gain ◄──────────────────┘
//! ```
//!
//! Everything is written once, generic over [`Real`]: `f32` on every target (`no_std`, no heap,
//! results in caller slices or [`heapless::Vec`]) and `f64` with the `std` feature. The `f32`
//! path takes starting values from micromath and refines them (see [`Real`]); it stays within
//! the tolerances each function documents of the `f64` path, which `tests/design.rs` checks.
//!
//! | file | holds |
//! |---|---|
//! | `error.rs` | [`DesignError`]: why a design could not be made |
//! | `window.rs` | [`Window`]: rectangular, triangular, Hann, Hamming, Blackman, Kaiser(β) |
//! | `kaiser.rs` | Kaiser's estimates: [`kaiser::beta_for_attenuation`], [`kaiser::length_for_transition`], [`kaiser::attenuation_for_length`] |
//! | `band.rs` | windowed-sinc [`Band`] designs: [`windowed_sinc`] |
//! | `spec.rs` | [`Spec`]: a band spec → a Kaiser design that meets it, and measurement against it |
//! | `equiripple.rs` | Parks–McClellan (`equiripple`, `std` only) |
//! | `search.rs` | the shortest equiripple design that meets a spec, before and after quantization (`std` only) |
//! | `savitzky_golay.rs` | [`savitzky_golay`] (any derivative, any spacing), [`savitzky_golay_smoother`], [`savitzky_golay_slope`] |
//! | `moving_average.rs` | [`moving_average`] (boxcar) |
//! | `quantize.rs` | [`quantize`]: float taps → Q15/Q31/`fixed` with exact DC gain |
//! | `response.rs` | [`response_at`], [`group_delay_at`], [`gain_range`], [`half_power_frequency`], [`dc_gain`] |
//!
//! **Frequencies, one convention:** every frequency a function here takes or returns is in Hz,
//! with the sample rate in Hz beside it (`sample_rate_hz`, the field of [`Spec`]): the numbers a
//! firmware configuration holds. Band edges, transition widths, the frequency of a response or a
//! group delay, the half-power point and the frequencies a [`GainRange`] reports all follow it, and
//! so do the CIC helpers of the filter module ([`cic_magnitude`](crate::filter::cic_magnitude),
//! [`cic_compensator`](crate::filter::cic_compensator)), whose one rate is the CIC's input rate.
//! Only the ratio to the sample rate matters: scaling every frequency and the rate together
//! gives the same filter to rounding (`tests/design.rs`,
//! `every_frequency_argument_scales_with_the_sample_rate`). Savitzky–Golay takes the sample
//! spacing (1/rate, in seconds) instead, the unit its derivatives are per.
//!
//! **Caution:** a designed filter is only as right as its spec. Measure the quantized taps
//! ([`Spec::measure`]) before they go into firmware; the design functions do not know your
//! system.

// `!(a < b)` is how a NaN fails a check: every range check here is written that way on purpose.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

mod band;
#[cfg(feature = "std")]
mod equiripple;
mod error;
pub mod kaiser;
mod moving_average;
mod quantize;
mod real;
mod response;
mod savitzky_golay;
#[cfg(feature = "std")]
mod search;
mod spec;
mod window;

pub use band::{Band, windowed_sinc};
#[cfg(feature = "std")]
pub use equiripple::{
    EQUIRIPPLE_GRID_DENSITY, EQUIRIPPLE_MAX_ITERATIONS, Equiripple, EquirippleBand,
    MAX_EQUIRIPPLE_TAPS, equiripple, equiripple_with,
};
pub use error::DesignError;
pub use moving_average::moving_average;
pub use quantize::{Quantized, quantize};
pub use real::Real;
pub use response::{
    Complex, GainRange, dc_gain, gain_range, group_delay_at, half_power_frequency, response_at,
};
pub use savitzky_golay::{savitzky_golay, savitzky_golay_slope, savitzky_golay_smoother};
#[cfg(feature = "std")]
pub use search::{EquirippleDesign, FixedEquiripple};
pub use spec::{FixedDesign, KaiserDesign, Measured, QUANTIZATION_MARGINS_DB, Shape, Spec};
pub use window::Window;

/// The largest Kaiser β accepted: I₀(40) ≈ 1.5·10¹⁶ keeps every window value finite in `f32`,
/// and β = 40 already corresponds to about 370 dB of stopband attenuation.
pub const MAX_KAISER_BETA: f64 = 40.0;

/// The largest attenuation a spec may ask for, in dB.
pub const MAX_ATTENUATION_DB: f64 = 300.0;

/// The longest filter the length estimates and designs produce (integers stay exact in `f32`
/// far beyond it).
pub const MAX_DESIGN_TAPS: usize = 65_536;

/// The highest Savitzky–Golay polynomial order accepted.
pub const MAX_POLYNOMIAL_ORDER: usize = 10;

/// Checks a sample rate and returns half of it.
fn nyquist<R: Real>(sample_rate_hz: R) -> Result<R, DesignError> {
    if sample_rate_hz.is_finite() && sample_rate_hz > R::ZERO {
        Ok(sample_rate_hz * R::from_f64(0.5))
    } else {
        Err(DesignError::FrequencyOutOfRange)
    }
}

/// Checks that `f` lies strictly inside (0, fs/2).
fn inside<R: Real>(f: R, nyquist: R) -> Result<R, DesignError> {
    if f.is_finite() && f > R::ZERO && f < nyquist {
        Ok(f)
    } else {
        Err(DesignError::FrequencyOutOfRange)
    }
}
