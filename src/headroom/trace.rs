//! Run-time evidence: the largest accumulator values a real input actually produced.

/// The extremes of the accumulator seen while filtering, so a replayed recording shows how
/// much headroom the real signal left (compare with [`Headroom`](super::Headroom), which gives
/// what the worst possible signal would use). [`Fir::push_traced`](crate::Fir::push_traced)
/// records into it.
///
/// ```
/// use tapline::{Fir, headroom::AccTrace};
/// static TAPS: [i16; 2] = [16384, 16384];
/// let mut fir = Fir::<i16, 2>::new(&TAPS)?;
/// let mut trace = AccTrace::new();
/// for x in [1000, -3000, 2000] {
///     fir.push_traced(x, &mut trace);
/// }
/// assert_eq!((trace.min(), trace.max()), (-2000 * 16384, 1000 * 16384));
/// assert_eq!(trace.bits_used(), 26); // -2000·2^14 ≈ -2^24.97 needs 26 bits
/// assert_eq!(trace.spare_bits(64), 38);
/// # Ok::<(), tapline::Error>(())
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct AccTrace {
    min: i128,
    max: i128,
    outputs: u64,
}

impl AccTrace {
    /// An empty trace.
    #[must_use]
    pub const fn new() -> AccTrace {
        AccTrace {
            min: 0,
            max: 0,
            outputs: 0,
        }
    }

    /// Records one accumulator value.
    #[inline]
    pub fn record(&mut self, acc: i128) {
        self.min = self.min.min(acc);
        self.max = self.max.max(acc);
        self.outputs += 1;
    }

    /// The smallest accumulator value seen (0 if none).
    #[must_use]
    pub const fn min(&self) -> i128 {
        self.min
    }

    /// The largest accumulator value seen (0 if none).
    #[must_use]
    pub const fn max(&self) -> i128 {
        self.max
    }

    /// How many outputs were recorded.
    #[must_use]
    pub const fn outputs(&self) -> u64 {
        self.outputs
    }

    /// The fewest two's-complement bits that held every value seen.
    #[must_use]
    pub const fn bits_used(&self) -> u32 {
        let low = !self.min; // ≥ 0 for min ≤ 0
        let high = self.max;
        let magnitude = if low > high { low } else { high };
        128 - magnitude.leading_zeros() + 1
    }

    /// Bits left unused in a `width`-bit accumulator by the values seen.
    #[must_use]
    pub const fn spare_bits(&self, width: u32) -> i32 {
        width as i32 - self.bits_used() as i32
    }
}
