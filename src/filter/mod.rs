//! Streaming filters: a [`Ring`](crate::Ring) of history, a kernel, and the output step.

mod fir;
mod group_delay;

// The structures built from the same ring, kernels and output step.
mod cic;
mod decimator;
mod half_band;
mod interpolator;
mod linear_phase;
mod moving_average;
mod multichannel;
mod resampler;
mod shared;
mod taps;

pub use fir::{Fir, FirUpTo};
pub use group_delay::GroupDelay;
pub use taps::TapTable;
// Symmetry is tap-set analysis (headroom), kept at this path too, where filters use it.
pub use crate::headroom::Symmetry;

pub use cic::{
    CicDecimator, CicRegister, cic_compensator, cic_growth_bits, cic_magnitude, cic_register_bits,
};
pub use decimator::{Decimator, DecimatorUpTo};
pub use half_band::HalfBandDecimator;
pub use interpolator::Interpolator;
pub use linear_phase::LinearPhaseFir;
pub use moving_average::MovingAverage;
pub use multichannel::{MultiChannelFir, MultiChannelFirUpTo};
pub use resampler::Resampler;
