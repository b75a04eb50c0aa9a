//! The tapline host tool: design taps from a spec, write them as Rust source, check the
//! headroom of a tap table before it goes into firmware, and replay a recorded capture through
//! the bit-exact fixed-point filter against float64, and plot a design's response as SVG.
//!
//! Built only with the `cli` feature (`cargo run --features cli -- --help`); the library stays
//! `no_std` without it. Exit status: 0 done (and, for `check`, safe); 1 the taps can overflow
//! (`check`) or an output saturated or left the error bound (`replay`); 2 bad input or a file that could not be read or written (one line on stderr naming the file,
//! line and column, and no output file left behind).

#[path = "tapline/atomic.rs"]
mod atomic;
#[path = "tapline/check.rs"]
mod check;
#[path = "tapline/design.rs"]
mod design;
#[path = "tapline/failure.rs"]
mod failure;
#[path = "tapline/plot.rs"]
mod plot;
#[path = "tapline/replay.rs"]
mod replay;
#[path = "tapline/report.rs"]
mod report;
#[path = "tapline/spec.rs"]
mod spec;
#[path = "tapline/table.rs"]
mod table;
#[path = "tapline/taps.rs"]
mod taps;

use clap::{Args, Parser, Subcommand};
use failure::Failure;
use std::path::PathBuf;
use std::process::ExitCode;
use taps::{Adc, AlignArg, Format, RoundingArg, Written};

/// Design FIR taps, write them as Rust source, and prove their headroom.
#[derive(Parser)]
#[command(
    name = "tapline",
    version,
    about = "Design FIR taps from a spec, write them as Rust source, prove their headroom, replay captures and plot responses."
)]
struct Cli {
    /// Print the result as one JSON object instead of text.
    #[arg(long, global = true)]
    json: bool,
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Design taps that meet a spec (flags or a TOML file) in Q15, Q31 or f32, and report the
    /// length, group delay, measured ripple and attenuation, and the headroom verdict.
    Design(DesignArgs),
    /// Design as `design` does, then write the taps as a Rust source file (a `pub static` array
    /// whose doc comment records the spec, the figures and the command).
    Emit(EmitArgs),
    /// Design as `design` does, then draw an SVG: magnitude in dB of the float64 and quantized
    /// taps with the bands shaded, the passband close up, and the impulse response.
    Plot(PlotArgs),
    /// Stream a recorded capture (CSV of raw sample codes) through the bit-exact fixed-point
    /// filter and a float64 reference: largest difference in LSB against the error bound, SNR,
    /// saturations, accumulator bits used. Exit 0, or 1 if an output saturated or left the bound.
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
    /// Where the ADC's bits sit in the sample word.
    #[arg(long, value_enum, default_value = "left")]
    align: AlignArg,
}

impl AdcArgs {
    fn adc(&self) -> Adc {
        Adc {
            bits: self.adc_bits,
            align: self.align,
        }
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
struct PlotArgs {
    #[command(flatten)]
    spec: spec::SpecArgs,
    /// The SVG file to write (atomically).
    #[arg(long, value_name = "FILE")]
    out: PathBuf,
}

#[derive(Args)]
struct ReplayArgs {
    /// The capture: CSV or plain text, one sample per row (or one column of several).
    capture: PathBuf,
    /// The taps, as a table (see `check`).
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
    /// Tap format of the table.
    #[arg(long, value_enum)]
    format: Option<Format>,
    /// How the table's numbers are written.
    #[arg(long, value_enum)]
    written: Option<Written>,
    #[command(flatten)]
    adc: AdcArgs,
    /// Output rounding of the filter.
    #[arg(long, value_enum, default_value = "half-up")]
    rounding: RoundingArg,
    /// Which column holds the samples (1 = first).
    #[arg(long, default_value_t = 1, value_parser = clap::value_parser!(u32).range(1..))]
    column: u32,
    /// The first row is a header: skip it.
    #[arg(long)]
    header: bool,
    /// Write sample, input, fixed, reference and error (LSB) per row to this CSV file.
    #[arg(long, value_name = "FILE")]
    out: Option<PathBuf>,
}

fn replay_request(a: &ReplayArgs) -> Result<replay::Request, Failure> {
    let (codes, ideal, format, adc) = match (&a.spec, &a.taps) {
        (Some(path), _) => {
            let chosen = spec::SpecArgs::from_file(path)?;
            let (format, adc) = (chosen.format, chosen.adc);
            let designed = design::design(chosen)?;
            match designed.taps {
                design::Taps::Fixed(codes) => (codes, designed.ideal, format, adc),
                design::Taps::Float(_) => {
                    return Err(Failure::file(
                        path,
                        "replay compares fixed point with float64: expected format q15 or q31",
                    ));
                }
            }
        }
        (None, Some(path)) => {
            let format = a.format.unwrap_or(Format::Q15);
            let table = taps::read(path, format, a.written.unwrap_or(Written::Codes))?;
            let ideal = match table.ideal {
                Some(ideal) => ideal,
                None => replay::codes_as_reals(&table.codes, format),
            };
            (table.codes, ideal, format, a.adc.adc())
        }
        (None, None) => {
            return Err(Failure::argument(
                "--taps",
                "expected a tap table or --spec",
            ));
        }
    };
    if format == Format::F32 {
        return Err(Failure::argument(
            "--format",
            "replay compares fixed point with float64: expected q15 or q31",
        ));
    }
    Ok(replay::Request {
        capture: a.capture.clone(),
        column: a.column as usize,
        header: a.header,
        codes,
        ideal,
        format,
        adc,
        rounding: a.rounding.into(),
        out: a.out.clone(),
    })
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

fn run(cli: &Cli) -> Result<report::Report, Failure> {
    match &cli.command {
        Command::Design(a) => Ok(design::report(&design::design(a.spec.chosen()?)?)),
        Command::Emit(a) => {
            design::check_name(&a.name)?;
            let designed = design::design(a.spec.chosen()?)?;
            design::emit(&designed, &a.out, &a.name, &command_line())
        }
        Command::Plot(a) => plot::plot(&design::design(a.spec.chosen()?)?, &a.out),
        Command::Replay(a) => replay::run(&replay_request(a)?),
        Command::Check(a) => check::run(&check::Request {
            table: a.table.clone(),
            format: a.format,
            written: a.written,
            adc: a.adc.adc(),
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
fn one_line(rendered: &str) -> String {
    rendered
        .lines()
        .map(str::trim)
        .filter(|l| !l.is_empty() && !l.starts_with("Usage:") && !l.starts_with("For more"))
        .map(|l| l.trim_start_matches("error: "))
        .collect::<Vec<_>>()
        .join("; ")
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) if !e.use_stderr() => {
            // --help and --version.
            let _ = e.print();
            return ExitCode::SUCCESS;
        }
        Err(e) => {
            // A usage mistake is bad input too: one line, exit 2.
            let line = one_line(&e.render().to_string());
            if std::env::args().any(|a| a == "--json") {
                println!("{}", serde_json::json!({ "error": line }));
            }
            eprintln!("error: {line}");
            return ExitCode::from(2);
        }
    };
    match run(&cli) {
        Ok(report) => {
            if cli.json {
                println!("{}", report.json);
            } else {
                print!("{}", report.text);
            }
            ExitCode::from(report.status)
        }
        Err(failure) => {
            if cli.json {
                println!("{}", serde_json::json!({ "error": failure.to_string() }));
            }
            eprintln!("error: {failure}");
            ExitCode::from(2)
        }
    }
}
