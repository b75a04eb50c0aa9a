//! Kaiser's empirical design formulas: the window shape β for a stopband attenuation, and the
//! filter length for an attenuation and a transition width.
//!
//! Source: J. F. Kaiser, "Nonrecursive digital filter design using the I₀-sinh window
//! function", Proc. IEEE Int. Symp. Circuits and Systems, 1974, pp. 20–23; restated in
//! A. V. Oppenheim & R. W. Schafer, *Discrete-Time Signal Processing*, 3rd ed., 2010, §7.6,
//! eqs. 7.75–7.76 (equation numbers from memory). With A the attenuation in dB:
//!
//! * β = 0.1102·(A − 8.7) for A > 50; 0.5842·(A − 21)^0.4 + 0.07886·(A − 21) for
//!   21 ≤ A ≤ 50; 0 for A < 21.
//! * N − 1 = (A − 7.95) / (2.285·Δω), Δω the transition width in radians per sample. Kaiser's
//!   paper has 7.95; Oppenheim & Schafer round it to 8, which can give one tap fewer. We use
//!   7.95 and round N up.
//!
//! The formulas are fits: a design made with them can miss A by a few tenths of a dB in its
//! first stopband lobe. [`Spec::kaiser`](super::Spec::kaiser) measures its result and
//! lengthens it until it meets the spec.

use super::DesignError;
use super::{MAX_ATTENUATION_DB, MAX_DESIGN_TAPS, Real, nyquist};

fn check_db<R: Real>(a: R) -> Result<R, DesignError> {
    if a.is_finite() && a > R::ZERO && a <= R::from_f64(MAX_ATTENUATION_DB) {
        Ok(a)
    } else {
        Err(DesignError::InvalidDecibels)
    }
}

/// Kaiser's β for a stopband attenuation of `attenuation_db` dB (a positive number).
///
/// **Accuracy:** `f64` to rounding (the published checks β(60) = 5.65326, β(65) = 6.20426 hold
/// to 10⁻⁵); `f32` within 2·10⁻⁶ of `f64`.
///
/// # Errors
/// [`DesignError::InvalidDecibels`] unless 0 < `attenuation_db` ≤ [`MAX_ATTENUATION_DB`] and finite.
///
/// ```
/// use tapline::design::kaiser::beta_for_attenuation;
/// assert!((beta_for_attenuation(60.0f64)? - 5.65326).abs() < 1e-5);
/// assert_eq!(beta_for_attenuation(20.0f32)?, 0.0); // below 21 dB: the rectangle
/// assert!(beta_for_attenuation(-3.0f32).is_err());
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
pub fn beta_for_attenuation<R: Real>(attenuation_db: R) -> Result<R, DesignError> {
    let a = check_db(attenuation_db)?;
    let c = R::from_f64;
    Ok(if a > c(50.0) {
        c(0.1102) * (a - c(8.7))
    } else if a >= c(21.0) {
        let d = a - c(21.0);
        // d = 0 would take ln(0); the power is 0 there.
        let p = if d > R::ZERO { d.powf(c(0.4)) } else { R::ZERO };
        c(0.5842) * p + c(0.07886) * d
    } else {
        R::ZERO
    })
}

/// Kaiser's estimate of the number of taps for `attenuation_db` of stopband attenuation and a
/// transition band `transition_hz` wide, at `sample_rate_hz`:
/// N = ⌈(A − 7.95) / (2.285·2π·Δf/fs)⌉ + 1, at least 1.
///
/// The estimate says nothing about parity: a highpass or bandstop needs an odd N (round up).
/// Below about 21 dB the formula is outside the range Kaiser fitted it on.
///
/// **Accuracy:** the arithmetic is exact to rounding; the count can differ by one tap between
/// `f32` and `f64` when the quotient lies within 10⁻⁵ of an integer.
///
/// # Errors
/// [`DesignError::InvalidDecibels`]; [`DesignError::FrequencyOutOfRange`] for a bad sample rate;
/// [`DesignError::InvalidTransition`] unless 0 < `transition_hz` ≤ fs/2 and the result is at most
/// [`MAX_DESIGN_TAPS`].
///
/// ```
/// use tapline::design::kaiser::length_for_transition;
/// // 65 dB, transition 24 Hz at 1 kHz: 167 taps.
/// assert_eq!(length_for_transition(65.0f64, 24.0, 1000.0)?, 167);
/// assert!(length_for_transition(65.0f32, 0.0, 1000.0).is_err()); // no transition band
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
pub fn length_for_transition<R: Real>(
    attenuation_db: R,
    transition_hz: R,
    sample_rate_hz: R,
) -> Result<usize, DesignError> {
    let a = check_db(attenuation_db)?;
    let half = nyquist(sample_rate_hz)?;
    if !(transition_hz.is_finite() && transition_hz > R::ZERO && transition_hz <= half) {
        return Err(DesignError::InvalidTransition);
    }
    let c = R::from_f64;
    let width = transition_hz / sample_rate_hz; // cycles per sample
    let order = (a - c(7.95)) / (c(2.285 * 2.0) * R::PI * width);
    let order = order.to_f64();
    if !(order < MAX_DESIGN_TAPS as f64) {
        return Err(DesignError::InvalidTransition);
    }
    if order <= 0.0 {
        return Ok(1);
    }
    // ⌈order⌉ without std: the cast truncates, positive values round up unless whole.
    let whole = order as usize;
    let ceil = if (whole as f64) < order {
        whole + 1
    } else {
        whole
    };
    Ok(ceil + 1)
}

/// The inverse estimate: the attenuation in dB Kaiser's formula predicts for `taps` taps and a
/// transition band `transition_hz` wide: A = 2.285·(N − 1)·2π·Δf/fs + 7.95.
///
/// **Accuracy:** exact to rounding.
///
/// # Errors
/// [`DesignError::FrequencyOutOfRange`] for a bad sample rate; [`DesignError::InvalidTransition`] unless
/// 0 < `transition_hz` ≤ fs/2; [`DesignError::TooShort`] for 0 taps.
///
/// ```
/// use tapline::design::kaiser::attenuation_for_length;
/// // 211 taps, transition 3.75 % of half the sample rate: 64.48 dB.
/// let a = attenuation_for_length(211, 0.0375f64, 2.0)?;
/// assert!((a - 64.48099630593983).abs() < 1e-9);
/// assert!(attenuation_for_length(0, 1.0f32, 10.0).is_err());
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
pub fn attenuation_for_length<R: Real>(
    taps: usize,
    transition_hz: R,
    sample_rate_hz: R,
) -> Result<R, DesignError> {
    let half = nyquist(sample_rate_hz)?;
    if taps == 0 {
        return Err(DesignError::TooShort {
            minimum: 1,
            found: 0,
        });
    }
    if !(transition_hz.is_finite() && transition_hz > R::ZERO && transition_hz <= half) {
        return Err(DesignError::InvalidTransition);
    }
    let c = R::from_f64;
    Ok(
        c(2.285 * 2.0) * R::PI * R::from_usize(taps - 1) * (transition_hz / sample_rate_hz)
            + c(7.95),
    )
}
