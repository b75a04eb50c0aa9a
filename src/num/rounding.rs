//! The one rounding step from the accumulator to the output format.

/// How a fixed-point accumulator is divided by 2^F on its way to the output.
///
/// Floating-point paths ignore it (they round as IEEE 754 does, to nearest, ties to even).
///
/// | mode | rule | bias |
/// |---|---|---|
/// | [`HalfUp`](Rounding::HalfUp) (default) | ⌊acc/2^F + ½⌋: nearest, ties toward +∞ | +2^−(F+1) LSB on average for ties |
/// | [`Truncate`](Rounding::Truncate) | ⌊acc/2^F⌋: drops the low bits, toward −∞ | −½ LSB on average |
/// | [`HalfEven`](Rounding::HalfEven) | nearest, ties to the even neighbour | none |
///
/// Maximum error per output: ½ LSB for the nearest modes, just under 1 LSB for truncation.
///
/// ```
/// use tapline::{MulAcc, Rounding};
/// // -2.5 LSB in a Q15 accumulator (Q30): the three modes differ.
/// let acc: i64 = -(5 << 14);
/// let q = |r| <i16 as MulAcc<i16>>::finish(acc, r).0;
/// assert_eq!((q(Rounding::HalfUp), q(Rounding::Truncate), q(Rounding::HalfEven)), (-2, -3, -2));
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum Rounding {
    /// Round to nearest, ties toward +∞ (add half an LSB, then floor). The default.
    #[default]
    HalfUp,
    /// Discard the low bits: floor, i.e. toward −∞ in two's complement. Cheapest; biased.
    Truncate,
    /// Round to nearest, ties to even. Unbiased.
    HalfEven,
}

impl Rounding {
    /// Every mode, for tests and tools that sweep them.
    pub const ALL: [Rounding; 3] = [Rounding::HalfUp, Rounding::Truncate, Rounding::HalfEven];

    /// `acc / 2^frac` rounded by this mode. Exact for every `i64` and every `frac` in 0..=62
    /// (a larger `frac` is treated as 62; no tap format has more than 32 fractional bits);
    /// never overflows (it works on the shifted value, not on `acc + half`).
    ///
    /// ```
    /// use tapline::Rounding;
    /// assert_eq!(Rounding::HalfUp.shift(i64::MAX, 1), 1 << 62);
    /// assert_eq!(Rounding::Truncate.shift(-1, 4), -1);
    /// assert_eq!(Rounding::HalfEven.shift(8, 4), 0); // 0.5 → 0 (even)
    /// assert_eq!(Rounding::HalfEven.shift(24, 4), 2); // 1.5 → 2 (even)
    /// ```
    #[inline(always)]
    #[must_use]
    pub const fn shift(self, acc: i64, frac: u32) -> i64 {
        // Kept in i64 (not via `shift_wide`) so 32-bit cores stay on 64-bit arithmetic.
        if frac == 0 {
            return acc;
        }
        let frac = if frac > 62 { 62 } else { frac };
        let floor = acc >> frac;
        // floor + carry(rest + offset + odd): the same integer add for every mode, so there is
        // no branch on the value and no overflow (rest + offset + 1 < 2^(frac+1)).
        let rest = acc & ((1i64 << frac) - 1);
        let half = 1i64 << (frac - 1);
        let (offset, even) = self.offset_and_parity(half);
        floor + ((rest + offset + (floor & even)) >> frac)
    }

    /// The offset added below the kept bits, and 1 when the parity of the kept part is added
    /// too: HalfUp (half, 0) rounds ties up, Truncate (0, 0) floors, HalfEven (half − 1, 1)
    /// reaches the carry at a tie only when the kept part is odd.
    #[inline(always)]
    pub(crate) const fn offset_and_parity_i32(self, half: i32) -> (i32, i32) {
        let (offset, even) = self.offset_and_parity(half as i64);
        (offset as i32, even as i32)
    }

    #[inline(always)]
    const fn offset_and_parity(self, half: i64) -> (i64, i64) {
        match self {
            Rounding::HalfUp => (half, 0),
            Rounding::Truncate => (0, 0),
            Rounding::HalfEven => (half - 1, 1),
        }
    }

    /// [`shift`](Rounding::shift) for a 128-bit accumulator ([`Acc128`](crate::num::Acc128))
    /// and for the headroom analysis: `acc / 2^frac` rounded by this mode, exact for every
    /// `i128` and `frac` in 0..=126 (larger values are treated as 126).
    ///
    /// ```
    /// use tapline::Rounding;
    /// assert_eq!(Rounding::HalfUp.shift_wide(-(5 << 14), 15), -2);
    /// assert_eq!(Rounding::Truncate.shift_wide(-(5 << 14), 15), -3);
    /// assert_eq!(Rounding::HalfEven.shift_wide(i128::MIN, 1), i128::MIN / 2);
    /// ```
    #[inline(always)]
    #[must_use]
    pub const fn shift_wide(self, acc: i128, frac: u32) -> i128 {
        if frac == 0 {
            return acc;
        }
        let frac = if frac > 126 { 126 } else { frac };
        let floor = acc >> frac;
        match self {
            Rounding::Truncate => floor,
            Rounding::HalfUp => floor + ((acc >> (frac - 1)) & 1),
            Rounding::HalfEven => {
                let rest = acc & ((1i128 << frac) - 1);
                let half = 1i128 << (frac - 1);
                let up = (rest > half) | ((rest == half) & (floor & 1 == 1));
                floor + up as i128
            }
        }
    }
}
