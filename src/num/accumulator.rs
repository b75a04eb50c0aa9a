//! Accumulator widths: the markers that select among a sample type's `MulAcc` impls.

use super::sealed::Sealed;

/// The sample type's own accumulator: `i64` for 16- and 32-bit fixed point, the float type's
/// own precision (or `f64` for `f32` samples with `f64` taps). Exact for fixed point whenever
/// [`MulAcc::accumulator_fits`](super::MulAcc::accumulator_fits) accepts the taps, which
/// constructors check at run time.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct DefaultAcc;

/// A 128-bit accumulator for 32-bit fixed-point samples: exact for any tap set that fits in
/// memory, so Q31 tables with Σ|h| ≥ 2 (high-gain or interpolating filters) run without any
/// pre-shift and without extra rounding error. Costs about twice the additions of `i64` on a
/// 32-bit core.
///
/// ```
/// use tapline::{Fir, num::Acc128};
/// static LOUD: [i32; 3] = [i32::MIN; 3]; // Σ|h| = 3: too much for an i64 accumulator
/// assert!(Fir::<i32, 3>::new(&LOUD).is_err());
/// let mut fir = Fir::<i32, 3, i32, Acc128>::with_accumulator(&LOUD)?;
/// assert_eq!(fir.push(-1 << 20), 1 << 20); // (-1.0)·(-2^-11) exactly
/// # Ok::<(), tapline::Error>(())
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Acc128;

/// Accumulator widths whose safety a constructor can check at run time from the taps alone
/// ([`DefaultAcc`], [`Acc128`]). The proven 32-bit accumulator is not one of them: it is built
/// only through its compile-time proof ([`Fir::proven`](crate::Fir::proven)).
pub trait RuntimeChecked: Sealed {}

impl Sealed for DefaultAcc {}
impl Sealed for Acc128 {}
impl RuntimeChecked for DefaultAcc {}
impl RuntimeChecked for Acc128 {}
