//! Accumulator widths: the markers that select among a sample type's `MulAcc` impls.

use super::sealed::Sealed;
use core::marker::PhantomData;

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

/// The 32-bit accumulator for 16-bit samples and Q15 taps, safe because `P`'s taps and range
/// are proven at compile time never to overflow it: on Cortex-M0/M3/M4 it replaces 64-bit
/// multiply-accumulates by 32-bit ones. Also reachable as `tapline::headroom::Acc32`.
///
/// This is only the name of the width. Its arithmetic exists for a `P` that implements the
/// proof trait `ProvenTaps` of the headroom module, and only `Fir::proven` builds filters with
/// it (the doctest there shows the whole use). Sums wrap modulo 2^32, which the proof makes
/// exact; inputs are clamped to the proven range.
pub struct Acc32<P>(PhantomData<P>);

// By hand: derives would demand the same traits of `P`, which is only a name for a proof.
impl<P> Clone for Acc32<P> {
    fn clone(&self) -> Self {
        *self
    }
}
impl<P> Copy for Acc32<P> {}
impl<P> core::fmt::Debug for Acc32<P> {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        f.write_str("Acc32")
    }
}

/// Accumulator widths whose safety a constructor can check at run time from the taps alone
/// ([`DefaultAcc`], [`Acc128`]). The proven 32-bit accumulator [`Acc32`] is not one of them: it
/// is built only through its compile-time proof (`Fir::proven`).
pub trait RuntimeChecked: Sealed {}

impl Sealed for DefaultAcc {}
impl Sealed for Acc128 {}
impl<P> Sealed for Acc32<P> {}
impl RuntimeChecked for DefaultAcc {}
impl RuntimeChecked for Acc128 {}
