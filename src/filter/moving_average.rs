//! The moving average in O(1) per sample: an exact integer running sum over a [`Ring`], divided
//! by N with one rounding step.

use super::GroupDelay;
use super::shared::{OutputStep, map_block, output_controls};
use crate::num::{FixedPoint, Rounding};
use crate::{Error, Ring};

/// The average of the last `N` samples (any N ≥ 1, not only powers of two), in O(1) per sample
/// whatever N is: the newest sample is added to a running sum and the sample leaving the
/// history subtracted from it.
///
/// * **Exact, no drift:** the running sum is an `i64` of raw sample values; it is always exactly
///   the sum of the N samples in the history (|sum| ≤ N·2^31 < 2^63 for 32-bit samples, so it
///   cannot overflow for any N that fits in memory — checked at compile time), so billions of
///   samples leave no residue. Floats are deliberately not offered: a float running sum keeps
///   the rounding error of every addition and subtraction and drifts; for floats use a
///   [`Fir`](crate::Fir) with taps 1/N, which recomputes the sum each sample.
/// * **Rounding:** the output is sum/N with one rounding step — a true division, not a shift —
///   [`Rounding::HalfUp`] (nearest, ties toward +∞) by default, [`Rounding::Truncate`]
///   (floor, toward −∞), [`Rounding::HalfEven`]. Ties occur only for even N. Error against the
///   exact mean: ≤ ½ LSB (nearest modes), < 1 LSB (truncation).
/// * **Saturation:** the mean of in-range samples is in range, so no output saturates; the
///   counter is kept for the common contract and stays at 0.
/// * **Group delay:** (N−1)/2 samples ([`group_delay`](MovingAverage::group_delay)).
/// * **Cost:** one add, one subtract, one 64-bit division by the constant N (which compilers
///   turn into a multiply where the target has one) per sample. **RAM:** 2·N samples (the mirrored ring), one index,
///   the 8-byte sum, rounding and counter.
/// * **Output format** = sample format (`i16`, `i32`, `FixedI16<F>`, `FixedI32<F>`).
///
/// ```
/// use tapline::{MovingAverage, Rounding};
///
/// let mut avg = MovingAverage::<i16, 3>::new().with_rounding(Rounding::HalfEven);
/// assert_eq!(avg.push(3), 1);   // (0 + 0 + 3)/3
/// assert_eq!(avg.push(4), 2);   // 7/3 = 2.33
/// assert_eq!(avg.push(5), 4);   // 12/3
/// // Full scale: three −1.0 samples average to exactly −1.0.
/// let mut block = [i16::MIN; 3];
/// avg.process_in_place(&mut block);
/// assert_eq!(block, [-10920, -21844, i16::MIN]);
/// assert_eq!(avg.sum(), 3 * -32768);
/// assert_eq!(avg.saturations(), 0);
/// ```
#[derive(Clone, Debug)]
pub struct MovingAverage<S, const N: usize> {
    history: Ring<S, N>,
    sum: i64,
    output: OutputStep,
}

impl<S: FixedPoint, const N: usize> Default for MovingAverage<S, N> {
    fn default() -> Self {
        Self::new()
    }
}

impl<S: FixedPoint, const N: usize> MovingAverage<S, N> {
    output_controls!(output);

    /// An average over `N` samples with zero history (so the first N − 1 outputs average in
    /// zeros), [`Rounding::HalfUp`]. `const`, so it can live in a `static`. `N = 0` and N ≥ 2^32
    /// do not compile.
    ///
    /// ```
    /// use tapline::MovingAverage;
    /// const SMOOTHER: MovingAverage<i32, 10> = MovingAverage::new(); // built at compile time
    /// let mut avg = SMOOTHER;
    /// assert_eq!(avg.push(i32::MIN), -214748365); // −2^31/10, rounded half up
    /// ```
    #[must_use]
    pub const fn new() -> Self {
        const {
            assert!(
                N as u64 <= u32::MAX as u64,
                "the i64 running sum holds up to 2^32 - 1 samples"
            )
        };
        MovingAverage {
            history: Ring::new(S::ZERO),
            sum: 0,
            output: OutputStep::new(),
        }
    }

    /// Averages one more sample: returns round(sum of the last N samples / N).
    #[inline]
    pub fn push(&mut self, x: S) -> S {
        let leaving = self.history.shift_in(x);
        // Exact: the sum of N raw values of at most 32 bits, N < 2^32.
        self.sum = self.sum + x.raw() - leaving.raw();
        let mean = divide(self.sum, N as i64, self.output.rounding());
        self.output.saturate(mean)
    }

    /// Averages `input` into `output`, exactly as repeated [`push`](MovingAverage::push).
    ///
    /// # Errors
    /// [`Error::OutputLength`] when the lengths differ; nothing is processed then.
    pub fn process(&mut self, input: &[S], output: &mut [S]) -> Result<(), Error> {
        map_block(input, output, |x| self.push(x))
    }

    /// Averages `buffer` in place, exactly as repeated [`push`](MovingAverage::push).
    pub fn process_in_place(&mut self, buffer: &mut [S]) {
        for v in buffer {
            *v = self.push(*v);
        }
    }

    /// The exact running sum of the raw values of the last N samples.
    #[must_use]
    pub const fn sum(&self) -> i64 {
        self.sum
    }

    /// Zero history, zero sum, zero saturation count; rounding stays.
    pub fn reset(&mut self) {
        self.history.fill(S::ZERO);
        self.sum = 0;
        self.output.clear();
    }

    /// The constant group delay, (N−1)/2 samples.
    #[must_use]
    pub const fn group_delay(&self) -> GroupDelay {
        GroupDelay::from_half_samples(N - 1)
    }

    /// The history: the last N samples, oldest first.
    #[must_use]
    pub fn history(&self) -> &Ring<S, N> {
        &self.history
    }
}

/// `sum / n` (n ≥ 1) rounded by `rounding`, exactly, from the floor quotient and its remainder.
#[inline]
fn divide(sum: i64, n: i64, rounding: Rounding) -> i64 {
    let (q, r) = (sum.div_euclid(n), sum.rem_euclid(n)); // sum = q·n + r, 0 ≤ r < n
    let up = match rounding {
        Rounding::Truncate => false,
        Rounding::HalfUp => 2 * r >= n,
        Rounding::HalfEven => 2 * r > n || (2 * r == n && q % 2 != 0),
    };
    q + i64::from(up)
}
