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
use tapline::{Fir, LinearPhaseFir, MulAcc, Rounding, Sample};

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

/// Outputs kept per block comparison: up to 13, which covers whole groups of four and of two
/// outputs and every remainder.
#[cfg(any(dsp_kernels, v6m_kernels))]
const OUTPUTS: usize = 13;

/// Runs an assembly kernel and its portable twin on the same data and counts the outputs that
/// differ: every tap count from 1 to 40 (whole loop passes and every remainder), block spans
/// giving 1..=13 outputs, single sums over histories from 3 shorter to 3 longer than the taps,
/// once with values from `next` and once with every value `extreme` (sums that wrap or
/// overflow). `block` and `single` return (assembly, twin).
#[cfg(any(dsp_kernels, v6m_kernels))]
fn twin_mismatches<X: Copy + Default, A: PartialEq>(
    name: &str,
    mut next: impl FnMut() -> X,
    extreme: X,
    block: impl Fn(&[X], &[X], &mut [A; OUTPUTS], &mut [A; OUTPUTS]),
    single: Option<&dyn Fn(&[X], &[X]) -> (A, A)>,
    fill: impl Fn() -> [A; OUTPUTS],
) -> usize {
    let mut mismatches = 0;
    let mut taps = [X::default(); 40];
    let mut span = [X::default(); 52];
    for use_extreme in [false, true] {
        for len in 1..=taps.len() {
            for v in taps.iter_mut().chain(span.iter_mut()) {
                *v = if use_extreme { extreme } else { next() };
            }
            let Some(h) = taps.get(..len) else {
                return usize::MAX;
            };
            for outputs in 1..=OUTPUTS {
                let Some(x) = span.get(..len - 1 + outputs) else {
                    return usize::MAX;
                };
                let (mut fast, mut twin) = (fill(), fill());
                block(h, x, &mut fast, &mut twin);
                mismatches += fast.iter().zip(&twin).filter(|(a, b)| a != b).count();
            }
            for history in len.saturating_sub(3)..=len + 3 {
                let (Some(x), Some(single)) = (span.get(..history), single) else {
                    continue;
                };
                let (fast, twin) = single(h, x);
                mismatches += usize::from(fast != twin);
            }
        }
    }
    hprintln!(
        "kernel twin {}: tap counts 1..=40, blocks of 1..=13 outputs, single sums where there are any: {} mismatches",
        name,
        mismatches
    );
    mismatches
}

/// Writes a block kernel's outputs into `out`, in order.
#[cfg(any(dsp_kernels, v6m_kernels))]
fn collect<A>(out: &mut [A; OUTPUTS]) -> impl FnMut(A) + '_ {
    let mut slots = out.iter_mut();
    move |acc| {
        if let Some(slot) = slots.next() {
            *slot = acc;
        }
    }
}

/// xorshift32: the random codes of the twin checks (1 in 4 is full scale).
#[cfg(any(dsp_kernels, v6m_kernels))]
fn codes(seed: u32) -> impl FnMut() -> u32 {
    let mut state = seed;
    move || {
        state ^= state << 13;
        state ^= state >> 17;
        state ^= state << 5;
        state
    }
}

/// Random Q15 codes for the twin checks, one in four at full scale (either end).
#[cfg(any(dsp_kernels, v6m_kernels))]
fn q15_codes() -> impl FnMut() -> i16 {
    let mut r = codes(0x2545_f491);
    move || match r() % 4 {
        0 => {
            if r() % 2 == 0 {
                i16::MIN
            } else {
                i16::MAX
            }
        }
        _ => (r() >> 16) as i16,
    }
}

/// Every assembly kernel of `tapline::kernel::arm` against its portable twin.
#[cfg(dsp_kernels)]
fn dsp_twin_mismatches() -> usize {
    use tapline::kernel::{arm, dot_block, dot_reversed};
    use tapline::num::DefaultAcc;
    type Proven = Acc32<Smoother>;
    let mut q15 = q15_codes();
    let mut r = codes(0x1234_5677);
    let mut q31 = move || match r() % 4 {
        0 => {
            if r() % 2 == 0 {
                i32::MIN
            } else {
                i32::MAX
            }
        }
        _ => r() as i32,
    };
    let mut r = codes(0x9e37_79b9);
    let mut f32s = move || match r() % 64 {
        0 => 0.0,
        1 => f32::INFINITY,
        2 => f32::NAN,
        v => {
            let mantissa = (r() >> 8) as f32 / 16_777_216.0 - 0.5;
            mantissa * [1.0e-3, 0.1, 1.0, 7.0, 3.0e4][(v % 5) as usize]
        }
    };
    let mut failures = 0;
    failures += twin_mismatches(
        "q15, proven i32 sums (SMLADX)",
        &mut q15,
        i16::MIN,
        |h, x, fast, twin| {
            arm::dot_block_q15_i32(h, x, collect(fast));
            dot_block::<i16, i16, Proven>(h, x, collect(twin));
        },
        Some(&|h, x| {
            (
                arm::dot_reversed_q15_i32(7, h, x),
                dot_reversed::<i16, i16, Proven>(7, h, x),
            )
        }),
        || [0i32; OUTPUTS],
    );
    // The fused output step against `MulAcc::finish` on the twin's sums, in every rounding
    // mode: random and extreme sums (which wrap and saturate), then taps of 0.5 whose sums are
    // ties half the time (the half-even parity).
    // The fused step's outputs and count, and the twin's: the portable sums, each finished.
    let fused_and_twin = |h: &[i16], x: &[i16], rounding| {
        let mut out = [0i16; OUTPUTS];
        let count = arm::dot_block_q15_i32_finished(h, x, rounding, &mut out);
        let mut sums = [0i32; OUTPUTS];
        dot_block::<i16, i16, Proven>(h, x, collect(&mut sums));
        let mut twin_count = 0;
        let mut twin_out = [0i16; OUTPUTS];
        for (slot, &acc) in twin_out.iter_mut().zip(&sums).take(x.len() + 1 - h.len()) {
            let (y, clamped) = <i16 as MulAcc<i16, Proven>>::finish(acc, rounding);
            *slot = y;
            twin_count += u32::from(clamped);
        }
        (out, count, twin_out, twin_count)
    };
    let finished = |h: &[i16],
                    x: &[i16],
                    fast: &mut [(i16, u32); OUTPUTS],
                    twin: &mut [(i16, u32); OUTPUTS]| {
        let outputs = x.len() + 1 - h.len();
        for (m, rounding) in Rounding::ALL.into_iter().enumerate() {
            let (out, count, twin_out, twin_count) = fused_and_twin(h, x, rounding);
            // Each mode fills its own slots (the count with every output), so a mode's error
            // is not hidden by another's.
            for i in (m..outputs).step_by(3) {
                if let (Some(f), Some(t), Some(&y), Some(&z)) = (
                    fast.get_mut(i),
                    twin.get_mut(i),
                    out.get(i),
                    twin_out.get(i),
                ) {
                    *f = (y, count);
                    *t = (z, twin_count);
                }
            }
        }
    };
    failures += twin_mismatches(
        "q15, proven i32 output step (QADD, SSAT)",
        &mut q15,
        i16::MIN,
        finished,
        None,
        || [(0i16, 0u32); OUTPUTS],
    );
    let mut ties = q15_codes();
    let mut tap_half = 0u32;
    failures += twin_mismatches(
        "q15, proven i32 output step at ties",
        move || {
            // Taps and samples come from the same stream: every other value is a tap of 0.5.
            tap_half += 1;
            if tap_half % 2 == 0 { 16384 } else { ties() }
        },
        16384,
        finished,
        None,
        || [(0i16, 0u32); OUTPUTS],
    );
    // Sums just below i32::MAX: 2^30 + (2^30 − 2^15) + 20000 = 2^31 − 12768, in the windows
    // (−1, −1 + 2^-15, 2^-15) or their reverse of the repeating input, whichever way the kernel
    // pairs taps and samples, and in groups of four outputs (the fused path). The rounding
    // offset must saturate there (QADD), where a plain add would wrap to a negative output;
    // every rounding mode, every output, and the saturation count.
    let near_max = {
        let h = [i16::MIN, i16::MIN, 20000];
        let mut x = [0i16; 14];
        for (v, &p) in x
            .iter_mut()
            .zip([i16::MIN, i16::MIN + 1, 1, i16::MIN + 1].iter().cycle())
        {
            *v = p;
        }
        let outputs = x.len() + 1 - h.len();
        let mut mismatches = 0;
        for rounding in Rounding::ALL {
            let (out, count, twin_out, twin_count) = fused_and_twin(&h, &x, rounding);
            let differ = out
                .iter()
                .zip(&twin_out)
                .take(outputs)
                .filter(|(a, b)| a != b);
            mismatches += differ.count() + usize::from(count != twin_count);
        }
        mismatches
    };
    hprintln!(
        "kernel twin q15, proven i32 output step at sums near i32::MAX: {} mismatches",
        near_max
    );
    failures += near_max;
    failures += twin_mismatches(
        "q15, i64 sums (SMLALDX)",
        &mut q15,
        i16::MIN,
        |h, x, fast, twin| {
            arm::dot_block_q15_i64(h, x, collect(fast));
            dot_block::<i16, i16, DefaultAcc>(h, x, collect(twin));
        },
        Some(&|h, x| {
            (
                arm::dot_reversed_q15_i64(-7, h, x),
                dot_reversed::<i16, i16, DefaultAcc>(-7, h, x),
            )
        }),
        || [0i64; OUTPUTS],
    );
    failures += twin_mismatches(
        "q31, i64 sums (SMLAL)",
        &mut q31,
        i32::MIN,
        |h, x, fast, twin| {
            arm::dot_block_q31_i64(h, x, collect(fast));
            dot_block::<i32, i32, DefaultAcc>(h, x, collect(twin));
        },
        Some(&|h, x| {
            (
                arm::dot_reversed_q31_i64(i64::MAX, h, x),
                dot_reversed::<i32, i32, DefaultAcc>(i64::MAX, h, x),
            )
        }),
        || [0i64; OUTPUTS],
    );
    failures += twin_mismatches(
        "f32 (VMLA.F32)",
        &mut f32s,
        f32::MAX,
        |h, x, fast, twin| {
            let (mut fast, mut twin) = (collect(fast), collect(twin));
            arm::dot_block_f32(h, x, |a| fast(a.to_bits()));
            dot_block::<f32, f32, DefaultAcc>(h, x, |a| twin(a.to_bits()));
        },
        Some(&|h, x| {
            (
                arm::dot_reversed_f32(0.5, h, x).to_bits(),
                dot_reversed::<f32, f32, DefaultAcc>(0.5, h, x).to_bits(),
            )
        }),
        || [0u32; OUTPUTS],
    );
    failures
}

/// Streams the signal through a `LinearPhaseFir` per sample and in blocks and counts the
/// outputs that differ from the plain filter's (`expected`).
fn linear_phase_mismatches<S>(
    name: &str,
    taps: &'static [S; N],
    input: impl Fn(usize) -> S,
    expected: &[S],
) -> usize
where
    S: tapline::kernel::FoldMulAcc<S> + Sample,
{
    let Ok(mut fir) = LinearPhaseFir::<S, N>::new(taps) else {
        hprintln!("{}: taps refused", name);
        return 1;
    };
    let mut mismatches = 0;
    let mut block = [S::ZERO; BLOCK];
    for start in (0..SAMPLES).step_by(BLOCK) {
        for (i, v) in block.iter_mut().enumerate() {
            *v = input(start + i);
        }
        // Alternate per-sample and block calls.
        if start / BLOCK % 2 == 0 {
            for v in block.iter_mut() {
                *v = fir.push(*v);
            }
        } else {
            fir.process_in_place(&mut block);
        }
        for (i, &y) in block.iter().enumerate() {
            if expected.get(start + i) != Some(&y) {
                mismatches += 1;
            }
        }
    }
    hprintln!("{:16} {} outputs, {} mismatches", name, SAMPLES, mismatches);
    mismatches
}

/// The Armv6-M assembly kernel against its portable twin (block sums only: it has no
/// single-output form).
#[cfg(v6m_kernels)]
fn v6m_twin_mismatches() -> usize {
    use tapline::kernel::{arm, dot_block};
    twin_mismatches(
        "q15, proven i32 sums (Armv6-M MULS)",
        q15_codes(),
        i16::MIN,
        |h, x, fast, twin| {
            arm::dot_block_q15_i32(h, x, collect(fast));
            dot_block::<i16, i16, Acc32<Smoother>>(h, x, collect(twin));
        },
        None,
        || [0i32; OUTPUTS],
    )
}

#[entry]
fn main() -> ! {
    let mut failures = 0;
    #[cfg(dsp_kernels)]
    {
        failures += dsp_twin_mismatches();
    }
    #[cfg(v6m_kernels)]
    {
        failures += v6m_twin_mismatches();
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
    for (name, rounding, want, saturations) in [
        (
            "q15 acc32",
            Rounding::HalfUp,
            &expected::Q15_HALF_UP,
            expected::Q15_HALF_UP_SATURATIONS,
        ),
        (
            "q15 acc32 trunc",
            Rounding::Truncate,
            &expected::Q15_TRUNCATE,
            expected::Q15_TRUNCATE_SATURATIONS,
        ),
        (
            "q15 acc32 even",
            Rounding::HalfEven,
            &expected::Q15_HALF_EVEN,
            expected::Q15_HALF_EVEN_SATURATIONS,
        ),
    ] {
        let proven: Fir<'static, i16, N, i16, Acc32<Smoother>> = Fir::proven();
        let mut proven = proven.with_rounding(rounding);
        failures += run(name, &mut proven, adc_q15, |n, y| want.get(n) == Some(&y));
        failures += usize::from(proven.saturations() != saturations);
    }
    // The linear-phase filter gives the plain filter's outputs bit for bit (on this core it
    // runs the plain assembly sum instead of the folded one; elsewhere the folded sum).
    failures += linear_phase_mismatches(
        "q15 linear-phase",
        &Q15_TAPS,
        adc_q15,
        &expected::Q15_HALF_UP,
    );
    failures += linear_phase_mismatches("q31 linear-phase", &Q31_TAPS, adc_q31, &expected::Q31);
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
