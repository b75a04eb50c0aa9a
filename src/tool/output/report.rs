//! What every subcommand hands back: text for a person, JSON for a program, and an exit status.

use crate::Rounding;
use crate::headroom::Headroom;
use serde_json::{Value, json};
use std::format;
use std::prelude::rust_2024::*;

/// A finished command's output.
pub struct Report {
    /// The report for a person, one fact a line.
    pub text: String,
    /// The same report for a program.
    pub json: Value,
    /// 0: done and safe; 1: done, and the taps can overflow.
    pub status: u8,
}

/// An exact integer as JSON: a number when it fits in 64 bits, else its decimal string.
pub fn wide(v: i128) -> Value {
    match i64::try_from(v) {
        Ok(v) => json!(v),
        Err(_) => json!(v.to_string()),
    }
}

/// The headroom analysis as JSON.
pub fn headroom_json(h: &Headroom, rounding: Rounding) -> Value {
    let (acc_lo, acc_hi) = h.accumulator_range();
    let (out_lo, out_hi) = h.output_range(rounding);
    json!({
        "taps": h.tap_count(),
        "tap_fractional_bits": h.tap_frac(),
        "sample_bits": h.sample_bits(),
        "input_min": h.input().min(),
        "input_max": h.input().max(),
        "sum_abs_taps": h.l1_norm(),
        "dc_gain": h.dc_gain(),
        "peak_tap": h.peak(),
        "accumulator_min": wide(acc_lo),
        "accumulator_max": wide(acc_hi),
        "accumulator_bits": h.accumulator_bits(),
        "guard_bits": h.guard_bits(),
        "smallest_safe_accumulator_bits": h.safe_accumulator().bits(),
        "fits_64_bit_accumulator": h.fits(64),
        "output_min": wide(out_lo),
        "output_max": wide(out_hi),
        "output_can_saturate": h.can_saturate(rounding),
        "safe": h.is_safe(rounding),
    })
}

/// The headroom analysis as text lines, ending with the verdict.
pub fn headroom_text(h: &Headroom, rounding: Rounding) -> String {
    let (out_lo, out_hi) = h.output_range(rounding);
    let mut text = String::new();
    // The library's own summary, then the lines that depend on the chosen rounding.
    for line in h.to_string().lines() {
        if !line.starts_with("output (half-up)") {
            text.push_str(&format!("  {line}\n"));
        }
    }
    text.push_str(&format!(
        "  output ({}) {out_lo}..={out_hi}: {}\n",
        rounding_name(rounding),
        if h.can_saturate(rounding) {
            "can saturate for some input in range"
        } else {
            "cannot saturate"
        }
    ));
    let verdict = if h.is_safe(rounding) {
        "SAFE: no input in range can overflow the accumulator or saturate the output"
    } else if !h.fits(64) {
        "CAN OVERFLOW: the 64-bit accumulator is too narrow for some input in range"
    } else {
        "CAN OVERFLOW: some input in range drives the output past the sample word (it would be clamped)"
    };
    text.push_str(&format!("verdict: {verdict}\n"));
    text
}

/// The rounding mode's name as the command line spells it.
pub fn rounding_name(r: Rounding) -> &'static str {
    match r {
        Rounding::HalfUp => "half-up",
        Rounding::Truncate => "truncate",
        Rounding::HalfEven => "half-even",
    }
}
