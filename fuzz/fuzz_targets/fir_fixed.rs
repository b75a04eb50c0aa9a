//! Arbitrary taps, inputs, rounding modes and block splits through every fixed-point FIR
//! path, each checked bit for bit against the exact i128 model (tests/common, the same checker
//! the proptest properties use).
#![no_main]

// tests/common, through the tapline-model crate (fuzz/model).
use tapline_model as common;
use tapline_model::with_tap_count;

use arbitrary::Arbitrary;
use fixed::types::{I1F15, I1F31, I4F12, I8F24};
use libfuzzer_sys::fuzz_target;
use tapline::Rounding;
use tapline::num::{Acc128, DefaultAcc};

#[derive(Debug, Arbitrary)]
enum Format {
    Q15,
    Q31,
    Q31Wide,
    Adc12WithQ15Taps,
    Q8F24WithQ31Taps,
}

#[derive(Debug, Arbitrary)]
struct Case {
    format: Format,
    tap_count: u8,
    taps: Vec<i32>,
    inputs: Vec<i32>,
    rounding: u8,
    block_sizes: Vec<u8>,
}

fn narrow(v: &[i32], bits: u32) -> Vec<i64> {
    v.iter()
        .map(|&x| {
            if bits == 16 {
                i64::from(x as i16)
            } else {
                i64::from(x)
            }
        })
        .collect()
}

fuzz_target!(|case: Case| {
    let n = common::TAP_COUNTS[usize::from(case.tap_count) % common::TAP_COUNTS.len()];
    if case.taps.len() < n || case.inputs.len() > 2000 {
        return;
    }
    let mode = Rounding::ALL[usize::from(case.rounding) % Rounding::ALL.len()];
    let sizes: Vec<usize> = case.block_sizes.iter().map(|&s| usize::from(s)).collect();
    let sizes = if sizes.is_empty() { vec![1] } else { sizes };
    let bits = match case.format {
        Format::Q15 | Format::Adc12WithQ15Taps => 16,
        _ => 32,
    };
    let h = narrow(&case.taps[..n], bits);
    let x = narrow(&case.inputs, bits);
    with_tap_count!(n, |N| match case.format {
        Format::Q15 => common::check_fixed_fir::<i16, i16, DefaultAcc, N>(64, &h, &x, &sizes, mode),
        Format::Q31 => common::check_fixed_fir::<i32, i32, DefaultAcc, N>(64, &h, &x, &sizes, mode),
        Format::Q31Wide =>
            common::check_fixed_fir::<i32, i32, Acc128, N>(128, &h, &x, &sizes, mode),
        Format::Adc12WithQ15Taps => {
            common::check_fixed_fir::<I4F12, I1F15, DefaultAcc, N>(64, &h, &x, &sizes, mode)
        }
        Format::Q8F24WithQ31Taps => {
            common::check_fixed_fir::<I8F24, I1F31, DefaultAcc, N>(64, &h, &x, &sizes, mode)
        }
    });
});
