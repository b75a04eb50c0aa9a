//! Streams the invented ADC signal through Q15 (three rounding modes, and the proven 32-bit
//! accumulator), Q31 and f32 filters in 64-sample blocks, and compares every output bit for bit
//! with what the host computed with the same library (build.rs). Prints a verdict over
//! semihosting and exits with status 0 only if everything matched.
#![no_std]
#![no_main]

#[path = "../scenario.rs"]
mod scenario;

mod expected {
    include!(concat!(env!("OUT_DIR"), "/expected.rs"));
}

use cortex_m_rt::entry;
use cortex_m_semihosting::{debug, hprintln};
use scenario::*;
use tapline::headroom::{Acc32, InputRange, ProvenTaps};
use tapline::{Fir, MulAcc, Rounding, Sample};

const N: usize = 31;
static Q15_TAPS: [i16; N] = q15_taps::<N>();
static Q31_TAPS: [i32; N] = q31_taps::<N>();

struct Smoother;
impl ProvenTaps for Smoother {
    const TAPS: &'static [i16] = &Q15_TAPS;
    const INPUT: InputRange = InputRange::FULL;
}

#[panic_handler]
fn panic(info: &core::panic::PanicInfo) -> ! {
    hprintln!("panic: {}", info);
    debug::exit(debug::EXIT_FAILURE);
    loop {
        core::hint::spin_loop();
    }
}

/// Runs `fir` over the whole signal in blocks and counts outputs that differ from `expected`.
fn run<S, T, W, const M: usize>(
    name: &str,
    fir: &mut Fir<'static, S, M, T, W>,
    input: impl Fn(usize) -> S,
    matches: impl Fn(usize, S) -> bool,
) -> usize
where
    S: MulAcc<T, W> + Sample,
    T: Sample,
{
    let mut block = [S::ZERO; BLOCK];
    let mut mismatches = 0;
    for start in (0..SAMPLES).step_by(BLOCK) {
        for (i, v) in block.iter_mut().enumerate() {
            *v = input(start + i);
        }
        fir.process_in_place(&mut block);
        for (i, &y) in block.iter().enumerate() {
            if !matches(start + i, y) {
                mismatches += 1;
            }
        }
    }
    hprintln!(
        "{:<16} {} outputs, {} mismatches, {} saturated",
        name,
        SAMPLES,
        mismatches,
        fir.saturations()
    );
    mismatches
}

#[entry]
fn main() -> ! {
    let mut failures = 0;
    for (name, rounding, want, saturations) in [
        (
            "q15 half-up",
            Rounding::HalfUp,
            &expected::Q15_HALF_UP,
            expected::Q15_HALF_UP_SATURATIONS,
        ),
        (
            "q15 truncate",
            Rounding::Truncate,
            &expected::Q15_TRUNCATE,
            expected::Q15_TRUNCATE_SATURATIONS,
        ),
        (
            "q15 half-even",
            Rounding::HalfEven,
            &expected::Q15_HALF_EVEN,
            expected::Q15_HALF_EVEN_SATURATIONS,
        ),
    ] {
        match Fir::<i16, N>::new(&Q15_TAPS) {
            Ok(fir) => {
                let mut fir = fir.with_rounding(rounding);
                failures += run(name, &mut fir, adc_q15, |n, y| want.get(n) == Some(&y));
                failures += usize::from(fir.saturations() != saturations);
            }
            Err(_) => failures += 1,
        }
    }
    let mut proven: Fir<'static, i16, N, i16, Acc32<Smoother>> = Fir::proven();
    failures += run("q15 acc32", &mut proven, adc_q15, |n, y| {
        expected::Q15_HALF_UP.get(n) == Some(&y)
    });
    failures += usize::from(proven.saturations() != expected::Q15_HALF_UP_SATURATIONS);
    match Fir::<i32, N>::new(&Q31_TAPS) {
        Ok(mut fir) => {
            failures += run("q31", &mut fir, adc_q31, |n, y| {
                expected::Q31.get(n) == Some(&y)
            })
        }
        Err(_) => failures += 1,
    }
    static F32_TAPS: [f32; N] = f32_taps::<N>();
    match Fir::<f32, N>::new(&F32_TAPS) {
        Ok(mut fir) => {
            failures += run("f32", &mut fir, adc_f32, |n, y| {
                expected::F32_BITS.get(n) == Some(&y.to_bits())
            })
        }
        Err(_) => failures += 1,
    }
    if failures == 0 {
        hprintln!("PASS: every output equals the host's, bit for bit");
        debug::exit(debug::EXIT_SUCCESS);
    } else {
        hprintln!("FAIL: {} mismatches", failures);
        debug::exit(debug::EXIT_FAILURE);
    }
    loop {
        core::hint::spin_loop();
    }
}
