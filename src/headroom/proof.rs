//! The compile-time proof that unlocks the fast 32-bit accumulator for Q15.

use super::{Headroom, InputRange};
use crate::Fir;
use crate::num::fixed_point::finish_fixed_i32;
use crate::num::{FixedPoint, MulAcc, Rounding, sealed::Sealed};
use core::marker::PhantomData;
use fixed::FixedI16;
use fixed::types::extra::LeEqU16;

/// A Q15 tap table and the input range it will see, named by a type so the compiler can check
/// the pair before the firmware is built.
///
/// Implement it on a unit struct and build the filter with [`Fir::proven`]. The build fails
/// unless every input sequence in `INPUT` keeps the exact sum inside an `i32`.
pub trait ProvenTaps {
    /// The taps, raw Q15 (15 fractional bits), h\[0\] first.
    const TAPS: &'static [i16];
    /// The raw input codes the filter can receive (cut to 16 bits, and widened to include 0,
    /// the history's start value). Inputs outside are clamped into it by the filter, and counted
    /// as saturations, so the proof holds for any input.
    const INPUT: InputRange;
}

/// The 32-bit accumulator for 16-bit samples and Q15 taps, safe because `P`'s taps and range
/// are proven at compile time never to overflow it. Only [`Fir::proven`] builds filters with
/// it. On Cortex-M0/M3/M4 it replaces 64-bit multiply-accumulates by 32-bit ones.
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

impl<P> Sealed for Acc32<P> {}

/// The proof itself: `true` when `P`'s taps never overflow `i32` for inputs in `P::INPUT`.
const fn check<P: ProvenTaps>() -> bool {
    Headroom::q15(P::TAPS, P::INPUT).fits(32)
}

macro_rules! proven_mul_acc {
    ($( [$($gen:tt)*] $s:ty; { $($fast:tt)* } )*) => {$(
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

            $($fast)*
        }
    )*};
}

proven_mul_acc! {
    [] i16; {
        // The dual multiply-accumulate kernel, bit-identical to the portable one (its module
        // says how that is tested).
        #[cfg(all(target_arch = "arm", any(tapline_arm_dsp, tapline_armv6m)))]
        #[inline(always)]
        fn dot_block(taps: &[i16], span: &[i16], emit: impl FnMut(i32)) {
            crate::kernel::arm::dot_block_q15_i32(taps, span, emit);
        }

        #[cfg(all(target_arch = "arm", tapline_arm_dsp))]
        #[inline(always)]
        fn dot_reversed(acc: i32, taps: &[i16], xs: &[i16]) -> i32 {
            crate::kernel::arm::dot_reversed_q15_i32(acc, taps, xs)
        }
    }
    [Fs: LeEqU16] FixedI16<Fs>; {}
}

impl<S, const N: usize, P> Fir<'static, S, N, i16, Acc32<P>>
where
    S: MulAcc<i16, Acc32<P>>,
    P: ProvenTaps,
{
    /// A Q15 filter with a 32-bit accumulator whose safety is proven when the firmware is
    /// compiled: building fails unless `P::TAPS` has exactly `N` entries and no input sequence
    /// in `P::INPUT` can take the sum outside `i32`. Inputs outside `P::INPUT` are clamped into
    /// it (and counted by [`saturations`](Fir::saturations)), so the proof covers every call.
    /// Rounding, saturation and results are those of the default `i64` path, bit for bit.
    ///
    /// ```
    /// use tapline::Fir;
    /// use tapline::headroom::{Acc32, Align, InputRange, ProvenTaps};
    ///
    /// struct Boost; // gain 4: too loud for i32 with full-scale input, fine for 12-bit codes
    /// impl ProvenTaps for Boost {
    ///     const TAPS: &'static [i16] = &[32767; 4];
    ///     const INPUT: InputRange = match InputRange::adc(12, Align::Right, 16) {
    ///         Ok(r) => r,
    ///         Err(_) => panic!("bad ADC description"),
    ///     };
    /// }
    /// let mut fir: Fir<'static, i16, 4, i16, Acc32<Boost>> = Fir::proven();
    /// assert_eq!(fir.push(2047), 2047); // 2047 · 32767/32768, rounded
    /// assert_eq!(fir.push(5000), 4094); // 5000 is out of range: used as 2047, and counted
    /// assert_eq!(fir.saturations(), 1);
    /// ```
    ///
    /// The same taps for full-scale 16-bit input do not compile:
    ///
    /// ```compile_fail
    /// use tapline::Fir;
    /// use tapline::headroom::{Acc32, InputRange, ProvenTaps};
    ///
    /// struct Boost;
    /// impl ProvenTaps for Boost {
    ///     const TAPS: &'static [i16] = &[32767; 4];
    ///     const INPUT: InputRange = InputRange::FULL;
    /// }
    /// let fir: Fir<'static, i16, 4, i16, Acc32<Boost>> = Fir::proven();
    /// ```
    #[must_use]
    pub const fn proven() -> Self {
        let taps: &'static [i16; N] = const {
            assert!(
                check::<P>(),
                "ProvenTaps: some input in INPUT can overflow the 32-bit accumulator"
            );
            match P::TAPS.first_chunk::<N>() {
                Some(taps) if P::TAPS.len() == N => taps,
                _ => panic!("ProvenTaps::TAPS must have exactly N entries"),
            }
        };
        Self::with_checked_taps(taps)
    }
}
