//! The input range a headroom analysis is made for: raw sample codes, not volts.

use crate::Error;

/// Which raw codes the filter can receive: an inclusive range of two's-complement integers in
/// the sample word (`i16` or `i32` raw bits).
///
/// A range wider than the sample word is cut to the word when analysed, so
/// [`InputRange::FULL`] means "whatever the sample type can hold".
///
/// ```
/// use tapline::headroom::{Align, InputRange};
/// // A 12-bit bipolar ADC, left-aligned in a 16-bit word: codes step by 16.
/// let r = InputRange::adc(12, Align::Left, 16)?;
/// assert_eq!((r.min(), r.max()), (-32768, 32752));
/// // Right-aligned: the raw code is the ADC code.
/// let r = InputRange::adc(12, Align::Right, 16)?;
/// assert_eq!((r.min(), r.max()), (-2048, 2047));
/// // A unipolar 12-bit ADC read straight into the word: 0..=4095.
/// let r = InputRange::codes(0, 4095)?;
/// assert_eq!(r.max(), 4095);
/// # Ok::<(), tapline::Error>(())
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct InputRange {
    min: i64,
    max: i64,
}

/// Where an ADC's bits sit in the sample word.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Align {
    /// In the low bits, sign-extended: the raw value is the ADC code.
    Right,
    /// In the high bits, the low bits zero: the raw value is the code times 2^(word − bits).
    Left,
}

impl InputRange {
    /// Every value of the sample word.
    pub const FULL: InputRange = InputRange {
        min: i64::MIN,
        max: i64::MAX,
    };

    /// Exactly the codes `min..=max`.
    ///
    /// # Errors
    /// [`Error::InvalidRange`] if `min > max`.
    pub const fn codes(min: i64, max: i64) -> Result<InputRange, Error> {
        if min > max {
            return Err(Error::InvalidRange);
        }
        Ok(InputRange { min, max })
    }

    /// A two's-complement (bipolar, or unipolar with mid-scale subtracted) ADC of `bits` bits
    /// placed in a `word_bits`-bit sample word.
    ///
    /// # Errors
    /// [`Error::InvalidRange`] unless 1 ≤ `bits` ≤ `word_bits` ≤ 32.
    pub const fn adc(bits: u32, align: Align, word_bits: u32) -> Result<InputRange, Error> {
        if bits == 0 || bits > word_bits || word_bits > 32 {
            return Err(Error::InvalidRange);
        }
        let code_min = -(1i64 << (bits - 1));
        let code_max = (1i64 << (bits - 1)) - 1;
        let scale = match align {
            Align::Right => 1,
            Align::Left => 1i64 << (word_bits - bits),
        };
        Ok(InputRange {
            min: code_min * scale,
            max: code_max * scale,
        })
    }

    /// The smallest code.
    #[must_use]
    pub const fn min(self) -> i64 {
        self.min
    }

    /// The largest code.
    #[must_use]
    pub const fn max(self) -> i64 {
        self.max
    }

    /// This range cut to a `bits`-bit two's-complement word (`bits` is taken in 1..=63). If
    /// the two do not overlap, the range collapses to the word's nearest end.
    ///
    /// ```
    /// use tapline::headroom::InputRange;
    /// let r = InputRange::FULL.within_word(16);
    /// assert_eq!((r.min(), r.max()), (-32768, 32767));
    /// ```
    #[must_use]
    pub const fn within_word(self, bits: u32) -> InputRange {
        let bits = if bits == 0 {
            1
        } else if bits > 63 {
            63
        } else {
            bits
        };
        let word = InputRange {
            max: (1i64 << (bits - 1)) - 1,
            min: -(1i64 << (bits - 1)),
        };
        InputRange {
            min: word.clamp(self.min),
            max: word.clamp(self.max),
        }
    }

    /// The smallest range holding this one and 0. A filter's history holds zeros after
    /// construction and [`reset`](crate::Fir::reset), so every analysis covers 0 as an input.
    ///
    /// ```
    /// use tapline::headroom::InputRange;
    /// let r = InputRange::codes(100, 200)?.including_zero();
    /// assert_eq!((r.min(), r.max()), (0, 200));
    /// # Ok::<(), tapline::Error>(())
    /// ```
    #[must_use]
    pub const fn including_zero(self) -> InputRange {
        InputRange {
            min: if self.min > 0 { 0 } else { self.min },
            max: if self.max < 0 { 0 } else { self.max },
        }
    }

    /// `x` clamped into the range.
    #[inline(always)]
    #[must_use]
    pub const fn clamp(self, x: i64) -> i64 {
        if x < self.min {
            self.min
        } else if x > self.max {
            self.max
        } else {
            x
        }
    }
}
