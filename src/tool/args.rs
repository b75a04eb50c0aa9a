//! The command line: clap's description of every subcommand and its flags, and [`run`], which
//! turns one parsed command into one job and its [`Report`].

use crate::tool::failure::Failure;
use crate::tool::input::capture;
use crate::tool::input::spec;
use crate::tool::input::taps::{self, Adc, AlignArg, Format, RoundingArg, Written};
use crate::tool::jobs::plot_axes::FreqScaleArg;
use crate::tool::jobs::{check, design, plot, prepare, replay};
use crate::tool::output::atomic::{self, Outputs};
use crate::tool::output::report::{self, Report};
use clap::{Args, Parser, Subcommand};
use std::path::PathBuf;
use std::prelude::rust_2024::*;
use std::{format, vec};

/// Design FIR taps, write them as Rust source, and prove their headroom.
#[derive(Parser)]
#[command(
    name = "tapline",
    version,
    about = "Design FIR taps from a spec, write them as Rust source, prove their headroom, replay captures and plot responses."
)]
pub struct Cli {
    /// Print the result as one JSON object instead of text.
    #[arg(long, global = true)]
    pub json: bool,
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// The whole job: design taps from a spec, prove their headroom, replay a capture through
    /// them, and write taps.rs, response.svg, report.txt and filtered.csv into one directory.
    /// Exit 0 when the taps are safe and the replay stayed within the error bound, 1 otherwise,
    /// 2 on bad input (and then no file is written). The files appear together or not at all;
    /// --filtered thins filtered.csv or leaves it out.
    Prepare(PrepareArgs),
    /// Design taps that meet a spec (flags or a TOML file) in Q15, Q31 or f32, by a Kaiser
    /// window or equiripple, and report the length, group delay, measured ripple and
    /// attenuation, and the headroom verdict. Exit 0 if safe, 1 if the taps can overflow.
    Design(DesignArgs),
    /// Design as `design` does, then write the taps as a Rust source file (a `pub static` array
    /// whose doc comment records the spec, the figures and the command). Exit status as
    /// `design`'s.
    Emit(EmitArgs),
    /// Draw an SVG for a design review: magnitude in dB of the float and quantized taps with the
    /// bands shaded, the passband close up, and the impulse response — of a design from a spec,
    /// or of an existing tap table (--taps, read as `check` reads it).
    Plot(PlotArgs),
    /// Stream a recorded capture (CSV or text; one column, or named channels) through the
    /// bit-exact fixed-point filter (or the f32 one) and a float64 reference: largest difference
    /// against the error bound, SNR, saturations, accumulator bits used. Exit 0, or 1 if an
    /// output saturated or left the bound.
    Replay(ReplayArgs),
    /// Headroom of an existing tap table: can any ADC input overflow the accumulator or
    /// saturate the output? Exit 0 if safe, 1 if it can overflow, 2 on bad input.
    Check(CheckArgs),
}

/// The ADC that feeds the filter.
#[derive(Args, Clone)]
struct AdcArgs {
    /// ADC resolution in bits (default: the whole sample word).
    #[arg(long, value_name = "BITS")]
    adc_bits: Option<u32>,
    /// Where the ADC's bits sit in the sample word: required when --adc-bits is narrower than
    /// the sample word.
    #[arg(long, value_enum)]
    align: Option<AlignArg>,
}

impl AdcArgs {
    fn adc(&self, format: Format) -> Result<Adc, Failure> {
        Adc::from_flags(self.adc_bits, self.align, format)
    }
}

#[derive(Args)]
struct DesignArgs {
    #[command(flatten)]
    spec: spec::SpecArgs,
}

#[derive(Args)]
struct EmitArgs {
    #[command(flatten)]
    spec: spec::SpecArgs,
    /// The Rust source file to write (atomically: whole or not at all).
    #[arg(long, value_name = "FILE")]
    out: PathBuf,
    /// Name of the static array.
    #[arg(long, default_value = "TAPS")]
    name: String,
}

#[derive(Args)]
struct PrepareArgs {
    #[command(flatten)]
    spec: spec::SpecArgs,
    /// The recorded capture to replay through the taps (CSV or plain text).
    #[arg(long, value_name = "FILE")]
    capture: PathBuf,
    #[command(flatten)]
    capture_args: CaptureArgs,
    /// The directory for the four files (created if missing).
    #[arg(long, value_name = "DIR")]
    out_dir: PathBuf,
    /// Name of the static array in taps.rs.
    #[arg(long, default_value = "TAPS")]
    name: String,
    /// Which rows of the capture filtered.csv gets (it is about ten times the capture's size):
    /// `all`; `none` (filtered.csv is not written); `every=N`, one row in N (samples 0, N,
    /// 2N, ...); or `error-above=E`, only the rows where some channel's |error| exceeds E (LSB
    /// for q15/q31, the capture's unit for f32) or its output saturated. The report's figures
    /// always cover every row.
    #[arg(long, value_name = "WHICH", default_value = "all", value_parser = filtered_rows)]
    filtered: replay::Rows,
}

/// `--filtered`: all, none, every=N or error-above=E.
fn filtered_rows(text: &str) -> Result<replay::Rows, String> {
    let number = |prefix: &str| text.strip_prefix(prefix).map(str::trim);
    match text.trim() {
        "all" => return Ok(replay::Rows::All),
        "none" => return Ok(replay::Rows::None),
        _ => {}
    }
    if let Some(n) = number("every=") {
        return match n.parse::<u64>() {
            Ok(n) if n >= 1 => Ok(replay::Rows::Every(n)),
            _ => Err(format!("expected every=N with a whole N >= 1, found {n:?}")),
        };
    }
    if let Some(e) = number("error-above=") {
        return match e.parse::<f64>() {
            Ok(e) if e.is_finite() && e >= 0.0 => Ok(replay::Rows::ErrorAbove(e)),
            _ => Err(format!(
                "expected error-above=E with a finite E >= 0, found {e:?}"
            )),
        };
    }
    Err(format!(
        "expected all, none, every=N or error-above=E, found {text:?}"
    ))
}

#[derive(Args)]
struct PlotArgs {
    #[command(flatten)]
    spec: spec::SpecArgs,
    /// Plot this tap table instead of a design (text or CSV, as `check` reads it), in
    /// --format (or the spec file's format). A spec (file or flags) adds its bands and limits;
    /// --rate alone is enough for the axes.
    #[arg(long, value_name = "FILE")]
    taps: Option<PathBuf>,
    /// How the table's numbers are written (default: codes for q15/q31, real for f32).
    #[arg(long, value_enum, requires = "taps")]
    written: Option<Written>,
    /// The SVG file to write (atomically).
    #[arg(long, value_name = "FILE")]
    out: PathBuf,
    /// The frequency axes: logarithmic when the band edges span decades (auto: the axis
    /// reaches at least 20 times the smallest edge), or always linear, or always logarithmic.
    #[arg(long, value_enum, default_value = "auto")]
    freq_scale: FreqScaleArg,
}

fn plot_table(a: &PlotArgs, table: &std::path::Path) -> Result<report::Report, Failure> {
    let s = &a.spec;
    let chosen = if s.spec.is_some() || s.band.is_some() {
        Some(s.chosen()?)
    } else {
        None
    };
    let (format, adc, rate) = match &chosen {
        Some(c) => (c.format, c.adc, c.spec.sample_rate_hz),
        None => {
            let rate = s.rate.ok_or_else(|| {
                Failure::argument(
                    "--rate",
                    "expected a sample rate in Hz (or a spec) for the frequency axis",
                )
            })?;
            if !(rate.is_finite() && rate > 0.0) {
                return Err(Failure::argument(
                    "--rate",
                    format!("expected a positive sample rate in Hz, found {rate}"),
                ));
            }
            (
                s.format,
                Adc::from_flags(s.adc_bits, s.align, s.format)?,
                rate,
            )
        }
    };
    let (taps, ideal) = table_taps(table, format, a.written)?;
    let float = match (&taps, a.written) {
        (design::Taps::Float(_), _) | (_, Some(Written::Real)) => Some(ideal),
        _ => None,
    };
    plot::plot_table(&plot::TableRequest {
        table: table.to_path_buf(),
        format,
        taps,
        float,
        spec: chosen,
        sample_rate_hz: rate,
        adc,
        out: a.out.clone(),
        freq_scale: a.freq_scale,
    })
}

/// Where the samples are in a capture.
#[derive(Args, Clone)]
struct CaptureArgs {
    /// Which column holds the samples (1 = first), for a single channel.
    #[arg(long, default_value_t = 1, value_parser = clap::value_parser!(u32).range(1..), conflicts_with = "channels")]
    column: u32,
    /// Or the names of the columns to filter, comma-separated, from the header row: one
    /// channel each, each with its own filter state.
    #[arg(long, value_name = "NAME[,NAME...]", value_delimiter = ',')]
    channels: Vec<String>,
    /// The first row is a header: skip it (implied by --channels).
    #[arg(long)]
    header: bool,
}

impl CaptureArgs {
    fn pick(&self) -> capture::Pick {
        if self.channels.is_empty() {
            capture::Pick::Column(self.column as usize)
        } else {
            capture::Pick::Names(self.channels.clone())
        }
    }
}

#[derive(Args)]
struct ReplayArgs {
    /// The capture: CSV or plain text, one row per sample instant.
    capture: PathBuf,
    /// The taps, as a table (see `check`; f32 tables hold real values).
    #[arg(
        long,
        value_name = "FILE",
        required_unless_present = "spec",
        conflicts_with = "spec"
    )]
    taps: Option<PathBuf>,
    /// Or design the taps from this TOML spec (its format and ADC are used).
    #[arg(long, value_name = "FILE", conflicts_with_all = ["format", "written", "adc_bits"])]
    spec: Option<PathBuf>,
    /// Tap format of the table (q15, q31, or f32: the filter then runs in f32 and errors are
    /// in the capture's own unit).
    #[arg(long, value_enum)]
    format: Option<Format>,
    /// How the table's numbers are written (default: codes for q15/q31, real for f32).
    #[arg(long, value_enum)]
    written: Option<Written>,
    #[command(flatten)]
    adc: AdcArgs,
    /// Output rounding of the fixed-point filter.
    #[arg(long, value_enum, default_value = "half-up")]
    rounding: RoundingArg,
    #[command(flatten)]
    capture_args: CaptureArgs,
    /// Write, per row, the sample index and for each channel its input, filter output,
    /// float64 reference and error to this CSV file.
    #[arg(long, value_name = "FILE")]
    out: Option<PathBuf>,
}

fn replay_request(a: &ReplayArgs) -> Result<replay::Request, Failure> {
    let (taps, ideal, format, adc) = match (&a.spec, &a.taps) {
        (Some(path), _) => {
            let chosen = spec::SpecArgs::from_file(path)?;
            let (format, adc) = (chosen.format, chosen.adc);
            let designed = design::design(chosen)?;
            (designed.taps, designed.ideal, format, adc)
        }
        (None, Some(path)) => {
            let format = a.format.unwrap_or(Format::Q15);
            let adc = a.adc.adc(format)?;
            let (taps, ideal) = table_taps(path, format, a.written)?;
            (taps, ideal, format, adc)
        }
        (None, None) => {
            return Err(Failure::argument(
                "--taps",
                "expected a tap table or --spec",
            ));
        }
    };
    Ok(replay::Request {
        capture: a.capture.clone(),
        pick: a.capture_args.pick(),
        header: a.capture_args.header,
        taps,
        ideal,
        format,
        adc,
        rounding: a.rounding.into(),
        out: a.out.clone(),
        rows: replay::Rows::All,
        known: None,
    })
}

/// A tap table as the filter runs it and the float taps of its reference: fixed-point codes
/// (and their real values when the table held real values), or f32 values.
fn table_taps(
    path: &std::path::Path,
    format: Format,
    written: Option<Written>,
) -> Result<(design::Taps, Vec<f64>), Failure> {
    if format == Format::F32 {
        if written == Some(Written::Codes) {
            return Err(Failure::argument(
                "--written",
                "f32 tables hold real values: expected --written real",
            ));
        }
        let ideal = taps::read_reals(path)?;
        let float = ideal.iter().map(|&h| h as f32).collect();
        return Ok((design::Taps::Float(float), ideal));
    }
    let table = taps::read(path, format, written.unwrap_or(Written::Codes))?;
    let ideal = match table.ideal {
        Some(ideal) => ideal,
        None => replay::codes_as_reals(&table.codes),
    };
    Ok((design::Taps::Fixed(table.codes), ideal))
}

#[derive(Args)]
struct CheckArgs {
    /// Tap table: plain text or CSV, one or more numbers per line, `#` starts a comment line.
    table: PathBuf,
    /// Tap format.
    #[arg(long, value_enum, default_value = "q15")]
    format: Format,
    /// How the numbers are written: raw integer codes, or real values to quantize.
    #[arg(long, value_enum, default_value = "codes")]
    written: Written,
    #[command(flatten)]
    adc: AdcArgs,
    /// Output rounding of the filter.
    #[arg(long, value_enum, default_value = "half-up")]
    rounding: RoundingArg,
    /// Write the input sequences that drive the accumulator to its bounds to this CSV file.
    #[arg(long, value_name = "FILE")]
    worst_case: Option<PathBuf>,
}

/// Runs the one job `cli` names and returns its report (or the one-line failure, exit 2).
pub fn run(cli: &Cli) -> Result<Report, Failure> {
    atomic::clean_up_on_interrupt()?;
    match &cli.command {
        Command::Prepare(a) => {
            design::check_name(&a.name)?;
            prepare::run(&prepare::Request {
                chosen: a.spec.chosen()?,
                spec_source: match &a.spec.spec {
                    Some(path) => path.display().to_string(),
                    None => String::from("command-line flags"),
                },
                capture: a.capture.clone(),
                pick: a.capture_args.pick(),
                header: a.capture_args.header,
                dir: a.out_dir.clone(),
                name: a.name.clone(),
                command: command_line(),
                filtered: a.filtered,
            })
        }
        Command::Design(a) => Ok(design::report(&design::design(a.spec.chosen()?)?)),
        Command::Emit(a) => {
            design::check_name(&a.name)?;
            let designed = design::design(a.spec.chosen()?)?;
            design::emit(&designed, &a.out, &a.name, &command_line())
        }
        Command::Plot(a) => match &a.taps {
            Some(table) => plot_table(a, table),
            None => plot::plot(&design::design(a.spec.chosen()?)?, &a.out, a.freq_scale),
        },
        Command::Replay(a) => {
            let mut outputs = Outputs::new();
            let (replayed, out) = replay::run(&replay_request(a)?, &mut outputs)?;
            if let Some(out) = out {
                outputs.finish(out)?;
            }
            outputs.commit()?;
            Ok(replayed.report())
        }
        Command::Check(a) => check::run(&check::Request {
            table: a.table.clone(),
            format: a.format,
            written: a.written,
            adc: a.adc.adc(a.format)?,
            rounding: a.rounding.into(),
            worst_case: a.worst_case.clone(),
        }),
    }
}

/// The command as typed, for the record in emitted files (arguments with spaces or quotes are
/// single-quoted).
fn command_line() -> String {
    let mut words = vec![String::from("tapline")];
    for arg in std::env::args().skip(1) {
        if arg.is_empty() || arg.contains(|c: char| c.is_whitespace() || "'\"$`\\".contains(c)) {
            words.push(format!("'{}'", arg.replace('\'', "'\\''")));
        } else {
            words.push(arg);
        }
    }
    words.join(" ")
}

/// clap's several-line usage error as one line: the message and its hints, without the usage
/// block (`--help` shows that).
pub fn one_line(rendered: &str) -> String {
    rendered
        .lines()
        .map(str::trim)
        .filter(|l| !l.is_empty() && !l.starts_with("Usage:") && !l.starts_with("For more"))
        .map(|l| l.trim_start_matches("error: "))
        .collect::<Vec<_>>()
        .join("; ")
}
