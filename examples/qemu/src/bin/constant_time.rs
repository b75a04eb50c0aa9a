//! Regions for the constant-time check (`./constant-time`): the same filter, the same block
//! length, four kinds of input — all zero, random, the full-scale worst case of the headroom
//! analysis, and input that drives the output into saturation. The harness counts the
//! instructions of each region; they must be identical per filter.
#![no_std]
#![no_main]

#[path = "../scenario.rs"]
#[allow(dead_code)]
mod scenario;

use core::hint::black_box;
use cortex_m_rt::entry;
use cortex_m_semihosting::debug;
use scenario::*;
use tapline::Fir;
use tapline::headroom::{Acc32, Extreme, Headroom, InputRange, ProvenTaps};

#[panic_handler]
fn panic(_: &core::panic::PanicInfo) -> ! {
    debug::exit(debug::EXIT_FAILURE);
    loop {
        core::hint::spin_loop();
    }
}

const N: usize = 64;
/// DC gain 1.25: full-scale input saturates the output.
static Q15: [i16; N] = q15_taps::<N>();
static Q31: [i32; N] = q31_taps::<N>();
static F32: [f32; N] = f32_taps::<N>();

struct Proof;
impl ProvenTaps for Proof {
    const TAPS: &'static [i16] = &Q15;
    const INPUT: InputRange = InputRange::FULL;
}

/// The four input blocks for a sample type, from raw codes.
fn blocks<T: Copy + Default>(
    worst: impl Iterator<Item = i64>,
    max: T,
    from_raw: impl Fn(i64) -> T,
    random: impl Fn(usize) -> T,
) -> [[T; N]; 4] {
    let zero = [T::default(); N];
    let rand: [T; N] = core::array::from_fn(random);
    let mut worst_block = [T::default(); N];
    for (v, w) in worst_block.iter_mut().zip(worst) {
        *v = from_raw(w);
    }
    [zero, rand, worst_block, [max; N]]
}

macro_rules! regions {
    ($ty:ty, $fir:ty, $make:expr, $blocks:expr, $($name:literal),*) => {{
        let inputs = $blocks;
        let names = [$($name),*];
        #[inline(never)]
        fn zero(f: &mut $fir, b: &mut [$ty; N]) { f.process_in_place(b) }
        #[inline(never)]
        fn random(f: &mut $fir, b: &mut [$ty; N]) { f.process_in_place(b) }
        #[inline(never)]
        fn worst(f: &mut $fir, b: &mut [$ty; N]) { f.process_in_place(b) }
        #[inline(never)]
        fn saturating(f: &mut $fir, b: &mut [$ty; N]) { f.process_in_place(b) }
        let _ = names;
        for (i, run) in [zero, random, worst, saturating].into_iter().enumerate() {
            let mut fir: $fir = $make;
            // Fill the history with the same kind of input, then measure one block.
            let mut warm = inputs[i];
            fir.process_in_place(&mut warm);
            let mut b = inputs[i];
            mark(i);
            run(black_box(&mut fir), black_box(&mut b));
            black_box(b);
        }
    }};
}

/// Marks which input kind the next region runs: the harness reads the argument register.
#[inline(never)]
#[unsafe(no_mangle)]
fn mark(kind: usize) {
    black_box(kind);
}

#[inline(never)]
#[unsafe(no_mangle)]
fn bench_main() -> bool {
    let q15_report = Headroom::q15(&Q15, InputRange::FULL);
    regions!(
        i16,
        Fir<'static, i16, N>,
        match Fir::<i16, N>::new(&Q15) {
            Ok(f) => f,
            Err(_) => return false,
        },
        blocks(
            q15_report.worst_case_input(&Q15, Extreme::High),
            i16::MAX,
            |r| r as i16,
            adc_q15
        ),
        "i16"
    );
    regions!(
        i16,
        Fir<'static, i16, N, i16, Acc32<Proof>>,
        Fir::proven(),
        blocks(
            q15_report.worst_case_input(&Q15, Extreme::High),
            i16::MAX,
            |r| r as i16,
            adc_q15
        ),
        "acc32"
    );
    let q31_report = Headroom::q31(&Q31, InputRange::FULL);
    regions!(
        i32,
        Fir<'static, i32, N>,
        match Fir::<i32, N>::new(&Q31) {
            Ok(f) => f,
            Err(_) => return false,
        },
        blocks(
            q31_report.worst_case_input(&Q31, Extreme::High),
            i32::MAX,
            |r| r as i32,
            adc_q31
        ),
        "i32"
    );
    regions!(
        f32,
        Fir<'static, f32, N>,
        match Fir::<f32, N>::new(&F32) {
            Ok(f) => f,
            Err(_) => return false,
        },
        blocks(
            q15_report.worst_case_input(&Q15, Extreme::High),
            3.0e38,
            |r| r as f32 / 32768.0,
            adc_f32
        ),
        "f32"
    );
    true
}

#[entry]
fn main() -> ! {
    let ok = bench_main();
    debug::exit(if ok {
        debug::EXIT_SUCCESS
    } else {
        debug::EXIT_FAILURE
    });
    loop {
        core::hint::spin_loop();
    }
}
