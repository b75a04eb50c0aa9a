//! How far a fixed-point filter can stray from the ideal filter, and how far it did.

use super::InputRange;
use crate::num::{FixedPoint, MulAcc};
use crate::{Error, Fir, Ring, Rounding};

/// γ_n = n·u/(1 − n·u): the relative error bound of an n-term sum or dot product evaluated in
/// floating point with unit roundoff `u` (2⁻²⁴ for `f32`, 2⁻⁵³ for `f64`), valid while
/// n·u < 1. Source: N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed.,
/// SIAM 2002, §3.1 (Lemma 3.1 and the dot-product bound |x·y − fl(x·y)| ≤ γ_n·|x|·|y|).
///
/// Returns +∞ when n·u ≥ 1 (no bound of this form exists).
///
/// ```
/// use tapline::headroom::gamma;
/// let u = f64::powi(2.0, -24);
/// // 64 terms in f32: 64·2⁻²⁴/(1 − 64·2⁻²⁴)
/// assert_eq!(gamma(64, u), 64.0 * u / (1.0 - 64.0 * u));
/// assert_eq!(gamma(0, u), 0.0);
/// // Edge case: n·u = 1 has no bound.
/// assert_eq!(gamma(1 << 24, u), f64::INFINITY);
/// ```
#[must_use]
pub fn gamma(n: usize, unit_roundoff: f64) -> f64 {
    let nu = n as f64 * unit_roundoff;
    if nu < 1.0 {
        nu / (1.0 - nu)
    } else {
        f64::INFINITY
    }
}

/// The largest |y_f32 − y_f64| of an `f32` FIR filter (taps `taps`, samples rounded to `f32`,
/// accumulated in `f32` in tap order) against the float64 filter with the `ideal` taps, for
/// inputs up to `largest_input` in magnitude. It adds four terms, with u = 2⁻²⁴ and
/// |x₃₂| ≤ (1 + u)·|x|:
///
/// * the taps' rounding to `f32`: Σ|h₃₂ − h|·|x₃₂|;
/// * the samples' rounding to `f32`: Σ|h|·u·|x|;
/// * the `f32` dot product: γ_N(2⁻²⁴)·Σ|h₃₂|·|x₃₂| ([`gamma`]);
/// * the float64 reference's own: γ_N(2⁻⁵³)·Σ|h|·|x|.
///
/// N is the number of `ideal` taps (the two tables must match in length; extra entries of the
/// longer one are ignored). NaN and infinite inputs are outside the bound.
///
/// ```
/// use tapline::headroom::f32_error_bound;
/// // Taps exact in f32 and Σ|h| = 1 at full scale 1: u (sample rounding) + γ₃(u)·(1 + u)
/// // (the f32 sum) + γ₃(2⁻⁵³) (the reference) = 4u and a little more.
/// let ideal = [0.25f64, 0.5, 0.25];
/// let taps = ideal.map(|h| h as f32);
/// let u = f64::from(f32::EPSILON) / 2.0;
/// let b = f32_error_bound(&ideal, &taps, 1.0);
/// assert!(b > 4.0 * u && b < 4.0001 * u);
/// // Edge case: no input, no error.
/// assert_eq!(f32_error_bound(&ideal, &taps, 0.0), 0.0);
/// ```
#[must_use]
pub fn f32_error_bound(ideal: &[f64], taps: &[f32], largest_input: f64) -> f64 {
    // Unit roundoffs: 2⁻²⁴ (f32) and 2⁻⁵³ (f64), as exact powers of two.
    let u32 = f64::from(f32::EPSILON) / 2.0;
    let u64 = f64::EPSILON / 2.0;
    let n = ideal.len();
    let x32 = largest_input * (1.0 + u32);
    let taps_rounding: f64 = ideal
        .iter()
        .zip(taps)
        .map(|(h, t)| (f64::from(*t) - h).abs())
        .sum();
    let sum_h: f64 = ideal.iter().map(|h| h.abs()).sum();
    let sum_h32: f64 = taps.iter().map(|t| f64::from(*t).abs()).sum();
    taps_rounding * x32
        + sum_h * u32 * largest_input
        + gamma(n, u32) * sum_h32 * x32
        + gamma(n, u64) * sum_h * largest_input
}

/// A bound on |y_fixed − y_ideal| in output LSBs (the sample format's LSB), valid for every
/// input in range as long as the output does not saturate:
///
/// |y_fixed − y_ideal| ≤ max|x|·Σ|h_q − h| + r
///
/// where h are the ideal (float64) taps, h_q the quantized ones as real numbers, max|x| the
/// largest input magnitude in raw codes, and r the output rounding: ½ LSB for the nearest
/// modes, 1 LSB for truncation. The accumulator adds nothing: every tapline accumulator
/// (`i32` by proof, `i64`, `i128`) is exact, with no pre-shift. Saturation is a separate event,
/// counted by the filter, never part of this error.
///
/// ```
/// use tapline::headroom::{ErrorBound, InputRange};
/// use tapline::Rounding;
/// let ideal = [0.1, 0.8, 0.1];
/// let q15 = [3277i16, 26214, 3277]; // nearest Q15 codes
/// let b = ErrorBound::new::<i16, _>(&ideal, &q15, InputRange::FULL, Rounding::HalfUp)?;
/// // Σ|h_q − h| = 2·(3277/32768 − 0.1) + (0.8 − 26214/32768) = 2^−15·0.8
/// assert!((b.quantization_lsb() - 0.8).abs() < 1e-9); // × max|x| = 32768
/// assert_eq!(b.rounding_lsb(), 0.5);
/// # Ok::<(), tapline::Error>(())
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ErrorBound {
    tap_error: f64,
    max_input: f64,
    rounding: f64,
}

impl ErrorBound {
    /// The bound for `quantized` taps standing in for `ideal` ones, on samples `S` whose codes
    /// lie in `input` (cut to the sample word), with the given output rounding.
    ///
    /// **Accuracy:** Σ|h_q − h| is summed in f64; the bound is exact up to that rounding
    /// (relative 2^−53 per tap).
    ///
    /// # Errors
    /// [`Error::TapCountMismatch`] if the two tap sets differ in length.
    pub fn new<S: FixedPoint, T: FixedPoint>(
        ideal: &[f64],
        quantized: &[T],
        input: InputRange,
        rounding: Rounding,
    ) -> Result<ErrorBound, Error> {
        if ideal.len() != quantized.len() {
            return Err(Error::TapCountMismatch {
                ideal: ideal.len(),
                quantized: quantized.len(),
            });
        }
        let tap_error = ideal
            .iter()
            .zip(quantized)
            .map(|(&h, q)| (q.to_f64() - h).abs())
            .sum();
        let range = input.within_word(S::BITS);
        let max_input = (range.min() as f64).abs().max((range.max() as f64).abs());
        let rounding = match rounding {
            Rounding::Truncate => 1.0,
            _ => 0.5,
        };
        Ok(ErrorBound {
            tap_error,
            max_input,
            rounding,
        })
    }

    /// Σ|h_q − h|: the tap quantization error as a real number.
    #[must_use]
    pub const fn tap_error(&self) -> f64 {
        self.tap_error
    }

    /// The part of the bound that tap quantization contributes, in LSB: max|x|·Σ|h_q − h|.
    #[must_use]
    pub const fn quantization_lsb(&self) -> f64 {
        self.max_input * self.tap_error
    }

    /// The part that the output rounding contributes, in LSB (½ or 1).
    #[must_use]
    pub const fn rounding_lsb(&self) -> f64 {
        self.rounding
    }

    /// The whole bound in output LSBs.
    #[must_use]
    pub const fn lsb(&self) -> f64 {
        self.quantization_lsb() + self.rounding
    }
}

/// What a run of a fixed-point filter against the ideal filter measured.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Deviation {
    /// Largest |y_fixed − y_ideal| over the outputs that did not saturate, in output LSBs.
    pub max_lsb: f64,
    /// Outputs compared.
    pub compared: u64,
    /// Outputs left out because the filter saturated on them (or clamped their input).
    pub saturated: u64,
}

/// Runs `input` through `fir` and through the ideal filter with taps `ideal` (f64, on the
/// same admitted input values) and measures the largest difference, in output LSBs. Outputs at
/// which the filter's saturation counter moves are counted in
/// [`saturated`](Deviation::saturated) instead of being compared.
///
/// The filter keeps its state, so the call can continue a run; the ideal filter starts from
/// zero history, so start with a fresh or [`reset`](Fir::reset) filter.
///
/// **Accuracy:** the ideal output is summed in f64: its own error, about N·2^−53 relative, is
/// far below one LSB for any 16- or 32-bit format.
///
/// ```
/// use tapline::headroom::{ErrorBound, InputRange, measure_deviation};
/// use tapline::{Fir, Rounding};
/// static IDEAL: [f64; 3] = [0.1, 0.8, 0.1];
/// static Q15: [i16; 3] = [3277, 26214, 3277];
/// let mut fir = Fir::<i16, 3>::new(&Q15)?;
/// let measured = measure_deviation(&mut fir, &IDEAL, [32767i16, -32768, 12345, 0]);
/// let bound = ErrorBound::new::<i16, _>(&IDEAL, &Q15, InputRange::FULL, Rounding::HalfUp)?;
/// assert!(measured.max_lsb <= bound.lsb());
/// assert_eq!((measured.compared, measured.saturated), (4, 0));
/// # Ok::<(), tapline::Error>(())
/// ```
pub fn measure_deviation<S, T, W, const N: usize>(
    fir: &mut Fir<'_, S, N, T, W>,
    ideal: &[f64; N],
    input: impl IntoIterator<Item = S>,
) -> Deviation
where
    S: MulAcc<T, W> + FixedPoint,
    T: crate::Sample,
{
    let mut history = Ring::<f64, N>::new(0.0);
    let mut result = Deviation::default();
    for x in input {
        let before = fir.saturations();
        let y = fir.push(x);
        history.push(S::admit(x).0.raw() as f64);
        if fir.saturations() != before {
            result.saturated += 1;
            continue;
        }
        let reference = crate::kernel::dot_reversed::<f64, f64, crate::num::DefaultAcc>(
            0.0,
            ideal,
            history.window(),
        );
        result.max_lsb = result.max_lsb.max((y.raw() as f64 - reference).abs());
        result.compared += 1;
    }
    result
}
