//! The frequency axes of the plots: engineering units (Hz, kHz, MHz), and a logarithmic scale
//! when the band edges span decades, so that a 0–20 Hz band at a 1 kHz sample rate is not a
//! sliver and a 2 MHz sample rate does not print "1000000". Pure arithmetic, no drawing: the
//! plot asks here where a frequency goes and which ticks to label.

use clap::ValueEnum;
use std::format;
use std::prelude::rust_2024::*;
use std::vec::Vec;

/// How the frequency axis is scaled.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum, Default)]
// No doc comments on these variants: clap would turn them into per-value help text.
#[allow(missing_docs)]
pub enum FreqScaleArg {
    #[default]
    Auto,
    Linear,
    Log,
}

/// A logarithmic axis is chosen (automatically) when the axis spans at least this many times
/// its smallest band edge: a band of 1/20 of the axis or less would be a sliver on a linear
/// one (a 0–20 Hz band at a 1 kHz sample rate: 500/20 = 25).
pub const LOG_WHEN_SPAN: f64 = 20.0;

/// A frequency with the unit that keeps its number between 1 and 1000: `50 Hz`, `2.5 kHz`,
/// `1 MHz`, `0.2 Hz` (below 1 Hz, still in Hz), with up to `digits` significant digits.
pub fn engineering(hz: f64, digits: u32) -> String {
    let (value, unit) = in_unit(hz, unit_for(hz.abs()));
    format!("{} {unit}", significant(value, digits))
}

/// The unit for numbers up to `max_hz`: Hz below 1 kHz, kHz below 1 MHz, else MHz.
pub fn unit_for(max_hz: f64) -> &'static str {
    if max_hz >= 1e6 {
        "MHz"
    } else if max_hz >= 1e3 {
        "kHz"
    } else {
        "Hz"
    }
}

fn scale_of(unit: &str) -> f64 {
    match unit {
        "MHz" => 1e6,
        "kHz" => 1e3,
        _ => 1.0,
    }
}

fn in_unit(hz: f64, unit: &'static str) -> (f64, &'static str) {
    (hz / scale_of(unit), unit)
}

/// A number with at most four significant digits and no trailing zeros: 50, 2.5, 0.125,
/// 1234 (and 0, never -0).
pub fn short(v: f64) -> String {
    significant(v, 4)
}

/// A number with at most `digits` significant digits (whole numbers keep all theirs) and no
/// trailing zeros.
pub fn significant(v: f64, digits: u32) -> String {
    if v == 0.0 || !v.is_finite() {
        return String::from("0");
    }
    let magnitude = v.abs().log10().floor() as i32;
    let decimals = (digits as i32 - 1 - magnitude).clamp(0, 12) as usize;
    let text = format!("{v:.decimals$}");
    let text = if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.')
    } else {
        &text
    };
    if text == "-0" {
        String::from("0")
    } else {
        text.to_string()
    }
}

/// A step of 1, 2 or 5 times a power of ten that cuts `span` into at most `most` parts.
pub fn nice_step(span: f64, most: usize) -> f64 {
    let raw = span / most.max(1) as f64;
    if !(raw.is_finite() && raw > 0.0) {
        return 1.0;
    }
    let power = 10f64.powf(raw.log10().floor());
    [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| m * power)
        .find(|&s| s >= raw * (1.0 - 1e-9))
        .unwrap_or(10.0 * power)
}

/// One labelled tick: where (Hz) and what it says.
#[derive(Debug, Clone, PartialEq)]
pub struct Tick {
    /// The tick's frequency in Hz.
    pub hz: f64,
    /// Its label (empty for an unlabelled minor tick of a logarithmic axis).
    pub label: String,
}

/// A frequency axis from `lo_hz` to `hi_hz`, linear or logarithmic.
#[derive(Debug, Clone, PartialEq)]
pub struct FreqAxis {
    /// The lowest frequency shown (above 0 on a logarithmic axis).
    pub lo_hz: f64,
    /// The highest frequency shown.
    pub hi_hz: f64,
    /// Whether the axis is logarithmic.
    pub log: bool,
}

impl FreqAxis {
    /// The axis for `lo_hz..=hi_hz` with these band `edges` (Hz) inside: logarithmic when asked,
    /// or (auto) when the axis is at least [`LOG_WHEN_SPAN`] times its smallest edge above 0.
    /// A logarithmic axis starts a decade below the smallest edge's power of ten (DC cannot be
    /// shown on it); with no edge above 0 the axis stays linear.
    pub fn new(lo_hz: f64, hi_hz: f64, edges: &[f64], choice: FreqScaleArg) -> FreqAxis {
        let smallest = edges
            .iter()
            .copied()
            .filter(|&e| e > 0.0 && e.is_finite() && e < hi_hz)
            .chain((lo_hz > 0.0).then_some(lo_hz))
            .fold(f64::INFINITY, f64::min);
        let log = smallest.is_finite()
            && match choice {
                FreqScaleArg::Linear => false,
                FreqScaleArg::Log => true,
                FreqScaleArg::Auto => hi_hz >= LOG_WHEN_SPAN * smallest,
            };
        if log {
            let decade = 10f64.powf(smallest.log10().floor() - 1.0);
            let lo = if lo_hz > 0.0 {
                lo_hz.min(decade)
            } else {
                decade
            };
            FreqAxis {
                lo_hz: lo,
                hi_hz,
                log: true,
            }
        } else {
            FreqAxis {
                lo_hz,
                hi_hz,
                log: false,
            }
        }
    }

    /// Where `hz` goes on the chart's (linear) x coordinate: Hz itself, or log10 of Hz
    /// (clamped to the axis, so that DC lands on the left edge of a logarithmic axis).
    pub fn x(&self, hz: f64) -> f64 {
        if self.log {
            hz.max(self.lo_hz).log10()
        } else {
            hz
        }
    }

    /// The chart's x range.
    pub fn range(&self) -> std::ops::Range<f64> {
        self.x(self.lo_hz)..self.x(self.hi_hz)
    }

    /// Frequency `k` of `n + 1` points across the axis, evenly spaced on its scale.
    pub fn point(&self, k: usize, n: usize) -> f64 {
        let t = k as f64 / n.max(1) as f64;
        if self.log {
            10f64.powf(self.lo_hz.log10() + (self.hi_hz.log10() - self.lo_hz.log10()) * t)
        } else {
            self.lo_hz + (self.hi_hz - self.lo_hz) * t
        }
    }

    /// The axis title: `frequency (kHz)` on a linear axis (its labels are numbers in that
    /// unit), `frequency (log scale)` on a logarithmic one (each label carries its unit).
    pub fn title(&self) -> String {
        if self.log {
            String::from("frequency (log scale; DC at the left edge)")
        } else {
            format!(
                "frequency ({})",
                unit_for(self.hi_hz.abs().max(self.lo_hz.abs()))
            )
        }
    }

    /// The ticks: on a linear axis at most `most` steps of 1, 2 or 5 (times a power of ten)
    /// labelled as numbers in the axis's unit; on a logarithmic one 1, 2 and 5 times each
    /// power of ten, each labelled with its unit, plus unlabelled 3, 4, 6, 7, 8, 9.
    pub fn ticks(&self, most: usize) -> Vec<Tick> {
        let mut ticks = Vec::new();
        if self.log {
            let first = self.lo_hz.log10().floor() as i32;
            let last = self.hi_hz.log10().ceil() as i32;
            for p in first..=last {
                for m in 1..10 {
                    let hz = f64::from(m) * 10f64.powi(p);
                    if hz < self.lo_hz * (1.0 - 1e-9) || hz > self.hi_hz * (1.0 + 1e-9) {
                        continue;
                    }
                    let label = if [1, 2, 5].contains(&m) {
                        engineering(hz, 4)
                    } else {
                        String::new()
                    };
                    ticks.push(Tick { hz, label });
                }
            }
        } else {
            let unit = unit_for(self.hi_hz.abs().max(self.lo_hz.abs()));
            let step = nice_step(self.hi_hz - self.lo_hz, most);
            let mut k = (self.lo_hz / step).ceil() as i64;
            loop {
                let hz = k as f64 * step;
                if hz > self.hi_hz * (1.0 + 1e-9) + 1e-12 || ticks.len() > 4 * most + 4 {
                    break;
                }
                ticks.push(Tick {
                    hz,
                    label: short(in_unit(hz, unit).0),
                });
                k += 1;
            }
        }
        ticks
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn labels(axis: &FreqAxis) -> Vec<String> {
        axis.ticks(10)
            .into_iter()
            .filter(|t| !t.label.is_empty())
            .map(|t| t.label)
            .collect()
    }

    #[test]
    fn engineering_units() {
        assert_eq!(engineering(50.0, 4), "50 Hz");
        assert_eq!(engineering(0.2, 4), "0.2 Hz");
        assert_eq!(engineering(2500.0, 4), "2.5 kHz");
        assert_eq!(engineering(1_000_000.0, 4), "1 MHz");
        assert_eq!(engineering(999_999.0, 4), "1000 kHz");
        assert_eq!(engineering(999_999.0, 6), "999.999 kHz");
        assert_eq!(engineering(52.5123, 4), "52.51 Hz");
        assert_eq!(engineering(100.01, 6), "100.01 Hz");
        assert_eq!(engineering(2_000_000.0, 6), "2 MHz");
        assert_eq!(short(-0.0001), "-0.0001");
        assert_eq!(short(1234.6), "1235");
    }

    #[test]
    fn steps_are_one_two_five() {
        assert_eq!(nice_step(500.0, 10), 50.0);
        assert_eq!(nice_step(1e6, 10), 1e5);
        assert_eq!(nice_step(5.0, 10), 0.5);
        assert_eq!(nice_step(3.0, 10), 0.5);
        assert_eq!(nice_step(1.1, 10), 0.2);
    }

    #[test]
    fn a_2_mhz_linear_axis_reads_in_mhz_to_its_end() {
        let axis = FreqAxis::new(0.0, 1e6, &[200e3, 300e3], FreqScaleArg::Auto);
        assert!(!axis.log);
        assert_eq!(axis.title(), "frequency (MHz)");
        let l = labels(&axis);
        assert_eq!(l.first().map(String::as_str), Some("0"));
        // The last tick is the axis's end, 1 MHz, as "1" (not "1000000").
        assert_eq!(l.last().map(String::as_str), Some("1"));
        assert_eq!(l.len(), 11);
        let axis = FreqAxis::new(0.0, 500.0, &[100.0, 150.0], FreqScaleArg::Auto);
        assert_eq!(axis.title(), "frequency (Hz)");
        assert_eq!(labels(&axis).last().map(String::as_str), Some("500"));
    }

    #[test]
    fn bands_spanning_decades_get_a_log_axis() {
        // 0–20 Hz at 1 kHz: 500/20 = 25 >= 20.
        let axis = FreqAxis::new(0.0, 500.0, &[20.0, 50.0], FreqScaleArg::Auto);
        assert!(axis.log);
        assert_eq!(axis.lo_hz, 1.0);
        assert_eq!(
            labels(&axis),
            [
                "1 Hz", "2 Hz", "5 Hz", "10 Hz", "20 Hz", "50 Hz", "100 Hz", "200 Hz", "500 Hz"
            ]
        );
        assert_eq!(axis.x(0.0), 0.0);
        assert!((axis.x(100.0) - 2.0).abs() < 1e-12);
        assert!((axis.point(0, 100) - 1.0).abs() < 1e-12);
        assert!((axis.point(100, 100) - 500.0).abs() < 1e-9);
        // 2 MHz with a 1 kHz edge: kHz and MHz labels.
        let axis = FreqAxis::new(0.0, 1e6, &[1e3, 5e3], FreqScaleArg::Auto);
        assert!(axis.log);
        assert_eq!(labels(&axis).first().map(String::as_str), Some("100 Hz"));
        assert_eq!(labels(&axis).last().map(String::as_str), Some("1 MHz"));
        // Just under the threshold stays linear; the option forces either.
        assert!(!FreqAxis::new(0.0, 500.0, &[26.0, 50.0], FreqScaleArg::Auto).log);
        assert!(FreqAxis::new(0.0, 500.0, &[26.0, 50.0], FreqScaleArg::Log).log);
        assert!(!FreqAxis::new(0.0, 500.0, &[20.0, 50.0], FreqScaleArg::Linear).log);
        // No edge above 0: nothing to put a log axis on.
        assert!(!FreqAxis::new(0.0, 500.0, &[], FreqScaleArg::Log).log);
    }
}
