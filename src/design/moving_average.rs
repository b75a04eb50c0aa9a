//! The moving average (boxcar): N equal taps.

use super::DesignError;
use super::Real;

/// Fills `taps` with the N-point moving average, every tap 1/N (DC gain 1).
///
/// Its response is sin(πNf)/(N·sin πf) (f in cycles per sample): nulls at every multiple of
/// fs/N, first sidelobe −13.26 dB, white-noise power gain 1/N (S. W. Smith, *The Scientist and
/// Engineer's Guide to Digital Signal Processing*, 1997, ch. 15; from memory). To place a null
/// on mains hum at f_hum with a sample rate fs, choose N = fs/f_hum (or a multiple).
///
/// **Accuracy:** 1/N rounded once (½ ulp). In Q15, quantize with [`quantize`](super::quantize),
/// which keeps Σ taps = 2^15 exactly.
///
/// # Errors
/// [`DesignError::TooShort`] for empty `taps`.
///
/// ```
/// use tapline::design::moving_average;
/// let mut h = [0.0f32; 4];
/// moving_average(&mut h)?;
/// assert_eq!(h, [0.25; 4]);
/// assert!(moving_average::<f32>(&mut []).is_err());
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
pub fn moving_average<R: Real>(taps: &mut [R]) -> Result<(), DesignError> {
    if taps.is_empty() {
        return Err(DesignError::TooShort {
            minimum: 1,
            found: 0,
        });
    }
    let v = R::ONE / R::from_usize(taps.len());
    taps.fill(v);
    Ok(())
}
