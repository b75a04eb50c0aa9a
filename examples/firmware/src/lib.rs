//! The headroom of a 64-tap Q15 smoothing table, proven at compile time on the target.
//!
//! Invented scenario (the demo's): a 12-bit ADC on a silo scale's load cell, its codes
//! left-aligned in a 16-bit word. Everything below is evaluated by the compiler; the crate
//! builds for `thumbv6m-none-eabi` (Cortex-M0) only if every assertion holds.
#![no_std]

use tapline::Fir;
use tapline::Rounding;
use tapline::headroom::{Acc32, AccWidth, Align, Headroom, InputRange, ProvenTaps};

/// A 64-tap triangular (Bartlett) smoother in Q15: w[i] = min(i + 1, 64 − i), scaled so the
/// taps sum to 32768 − r with r < 64 (the floor of each scaled weight).
pub static SMOOTH_64: [i16; 64] = triangle();

const fn triangle() -> [i16; 64] {
    let mut taps = [0i16; 64];
    let mut i = 0;
    while i < 64 {
        let w = if i + 1 < 64 - i { i + 1 } else { 64 - i };
        // Σw = 2·(1 + … + 32) = 1056.
        taps[i] = (w as i32 * 32768 / 1056) as i16;
        i += 1;
    }
    taps
}

/// The ADC: 12 bits, two's complement after subtracting mid-scale, left-aligned in 16 bits.
pub const ADC: InputRange = match InputRange::adc(12, Align::Left, 16) {
    Ok(r) => r,
    Err(_) => panic!("impossible ADC description"),
};

/// The analysis, run by the compiler for this target.
pub const REPORT: Headroom = Headroom::q15(&SMOOTH_64, ADC);

// The proof obligations. Each fails the build if it stops being true.
const _: () = assert!(REPORT.tap_count() == 64);
const _: () = assert!(REPORT.guard_bits() == 0);
const _: () = assert!(!REPORT.can_saturate(Rounding::HalfUp));
const _: () = assert!(matches!(REPORT.safe_accumulator(), AccWidth::Bits32));

/// The table and range as a type, so the 32-bit accumulator can be unlocked.
pub struct Smooth64;

impl ProvenTaps for Smooth64 {
    const TAPS: &'static [i16] = &SMOOTH_64;
    const INPUT: InputRange = ADC;
}

/// The filter the firmware runs: Q15 samples, the proven 32-bit accumulator, built in a const.
pub const FILTER: Fir<'static, i16, 64, i16, Acc32<Smooth64>> = Fir::proven();

/// One sample through a filter, as an ADC interrupt handler would call it.
pub fn smooth(filter: &mut Fir<'static, i16, 64, i16, Acc32<Smooth64>>, code: i16) -> i16 {
    filter.push(code)
}
