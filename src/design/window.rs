//! Window functions in their symmetric form, the form filter design needs.

use super::DesignError;
use super::{MAX_KAISER_BETA, Real};

/// A window, evaluated in its **symmetric** form: for length N and M = N − 1, sample n uses
/// x = n/M, so w\[n\] = w\[M − n\] and the ends are both included (length 1 gives \[1\]).
///
/// | window | w\[n\], x = n/M |
/// |---|---|
/// | `Rectangular` | 1 |
/// | `Triangular` | 1 − \|2x − 1\| (zero at both ends: the Bartlett form) |
/// | `Hann` | 0.5 − 0.5·cos 2πx |
/// | `Hamming` | 0.54 − 0.46·cos 2πx |
/// | `Blackman` | 0.42 − 0.5·cos 2πx + 0.08·cos 4πx (clamped at 0: it is −1.4·10⁻¹⁷ at the ends in f64) |
/// | `Kaiser { beta }` | I₀(β·√(1 − (2x − 1)²)) / I₀(β) |
///
/// Definitions as in A. V. Oppenheim & R. W. Schafer, *Discrete-Time Signal Processing*, 3rd
/// ed., 2010, §7.5 (eqs. 7.60a–e and 7.72; equation numbers from memory).
///
/// **Accuracy:** `f64` within 4·10⁻¹⁶ of the definition; `f32` within 6·10⁻⁷ absolute of the
/// `f64` values (Kaiser: 2·10⁻⁶ relative, from the I₀ series) — checked in `tests/design.rs`.
///
/// ```
/// use tapline::design::Window;
/// let mut w = [0.0f64; 5];
/// Window::Hamming.fill(&mut w)?;
/// assert!((w[0] - 0.08).abs() < 1e-15 && w[2] == 1.0 && w[1] == w[3]);
/// // Length 1 is the edge case: every window is [1].
/// let mut one = [0.0f32; 1];
/// Window::Kaiser { beta: 8.0 }.fill(&mut one)?;
/// assert_eq!(one, [1.0]);
/// assert!(Window::Kaiser { beta: -1.0f32 }.fill(&mut one).is_err());
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum Window<R> {
    /// No tapering: the sharpest transition, the worst sidelobes (about −13 dB).
    Rectangular,
    /// The triangle with zero end samples (Bartlett).
    Triangular,
    /// The raised cosine reaching zero at both ends.
    Hann,
    /// The raised cosine on a 0.08 pedestal.
    Hamming,
    /// Three cosine terms, 0.42 / 0.5 / 0.08.
    Blackman,
    /// Kaiser's I₀ window with shape parameter β (0 gives the rectangle); see
    /// [`kaiser::beta_for_attenuation`](super::kaiser::beta_for_attenuation).
    Kaiser {
        /// Shape parameter, 0 ≤ β ≤ [`MAX_KAISER_BETA`].
        beta: R,
    },
}

impl<R: Real> Window<R> {
    /// Checks the window's parameter.
    fn check(self) -> Result<(), DesignError> {
        match self {
            Window::Kaiser { beta }
                if !(beta.is_finite()
                    && beta >= R::ZERO
                    && beta <= R::from_f64(MAX_KAISER_BETA)) =>
            {
                Err(DesignError::KaiserBetaOutOfRange)
            }
            _ => Ok(()),
        }
    }

    /// Fills `out` with the symmetric window of length `out.len()`. The second half is a mirror
    /// copy of the first, so the result is exactly symmetric.
    ///
    /// # Errors
    /// [`DesignError::TooShort`] for an empty `out`; [`DesignError::KaiserBetaOutOfRange`].
    pub fn fill(self, out: &mut [R]) -> Result<(), DesignError> {
        self.check()?;
        let len = out.len();
        if len == 0 {
            return Err(DesignError::TooShort {
                minimum: 1,
                found: 0,
            });
        }
        let kaiser_norm = self.kaiser_norm();
        for n in 0..len.div_ceil(2) {
            let v = self.eval(n, len - 1, kaiser_norm);
            if let Some(slot) = out.get_mut(n) {
                *slot = v;
            }
            if let Some(slot) = out.get_mut(len - 1 - n) {
                *slot = v;
            }
        }
        Ok(())
    }

    /// Sample `n` of the symmetric window of length `len` (0 for `n ≥ len`: the window's support
    /// ends there).
    ///
    /// # Errors
    /// [`DesignError::TooShort`] for `len` = 0; [`DesignError::KaiserBetaOutOfRange`].
    ///
    /// ```
    /// use tapline::design::Window;
    /// assert_eq!(Window::<f64>::Triangular.value(2, 5)?, 1.0);
    /// assert_eq!(Window::<f64>::Hann.value(7, 5)?, 0.0); // outside the window
    /// # Ok::<(), tapline::design::DesignError>(())
    /// ```
    pub fn value(self, n: usize, len: usize) -> Result<R, DesignError> {
        self.check()?;
        if len == 0 {
            return Err(DesignError::TooShort {
                minimum: 1,
                found: 0,
            });
        }
        if n >= len {
            return Ok(R::ZERO);
        }
        // Evaluate the first half and mirror, as `fill` does, so both give the same bits.
        let n = n.min(len - 1 - n);
        Ok(self.eval(n, len - 1, self.kaiser_norm()))
    }

    fn kaiser_norm(self) -> R {
        match self {
            Window::Kaiser { beta } => R::ONE / bessel_i0(beta),
            _ => R::ONE,
        }
    }

    /// w\[n\] for M = len − 1, n ≤ M.
    fn eval(self, n: usize, m: usize, kaiser_norm: R) -> R {
        if m == 0 {
            return R::ONE;
        }
        let x = R::from_usize(n) / R::from_usize(m);
        let cos_turn = |k: R| (k * x).sin_cos_turns().1;
        let two = R::from_f64(2.0);
        match self {
            Window::Rectangular => R::ONE,
            // 2n/M or 2 − 2n/M; n ≤ M/2 here, so 1 − |2x − 1| = 2x.
            Window::Triangular => two * x,
            Window::Hann => {
                // sin²(πx): relative accuracy near the ends, where 0.5 − 0.5·cos cancels.
                let s = (x * R::from_f64(0.5)).sin_cos_turns().0;
                s * s
            }
            Window::Hamming => R::from_f64(0.54) - R::from_f64(0.46) * cos_turn(R::ONE),
            Window::Blackman => {
                let v = R::from_f64(0.42) - R::from_f64(0.5) * cos_turn(R::ONE)
                    + R::from_f64(0.08) * cos_turn(two);
                v.max_of(R::ZERO)
            }
            Window::Kaiser { beta } => {
                // √(1 − (2x − 1)²) = (2/M)·√(n·(M − n)): the product is an exact integer.
                let r = two * (R::from_usize(n) * R::from_usize(m - n)).sqrt() / R::from_usize(m);
                bessel_i0(beta * r) * kaiser_norm
            }
        }
    }
}

/// I₀(x), the modified Bessel function of the first kind of order 0, by its power series
/// Σ ((x/2)^k / k!)². All terms are positive, so the sum has no cancellation: relative error
/// about (terms)·ε. The loop stops when a term no longer changes the sum, or after 200 terms
/// (x ≤ 40 needs about 60).
pub(crate) fn bessel_i0<R: Real>(x: R) -> R {
    let q = x * x * R::from_f64(0.25);
    let mut term = R::ONE;
    let mut sum = R::ONE;
    for k in 1..200usize {
        let kr = R::from_usize(k);
        term = term * q / (kr * kr);
        sum += term;
        if term <= sum * R::EPSILON * R::from_f64(0.25) {
            break;
        }
    }
    sum
}
