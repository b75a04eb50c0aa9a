//! The compile-time proof that unlocks the fast 32-bit accumulator for Q15.

use super::{Headroom, InputRange};
use crate::num::fixed_point::finish_fixed_i32;
use crate::num::{FixedPoint, MulAcc, Rounding};
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

macro_rules! proven_mul_acc {
    ($( [$($gen:tt)*] $s:ty; )*) => {$(
        impl<P: ProvenTaps, $($gen)*> MulAcc<i16, Acc32<P>> for $s {
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

            fn accumulator_fits(taps: &[i16]) -> bool {
                Headroom::q15(taps, P::INPUT).fits(32)
            }

            #[inline(always)]
            fn admit(x: Self) -> (Self, bool) {
                let raw = x.raw();
                let kept = P::INPUT.including_zero().within_word(16).clamp(raw);
                (<$s as FixedPoint>::from_raw(kept), kept != raw)
            }
        }
    )*};
}

proven_mul_acc! {
    [] i16;
    [Fs: LeEqU16] FixedI16<Fs>;
}
