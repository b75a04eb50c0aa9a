//! The compile-time proof that unlocks the fast 32-bit accumulator for Q15.

use super::{Headroom, InputRange};
use crate::Error;
use crate::num::fixed_point::finish_fixed_i32;
use crate::num::{Acc32Checked, FixedPoint, MulAcc, Rounding};
use fixed::FixedI16;
use fixed::types::extra::LeEqU16;

/// A Q15 tap table and the input range it will see, named by a type so the compiler can check
/// the pair before the firmware is built.
///
/// Implement it on a unit struct and build the filter with [`Fir::proven`](crate::Fir::proven).
/// The build fails unless every input sequence in `INPUT` keeps the exact sum inside an `i32`.
pub trait ProvenTaps {
    /// The taps, raw Q15 (15 fractional bits), h\[0\] first.
    const TAPS: &'static [i16];
    /// The raw input codes the filter can receive (cut to 16 bits, and widened to include 0,
    /// the history's start value). Inputs outside are clamped into it by the filter, and counted
    /// as saturations, so the proof holds for any input.
    const INPUT: InputRange;
}

pub use crate::num::Acc32;

/// The proof itself: `true` when `P`'s taps never overflow `i32` for inputs in `P::INPUT`.
pub(crate) const fn proof_holds<P: ProvenTaps>() -> bool {
    Headroom::q15(P::TAPS, P::INPUT).fits(32)
}

/// The arithmetic of the 32-bit Q15 accumulator, written once for both proofs: `$w` names the
/// width, `$fits` how it judges a tap set, and `$admit` how it admits an input into the
/// history (`$width` binds the width's value there).
macro_rules! proven_mul_acc {
    ($( [$($gen:tt)*] $s:ty, $w:ty;
        fits($taps:ident) $fits:block
        admit($x:ident) $admit:block
        admit_within($width:ident, $xw:ident) $admit_within:block )*) => {$(
        impl<$($gen)*> MulAcc<i16, $w> for $s {
            type Acc = i32;
            const ACC_ZERO: i32 = 0;

            #[inline(always)]
            fn mul_acc(acc: i32, tap: i16, x: Self) -> i32 {
                // |tap·x| ≤ 2^30; the sum stays in i32 by the proof, so wrapping never acts.
                acc.wrapping_add(i32::from(tap) * (x.raw() as i32))
            }

            #[inline(always)]
            fn finish(acc: i32, rounding: Rounding) -> (Self, bool) {
                finish_fixed_i32(acc, rounding)
            }

            fn accumulator_fits($taps: &[i16]) -> bool $fits

            #[inline(always)]
            fn admit($x: Self) -> (Self, bool) $admit

            #[inline(always)]
            fn admit_within($width: &$w, $xw: Self) -> (Self, bool) $admit_within
        }
    )*};
}

/// The compile-time proof's width: inputs clamped to the range `P` was proven for.
macro_rules! compile_time_proven {
    ($( [$($gen:tt)*] $s:ty; )*) => {$(
        proven_mul_acc! {
            [P: ProvenTaps, $($gen)*] $s, Acc32<P>;
            fits(taps) { Headroom::q15(taps, P::INPUT).fits(32) }
            admit(x) {
                let raw = x.raw();
                let kept = P::INPUT.including_zero().within_word(16).clamp(raw);
                (<$s as FixedPoint>::from_raw(kept), kept != raw)
            }
            admit_within(_width, x) { <$s as MulAcc<i16, Acc32<P>>>::admit(x) }
        }
    )*};
}

/// The run-time check's width: its range is a value, so only `admit_within` can clamp.
macro_rules! run_time_checked {
    ($( [$($gen:tt)*] $s:ty; )*) => {$(
        proven_mul_acc! {
            [$($gen)*] $s, Acc32Checked;
            // No range is known from the taps alone: judged for the full 16-bit input range.
            fits(taps) { Headroom::q15(taps, InputRange::FULL).fits(32) }
            admit(x) { (x, false) }
            admit_within(width, x) {
                let raw = x.raw() as i16;
                let (kept, clamped) = width.clamp(raw);
                // Within 16 bits already, so the narrowing is exact.
                (<$s as FixedPoint>::from_raw_truncating(i64::from(kept)), clamped)
            }
        }
    )*};
}

compile_time_proven! {
    [] i16;
    [Fs: LeEqU16] FixedI16<Fs>;
}

run_time_checked! {
    [] i16;
    [Fs: LeEqU16] FixedI16<Fs>;
}

/// Q15 taps checked at run time against an input range: the token that unlocks the 32-bit
/// accumulator ([`Acc32Checked`]) for taps known only at run time (a calibration table read from
/// flash, taps designed on the device). The run-time twin of [`ProvenTaps`], which stays the way
/// for tables known when compiling.
///
/// Made only by [`check`](CheckedTaps::check), which succeeds exactly when the exact worst-case
/// sum Σ h\[k\]·x\[n−k\] over every input sequence in the range (0 included) lies within
/// `i32`; its fields are private, so holding one is the proof. A filter built from it
/// ([`FirUpTo::with_checked`](crate::filter::FirUpTo), and the decimator and multi-channel
/// forms) clamps every input into the checked range, counting each clamp as a saturation, so
/// the proof holds for whatever the firmware passes. Rounding and saturation of the output are
/// those of the default `i64` path, bit for bit, for inputs within the range.
///
/// ```
/// use tapline::{Error, filter::FirUpTo};
/// use tapline::headroom::{Acc32Checked, CheckedTaps, InputRange};
///
/// // Gain 4: too loud for i32 with full-scale input, fine for 12-bit codes.
/// let taps = [32767i16; 4];
/// let adc = InputRange::codes(-2048, 2047)?;
/// let checked = CheckedTaps::check(&taps, adc)?;
/// let mut fir = FirUpTo::<i16, 16, i16, Acc32Checked>::with_checked(checked)?;
/// assert_eq!(fir.push(2047), 2047); // 2047 · 32767/32768, rounded
/// assert_eq!(fir.push(5000), 4094); // out of range: used as 2047, and counted
/// assert_eq!(fir.saturations(), 1);
///
/// // Full-scale 16-bit input: refused, saying which bound and by how much.
/// let refused = CheckedTaps::check(&taps, InputRange::FULL).err();
/// let above = 4 * 32767 * 32767 - i32::MAX as u64;
/// let below = 4 * 32767 * 32768 - (1u64 << 31);
/// assert_eq!(refused, Some(Error::Acc32Overflow { above, below }));
/// # Ok::<(), tapline::Error>(())
/// ```
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct CheckedTaps<'a> {
    taps: &'a [i16],
    width: Acc32Checked,
}

impl<'a> CheckedTaps<'a> {
    /// Checks raw Q15 `taps` (h\[0\] first) for raw 16-bit inputs in `input` (cut to 16 bits
    /// and widened to include 0, as every analysis here is): the exact bounds of the sum are
    /// computed in `i128` ([`Headroom::q15`]), with no rounding.
    ///
    /// Cost: one pass over the taps, two 128-bit multiply-adds per tap; no panic. Empty taps
    /// pass (the sum is 0); filters refuse them when built ([`Error::NoTaps`]).
    ///
    /// # Errors
    /// [`Error::Acc32Overflow`] with the excess of each bound (0 for a bound that holds) when
    /// some input sequence in range takes the sum outside `i32`.
    ///
    /// ```
    /// use tapline::{Error, headroom::{CheckedTaps, InputRange}};
    /// // Two taps of -1.0 against inputs of -32768 reach exactly 2^31, one past i32::MAX,
    /// // while the lowest sum, 2 · (-32768) · 32767, still fits.
    /// let refused = CheckedTaps::check(&[i16::MIN; 2], InputRange::FULL);
    /// assert_eq!(refused, Err(Error::Acc32Overflow { above: 1, below: 0 }));
    /// assert!(CheckedTaps::check(&[i16::MIN], InputRange::FULL).is_ok());
    /// ```
    pub fn check(taps: &'a [i16], input: InputRange) -> Result<Self, Error> {
        let report = Headroom::q15(taps, input);
        let (low, high) = report.accumulator_range();
        let above = excess(high - i128::from(i32::MAX));
        let below = excess(i128::from(i32::MIN) - low);
        if above > 0 || below > 0 {
            return Err(Error::Acc32Overflow { above, below });
        }
        let range = report.input();
        // `Headroom` cut the range to 16 bits, so both ends fit `i16`.
        let (min, max) = (narrow(range.min()), narrow(range.max()));
        Ok(CheckedTaps {
            taps,
            width: Acc32Checked::for_checked_range(min, max),
        })
    }

    /// The checked taps.
    #[must_use]
    pub const fn taps(&self) -> &'a [i16] {
        self.taps
    }

    /// The width a filter built from this check uses, with the input range it clamps to.
    #[must_use]
    pub const fn width(&self) -> Acc32Checked {
        self.width
    }
}

/// `amount` as a non-negative `u64`: 0 when negative, `u64::MAX` past it.
fn excess(amount: i128) -> u64 {
    u64::try_from(amount.max(0)).unwrap_or(u64::MAX)
}

/// A value already within 16 bits, as `i16` (clamped, should it ever not be).
fn narrow(value: i64) -> i16 {
    i16::try_from(value).unwrap_or(if value < 0 { i16::MIN } else { i16::MAX })
}
