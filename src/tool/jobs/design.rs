//! `design` and `emit`: a spec → taps that meet it in the chosen format (a Kaiser window, or
//! equiripple) → the measured figures and the headroom proof; `emit` also writes the taps as a
//! Rust source file.

use crate::design::{DesignError, EquirippleDesign, MAX_EQUIRIPPLE_TAPS, Measured};
use crate::headroom::{ErrorBound, Headroom, InputRange};
use crate::tool::failure::Failure;
use crate::tool::input::spec::{Chosen, Method};
use crate::tool::input::taps::{Codes, Format};
use crate::tool::output::atomic;
use crate::tool::output::report::{self, Report};
use crate::{Error, Rounding};
use serde_json::{Value, json};
use std::fmt::Write;
use std::format;
use std::path::Path;
use std::prelude::rust_2024::*;

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
    /// Fixed point only: the input range the proof and the bound were made for.
    pub input: Option<InputRange>,
}

#[derive(Clone)]
pub enum Taps {
    Fixed(Codes),
    Float(Vec<f32>),
}

fn library(e: impl Into<DesignError>) -> Failure {
    Failure::plain(format!("design: {}", e.into()))
}

/// A Kaiser window design that the tool's limit stops, reported at the band edges (their
/// transition widths set the length), or that quantization stops, reported at the
/// attenuation; anything else as the library words it.
fn window_failure(chosen: &Chosen, e: impl Into<DesignError>) -> Failure {
    let at = &chosen.edges_at;
    match e.into() {
        DesignError::InvalidTransition => at.fail(format!(
            "a transition band this narrow needs far more than the tool's {MAX_TAPS} taps (Kaiser window): expected a wider transition band or less attenuation"
        )),
        DesignError::Filter(Error::OutputLength { expected, .. }) => at.fail(format!(
            "the spec needs {expected} taps, more than the tool's {MAX_TAPS} taps (Kaiser window): expected a wider transition band or less attenuation"
        )),
        // The Kaiser search stops short of the tool's limit when quantizing to the format
        // sets a floor on the attenuation: the depth asked for is what fails.
        DesignError::SpecNotMet { taps, .. } => chosen.attenuation_at.fail(format!(
            "no Kaiser design of up to {taps} taps meets the spec in {} once quantized: expected less attenuation or a wider format",
            chosen.format.name()
        )),
        other => library(other),
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
            let float = spec
                .kaiser::<MAX_TAPS>()
                .map_err(|e| window_failure(&chosen, e))?;
            let how = How::Window {
                estimated_len: float.estimated_len,
                beta: float.beta,
            };
            single(chosen, float.taps.to_vec(), float.measured, how)
        }
        Format::Q15 | Format::Q31 => {
            let (float, codes, measured, margin_db) = if chosen.format == Format::Q15 {
                let d = spec
                    .kaiser_fixed::<i16, MAX_TAPS>()
                    .map_err(|e| window_failure(&chosen, e))?;
                (
                    d.float,
                    Codes::Q15(d.taps.to_vec()),
                    d.measured,
                    d.margin_db,
                )
            } else {
                let d = spec
                    .kaiser_fixed::<i32, MAX_TAPS>()
                    .map_err(|e| window_failure(&chosen, e))?;
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

/// f32 taps: the float design rounded to f32 and measured; no headroom to prove.
fn single(
    chosen: Chosen,
    ideal: Vec<f64>,
    float_measured: Measured<f64>,
    how: How,
) -> Result<Designed, Failure> {
    let taps: Vec<f32> = ideal.iter().map(|&h| h as f32).collect();
    let measured = chosen.spec.measure(&taps).map_err(library)?;
    Ok(Designed {
        ideal,
        float_measured,
        how,
        margin_db: 0.0,
        taps: Taps::Float(taps),
        measured,
        proof: None,
        input: None,
        chosen,
    })
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
        input: Some(input),
        chosen,
    })
}

fn equiripple_design(chosen: Chosen) -> Result<Designed, Failure> {
    let spec = chosen.spec;
    // With a length given: that one design, whatever it measures (the report says if it
    // misses). Otherwise the library's search: the shortest that meets the spec, and for fixed
    // point the shortest whose quantized taps meet it.
    let given = |e: DesignError| {
        match (chosen.length, e) {
        (Some(len), e @ DesignError::NoConvergence { .. }) => Failure::plain(format!(
            "design: equiripple, {len} taps: {e}; a length far beyond what the spec needs has an optimal error below what 64-bit arithmetic resolves, so leave the length out (the search finds the shortest) or ask for fewer taps"
        )),
        (Some(len), e) => Failure::plain(format!("design: equiripple, {len} taps: {e}")),
        (None, DesignError::SpecNotMet { taps }) => chosen.edges_at.fail(format!(
            "no equiripple design of up to {taps} taps meets the spec in {} (the search tried lengths up to {taps}; the library's limit is {MAX_EQUIRIPPLE_TAPS} taps): expected a wider transition band, less attenuation, a wider format, or method window",
            chosen.format.name()
        )),
        (None, DesignError::InvalidTransition) => chosen.edges_at.fail(format!(
            "a transition band this narrow needs far more than the library's {MAX_EQUIRIPPLE_TAPS} taps (equiripple): expected a wider transition band, less attenuation, or method window"
        )),
        (None, e) => library(e),
    }
    };
    let how = |float: &EquirippleDesign| How::Equiripple {
        estimated_len: float.estimated_len,
        weighted_ripple: float.design.weighted_ripple,
        iterations: float.design.iterations,
    };
    match chosen.format {
        Format::F32 => {
            let float = match chosen.length {
                Some(len) => spec.equiripple_at(len),
                None => spec.shortest_equiripple(),
            }
            .map_err(given)?;
            let how = how(&float);
            single(chosen, float.design.taps, float.measured, how)
        }
        Format::Q15 | Format::Q31 => {
            // The float taps and figures, the codes and the quantized figures.
            let (float, margin_db, codes, measured) = if chosen.format == Format::Q15 {
                let d = spec.equiripple_fixed::<i16>(chosen.length).map_err(given)?;
                (d.float, d.margin_db, Codes::Q15(d.taps), d.measured)
            } else {
                let d = spec.equiripple_fixed::<i32>(chosen.length).map_err(given)?;
                (d.float, d.margin_db, Codes::Q31(d.taps), d.measured)
            };
            let how = how(&float);
            fixed(
                chosen,
                float.design.taps,
                float.measured,
                how,
                margin_db,
                codes,
                measured,
            )
        }
    }
}

impl Designed {
    /// Whether no input in range can overflow the taps (float taps: always).
    pub fn is_safe(&self) -> bool {
        self.proof
            .as_ref()
            .is_none_or(|(h, _)| h.is_safe(Rounding::HalfUp))
    }

    pub fn len(&self) -> usize {
        self.ideal.len()
    }

    /// Linear phase: (N − 1)/2 samples.
    pub fn group_delay_samples(&self) -> f64 {
        (self.len() as f64 - 1.0) / 2.0
    }

    /// The verdict, and where a transition band overshoots, by how much (the library's
    /// [`Measured::meets`] decides; this only words it).
    fn meets(m: &Measured<f64>) -> String {
        if m.meets() {
            String::from("meets the spec")
        } else if !m.transition_within() {
            format!(
                "misses the spec (transition band peaks at {:+.2} dB at {:.2} Hz, above the passband's limit {:+.2} dB)",
                m.transition_peak_db(),
                m.transition.max_at_hz,
                20.0 * m.transition_limit().log10()
            )
        } else {
            String::from("misses the spec")
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
        let _ = writeln!(
            t,
            "transition bands: largest gain {:+.2} dB at {:.2} Hz (the passband's limit {:+.2} dB)",
            m.transition_peak_db(),
            m.transition.max_at_hz,
            20.0 * m.transition_limit().log10()
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
                "transition_peak_db": m.transition_peak_db(),
                "transition_peak_hz": m.transition.max_at_hz,
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
                "adc_align": c.adc.align_name(c.format.word_bits()),
                "method": c.method.name(),
                "length": c.length,
            },
            "taps": self.len(),
            "adc": c.adc.json(c.format.word_bits()),
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

/// Rust's keywords (strict, reserved, and the 2018 and 2024 editions' additions), for
/// [`check_name`]'s test that an upper-case name can never be one.
#[cfg(test)]
const KEYWORDS: [&str; 53] = [
    "as", "async", "await", "break", "const", "continue", "crate", "dyn", "else", "enum", "extern",
    "false", "fn", "for", "gen", "if", "impl", "in", "let", "loop", "match", "mod", "move", "mut",
    "pub", "ref", "return", "self", "Self", "static", "struct", "super", "trait", "true", "try",
    "type", "unsafe", "use", "where", "while", "abstract", "become", "box", "do", "final", "macro",
    "override", "priv", "typeof", "unsized", "virtual", "yield", "_",
];

/// A name for the emitted `static`: an upper-case Rust identifier (ASCII letters A–Z, digits
/// and underscores, not starting with a digit), as rustc's `non_upper_case_globals` lint
/// wants. Rust's keywords are lower-case or mixed-case, so such a name is never one — except
/// `_`, which is Rust's placeholder and refused here. Raw identifiers (`r#…`) are not needed
/// for any upper-case name and are refused with the rest.
pub fn check_name(name: &str) -> Result<(), Failure> {
    let upper = |c: char| c.is_ascii_uppercase() || c.is_ascii_digit() || c == '_';
    let ok = name
        .chars()
        .next()
        .is_some_and(|c| c.is_ascii_uppercase() || c == '_')
        && name.chars().all(upper);
    if name == "_" {
        Err(Failure::argument(
            "--name",
            "expected an upper-case Rust identifier like SMOOTH_TAPS, found \"_\" (Rust's placeholder, which rustc refuses as the name of a static)",
        ))
    } else if ok {
        Ok(())
    } else {
        Err(Failure::argument(
            "--name",
            format!(
                "expected an upper-case Rust identifier like SMOOTH_TAPS (A-Z, 0-9 and _, not starting with a digit), found {name:?}"
            ),
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn no_keyword_passes_as_a_name() {
        for k in KEYWORDS {
            assert!(check_name(k).is_err(), "{k}");
            assert!(
                check_name(&k.to_ascii_uppercase()).is_ok() || k == "_",
                "{k}"
            );
            assert!(check_name(&format!("r#{k}")).is_err(), "r#{k}");
        }
        for good in ["TAPS", "_TAPS", "__", "T1", "SILO_SCALE_TAPS"] {
            assert!(check_name(good).is_ok(), "{good}");
        }
        for bad in ["", "1T", "Taps", "TAPS-2", "TAPS 2", "\u{c4}TAPS"] {
            assert!(check_name(bad).is_err(), "{bad}");
        }
    }
}
