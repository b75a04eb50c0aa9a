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

/// The dual multiply-accumulate kernel against its portable twin on the same data: every tap
/// count from 1 to 40 (whole groups of eight taps and every remainder), every span length up to
/// 13 outputs (whole groups of four outputs and every remainder), random codes with many
/// full-scale values, and an all-full-scale case whose sums wrap around `i32`. Returns the
/// number of outputs that differ.
#[cfg(dsp_kernels)]
fn dsp_twin_mismatches() -> usize {
    let mut state = 0x2545_f491u32;
    let mut next = move || {
        state ^= state << 13;
        state ^= state >> 17;
        state ^= state << 5;
        match state % 8 {
            0 => i16::MIN,
            1 => i16::MAX,
            _ => (state >> 16) as i16,
        }
    };
    let mut mismatches = 0;
    let mut taps = [0i16; 40];
    let mut span = [0i16; 52];
    for extreme in [false, true] {
        for len in 1..=taps.len() {
            for v in taps.iter_mut().chain(span.iter_mut()) {
                *v = if extreme { i16::MIN } else { next() };
            }
            for outputs in 1..=13 {
                let (Some(h), Some(x)) = (taps.get(..len), span.get(..len - 1 + outputs)) else {
                    return usize::MAX;
                };
                let mut fast = [0i32; 13];
                let mut twin = [0i32; 13];
                let (mut f, mut t) = (fast.iter_mut(), twin.iter_mut());
                tapline::kernel::arm_dsp::dot_block_q15_i32(h, x, |acc| {
                    if let Some(slot) = f.next() {
                        *slot = acc;
                    }
                });
                tapline::kernel::dot_block::<i16, i16, Acc32<Smoother>>(h, x, |acc| {
                    if let Some(slot) = t.next() {
                        *slot = acc;
                    }
                });
                mismatches += fast.iter().zip(&twin).filter(|(a, b)| a != b).count();
            }
        }
    }
    hprintln!(
        "dsp kernel twin (q15): tap counts 1..=40, 1..=13 outputs, mismatches: {}",
        mismatches
    );
    mismatches
}

/// The FPU kernel against its portable twin, bit for bit: the same tap counts and output
/// counts, random values over many binades with occasional zeros, infinities and NaN.
#[cfg(dsp_kernels)]
fn fpu_twin_mismatches() -> usize {
    let mut state = 0x9e37_79b9u32;
    let mut next = move || {
        state ^= state << 13;
        state ^= state >> 17;
        state ^= state << 5;
        match state % 64 {
            0 => 0.0,
            1 => f32::INFINITY,
            2 => f32::NAN,
            _ => {
                let mantissa = (state >> 8) as f32 / 16_777_216.0 - 0.5;
                let scale = [1.0e-3, 0.1, 1.0, 7.0, 3.0e4][(state % 5) as usize];
                mantissa * scale
            }
        }
    };
    let mut mismatches = 0;
    let mut taps = [0f32; 40];
    let mut span = [0f32; 52];
    for len in 1..=taps.len() {
        for v in taps.iter_mut().chain(span.iter_mut()) {
            *v = next();
        }
        for outputs in 1..=13 {
            let (Some(h), Some(x)) = (taps.get(..len), span.get(..len - 1 + outputs)) else {
                return usize::MAX;
            };
            let mut fast = [0u32; 13];
            let mut twin = [0u32; 13];
            let (mut f, mut t) = (fast.iter_mut(), twin.iter_mut());
            tapline::kernel::arm_dsp::dot_block_f32(h, x, |acc| {
                if let Some(slot) = f.next() {
                    *slot = acc.to_bits();
                }
            });
            tapline::kernel::dot_block::<f32, f32, tapline::num::DefaultAcc>(h, x, |acc| {
                if let Some(slot) = t.next() {
                    *slot = acc.to_bits();
                }
            });
            mismatches += fast.iter().zip(&twin).filter(|(a, b)| a != b).count();
        }
    }
    hprintln!(
        "fpu kernel twin (f32): tap counts 1..=40, 1..=13 outputs, mismatches: {}",
        mismatches
    );
    mismatches
}

#[entry]
fn main() -> ! {
    let mut failures = 0;
    #[cfg(dsp_kernels)]
    {
        failures += dsp_twin_mismatches();
        failures += fpu_twin_mismatches();
    }
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
