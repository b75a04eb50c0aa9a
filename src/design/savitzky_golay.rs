//! Savitzky–Golay taps: the least-squares polynomial fit over a sliding window, evaluated (or
//! differentiated any number of times) at the window's centre.
//!
//! Source: A. Savitzky & M. J. E. Golay, "Smoothing and differentiation of data by simplified
//! least squares procedures", Analytical Chemistry 36(8), 1964, pp. 1627–1639, with the
//! corrections of J. Steinier, Y. Termonia & J. Deltour, Analytical Chemistry 44(11), 1972,
//! pp. 1906–1909.
//!
//! Method: instead of solving the normal equations (whose Gram matrix is badly conditioned in
//! `f32` for orders above 3 or 4), the fit is expanded in polynomials orthogonal on the window's
//! points scaled to u = k/m, k = −m..=m. On symmetric points they obey p₀ = 1, p₁ = u,
//! p_{j+1} = u·p_j − β_j·p_{j−1} with β_j = ‖p_j‖²/‖p_{j−1}‖², and the d-th derivative of the
//! fit at the centre is Σ_k x_k·Σ_j p_j⁽ᵈ⁾(0)·p_j(u_k)/‖p_j‖², times (m·Δ)^−d for a derivative
//! per unit of the sample spacing Δ. The derivatives at 0 come from the same recurrence
//! differentiated: p_{j+1}⁽ʳ⁾(0) = r·p_j⁽ʳ⁻¹⁾(0) − β_j·p_{j−1}⁽ʳ⁾(0).

use super::DesignError;
use super::{MAX_POLYNOMIAL_ORDER, Real};

/// Fills `taps` (an odd window length L = 2m + 1) with the Savitzky–Golay estimator of the
/// `derivative`-th derivative (0 = the smoothed value itself) of the least-squares polynomial of
/// order `order` through the last L samples, at the window centre (so delayed by m samples),
/// per `spacing`^`derivative`: with `spacing` the time between samples in seconds, a first
/// derivative comes out in units per second, a second in units per second². The d! of the
/// d-th derivative is included (a sampled t² gives 2 for d = 2, not 1).
///
/// **Tap order:** filter order, the order a [`Fir`](crate::Fir) multiplies: taps\[i\] weights
/// the sample i steps back. Published tables list the weights in data order (the weight of
/// x\[centre + k\] for k = −m..m); filter order is that list reversed, which flips every sign
/// of an odd derivative: the 5-point quadratic slope table (−2, −1, 0, 1, 2)/10 is
/// `[0.2, 0.1, 0, −0.1, −0.2]`. (This is scipy's `savgol_coeffs(…, use='conv')` order.)
/// Even derivatives give symmetric taps, odd ones antisymmetric taps with a zero centre.
///
/// Orders pair up: for an even derivative, orders 2q and 2q + 1 give the same taps; for an odd
/// one, 2q − 1 and 2q. Invariants: Σ taps = 1 for d = 0 (and Σ taps² = the centre tap, the
/// white-noise power gain), Σ taps = 0 for d ≥ 1; a sampled polynomial of degree ≤ `order`
/// has its derivative reproduced exactly (to rounding).
///
/// **Accuracy:** `f64` within 10⁻¹⁴ of the exact rationals for L ≤ 41, order ≤ 6 (times
/// spacing^−d); within 5·10⁻¹¹ of scipy 1.17.1's `savgol_coeffs` (scipy's own least-squares
/// error); `f32` within 10⁻⁶ of the largest tap for L ≤ 101, order ≤ 6 (measured 3.7·10⁻⁷
/// against scipy for orders ≤ 3; `tests/design.rs`, `tests/design_scipy.rs`).
///
/// # Errors
/// [`DesignError::TooShort`] for an empty slice; [`DesignError::OddLengthRequired`] for an even
/// length; [`DesignError::PolynomialOrder`] when `order ≥ L` or `order >`
/// [`MAX_POLYNOMIAL_ORDER`]; [`DesignError::DerivativeOrder`] when `derivative > order` (the
/// fitted polynomial's higher derivatives are 0 — almost certainly not what was meant);
/// [`DesignError::InvalidSpacing`] unless `spacing` is positive and finite and
/// (m·`spacing`)^−`derivative` is a finite non-zero number in `R`.
///
/// ```
/// use tapline::design::{DesignError, savitzky_golay};
/// // Second derivative, quadratic fit over 5 points (data order (2, −1, −2, −1, 2)/7,
/// // symmetric, so filter order is the same), at 100 samples per second: per second².
/// let mut h = [0.0f64; 5];
/// savitzky_golay(2, 2, 0.01, &mut h)?;
/// let exact = [2.0, -1.0, -2.0, -1.0, 2.0].map(|n: f64| n / 7.0 / (0.01 * 0.01));
/// assert!(h.iter().zip(exact).all(|(a, b)| (a - b).abs() < 1e-9));
/// // t² sampled every 10 ms: the second derivative is 2 everywhere.
/// let y: f64 = (0..5).map(|i| h[i] * (0.01 * (4 - i) as f64).powi(2)).sum();
/// assert!((y - 2.0).abs() < 1e-9);
/// // Edge cases: a third derivative of a quadratic, a spacing of 0.
/// let r = savitzky_golay(2, 3, 1.0, &mut h);
/// assert!(matches!(r, Err(DesignError::DerivativeOrder { derivative: 3, order: 2, .. })));
/// assert_eq!(savitzky_golay(2, 1, 0.0, &mut h), Err(DesignError::InvalidSpacing));
/// # Ok::<(), DesignError>(())
/// ```
pub fn savitzky_golay<R: Real>(
    order: usize,
    derivative: usize,
    spacing: R,
    taps: &mut [R],
) -> Result<(), DesignError> {
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
    if order >= len || order > MAX_POLYNOMIAL_ORDER {
        return Err(DesignError::PolynomialOrder { order, length: len });
    }
    if derivative > order {
        return Err(DesignError::DerivativeOrder { derivative, order });
    }
    if !(spacing.is_finite() && spacing > R::ZERO) {
        return Err(DesignError::InvalidSpacing);
    }
    let half = len / 2;
    if half == 0 {
        // One point, order 0 (so derivative 0): the fit is the point itself.
        for t in taps.iter_mut() {
            *t = R::ONE;
        }
        return Ok(());
    }
    let m = R::from_usize(half);
    // d/dt = (1/(m·Δ))·d/du: the scale of the d-th derivative, refused if it leaves R.
    let step = R::ONE / (m * spacing);
    let mut scale = R::ONE;
    for _ in 0..derivative {
        scale *= step;
    }
    if !(scale.is_finite() && scale > R::ZERO) {
        return Err(DesignError::InvalidSpacing);
    }
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

    let weights = derivatives_at_zero(order, derivative, &beta);
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
    // Mirror so the symmetry (even derivative) or antisymmetry (odd) is exact.
    let odd = derivative % 2 == 1;
    for i in 0..half {
        let j = len - 1 - i;
        if let (Some(&a), Some(&b)) = (taps.get(i), taps.get(j)) {
            let v = (a + if odd { -b } else { b }) * R::from_f64(0.5);
            if let Some(t) = taps.get_mut(i) {
                *t = v;
            }
            if let Some(t) = taps.get_mut(j) {
                *t = if odd { -v } else { v };
            }
        }
    }
    if odd {
        if let Some(t) = taps.get_mut(half) {
            *t = R::ZERO;
        }
    }
    Ok(())
}

/// p_j⁽ᵈ⁾(0) for j = 0..=order: the recurrence p_{j+1} = u·p_j − β_j·p_{j−1} differentiated r
/// times is p_{j+1}⁽ʳ⁾ = u·p_j⁽ʳ⁾ + r·p_j⁽ʳ⁻¹⁾ − β_j·p_{j−1}⁽ʳ⁾, whose first term vanishes at
/// u = 0. All orders r ≤ d are carried, since order r needs order r − 1.
fn derivatives_at_zero<R: Real>(
    order: usize,
    derivative: usize,
    beta: &[R],
) -> [R; MAX_POLYNOMIAL_ORDER + 1] {
    const W: usize = MAX_POLYNOMIAL_ORDER + 1;
    // prev[r] = p_{j−1}⁽ʳ⁾(0), here[r] = p_j⁽ʳ⁾(0); p_0 = 1, p_{−1} = 0.
    let mut prev = [R::ZERO; W];
    let mut here = [R::ZERO; W];
    if let Some(h) = here.first_mut() {
        *h = R::ONE;
    }
    let mut out = [R::ZERO; W];
    for j in 0..=order {
        if let (Some(o), Some(&h)) = (out.get_mut(j), here.get(derivative)) {
            *o = h;
        }
        let b = beta.get(j).copied().unwrap_or(R::ZERO);
        let mut next = [R::ZERO; W];
        for r in 0..=derivative {
            let lower = if r == 0 {
                R::ZERO
            } else {
                here.get(r - 1).copied().unwrap_or(R::ZERO)
            };
            let back = prev.get(r).copied().unwrap_or(R::ZERO);
            if let Some(n) = next.get_mut(r) {
                *n = R::from_usize(r) * lower - b * back;
            }
        }
        (prev, here) = (here, next);
    }
    out
}

/// Fills `taps` (an odd window length L = 2m + 1) with the Savitzky–Golay smoother of
/// polynomial order `order`: [`savitzky_golay`]`(order, 0, 1.0, taps)`, the value at the window
/// centre of the least-squares polynomial through the last L samples, delayed by m samples.
///
/// Orders come in pairs: an even order 2q and the odd order 2q + 1 give the same smoother (the
/// odd term has zero weight at the centre). The taps are symmetric, Σ taps = 1, and the
/// white-noise power gain Σ taps² equals the centre tap.
///
/// **Accuracy:** as [`savitzky_golay`] (5-point quadratic (−3, 12, 17, 12, −3)/35 within
/// 10⁻¹⁵ in `f64`).
///
/// # Errors
/// As [`savitzky_golay`]: [`DesignError::OddLengthRequired`], [`DesignError::TooShort`],
/// [`DesignError::PolynomialOrder`].
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
    savitzky_golay(order, 0, R::ONE, taps)
}

/// Fills `taps` (an odd window length L = 2m + 1) with the Savitzky–Golay first-derivative
/// estimator of polynomial order `order`, per sample: [`savitzky_golay`]`(order, 1, 1.0, taps)`
/// (multiply by the sample rate for units per second, or pass the spacing to
/// [`savitzky_golay`]). Filter order, as there: the 5-point quadratic table
/// (−2, −1, 0, 1, 2)/10 is `[0.2, 0.1, 0, −0.1, −0.2]`. Σ taps = 0 and Σ i·taps\[i\] = −1 (a
/// unit ramp gives slope 1).
///
/// **Accuracy:** as [`savitzky_golay`].
///
/// # Errors
/// As [`savitzky_golay`]; order 0 (a constant has no slope) is
/// [`DesignError::DerivativeOrder`].
///
/// ```
/// use tapline::design::{DesignError, savitzky_golay_slope};
/// let mut h = [0.0f64; 5];
/// savitzky_golay_slope(2, &mut h)?;
/// let expected = [0.2, 0.1, 0.0, -0.1, -0.2];
/// assert!(h.iter().zip(expected).all(|(a, b)| (a - b).abs() < 1e-15));
/// assert!(matches!(savitzky_golay_slope(0, &mut h), Err(DesignError::DerivativeOrder { .. })));
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
pub fn savitzky_golay_slope<R: Real>(order: usize, taps: &mut [R]) -> Result<(), DesignError> {
    savitzky_golay(order, 1, R::ONE, taps)
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
