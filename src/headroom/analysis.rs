//! Exact, `const` analysis of a fixed-point tap set: norms, accumulator and output bounds.

use super::InputRange;
use crate::Rounding;
use crate::num::FixedPoint;
use core::fmt;
use fixed::types::extra::{LeEqU16, LeEqU32};
use fixed::{FixedI16, FixedI32};

/// What a tap set can do to the accumulator and the output, for every input sequence in an
/// [`InputRange`]: computed exactly, in integers, by `const fn`s — so it can run inside a
/// `const` item of a firmware build as well as in a host tool.
///
/// The range analysed is the declared one widened to include 0, because a filter's history holds
/// zeros after construction and reset ([`input`](Headroom::input)). The accumulator bounds are
/// attained by the sequences of
/// [`worst_case_input`](Headroom::worst_case_input) (x\[n−k\] at the end of the range that
/// matches the sign of h\[k\]). The L1-norm bound |y| ≤ max|x|·Σ|h| is the classic worst-case
/// scaling rule (A. V. Oppenheim & R. W. Schafer, *Discrete-Time Signal Processing*, 3rd ed.,
/// 2010, §6.9, from memory); the bounds here are its exact two's-complement form,
/// y_max = G⁺·x_max + G⁻·x_min with G± the sums of the positive and negative taps.
///
/// ```
/// use tapline::headroom::{Headroom, InputRange};
/// use tapline::Rounding;
///
/// // A 64-tap Q15 table, analysed in a const item (this runs at compile time, on any target).
/// const TAPS: [i16; 64] = [512; 64]; // 64 × 1/64: a moving average, Σh = 1
/// const REPORT: Headroom = Headroom::q15(&TAPS, InputRange::FULL);
/// const _: () = assert!(REPORT.fits(32) && !REPORT.can_saturate(Rounding::HalfUp));
///
/// assert_eq!(REPORT.l1_norm_raw(), 32768); // Σ|h| = 1.0
/// assert_eq!(REPORT.accumulator_range(), (-(1 << 30), 64 * 512 * 32767));
/// assert_eq!((REPORT.accumulator_bits(), REPORT.guard_bits()), (31, 0));
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Headroom {
    taps: usize,
    tap_frac: u32,
    sample_bits: u32,
    input: InputRange,
    positive: i128,
    negative: i128,
    peak: i128,
    acc_min: i128,
    acc_max: i128,
}

/// Which end of the accumulator range a worst-case input drives it to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Extreme {
    /// The largest sum.
    High,
    /// The smallest (most negative) sum.
    Low,
}

/// The accumulator widths a firmware build can pick from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum AccWidth {
    /// `i32`: for Q15 through [`Fir::proven`](crate::Fir::proven) only.
    Bits32,
    /// `i64`: the default for 16- and 32-bit samples.
    Bits64,
    /// `i128`: [`Acc128`](crate::num::Acc128), for 32-bit samples.
    Bits128,
}

impl AccWidth {
    /// The width in bits.
    #[must_use]
    pub const fn bits(self) -> u32 {
        match self {
            AccWidth::Bits32 => 32,
            AccWidth::Bits64 => 64,
            AccWidth::Bits128 => 128,
        }
    }
}

/// Smallest two's-complement width holding `v`.
const fn bits_for(v: i128) -> u32 {
    let magnitude = if v < 0 { !v } else { v };
    128 - magnitude.leading_zeros() + 1
}

const fn max_u32(a: u32, b: u32) -> u32 {
    if a > b { a } else { b }
}

impl Headroom {
    const fn start(tap_frac: u32, sample_bits: u32, input: InputRange) -> Headroom {
        // Public entry points pass any u32; keep every later shift in range.
        let sample_bits = if sample_bits == 0 {
            1
        } else if sample_bits > 63 {
            63
        } else {
            sample_bits
        };
        let tap_frac = if tap_frac > 63 { 63 } else { tap_frac };
        Headroom {
            taps: 0,
            tap_frac,
            sample_bits,
            input: input.including_zero().within_word(sample_bits),
            positive: 0,
            negative: 0,
            peak: 0,
            acc_min: 0,
            acc_max: 0,
        }
    }

    const fn with_tap(mut self, raw: i64) -> Headroom {
        let h = raw as i128;
        if h > 0 {
            self.positive += h;
        } else {
            self.negative += h;
        }
        let magnitude = if h < 0 { -h } else { h };
        if magnitude > self.peak {
            self.peak = magnitude;
        }
        let at_min = h * self.input.min() as i128;
        let at_max = h * self.input.max() as i128;
        let (low, high) = if at_min < at_max {
            (at_min, at_max)
        } else {
            (at_max, at_min)
        };
        self.acc_min += low;
        self.acc_max += high;
        self.taps += 1;
        self
    }

    /// Q15 taps (raw `i16`, 15 fractional bits) on 16-bit samples (`i16` or any `FixedI16`).
    #[must_use]
    pub const fn q15(taps: &[i16], input: InputRange) -> Headroom {
        let mut report = Headroom::start(15, 16, input);
        let mut rest = taps;
        while let [h, tail @ ..] = rest {
            report = report.with_tap(*h as i64);
            rest = tail;
        }
        report
    }

    /// Q31 taps (raw `i32`, 31 fractional bits) on 32-bit samples.
    ///
    /// ```
    /// use tapline::headroom::{AccWidth, Headroom, InputRange};
    /// // Σ|h| = 2.5 in Q31: an i64 accumulator is not enough, i128 is.
    /// const LOUD: [i32; 3] = [i32::MIN, i32::MIN, 1 << 30];
    /// const R: Headroom = Headroom::q31(&LOUD, InputRange::FULL);
    /// assert!(!R.fits(64));
    /// assert_eq!(R.safe_accumulator(), AccWidth::Bits128);
    /// assert_eq!(R.spare_bits(64), -1); // the sum can reach 2^63 + 2^61: one bit short
    /// ```
    #[must_use]
    pub const fn q31(taps: &[i32], input: InputRange) -> Headroom {
        let mut report = Headroom::start(31, 32, input);
        let mut rest = taps;
        while let [h, tail @ ..] = rest {
            report = report.with_tap(*h as i64);
            rest = tail;
        }
        report
    }

    /// `FixedI16<F>` taps (F fractional bits) on 16-bit samples.
    #[must_use]
    pub const fn fixed16<F: LeEqU16>(taps: &[FixedI16<F>], input: InputRange) -> Headroom {
        let mut report = Headroom::start(FixedI16::<F>::FRAC_NBITS, 16, input);
        let mut rest = taps;
        while let [h, tail @ ..] = rest {
            report = report.with_tap(h.to_bits() as i64);
            rest = tail;
        }
        report
    }

    /// `FixedI32<F>` taps (F fractional bits) on 32-bit samples.
    #[must_use]
    pub const fn fixed32<F: LeEqU32>(taps: &[FixedI32<F>], input: InputRange) -> Headroom {
        let mut report = Headroom::start(FixedI32::<F>::FRAC_NBITS, 32, input);
        let mut rest = taps;
        while let [h, tail @ ..] = rest {
            report = report.with_tap(h.to_bits() as i64);
            rest = tail;
        }
        report
    }

    /// Any fixed-point taps `T` on samples of `sample_bits` bits (taken in 1..=63), for
    /// generic host code (not `const`).
    ///
    /// ```
    /// use tapline::headroom::{Headroom, InputRange};
    /// let taps = [8192i16, 16384, 8192];
    /// assert_eq!(Headroom::of(&taps, 16, InputRange::FULL), Headroom::q15(&taps, InputRange::FULL));
    /// ```
    #[must_use]
    pub fn of<T: FixedPoint>(taps: &[T], sample_bits: u32, input: InputRange) -> Headroom {
        taps.iter()
            .fold(Headroom::start(T::FRAC, sample_bits, input), |r, t| {
                r.with_tap(t.raw())
            })
    }

    /// Number of taps.
    #[must_use]
    pub const fn tap_count(&self) -> usize {
        self.taps
    }

    /// Fractional bits of the taps: the output step divides the accumulator by 2^this.
    #[must_use]
    pub const fn tap_frac(&self) -> u32 {
        self.tap_frac
    }

    /// Width of the sample word in bits.
    #[must_use]
    pub const fn sample_bits(&self) -> u32 {
        self.sample_bits
    }

    /// The input range analysed: the declared range widened to include 0 (the history's value
    /// after construction or reset, which the filter sums like any input) and cut to the sample
    /// word.
    #[must_use]
    pub const fn input(&self) -> InputRange {
        self.input
    }

    /// Σ|h| in raw tap units (exact).
    #[must_use]
    pub const fn l1_norm_raw(&self) -> i128 {
        self.positive - self.negative
    }

    /// Σh in raw tap units (exact): the gain at DC.
    #[must_use]
    pub const fn dc_gain_raw(&self) -> i128 {
        self.positive + self.negative
    }

    /// max |h| in raw tap units.
    #[must_use]
    pub const fn peak_raw(&self) -> i128 {
        self.peak
    }

    /// Σ|h| as a real number (raw / 2^tap_frac; exact below 2^53 raw).
    #[must_use]
    pub const fn l1_norm(&self) -> f64 {
        self.l1_norm_raw() as f64 / (1u64 << self.tap_frac) as f64
    }

    /// Σh as a real number.
    #[must_use]
    pub const fn dc_gain(&self) -> f64 {
        self.dc_gain_raw() as f64 / (1u64 << self.tap_frac) as f64
    }

    /// max |h| as a real number.
    #[must_use]
    pub const fn peak(&self) -> f64 {
        self.peak as f64 / (1u64 << self.tap_frac) as f64
    }

    /// The exact smallest and largest accumulator value over every input sequence in range.
    #[must_use]
    pub const fn accumulator_range(&self) -> (i128, i128) {
        (self.acc_min, self.acc_max)
    }

    /// The fewest two's-complement bits that hold every accumulator value.
    #[must_use]
    pub const fn accumulator_bits(&self) -> u32 {
        max_u32(bits_for(self.acc_min), bits_for(self.acc_max))
    }

    /// Whether a `bits`-wide accumulator can never overflow.
    #[must_use]
    pub const fn fits(&self, bits: u32) -> bool {
        self.accumulator_bits() <= bits
    }

    /// Bits left over in a `bits`-wide accumulator; negative when it is that many bits short.
    /// For Q31 in the default `i64` accumulator with Σ|h| ≤ 1 this is 1 (a single Q31·Q31
    /// product already needs 63 bits).
    #[must_use]
    pub const fn spare_bits(&self, bits: u32) -> i32 {
        bits as i32 - self.accumulator_bits() as i32
    }

    /// Guard bits: how many bits the accumulator needs above the B + F bits a product of a
    /// B-bit sample and an F-fractional-bit tap of magnitude below one occupies. For full-scale
    /// input this is ⌈log2 Σ|h|⌉ (0 for Σ|h| ≤ 1), up to the one-code asymmetry of two's
    /// complement.
    #[must_use]
    pub const fn guard_bits(&self) -> u32 {
        self.accumulator_bits()
            .saturating_sub(self.sample_bits + self.tap_frac)
    }

    /// The smallest of the widths tapline offers that is safe.
    #[must_use]
    pub const fn safe_accumulator(&self) -> AccWidth {
        if self.fits(32) {
            AccWidth::Bits32
        } else if self.fits(64) {
            AccWidth::Bits64
        } else {
            AccWidth::Bits128
        }
    }

    /// The exact output range before saturation, in raw sample codes, after the output step's
    /// rounding.
    #[must_use]
    pub const fn output_range(&self, rounding: Rounding) -> (i128, i128) {
        (
            rounding.shift_wide(self.acc_min, self.tap_frac),
            rounding.shift_wide(self.acc_max, self.tap_frac),
        )
    }

    /// Whether some input in range makes the output saturate (a clamp, never a wrap).
    #[must_use]
    pub const fn can_saturate(&self, rounding: Rounding) -> bool {
        let (low, high) = self.output_range(rounding);
        let word_max = (1i128 << (self.sample_bits - 1)) - 1;
        low < -word_max - 1 || high > word_max
    }

    /// The verdict for taps run with `rounding`: safe when the default 64-bit accumulator
    /// holds every sum **and** no input in range makes the output saturate. Exact: both halves
    /// come from the exact `i128` bounds above.
    ///
    /// ```
    /// use tapline::headroom::{Headroom, InputRange};
    /// use tapline::Rounding;
    /// // Σ|h| = 1: full-scale input stays within the Q15 word.
    /// let half = Headroom::q15(&[16384, 16384], InputRange::FULL);
    /// assert!(half.is_safe(Rounding::HalfUp));
    /// // Edge case: Σ|h| = 2 − 2⁻¹⁴ drives full-scale input past the word, so it clamps.
    /// let big = Headroom::q15(&[32767, 32767], InputRange::FULL);
    /// assert!(big.fits(64) && !big.is_safe(Rounding::HalfUp));
    /// ```
    #[must_use]
    pub const fn is_safe(&self, rounding: Rounding) -> bool {
        self.fits(64) && !self.can_saturate(rounding)
    }

    /// The input sequence, oldest first, whose last sample produces the accumulator bound
    /// `toward`: x\[n−k\] = the end of the range matching the sign of h\[k\] (a zero tap takes
    /// the range's maximum). Raw sample codes; `taps` must be the tap set analysed.
    ///
    /// ```
    /// use tapline::headroom::{Extreme, Headroom, InputRange};
    /// let taps = [-2809i16, 11235, 15916, 11235, -2809]; // 5-point Savitzky–Golay in Q15
    /// let report = Headroom::q15(&taps, InputRange::FULL);
    /// let worst: Vec<i64> = report.worst_case_input(&taps, Extreme::High).collect();
    /// assert_eq!(worst, [-32768, 32767, 32767, 32767, -32768]);
    /// ```
    pub fn worst_case_input<'t, T: FixedPoint>(
        &self,
        taps: &'t [T],
        toward: Extreme,
    ) -> impl DoubleEndedIterator<Item = i64> + ExactSizeIterator + 't {
        let (min, max) = (self.input.min(), self.input.max());
        taps.iter().rev().map(move |h| {
            let positive = h.raw() >= 0;
            match (toward, positive) {
                (Extreme::High, true) | (Extreme::Low, false) => max,
                (Extreme::High, false) | (Extreme::Low, true) => min,
            }
        })
    }
}

impl fmt::Display for Headroom {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let (acc_lo, acc_hi) = self.accumulator_range();
        let (out_lo, out_hi) = self.output_range(Rounding::HalfUp);
        writeln!(
            f,
            "{} taps with {} fractional bits on {}-bit samples, input codes {}..={}",
            self.taps,
            self.tap_frac,
            self.sample_bits,
            self.input.min(),
            self.input.max()
        )?;
        writeln!(
            f,
            "sum |h| = {:.6}, DC gain = {:.6}, peak |h| = {:.6}",
            self.l1_norm(),
            self.dc_gain(),
            self.peak()
        )?;
        writeln!(
            f,
            "accumulator {acc_lo}..={acc_hi}: needs {} bits ({} guard bits); smallest safe: {} bits",
            self.accumulator_bits(),
            self.guard_bits(),
            self.safe_accumulator().bits()
        )?;
        write!(
            f,
            "output (half-up) {out_lo}..={out_hi}: {}",
            if self.can_saturate(Rounding::HalfUp) {
                "CAN SATURATE for some input in range"
            } else {
                "cannot saturate"
            }
        )
    }
}
