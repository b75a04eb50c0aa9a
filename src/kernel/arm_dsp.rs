//! Kernels for cores with the Armv7E-M DSP extension (Cortex-M4, M7), in inline assembly. The
//! only `unsafe` in the crate is here, and every function has a safe portable twin
//! ([`dot_block`](super::dot_block)) that it is tested bit-identical against: on the host by
//! running the portable twin against the exact integer model, and on the emulated Cortex-M4F
//! (`examples/qemu`, bin `check`) by running this kernel and its twin on the same data,
//! including full-scale and wrapping sums.
//!
//! Why assembly: the dual 16-bit multiply-accumulate (`SMLADX`) does two taps in one
//! instruction, and the compiler does not keep four outputs' sums and the sample pairs in
//! registers on its own (it spills, about 3.6 instructions per tap instead of under 1).
//!
//! Needs unaligned word loads, which Armv7-M allows for `LDR` unless the firmware has set
//! `SCB->CCR.UNALIGN_TRP` (off at reset). A sample pair starts at every other half-word, so half
//! of the pair loads are unaligned; they cost the same instruction count, and on a Cortex-M4 one
//! extra bus cycle each.
#![allow(unsafe_code)]

use core::arch::asm;

/// The block sum of Q15 samples with Q15 taps in a 32-bit accumulator: for every `i` with
/// `i + taps.len() ≤ span.len()`, in ascending `i`, calls `emit(Σ_k taps[k]·span[i + L − 1 − k])`
/// (L = `taps.len()`), the products exact (Q30) and the sum wrapping modulo 2^32.
///
/// **Numerics:** bit-identical to [`dot_block`](super::dot_block) with the proven 32-bit
/// accumulator ([`Acc32`](crate::headroom::Acc32)), whose sums wrap the same way; with taps
/// whose headroom proof holds, nothing wraps and every sum is exact. The order of the terms
/// differs (two at a time) but integer sums modulo 2^32 do not depend on order.
///
/// **Cost:** four outputs per pass over the taps; per two taps and four outputs one tap-pair
/// load, two sample-pair loads and four `SMLADX`.
#[inline]
pub fn dot_block_q15_i32(taps: &[i16], span: &[i16], mut emit: impl FnMut(i32)) {
    let len = taps.len();
    if len == 0 {
        return;
    }
    let mut rest = span;
    while let Some(window) = rest.get(..len + 3) {
        for acc in four_outputs(taps, window) {
            emit(acc);
        }
        rest = rest.get(4..).unwrap_or(&[]);
    }
    while let Some(window) = rest.get(..len) {
        emit(reversed_sum(0, taps, window));
        rest = rest.get(1..).unwrap_or(&[]);
    }
}

/// `acc + Σ_k taps[k]·xs[len − 1 − k]`, wrapping: the plain loop for remainders.
#[inline(always)]
fn reversed_sum(acc: i32, taps: &[i16], xs: &[i16]) -> i32 {
    taps.iter().zip(xs.iter().rev()).fold(acc, |acc, (&h, &x)| {
        acc.wrapping_add(i32::from(h) * i32::from(x))
    })
}

/// Output m < 4 over `window` (L + 3 samples): Σ_k taps\[k\]·window\[L − 1 + m − k\].
#[inline(always)]
fn four_outputs(taps: &[i16], window: &[i16]) -> [i32; 4] {
    let len = taps.len();
    let groups = len / 8;
    let mut acc = [0i32; 4];
    // The assembly reads taps[..8·groups] and window[L − 8·groups .. L + 3]; both lie inside
    // the slices when these hold (checked, so a wrong caller gets the portable path instead).
    let newest = window.get(len..len + 3).map(<[i16]>::as_ptr);
    if let (Some(newest), true) = (newest, groups > 0 && len >= 8 * groups) {
        let [mut a0, mut a1, mut a2, mut a3] = acc;
        // SAFETY: `newest` points at window[L], and window has L + 3 elements, so the two
        // first loads (pairs at L and L + 1) read window[L ..= L + 2]. Each loop pass moves the
        // sample pointer back by 8 elements (four pre-decrements of 2) and reads the pairs at
        // the new position and one element after it; after `groups` passes the lowest element
        // read is window[L − 8·groups] ≥ window[0]. The tap pointer reads 8 elements per pass,
        // 8·groups ≤ L in all. Only `ldr` (which may be unaligned on Armv7-M) reads memory;
        // nothing is written; the stack is not touched; the flags are clobbered by `subs`
        // (no `preserves_flags`). Every register written is an operand.
        unsafe {
            asm!(
                "ldr {c}, [{x}]",
                "ldr {d}, [{x}, #2]",
                "2:",
                // Taps 2j, 2j+1 against the pairs for outputs 0..3; the pairs of outputs 2, 3
                // are those outputs 0, 1 used one tap pair earlier, so two loads per pair.
                "ldr {t}, [{h}], #4",
                "ldr {a}, [{x}, #-4]!",
                "ldr {b}, [{x}, #2]",
                "smladx {a0}, {t}, {a}, {a0}",
                "smladx {a1}, {t}, {b}, {a1}",
                "smladx {a2}, {t}, {c}, {a2}",
                "smladx {a3}, {t}, {d}, {a3}",
                "ldr {t}, [{h}], #4",
                "ldr {c}, [{x}, #-4]!",
                "ldr {d}, [{x}, #2]",
                "smladx {a0}, {t}, {c}, {a0}",
                "smladx {a1}, {t}, {d}, {a1}",
                "smladx {a2}, {t}, {a}, {a2}",
                "smladx {a3}, {t}, {b}, {a3}",
                "ldr {t}, [{h}], #4",
                "ldr {a}, [{x}, #-4]!",
                "ldr {b}, [{x}, #2]",
                "smladx {a0}, {t}, {a}, {a0}",
                "smladx {a1}, {t}, {b}, {a1}",
                "smladx {a2}, {t}, {c}, {a2}",
                "smladx {a3}, {t}, {d}, {a3}",
                "ldr {t}, [{h}], #4",
                "ldr {c}, [{x}, #-4]!",
                "ldr {d}, [{x}, #2]",
                "smladx {a0}, {t}, {c}, {a0}",
                "smladx {a1}, {t}, {d}, {a1}",
                "smladx {a2}, {t}, {a}, {a2}",
                "smladx {a3}, {t}, {b}, {a3}",
                "subs {n}, {n}, #1",
                "bne 2b",
                x = inout(reg) newest => _,
                h = inout(reg) taps.as_ptr() => _,
                n = inout(reg) groups => _,
                t = out(reg) _,
                a = out(reg) _,
                b = out(reg) _,
                c = out(reg) _,
                d = out(reg) _,
                a0 = inout(reg) a0,
                a1 = inout(reg) a1,
                a2 = inout(reg) a2,
                a3 = inout(reg) a3,
                options(nostack, readonly),
            );
        }
        acc = [a0, a1, a2, a3];
    }
    // The taps the assembly did not take (all of them if it did not run), in the same sums.
    let done = if newest.is_some() { 8 * groups } else { 0 };
    let taps_left = taps.get(done..).unwrap_or(&[]);
    for (m, acc) in acc.iter_mut().enumerate() {
        // Output m, tap k ≥ done reads window[L − 1 + m − k]: the window up to L + m − done,
        // read backward.
        let xs = window.get(..len + m - done).unwrap_or(&[]);
        *acc = reversed_sum(*acc, taps_left, xs);
    }
    acc
}
