//! `design` and `emit`: a spec → taps that meet it in the chosen format (a Kaiser window, or
//! equiripple) → the measured figures and the headroom proof; `emit` also writes the taps as a
//! Rust source file.

use std::prelude::rust_2024::*;
use std::{format, vec};
use crate::tool::output::atomic;
use crate::tool::failure::Failure;
use crate::tool::output::report::{self, Report};
use crate::tool::input::spec::{BandKind, Chosen, MAX_EQUIRIPPLE_TAPS, Method};
use crate::tool::input::taps::{Codes, Format};
use serde_json::{Value, json};
use std::fmt::Write;
use std::path::Path;
use crate::design::{EquirippleBand, Measured, Spec, equiripple};
use crate::headroom::{ErrorBound, Headroom};
use crate::{Error, Rounding};

/// The longest design the tool makes (the library's designs are fixed-capacity).
pub const MAX_TAPS: usize = 2048;

/// How the float taps were found.
pub enum How {
    /// Kaiser window: the length Kaiser's formula estimated, and the window's β.
    Window { estimated_len: usize, beta: f64 },
    /// Parks–McClellan: the length Kaiser's equiripple formula estimated (None when the length
    /// was given), the weighted ripple δ the exchange converged to, and its iterations.
    Equiripple {
        estimated_len: Option<usize>,
        weighted_ripple: f64,
        iterations: u32,
    },
}

/// A finished design.
pub struct Designed {
    pub chosen: Chosen,
    /// The float design the taps come from.
    pub ideal: Vec<f64>,
    pub float_measured: Measured<f64>,
    pub how: How,
    /// Extra stopband attenuation the float design was asked for so that the quantized taps
    /// meet the spec.
    pub margin_db: f64,
    /// The taps in the chosen format.
    pub taps: Taps,
    pub measured: Measured<f64>,
    /// Fixed point only: the headroom and the error bound against the float taps.
    pub proof: Option<(Headroom, ErrorBound)>,
}

#[derive(Clone)]
pub enum Taps {
    Fixed(Codes),
    Float(Vec<f32>),
}

fn library(e: Error) -> Failure {
    match e {
        Error::OutputLength { expected, .. } => Failure::plain(format!(
            "design: the spec needs {expected} taps, more than the tool's {MAX_TAPS}: expected a wider transition band or less attenuation"
        )),
        Error::SpecNotMet { taps, .. } => Failure::plain(format!(
            "design: no Kaiser design of up to {taps} taps meets the spec in this format: expected a coarser spec or a wider format"
        )),
        other => Failure::plain(format!("design: {other}")),
    }
}

pub fn design(chosen: Chosen) -> Result<Designed, Failure> {
    match chosen.method {
        Method::Window => window_design(chosen),
        Method::Equiripple => equiripple_design(chosen),
    }
}

fn window_design(chosen: Chosen) -> Result<Designed, Failure> {
    let spec = chosen.spec;
    match chosen.format {
        Format::F32 => {
            let float = spec.kaiser::<MAX_TAPS>().map_err(library)?;
            let taps: Vec<f32> = float.taps.iter().map(|&h| h as f32).collect();
            let measured = spec.measure(&taps).map_err(library)?;
            Ok(Designed {
                ideal: float.taps.to_vec(),
                float_measured: float.measured,
                how: How::Window {
                    estimated_len: float.estimated_len,
                    beta: float.beta,
                },
                margin_db: 0.0,
                taps: Taps::Float(taps),
                measured,
                proof: None,
                chosen,
            })
        }
        Format::Q15 | Format::Q31 => {
            let (float, codes, measured, margin_db) = if chosen.format == Format::Q15 {
                let d = spec.kaiser_fixed::<i16, MAX_TAPS>().map_err(library)?;
                (
                    d.float,
                    Codes::Q15(d.taps.to_vec()),
                    d.measured,
                    d.margin_db,
                )
            } else {
                let d = spec.kaiser_fixed::<i32, MAX_TAPS>().map_err(library)?;
                (
                    d.float,
                    Codes::Q31(d.taps.to_vec()),
                    d.measured,
                    d.margin_db,
                )
            };
            let how = How::Window {
                estimated_len: float.estimated_len,
                beta: float.beta,
            };
            fixed(
                chosen,
                float.taps.to_vec(),
                float.measured,
                how,
                margin_db,
                codes,
                measured,
            )
        }
    }
}

/// The headroom proof and error bound of fixed-point taps, and the finished design.
fn fixed(
    chosen: Chosen,
    ideal: Vec<f64>,
    float_measured: Measured<f64>,
    how: How,
    margin_db: f64,
    codes: Codes,
    measured: Measured<f64>,
) -> Result<Designed, Failure> {
    let input = chosen
        .adc
        .range(chosen.format.word_bits())
        .map_err(library)?;
    let headroom = codes.headroom(input);
    let bound = codes
        .error_bound(&ideal, input, Rounding::HalfUp)
        .map_err(library)?;
    Ok(Designed {
        ideal,
        float_measured,
        how,
        margin_db,
        taps: Taps::Fixed(codes),
        measured,
        proof: Some((headroom, bound)),
        chosen,
    })
}

/// The equiripple bands of a spec: gain 1 in the passbands with weight 1, gain 0 in the
/// stopbands with weight δp/δs, so that the exchange's equal weighted error puts each band's
/// deviation at the ratio the spec allows.
fn equiripple_bands(chosen: &Chosen, spec: &Spec<f64>) -> Vec<EquirippleBand> {
    let half = spec.sample_rate_hz / 2.0;
    let (pass_dev, stop_dev) = deviations(spec);
    let stop_weight = pass_dev / stop_dev;
    let e = &chosen.edges;
    let at = |k: usize| e.get(k).copied().unwrap_or(0.0);
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
        weight: stop_weight,
    };
    match chosen.band {
        BandKind::Lowpass => vec![pass(0.0, at(0)), stop(at(1), half)],
        BandKind::Highpass => vec![stop(0.0, at(0)), pass(at(1), half)],
        BandKind::Bandpass => vec![stop(0.0, at(0)), pass(at(1), at(2)), stop(at(3), half)],
        BandKind::Bandstop => vec![pass(0.0, at(0)), stop(at(1), at(2)), pass(at(3), half)],
    }
}

/// (δp, δs): the largest passband deviation the ripple allows, 20·log10((1 + δp)/(1 − δp)) =
/// ripple, and the largest stopband gain the attenuation allows.
fn deviations(spec: &Spec<f64>) -> (f64, f64) {
    let g = 10f64.powf(spec.passband_ripple_db / 20.0);
    (
        (g - 1.0) / (g + 1.0),
        10f64.powf(-spec.stopband_attenuation_db / 20.0),
    )
}

/// Kaiser's length estimate for an equiripple filter,
/// N ≈ (−20·log10 √(δp·δs) − 13) / (14.6·Δf/fs) + 1 (J. F. Kaiser, 1974; from memory), made
/// odd where the band passes fs/2.
fn equiripple_estimate(chosen: &Chosen, spec: &Spec<f64>) -> usize {
    let (pass_dev, stop_dev) = deviations(spec);
    let e = &chosen.edges;
    let width = |a: usize, b: usize| match (e.get(a), e.get(b)) {
        (Some(x), Some(y)) => y - x,
        _ => f64::INFINITY,
    };
    let transition = width(0, 1).min(width(2, 3));
    let n = (-20.0 * (pass_dev * stop_dev).sqrt().log10() - 13.0)
        / (14.6 * transition / spec.sample_rate_hz)
        + 1.0;
    let n = if n.is_finite() {
        n.ceil().max(3.0)
    } else {
        3.0
    };
    let n = (n as usize).min(MAX_EQUIRIPPLE_TAPS);
    if odd_only(chosen) && n % 2 == 0 {
        n + 1
    } else {
        n
    }
}

fn odd_only(chosen: &Chosen) -> bool {
    matches!(chosen.band, BandKind::Highpass | BandKind::Bandstop)
}

/// One equiripple design of `len` taps for `spec`, measured against it.
struct Candidate {
    taps: Vec<f64>,
    measured: Measured<f64>,
    weighted_ripple: f64,
    iterations: u32,
}

fn equiripple_at(chosen: &Chosen, spec: &Spec<f64>, len: usize) -> Result<Candidate, Error> {
    let d = equiripple(len, &equiripple_bands(chosen, spec), spec.sample_rate_hz)?;
    let measured = spec.measure(&d.taps)?;
    Ok(Candidate {
        taps: d.taps,
        measured,
        weighted_ripple: d.weighted_ripple,
        iterations: d.iterations,
    })
}

/// The shortest equiripple design that meets `spec`, searched from Kaiser's estimate: if the
/// estimate misses, lengths grow in doubling steps until one meets, then bisection finds the
/// shortest between the last miss and that one; finally shorter lengths are tried one step at a
/// time while they still meet (the estimate is often generous). The step is 2 for bands that
/// need an odd length. A length whose exchange does not converge counts as a miss.
fn shortest_equiripple(chosen: &Chosen, spec: &Spec<f64>) -> Result<Candidate, Failure> {
    let step = if odd_only(chosen) { 2 } else { 1 };
    let meets = |len: usize| match equiripple_at(chosen, spec, len) {
        Ok(c) if c.measured.meets() => Some(c),
        _ => None,
    };
    let mut len = equiripple_estimate(chosen, spec);
    let mut best = meets(len);
    if best.is_none() {
        // Gallop: the last length known to miss, and the next try.
        let mut missed = len;
        let mut jump = step;
        loop {
            if missed >= MAX_EQUIRIPPLE_TAPS {
                return Err(Failure::plain(format!(
                    "design: no equiripple design of up to {MAX_EQUIRIPPLE_TAPS} taps (the library's limit) meets the spec: expected a wider transition band, less attenuation, or method window"
                )));
            }
            let mut next = (missed + jump).min(MAX_EQUIRIPPLE_TAPS);
            if next % 2 == 0 && step == 2 {
                next -= 1;
            }
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
        return Err(Failure::plain(
            "design: the equiripple search found no design",
        ));
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

fn equiripple_design(chosen: Chosen) -> Result<Designed, Failure> {
    let spec = chosen.spec;
    // With a length given: that one design, whatever it measures (the report says if it
    // misses). Otherwise the shortest that meets the spec, then, for fixed point, the shortest
    // whose quantized taps meet it, asking the float design for more attenuation in the same
    // steps as the Kaiser path does.
    let margins: &[f64] = match chosen.format {
        Format::F32 => &[0.0],
        _ => &[0.0, 0.5, 1.0, 2.0, 3.0, 4.0, 6.0, 9.0],
    };
    let mut longest = 0;
    for &margin_db in margins {
        let stricter = Spec {
            stopband_attenuation_db: spec.stopband_attenuation_db + margin_db,
            ..spec
        };
        let (float, estimated_len) = match chosen.length {
            Some(len) => (
                equiripple_at(&chosen, &stricter, len)
                    .map_err(|e| Failure::plain(format!("design: equiripple, {len} taps: {e}")))?,
                None,
            ),
            None => (
                shortest_equiripple(&chosen, &stricter)?,
                Some(equiripple_estimate(&chosen, &stricter)),
            ),
        };
        let float_measured = spec.measure(&float.taps).map_err(library)?;
        let how = How::Equiripple {
            estimated_len,
            weighted_ripple: float.weighted_ripple,
            iterations: float.iterations,
        };
        match chosen.format {
            Format::F32 => {
                let taps: Vec<f32> = float.taps.iter().map(|&h| h as f32).collect();
                let measured = spec.measure(&taps).map_err(library)?;
                return Ok(Designed {
                    ideal: float.taps,
                    float_measured,
                    how,
                    margin_db,
                    taps: Taps::Float(taps),
                    measured,
                    proof: None,
                    chosen,
                });
            }
            Format::Q15 | Format::Q31 => {
                let codes = Codes::quantize(&float.taps, chosen.format).map_err(library)?;
                let measured = match &codes {
                    Codes::Q15(c) => spec.measure(c),
                    Codes::Q31(c) => spec.measure(c),
                }
                .map_err(library)?;
                if measured.meets() || chosen.length.is_some() {
                    return fixed(
                        chosen,
                        float.taps,
                        float_measured,
                        how,
                        margin_db,
                        codes,
                        measured,
                    );
                }
                longest = longest.max(float.taps.len());
            }
        }
    }
    Err(Failure::plain(format!(
        "design: no equiripple design (up to {} taps) meets the spec once quantized to {}: expected a coarser spec or a wider format",
        longest,
        chosen.format.name()
    )))
}

impl Designed {
    /// Whether no input in range can overflow the taps (float taps: always).
    pub fn is_safe(&self) -> bool {
        self.proof
            .as_ref()
            .is_none_or(|(h, _)| report::is_safe(h, Rounding::HalfUp))
    }

    pub fn len(&self) -> usize {
        self.ideal.len()
    }

    /// Linear phase: (N − 1)/2 samples.
    pub fn group_delay_samples(&self) -> f64 {
        (self.len() as f64 - 1.0) / 2.0
    }

    fn meets(m: &Measured<f64>) -> &'static str {
        if m.meets() {
            "meets the spec"
        } else {
            "misses the spec"
        }
    }

    /// The human-readable summary, one fact a line.
    pub fn summary(&self) -> String {
        let c = &self.chosen;
        let s = &c.spec;
        let mut t = String::new();
        let edges: Vec<String> = c.edges.iter().map(|e| format!("{e}")).collect();
        let _ = writeln!(
            t,
            "spec: {} at {} Hz, edges {} Hz, ripple <= {} dB, attenuation >= {} dB, {} taps",
            c.band.name(),
            s.sample_rate_hz,
            edges.join(", "),
            s.passband_ripple_db,
            s.stopband_attenuation_db,
            c.format.name()
        );
        match &self.how {
            How::Window {
                estimated_len,
                beta,
            } => {
                let _ = writeln!(
                    t,
                    "length: {} taps (Kaiser window: estimate {estimated_len}, beta {beta:.4}; {} dB extra attenuation asked for quantization)",
                    self.len(),
                    self.margin_db
                );
            }
            How::Equiripple {
                estimated_len,
                weighted_ripple,
                iterations,
            } => {
                let chosen = match estimated_len {
                    Some(n) => format!("the shortest that meets the spec, estimate {n}"),
                    None => String::from("the length asked for"),
                };
                let _ = writeln!(
                    t,
                    "length: {} taps (equiripple, Parks-McClellan: {chosen}; weighted ripple {weighted_ripple:.3e} after {iterations} exchanges; {} dB extra attenuation asked for quantization)",
                    self.len(),
                    self.margin_db
                );
            }
        }
        let gd = self.group_delay_samples();
        let _ = writeln!(
            t,
            "group delay: {gd} samples = {:.3} ms (linear phase)",
            gd / s.sample_rate_hz * 1000.0
        );
        let f = &self.float_measured;
        let _ = writeln!(
            t,
            "float64 taps: ripple {:.4} dB, attenuation {:.2} dB -> {}",
            f.passband_ripple_db,
            f.stopband_attenuation_db,
            Self::meets(f)
        );
        let m = &self.measured;
        let _ = writeln!(
            t,
            "{} taps: ripple {:.4} dB, attenuation {:.2} dB (worst at {:.2} Hz) -> {}",
            c.format.name(),
            m.passband_ripple_db,
            m.stopband_attenuation_db,
            m.stopband.max_at_hz,
            Self::meets(m)
        );
        match &self.proof {
            Some((h, b)) => {
                let _ = writeln!(t, "headroom ({}):", c.adc.describe(c.format.word_bits()));
                t.push_str(&report::headroom_text(h, Rounding::HalfUp));
                let _ = writeln!(
                    t,
                    "error bound vs float64: {:.2} LSB (taps) + {:.2} LSB (rounding) = {:.2} LSB",
                    b.quantization_lsb(),
                    b.rounding_lsb(),
                    b.lsb()
                );
            }
            None => {
                let _ = writeln!(
                    t,
                    "headroom: float taps cannot overflow; NaN and infinities propagate"
                );
            }
        }
        t
    }

    pub fn json(&self, command: &str) -> Value {
        let c = &self.chosen;
        let s = &c.spec;
        let measured = |m: &Measured<f64>| {
            json!({
                "ripple_db": m.passband_ripple_db,
                "attenuation_db": m.stopband_attenuation_db,
                "worst_stopband_hz": m.stopband.max_at_hz,
                "meets_spec": m.meets(),
            })
        };
        let taps: Value = match &self.taps {
            Taps::Fixed(codes) => json!(codes.raw()),
            Taps::Float(v) => json!(v.iter().map(|&x| f64::from(x)).collect::<Vec<f64>>()),
        };
        json!({
            "command": command,
            "spec": {
                "band": c.band.name(),
                "sample_rate_hz": s.sample_rate_hz,
                "edges_hz": c.edges,
                "ripple_db": s.passband_ripple_db,
                "attenuation_db": s.stopband_attenuation_db,
                "format": c.format.name(),
                "adc_bits": c.adc.bits,
                "method": c.method.name(),
                "length": c.length,
            },
            "taps": self.len(),
            "method": c.method.name(),
            "length_estimate": match &self.how {
                How::Window { estimated_len, .. } => Some(*estimated_len),
                How::Equiripple { estimated_len, .. } => *estimated_len,
            },
            "beta": match &self.how {
                How::Window { beta, .. } => Some(*beta),
                How::Equiripple { .. } => None,
            },
            "weighted_ripple": match &self.how {
                How::Window { .. } => None,
                How::Equiripple { weighted_ripple, .. } => Some(*weighted_ripple),
            },
            "margin_db": self.margin_db,
            "group_delay_samples": self.group_delay_samples(),
            "float": measured(&self.float_measured),
            "quantized": measured(&self.measured),
            "headroom": self.proof.as_ref().map(|(h, _)| report::headroom_json(h, Rounding::HalfUp)),
            "error_bound_lsb": self.proof.as_ref().map(|(_, b)| b.lsb()),
            "safe": self.is_safe(),
            "values": taps,
        })
    }

    /// The taps as a Rust source file: one `pub static` array with a doc comment that records
    /// the spec, the measured figures, the headroom proof and the command that made it.
    pub fn rust_source(&self, name: &str, command: &str) -> String {
        let mut src = String::new();
        src.push_str("// Written by the tapline host tool. Change the spec and run the command below again\n");
        src.push_str("// rather than editing the numbers by hand.\n\n");
        let (ty, what) = match &self.taps {
            Taps::Fixed(Codes::Q15(_)) => ("i16", "Q15 codes (15 fractional bits)"),
            Taps::Fixed(Codes::Q31(_)) => ("i32", "Q31 codes (31 fractional bits)"),
            Taps::Float(_) => ("f32", "f32 values"),
        };
        let _ = writeln!(
            src,
            "/// {} {} FIR taps as {what}.",
            self.len(),
            self.chosen.band.name()
        );
        src.push_str("///\n/// ```text\n");
        for line in self.summary().lines() {
            let _ = writeln!(src, "/// {line}");
        }
        src.push_str("/// ```\n///\n");
        let _ = writeln!(src, "/// Generated by: `{command}`");
        let _ = writeln!(src, "pub static {name}: [{ty}; {}] = [", self.len());
        let items: Vec<String> = match &self.taps {
            Taps::Fixed(codes) => codes.raw().iter().map(|v| v.to_string()).collect(),
            // `{:?}` prints the shortest text that reads back as the same f32.
            Taps::Float(v) => v.iter().map(|x| format!("{x:?}")).collect(),
        };
        for chunk in items.chunks(8) {
            let _ = writeln!(src, "    {},", chunk.join(", "));
        }
        src.push_str("];\n");
        src
    }
}

/// 0 when the taps are safe (float taps always are), 1 when some input in range can overflow
/// them, as `check` answers.
pub fn status(d: &Designed) -> u8 {
    if d.is_safe() { 0 } else { 1 }
}

pub fn report(d: &Designed) -> Report {
    Report {
        text: d.summary(),
        json: d.json("design"),
        status: status(d),
    }
}

/// A Rust identifier for a `static`: upper-case letters, digits and underscores.
pub fn check_name(name: &str) -> Result<(), Failure> {
    let ok = name
        .chars()
        .next()
        .is_some_and(|c| c.is_ascii_uppercase() || c == '_')
        && name
            .chars()
            .all(|c| c.is_ascii_uppercase() || c.is_ascii_digit() || c == '_');
    if ok {
        Ok(())
    } else {
        Err(Failure::argument(
            "--name",
            format!("expected an upper-case Rust identifier like SMOOTH_TAPS, found {name:?}"),
        ))
    }
}

pub fn emit(d: &Designed, out: &Path, name: &str, command: &str) -> Result<Report, Failure> {
    atomic::write(out, d.rust_source(name, command).as_bytes())?;
    let mut text = d.summary();
    let _ = writeln!(text, "wrote {} ({name})", out.display());
    let mut json = d.json("emit");
    if let Some(map) = json.as_object_mut() {
        map.insert("file".into(), json!(out.display().to_string()));
        map.insert("name".into(), json!(name));
    }
    Ok(Report {
        text,
        json,
        status: status(d),
    })
}
