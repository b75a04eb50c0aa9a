//! A filter spec from command-line flags or from a TOML file of our own schema, checked with
//! errors that point at the flag, or at the file, line and column of the offending value.
//!
//! The TOML schema (every key at the top level; unknown keys are refused):
//!
//! ```toml
//! band = "lowpass"           # lowpass | highpass | bandpass | bandstop
//! sample_rate_hz = 1000
//! edges_hz = [5, 50]         # increasing, strictly inside (0, fs/2): 2 edges, or 4 for bandpass/bandstop
//! ripple_db = 0.1            # largest passband ripple, peak to peak
//! attenuation_db = 60        # smallest stopband attenuation
//! format = "q15"             # q15 | q31 | f32
//! adc_bits = 12              # optional: the ADC's resolution (default: the whole sample word)
//! adc_align = "right"        # left | right: required when adc_bits is below the sample word
//! method = "equiripple"      # optional: window (Kaiser window, the default) | equiripple
//! length = 61                # optional, equiripple only: exactly this many taps instead of
//!                            # the shortest that meets the spec
//! ```

use crate::design::{MAX_EQUIRIPPLE_TAPS, Shape, Spec};
use crate::tool::failure::{Failure, line_column};
use crate::tool::input::taps::{Adc, AlignArg, Format, alignment_needed};
use clap::{Args, ValueEnum};
use serde::Deserialize;
use std::format;
use std::path::{Path, PathBuf};
use std::prelude::rust_2024::*;
use toml::Spanned;

/// The band layout.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
// No doc comments on these variants: clap would turn them into per-value help text and
// change `--help`.
#[allow(missing_docs)]
pub enum BandKind {
    Lowpass,
    Highpass,
    Bandpass,
    Bandstop,
}

impl BandKind {
    fn parse(text: &str) -> Option<BandKind> {
        BandKind::from_str(text, true).ok()
    }

    /// The band layout's name as the tool prints it.
    pub fn name(self) -> &'static str {
        match self {
            BandKind::Lowpass => "lowpass",
            BandKind::Highpass => "highpass",
            BandKind::Bandpass => "bandpass",
            BandKind::Bandstop => "bandstop",
        }
    }

    fn edge_names(self) -> &'static str {
        match self {
            BandKind::Lowpass => "2 edges: pass, stop",
            BandKind::Highpass => "2 edges: stop, pass",
            BandKind::Bandpass => "4 edges: stop low, pass low, pass high, stop high",
            BandKind::Bandstop => "4 edges: pass low, stop low, stop high, pass high",
        }
    }
}

/// How the taps are designed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Method {
    /// A Kaiser window: β and the length from Kaiser's formulas, strengthened until the taps
    /// meet the spec.
    Window,
    /// Parks–McClellan: the shortest symmetric filter whose worst error, weighted by the spec,
    /// meets it (equal ripple across each band).
    Equiripple,
}

impl Method {
    /// The method's name as the tool prints it.
    pub fn name(self) -> &'static str {
        match self {
            Method::Window => "window",
            Method::Equiripple => "equiripple",
        }
    }
}

/// The spec, as flags or as a file.
#[derive(Args, Clone)]
pub struct SpecArgs {
    /// Read the spec from this TOML file instead of flags.
    #[arg(long, value_name = "FILE", conflicts_with_all = ["band", "rate", "edges", "ripple", "attenuation", "format", "adc_bits", "align", "method", "length"])]
    pub spec: Option<PathBuf>,
    /// Band layout.
    #[arg(long, value_enum)]
    pub band: Option<BandKind>,
    /// Sample rate in Hz.
    #[arg(long, value_name = "HZ", allow_negative_numbers = true)]
    pub rate: Option<f64>,
    /// Band edges in Hz, increasing, comma-separated (2 edges, or 4 for bandpass/bandstop).
    #[arg(
        long,
        value_name = "HZ,HZ[,HZ,HZ]",
        value_delimiter = ',',
        allow_negative_numbers = true
    )]
    pub edges: Vec<f64>,
    /// Largest passband ripple, peak to peak, in dB.
    #[arg(
        long,
        value_name = "DB",
        default_value_t = 0.1,
        allow_negative_numbers = true
    )]
    pub ripple: f64,
    /// Smallest stopband attenuation in dB.
    #[arg(long, value_name = "DB", allow_negative_numbers = true)]
    pub attenuation: Option<f64>,
    /// Tap format.
    #[arg(long, value_enum, default_value = "q15")]
    pub format: Format,
    /// ADC resolution in bits (default: the whole sample word).
    #[arg(long, value_name = "BITS")]
    pub adc_bits: Option<u32>,
    /// Where the ADC's bits sit in the sample word: required when --adc-bits is narrower than
    /// the sample word.
    #[arg(long, value_enum)]
    pub align: Option<AlignArg>,
    /// Design method: a Kaiser window, or equiripple (Parks–McClellan).
    #[arg(long, value_enum, default_value = "window")]
    pub method: Method,
    /// Equiripple only: exactly this many taps instead of the shortest that meets the spec.
    #[arg(long, value_name = "TAPS")]
    pub length: Option<u32>,
}

/// A checked spec and what it is for.
#[derive(Debug, Clone)]
pub struct Chosen {
    /// The library's spec (sample rate, band edges, ripple, attenuation).
    pub spec: Spec<f64>,
    /// The band layout as asked for.
    pub band: BandKind,
    /// The band edges in Hz, in the order given.
    pub edges: Vec<f64>,
    /// The tap format.
    pub format: Format,
    /// The ADC feeding the filter.
    pub adc: Adc,
    /// How the taps are designed.
    pub method: Method,
    /// Equiripple only: the length asked for (None: the shortest that meets the spec).
    pub length: Option<usize>,
    /// Where the band edges were given: a design that would need too many taps is reported
    /// there, since the transition widths set the length.
    pub edges_at: Origin,
    /// Where the stopband attenuation was given: a depth the format cannot reach is reported
    /// there.
    pub attenuation_at: Origin,
}

/// Where a value of the spec was given, kept with the checked spec for messages about what
/// the value leads to later (the design).
#[derive(Debug, Clone)]
pub enum Origin {
    /// A command-line flag.
    Flag(&'static str),
    /// A key of a spec file, at the 1-based line and column of its value.
    File {
        /// The spec file.
        path: PathBuf,
        /// The key.
        key: &'static str,
        /// 1-based line of the value.
        line: usize,
        /// 1-based column of the value.
        column: usize,
    },
}

impl Origin {
    /// A failure at this place: `command line: --flag: what` or `file:line:column: key: what`.
    pub fn fail(&self, what: impl std::fmt::Display) -> Failure {
        match self {
            Origin::Flag(flag) => Failure::argument(flag, what),
            Origin::File {
                path,
                key,
                line,
                column,
            } => Failure::at(path, *line, *column, format!("{key}: {what}")),
        }
    }
}

/// Where a value came from, for error messages.
enum Place<'a> {
    Flag(&'static str),
    File {
        path: &'a Path,
        text: &'a str,
        offset: usize,
    },
}

impl Place<'_> {
    /// The place kept for later messages, with the file's key.
    fn origin(&self, key: &'static str) -> Origin {
        match self {
            Place::Flag(flag) => Origin::Flag(flag),
            Place::File { path, text, offset } => {
                let (line, column) = line_column(text, *offset);
                Origin::File {
                    path: path.to_path_buf(),
                    key,
                    line,
                    column,
                }
            }
        }
    }

    fn fail(&self, what: impl std::fmt::Display) -> Failure {
        match self {
            Place::Flag(flag) => Failure::argument(flag, what),
            Place::File { path, text, offset } => {
                let (line, column) = line_column(text, *offset);
                Failure::at(path, line, column, what)
            }
        }
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct SpecFile {
    band: Spanned<String>,
    sample_rate_hz: Spanned<f64>,
    edges_hz: Spanned<Vec<Spanned<f64>>>,
    ripple_db: Spanned<f64>,
    attenuation_db: Spanned<f64>,
    format: Spanned<String>,
    adc_bits: Option<Spanned<i64>>,
    adc_align: Option<Spanned<String>>,
    method: Option<Spanned<String>>,
    length: Option<Spanned<i64>>,
}

impl SpecArgs {
    /// The spec a TOML file describes, checked.
    pub fn from_file(path: &Path) -> Result<Chosen, Failure> {
        from_file(path)
    }

    /// The spec the flags or the file describe, checked.
    pub fn chosen(&self) -> Result<Chosen, Failure> {
        match &self.spec {
            Some(path) => from_file(path),
            None => {
                let band = self
                    .band
                    .ok_or_else(|| Failure::argument("--band", "expected a band layout"))?;
                let rate = self
                    .rate
                    .ok_or_else(|| Failure::argument("--rate", "expected a sample rate in Hz"))?;
                let attenuation = self.attenuation.ok_or_else(|| {
                    Failure::argument("--attenuation", "expected a stopband attenuation in dB")
                })?;
                let edges: Vec<(f64, Place)> = self
                    .edges
                    .iter()
                    .map(|&e| (e, Place::Flag("--edges")))
                    .collect();
                let adc_bits = self
                    .adc_bits
                    .map(|b| (i64::from(b), Place::Flag("--adc-bits")));
                check(Parts {
                    band,
                    rate: (rate, Place::Flag("--rate")),
                    align_place: Place::Flag("--align"),
                    edges,
                    edges_place: Place::Flag("--edges"),
                    ripple: (self.ripple, Place::Flag("--ripple")),
                    attenuation: (attenuation, Place::Flag("--attenuation")),
                    format: self.format,
                    adc_bits,
                    align: self.align,
                    method: self.method,
                    length: self.length.map(|n| (i64::from(n), Place::Flag("--length"))),
                })
            }
        }
    }
}

fn from_file(path: &Path) -> Result<Chosen, Failure> {
    let text = crate::tool::input::file::read_text(path)?;
    let file: SpecFile = toml::from_str(&text).map_err(|e| {
        let offset = e.span().map_or(0, |s| s.start);
        let (line, column) = line_column(&text, offset);
        Failure::at(path, line, column, e.message())
    })?;
    let at = |offset: usize| Place::File {
        path,
        text: &text,
        offset,
    };
    let band = BandKind::parse(file.band.get_ref()).ok_or_else(|| {
        at(file.band.span().start)
            .fail("expected band = \"lowpass\", \"highpass\", \"bandpass\" or \"bandstop\"")
    })?;
    let format = match file.format.get_ref().to_ascii_lowercase().as_str() {
        "q15" => Format::Q15,
        "q31" => Format::Q31,
        "f32" => Format::F32,
        _ => {
            return Err(
                at(file.format.span().start).fail("expected format = \"q15\", \"q31\" or \"f32\"")
            );
        }
    };
    let align = match &file.adc_align {
        None => None,
        Some(a) => Some(match a.get_ref().to_ascii_lowercase().as_str() {
            "left" => AlignArg::Left,
            "right" => AlignArg::Right,
            _ => return Err(at(a.span().start).fail("expected adc_align = \"left\" or \"right\"")),
        }),
    };
    let method = match &file.method {
        None => Method::Window,
        Some(m) => match m.get_ref().to_ascii_lowercase().as_str() {
            "window" => Method::Window,
            "equiripple" => Method::Equiripple,
            _ => {
                return Err(at(m.span().start)
                    .fail("expected method = \"window\" (Kaiser) or \"equiripple\""));
            }
        },
    };
    let edges = file
        .edges_hz
        .get_ref()
        .iter()
        .map(|e| (*e.get_ref(), at(e.span().start)))
        .collect();
    check(Parts {
        band,
        rate: (
            *file.sample_rate_hz.get_ref(),
            at(file.sample_rate_hz.span().start),
        ),
        edges,
        edges_place: at(file.edges_hz.span().start),
        // A missing adc_align is reported at adc_bits, the key that needs it.
        align_place: at(file.adc_bits.as_ref().map_or(0, |b| b.span().start)),
        ripple: (*file.ripple_db.get_ref(), at(file.ripple_db.span().start)),
        attenuation: (
            *file.attenuation_db.get_ref(),
            at(file.attenuation_db.span().start),
        ),
        format,
        adc_bits: file
            .adc_bits
            .as_ref()
            .map(|b| (*b.get_ref(), at(b.span().start))),
        align,
        method,
        length: file
            .length
            .as_ref()
            .map(|n| (*n.get_ref(), at(n.span().start))),
    })
}

struct Parts<'a> {
    band: BandKind,
    rate: (f64, Place<'a>),
    edges: Vec<(f64, Place<'a>)>,
    edges_place: Place<'a>,
    align_place: Place<'a>,
    ripple: (f64, Place<'a>),
    attenuation: (f64, Place<'a>),
    format: Format,
    adc_bits: Option<(i64, Place<'a>)>,
    align: Option<AlignArg>,
    method: Method,
    length: Option<(i64, Place<'a>)>,
}

fn check(p: Parts) -> Result<Chosen, Failure> {
    let (rate, place) = &p.rate;
    if !(rate.is_finite() && *rate > 0.0) {
        return Err(place.fail(format!(
            "expected a positive sample rate in Hz, found {rate}"
        )));
    }
    let half = rate / 2.0;
    let wanted = match p.band {
        BandKind::Lowpass | BandKind::Highpass => 2,
        BandKind::Bandpass | BandKind::Bandstop => 4,
    };
    if p.edges.len() != wanted {
        return Err(p.edges_place.fail(format!(
            "expected {} for a {}, found {} edge(s)",
            p.band.edge_names(),
            p.band.name(),
            p.edges.len()
        )));
    }
    let mut previous: Option<f64> = None;
    for (edge, place) in &p.edges {
        if !(edge.is_finite() && *edge > 0.0 && *edge < half) {
            return Err(place.fail(format!(
                "expected an edge strictly between 0 and fs/2 = {half} Hz, found {edge}"
            )));
        }
        if let Some(before) = previous {
            // Both are finite here (checked above), so `<=` is the whole test.
            if *edge <= before {
                return Err(place.fail(format!(
                    "expected edges in increasing order, found {edge} after {before}"
                )));
            }
        }
        previous = Some(*edge);
    }
    let (ripple, place) = &p.ripple;
    if !(ripple.is_finite() && *ripple > 0.0) {
        return Err(place.fail(format!("expected a ripple in dB above 0, found {ripple}")));
    }
    let (attenuation, place) = &p.attenuation;
    if !(attenuation.is_finite()
        && *attenuation > 0.0
        && *attenuation <= crate::design::MAX_ATTENUATION_DB)
    {
        return Err(place.fail(format!(
            "expected an attenuation in dB above 0 and at most {}, found {attenuation}",
            crate::design::MAX_ATTENUATION_DB
        )));
    }
    let word = p.format.word_bits();
    let bits = match &p.adc_bits {
        None => None,
        Some((bits, place)) => {
            if !(1..=i64::from(word)).contains(bits) {
                return Err(place.fail(format!(
                    "expected ADC bits in 1..={word} for {} samples, found {bits}",
                    p.format.name()
                )));
            }
            u32::try_from(*bits).ok()
        }
    };
    let align = match (bits, p.align) {
        (Some(b), None) if b < word => {
            let key = match p.align_place {
                Place::Flag(_) => "--align left or --align right",
                Place::File { .. } => "adc_align = \"left\" or \"right\"",
            };
            return Err(p.align_place.fail(alignment_needed(b, word, key)));
        }
        // For the whole word the alignment has no effect.
        (_, align) => align.unwrap_or(AlignArg::Right),
    };
    let e: Vec<f64> = p.edges.iter().map(|(e, _)| *e).collect();
    let edge = |k: usize| e.get(k).copied().unwrap_or(0.0);
    let shape = match p.band {
        BandKind::Lowpass => Shape::Lowpass {
            pass_hz: edge(0),
            stop_hz: edge(1),
        },
        BandKind::Highpass => Shape::Highpass {
            stop_hz: edge(0),
            pass_hz: edge(1),
        },
        BandKind::Bandpass => Shape::Bandpass {
            stop_low_hz: edge(0),
            pass_low_hz: edge(1),
            pass_high_hz: edge(2),
            stop_high_hz: edge(3),
        },
        BandKind::Bandstop => Shape::Bandstop {
            pass_low_hz: edge(0),
            stop_low_hz: edge(1),
            stop_high_hz: edge(2),
            pass_high_hz: edge(3),
        },
    };
    let spec = Spec {
        sample_rate_hz: *rate,
        shape,
        passband_ripple_db: *ripple,
        stopband_attenuation_db: *attenuation,
    };
    let length = match &p.length {
        None => None,
        Some((_, place)) if p.method != Method::Equiripple => {
            return Err(place.fail(
                "expected a length only with method equiripple (the Kaiser window design finds its own length)",
            ));
        }
        Some((n, place)) => {
            let max = MAX_EQUIRIPPLE_TAPS as i64;
            if !(3..=max).contains(n) {
                return Err(place.fail(format!(
                    "expected an equiripple length in 3..={max} taps, found {n}"
                )));
            }
            // Parks–McClellan here makes symmetric taps only; an even-length symmetric filter
            // has a zero at fs/2, so a band that passes fs/2 needs an odd length.
            if spec.needs_odd() && n % 2 == 0 {
                return Err(place.fail(format!(
                    "expected an odd length for a {} with method equiripple, found {n}: its taps are symmetric, and even-length symmetric taps have a zero at fs/2",
                    p.band.name()
                )));
            }
            usize::try_from(*n).ok()
        }
    };
    Ok(Chosen {
        spec,
        band: p.band,
        edges: e,
        format: p.format,
        adc: Adc { bits, align },
        method: p.method,
        length,
        edges_at: p.edges_place.origin("edges_hz"),
        attenuation_at: p.attenuation.1.origin("attenuation_db"),
    })
}
