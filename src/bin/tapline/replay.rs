//! `replay`: a recorded capture (CSV of raw sample codes) streamed through the bit-exact
//! fixed-point filter and through a float64 reference, row by row, without holding the capture
//! in memory. Reports the largest difference in output LSB against the error bound, the SNR of
//! the fixed-point output against the reference, the saturation count, and how much of the
//! accumulator the real signal used against what the worst case needs.

use crate::atomic::Streaming;
use crate::failure::Failure;
use crate::report::{self, Report};
use crate::table;
use crate::taps::{Adc, Codes, Format};
use serde_json::json;
use std::collections::VecDeque;
use std::fmt::Write as _;
use std::io::BufRead;
use std::path::PathBuf;
use tapline::headroom::{AccTrace, InputRange};
use tapline::num::{Acc128, DefaultAcc, FixedPoint, MulAcc, RuntimeChecked};
use tapline::{Fir, Rounding};

pub struct Request {
    pub capture: PathBuf,
    /// 1-based column of the samples.
    pub column: usize,
    pub header: bool,
    pub codes: Codes,
    /// The float taps the reference uses (the table's real values, or the codes as reals).
    pub ideal: Vec<f64>,
    pub format: Format,
    pub adc: Adc,
    pub rounding: Rounding,
    pub out: Option<PathBuf>,
}

/// The filter, one sample at a time: raw code in, (raw code out, saturated?) back.
type Step<'f> = dyn FnMut(i64) -> (i64, bool) + 'f;

fn drive<S, W, const N: usize>(
    codes: &[S],
    rounding: Rounding,
    trace: &mut AccTrace,
    feed: &mut dyn FnMut(&mut Step) -> Result<(), Failure>,
) -> Result<(), Failure>
where
    S: MulAcc<S, W> + FixedPoint,
    S::Acc: Into<i128>,
    W: RuntimeChecked,
{
    // Zero taps after the last one change no output: one filter length serves many tables.
    let mut padded: Box<[S; N]> = vec![S::ZERO; N]
        .into_boxed_slice()
        .try_into()
        .map_err(|_| Failure::plain("replay: could not size the filter"))?;
    for (slot, c) in padded.iter_mut().zip(codes) {
        *slot = *c;
    }
    let mut fir = Fir::<S, N, S, W>::with_accumulator(&padded)
        .map_err(|e| Failure::plain(format!("replay: {e}")))?
        .with_rounding(rounding);
    feed(&mut |x: i64| {
        let before = fir.saturations();
        let y = fir.push_traced(S::from_raw(x), trace);
        (y.raw(), fir.saturations() != before)
    })
}

fn dispatch<S, W>(
    codes: &[S],
    rounding: Rounding,
    trace: &mut AccTrace,
    feed: &mut dyn FnMut(&mut Step) -> Result<(), Failure>,
) -> Result<(), Failure>
where
    S: MulAcc<S, W> + FixedPoint,
    S::Acc: Into<i128>,
    W: RuntimeChecked,
{
    match codes.len() {
        0..=16 => drive::<S, W, 16>(codes, rounding, trace, feed),
        17..=64 => drive::<S, W, 64>(codes, rounding, trace, feed),
        65..=256 => drive::<S, W, 256>(codes, rounding, trace, feed),
        257..=1024 => drive::<S, W, 1024>(codes, rounding, trace, feed),
        1025..=4096 => drive::<S, W, 4096>(codes, rounding, trace, feed),
        n => Err(Failure::plain(format!(
            "replay: expected at most 4096 taps, found {n}"
        ))),
    }
}

#[derive(Default)]
struct Tally {
    samples: u64,
    max_error: f64,
    signal: f64,
    noise: f64,
    saturated: u64,
}

pub fn run(r: &Request) -> Result<Report, Failure> {
    let word = r.format.word_bits();
    let input = r
        .adc
        .range(word)
        .map_err(|e| Failure::argument("--adc-bits", format!("{e}: expected 1..={word}")))?;
    let headroom = r.codes.headroom(input);
    let bound = r
        .codes
        .error_bound(&r.ideal, input, r.rounding)
        .map_err(Failure::plain)?;
    let file = std::fs::File::open(&r.capture)
        .map_err(|e| Failure::file(&r.capture, format!("could not read: {e}")))?;
    let mut out = match &r.out {
        Some(path) => {
            let mut w = Streaming::create(path)?;
            w.write_line("sample,input,fixed,reference,error_lsb")?;
            Some(w)
        }
        None => None,
    };
    let mut trace = AccTrace::new();
    let mut tally = Tally::default();
    let mut history: VecDeque<f64> = VecDeque::with_capacity(r.ideal.len());
    let ideal = &r.ideal;
    let capture = &r.capture;
    let mut feed = |step: &mut Step| -> Result<(), Failure> {
        let mut width: Option<(usize, usize)> = None; // (fields, first line)
        let mut header_left = r.header;
        for (index, line) in std::io::BufReader::new(&file).lines().enumerate() {
            let number = index + 1;
            let line = line.map_err(|e| {
                Failure::at(capture, number, 1, format!("expected UTF-8 text ({e})"))
            })?;
            let trimmed = line.trim();
            if trimmed.is_empty() || trimmed.starts_with('#') {
                continue;
            }
            let fields = table::split(&line, number);
            match width {
                None => {
                    width = Some((fields.len(), number));
                    if r.column > fields.len() {
                        return Err(Failure::at(
                            capture,
                            number,
                            1,
                            format!(
                                "expected at least {} field(s) for --column {}, found {}",
                                r.column,
                                r.column,
                                fields.len()
                            ),
                        ));
                    }
                }
                Some((n, first)) if n != fields.len() => {
                    let column = fields.get(n).map_or(line.chars().count() + 1, |f| f.column);
                    return Err(Failure::at(
                        capture,
                        number,
                        column,
                        format!(
                            "expected {n} field(s) as on line {first}, found {}",
                            fields.len()
                        ),
                    ));
                }
                Some(_) => {}
            }
            if header_left {
                header_left = false;
                continue;
            }
            let Some(field) = fields.get(r.column - 1) else {
                continue;
            };
            let x = table::integer(capture, field, input.min(), input.max()).map_err(|_| {
                Failure::at(
                    capture,
                    field.line,
                    field.column,
                    format!(
                        "expected a sample code in {}..={} ({}), found {:?}",
                        input.min(),
                        input.max(),
                        r.adc.describe(word),
                        field.text
                    ),
                )
            })?;
            let (y, saturated) = step(x);
            if history.len() == ideal.len() {
                history.pop_back();
            }
            history.push_front(x as f64);
            // The float64 reference, in tap order: h[0] meets the newest sample.
            let reference: f64 = ideal.iter().zip(&history).map(|(h, x)| h * x).sum();
            let error = y as f64 - reference;
            tally.samples += 1;
            tally.signal += reference * reference;
            tally.noise += error * error;
            if saturated {
                tally.saturated += 1;
            } else {
                tally.max_error = tally.max_error.max(error.abs());
            }
            if let Some(w) = &mut out {
                w.write_line(&format!(
                    "{},{x},{y},{reference:.6},{:.6}",
                    tally.samples - 1,
                    error
                ))?;
            }
        }
        if width.is_none() || tally.samples == 0 {
            return Err(Failure::at(
                capture,
                1,
                1,
                "expected at least one row of samples, found none",
            ));
        }
        Ok(())
    };
    match &r.codes {
        Codes::Q15(c) => dispatch::<i16, DefaultAcc>(c, r.rounding, &mut trace, &mut feed)?,
        // Acc128 is exact for any Q31 table, and bit-identical to i64 where that fits.
        Codes::Q31(c) => dispatch::<i32, Acc128>(c, r.rounding, &mut trace, &mut feed)?,
    }
    if let Some(w) = out {
        w.commit()?;
    }
    Ok(summarise(r, &tally, &trace, &headroom, bound.lsb(), input))
}

fn summarise(
    r: &Request,
    tally: &Tally,
    trace: &AccTrace,
    headroom: &tapline::headroom::Headroom,
    bound: f64,
    input: InputRange,
) -> Report {
    let snr = if tally.noise > 0.0 {
        Some(10.0 * (tally.signal / tally.noise).log10())
    } else {
        None
    };
    let within = tally.max_error <= bound;
    let mut text = String::new();
    let _ = writeln!(
        text,
        "replayed {}: {} samples through {} {} taps ({} rounding), input codes {}..={}",
        r.capture.display(),
        tally.samples,
        r.codes.len(),
        r.format.name(),
        report::rounding_name(r.rounding),
        input.min(),
        input.max()
    );
    let _ = writeln!(
        text,
        "max |fixed - float64|: {:.3} LSB; error bound {:.3} LSB: {}",
        tally.max_error,
        bound,
        if within { "within" } else { "EXCEEDED" }
    );
    let _ = writeln!(
        text,
        "SNR of the fixed-point output against float64: {}",
        snr.map_or("no difference at all".to_string(), |s| format!("{s:.2} dB"))
    );
    let _ = writeln!(text, "saturated outputs: {}", tally.saturated);
    let _ = writeln!(
        text,
        "accumulator used: {}..={}, {} bits of the {} the worst case needs ({} spare in the 64-bit accumulator)",
        trace.min(),
        trace.max(),
        trace.bits_used(),
        headroom.accumulator_bits(),
        trace.spare_bits(64)
    );
    if let Some(path) = &r.out {
        let _ = writeln!(text, "output written to {}", path.display());
    }
    let json = json!({
        "command": "replay",
        "capture": r.capture.display().to_string(),
        "samples": tally.samples,
        "taps": r.codes.len(),
        "format": r.format.name(),
        "rounding": report::rounding_name(r.rounding),
        "max_error_lsb": tally.max_error,
        "error_bound_lsb": bound,
        "within_bound": within,
        "snr_db": snr,
        "saturated": tally.saturated,
        "accumulator_min": report::wide(trace.min()),
        "accumulator_max": report::wide(trace.max()),
        "accumulator_bits_used": trace.bits_used(),
        "accumulator_bits_worst_case": headroom.accumulator_bits(),
        "output_file": r.out.as_ref().map(|p| p.display().to_string()),
    });
    Report {
        text,
        json,
        status: if within && tally.saturated == 0 { 0 } else { 1 },
    }
}

/// The float taps a table's codes stand for (the reference when the table held codes).
pub fn codes_as_reals(codes: &Codes, format: Format) -> Vec<f64> {
    let scale = match format {
        Format::Q15 => f64::from(1u32 << 15),
        _ => f64::from(1u32 << 31),
    };
    codes.raw().iter().map(|&c| c as f64 / scale).collect()
}
