//! `replay`: a recorded capture streamed row by row through the filter as the firmware runs it
//! (bit-exact Q15/Q31, or f32) and through a float64 reference, without holding the capture in
//! memory. One channel per chosen column, each with its own filter state. Reports, per
//! channel, the largest difference from the reference against its bound, the SNR of the
//! filter's output against the reference, the saturation count, and (fixed point) how much of
//! the accumulator the real signal used against what the worst case needs.
//!
//! Units: fixed-point errors are in LSB of the output word (= LSB of the input codes); f32
//! errors are in the capture's own unit (ADC codes if it holds codes, volts if volts).

use crate::headroom::{AccTrace, ErrorBound, Headroom, InputRange, f32_error_bound};
use crate::num::{Acc128, DefaultAcc, FixedPoint, MulAcc, RuntimeChecked};
use crate::tool::failure::Failure;
use crate::tool::input::capture::{Capture, Kind, Pick};
use crate::tool::input::taps::{Adc, Codes, Format};
use crate::tool::jobs::design::{MAX_TAPS, Taps};
use crate::tool::output::atomic::{Outputs, Streaming};
use crate::tool::output::progress::Bar;
use crate::tool::output::report::{self, Report};
use crate::{Error, FirUpTo, Rounding, Sample};
use serde_json::{Value, json};
use std::fmt::Write as _;
use std::path::PathBuf;
use std::prelude::rust_2024::*;
use std::{format, vec};

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
    /// Which rows `out` gets.
    pub rows: Rows,
    /// Fixed point: the input range, headroom and error bound already worked out for these
    /// taps and this rounding (by `prepare`'s design); None: replay works them out.
    pub known: Option<(InputRange, Headroom, ErrorBound)>,
}

/// Which rows of the filtered capture are written.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Rows {
    /// Every row.
    All,
    /// None: the file is not written at all.
    None,
    /// Every n-th row (n ≥ 1): sample 0, n, 2n, …
    Every(u64),
    /// Only the rows where some channel's |error| exceeds this (in the error unit: LSB for
    /// fixed point, the capture's unit for f32), or its output saturated (fixed point) or came
    /// out NaN or infinite (f32).
    ErrorAbove(f64),
}

impl Rows {
    /// How the choice reads in a report.
    pub fn describe(self, unit: &str) -> String {
        match self {
            Rows::All => String::from("every row"),
            Rows::None => String::from("no row"),
            Rows::Every(1) => String::from("every row"),
            Rows::Every(n) => format!("1 row in {n} (samples 0, {n}, {}, ...)", 2 * n),
            Rows::ErrorAbove(e) => format!(
                "only rows where a channel's |error| exceeds {e} {unit} or its output saturated"
            ),
        }
    }
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
            "adc": self.adc.json(self.format.word_bits()),
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

/// One sample of one channel in; the filter's output, whether it saturated (or came out
/// non-finite), and the float64 reference's output out.
type Step<'f> = dyn FnMut(usize, f64) -> (f64, bool, f64) + 'f;
type Feed<'f> = dyn FnMut(&mut Step) -> Result<(), Failure> + 'f;

/// The longest tap table replay runs, and so the one capacity of its filters: the taps run at
/// their own length within it ([`FirUpTo`]), so a capacity above the table's length costs
/// memory (the history holds twice the capacity), not time.
pub const MAX_REPLAY_TAPS: usize = 4096;

// Every design the tool makes (and `prepare` replays) fits.
const _: () = assert!(MAX_TAPS <= MAX_REPLAY_TAPS);

/// One channel's filter at replay's capacity, on the heap: its history of 2 × 4096 samples is
/// 64 KiB for `f64`.
type Boxed<'t, S, W = DefaultAcc> = Box<FirUpTo<'t, S, MAX_REPLAY_TAPS, S, W>>;

/// One filter per channel on `taps`, each with its own history and the default rounding
/// (fixed-point callers set theirs with `with_rounding`).
fn per_channel<'t, S, W>(taps: &'t [S], channels: usize) -> Result<Vec<Boxed<'t, S, W>>, Failure>
where
    S: MulAcc<S, W>,
    W: RuntimeChecked,
{
    (0..channels)
        .map(|_| match FirUpTo::with_taps(taps) {
            Ok(fir) => Ok(Box::new(fir)),
            Err(Error::TooManyTaps { capacity, found }) => Err(Failure::plain(format!(
                "replay: expected at most {capacity} taps, found {found}"
            ))),
            Err(e) => Err(Failure::plain(format!("replay: {e}"))),
        })
        .collect()
}

/// The filters of every channel, the firmware's and the float64 reference (the library's own
/// `Fir` on `f64` taps), fed sample by sample.
fn drive_fixed<S, W>(
    codes: &[S],
    ideal: &[f64],
    rounding: Rounding,
    traces: &mut [AccTrace],
    feed: &mut Feed,
) -> Result<(), Failure>
where
    S: MulAcc<S, W> + FixedPoint,
    S::Acc: Into<i128>,
    W: RuntimeChecked,
{
    let mut firs: Vec<Boxed<'_, S, W>> = per_channel::<S, W>(codes, traces.len())?
        .into_iter()
        .map(|fir| Box::new(fir.with_rounding(rounding)))
        .collect();
    let mut references = per_channel::<f64, DefaultAcc>(ideal, traces.len())?;
    feed(&mut |channel: usize, x: f64| {
        match (
            firs.get_mut(channel),
            references.get_mut(channel),
            traces.get_mut(channel),
        ) {
            (Some(fir), Some(reference), Some(trace)) => {
                let before = fir.saturations();
                // Codes were range-checked as integers: the conversion is exact.
                let y = fir.push_traced(S::from_raw(x as i64), trace);
                (
                    y.raw() as f64,
                    fir.saturations() != before,
                    reference.push(x),
                )
            }
            _ => (f64::NAN, true, f64::NAN),
        }
    })
}

fn drive_float(
    taps: &[f32],
    ideal: &[f64],
    channels: usize,
    feed: &mut Feed,
) -> Result<(), Failure> {
    let mut firs = per_channel::<f32, DefaultAcc>(taps, channels)?;
    let mut references = per_channel::<f64, DefaultAcc>(ideal, channels)?;
    feed(
        &mut |channel: usize, x: f64| match (firs.get_mut(channel), references.get_mut(channel)) {
            (Some(fir), Some(reference)) => {
                let y = fir.push(x as f32);
                (f64::from(y), !y.is_finite(), reference.push(x))
            }
            _ => (f64::NAN, true, f64::NAN),
        },
    )
}

/// Streams the capture. The output file, if any, is staged in `outputs` and handed back still
/// unfinished: the caller finishes it and commits (`prepare` only once all its files are
/// staged).
pub fn run(r: &Request, outputs: &mut Outputs) -> Result<(Replayed, Option<Streaming>), Failure> {
    let word = r.format.word_bits();
    let (kind, headroom, bound) = match &r.taps {
        Taps::Fixed(codes) => {
            let (input, headroom, bound) = match r.known {
                Some(known) => known,
                None => {
                    let input = r.adc.range(word).map_err(|e| {
                        Failure::argument("--adc-bits", format!("{e}: expected 1..={word}"))
                    })?;
                    let bound = codes
                        .error_bound(&r.ideal, input, r.rounding)
                        .map_err(Failure::plain)?;
                    (input, codes.headroom(input), bound)
                }
            };
            (
                Kind::Codes {
                    min: input.min(),
                    max: input.max(),
                    what: r.adc.describe(word),
                },
                Some((headroom, input)),
                Some(bound.lsb()),
            )
        }
        Taps::Float(_) => (Kind::Reals, None, None),
    };
    let mut capture = Capture::open(&r.capture, &r.pick, r.header, kind)?;
    let names = capture.names().to_vec();
    let mut out = match &r.out {
        Some(path) => {
            let mut w = outputs.stream(path)?;
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
    let mut traces = vec![AccTrace::new(); names.len()];
    let mut samples = 0u64;
    let mut bar = Bar::new("replay", capture.total_bytes);
    let float = r.format == Format::F32;
    let mut feed = |step: &mut Step| -> Result<(), Failure> {
        let mut row: Vec<f64> = Vec::with_capacity(channels.len());
        // Per channel: input, output, reference, error.
        let mut results: Vec<(f64, f64, f64, f64)> = Vec::with_capacity(channels.len());
        let mut line = String::new();
        while capture.next_row(&mut row)? {
            results.clear();
            let mut notable = false;
            for (k, &x) in row.iter().enumerate() {
                let (y, saturated, reference) = step(k, x);
                let Some(c) = channels.get_mut(k) else {
                    continue;
                };
                let error = y - reference;
                c.signal += reference * reference;
                c.noise += error * error;
                c.max_abs_input = c.max_abs_input.max(x.abs());
                if saturated {
                    c.saturated += 1;
                } else {
                    c.max_error = c.max_error.max(error.abs());
                }
                if let Rows::ErrorAbove(limit) = r.rows {
                    notable |= saturated || error.abs() > limit;
                }
                results.push((x, y, reference, error));
            }
            let keep = match r.rows {
                Rows::All => true,
                Rows::None => false,
                Rows::Every(n) => samples % n.max(1) == 0,
                Rows::ErrorAbove(_) => notable,
            };
            if let (Some(w), true) = (&mut out, keep) {
                // Only the rows written are formatted: the text costs more than the filter.
                line.clear();
                let _ = write!(line, "{samples}");
                for &(x, y, reference, error) in &results {
                    if float {
                        let _ = write!(line, ",{x},{y},{reference},{error:.3e}");
                    } else {
                        let _ = write!(line, ",{x},{y},{reference:.6},{error:.6}");
                    }
                }
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
            drive_fixed::<i16, DefaultAcc>(c, &r.ideal, r.rounding, &mut traces, &mut feed)?
        }
        // Acc128 is exact for any Q31 table, and bit-identical to i64 where that fits.
        Taps::Fixed(Codes::Q31(c)) => {
            drive_fixed::<i32, Acc128>(c, &r.ideal, r.rounding, &mut traces, &mut feed)?
        }
        Taps::Float(t) => drive_float(t, &r.ideal, names.len(), &mut feed)?,
    }
    drop(bar);
    for (c, t) in channels.iter_mut().zip(traces) {
        c.trace = t;
    }
    let bound = match (&r.taps, bound) {
        (_, Some(b)) => b,
        (Taps::Float(t), None) => {
            let largest = channels.iter().fold(0.0f64, |m, c| m.max(c.max_abs_input));
            f32_error_bound(&r.ideal, t, largest)
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

/// The float taps a table's codes stand for (the reference when the table held codes).
pub fn codes_as_reals(codes: &Codes) -> Vec<f64> {
    match codes {
        Codes::Q15(c) => c.iter().map(|h| h.to_f64()).collect(),
        Codes::Q31(c) => c.iter().map(|h| h.to_f64()).collect(),
    }
}
