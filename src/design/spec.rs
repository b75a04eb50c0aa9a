//! A filter spec as a firmware engineer writes it, the Kaiser design that meets it, and the
//! measurement of any taps (float or quantized) against it.

use super::DesignError;
use super::{Band, GainRange, Real, Window, gain_range, inside, kaiser, nyquist, windowed_sinc};
use crate::Error;
use crate::num::{FixedPoint, Sample};

/// The band layout of a spec: edges in Hz, strictly increasing, each strictly between 0 and
/// half the sample rate.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum Shape<R> {
    /// Pass 0..=`pass_hz`, stop `stop_hz`..=fs/2.
    Lowpass {
        /// Passband edge.
        pass_hz: R,
        /// Stopband edge.
        stop_hz: R,
    },
    /// Stop 0..=`stop_hz`, pass `pass_hz`..=fs/2.
    Highpass {
        /// Stopband edge.
        stop_hz: R,
        /// Passband edge.
        pass_hz: R,
    },
    /// Stop below `stop_low_hz`, pass `pass_low_hz`..=`pass_high_hz`, stop above `stop_high_hz`.
    Bandpass {
        /// Upper edge of the lower stopband.
        stop_low_hz: R,
        /// Lower edge of the passband.
        pass_low_hz: R,
        /// Upper edge of the passband.
        pass_high_hz: R,
        /// Lower edge of the upper stopband.
        stop_high_hz: R,
    },
    /// Pass below `pass_low_hz`, stop `stop_low_hz`..=`stop_high_hz`, pass above `pass_high_hz`.
    Bandstop {
        /// Upper edge of the lower passband.
        pass_low_hz: R,
        /// Lower edge of the stopband.
        stop_low_hz: R,
        /// Upper edge of the stopband.
        stop_high_hz: R,
        /// Lower edge of the upper passband.
        pass_high_hz: R,
    },
}

/// A filter spec: sample rate, band edges, the largest passband ripple and the smallest
/// stopband attenuation.
///
/// * `passband_ripple_db` — peak to peak: 20·log10(max|H|/min|H|) over the passband(s).
/// * `stopband_attenuation_db` — −20·log10(max|H|) over the stopband(s), relative to a passband
///   gain of 1.
///
/// ```
/// use tapline::design::{Shape, Spec};
/// // An invented silo scale: 1 kHz, pass to 5 Hz, stop from 50 Hz (mains hum), 60 dB.
/// let spec = Spec {
///     sample_rate_hz: 1000.0f32,
///     shape: Shape::Lowpass { pass_hz: 5.0, stop_hz: 50.0 },
///     passband_ripple_db: 0.1,
///     stopband_attenuation_db: 60.0,
/// };
/// let design = spec.kaiser::<128>()?;
/// assert!(design.measured.meets() && design.taps.len() <= 128);
/// // Edge case: a stopband edge at half the sample rate is outside (0, fs/2).
/// let bad = Spec { shape: Shape::Lowpass { pass_hz: 5.0, stop_hz: 500.0 }, ..spec };
/// assert_eq!(bad.kaiser::<128>().err(), Some(tapline::design::DesignError::FrequencyOutOfRange));
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Spec<R> {
    /// The sample rate in Hz.
    pub sample_rate_hz: R,
    /// The bands.
    pub shape: Shape<R>,
    /// Largest passband ripple, peak to peak, in dB (> 0).
    pub passband_ripple_db: R,
    /// Smallest stopband attenuation in dB (> 0).
    pub stopband_attenuation_db: R,
}

/// A Kaiser-window design that meets its [`Spec`], with what went into it and what it measures.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct KaiserDesign<R, const N: usize> {
    /// The taps, symmetric, gain 1 at the passband reference (DC, fs/2 or the band centre).
    pub taps: heapless::Vec<R, N>,
    /// The window's β, from the design attenuation.
    pub beta: R,
    /// The attenuation the window was chosen for: the larger of the stopband attenuation and
    /// −20·log10 of the passband deviation the ripple allows (a Kaiser design has about the
    /// same deviation in both), raised if the first design missed.
    pub design_attenuation_db: R,
    /// Kaiser's length estimate for the spec (made odd where the band needs it); `taps.len()`
    /// is larger when the first design fell short of the spec.
    pub estimated_len: usize,
    /// The ideal band the window shaped (edges in the middle of the transition bands).
    pub band: Band<R>,
    /// The design measured against its spec.
    pub measured: Measured<R>,
}

/// A Kaiser design whose **quantized** taps meet the [`Spec`], from [`Spec::kaiser_fixed`].
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FixedDesign<R, T, const N: usize> {
    /// The float design the fixed-point taps were quantized from.
    pub float: KaiserDesign<R, N>,
    /// The fixed-point taps, symmetric, DC gain as [`Quantized`](super::Quantized) reports.
    pub taps: heapless::Vec<T, N>,
    /// What quantization did (DC gain kept, largest tap error).
    pub quantized: super::Quantized,
    /// The fixed-point taps measured against the spec.
    pub measured: Measured<R>,
    /// The extra stopband attenuation, in dB, the float design was asked for so that the
    /// quantized taps meet the spec (0 if they met it at once).
    pub margin_db: R,
}

/// Taps measured against a [`Spec`].
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Measured<R> {
    /// Passband ripple, peak to peak over all passbands, in dB.
    pub passband_ripple_db: R,
    /// Smallest attenuation over all stopbands, in dB relative to a gain of 1.
    pub stopband_attenuation_db: R,
    /// The smallest and largest passband gain.
    pub passband: GainRange<R>,
    /// The smallest and largest stopband gain.
    pub stopband: GainRange<R>,
    /// The smallest and largest gain over the transition bands (from each passband edge to the
    /// neighbouring stopband edge); `max_at_hz` is where the largest lies.
    pub transition: GainRange<R>,
    /// The spec's limits, to compare against.
    pub limits: (R, R),
}

impl<R: Real> Measured<R> {
    /// Whether the taps meet the whole band plan: the ripple is at most the spec's, the
    /// attenuation at least the spec's, and nowhere in a transition band does the gain exceed
    /// [`transition_limit`](Measured::transition_limit). An equiripple design with unequal
    /// transition widths can hold its pass- and stopbands and still peak far above 1 in the
    /// wider transition band; such a filter amplifies whatever lies there, so it misses.
    #[must_use]
    pub fn meets(&self) -> bool {
        self.passband_ripple_db <= self.limits.0
            && self.stopband_attenuation_db >= self.limits.1
            && self.transition_within()
    }

    /// The passband's upper limit: the largest gain the ripple allows above the smallest
    /// passband gain measured, min|H|·10^(ripple/20). A gain above it anywhere outside the
    /// stopbands would be a ripple violation had it been in the passband.
    #[must_use]
    pub fn transition_limit(&self) -> R {
        self.passband.min * self.limits.0.db_to_gain()
    }

    /// Whether the largest transition-band gain is at most
    /// [`transition_limit`](Measured::transition_limit).
    #[must_use]
    pub fn transition_within(&self) -> bool {
        self.transition.max <= self.transition_limit()
    }

    /// The largest transition-band gain in dB relative to a gain of 1 (20·log10 max|H|).
    #[must_use]
    pub fn transition_peak_db(&self) -> R {
        self.transition.max.gain_to_db()
    }
}

/// The extra stopband attenuation, in dB and in order, that the searches for quantized taps
/// ([`Spec::kaiser_fixed`], and `Spec::equiripple_fixed` with `std`) ask of the float design
/// when its quantized taps miss the spec. Rounding each tap moves the response by up to
/// ½ LSB·N; a fraction of a dB recovers most misses, the last steps cover coarse formats on
/// short filters, and beyond 9 dB a wider format is the answer.
pub const QUANTIZATION_MARGINS_DB: [f64; 8] = [0.0, 0.5, 1.0, 2.0, 3.0, 4.0, 6.0, 9.0];

/// Up to two bands of each kind, as (low, high) in Hz.
type Bands<R> = ([(R, R); 2], usize);

impl<R: Real> Spec<R> {
    /// The edges in order, checked.
    pub(super) fn edges(&self) -> Result<([R; 4], usize), DesignError> {
        let half = nyquist(self.sample_rate_hz)?;
        let z = R::ZERO;
        let (e, n) = match self.shape {
            Shape::Lowpass { pass_hz, stop_hz } => ([pass_hz, stop_hz, z, z], 2),
            Shape::Highpass { stop_hz, pass_hz } => ([stop_hz, pass_hz, z, z], 2),
            Shape::Bandpass {
                stop_low_hz: a,
                pass_low_hz: b,
                pass_high_hz: c,
                stop_high_hz: d,
            }
            | Shape::Bandstop {
                pass_low_hz: a,
                stop_low_hz: b,
                stop_high_hz: c,
                pass_high_hz: d,
            } => ([a, b, c, d], 4),
        };
        for f in e.iter().take(n) {
            inside(*f, half)?;
        }
        if e.iter()
            .take(n)
            .zip(e.iter().skip(1).take(n - 1))
            .any(|(a, b)| !(a < b))
        {
            return Err(DesignError::EdgesNotIncreasing);
        }
        let db_ok = |v: R| v.is_finite() && v > R::ZERO;
        if !db_ok(self.passband_ripple_db)
            || !db_ok(self.stopband_attenuation_db)
            || self.stopband_attenuation_db > R::from_f64(super::MAX_ATTENUATION_DB)
        {
            return Err(DesignError::InvalidDecibels);
        }
        Ok((e, n))
    }

    /// (passbands, stopbands).
    fn bands(&self) -> Result<(Bands<R>, Bands<R>), DesignError> {
        let ([a, b, c, d], _) = self.edges()?;
        let (z, h) = (R::ZERO, self.sample_rate_hz * R::from_f64(0.5));
        Ok(match self.shape {
            Shape::Lowpass { .. } => (([(z, a), (z, z)], 1), ([(b, h), (z, z)], 1)),
            Shape::Highpass { .. } => (([(b, h), (z, z)], 1), ([(z, a), (z, z)], 1)),
            Shape::Bandpass { .. } => (([(b, c), (z, z)], 1), ([(z, a), (d, h)], 2)),
            Shape::Bandstop { .. } => (([(z, a), (d, h)], 2), ([(b, c), (z, z)], 1)),
        })
    }

    /// Whether the shape passes half the sample rate and so needs an odd length: an
    /// even-length symmetric filter has a zero there.
    ///
    /// ```
    /// use tapline::design::{Shape, Spec};
    /// let high = Spec {
    ///     sample_rate_hz: 1000.0f64,
    ///     shape: Shape::Highpass { stop_hz: 50.0, pass_hz: 100.0 },
    ///     passband_ripple_db: 0.1,
    ///     stopband_attenuation_db: 60.0,
    /// };
    /// assert!(high.needs_odd());
    /// let low = Spec { shape: Shape::Lowpass { pass_hz: 50.0, stop_hz: 100.0 }, ..high };
    /// assert!(!low.needs_odd());
    /// ```
    #[must_use]
    pub fn needs_odd(&self) -> bool {
        matches!(self.shape, Shape::Highpass { .. } | Shape::Bandstop { .. })
    }

    /// The largest passband deviation δp the ripple allows: 20·log10((1 + δp)/(1 − δp)) =
    /// ripple (peak to peak around a gain of 1).
    ///
    /// ```
    /// use tapline::design::{Shape, Spec};
    /// let spec = Spec {
    ///     sample_rate_hz: 1000.0f64,
    ///     shape: Shape::Lowpass { pass_hz: 5.0, stop_hz: 50.0 },
    ///     passband_ripple_db: 0.1,
    ///     stopband_attenuation_db: 60.0,
    /// };
    /// let d = spec.passband_deviation();
    /// assert!((20.0 * ((1.0 + d) / (1.0 - d)).log10() - 0.1).abs() < 1e-12);
    /// ```
    #[must_use]
    pub fn passband_deviation(&self) -> R {
        let g = self.passband_ripple_db.db_to_gain();
        (g - R::ONE) / (g + R::ONE)
    }

    /// The largest stopband gain δs the attenuation allows: 10^(−attenuation/20).
    ///
    /// ```
    /// use tapline::design::{Shape, Spec};
    /// let spec = Spec {
    ///     sample_rate_hz: 1000.0f64,
    ///     shape: Shape::Lowpass { pass_hz: 5.0, stop_hz: 50.0 },
    ///     passband_ripple_db: 0.1,
    ///     stopband_attenuation_db: 60.0,
    /// };
    /// assert!((spec.stopband_deviation() - 1e-3).abs() < 1e-15);
    /// ```
    #[must_use]
    pub fn stopband_deviation(&self) -> R {
        (-self.stopband_attenuation_db).db_to_gain()
    }

    /// The narrower transition band's width in Hz (the one that sets the length).
    pub(super) fn transition_width(&self) -> Result<R, DesignError> {
        let ([a, b, c, d], n) = self.edges()?;
        Ok(if n == 4 { (b - a).min_of(d - c) } else { b - a })
    }

    /// The transition bands, as (low, high) in Hz: between each pair of neighbouring edges
    /// that separate a passband from a stopband.
    fn transition_bands(&self) -> Result<Bands<R>, DesignError> {
        let ([a, b, c, d], n) = self.edges()?;
        let z = R::ZERO;
        Ok(if n == 4 {
            ([(a, b), (c, d)], 2)
        } else {
            ([(a, b), (z, z)], 1)
        })
    }

    /// Measures `taps` (float or quantized) against this spec's whole band plan: the passband
    /// ripple and the stopband attenuation, each over all bands of its kind, and the largest
    /// gain in the transition bands, by [`gain_range`]. [`Measured::meets`] is the verdict.
    ///
    /// **Accuracy:** that of [`gain_range`]: in `f64` the figures are within 10⁻⁹ dB of the
    /// true extremes unless a lobe is narrower than 1/(8N) of the sample rate.
    ///
    /// # Errors
    /// The spec's errors ([`DesignError::FrequencyOutOfRange`], [`DesignError::EdgesNotIncreasing`],
    /// [`DesignError::InvalidDecibels`]); [`DesignError::TooShort`] for no taps.
    ///
    /// ```
    /// use tapline::design::{Shape, Spec};
    /// let spec = Spec {
    ///     sample_rate_hz: 1000.0f64,
    ///     shape: Shape::Lowpass { pass_hz: 5.0, stop_hz: 50.0 },
    ///     passband_ripple_db: 0.1,
    ///     stopband_attenuation_db: 60.0,
    /// };
    /// // A single tap passes everything: no ripple, no attenuation.
    /// let m = spec.measure(&[1.0f64])?;
    /// assert_eq!((m.passband_ripple_db, m.stopband_attenuation_db), (0.0, 0.0));
    /// assert!(!m.meets());
    /// # Ok::<(), tapline::design::DesignError>(())
    /// ```
    pub fn measure<T: Sample>(&self, taps: &[T]) -> Result<Measured<R>, DesignError> {
        let ((pass, n_pass), (stop, n_stop)) = self.bands()?;
        let fs = self.sample_rate_hz;
        let merge = |bands: &[(R, R)]| -> Result<GainRange<R>, DesignError> {
            let mut all: Option<GainRange<R>> = None;
            for &(lo, hi) in bands {
                let g = gain_range(taps, lo, hi, fs)?;
                all = Some(match all {
                    None => g,
                    Some(a) => GainRange {
                        min: a.min.min_of(g.min),
                        min_at_hz: if g.min < a.min {
                            g.min_at_hz
                        } else {
                            a.min_at_hz
                        },
                        max: a.max.max_of(g.max),
                        max_at_hz: if g.max > a.max {
                            g.max_at_hz
                        } else {
                            a.max_at_hz
                        },
                    },
                });
            }
            all.ok_or(DesignError::TooShort {
                minimum: 1,
                found: 0,
            })
        };
        let passband = merge(pass.get(..n_pass).unwrap_or(&[]))?;
        let stopband = merge(stop.get(..n_stop).unwrap_or(&[]))?;
        let (between, n_between) = self.transition_bands()?;
        let transition = merge(between.get(..n_between).unwrap_or(&[]))?;
        Ok(Measured {
            passband_ripple_db: passband.ripple_db(),
            stopband_attenuation_db: stopband.attenuation_db(),
            passband,
            stopband,
            transition,
            limits: (self.passband_ripple_db, self.stopband_attenuation_db),
        })
    }

    /// Designs the spec with a Kaiser window: β and the length from Kaiser's formulas
    /// ([`kaiser`]), the ideal band's edges in the middle of the transition bands, the length
    /// made odd where the band needs it; then the result is **measured** against the spec. If
    /// Kaiser's formulas fell short (they can, by a few tenths of a dB), the design attenuation
    /// is raised by the shortfall plus 0.1 dB — a larger β, and the length that goes with it,
    /// at least one tap (two for odd-only shapes) longer than before — and the design is made
    /// and measured again, up to 10 times in all.
    ///
    /// The taps go into a `heapless::Vec` of capacity `N`: no heap.
    ///
    /// **Accuracy:** the result meets the spec as [`measure`](Spec::measure) measures it. In
    /// `f32` the taps are within 10⁻⁶·max|h| of the `f64` design of the same length (the
    /// lengths can differ where the estimate lies within 10⁻⁵ of a whole number), and the `f32`
    /// response evaluation resolves about −96 dB (see [`response_at`](super::response_at)):
    /// design and check specs beyond 80 dB in `f64`, on the host.
    ///
    /// # Errors
    /// The spec's errors; [`DesignError::InvalidTransition`] for a transition so narrow that the
    /// estimate exceeds [`MAX_DESIGN_TAPS`](super::MAX_DESIGN_TAPS);
    /// [`DesignError::Filter`]([`Error::OutputLength`]) when the design needs more than `N` taps (`expected` is the
    /// length it needs); [`DesignError::SpecNotMet`] if it still misses after 10 designs, or the
    /// raised design attenuation would pass [`MAX_ATTENUATION_DB`](super::MAX_ATTENUATION_DB)
    /// (an `f32` design cannot resolve much beyond 120 dB).
    pub fn kaiser<const N: usize>(&self) -> Result<KaiserDesign<R, N>, DesignError> {
        let ([a, b, c, d], _) = self.edges()?;
        let two = R::from_f64(2.0);
        let band = match self.shape {
            Shape::Lowpass { .. } => Band::Lowpass {
                cutoff_hz: (a + b) / two,
            },
            Shape::Highpass { .. } => Band::Highpass {
                cutoff_hz: (a + b) / two,
            },
            Shape::Bandpass { .. } => Band::Bandpass {
                low_hz: (a + b) / two,
                high_hz: (c + d) / two,
            },
            Shape::Bandstop { .. } => Band::Bandstop {
                low_hz: (a + b) / two,
                high_hz: (c + d) / two,
            },
        };
        let transition = self.transition_width()?;
        let stop_dev = self.stopband_deviation();
        let pass_dev = self.passband_deviation();
        let mut design_attenuation_db = -stop_dev.min_of(pass_dev).gain_to_db();
        let mut estimated_len = 0;
        let mut last_len = 0;
        let mut taps: heapless::Vec<R, N> = heapless::Vec::new();
        for attempt in 0..10 {
            let beta = kaiser::beta_for_attenuation(design_attenuation_db)?;
            let mut len = kaiser::length_for_transition(
                design_attenuation_db,
                transition,
                self.sample_rate_hz,
            )?;
            if self.needs_odd() && len % 2 == 0 {
                len += 1;
            }
            if attempt == 0 {
                estimated_len = len;
            } else {
                // A wider window main lobe also widens the transition: on a short filter a
                // larger β alone can leave the stopband edge where it was. Grow by a step too.
                len = len.max(last_len + if self.needs_odd() { 2 } else { 1 });
            }
            last_len = len;
            taps.clear();
            if taps.resize(len, R::ZERO).is_err() {
                return Err(Error::OutputLength {
                    expected: len,
                    found: N,
                }
                .into());
            }
            windowed_sinc(
                band,
                self.sample_rate_hz,
                Window::Kaiser { beta },
                &mut taps,
            )?;
            let measured = self.measure(&taps)?;
            if measured.meets() {
                return Ok(KaiserDesign {
                    taps,
                    beta,
                    design_attenuation_db,
                    estimated_len,
                    band,
                    measured,
                });
            }
            // The window's β sets the peak error and the length the transition. A miss is
            // answered by a larger design attenuation (by the shortfall, plus 0.1 dB), which
            // raises β and, through Kaiser's formula, the length; the length grows at least one
            // step per attempt.
            let stop_short = self.stopband_attenuation_db - measured.stopband_attenuation_db;
            let worst_pass_dev = (measured.passband.max - R::ONE)
                .abs()
                .max_of((R::ONE - measured.passband.min).abs());
            let pass_short = (worst_pass_dev / pass_dev).gain_to_db();
            let short = stop_short.max_of(pass_short).max_of(R::ZERO);
            design_attenuation_db += short + R::from_f64(0.1);
            if !(design_attenuation_db <= R::from_f64(super::MAX_ATTENUATION_DB)) {
                break;
            }
        }
        Err(DesignError::SpecNotMet { taps: last_len })
    }

    /// [`kaiser`](Spec::kaiser), then [`quantize`](super::quantize) into the fixed-point
    /// format `T` (`i16` for Q15, `i32` for Q31, `fixed` types), then [`measure`](Spec::measure)
    /// the **quantized** taps. Rounding the taps adds an error of up to ½ LSB per tap, which can
    /// cost a design that just met its spec a fraction of a dB; when the quantized taps miss,
    /// the float design is asked for more stopband attenuation, step by step through
    /// [`QUANTIZATION_MARGINS_DB`] (0.5, 1, 2, 3, 4, 6 and then 9 dB), until they meet the spec.
    ///
    /// **Accuracy:** the quantized taps meet the spec as [`measure`](Spec::measure) measures
    /// them; their DC gain is exact where symmetry allows (see [`quantize`](super::quantize)).
    ///
    /// # Errors
    /// As [`kaiser`](Spec::kaiser) and [`quantize`](super::quantize); [`DesignError::SpecNotMet`] if
    /// even 9 dB of margin does not help (the format is too coarse for the spec: Q15 taps of a
    /// 150-tap lowpass do not reach 100 dB).
    ///
    /// ```
    /// use tapline::design::{Shape, Spec};
    /// let spec = Spec {
    ///     sample_rate_hz: 1000.0f32,
    ///     shape: Shape::Lowpass { pass_hz: 5.0, stop_hz: 50.0 },
    ///     passband_ripple_db: 0.1,
    ///     stopband_attenuation_db: 60.0,
    /// };
    /// let d = spec.kaiser_fixed::<i16, 128>()?;
    /// assert!(d.measured.meets() && d.quantized.dc_exact());
    /// // Edge case: 16-bit taps cannot reach 100 dB, whatever the margin (32-bit ones can).
    /// let deep = Spec {
    ///     sample_rate_hz: 1000.0f64,
    ///     shape: Shape::Lowpass { pass_hz: 5.0, stop_hz: 50.0 },
    ///     passband_ripple_db: 0.1,
    ///     stopband_attenuation_db: 100.0,
    /// };
    /// let q15 = deep.kaiser_fixed::<i16, 512>();
    /// assert!(matches!(q15, Err(tapline::design::DesignError::SpecNotMet { .. })));
    /// assert!(deep.kaiser_fixed::<i32, 512>()?.measured.meets());
    /// # Ok::<(), tapline::design::DesignError>(())
    /// ```
    pub fn kaiser_fixed<T: FixedPoint, const N: usize>(
        &self,
    ) -> Result<FixedDesign<R, T, N>, DesignError> {
        let mut longest = 0;
        for margin in QUANTIZATION_MARGINS_DB {
            let margin = R::from_f64(margin);
            let stricter = Spec {
                stopband_attenuation_db: self.stopband_attenuation_db + margin,
                ..*self
            };
            let float = stricter.kaiser::<N>()?;
            longest = longest.max(float.taps.len());
            let mut taps: heapless::Vec<T, N> = heapless::Vec::new();
            if taps.resize(float.taps.len(), T::ZERO).is_err() {
                return Err(Error::OutputLength {
                    expected: float.taps.len(),
                    found: N,
                }
                .into());
            }
            let quantized = super::quantize(&float.taps, &mut taps)?;
            let measured = self.measure(&taps)?;
            if measured.meets() {
                return Ok(FixedDesign {
                    float,
                    taps,
                    quantized,
                    measured,
                    margin_db: margin,
                });
            }
        }
        Err(DesignError::SpecNotMet { taps: longest })
    }
}
