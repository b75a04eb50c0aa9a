//! Arbitrary Q15/Q31 tap sets and input ranges through the headroom analysis: the worst-case
//! inputs must reach the accumulator bounds exactly (exact model), random in-range inputs must
//! stay inside them, and no public entry point may panic on any argument.
#![no_main]

// tests/common, through the tapline-model crate (fuzz/model).
use tapline_model as common;

use arbitrary::Arbitrary;
use libfuzzer_sys::fuzz_target;
use tapline::Rounding;
use tapline::headroom::{Align, Extreme, Headroom, InputRange};

#[derive(Debug, Arbitrary)]
struct Case {
    wide: bool,
    taps: Vec<i32>,
    range_kind: u8,
    a: i64,
    b: i64,
    bits: u32,
    word_bits: u32,
    inputs: Vec<u16>,
}

fuzz_target!(|case: Case| {
    if case.taps.is_empty() || case.taps.len() > 256 {
        return;
    }
    let range = match case.range_kind % 4 {
        0 => InputRange::FULL,
        1 => InputRange::adc(case.bits, Align::Left, case.word_bits).unwrap_or(InputRange::FULL),
        2 => InputRange::adc(case.bits, Align::Right, case.word_bits).unwrap_or(InputRange::FULL),
        _ => InputRange::codes(case.a.min(case.b), case.a.max(case.b)).unwrap_or(InputRange::FULL),
    };
    // Entry points that take any number must not panic.
    let _ = tapline::Span::Same.layout(case.a as usize, case.b as usize);
    let _ = tapline::Span::Valid.correlation_layout(case.b as usize, case.a as usize);
    let _ = Headroom::of(&[1i16, 2], case.bits, range).can_saturate(Rounding::HalfUp);
    let _ = Rounding::HalfEven.shift(case.a, case.bits);
    let _ = Rounding::HalfUp.shift_wide(i128::from(case.b) << 40, case.word_bits);

    let (report, h): (Headroom, Vec<i64>) = if case.wide {
        (
            Headroom::q31(&case.taps, range),
            case.taps.iter().map(|&v| i64::from(v)).collect(),
        )
    } else {
        let q: Vec<i16> = case.taps.iter().map(|&v| v as i16).collect();
        (
            Headroom::q15(&q, range),
            q.iter().map(|&v| i64::from(v)).collect(),
        )
    };
    let (lo, hi) = report.accumulator_range();
    let worst = |toward| -> Vec<i64> {
        if case.wide {
            report.worst_case_input(&case.taps, toward).collect()
        } else {
            let q: Vec<i16> = case.taps.iter().map(|&v| v as i16).collect();
            report.worst_case_input(&q, toward).collect()
        }
    };
    assert_eq!(
        common::fir_exact(&h, &worst(Extreme::High)).last().copied(),
        Some(hi)
    );
    assert_eq!(
        common::fir_exact(&h, &worst(Extreme::Low)).last().copied(),
        Some(lo)
    );
    let r = report.input();
    let span = (r.max() - r.min()) as u64 + 1;
    let x: Vec<i64> = case
        .inputs
        .iter()
        .map(|&u| r.min() + (u64::from(u).wrapping_mul(0x9E37_79B9) % span) as i64)
        .collect();
    for acc in common::fir_exact(&h, &x) {
        assert!(acc >= lo && acc <= hi);
    }
});
