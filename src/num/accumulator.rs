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
/// 32-bit core. One line reaches it: `Fir::new_wide`, `FirUpTo::with_taps_wide`,
/// `MultiChannelFir::new_wide`, `MultiChannelFirUpTo::with_taps_wide`,
/// `LinearPhaseFir::new_wide`; the other structures name it as their `W` parameter.
///
/// ```
/// use tapline::{Fir, num::Acc128};
/// static LOUD: [i32; 3] = [i32::MIN; 3]; // Σ|h| = 3: too much for an i64 accumulator
/// assert!(Fir::<i32, 3>::new(&LOUD).is_err());
/// let mut fir: Fir<i32, 3, i32, Acc128> = Fir::new_wide(&LOUD)?;
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

impl<P> Acc32<P> {
    /// The marker value a proven filter stores (a zero-sized name).
    pub(crate) const fn marker() -> Self {
        Acc32(PhantomData)
    }
}

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

/// The 32-bit accumulator for 16-bit samples and Q15 taps whose safety was checked at run time,
/// for one input range: the value carries that range (raw codes, 0 included, within 16 bits),
/// and a filter built with it clamps every input into it (counted as a saturation), so the check
/// holds for any value the firmware passes. Also reachable as `tapline::headroom::Acc32Checked`.
///
/// Only the headroom module's run-time check (`CheckedTaps::check`) makes one: the fields are
/// private and there is no other constructor, so a filter with this width exists only for taps
/// that passed the check. Sums wrap modulo 2^32, which the check makes exact; rounding and
/// saturation are those of the default `i64` path, bit for bit.
///
/// ```
/// use tapline::headroom::{CheckedTaps, InputRange};
/// let checked = CheckedTaps::check(&[16384, 16384], InputRange::codes(-2048, 2047)?)?;
/// assert_eq!(checked.width().input(), (-2048, 2047));
/// # Ok::<(), tapline::Error>(())
/// ```
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Acc32Checked {
    min: i16,
    max: i16,
}

impl Acc32Checked {
    /// The width for inputs clamped to `min..=max`; the caller has checked the taps for that
    /// range (and `min ≤ 0 ≤ max`).
    pub(crate) const fn for_checked_range(min: i16, max: i16) -> Self {
        Acc32Checked { min, max }
    }

    /// The raw input codes the check covered, `(min, max)`, 0 included. Filters clamp inputs
    /// into it.
    #[must_use]
    pub const fn input(&self) -> (i16, i16) {
        (self.min, self.max)
    }

    /// `raw` clamped into the checked range, and whether that changed it. Branch-free on the
    /// value: a `max`/`min` pair, never a panic (the range is never empty).
    #[inline(always)]
    #[must_use]
    pub fn clamp(&self, raw: i16) -> (i16, bool) {
        let kept = raw.max(self.min).min(self.max);
        (kept, kept != raw)
    }
}

/// Accumulator widths whose safety a constructor can check at run time from the taps alone
/// ([`DefaultAcc`], [`Acc128`]). The proven 32-bit accumulators [`Acc32`] and [`Acc32Checked`]
/// are not: they are built only through their proofs (`Fir::proven`, `CheckedTaps::check`).
pub trait RuntimeChecked: Sealed + Default {}

impl Sealed for DefaultAcc {}
impl Sealed for Acc128 {}
impl<P> Sealed for Acc32<P> {}
impl Sealed for Acc32Checked {}
impl RuntimeChecked for DefaultAcc {}
impl RuntimeChecked for Acc128 {}
