//! Armv7E-M (Cortex-M4, M7): the DSP extension's dual and long multiply-accumulates, and the
//! single-precision FPU on the hard-float triple.
//!
//! The Q15 kernels need unaligned word loads, which Armv7-M allows for `LDR` unless the
//! firmware has set `SCB->CCR.UNALIGN_TRP` (off at reset). A sample pair starts at every other
//! half-word, so half of the pair loads are unaligned; they cost the same instruction count,
//! and on a Cortex-M4 one extra bus cycle each.

use super::{add_remaining, plain_sum, reversed_sum_i32};
use crate::kernel::portable::{groups_of, singles};
use crate::num::MulAcc;
use core::arch::asm;

// The remainder sums, term by term with the portable twin's `mul_acc`.
#[inline(always)]
fn portable_q15(acc: i64, taps: &[i16], xs: &[i16]) -> i64 {
    plain_sum(acc, taps, xs, <i16 as MulAcc<i16>>::mul_acc)
}
#[inline(always)]
fn portable_q31(acc: i64, taps: &[i32], xs: &[i32]) -> i64 {
    plain_sum(acc, taps, xs, <i32 as MulAcc<i32>>::mul_acc)
}
#[cfg(tapline_arm_fpu)]
#[inline(always)]
fn portable_f32(acc: f32, taps: &[f32], xs: &[f32]) -> f32 {
    plain_sum(acc, taps, xs, <f32 as MulAcc<f32>>::mul_acc)
}

/// The block sum of Q15 samples with Q15 taps in a 32-bit accumulator: for every `i` with
/// `i + taps.len() ≤ span.len()`, in ascending `i`, calls `emit(Σ_k taps[k]·span[i + L − 1 − k])`
/// (L = `taps.len()`), the products exact (Q30) and the sum wrapping modulo 2^32.
///
/// **Numerics:** bit-identical to [`dot_block`](crate::kernel::dot_block) with the proven 32-bit
/// accumulator ([`Acc32`](crate::num::Acc32)), whose sums wrap the same way; with taps
/// whose headroom proof holds, nothing wraps and every sum is exact. The order of the terms
/// differs (two at a time) but integer sums modulo 2^32 do not depend on order.
///
/// **Cost:** four outputs per pass over the taps; per two taps and four outputs one tap-pair
/// load, two sample-pair loads and four `SMLADX`.
#[inline]
pub fn dot_block_q15_i32(taps: &[i16], span: &[i16], mut emit: impl FnMut(i32)) {
    let rest = groups_of::<_, _, 4>(taps.len(), span, |w| four_outputs(taps, w), &mut emit);
    singles(taps.len(), rest, |w| reversed_sum_i32(0, taps, w), emit);
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
    add_remaining(acc, taps, window, done, reversed_sum_i32)
}

/// The block sum of `f32` samples and taps: for every `i` with `i + taps.len() ≤ span.len()`,
/// in ascending `i`, calls `emit(Σ_k taps[k]·span[i + L − 1 − k])`.
///
/// **Numerics:** bit-identical to [`dot_block`](crate::kernel::dot_block) for `f32`: each output is
/// summed from +0.0 in ascending tap index, and `VMLA.F32` rounds the product and then the sum,
/// exactly as the portable `acc + tap·x` does (it is not the fused `VFMA`). NaN and ±∞
/// propagate as there.
///
/// **Cost:** four outputs per pass over the taps; per four taps and four outputs one `VLDM` of
/// the taps, one `VLDMDB` of four samples and sixteen `VMLA.F32`.
#[cfg(tapline_arm_fpu)]
#[inline]
pub fn dot_block_f32(taps: &[f32], span: &[f32], mut emit: impl FnMut(f32)) {
    let rest = groups_of::<_, _, 4>(taps.len(), span, |w| four_outputs_f32(taps, w), &mut emit);
    singles(taps.len(), rest, |w| portable_f32(0.0, taps, w), emit);
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
    add_remaining(acc, taps, window, done, portable_f32)
}

/// The single-output sums (per-sample calls): `acc + Σ_k taps[k]·xs[len − 1 − k]` over
/// `k < len = min(taps.len(), xs.len())`, `xs` read backward from its end — the contract of
/// [`dot_reversed`](crate::kernel::dot_reversed), which is each function's portable twin.
///
/// Returns the equal-length tails the assembly works on: `taps[..len]` and the last `len`
/// samples.
#[inline(always)]
fn matched<'t, 'x, T, X>(taps: &'t [T], xs: &'x [X]) -> (&'t [T], &'x [X]) {
    let len = taps.len().min(xs.len());
    (
        taps.get(..len).unwrap_or(&[]),
        xs.get(xs.len() - len..).unwrap_or(&[]),
    )
}

/// Q15 samples and taps, one output, 32-bit wrapping sum (the proven accumulator): 16 taps per
/// loop pass as 8 `SMLADX`, each after one tap-pair and one sample-pair load.
///
/// **Numerics:** bit-identical to [`dot_reversed`](crate::kernel::dot_reversed) with
/// [`Acc32`](crate::num::Acc32) (integer sums modulo 2^32 do not depend on order).
#[inline]
#[must_use]
pub fn dot_reversed_q15_i32(acc: i32, taps: &[i16], xs: &[i16]) -> i32 {
    let (taps, xs) = matched(taps, xs);
    let groups = taps.len() / 16;
    let mut acc = acc;
    let end = xs.get(xs.len()..).map(<[i16]>::as_ptr);
    if let (Some(end), true) = (end, groups > 0) {
        // SAFETY: `end` is one past the last sample. Each pair step pre-decrements the sample
        // pointer by 2 elements and reads 2 there, and reads 2 taps at the tap pointer, then
        // advances it by 2; a loop pass is 8 steps. After `groups` passes the lowest sample read
        // is xs[len − 16·groups] ≥ xs[0] and the highest tap taps[16·groups − 1] < taps[len].
        // `ldr` may be unaligned on Armv7-M (see the module doc). Memory is only read; the
        // stack is untouched; `subs` clobbers the flags; every register written is an operand.
        unsafe {
            asm!(
                "2:",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smladx {a}, {t}, {s}, {a}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smladx {a}, {t}, {s}, {a}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smladx {a}, {t}, {s}, {a}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smladx {a}, {t}, {s}, {a}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smladx {a}, {t}, {s}, {a}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smladx {a}, {t}, {s}, {a}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smladx {a}, {t}, {s}, {a}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smladx {a}, {t}, {s}, {a}",
                "subs {n}, {n}, #1",
                "bne 2b",
                x = inout(reg) end => _,
                h = inout(reg) taps.as_ptr() => _,
                n = inout(reg) groups => _,
                t = out(reg) _,
                s = out(reg) _,
                a = inout(reg) acc,
                options(nostack, readonly),
            );
        }
    }
    let done = if end.is_some() { 16 * groups } else { 0 };
    let [acc] = add_remaining([acc], taps, xs, done, reversed_sum_i32);
    acc
}

/// Q15 samples and taps, one output, exact 64-bit sum (the default accumulator): as
/// [`dot_reversed_q15_i32`] with `SMLALDX`.
///
/// **Numerics:** bit-identical to [`dot_reversed`](crate::kernel::dot_reversed) for `i16` with the
/// default accumulator: each product is exact and the 64-bit sum wraps modulo 2^64 as there.
#[inline]
#[must_use]
pub fn dot_reversed_q15_i64(acc: i64, taps: &[i16], xs: &[i16]) -> i64 {
    let (taps, xs) = matched(taps, xs);
    let groups = taps.len() / 16;
    let (mut lo, mut hi) = split64(acc);
    let end = xs.get(xs.len()..).map(<[i16]>::as_ptr);
    if let (Some(end), true) = (end, groups > 0) {
        // SAFETY: as in `dot_reversed_q15_i32`: the same pointers, steps and pass count, so the
        // same elements are read; only the accumulate instruction differs.
        unsafe {
            asm!(
                "2:",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smlaldx {lo}, {hi}, {t}, {s}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smlaldx {lo}, {hi}, {t}, {s}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smlaldx {lo}, {hi}, {t}, {s}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smlaldx {lo}, {hi}, {t}, {s}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smlaldx {lo}, {hi}, {t}, {s}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smlaldx {lo}, {hi}, {t}, {s}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smlaldx {lo}, {hi}, {t}, {s}",
                "ldr {t}, [{h}], #4",
                "ldr {s}, [{x}, #-4]!",
                "smlaldx {lo}, {hi}, {t}, {s}",
                "subs {n}, {n}, #1",
                "bne 2b",
                x = inout(reg) end => _,
                h = inout(reg) taps.as_ptr() => _,
                n = inout(reg) groups => _,
                t = out(reg) _,
                s = out(reg) _,
                lo = inout(reg) lo,
                hi = inout(reg) hi,
                options(nostack, readonly),
            );
        }
    }
    let done = if end.is_some() { 16 * groups } else { 0 };
    let [acc] = add_remaining([join64(lo, hi)], taps, xs, done, portable_q15);
    acc
}

/// Q31 samples and taps, one output, exact 64-bit sum: 4 taps per loop pass, two `LDRD` of
/// taps, two of samples and four `SMLAL`.
///
/// **Numerics:** bit-identical to [`dot_reversed`](crate::kernel::dot_reversed) for `i32` with the
/// default accumulator (exact products, sum modulo 2^64).
#[inline]
#[must_use]
pub fn dot_reversed_q31_i64(acc: i64, taps: &[i32], xs: &[i32]) -> i64 {
    let (taps, xs) = matched(taps, xs);
    let groups = taps.len() / 4;
    let (mut lo, mut hi) = split64(acc);
    let end = xs.get(xs.len()..).map(<[i32]>::as_ptr);
    if let (Some(end), true) = (end, groups > 0) {
        // SAFETY: `end` is one past the last sample. A pass reads taps[4j .. 4j+4] (two `ldrd`
        // with post-increment) and, with two pre-decrements of 2 elements, the 4 samples below
        // the sample pointer; after `groups` passes that is taps[..4·groups] and
        // xs[len − 4·groups ..], both inside. `i32` slices are 4-byte aligned, which `ldrd`
        // needs on Armv7-M. Memory is only read; the stack is untouched; `subs` clobbers the
        // flags; every register written is an operand.
        unsafe {
            asm!(
                "2:",
                // h0·x[n−k] + h1·x[n−k−1]: `ldrd` puts the lower address in the first register.
                "ldrd {h0}, {h1}, [{h}], #8",
                "ldrd {p}, {q}, [{x}, #-8]!",
                "smlal {lo}, {hi}, {h0}, {q}",
                "smlal {lo}, {hi}, {h1}, {p}",
                "ldrd {h0}, {h1}, [{h}], #8",
                "ldrd {p}, {q}, [{x}, #-8]!",
                "smlal {lo}, {hi}, {h0}, {q}",
                "smlal {lo}, {hi}, {h1}, {p}",
                "subs {n}, {n}, #1",
                "bne 2b",
                x = inout(reg) end => _,
                h = inout(reg) taps.as_ptr() => _,
                n = inout(reg) groups => _,
                h0 = out(reg) _,
                h1 = out(reg) _,
                p = out(reg) _,
                q = out(reg) _,
                lo = inout(reg) lo,
                hi = inout(reg) hi,
                options(nostack, readonly),
            );
        }
    }
    let done = if end.is_some() { 4 * groups } else { 0 };
    let [acc] = add_remaining([join64(lo, hi)], taps, xs, done, portable_q31);
    acc
}

/// The block sum of Q31 samples and taps in exact 64-bit sums: as
/// [`dot_block`](crate::kernel::dot_block), two outputs per pass over the taps (four 64-bit sums would
/// not fit in the registers beside the taps and samples).
///
/// **Numerics:** bit-identical to [`dot_block`](crate::kernel::dot_block) for `i32` with the default
/// accumulator. **Cost:** per two taps and two outputs one `LDRD` of taps, one of samples and
/// four `SMLAL`.
#[inline]
pub fn dot_block_q31_i64(taps: &[i32], span: &[i32], mut emit: impl FnMut(i64)) {
    let rest = groups_of::<_, _, 2>(taps.len(), span, |w| two_outputs_q31(taps, w), &mut emit);
    singles(taps.len(), rest, |w| dot_reversed_q31_i64(0, taps, w), emit);
}

/// Outputs 0 and 1 over `window` (L + 1 samples): Σ_k taps\[k\]·window\[L − 1 + m − k\].
#[inline(always)]
fn two_outputs_q31(taps: &[i32], window: &[i32]) -> [i64; 2] {
    let len = taps.len();
    let groups = len / 4;
    let (mut lo0, mut hi0, mut lo1, mut hi1) = (0u32, 0u32, 0u32, 0u32);
    let newest = window.get(len..len + 1).map(<[i32]>::as_ptr);
    if let (Some(newest), true) = (newest, groups > 0) {
        // SAFETY: `newest` points at window[L] of L + 1 elements; the first load reads it. A
        // pass reads taps[4j .. 4j+4] (two `ldrd`, post-increment) and the 4 samples below the
        // sample pointer (two `ldrd` with pre-decrement); after `groups` passes that is
        // taps[..4·groups] and window[L − 4·groups ..], inside both slices. `i32` slices are
        // 4-byte aligned, as `ldrd` needs. Memory is only read; the stack is untouched; `subs`
        // clobbers the flags; every register written is an operand.
        unsafe {
            asm!(
                "ldr {c}, [{x}]",
                "2:",
                // Taps k, k+1: output 0 takes x[L−1−k], x[L−2−k] (q, p, just loaded), output 1
                // takes x[L−k] (c, carried), x[L−1−k] (q).
                "ldrd {h0}, {h1}, [{h}], #8",
                "ldrd {p}, {q}, [{x}, #-8]!",
                "smlal {lo0}, {hi0}, {h0}, {q}",
                "smlal {lo1}, {hi1}, {h0}, {c}",
                "smlal {lo0}, {hi0}, {h1}, {p}",
                "smlal {lo1}, {hi1}, {h1}, {q}",
                // Taps k+2, k+3: the carry is p; the new pair goes to (c, q).
                "ldrd {h0}, {h1}, [{h}], #8",
                "ldrd {c}, {q}, [{x}, #-8]!",
                "smlal {lo0}, {hi0}, {h0}, {q}",
                "smlal {lo1}, {hi1}, {h0}, {p}",
                "smlal {lo0}, {hi0}, {h1}, {c}",
                "smlal {lo1}, {hi1}, {h1}, {q}",
                "subs {n}, {n}, #1",
                "bne 2b",
                x = inout(reg) newest => _,
                h = inout(reg) taps.as_ptr() => _,
                n = inout(reg) groups => _,
                h0 = out(reg) _,
                h1 = out(reg) _,
                p = out(reg) _,
                q = out(reg) _,
                c = out(reg) _,
                lo0 = inout(reg) lo0,
                hi0 = inout(reg) hi0,
                lo1 = inout(reg) lo1,
                hi1 = inout(reg) hi1,
                options(nostack, readonly),
            );
        }
    }
    let done = if newest.is_some() { 4 * groups } else { 0 };
    add_remaining(
        [join64(lo0, hi0), join64(lo1, hi1)],
        taps,
        window,
        done,
        portable_q31,
    )
}

/// The block sum of Q15 samples and taps in exact 64-bit sums (the default accumulator): as
/// [`dot_block`](crate::kernel::dot_block), two outputs per pass with `SMLALDX`.
///
/// **Numerics:** bit-identical to [`dot_block`](crate::kernel::dot_block) for `i16` with the default
/// accumulator. **Cost:** per two taps and two outputs one tap-pair load, two sample-pair
/// loads (one of them unaligned) and two `SMLALDX`.
#[inline]
pub fn dot_block_q15_i64(taps: &[i16], span: &[i16], mut emit: impl FnMut(i64)) {
    let rest = groups_of::<_, _, 2>(taps.len(), span, |w| two_outputs_q15(taps, w), &mut emit);
    singles(taps.len(), rest, |w| dot_reversed_q15_i64(0, taps, w), emit);
}

/// Outputs 0 and 1 over `window` (L + 1 samples), Q15, 64-bit sums.
#[inline(always)]
fn two_outputs_q15(taps: &[i16], window: &[i16]) -> [i64; 2] {
    let len = taps.len();
    let groups = len / 8;
    let (mut lo0, mut hi0, mut lo1, mut hi1) = (0u32, 0u32, 0u32, 0u32);
    let newest = window.get(len..len + 1).map(<[i16]>::as_ptr);
    if let (Some(newest), true) = (newest, groups > 0) {
        // SAFETY: `newest` points at window[L] of L + 1 elements. Each pair step moves the
        // sample pointer back by 2 elements and reads 2 there (output 0) and 2 one element
        // higher (output 1), up to window[L] on the first step; it reads 2 taps and advances
        // the tap pointer by 2. A pass is 4 steps; after `groups` passes the lowest sample read
        // is window[L − 8·groups] ≥ window[0] and the highest tap taps[8·groups − 1] < taps[L].
        // `ldr` may be unaligned (module doc). Memory is only read; the stack is untouched;
        // `subs` clobbers the flags; every register written is an operand.
        unsafe {
            asm!(
                "2:",
                "ldr {t}, [{h}], #4",
                "ldr {s0}, [{x}, #-4]!",
                "ldr {s1}, [{x}, #2]",
                "smlaldx {lo0}, {hi0}, {t}, {s0}",
                "smlaldx {lo1}, {hi1}, {t}, {s1}",
                "ldr {t}, [{h}], #4",
                "ldr {s0}, [{x}, #-4]!",
                "ldr {s1}, [{x}, #2]",
                "smlaldx {lo0}, {hi0}, {t}, {s0}",
                "smlaldx {lo1}, {hi1}, {t}, {s1}",
                "ldr {t}, [{h}], #4",
                "ldr {s0}, [{x}, #-4]!",
                "ldr {s1}, [{x}, #2]",
                "smlaldx {lo0}, {hi0}, {t}, {s0}",
                "smlaldx {lo1}, {hi1}, {t}, {s1}",
                "ldr {t}, [{h}], #4",
                "ldr {s0}, [{x}, #-4]!",
                "ldr {s1}, [{x}, #2]",
                "smlaldx {lo0}, {hi0}, {t}, {s0}",
                "smlaldx {lo1}, {hi1}, {t}, {s1}",
                "subs {n}, {n}, #1",
                "bne 2b",
                x = inout(reg) newest => _,
                h = inout(reg) taps.as_ptr() => _,
                n = inout(reg) groups => _,
                t = out(reg) _,
                s0 = out(reg) _,
                s1 = out(reg) _,
                lo0 = inout(reg) lo0,
                hi0 = inout(reg) hi0,
                lo1 = inout(reg) lo1,
                hi1 = inout(reg) hi1,
                options(nostack, readonly),
            );
        }
    }
    let done = if newest.is_some() { 8 * groups } else { 0 };
    add_remaining(
        [join64(lo0, hi0), join64(lo1, hi1)],
        taps,
        window,
        done,
        portable_q15,
    )
}

/// `f32`, one output: 8 taps per loop pass (two `VLDM` of taps, two `VLDMDB` of samples, eight
/// `VMLA.F32` into one sum, in ascending tap order).
///
/// **Numerics:** bit-identical to [`dot_reversed`](crate::kernel::dot_reversed) for `f32`: the same
/// products and sums in the same order, each rounded once (`VMLA` is not fused).
#[cfg(tapline_arm_fpu)]
#[inline]
#[must_use]
pub fn dot_reversed_f32(acc: f32, taps: &[f32], xs: &[f32]) -> f32 {
    let (taps, xs) = matched(taps, xs);
    let groups = taps.len() / 8;
    let mut sum = [acc];
    let end = xs.get(xs.len()..).map(<[f32]>::as_ptr);
    if let (Some(end), true) = (end, groups > 0) {
        // SAFETY: `end` is one past the last sample. A pass reads taps[8j .. 8j+8] (two
        // `vldmia` with write-back) and the 8 samples below the sample pointer (two `vldmdb`);
        // after `groups` passes that is taps[..8·groups] and xs[len − 8·groups ..], inside
        // both. `f32` slices are 4-byte aligned, as `vldm` needs. The only memory written is
        // `sum`, a local `[f32; 1]` read first and stored last (s-registers cannot be operands
        // on this target, see `four_outputs_f32`); the stack is untouched; `subs` clobbers the
        // flags; every register written is an operand or declared clobbered.
        unsafe {
            asm!(
                "vldr s0, [{sum}]",
                "2:",
                "vldmia {h}!, {{s8-s11}}",
                "vldmdb {x}!, {{s12-s15}}",
                "vmla.f32 s0, s8, s15",
                "vmla.f32 s0, s9, s14",
                "vmla.f32 s0, s10, s13",
                "vmla.f32 s0, s11, s12",
                "vldmia {h}!, {{s8-s11}}",
                "vldmdb {x}!, {{s12-s15}}",
                "vmla.f32 s0, s8, s15",
                "vmla.f32 s0, s9, s14",
                "vmla.f32 s0, s10, s13",
                "vmla.f32 s0, s11, s12",
                "subs {n}, {n}, #1",
                "bne 2b",
                "vstr s0, [{sum}]",
                x = inout(reg) end => _,
                h = inout(reg) taps.as_ptr() => _,
                n = inout(reg) groups => _,
                sum = in(reg) sum.as_mut_ptr(),
                out("s0") _,
                out("s8") _,
                out("s9") _,
                out("s10") _,
                out("s11") _,
                out("s12") _,
                out("s13") _,
                out("s14") _,
                out("s15") _,
                options(nostack),
            );
        }
    }
    let done = if end.is_some() { 8 * groups } else { 0 };
    let [acc] = add_remaining(sum, taps, xs, done, portable_f32);
    acc
}

/// An `i64` as its (low, high) 32-bit halves, the register pair `SMLAL`/`SMLALD` accumulate.
#[inline(always)]
fn split64(v: i64) -> (u32, u32) {
    (v as u32, (v >> 32) as u32)
}

/// The inverse of [`split64`].
#[inline(always)]
fn join64(lo: u32, hi: u32) -> i64 {
    ((u64::from(hi) << 32) | u64::from(lo)) as i64
}
