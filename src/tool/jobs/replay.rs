//! `replay`: a recorded capture streamed row by row through the filter as the firmware runs it
//! (bit-exact Q15/Q31, or f32) and through a float64 reference, without holding the capture in
//! memory. One channel per chosen column, each with its own filter state. Reports, per
//! channel, the largest difference from the reference against its bound, the SNR of the
//! filter's output against the reference, the saturation count, and (fixed point) how much of
//! the accumulator the real signal used against what the worst case needs.
//!
//! Units: fixed-point errors are in LSB of the output word (= LSB of the input codes); f32
//! errors are in the capture's own unit (ADC codes if it holds codes, volts if volts).

use std::prelude::rust_2024::*;
use std::{format, vec};
use crate::tool::output::atomic::Streaming;
use crate::tool::input::capture::{Capture, Kind, Pick};
use crate::tool::jobs::design::Taps;
use crate::tool::failure::Failure;
use crate::tool::output::progress::Bar;
use crate::tool::output::report::{self, Report};
use crate::tool::input::taps::{Adc, Codes, Format};
use serde_json::{Value, json};
use std::fmt::Write as _;
use std::path::PathBuf;
use crate::headroom::{AccTrace, Headroom, InputRange};
use crate::num::{Acc128, DefaultAcc, FixedPoint, MulAcc, RuntimeChecked};
use crate::{Fir, Rounding};

pub struct Request {
    pub capture: PathBuf,
    pub pick: Pick,
    /// The first row is a header (implied by named channels).
    pub header: bool,
    pub taps: Taps,
    /// The float taps the reference uses (the design's, the table's real values, or the codes
    /// as reals).
    pub ideal: Vec<f64>,
    pub format: Format,
    pub adc: Adc,
    pub rounding: Rounding,
    pub out: Option<PathBuf>,
}

/// One channel's figures.
#[derive(Default)]
pub struct Channel {
    pub name: String,
    pub max_error: f64,
    signal: f64,
    noise: f64,
    /// Fixed point: outputs clamped to the word. f32: outputs that came out NaN or infinite.
    pub saturated: u64,
    pub max_abs_input: f64,
    /// Fixed point: the accumulator values seen.
    pub trace: AccTrace,
}

impl Channel {
    /// SNR of the output against the reference, in dB (None: no difference at all).
    pub fn snr_db(&self) -> Option<f64> {
        (self.noise > 0.0).then(|| 10.0 * (self.signal / self.noise).log10())
    }
}

/// A finished replay.
pub struct Replayed {
    pub capture: PathBuf,
    pub format: Format,
    pub rounding: Rounding,
    pub taps: usize,
    /// Rows of samples (one sample per channel each).
    pub samples: u64,
    pub channels: Vec<Channel>,
    /// The error bound, in [`Replayed::unit`]: for fixed point, over every input the ADC can
    /// produce; for f32, over inputs up to the largest |sample| of the capture.
    pub bound: f64,
    /// Fixed point: the headroom analysis and the input range.
    pub headroom: Option<(Headroom, InputRange)>,
    pub adc: Adc,
    pub out: Option<PathBuf>,
}

impl Replayed {
    pub fn unit(&self) -> &'static str {
        match self.format {
            Format::F32 => "capture units",
            _ => "LSB",
        }
    }

    pub fn within(&self) -> bool {
        self.channels.iter().all(|c| c.max_error <= self.bound)
    }

    pub fn saturated(&self) -> u64 {
        self.channels.iter().map(|c| c.saturated).sum()
    }

    /// 0: every output within the bound and none saturated; 1 otherwise.
    pub fn status(&self) -> u8 {
        if self.within() && self.saturated() == 0 {
            0
        } else {
            1
        }
    }

    /// The per-channel figures as text lines (indented by `indent`).
    pub fn channel_text(&self, indent: &str) -> String {
        let mut t = String::new();
        let label = match self.format {
            Format::F32 => "f32",
            _ => self.format.name(),
        };
        for c in &self.channels {
            let _ = writeln!(t, "{indent}channel {}:", c.name);
            let verdict = if c.max_error <= self.bound {
                "within"
            } else {
                "EXCEEDED"
            };
            match self.format {
                Format::F32 => {
                    let relative = if c.max_error > 0.0 && c.max_abs_input > 0.0 {
                        format!(
                            ", {:.1} dB below the largest |input| {}",
                            20.0 * (c.max_abs_input / c.max_error).log10(),
                            c.max_abs_input
                        )
                    } else {
                        String::new()
                    };
                    let _ = writeln!(
                        t,
                        "{indent}  max |{label} - float64|: {:.3e} capture units{relative}; bound {:.3e}: {verdict}",
                        c.max_error, self.bound
                    );
                }
                _ => {
                    let _ = writeln!(
                        t,
                        "{indent}  max |{label} - float64|: {:.3} LSB; error bound {:.3} LSB: {verdict}",
                        c.max_error, self.bound
                    );
                }
            }
            let _ = writeln!(
                t,
                "{indent}  SNR of the {label} output against float64: {}",
                c.snr_db()
                    .map_or("no difference at all".to_string(), |s| format!("{s:.2} dB"))
            );
            match (&self.headroom, self.format) {
                (Some((h, _)), _) => {
                    let _ = writeln!(t, "{indent}  saturated outputs: {}", c.saturated);
                    let _ = writeln!(
                        t,
                        "{indent}  accumulator used: {}..={}, {} bits of the {} the worst case needs ({} spare in the 64-bit accumulator)",
                        c.trace.min(),
                        c.trace.max(),
                        c.trace.bits_used(),
                        h.accumulator_bits(),
                        c.trace.spare_bits(64)
                    );
                }
                (None, _) => {
                    let _ = writeln!(t, "{indent}  NaN or infinite outputs: {}", c.saturated);
                }
            }
        }
        t
    }

    pub fn text(&self) -> String {
        let mut text = String::new();
        let rounding = match self.format {
            Format::F32 => String::from("f32 arithmetic, taps and samples rounded to f32"),
            _ => format!("{} rounding", report::rounding_name(self.rounding)),
        };
        let input = match &self.headroom {
            Some((_, range)) => format!(
                "input codes {}..={} ({})",
                range.min(),
                range.max(),
                self.adc.describe(self.format.word_bits())
            ),
            None => String::from("samples as read (any finite number)"),
        };
        let _ = writeln!(
            text,
            "replayed {}: {} rows x {} channel(s) through {} {} taps ({rounding}), {input}",
            self.capture.display(),
            self.samples,
            self.channels.len(),
            self.taps,
            self.format.name(),
        );
        if self.format == Format::F32 {
            let _ = writeln!(
                text,
                "errors are in the capture's own unit; the bound covers inputs up to the largest |sample| of the capture"
            );
        }
        text.push_str(&self.channel_text(""));
        if let Some(path) = &self.out {
            let _ = writeln!(text, "output written to {}", path.display());
        }
        text
    }

    pub fn json(&self) -> Value {
        let channels: Vec<Value> = self
            .channels
            .iter()
            .map(|c| {
                let mut v = json!({
                    "name": c.name,
                    "max_error": c.max_error,
                    "within_bound": c.max_error <= self.bound,
                    "snr_db": c.snr_db(),
                    "saturated": c.saturated,
                    "max_abs_input": c.max_abs_input,
                });
                if let (Some((h, _)), Some(map)) = (&self.headroom, v.as_object_mut()) {
                    map.insert("accumulator_min".into(), report::wide(c.trace.min()));
                    map.insert("accumulator_max".into(), report::wide(c.trace.max()));
                    map.insert("accumulator_bits_used".into(), json!(c.trace.bits_used()));
                    map.insert(
                        "accumulator_bits_worst_case".into(),
                        json!(h.accumulator_bits()),
                    );
                }
                v
            })
            .collect();
        let worst = self.channels.iter().fold(0.0f64, |m, c| m.max(c.max_error));
        json!({
            "command": "replay",
            "capture": self.capture.display().to_string(),
            "samples": self.samples,
            "taps": self.taps,
            "format": self.format.name(),
            "rounding": match self.format {
                Format::F32 => None,
                _ => Some(report::rounding_name(self.rounding)),
            },
            "error_unit": self.unit(),
            "max_error": worst,
            "error_bound": self.bound,
            "within_bound": self.within(),
            "saturated": self.saturated(),
            "channels": channels,
            "output_file": self.out.as_ref().map(|p| p.display().to_string()),
        })
    }

    pub fn report(&self) -> Report {
        Report {
            text: self.text(),
            json: self.json(),
            status: self.status(),
        }
    }
}

/// One sample of one channel in, (output, saturated or non-finite) out.
type Step<'f> = dyn FnMut(usize, f64) -> (f64, bool) + 'f;
type Feed<'f> = dyn FnMut(&mut Step) -> Result<(), Failure> + 'f;

/// The filter length used for `taps` taps: zero taps after the last one change no output, so a
/// few lengths serve every table.
fn padded_len(taps: usize) -> Option<usize> {
    [16, 32, 64, 128, 256, 512, 1024, 2048, 4096]
        .into_iter()
        .find(|&n| n >= taps)
}

fn too_long(n: usize) -> Failure {
    Failure::plain(format!("replay: expected at most 4096 taps, found {n}"))
}

fn drive_fixed<S, W, const N: usize>(
    codes: &[S],
    rounding: Rounding,
    traces: &mut [AccTrace],
    feed: &mut Feed,
) -> Result<(), Failure>
where
    S: MulAcc<S, W> + FixedPoint,
    S::Acc: Into<i128>,
    W: RuntimeChecked,
{
    let mut padded: Box<[S; N]> = vec![S::ZERO; N]
        .into_boxed_slice()
        .try_into()
        .map_err(|_| Failure::plain("replay: could not size the filter"))?;
    for (slot, c) in padded.iter_mut().zip(codes) {
        *slot = *c;
    }
    let mut firs = Vec::with_capacity(traces.len());
    for _ in 0..traces.len() {
        firs.push(
            Fir::<S, N, S, W>::with_accumulator(&padded)
                .map_err(|e| Failure::plain(format!("replay: {e}")))?
                .with_rounding(rounding),
        );
    }
    feed(&mut |channel: usize, x: f64| {
        match (firs.get_mut(channel), traces.get_mut(channel)) {
            (Some(fir), Some(trace)) => {
                let before = fir.saturations();
                // Codes were range-checked as integers: the conversion is exact.
                let y = fir.push_traced(S::from_raw(x as i64), trace);
                (y.raw() as f64, fir.saturations() != before)
            }
            _ => (f64::NAN, true),
        }
    })
}

fn dispatch_fixed<S, W>(
    codes: &[S],
    rounding: Rounding,
    traces: &mut [AccTrace],
    feed: &mut Feed,
) -> Result<(), Failure>
where
    S: MulAcc<S, W> + FixedPoint,
    S::Acc: Into<i128>,
    W: RuntimeChecked,
{
    match padded_len(codes.len()) {
        Some(16) => drive_fixed::<S, W, 16>(codes, rounding, traces, feed),
        Some(32) => drive_fixed::<S, W, 32>(codes, rounding, traces, feed),
        Some(64) => drive_fixed::<S, W, 64>(codes, rounding, traces, feed),
        Some(128) => drive_fixed::<S, W, 128>(codes, rounding, traces, feed),
        Some(256) => drive_fixed::<S, W, 256>(codes, rounding, traces, feed),
        Some(512) => drive_fixed::<S, W, 512>(codes, rounding, traces, feed),
        Some(1024) => drive_fixed::<S, W, 1024>(codes, rounding, traces, feed),
        Some(2048) => drive_fixed::<S, W, 2048>(codes, rounding, traces, feed),
        Some(4096) => drive_fixed::<S, W, 4096>(codes, rounding, traces, feed),
        _ => Err(too_long(codes.len())),
    }
}

fn drive_float<const N: usize>(
    taps: &[f32],
    channels: usize,
    feed: &mut Feed,
) -> Result<(), Failure> {
    let mut padded: Box<[f32; N]> = vec![0.0f32; N]
        .into_boxed_slice()
        .try_into()
        .map_err(|_| Failure::plain("replay: could not size the filter"))?;
    for (slot, h) in padded.iter_mut().zip(taps) {
        *slot = *h;
    }
    let mut firs = Vec::with_capacity(channels);
    for _ in 0..channels {
        firs.push(Fir::<f32, N>::new(&padded).map_err(|e| Failure::plain(format!("replay: {e}")))?);
    }
    feed(&mut |channel: usize, x: f64| match firs.get_mut(channel) {
        Some(fir) => {
            let y = fir.push(x as f32);
            (f64::from(y), !y.is_finite())
        }
        None => (f64::NAN, true),
    })
}

fn dispatch_float(taps: &[f32], channels: usize, feed: &mut Feed) -> Result<(), Failure> {
    match padded_len(taps.len()) {
        Some(16) => drive_float::<16>(taps, channels, feed),
        Some(32) => drive_float::<32>(taps, channels, feed),
        Some(64) => drive_float::<64>(taps, channels, feed),
        Some(128) => drive_float::<128>(taps, channels, feed),
        Some(256) => drive_float::<256>(taps, channels, feed),
        Some(512) => drive_float::<512>(taps, channels, feed),
        Some(1024) => drive_float::<1024>(taps, channels, feed),
        Some(2048) => drive_float::<2048>(taps, channels, feed),
        Some(4096) => drive_float::<4096>(taps, channels, feed),
        _ => Err(too_long(taps.len())),
    }
}

/// The float64 reference of one channel: the last N samples twice over, so the newest N are
/// always one contiguous slice (newest first, meeting h[0]).
struct Reference {
    history: Vec<f64>,
    head: usize,
    len: usize,
}

impl Reference {
    fn new(len: usize) -> Reference {
        Reference {
            history: vec![0.0; 2 * len.max(1)],
            head: 0,
            len: len.max(1),
        }
    }

    fn push(&mut self, x: f64, taps: &[f64]) -> f64 {
        self.head = if self.head == 0 {
            self.len - 1
        } else {
            self.head - 1
        };
        let (head, len) = (self.head, self.len);
        if let Some(slot) = self.history.get_mut(head) {
            *slot = x;
        }
        if let Some(slot) = self.history.get_mut(head + len) {
            *slot = x;
        }
        let window = self.history.get(head..head + len).unwrap_or(&[]);
        taps.iter().zip(window).map(|(h, x)| h * x).sum()
    }
}

/// Streams the capture. The output file, if any, is handed back still uncommitted: the caller
/// commits it (the `prepare` command only once all its files are ready).
pub fn run(r: &Request) -> Result<(Replayed, Option<Streaming>), Failure> {
    let word = r.format.word_bits();
    let (kind, headroom, bound) = match &r.taps {
        Taps::Fixed(codes) => {
            let input = r.adc.range(word).map_err(|e| {
                Failure::argument("--adc-bits", format!("{e}: expected 1..={word}"))
            })?;
            let bound = codes
                .error_bound(&r.ideal, input, r.rounding)
                .map_err(Failure::plain)?;
            (
                Kind::Codes {
                    min: input.min(),
                    max: input.max(),
                    what: r.adc.describe(word),
                },
                Some((codes.headroom(input), input)),
                Some(bound.lsb()),
            )
        }
        Taps::Float(_) => (Kind::Reals, None, None),
    };
    let mut capture = Capture::open(&r.capture, &r.pick, r.header, kind)?;
    let names = capture.names().to_vec();
    let mut out = match &r.out {
        Some(path) => {
            let mut w = Streaming::create(path)?;
            let fixed_name = match r.format {
                Format::F32 => "f32",
                _ => "fixed",
            };
            let error_name = match r.format {
                Format::F32 => "error",
                _ => "error_lsb",
            };
            let mut header = String::from("sample");
            for name in &names {
                let prefix = match r.pick {
                    Pick::Column(_) => String::new(),
                    Pick::Names(_) => format!("{name}_"),
                };
                let _ = write!(
                    header,
                    ",{prefix}input,{prefix}{fixed_name},{prefix}reference,{prefix}{error_name}"
                );
            }
            w.write_line(&header)?;
            Some(w)
        }
        None => None,
    };
    let mut channels: Vec<Channel> = names
        .iter()
        .map(|n| Channel {
            name: n.clone(),
            ..Channel::default()
        })
        .collect();
    let mut references: Vec<Reference> = names
        .iter()
        .map(|_| Reference::new(r.ideal.len()))
        .collect();
    let mut traces = vec![AccTrace::new(); names.len()];
    let mut samples = 0u64;
    let mut bar = Bar::new("replay", capture.total_bytes);
    let ideal = &r.ideal;
    let float = r.format == Format::F32;
    let mut feed = |step: &mut Step| -> Result<(), Failure> {
        let mut row: Vec<f64> = Vec::with_capacity(channels.len());
        let mut line = String::new();
        while capture.next_row(&mut row)? {
            line.clear();
            let _ = write!(line, "{samples}");
            for (k, &x) in row.iter().enumerate() {
                let (y, saturated) = step(k, x);
                let (Some(c), Some(reference)) = (channels.get_mut(k), references.get_mut(k))
                else {
                    continue;
                };
                let reference = reference.push(x, ideal);
                let error = y - reference;
                c.signal += reference * reference;
                c.noise += error * error;
                c.max_abs_input = c.max_abs_input.max(x.abs());
                if saturated {
                    c.saturated += 1;
                } else {
                    c.max_error = c.max_error.max(error.abs());
                }
                if out.is_some() {
                    if float {
                        let _ = write!(line, ",{x},{y},{reference},{error:.3e}");
                    } else {
                        let _ = write!(line, ",{x},{y},{reference:.6},{error:.6}");
                    }
                }
            }
            if let Some(w) = &mut out {
                w.write_line(&line)?;
            }
            samples += 1;
            if let Some(bar) = &mut bar {
                bar.tick(capture.bytes_read, samples);
            }
        }
        if samples == 0 {
            return Err(Failure::at(
                &r.capture,
                1,
                1,
                "expected at least one row of samples, found none",
            ));
        }
        Ok(())
    };
    match &r.taps {
        Taps::Fixed(Codes::Q15(c)) => {
            dispatch_fixed::<i16, DefaultAcc>(c, r.rounding, &mut traces, &mut feed)?
        }
        // Acc128 is exact for any Q31 table, and bit-identical to i64 where that fits.
        Taps::Fixed(Codes::Q31(c)) => {
            dispatch_fixed::<i32, Acc128>(c, r.rounding, &mut traces, &mut feed)?
        }
        Taps::Float(t) => dispatch_float(t, names.len(), &mut feed)?,
    }
    drop(bar);
    for (c, t) in channels.iter_mut().zip(traces) {
        c.trace = t;
    }
    let bound = match (&r.taps, bound) {
        (_, Some(b)) => b,
        (Taps::Float(t), None) => {
            let largest = channels.iter().fold(0.0f64, |m, c| m.max(c.max_abs_input));
            f32_bound(&r.ideal, t, largest)
        }
        (Taps::Fixed(_), None) => 0.0,
    };
    Ok((
        Replayed {
            capture: r.capture.clone(),
            format: r.format,
            rounding: r.rounding,
            taps: r.ideal.len(),
            samples,
            channels,
            bound,
            headroom,
            adc: r.adc,
            out: r.out.clone(),
        },
        out,
    ))
}

/// γ_n = n·u/(1 − n·u): the relative error bound of an n-term dot product in floating point
/// with unit roundoff u (N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd
/// ed., 2002, §3.1).
fn gamma(n: usize, u: f64) -> f64 {
    let nu = n as f64 * u;
    nu / (1.0 - nu)
}

/// The largest |f32 output − float64 reference| for inputs up to `largest` in magnitude: the
/// taps' rounding to f32 (Σ|h32 − h|·|x32|), the samples' rounding to f32 (Σ|h|·u·|x|), the
/// f32 dot product (γ_N(2⁻²⁴)·Σ|h32|·|x32|) and the f64 reference's own (γ_N(2⁻⁵³)·Σ|h|·|x|),
/// with |x32| ≤ (1 + u)·|x|.
pub fn f32_bound(ideal: &[f64], taps: &[f32], largest: f64) -> f64 {
    let u32 = f64::powi(2.0, -24);
    let u64 = f64::powi(2.0, -53);
    let n = ideal.len();
    let x32 = largest * (1.0 + u32);
    let taps_rounding: f64 = ideal
        .iter()
        .zip(taps)
        .map(|(h, t)| (f64::from(*t) - h).abs())
        .sum();
    let sum_h: f64 = ideal.iter().map(|h| h.abs()).sum();
    let sum_h32: f64 = taps.iter().map(|t| f64::from(*t).abs()).sum();
    taps_rounding * x32
        + sum_h * u32 * largest
        + gamma(n, u32) * sum_h32 * x32
        + gamma(n, u64) * sum_h * largest
}

/// The float taps a table's codes stand for (the reference when the table held codes).
pub fn codes_as_reals(codes: &Codes, format: Format) -> Vec<f64> {
    let scale = match format {
        Format::Q15 => f64::from(1u32 << 15),
        _ => f64::from(1u32 << 31),
    };
    codes.raw().iter().map(|&c| c as f64 / scale).collect()
}
