//! The CIC (cascaded integrator–comb) decimator: N integrators at the input rate, N combs at
//! the output rate, no multiplies; and a short FIR design that compensates its passband droop.
//!
//! Source for the structure, its gain (R·M)^N and its register growth N·log2(R·M): E. B.
//! Hogenauer, "An economical class of digital filters for decimation and interpolation", IEEE
//! Trans. Acoustics, Speech and Signal Processing 29(2), 1981.

use super::GroupDelay;
use super::shared::{OutputStep, Phase, decimate_block, decimate_in_place, output_controls};
use crate::num::FixedPoint;
use crate::{Error, Ring};

mod private {
    /// Keeps [`CicRegister`](super::CicRegister) closed: its arithmetic is argued for `i32` and
    /// `i64` only.
    pub trait Sealed {}
    impl Sealed for i32 {}
    impl Sealed for i64 {}
}

/// A CIC register: a two's-complement integer that adds and subtracts modulo 2^BITS.
///
/// Implemented for `i32` (the fast choice on 32-bit cores when the growth fits) and `i64`.
/// Sealed.
pub trait CicRegister: Copy + core::fmt::Debug + private::Sealed {
    /// Width in bits.
    const BITS: u32;
    /// Zero.
    const ZERO: Self;
    /// A raw sample value (at most 32 bits) as a register value.
    fn from_raw(raw: i64) -> Self;
    /// `self + other` modulo 2^BITS.
    fn add(self, other: Self) -> Self;
    /// `self − other` modulo 2^BITS.
    fn sub(self, other: Self) -> Self;
    /// The value, sign-extended.
    fn widen(self) -> i64;
}

macro_rules! register {
    ($($t:ty),*) => {$(
        impl CicRegister for $t {
            const BITS: u32 = <$t>::BITS;
            const ZERO: Self = 0;
            #[inline(always)]
            fn from_raw(raw: i64) -> Self {
                // Samples have at most 32 bits, which every register holds.
                raw as $t
            }
            #[inline(always)]
            fn add(self, other: Self) -> Self {
                self.wrapping_add(other)
            }
            #[inline(always)]
            fn sub(self, other: Self) -> Self {
                self.wrapping_sub(other)
            }
            #[inline(always)]
            fn widen(self) -> i64 {
                i64::from(self)
            }
        }
    )*};
}
register!(i32, i64);

/// ⌈log2((R·M)^N)⌉: the bits a CIC with `stages` N, `rate` R and differential `delay` M adds to
/// its input, computed exactly from the integer gain (R·M)^N (Hogenauer 1981: the growth is
/// N·log2(R·M), rounded up to whole bits). Returns 128 when the gain itself passes 2^128.
///
/// ```
/// use tapline::filter::cic_growth_bits;
/// assert_eq!(cic_growth_bits(3, 8, 1), 9);     // 8^3 = 512 = 2^9
/// assert_eq!(cic_growth_bits(3, 10, 1), 10);   // 1000 < 1024
/// assert_eq!(cic_growth_bits(5, 128, 1), 35);
/// assert_eq!(cic_growth_bits(40, 1 << 20, 1), 128); // beyond any register
/// ```
#[must_use]
pub const fn cic_growth_bits(stages: usize, rate: usize, delay: usize) -> u32 {
    let rm = (rate as u128).saturating_mul(delay as u128);
    let mut gain: u128 = 1;
    let mut i = 0;
    while i < stages {
        gain = match gain.checked_mul(rm) {
            Some(g) => g,
            None => return 128,
        };
        i += 1;
    }
    if gain <= 1 {
        0
    } else {
        u128::BITS - (gain - 1).leading_zeros()
    }
}

/// The register width a CIC needs for `input_bits`-bit two's-complement input: input bits plus
/// [`cic_growth_bits`] (Hogenauer 1981: B_max = ⌈N·log2(R·M) + B_in − 1⌉ is the index of the
/// most significant bit, so B_max + 1 bits). With wrapping arithmetic every register of the
/// filter may be this narrow.
///
/// ```
/// use tapline::filter::cic_register_bits;
/// assert_eq!(cic_register_bits(12, 3, 8, 1), 21);
/// assert_eq!(cic_register_bits(16, 4, 16, 2), 36); // 32^4 = 2^20
/// ```
#[must_use]
pub const fn cic_register_bits(input_bits: u32, stages: usize, rate: usize, delay: usize) -> u32 {
    input_bits.saturating_add(cic_growth_bits(stages, rate, delay))
}

/// A CIC decimator over fixed-point samples `S` (`i16`, `i32`, `FixedI16<F>`, `FixedI32<F>`):
/// `STAGES` integrator–comb pairs, decimation factor `RATE`, differential delay `DELAY` (1 or
/// 2 in practice), registers of type `R` (`i64` by default, `i32` where it is wide enough).
///
/// Transfer function H(z) = ((1 − z^(−R·M)) / (1 − z^(−1)))^N at the input rate, then every R-th
/// output kept (the R-th, 2R-th, … input produces one). DC gain (R·M)^N; magnitude
/// |sin(π·R·M·f) / sin(π·f)|^N (f in cycles per input sample), nulls at multiples of the output
/// rate divided by M ([`cic_magnitude`] gives it normalised).
///
/// * **Registers and wrapping:** the integrators overflow on any DC input; that is by design.
///   All register arithmetic wraps (modulo 2^BITS): the filter is linear, so the output
///   computed modulo 2^BITS equals the true output modulo 2^BITS, and the true output needs only
///   [`REGISTER_BITS`](CicDecimator::REGISTER_BITS) = bits of `S` + ⌈N·log2(R·M)⌉ bits
///   (Hogenauer 1981), so when the register is at least that wide the wrapped result *is* the
///   true one. That width is checked **at compile time**: a configuration whose growth does
///   not fit `R` does not build.
/// * **Output scaling:** the full-precision comb output is shifted right by
///   [`output_shift`](CicDecimator::output_shift) bits (default: the growth, ⌈N·log2(R·M)⌉,
///   so the DC gain (R·M)^N/2^shift is at most 1 — exactly 1 when R·M is a power of two) with
///   one [`Rounding`](crate::Rounding) step, then saturated to `S` and counted. Never wraps at
///   the output. [`push_full`](CicDecimator::push_full) returns the unscaled value.
/// * **Group delay:** N·(R·M − 1)/2 input samples, exactly (the impulse response is
///   symmetric) — [`group_delay`](CicDecimator::group_delay).
/// * **Cost:** N register additions per input, N subtractions per output; no multiplies.
///   **RAM:** N integrators, N·M comb registers, a phase counter, the shift, rounding, counter.
///
/// ```
/// use tapline::CicDecimator;
///
/// // 3 stages, decimate by 8, M = 1: gain 8^3 = 2^9; 16 + 9 = 25 bits fit i32 registers.
/// let mut cic = CicDecimator::<i16, 3, 8, 1, i32>::new();
/// assert_eq!(CicDecimator::<i16, 3, 8, 1, i32>::REGISTER_BITS, 25);
/// let mut out = [0i16; 4];
/// // Full-scale DC: after the start-up (N·(R·M − 1) = 21 samples) the output is exactly −1.0.
/// assert_eq!(cic.process(&[i16::MIN; 32], &mut out)?, 4);
/// assert_eq!(out[3], i16::MIN);
/// assert_eq!(cic.saturations(), 0);
/// assert_eq!(cic.group_delay().samples(), 10.5);
/// # Ok::<(), tapline::Error>(())
/// ```
///
/// Growth that does not fit the registers does not compile (16 + 20 bits > 32):
///
/// ```compile_fail
/// let cic = tapline::CicDecimator::<i16, 4, 32, 1, i32>::new();
/// ```
#[derive(Clone, Debug)]
pub struct CicDecimator<
    S,
    const STAGES: usize,
    const RATE: usize,
    const DELAY: usize,
    R: CicRegister = i64,
> {
    integrators: [R; STAGES],
    combs: [Ring<R, DELAY>; STAGES],
    phase: Phase<RATE>,
    shift: u32,
    output: OutputStep,
    sample: core::marker::PhantomData<S>,
}

impl<S: FixedPoint, const STAGES: usize, const RATE: usize, const DELAY: usize, R: CicRegister>
    Default for CicDecimator<S, STAGES, RATE, DELAY, R>
{
    fn default() -> Self {
        Self::new()
    }
}

impl<S: FixedPoint, const STAGES: usize, const RATE: usize, const DELAY: usize, R: CicRegister>
    CicDecimator<S, STAGES, RATE, DELAY, R>
{
    output_controls!(output);

    /// ⌈N·log2(R·M)⌉, the bits the filter adds to its input ([`cic_growth_bits`]).
    pub const GROWTH_BITS: u32 = cic_growth_bits(STAGES, RATE, DELAY);

    /// The register width the filter needs: the bits of `S` plus [`GROWTH_BITS`](Self::GROWTH_BITS).
    pub const REGISTER_BITS: u32 = S::BITS + Self::GROWTH_BITS;

    /// The largest output shift accepted: the register width needed (a larger shift leaves
    /// nothing but the sign).
    pub const MAX_SHIFT: u32 = Self::REGISTER_BITS;

    /// A filter with zeroed registers, phase 0, output shift = [`GROWTH_BITS`](Self::GROWTH_BITS),
    /// [`Rounding::HalfUp`](crate::Rounding::HalfUp). Fails to compile when a parameter is 0 or
    /// the growth does not fit the register type `R`.
    #[must_use]
    pub fn new() -> Self {
        const {
            assert!(
                STAGES > 0 && RATE > 0 && DELAY > 0,
                "stages, rate and delay must be at least 1"
            );
            assert!(
                Self::REGISTER_BITS <= R::BITS,
                "the CIC's bit growth does not fit the register type (Hogenauer's rule)"
            );
        };
        CicDecimator {
            integrators: [R::ZERO; STAGES],
            combs: core::array::from_fn(|_| Ring::new(R::ZERO)),
            phase: Phase::default(),
            shift: Self::GROWTH_BITS,
            output: OutputStep::new(),
            sample: core::marker::PhantomData,
        }
    }

    /// The same filter with another output shift: the output is the comb result divided by
    /// 2^`shift` (rounded, saturated, counted). A smaller shift than the growth gives gain;
    /// full-scale DC then saturates.
    ///
    /// # Errors
    /// [`Error::ShiftTooLarge`] when `shift` exceeds [`MAX_SHIFT`](Self::MAX_SHIFT).
    ///
    /// ```
    /// use tapline::CicDecimator;
    /// // R·M = 10 is not a power of two: gain 1000/1024 with the default shift of 10; a shift
    /// // of 9 gives 1000/512 and full-scale DC saturates.
    /// let mut cic = CicDecimator::<i16, 3, 10, 1>::new().with_output_shift(9)?;
    /// let last = [i16::MIN; 40].iter().filter_map(|&x| cic.push(x)).last();
    /// assert_eq!(last, Some(i16::MIN));
    /// assert!(cic.saturations() > 0);
    /// # Ok::<(), tapline::Error>(())
    /// ```
    pub fn with_output_shift(mut self, shift: u32) -> Result<Self, Error> {
        if shift > Self::MAX_SHIFT {
            return Err(Error::ShiftTooLarge {
                shift,
                max: Self::MAX_SHIFT,
            });
        }
        self.shift = shift;
        Ok(self)
    }

    /// The output shift in bits.
    #[must_use]
    pub const fn output_shift(&self) -> u32 {
        self.shift
    }

    /// The filter's DC gain before the output shift, (R·M)^N (saturating at `u128::MAX`).
    #[must_use]
    pub const fn dc_gain(&self) -> u128 {
        let rm = (RATE as u128).saturating_mul(DELAY as u128);
        let mut gain: u128 = 1;
        let mut i = 0;
        while i < STAGES {
            gain = gain.saturating_mul(rm);
            i += 1;
        }
        gain
    }

    /// Takes one input; every R-th input returns the full-precision comb output (raw units of
    /// `S` times the gain), unscaled and unrounded; `None` otherwise. Exact: it lies within
    /// ±(R·M)^N·2^(bits of S − 1).
    #[inline]
    pub fn push_full(&mut self, x: S) -> Option<i64> {
        let mut v = R::from_raw(x.raw());
        for integrator in &mut self.integrators {
            *integrator = integrator.add(v);
            v = *integrator;
        }
        if !self.phase.tick() {
            return None;
        }
        for comb in &mut self.combs {
            // y = v − v (M outputs ago): the comb at the output rate.
            v = v.sub(comb.shift_in(v));
        }
        Some(v.widen())
    }

    /// Takes one input; every R-th input returns the output — the comb result shifted right
    /// by [`output_shift`](Self::output_shift) with one rounding step, saturated to `S` and
    /// counted — and `None` otherwise.
    #[inline]
    pub fn push(&mut self, x: S) -> Option<S> {
        let full = self.push_full(x)?;
        let scaled = self.output.rounding().shift(full, self.shift);
        Some(self.output.saturate(scaled))
    }

    /// Decimates `input` into the front of `output`, exactly as repeated
    /// [`push`](Self::push); returns how many outputs were written.
    ///
    /// # Errors
    /// [`Error::OutputTooShort`] when `output` has room for fewer outputs than the call
    /// produces; nothing is processed then.
    pub fn process(&mut self, input: &[S], output: &mut [S]) -> Result<usize, Error> {
        let needed = self.phase.outputs_for(input.len());
        decimate_block(input, output, needed, |x| self.push(x))
    }

    /// Decimates `buffer` in place, outputs to its front; returns how many were written.
    pub fn process_in_place(&mut self, buffer: &mut [S]) -> usize {
        decimate_in_place(buffer, |x| self.push(x))
    }

    /// How many outputs the next `len` inputs produce, given the current phase.
    #[must_use]
    pub const fn outputs_for(&self, len: usize) -> usize {
        self.phase.outputs_for(len)
    }

    /// Zeroed registers, phase 0, zero saturation count; shift and rounding stay.
    pub fn reset(&mut self) {
        self.integrators = [R::ZERO; STAGES];
        for comb in &mut self.combs {
            comb.fill(R::ZERO);
        }
        self.phase = Phase::default();
        self.output.clear();
    }

    /// The group delay, N·(R·M − 1)/2 input samples (divide by R for output samples).
    #[must_use]
    pub const fn group_delay(&self) -> GroupDelay {
        GroupDelay::from_half_samples(STAGES * (RATE * DELAY - 1))
    }
}

/// sin(π·x) for finite x, from a Taylor series on [−½, ½] after exact reduction (core has no
/// sine): error below 1e-15 for |x| < 2^40.
fn sin_pi(x: f64) -> f64 {
    if !x.is_finite() {
        return f64::NAN;
    }
    // x − 2·round(x/2) lies in [−1, 1]; the integer part is exact for |x| < 2^52.
    let half = x / 2.0;
    let nearest = if half.abs() < 4.0e15 {
        let t = half as i64 as f64; // toward zero
        let r = half - t;
        if r >= 0.5 {
            t + 1.0
        } else if r <= -0.5 {
            t - 1.0
        } else {
            t
        }
    } else {
        half
    };
    let mut r = x - 2.0 * nearest;
    // sin(π(1 − r)) = sin(πr): fold into [−½, ½].
    if r > 0.5 {
        r = 1.0 - r;
    } else if r < -0.5 {
        r = -1.0 - r;
    }
    let t = core::f64::consts::PI * r;
    let t2 = t * t;
    // Σ (−1)^k t^(2k+1)/(2k+1)!, 12 terms: the next is below (π/2)^25/25! < 1e-20.
    let mut term = t;
    let mut sum = t;
    let mut k = 1.0;
    while k < 24.0 {
        term *= -t2 / ((2.0 * k) * (2.0 * k + 1.0));
        sum += term;
        k += 1.0;
    }
    sum
}

/// cos(2π·x), from [`sin_pi`].
fn cos_two_pi(x: f64) -> f64 {
    sin_pi(2.0 * x + 0.5)
}

/// The magnitude response of a CIC with `stages` N, `rate` R and differential `delay` M,
/// normalised by its DC gain, at `frequency_hz` for a CIC whose *input* runs at
/// `input_rate_hz`: |sin(π·R·M·f) / (R·M·sin(π·f))|^N with f = `frequency_hz`/`input_rate_hz`
/// (Hogenauer 1981). 1 at 0 Hz (and at every multiple of the input rate, where the ratio's
/// limit is taken). Frequencies in Hz with the sample rate beside them, as everywhere in
/// [`design`](crate::design); the CIC's one rate is its input rate (the ADC's), the output runs
/// at `input_rate_hz`/R.
///
/// **Accuracy:** the sine is a 12-term Taylor series after exact range reduction, within
/// 1e-15 of the true sine; the result is within about 1e-13 relative for moderate N. A
/// non-positive or non-finite `input_rate_hz` gives NaN.
///
/// ```
/// use tapline::filter::cic_magnitude;
/// // 8 kHz into a CIC with R = 8: nulls at multiples of 8000/(R·M) = 1 kHz; at the output
/// // Nyquist frequency, 500 Hz:
/// assert!(cic_magnitude(3, 8, 1, 1000.0, 8000.0) < 1e-15);
/// let edge = cic_magnitude(3, 8, 1, 500.0, 8000.0);
/// assert!((edge - 0.263041).abs() < 1e-6); // |sin(π/2)/(8 sin(π/16))|^3
/// assert_eq!(cic_magnitude(3, 8, 1, 0.0, 8000.0), 1.0);
/// assert!(cic_magnitude(3, 8, 1, 500.0, 0.0).is_nan()); // no sample rate
/// ```
#[must_use]
pub fn cic_magnitude(
    stages: usize,
    rate: usize,
    delay: usize,
    frequency_hz: f64,
    input_rate_hz: f64,
) -> f64 {
    if !(input_rate_hz.is_finite() && input_rate_hz > 0.0) {
        return f64::NAN;
    }
    magnitude_at(stages, rate, delay, frequency_hz / input_rate_hz)
}

/// [`cic_magnitude`] at `f` cycles per input sample.
fn magnitude_at(stages: usize, rate: usize, delay: usize, f: f64) -> f64 {
    let rm = (rate * delay) as f64;
    let den = rm * sin_pi(f);
    let ratio = if den == 0.0 {
        1.0
    } else {
        (sin_pi(rm * f) / den).abs()
    };
    let mut m = 1.0;
    for _ in 0..stages {
        m *= ratio;
    }
    m
}

/// The largest compensator [`cic_compensator`] designs.
const MAX_HALF: usize = 16;

/// A K-tap symmetric FIR (K odd, at most 31), run at the CIC's *output* rate, whose response
/// approximates the inverse of the CIC's passband droop from 0 to `passband_hz`, for a CIC
/// whose input runs at `input_rate_hz` (as [`cic_magnitude`]: Hz and the input rate; the
/// passband must lie inside (0, `input_rate_hz`/(2R)), below the output Nyquist frequency).
///
/// **Method:** weighted least squares on 256 equally spaced frequencies f in [0, passband]
/// (f in cycles per output sample, passband = `passband_hz`·R/`input_rate_hz`): the
/// taps c minimise Σ_f (C(f)·D(f) − 1)², where D is the CIC's normalised magnitude at the output
/// rate (D(f) = [`cic_magnitude`] at f/R of the input rate) and C(f) = c₀ + 2·Σ_p c_p·cos(2πpf) is the
/// compensator's zero-phase response; i.e. the product's deviation from flat is minimised, not
/// the compensator's distance from 1/D. The normal equations are solved by Gaussian
/// elimination (they are symmetric positive definite). Nothing constrains the response above
/// the passband: a short compensator rises toward the output Nyquist frequency, so the CIC's
/// own rejection must suffice there. The taps sum to about 1 (unity DC gain) — check before
/// quantizing.
///
/// **Measured** (tests/cic.rs, on a grid independent of the design's): N = 3, R = 10, M = 1,
/// passband 0.2 of the output rate — the droop of 1.72 dB falls to 0.097 dB with 3 taps and
/// 0.008 dB with 5; N = 5, R = 16, passband 0.3 — 6.61 dB falls to 0.055 dB with 7 taps.
///
/// # Errors
/// [`Error::InvalidPassband`] when `input_rate_hz` is not positive and finite, or
/// `passband_hz` is not inside (0, `input_rate_hz`/(2R)), or the equations are too
/// ill-conditioned to solve (a passband too narrow for K taps).
///
/// ```
/// use tapline::filter::{cic_compensator, cic_magnitude};
/// // 10 kHz into a CIC with R = 10 (1 kHz out), passband to 200 Hz.
/// let taps = cic_compensator::<5>(3, 10, 1, 200.0, 10_000.0)?;
/// assert!((taps.iter().sum::<f64>() - 1.0).abs() < 0.01); // about unity DC gain
/// assert_eq!(taps[0], taps[4]); // symmetric: linear phase
/// // Edge case: a passband at the output Nyquist frequency (500 Hz) is refused.
/// assert!(cic_compensator::<5>(3, 10, 1, 500.0, 10_000.0).is_err());
/// # Ok::<(), tapline::Error>(())
/// ```
pub fn cic_compensator<const K: usize>(
    stages: usize,
    rate: usize,
    delay: usize,
    passband_hz: f64,
    input_rate_hz: f64,
) -> Result<[f64; K], Error> {
    const {
        assert!(
            K % 2 == 1 && K < 2 * MAX_HALF,
            "K must be odd and at most 31"
        )
    };
    if !(input_rate_hz.is_finite() && input_rate_hz > 0.0) {
        return Err(Error::InvalidPassband);
    }
    // Cycles per output sample.
    let passband = passband_hz * rate.max(1) as f64 / input_rate_hz;
    if !(passband > 0.0 && passband < 0.5) {
        return Err(Error::InvalidPassband);
    }
    let n = K / 2 + 1; // unknowns: c_0 … c_(K/2)
    const GRID: usize = 256;
    // Augmented normal equations [AᵀA | Aᵀ1], rows a_p(f) = D(f)·basis_p(f).
    let mut system = [[0.0f64; MAX_HALF + 1]; MAX_HALF];
    for g in 0..GRID {
        let f = passband * g as f64 / (GRID - 1) as f64;
        let droop = magnitude_at(stages, rate, delay, f / rate.max(1) as f64);
        let mut row = [0.0f64; MAX_HALF];
        for (p, a) in row.iter_mut().enumerate().take(n) {
            let basis = if p == 0 {
                1.0
            } else {
                2.0 * cos_two_pi(p as f64 * f)
            };
            *a = droop * basis;
        }
        for (eq, &ai) in system.iter_mut().zip(&row).take(n) {
            for (cell, &aj) in eq.iter_mut().zip(&row).take(n) {
                *cell += ai * aj;
            }
            if let Some(rhs) = eq.get_mut(n) {
                *rhs += ai;
            }
        }
    }
    // Forward elimination without pivoting (symmetric positive definite).
    for col in 0..n {
        let Some((done, below)) = system.split_at_mut_checked(col + 1) else {
            return Err(Error::InvalidPassband);
        };
        let Some(pivot_row) = done.last() else {
            return Err(Error::InvalidPassband);
        };
        let pivot = pivot_row.get(col).copied().unwrap_or(0.0);
        if !(pivot.is_finite() && pivot.abs() > 1e-300) {
            return Err(Error::InvalidPassband);
        }
        for eq in below.iter_mut().take(n - col - 1) {
            let factor = eq.get(col).copied().unwrap_or(0.0) / pivot;
            for (cell, &p) in eq.iter_mut().zip(pivot_row).skip(col).take(n + 1 - col) {
                *cell -= factor * p;
            }
        }
    }
    // Back substitution.
    let mut c = [0.0f64; MAX_HALF];
    for i in (0..n).rev() {
        let eq = system.get(i).copied().unwrap_or([0.0; MAX_HALF + 1]);
        let known: f64 = eq
            .iter()
            .zip(&c)
            .skip(i + 1)
            .take(n - i - 1)
            .map(|(a, x)| a * x)
            .sum();
        let value = (eq.get(n).copied().unwrap_or(0.0) - known) / eq.get(i).copied().unwrap_or(1.0);
        if !value.is_finite() {
            return Err(Error::InvalidPassband);
        }
        if let Some(slot) = c.get_mut(i) {
            *slot = value;
        }
    }
    // Taps: h[K/2 ± p] = c_p.
    let centre = K / 2;
    Ok(core::array::from_fn(|k| {
        c.get(k.abs_diff(centre)).copied().unwrap_or(0.0)
    }))
}
