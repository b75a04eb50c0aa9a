//! `prepare`: the whole job in one command. From a spec and a recorded capture it designs the
//! taps, proves their headroom, replays the capture through them as the firmware runs them,
//! and writes four files into one directory:
//!
//! | file | what |
//! |---|---|
//! | `taps.rs` | the taps as a Rust `pub static` whose doc comment records spec, figures, proof and command |
//! | `response.svg` | the design-review plot (see `plot`) |
//! | `report.txt` | length, group delay, ripple and attenuation float vs quantized, the headroom proof and verdict, the replay's figures per channel, the result, and what each file is |
//! | `filtered.csv` | the capture filtered: per row the sample index and, per channel, input, output, float64 reference and error |
//!
//! Every input is opened and checked before any output exists; the four files are staged
//! (hidden temporary files) and renamed into place together only when all are ready, so bad
//! input, a file that cannot be written or an interrupt leaves none of them behind and no
//! directory the run created. `--filtered` thins filtered.csv (one row in N, or only the rows
//! whose error exceeds a threshold) or leaves it out. Exit status: 0
//! when the taps are safe and every replayed output stayed within the error bound, 1 otherwise,
//! 2 on bad input.

use crate::Rounding;
use crate::tool::failure::Failure;
use crate::tool::input::capture::Pick;
use crate::tool::input::file;
use crate::tool::input::spec::Chosen;
use crate::tool::input::taps::Format;
use crate::tool::jobs::design::{self, Designed, Taps};
use crate::tool::jobs::plot;
use crate::tool::jobs::plot_axes::FreqScaleArg;
use crate::tool::jobs::replay::{self, Replayed, Rows};
use crate::tool::output::atomic::Outputs;
use crate::tool::output::report::Report;
use serde_json::json;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::prelude::rust_2024::*;

/// The files, in the order the report lists them, with what each holds.
pub const FILES: [(&str, &str); 4] = [
    (
        "taps.rs",
        "the taps as a Rust `pub static` array for the firmware; its doc comment records the spec, the figures, the headroom proof and the command",
    ),
    (
        "response.svg",
        "the design-review plot: magnitude in dB of the float64 and quantized taps with the bands shaded, the passband close-up, the impulse response",
    ),
    ("report.txt", "this report"),
    (
        "filtered.csv",
        "the capture filtered: per row the sample index and, per channel, the input, the filter's output, the float64 reference and the error",
    ),
];

pub struct Request {
    pub chosen: Chosen,
    /// Where the spec came from, for the report (a file, or the command line).
    pub spec_source: String,
    pub capture: PathBuf,
    pub pick: Pick,
    pub header: bool,
    pub dir: PathBuf,
    pub name: String,
    pub command: String,
    /// Which rows filtered.csv gets ([`Rows::None`]: it is not written).
    pub filtered: Rows,
}

pub fn run(r: &Request) -> Result<Report, Failure> {
    let designed = design::design(r.chosen.clone())?;
    // Every input opened and checked before any output exists: the spec was read by the
    // design, the capture is opened here (and again, streamed, by the replay).
    file::open(&r.capture)?;
    let mut outputs = Outputs::in_directory(&r.dir, "--out-dir")?;
    for (name, _) in files(r.filtered) {
        outputs.check(&r.dir.join(name))?;
    }
    let report = job(r, &designed, &mut outputs)?;
    outputs.commit()?;
    Ok(report)
}

/// The files this run writes, with what each holds: filtered.csv only if it gets any rows.
fn files(rows: Rows) -> impl Iterator<Item = (&'static str, &'static str)> {
    FILES
        .into_iter()
        .filter(move |(name, _)| rows != Rows::None || *name != "filtered.csv")
}

fn job(r: &Request, d: &Designed, outputs: &mut Outputs) -> Result<Report, Failure> {
    let dir = r.dir.as_path();
    let path = |name: &str| dir.join(name);
    let format = d.chosen.format;
    let (replayed, filtered) = replay::run(
        &replay::Request {
            capture: r.capture.clone(),
            pick: r.pick.clone(),
            header: r.header,
            taps: d.taps.clone(),
            ideal: d.ideal.clone(),
            format,
            adc: d.chosen.adc,
            rounding: Rounding::HalfUp,
            out: (r.filtered != Rows::None).then(|| path("filtered.csv")),
            rows: r.filtered,
            // The design's own proof and bound, for the same half-up rounding.
            known: match (&d.proof, d.input) {
                (Some((headroom, bound)), Some(input)) => Some((input, *headroom, *bound)),
                _ => None,
            },
        },
        outputs,
    )?;
    if let Some(f) = filtered {
        outputs.finish(f)?;
    }
    let source = d.rust_source(&r.name, &r.command);
    let svg = plot::render(&plot::design_figure(d, FreqScaleArg::Auto))?;
    let safe = d.is_safe();
    let status = if safe && replayed.status() == 0 { 0 } else { 1 };
    let text = report_text(r, d, &replayed, status, dir);
    // Staged, all four; the caller commits them together.
    outputs.write(&path("taps.rs"), source.as_bytes())?;
    outputs.write(&path("response.svg"), svg.as_bytes())?;
    outputs.write(&path("report.txt"), text.as_bytes())?;
    let mut stdout = text;
    let _ = writeln!(stdout, "\nwrote {}", dir.display());
    let files: serde_json::Map<String, serde_json::Value> = files(r.filtered)
        .map(|(name, _)| (name.to_string(), json!(path(name).display().to_string())))
        .collect();
    let json = json!({
        "command": "prepare",
        "spec": r.spec_source,
        "capture": r.capture.display().to_string(),
        "directory": dir.display().to_string(),
        "files": files,
        "filtered_rows": r.filtered.describe(replayed.unit()),
        "design": d.json("prepare"),
        "replay": replayed.json(),
        "safe": safe,
        "within_bound": replayed.within(),
        "saturated": replayed.saturated(),
        "status": status,
    });
    Ok(Report {
        text: stdout,
        json,
        status,
    })
}

fn report_text(r: &Request, d: &Designed, replayed: &Replayed, status: u8, dir: &Path) -> String {
    let mut t = String::new();
    let _ = writeln!(
        t,
        "tapline prepare: design, headroom proof and replay of a capture"
    );
    let _ = writeln!(t, "command: {}", r.command);
    let _ = writeln!(t, "spec: {}", r.spec_source);
    let names: Vec<&str> = replayed.channels.iter().map(|c| c.name.as_str()).collect();
    let _ = writeln!(
        t,
        "capture: {} ({} rows; channel(s) {})",
        r.capture.display(),
        replayed.samples,
        names.join(", ")
    );
    let _ = writeln!(t, "\n== design");
    t.push_str(&d.summary());
    let _ = writeln!(
        t,
        "\n== replay: the capture through the {} taps as the firmware runs them, against float64",
        d.chosen.format.name()
    );
    match d.chosen.format {
        Format::F32 => {
            let _ = writeln!(
                t,
                "f32 arithmetic; errors in the capture's own unit, bound {:.3e} for inputs up to its largest |sample|",
                replayed.bound
            );
        }
        _ => {
            let _ = writeln!(
                t,
                "half-up output rounding; errors in LSB of the output word, bound {:.3} LSB for any input the ADC can produce",
                replayed.bound
            );
        }
    }
    t.push_str(&replayed.channel_text(""));
    let _ = writeln!(t, "\n== result");
    let mut reasons = Vec::new();
    if !d.is_safe() {
        reasons.push("the headroom proof says some input in range can overflow the taps");
    }
    if !replayed.within() {
        reasons.push("a replayed output left the error bound");
    }
    if replayed.saturated() > 0 {
        reasons.push(match d.chosen.format {
            Format::F32 => "a replayed output came out NaN or infinite",
            _ => "a replayed output saturated",
        });
    }
    if status == 0 {
        let _ = writeln!(
            t,
            "PASS (exit 0): no input in range can overflow the taps, and every replayed output stayed within the error bound"
        );
    } else {
        let _ = writeln!(t, "FAIL (exit 1): {}", reasons.join("; "));
    }
    let _ = writeln!(t, "\n== files in {}", dir.display());
    for (name, what) in files(r.filtered) {
        let _ = writeln!(t, "{name:<13} {what}");
    }
    match r.filtered {
        Rows::All => {}
        Rows::None => {
            let _ = writeln!(t, "(filtered.csv not written: --filtered none)");
        }
        rows => {
            let _ = writeln!(
                t,
                "(filtered.csv holds {}; the figures above cover every row)",
                rows.describe(replayed.unit())
            );
        }
    }
    if r.filtered == Rows::None {
        return t;
    }
    if let Taps::Fixed(_) = &d.taps {
        let _ = writeln!(
            t,
            "(filtered.csv columns: sample, then per channel input, fixed, reference, error_lsb; prefixed with the channel's name when chosen by name)"
        );
    } else {
        let _ = writeln!(
            t,
            "(filtered.csv columns: sample, then per channel input, f32, reference, error in the capture's unit; prefixed with the channel's name when chosen by name)"
        );
    }
    t
}
