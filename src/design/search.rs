//! The search for the shortest equiripple filter that meets a [`Spec`], before and after
//! quantization (`std` only, as Parks–McClellan is). The Kaiser-window search is
//! [`Spec::kaiser`] / [`Spec::kaiser_fixed`]; both quantized searches step through the same
//! [`QUANTIZATION_MARGINS_DB`].

use super::DesignError;
use super::equiripple::{Equiripple, EquirippleBand, MAX_EQUIRIPPLE_TAPS, equiripple};
use super::{Measured, QUANTIZATION_MARGINS_DB, Quantized, Shape, Spec, quantize};
use crate::num::FixedPoint;
use std::vec;
use std::vec::Vec;

/// An equiripple design of a [`Spec`] with its measurement against the spec.
#[derive(Debug, Clone, PartialEq)]
pub struct EquirippleDesign {
    /// What the exchange produced (taps, weighted ripple, iterations).
    pub design: Equiripple,
    /// The taps measured against the spec's whole band plan.
    pub measured: Measured<f64>,
    /// The length estimate the search started from (None when the length was given).
    pub estimated_len: Option<usize>,
}

/// An equiripple design whose quantized taps were searched for, from
/// [`Spec::equiripple_fixed`].
#[derive(Debug, Clone, PartialEq)]
pub struct FixedEquiripple<T> {
    /// The float design the taps were quantized from.
    pub float: EquirippleDesign,
    /// The fixed-point taps.
    pub taps: Vec<T>,
    /// What quantization did.
    pub quantized: Quantized,
    /// The fixed-point taps measured against the spec.
    pub measured: Measured<f64>,
    /// The extra stopband attenuation, in dB, the float design was asked for (one of
    /// [`QUANTIZATION_MARGINS_DB`]).
    pub margin_db: f64,
}

impl Spec<f64> {
    /// The equiripple bands of this spec: gain 1 with weight 1 in the passbands, gain 0 with
    /// weight δp/δs in the stopbands, so that the exchange's equal weighted error puts each
    /// band's deviation at the ratio the spec allows.
    ///
    /// # Errors
    /// The spec's errors.
    ///
    /// ```
    /// use tapline::design::{Shape, Spec};
    /// let spec = Spec {
    ///     sample_rate_hz: 1000.0,
    ///     shape: Shape::Lowpass { pass_hz: 100.0, stop_hz: 150.0 },
    ///     passband_ripple_db: 0.5,
    ///     stopband_attenuation_db: 40.0,
    /// };
    /// let bands = spec.equiripple_bands()?;
    /// assert_eq!((bands[0].high_hz, bands[1].low_hz, bands[1].high_hz), (100.0, 150.0, 500.0));
    /// assert!((bands[1].weight - spec.passband_deviation() / 0.01).abs() < 1e-12);
    /// # Ok::<(), tapline::design::DesignError>(())
    /// ```
    pub fn equiripple_bands(&self) -> Result<Vec<EquirippleBand>, DesignError> {
        self.edges()?;
        let half = self.sample_rate_hz / 2.0;
        let weight = self.passband_deviation() / self.stopband_deviation();
        let pass = |low_hz, high_hz| EquirippleBand {
            low_hz,
            high_hz,
            gain: 1.0,
            weight: 1.0,
        };
        let stop = |low_hz, high_hz| EquirippleBand {
            low_hz,
            high_hz,
            gain: 0.0,
            weight,
        };
        Ok(match self.shape {
            Shape::Lowpass { pass_hz, stop_hz } => vec![pass(0.0, pass_hz), stop(stop_hz, half)],
            Shape::Highpass { stop_hz, pass_hz } => vec![stop(0.0, stop_hz), pass(pass_hz, half)],
            Shape::Bandpass {
                stop_low_hz,
                pass_low_hz,
                pass_high_hz,
                stop_high_hz,
            } => vec![
                stop(0.0, stop_low_hz),
                pass(pass_low_hz, pass_high_hz),
                stop(stop_high_hz, half),
            ],
            Shape::Bandstop {
                pass_low_hz,
                stop_low_hz,
                stop_high_hz,
                pass_high_hz,
            } => vec![
                pass(0.0, pass_low_hz),
                stop(stop_low_hz, stop_high_hz),
                pass(pass_high_hz, half),
            ],
        })
    }

    /// The length step of this spec's equiripple searches (2 where the band needs odd
    /// lengths) and the longest length they may try: odd-only bands stop at the longest odd
    /// length within [`MAX_EQUIRIPPLE_TAPS`] (the search once waited for an even limit it
    /// never tried, and looped forever).
    fn search_steps(&self) -> (usize, usize) {
        let step = if self.needs_odd() { 2 } else { 1 };
        let longest = if step == 2 && MAX_EQUIRIPPLE_TAPS % 2 == 0 {
            MAX_EQUIRIPPLE_TAPS - 1
        } else {
            MAX_EQUIRIPPLE_TAPS
        };
        (step, longest)
    }

    /// The length search shared by the equiripple searches: `meets(len)` is a design of `len`
    /// taps if it meets, else None. From `start`: if it misses, lengths grow in doubling
    /// steps until one meets, then bisection between the last miss and that one; finally
    /// shorter lengths one step at a time while they still meet. Every length tried has the
    /// band's parity, none exceeds the longest of [`search_steps`](Spec::search_steps), and
    /// the search ends after at most about 2·log2(limit) + (steps back) designs. Returns the
    /// design, or the longest length tried when none met.
    fn shortest_by<C>(
        &self,
        start: usize,
        mut meets: impl FnMut(usize) -> Option<C>,
    ) -> Result<C, usize> {
        let (step, longest) = self.search_steps();
        let mut len = start.clamp(3, longest);
        if step == 2 && len % 2 == 0 {
            len -= 1;
        }
        let mut best = meets(len);
        if best.is_none() {
            // Gallop: the last length known to miss, and the next try.
            let mut missed = len;
            let mut jump = step;
            loop {
                if missed >= longest {
                    return Err(longest);
                }
                let next = (missed + jump).min(longest);
                if let Some(c) = meets(next) {
                    len = next;
                    best = Some(c);
                    break;
                }
                missed = next;
                jump *= 2;
            }
            // Bisect between `missed` (misses) and `len` (meets), keeping the parity.
            while len - missed > step {
                let mut mid = missed + (len - missed) / 2;
                if step == 2 && mid % 2 != len % 2 {
                    mid += 1;
                }
                if mid >= len {
                    break;
                }
                match meets(mid) {
                    Some(c) => {
                        len = mid;
                        best = Some(c);
                    }
                    None => missed = mid,
                }
            }
        }
        let Some(mut best) = best else {
            return Err(len);
        };
        while len >= 3 + step {
            match meets(len - step) {
                Some(shorter) => {
                    best = shorter;
                    len -= step;
                }
                None => break,
            }
        }
        Ok(best)
    }

    /// [`equiripple_bands`](Spec::equiripple_bands) with every transition band narrowed to
    /// the narrowest one by moving its stopband edge towards the passband: the exchange leaves
    /// a transition band free, and a wider one than the length needs is where an overshoot
    /// grows (seen at +19 dB and more); with equal widths there is no slack to fill. The
    /// stopbands only grow, so a design that meets these bands meets the spec's.
    fn guarded_bands(&self) -> Result<Vec<EquirippleBand>, DesignError> {
        let mut bands = self.equiripple_bands()?;
        let width = self.transition_width()?;
        for k in 0..bands.len().saturating_sub(1) {
            let (Some(&b), Some(&next)) = (bands.get(k), bands.get(k + 1)) else {
                continue;
            };
            if next.low_hz - b.high_hz <= width {
                continue;
            }
            // The stopband is the band whose desired gain is 0.
            if next.gain == 0.0 {
                if let Some(n) = bands.get_mut(k + 1) {
                    n.low_hz = b.high_hz + width;
                }
            } else if let Some(p) = bands.get_mut(k) {
                p.high_hz = next.low_hz - width;
            }
        }
        Ok(bands)
    }

    /// Kaiser's length estimate for an equiripple filter,
    /// N ≈ (−20·log10 √(δp·δs) − 13) / (14.6·Δf/fs) + 1 (J. F. Kaiser, 1974; from memory), with
    /// Δf the narrower transition band, at least 3, at most [`MAX_EQUIRIPPLE_TAPS`], made odd
    /// where the band [needs it](Spec::needs_odd).
    ///
    /// # Errors
    /// The spec's errors.
    ///
    /// ```
    /// use tapline::design::{Shape, Spec};
    /// let spec = Spec {
    ///     sample_rate_hz: 1000.0,
    ///     shape: Shape::Lowpass { pass_hz: 100.0, stop_hz: 150.0 },
    ///     passband_ripple_db: 0.5,
    ///     stopband_attenuation_db: 40.0,
    /// };
    /// // δp = 0.0288, δs = 0.01: (−20·log10 √(2.88e-4) − 13) / (14.6·0.05) + 1 = 31.4
    /// assert_eq!(spec.equiripple_estimate()?, 32);
    /// # Ok::<(), tapline::design::DesignError>(())
    /// ```
    pub fn equiripple_estimate(&self) -> Result<usize, DesignError> {
        let width = self.transition_width()?;
        let product = self.passband_deviation() * self.stopband_deviation();
        let n =
            (-20.0 * product.sqrt().log10() - 13.0) / (14.6 * width / self.sample_rate_hz) + 1.0;
        let n = if n.is_finite() {
            n.ceil().max(3.0)
        } else {
            3.0
        };
        // Finite and within 3..=MAX after the clamp, so the conversion is exact.
        let n = (n.min(MAX_EQUIRIPPLE_TAPS as f64) as usize).max(3);
        Ok(if self.needs_odd() && n % 2 == 0 {
            n + 1
        } else {
            n
        })
    }

    /// One equiripple design of exactly `len` taps, measured against the spec (whether it
    /// meets it or not). When the exchange over the spec's bands overshoots in a transition
    /// band (above [`Measured::transition_limit`]), the design is redone with every transition
    /// band narrowed to the narrowest (the stopbands extended towards the passbands), and
    /// that one is returned if its transition bands hold.
    ///
    /// # Errors
    /// The spec's errors and those of [`equiripple`](super::equiripple);
    /// [`DesignError::OddLengthRequired`] for an even length where the band needs an odd one.
    ///
    /// ```
    /// use tapline::design::{Shape, Spec};
    /// let spec = Spec {
    ///     sample_rate_hz: 1000.0,
    ///     shape: Shape::Lowpass { pass_hz: 100.0, stop_hz: 150.0 },
    ///     passband_ripple_db: 0.5,
    ///     stopband_attenuation_db: 40.0,
    /// };
    /// let d = spec.equiripple_at(40)?;
    /// assert!(d.measured.meets() && d.design.taps.len() == 40);
    /// // Edge case: 5 taps are far too few; the design is made and misses.
    /// assert!(!spec.equiripple_at(5)?.measured.meets());
    /// # Ok::<(), tapline::design::DesignError>(())
    /// ```
    pub fn equiripple_at(&self, len: usize) -> Result<EquirippleDesign, DesignError> {
        if self.needs_odd() && len % 2 == 0 {
            return Err(DesignError::OddLengthRequired { found: len });
        }
        let design = equiripple(len, &self.equiripple_bands()?, self.sample_rate_hz)?;
        let mut measured = self.measure(&design.taps)?;
        let mut design = design;
        if !measured.transition_within() {
            // The transition band overshoots: design again with the transition bands made
            // equal (see `guarded_bands`), and keep that design if its transition bands hold
            // (it may still miss elsewhere at a length too short for the spec).
            if let Ok(guarded) = equiripple(len, &self.guarded_bands()?, self.sample_rate_hz) {
                let m = self.measure(&guarded.taps)?;
                if m.transition_within() {
                    design = guarded;
                    measured = m;
                }
            }
        }
        Ok(EquirippleDesign {
            design,
            measured,
            estimated_len: None,
        })
    }

    /// The shortest equiripple design that meets the spec, as [`measure`](Spec::measure)
    /// judges it (transition bands included), searched from
    /// [`equiripple_estimate`](Spec::equiripple_estimate): if the estimate misses, lengths grow
    /// in doubling steps until one meets, then bisection finds the shortest between the last
    /// miss and that one; finally shorter lengths are tried one step at a time while they
    /// still meet (the estimate is often generous). The step is 2 where the band needs an odd
    /// length. A length whose exchange does not converge counts as a miss. Meeting the spec is
    /// not monotonic in the length; the search returns a length that meets with its
    /// neighbour one step shorter missing.
    ///
    /// # Errors
    /// The spec's errors; [`DesignError::SpecNotMet`] (`taps` = the longest length tried:
    /// [`MAX_EQUIRIPPLE_TAPS`], or the longest odd length below it where the band needs odd
    /// lengths) when no
    /// length up to [`MAX_EQUIRIPPLE_TAPS`] meets it.
    ///
    /// ```
    /// use tapline::design::{Shape, Spec};
    /// let spec = Spec {
    ///     sample_rate_hz: 1000.0,
    ///     shape: Shape::Lowpass { pass_hz: 100.0, stop_hz: 150.0 },
    ///     passband_ripple_db: 0.5,
    ///     stopband_attenuation_db: 40.0,
    /// };
    /// let d = spec.shortest_equiripple()?;
    /// let n = d.design.taps.len();
    /// assert!(d.measured.meets() && !spec.equiripple_at(n - 1)?.measured.meets());
    /// # Ok::<(), tapline::design::DesignError>(())
    /// ```
    pub fn shortest_equiripple(&self) -> Result<EquirippleDesign, DesignError> {
        let estimate = self.equiripple_estimate()?;
        let meets = |len: usize| match self.equiripple_at(len) {
            Ok(c) if c.measured.meets() => Some(c),
            _ => None,
        };
        let mut best = self
            .shortest_by(estimate, meets)
            .map_err(|taps| DesignError::SpecNotMet { taps })?;
        best.estimated_len = Some(estimate);
        Ok(best)
    }

    /// An equiripple design whose taps, quantized to `T` by [`quantize`](super::quantize),
    /// meet the spec: the [shortest](Spec::shortest_equiripple) float design, asked for each
    /// margin of [`QUANTIZATION_MARGINS_DB`] in turn until its quantized taps meet the spec
    /// (the same schedule as [`kaiser_fixed`](Spec::kaiser_fixed)). Margins only buy stopband
    /// attenuation, so when none helps (a tight passband ripple that rounding breaks), the
    /// lengths are searched as [`shortest_equiripple`](Spec::shortest_equiripple) searches
    /// them, each judged by its quantized taps (margin 0), from the first float length up to
    /// the limit. With `length` given, that one length is designed at margin 0 and returned
    /// whatever it measures.
    ///
    /// # Errors
    /// As [`shortest_equiripple`](Spec::shortest_equiripple) / [`equiripple_at`](Spec::equiripple_at)
    /// and [`quantize`](super::quantize); [`DesignError::SpecNotMet`] (`taps` = the longest length
    /// the search tried, the limit of [`shortest_equiripple`](Spec::shortest_equiripple)) when
    /// neither a margin nor a length helps.
    ///
    /// ```
    /// use tapline::design::{Shape, Spec};
    /// let spec = Spec {
    ///     sample_rate_hz: 1000.0,
    ///     shape: Shape::Lowpass { pass_hz: 5.0, stop_hz: 50.0 },
    ///     passband_ripple_db: 0.1,
    ///     stopband_attenuation_db: 60.0,
    /// };
    /// let d = spec.equiripple_fixed::<i16>(None)?;
    /// assert!(d.measured.meets() && d.taps.len() == d.float.design.taps.len());
    /// // Edge case: 16-bit taps cannot reach 100 dB, whatever the margin.
    /// let deep = Spec { stopband_attenuation_db: 100.0, ..spec };
    /// assert!(matches!(deep.equiripple_fixed::<i16>(None), Err(tapline::design::DesignError::SpecNotMet { .. })));
    /// # Ok::<(), tapline::design::DesignError>(())
    /// ```
    pub fn equiripple_fixed<T: FixedPoint>(
        &self,
        length: Option<usize>,
    ) -> Result<FixedEquiripple<T>, DesignError> {
        // The float design's taps quantized and measured against the spec as asked.
        let fixed = |mut float: EquirippleDesign, margin_db: f64| {
            float.measured = self.measure(&float.design.taps)?;
            let mut taps = vec![T::ZERO; float.design.taps.len()];
            let quantized = quantize(&float.design.taps, &mut taps)?;
            let measured = self.measure(&taps)?;
            Ok::<_, DesignError>(FixedEquiripple {
                float,
                taps,
                quantized,
                measured,
                margin_db,
            })
        };
        if let Some(len) = length {
            return fixed(self.equiripple_at(len)?, 0.0);
        }
        // First the shortest float design of each stricter spec in turn.
        let mut start = None;
        for margin_db in QUANTIZATION_MARGINS_DB {
            let stricter = Spec {
                stopband_attenuation_db: self.stopband_attenuation_db + margin_db,
                ..*self
            };
            let float = match stricter.shortest_equiripple() {
                Ok(f) => f,
                // No float design meets the stricter spec: larger margins will not either.
                Err(DesignError::SpecNotMet { .. }) if start.is_some() => break,
                Err(e) => return Err(e),
            };
            start = start.or(Some(float.design.taps.len()));
            let d = fixed(float, margin_db)?;
            if d.measured.meets() {
                return Ok(d);
            }
        }
        // Margins buy stopband attenuation only; when the quantized passband is what misses
        // (tight ripple, a highpass's gain at fs/2), a longer design helps where they do not.
        // So search the lengths themselves, judging each by its quantized taps.
        let start = start.unwrap_or(3);
        let meets = |len: usize| {
            let float = self.equiripple_at(len).ok()?;
            fixed(float, 0.0).ok().filter(|d| d.measured.meets())
        };
        self.shortest_by(start, meets)
            .map_err(|taps| DesignError::SpecNotMet { taps })
    }
}
