//! `check`: the headroom of an existing tap table, for the ADC that feeds it.

use crate::Rounding;
use crate::headroom::Extreme;
use crate::tool::failure::Failure;
use crate::tool::input::taps::{self, Adc, Format, Written};
use crate::tool::output::atomic;
use crate::tool::output::report::{self, Report};
use serde_json::json;
use std::fmt::Write;
use std::format;
use std::path::PathBuf;
use std::prelude::rust_2024::*;

pub struct Request {
    pub table: PathBuf,
    pub format: Format,
    pub written: Written,
    pub adc: Adc,
    pub rounding: Rounding,
    pub worst_case: Option<PathBuf>,
}

pub fn run(r: &Request) -> Result<Report, Failure> {
    if r.format == Format::F32 {
        return Err(Failure::argument(
            "--format",
            "headroom applies to fixed-point taps: expected q15 or q31",
        ));
    }
    let table = taps::read(&r.table, r.format, r.written)?;
    let word = r.format.word_bits();
    let input = r
        .adc
        .range(word)
        .map_err(|e| Failure::argument("--adc-bits", format!("{e}: expected 1..={word}")))?;
    let h = table.codes.headroom(input);
    let bound = match &table.ideal {
        Some(ideal) => Some(
            table
                .codes
                .error_bound(ideal, input, r.rounding)
                .map_err(Failure::plain)?,
        ),
        None => None,
    };

    if let Some(path) = &r.worst_case {
        let raw = table.codes.raw();
        let (high, low): (Vec<i64>, Vec<i64>) = match &table.codes {
            taps::Codes::Q15(c) => (
                h.worst_case_input(c, Extreme::High).collect(),
                h.worst_case_input(c, Extreme::Low).collect(),
            ),
            taps::Codes::Q31(c) => (
                h.worst_case_input(c, Extreme::High).collect(),
                h.worst_case_input(c, Extreme::Low).collect(),
            ),
        };
        let mut csv = String::from("# worst-case input, oldest sample first, raw codes\n");
        csv.push_str(&format!(
            "# {} taps ({}); the last sample drives the accumulator to its bound\n",
            raw.len(),
            r.format.name()
        ));
        csv.push_str("toward_high,toward_low\n");
        for (a, b) in high.iter().zip(&low) {
            let _ = writeln!(csv, "{a},{b}");
        }
        atomic::write(path, csv.as_bytes())?;
    }

    let mut text = format!(
        "tap table {}: {} {} taps ({})\ninput: {}\nheadroom:\n",
        r.table.display(),
        table.codes.len(),
        r.format.name(),
        match r.written {
            Written::Codes => "integer codes",
            Written::Real => "real values, quantized with exact DC gain",
        },
        r.adc.describe(word),
    );
    text.push_str(&report::headroom_text(&h, r.rounding));
    if let Some(b) = &bound {
        let _ = writeln!(
            text,
            "error bound vs float64: {:.2} LSB (taps) + {:.2} LSB (rounding) = {:.2} LSB",
            b.quantization_lsb(),
            b.rounding_lsb(),
            b.lsb()
        );
    }
    if let Some(path) = &r.worst_case {
        let _ = writeln!(text, "worst-case input written to {}", path.display());
    }
    let safe = h.is_safe(r.rounding);
    let json = json!({
        "command": "check",
        "table": r.table.display().to_string(),
        "format": r.format.name(),
        "adc": r.adc.json(word),
        "rounding": report::rounding_name(r.rounding),
        "headroom": report::headroom_json(&h, r.rounding),
        "error_bound_lsb": bound.map(|b| b.lsb()),
        "worst_case_file": r.worst_case.as_ref().map(|p| p.display().to_string()),
        "safe": safe,
    });
    Ok(Report {
        text,
        json,
        status: if safe { 0 } else { 1 },
    })
}
