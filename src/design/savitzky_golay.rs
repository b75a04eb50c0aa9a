//! Savitzky–Golay smoothing and first-derivative taps: the least-squares polynomial fit over a
//! sliding window, evaluated (or differentiated) at the window's centre.
//!
//! Source: A. Savitzky & M. J. E. Golay, "Smoothing and differentiation of data by simplified
//! least squares procedures", Analytical Chemistry 36(8), 1964, pp. 1627–1639, with the
//! corrections of J. Steinier, Y. Termonia & J. Deltour, Analytical Chemistry 44(11), 1972,
//! pp. 1906–1909.
//!
//! Method: instead of solving the normal equations (whose Gram matrix is badly conditioned in
//! `f32` for orders above 3 or 4), the fit is expanded in polynomials orthogonal on the window's
//! points u = k/m, k = −m..=m. On symmetric points they obey p₀ = 1, p₁ = u,
//! p_{j+1} = u·p_j − β_j·p_{j−1} with β_j = ‖p_j‖²/‖p_{j−1}‖², and the fitted value at the centre
//! is Σ_k x_k·Σ_j p_j(0)·p_j(u_k)/‖p_j‖² (the derivative uses p_j′(0) and a factor 1/m).

use super::DesignError;
use super::{MAX_POLYNOMIAL_ORDER, Real};

/// Which quantity the taps estimate.
#[derive(Clone, Copy, PartialEq)]
enum Estimate {
    Value,
    Slope,
}

/// Fills `taps` (an odd window length L = 2m + 1) with the Savitzky–Golay smoother of
/// polynomial order `order`: the output is the value at the window centre of the
/// least-squares polynomial through the last L samples, delayed by m samples.
///
/// Orders come in pairs: an even order 2q and the odd order 2q + 1 give the same smoother (the
/// odd term has zero weight at the centre). The taps are symmetric, Σ taps = 1, and the
/// white-noise power gain Σ taps² equals the centre tap.
///
/// **Accuracy:** `f64` within 10⁻¹⁵ of the exact rationals (5-point quadratic
/// (−3, 12, 17, 12, −3)/35); `f32` within 2·10⁻⁷ of `f64` for L ≤ 101, order ≤ 6 (checked in
/// `tests/design.rs`).
///
/// # Errors
/// [`DesignError::OddLengthRequired`] for an even length; [`DesignError::TooShort`] for an empty slice;
/// [`DesignError::PolynomialOrder`] when `order ≥ L` or `order >` [`MAX_POLYNOMIAL_ORDER`].
///
/// ```
/// use tapline::design::savitzky_golay_smoother;
/// let mut h = [0.0f64; 5];
/// savitzky_golay_smoother(2, &mut h)?;
/// let exact = [-3.0 / 35.0, 12.0 / 35.0, 17.0 / 35.0, 12.0 / 35.0, -3.0 / 35.0];
/// assert!(h.iter().zip(exact).all(|(a, b)| (a - b).abs() < 1e-15));
/// // Order L − 1 fits every point exactly: the smoother passes the centre sample through.
/// savitzky_golay_smoother(4, &mut h)?;
/// assert!((h[2] - 1.0).abs() < 1e-12 && h[0].abs() < 1e-12);
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
pub fn savitzky_golay_smoother<R: Real>(order: usize, taps: &mut [R]) -> Result<(), DesignError> {
    fit(order, taps, Estimate::Value)
}

/// Fills `taps` (an odd window length L = 2m + 1) with the Savitzky–Golay first-derivative
/// estimator of polynomial order `order`, in **filter order** (the order a [`Fir`](crate::Fir)
/// multiplies: taps\[i\] weights the sample i steps back). The output is the slope, per sample,
/// of the least-squares polynomial at the window centre, delayed by m samples; multiply by the
/// sample rate for units per second.
///
/// Published tables list the weights in data order (the weight of x\[centre + k\] for
/// k = −m..m); filter order is that list reversed, which for these antisymmetric taps flips
/// every sign: the 5-point quadratic table (−2, −1, 0, 1, 2)/10 is `[0.2, 0.1, 0, −0.1, −0.2]`.
/// Orders pair up the other way round from smoothing: 2q − 1 and 2q give the same slope.
/// Σ taps = 0 and Σ i·taps\[i\] = −1 (a unit ramp gives slope 1).
///
/// **Accuracy:** as [`savitzky_golay_smoother`].
///
/// # Errors
/// As [`savitzky_golay_smoother`], and [`DesignError::PolynomialOrder`] for order 0 (a constant has no
/// slope).
///
/// ```
/// use tapline::design::savitzky_golay_slope;
/// let mut h = [0.0f64; 5];
/// savitzky_golay_slope(2, &mut h)?;
/// let expected = [0.2, 0.1, 0.0, -0.1, -0.2];
/// assert!(h.iter().zip(expected).all(|(a, b)| (a - b).abs() < 1e-15));
/// assert!(savitzky_golay_slope(0, &mut h).is_err());
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
pub fn savitzky_golay_slope<R: Real>(order: usize, taps: &mut [R]) -> Result<(), DesignError> {
    fit(order, taps, Estimate::Slope)
}

fn fit<R: Real>(order: usize, taps: &mut [R], estimate: Estimate) -> Result<(), DesignError> {
    let len = taps.len();
    if len == 0 {
        return Err(DesignError::TooShort {
            minimum: 1,
            found: 0,
        });
    }
    if len % 2 == 0 {
        return Err(DesignError::OddLengthRequired { found: len });
    }
    if order >= len || order > MAX_POLYNOMIAL_ORDER || (estimate == Estimate::Slope && order == 0) {
        return Err(DesignError::PolynomialOrder { order, length: len });
    }
    let half = len / 2;
    if half == 0 {
        // One point, order 0: the fit is the point itself.
        for t in taps.iter_mut() {
            *t = R::ONE;
        }
        return Ok(());
    }
    let m = R::from_usize(half);
    let u_of = |i: usize| (R::from_usize(i) - m) / m; // data position k = i − m, scaled to [−1, 1]

    // β_j and ‖p_j‖², built one order at a time: ‖p_j‖² needs p_j at every point, which the
    // recurrence gives from the β's already known.
    let mut beta = [R::ZERO; MAX_POLYNOMIAL_ORDER + 1];
    let mut norm = [R::ZERO; MAX_POLYNOMIAL_ORDER + 1];
    for j in 0..=order {
        let mut s = R::ZERO;
        for i in 0..len {
            let p = orthogonal_at(u_of(i), j, &beta);
            s += p * p;
        }
        if let Some(slot) = norm.get_mut(j) {
            *slot = s;
        }
        if j >= 1 {
            if let (Some(b), Some(&n1), Some(&n0)) = (beta.get_mut(j), norm.get(j), norm.get(j - 1))
            {
                *b = n1 / n0;
            }
        }
    }

    // p_j(0) and p_j'(0) from the same recurrence at u = 0.
    let mut at0 = [R::ZERO; MAX_POLYNOMIAL_ORDER + 1];
    let mut slope0 = [R::ZERO; MAX_POLYNOMIAL_ORDER + 1];
    let (mut p_prev, mut p) = (R::ZERO, R::ONE);
    let (mut d_prev, mut d) = (R::ZERO, R::ZERO);
    for j in 0..=order {
        if let (Some(a), Some(s)) = (at0.get_mut(j), slope0.get_mut(j)) {
            *a = p;
            *s = d;
        }
        let b = beta.get(j).copied().unwrap_or(R::ZERO);
        // p_{j+1} = u·p_j − β_j·p_{j−1}: at u = 0 the first term vanishes; its derivative is p_j.
        let p_next = -b * p_prev;
        let d_next = p - b * d_prev;
        (p_prev, p) = (p, p_next);
        (d_prev, d) = (d, d_next);
    }

    let weights = match estimate {
        Estimate::Value => &at0,
        Estimate::Slope => &slope0,
    };
    let scale = match estimate {
        Estimate::Value => R::ONE,
        Estimate::Slope => R::ONE / m, // d/dk = (1/m)·d/du
    };
    // Filter order: taps[i] weights the sample i steps back, data position k = m − i.
    for (i, t) in taps.iter_mut().enumerate() {
        let u = u_of(len - 1 - i);
        let mut c = R::ZERO;
        for j in 0..=order {
            let (w, n) = match (weights.get(j), norm.get(j)) {
                (Some(&w), Some(&n)) => (w, n),
                _ => (R::ZERO, R::ONE),
            };
            if w != R::ZERO {
                c += w * orthogonal_at(u, j, &beta) / n;
            }
        }
        *t = c * scale;
    }
    // Mirror so the symmetry (smoother) or antisymmetry (slope) is exact.
    for i in 0..half {
        let j = len - 1 - i;
        if let (Some(&a), Some(&b)) = (taps.get(i), taps.get(j)) {
            let v = (a + if estimate == Estimate::Value { b } else { -b }) * R::from_f64(0.5);
            if let Some(t) = taps.get_mut(i) {
                *t = v;
            }
            if let Some(t) = taps.get_mut(j) {
                *t = if estimate == Estimate::Value { v } else { -v };
            }
        }
    }
    if estimate == Estimate::Slope {
        if let Some(t) = taps.get_mut(half) {
            *t = R::ZERO;
        }
    }
    Ok(())
}

/// p_j(u) by the three-term recurrence with the given β's.
fn orthogonal_at<R: Real>(u: R, j: usize, beta: &[R]) -> R {
    let (mut prev, mut p) = (R::ZERO, R::ONE);
    for k in 0..j {
        let b = beta.get(k).copied().unwrap_or(R::ZERO);
        (prev, p) = (p, u * p - b * prev);
    }
    p
}
