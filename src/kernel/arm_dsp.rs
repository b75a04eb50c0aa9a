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

/// The block sum of `f32` samples and taps: for every `i` with `i + taps.len() ≤ span.len()`,
/// in ascending `i`, calls `emit(Σ_k taps[k]·span[i + L − 1 − k])`.
///
/// **Numerics:** bit-identical to [`dot_block`](super::dot_block) for `f32`: each output is
/// summed from +0.0 in ascending tap index, and `VMLA.F32` rounds the product and then the sum,
/// exactly as the portable `acc + tap·x` does (it is not the fused `VFMA`). NaN and ±∞
/// propagate as there.
///
/// **Cost:** four outputs per pass over the taps; per four taps and four outputs one `VLDM` of
/// the taps, one `VLDMDB` of four samples and sixteen `VMLA.F32`.
#[cfg(tapline_arm_fpu)]
#[inline]
pub fn dot_block_f32(taps: &[f32], span: &[f32], mut emit: impl FnMut(f32)) {
    let len = taps.len();
    if len == 0 {
        return;
    }
    let mut rest = span;
    while let Some(window) = rest.get(..len + 3) {
        for acc in four_outputs_f32(taps, window) {
            emit(acc);
        }
        rest = rest.get(4..).unwrap_or(&[]);
    }
    while let Some(window) = rest.get(..len) {
        emit(reversed_sum_f32(0.0, taps, window));
        rest = rest.get(1..).unwrap_or(&[]);
    }
}

/// `acc + Σ_k taps[k]·xs[len − 1 − k]` in ascending k: the plain loop for remainders.
#[cfg(tapline_arm_fpu)]
#[inline(always)]
fn reversed_sum_f32(acc: f32, taps: &[f32], xs: &[f32]) -> f32 {
    taps.iter()
        .zip(xs.iter().rev())
        .fold(acc, |acc, (&h, &x)| acc + h * x)
}

/// Output m < 4 over `window` (L + 3 samples): Σ_k taps\[k\]·window\[L − 1 + m − k\].
#[cfg(tapline_arm_fpu)]
#[inline(always)]
fn four_outputs_f32(taps: &[f32], window: &[f32]) -> [f32; 4] {
    let len = taps.len();
    let groups = len / 8;
    let mut acc = [0.0f32; 4];
    let newest = window.get(len..len + 3).map(<[f32]>::as_ptr);
    if let (Some(newest), true) = (newest, groups > 0) {
        // SAFETY: `newest` points at window[L] of a window of L + 3 elements: the first load
        // reads window[L ..= L + 2]. Each pass of the loop moves the sample pointer back by 8
        // elements (two `vldmdb` of 4) and reads the 8 elements below its old position, and
        // moves the tap pointer forward by 8, reading the 8 elements it passes; after `groups`
        // passes the samples read reach down to window[L − 8·groups] ≥ window[0] and the taps
        // up to taps[8·groups − 1] ≤ taps[L − 1]. `f32` slices are 4-byte aligned, as `vldm`
        // needs. The only memory written is `acc`, a local array of four `f32` (16 bytes, read
        // first and stored last); the stack is not touched; the flags are clobbered by
        // `subs`. Every register written is an operand or declared clobbered.
        unsafe {
            asm!(
                // Stable `asm!` cannot pass `f32` in s-registers on this target (it asks for the
                // double-precision `vfp2` feature), so the four sums go through `acc` in memory.
                "vldmia {acc}, {{s0-s3}}",
                "vldmia {x}, {{s16-s18}}",
                "2:",
                // Pass A: taps k..k+3 in s8..s11, samples x[L−4−k ..= L−1−k] in s12..s15, and
                // x[L−k ..= L+2−k] carried in s16..s18. Each output takes its taps in order.
                "vldmia {h}!, {{s8-s11}}",
                "vldmdb {x}!, {{s12-s15}}",
                "vmla.f32 s0, s8, s15",
                "vmla.f32 s1, s8, s16",
                "vmla.f32 s2, s8, s17",
                "vmla.f32 s3, s8, s18",
                "vmla.f32 s0, s9, s14",
                "vmla.f32 s1, s9, s15",
                "vmla.f32 s2, s9, s16",
                "vmla.f32 s3, s9, s17",
                "vmla.f32 s0, s10, s13",
                "vmla.f32 s1, s10, s14",
                "vmla.f32 s2, s10, s15",
                "vmla.f32 s3, s10, s16",
                "vmla.f32 s0, s11, s12",
                "vmla.f32 s1, s11, s13",
                "vmla.f32 s2, s11, s14",
                "vmla.f32 s3, s11, s15",
                // Pass B: the next four taps; the new samples go to s16..s19 and the carry is
                // s12..s14 from pass A, so no register moves are needed.
                "vldmia {h}!, {{s8-s11}}",
                "vldmdb {x}!, {{s16-s19}}",
                "vmla.f32 s0, s8, s19",
                "vmla.f32 s1, s8, s12",
                "vmla.f32 s2, s8, s13",
                "vmla.f32 s3, s8, s14",
                "vmla.f32 s0, s9, s18",
                "vmla.f32 s1, s9, s19",
                "vmla.f32 s2, s9, s12",
                "vmla.f32 s3, s9, s13",
                "vmla.f32 s0, s10, s17",
                "vmla.f32 s1, s10, s18",
                "vmla.f32 s2, s10, s19",
                "vmla.f32 s3, s10, s12",
                "vmla.f32 s0, s11, s16",
                "vmla.f32 s1, s11, s17",
                "vmla.f32 s2, s11, s18",
                "vmla.f32 s3, s11, s19",
                "subs {n}, {n}, #1",
                "bne 2b",
                "vstmia {acc}, {{s0-s3}}",
                x = inout(reg) newest => _,
                h = inout(reg) taps.as_ptr() => _,
                n = inout(reg) groups => _,
                acc = in(reg) acc.as_mut_ptr(),
                out("s0") _,
                out("s1") _,
                out("s2") _,
                out("s3") _,
                out("s8") _,
                out("s9") _,
                out("s10") _,
                out("s11") _,
                out("s12") _,
                out("s13") _,
                out("s14") _,
                out("s15") _,
                out("s16") _,
                out("s17") _,
                out("s18") _,
                out("s19") _,
                options(nostack),
            );
        }
    }
    let done = if newest.is_some() { 8 * groups } else { 0 };
    let taps_left = taps.get(done..).unwrap_or(&[]);
    for (m, acc) in acc.iter_mut().enumerate() {
        let xs = window.get(..len + m - done).unwrap_or(&[]);
        *acc = reversed_sum_f32(*acc, taps_left, xs);
    }
    acc
}
