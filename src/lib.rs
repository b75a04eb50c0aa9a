//! # tapline
//!
//! FIR filtering and finite convolution for microcontroller sensor firmware: `no_std`, no heap,
//! no panics on the streaming paths, and fixed-point arithmetic that is specified down to the bit.
//!
//! The data path is the same for every filter:
//!
//! ```text
//!  sample ──► Ring<S, N> (the last N samples) ──► kernel: Σ h[k]·x[n−k] in a full-precision
//!             two contiguous slices, oldest→newest      accumulator (MulAcc::Acc)
//!                                                        │
//!                                    one rounding step ◄─┘ then saturation ──► y[n]
//! ```
//!
//! * [`ring`] — the one const-generic history buffer.
//! * [`num`] — the one numeric abstraction ([`MulAcc`]) every kernel is generic over: Q15, Q31
//!   and the generic `fixed` formats, raw `i16`/`i32`, `f32`, `f64`.
//! * [`kernel`] — dot products over contiguous slices.
//! * [`filter`] — streaming filters ([`Fir`]), per sample or per block.
//! * [`mod@convolve`] — finite convolution and cross-correlation of two slices.
//! * [`design`] — from a spec to taps (windows, Kaiser, windowed sinc, Parks–McClellan with
//!   `std`, Savitzky–Golay), quantization to Q15/Q31/`fixed`, the searches for the shortest
//!   design that meets a spec after quantization, and the one verification against a spec.
//! * [`headroom`] — the exact headroom analysis and verdict, and the error bounds (fixed point,
//!   and `f32` by Higham's γ_N) against float64.
//! * `tool` (feature `cli` only) — the host tool's internals: input readers, one job per
//!   command, report and file output. The `tapline` binary is a thin `main` over it.
//!
//! ## Numeric contract
//!
//! For fixed-point types a sample `x` and a tap `h` are two's-complement integers (their raw
//! bits). The product `h·x` is exact; products are summed exactly in the accumulator (64 bits
//! for both 16- and 32-bit samples); the sum is shifted right by the tap format's fractional bits
//! with **one** rounding step ([`Rounding`], round-half-up by default) and then **saturated** to
//! the sample type. It never wraps. The output therefore has the sample's format: a 4.12 sample
//! filtered with Q15 taps gives a 4.12 output. Constructors reject tap sets for which any input
//! sequence could overflow the accumulator ([`Error::AccumulatorOverflow`]), so the exact sum is
//! always what gets rounded.
//!
//! Floating-point types accumulate in their own precision (or in `f64` for `f32` samples with
//! `f64` taps), in tap order, without fused multiply-add; NaN and infinities propagate.
//!
//! ```
//! use tapline::Fir;
//! use fixed::types::I1F15;
//!
//! // A 4-tap moving average in Q15: every tap 0.25.
//! static TAPS: [I1F15; 4] = [I1F15::from_bits(8192); 4];
//! let mut fir = Fir::new(&TAPS)?;
//! let mut out = [I1F15::ZERO; 6];
//! fir.process(&[I1F15::from_num(0.5); 6], &mut out)?;
//! assert_eq!(out[3], I1F15::from_num(0.5)); // settled after N−1 samples
//! assert_eq!(fir.saturations(), 0);
//! # Ok::<(), tapline::Error>(())
//! ```
#![no_std]
#![warn(missing_docs)]
// Only `kernel::arm` may opt out (inline assembly with a tested safe twin).
#![deny(unsafe_code)]
#![cfg_attr(
    not(test),
    warn(
        clippy::unwrap_used,
        clippy::expect_used,
        clippy::indexing_slicing,
        clippy::panic
    )
)]

// The README's examples run as doctests, so the README cannot drift from the API.
#[cfg(doctest)]
#[doc = include_str!("../README.md")]
struct ReadmeExamples;

// `std` only adds the f64 design path and Parks–McClellan; everything else is core-only.
#[cfg(feature = "std")]
extern crate std;

pub mod convolve;
pub mod design;
mod error;
pub mod filter;
pub mod headroom;
pub mod kernel;
pub mod num;
pub mod ring;
// The host tool's internals (its module page says what they are): not for firmware.
#[cfg(feature = "cli")]
pub mod tool;

pub use convolve::{Span, convolve, convolve_with_rounding, correlate, correlate_with_rounding};
pub use error::Error;
pub use filter::{DecimatorUpTo, Fir, FirUpTo, GroupDelay, MultiChannelFirUpTo};

pub use filter::{
    CicDecimator, Decimator, HalfBandDecimator, Interpolator, LinearPhaseFir, MovingAverage,
    MultiChannelFir, Resampler,
};
pub use num::{MulAcc, Rounding, Sample};
pub use ring::Ring;
