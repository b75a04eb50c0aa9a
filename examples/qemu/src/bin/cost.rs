//! The kernels the instruction-count harness measures (`./measure`). Each `cost_*` function is
//! one measured region: `bench_main` calls it, and the harness counts every instruction the
//! emulated core executes from the function's entry until control is back in `bench_main`.
//! Sizes of each filter state are printed over semihosting.
#![no_std]
#![no_main]

#[path = "../scenario.rs"]
#[allow(dead_code)]
mod scenario;

use core::hint::black_box;
use cortex_m_rt::entry;
use cortex_m_semihosting::{debug, hprintln};
use scenario::*;
use tapline::headroom::{Acc32, Acc32Checked, CheckedTaps, InputRange, ProvenTaps};
use tapline::{Decimator, Fir, FirUpTo, LinearPhaseFir};

#[panic_handler]
fn panic(_: &core::panic::PanicInfo) -> ! {
    debug::exit(debug::EXIT_FAILURE);
    loop {
        core::hint::spin_loop();
    }
}

macro_rules! costs {
    ($( $name:ident, $ty:ident, $n:literal, $taps:expr, $input:ident ; )*) => {$(
        paste_costs!($name, $ty, $n, Fir<'static, $ty, $n>, {
            static TAPS: [$ty; $n] = $taps;
            match Fir::<$ty, $n>::new(&TAPS) {
                Ok(f) => f,
                Err(_) => return false,
            }
        }, $input, $ty);
    )*};
}

/// Q15 with the proven 32-bit accumulator: the table and the full 16-bit input range.
macro_rules! proven_costs {
    ($( $proof:ident, $n:literal ; )*) => {$(
        struct $proof;
        impl ProvenTaps for $proof {
            const TAPS: &'static [i16] = &q15_taps::<$n>();
            const INPUT: InputRange = InputRange::FULL;
        }
        paste_costs!(acc32, i16, $n, Fir<'static, i16, $n, i16, Acc32<$proof>>, Fir::proven(), q15, i16);
    )*};
}

/// Q15 structures: the folded linear-phase filter and the polyphase decimator by 4 (the
/// harness divides a decimator's counts by its outputs, a quarter of its inputs).
macro_rules! structure_costs {
    ($( $n:literal ; )*) => {$(
        paste_costs!(linphase, i16, $n, LinearPhaseFir<'static, i16, $n>, {
            static TAPS: [i16; $n] = q15_taps::<$n>();
            match LinearPhaseFir::<i16, $n>::new(&TAPS) {
                Ok(f) => f,
                Err(_) => return false,
            }
        }, q15, i16);
        paste_costs!(dec4, i16, $n, Decimator<'static, i16, $n, 4>, {
            static TAPS: [i16; $n] = q15_taps::<$n>();
            match Decimator::<i16, $n, 4>::new(&TAPS) {
                Ok(f) => f,
                Err(_) => return false,
            }
        }, q15, Option<i16>);
    )*};
}

/// Taps known only at run time: `$n` of them in a filter of capacity 128, to set beside the rows
/// of exactly `$n` taps (the same code, so the same cost is expected).
macro_rules! run_time_costs {
    ($( $name:ident, $ty:ident, $n:literal, $taps:expr, $input:ident ; )*) => {$(
        paste_costs!($name, $ty, $n, FirUpTo<'static, $ty, 128>, {
            static TAPS: [$ty; $n] = $taps;
            match FirUpTo::<$ty, 128>::with_taps(&TAPS) {
                Ok(f) => f,
                Err(_) => return false,
            }
        }, $input, $ty);
    )*};
}

/// Q15 with the 32-bit accumulator unlocked by the run-time check, full 16-bit input range.
macro_rules! checked_costs {
    ($( $n:literal ; )*) => {$(
        paste_costs!(acc32upto, i16, $n, FirUpTo<'static, i16, 128, i16, Acc32Checked>, {
            static TAPS: [i16; $n] = q15_taps::<$n>();
            let checked = match CheckedTaps::check(&TAPS, InputRange::FULL) {
                Ok(c) => c,
                Err(_) => return false,
            };
            match FirUpTo::<i16, 128, i16, Acc32Checked>::with_checked(checked) {
                Ok(f) => f,
                Err(_) => return false,
            }
        }, q15, i16);
    )*};
}

macro_rules! paste_costs {
    ($name:ident, $ty:ident, $n:literal, $fir:ty, $make:expr, $input:ident, $out:ty) => {{
        let mut fir: $fir = $make;
        hprintln!("state {} {} {}", stringify!($name), $n, core::mem::size_of::<$fir>());
        let mut block = [0 as $ty; 256];
        for (i, v) in block.iter_mut().enumerate() {
            *v = $input(i) as $ty;
        }
        #[inline(never)]
        #[unsafe(export_name = concat!("cost_", stringify!($name), "_", stringify!($n), "_block64"))]
        fn block64(fir: &mut $fir, b: &mut [$ty; 64]) {
            let _ = black_box(fir.process_in_place(b));
        }
        #[inline(never)]
        #[unsafe(export_name = concat!("cost_", stringify!($name), "_", stringify!($n), "_block256"))]
        fn block256(fir: &mut $fir, b: &mut [$ty; 256]) {
            let _ = black_box(fir.process_in_place(b));
        }
        #[inline(never)]
        #[unsafe(export_name = concat!("cost_", stringify!($name), "_", stringify!($n), "_sample"))]
        fn sample(fir: &mut $fir, x: $ty) -> $out {
            fir.push(x)
        }
        // Only in the build with the `process-stack` feature: a second caller of the block
        // code changes how LTO shares it, and so the instruction counts of the regions above.
        #[cfg(feature = "process-stack")]
        #[inline(never)]
        fn process64(fir: &mut $fir, input: &[$ty; 64], output: &mut [$ty; 64]) {
            let _ = black_box(fir.process(input, output));
        }
        // Warm the history so every measured output sums N real samples.
        let mut warm = block;
        block256(&mut fir, &mut warm);
        let mut b64 = [0 as $ty; 64];
        b64.copy_from_slice(&block[..64]);
        paint_stack();
        block64(black_box(&mut fir), black_box(&mut b64));
        let in_place64 = stack_used();
        paint_stack();
        block256(black_box(&mut fir), black_box(&mut block));
        let in_place256 = stack_used();
        let mut push = 0;
        for i in 0..64 {
            paint_stack();
            black_box(sample(black_box(&mut fir), black_box(block[i])));
            push = push.max(stack_used());
        }
        hprintln!(
            "stack {} {} {} {} {}",
            stringify!($name), $n, push, in_place64, in_place256
        );
        // After the counted regions, so the extra call does not enter their averages.
        #[cfg(feature = "process-stack")]
        {
            let mut out64 = [0 as $ty; 64];
            paint_stack();
            process64(black_box(&mut fir), black_box(&b64), black_box(&mut out64));
            hprintln!("process-stack {} {} {}", stringify!($name), $n, stack_used());
        }
    }};
}

/// Bytes below the stack pointer that `paint_stack` fills and `stack_used` scans: more than any
/// measured call needs (a call that reaches the bottom is reported as this figure and fails the
/// harness).
const STACK_PAINT_BYTES: usize = 2048;
/// The paint pattern; a word the measured calls are not expected to leave on their stack.
const STACK_PAINT: u32 = 0xC5AC_C5AC;

/// Fills the `STACK_PAINT_BYTES` below the caller's stack pointer with `STACK_PAINT`. Inlined
/// into `bench_main`, and the assembly touches no stack of its own, so the painted area starts
/// exactly at the stack pointer of the call site that follows. Nothing lives below the stack
/// pointer (no interrupts are enabled), so the writes clobber no Rust object.
#[inline(always)]
fn paint_stack() {
    // SAFETY: writes only the free memory below SP (inside RAM: the firmware fails below if a
    // call reaches the bottom, and both boards' stacks have far more than 2 KiB); moves no SP.
    unsafe {
        core::arch::asm!(
            "mov {cur}, sp",
            "2:",
            "subs {cur}, {cur}, #4",
            "str {pat}, [{cur}]",
            "subs {n}, {n}, #1",
            "bne 2b",
            cur = out(reg) _,
            n = inout(reg) STACK_PAINT_BYTES / 4 => _,
            pat = in(reg) STACK_PAINT,
            options(nostack),
        );
    }
}

/// Bytes below the stack pointer of the call site that the call since `paint_stack` wrote:
/// the distance from SP down to the deepest word that no longer holds the pattern.
#[inline(always)]
fn stack_used() -> usize {
    let untouched: usize;
    // SAFETY: reads only the painted area below SP, with the same bounds as `paint_stack`.
    unsafe {
        core::arch::asm!(
            "mov {cur}, sp",
            "subs {cur}, {cur}, {bytes}",
            "movs {k}, #0",
            "2:",
            "ldr {w}, [{cur}]",
            "cmp {w}, {pat}",
            "bne 3f",
            "adds {cur}, {cur}, #4",
            "adds {k}, {k}, #1",
            "cmp {k}, {words}",
            "bne 2b",
            "3:",
            cur = out(reg) _,
            w = out(reg) _,
            k = out(reg) untouched,
            bytes = in(reg) STACK_PAINT_BYTES,
            words = in(reg) STACK_PAINT_BYTES / 4,
            pat = in(reg) STACK_PAINT,
            options(nostack, readonly),
        );
    }
    STACK_PAINT_BYTES - 4 * untouched
}

fn q15(n: usize) -> i16 {
    adc_q15(n)
}
fn q31(n: usize) -> i32 {
    adc_q31(n)
}
fn f32s(n: usize) -> f32 {
    adc_f32(n)
}

/// The caller of every measured region (the harness stops counting when control returns here).
#[inline(never)]
#[unsafe(no_mangle)]
fn bench_main() -> bool {
    costs! {
        i16, i16, 16, q15_taps::<16>(), q15;
        i16, i16, 64, q15_taps::<64>(), q15;
        i16, i16, 256, q15_taps::<256>(), q15;
        i32, i32, 16, q31_taps::<16>(), q31;
        i32, i32, 64, q31_taps::<64>(), q31;
        i32, i32, 256, q31_taps::<256>(), q31;
        f32, f32, 16, f32_taps::<16>(), f32s;
        f32, f32, 64, f32_taps::<64>(), f32s;
        f32, f32, 256, f32_taps::<256>(), f32s;
        i16, i16, 85, q15_taps::<85>(), q15;
        i32, i32, 85, q31_taps::<85>(), q31;
        f32, f32, 85, f32_taps::<85>(), f32s;
    }
    run_time_costs! {
        i16upto, i16, 85, q15_taps::<85>(), q15;
        i32upto, i32, 85, q31_taps::<85>(), q31;
        f32upto, f32, 85, f32_taps::<85>(), f32s;
    }
    proven_costs! {
        Proof16, 16;
        Proof64, 64;
        Proof256, 256;
        Proof85, 85;
    }
    checked_costs! {
        85;
    }
    structure_costs! {
        16;
        64;
        256;
    }
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
