//! Armv7E-M (Cortex-M4, M7): the DSP extension's dual and long multiply-accumulates, and the
//! single-precision FPU on the hard-float triple.
//!
//! The Q15 kernels need unaligned word loads, which Armv7-M allows for `LDR` unless the
//! firmware has set `SCB->CCR.UNALIGN_TRP` (off at reset). A sample pair starts at every other
//! half-word, so half of the pair loads are unaligned; they cost the same instruction count,
//! and on a Cortex-M4 one extra bus cycle each.
//!
//! **Every length in assembly.** Each kernel counts its work in units (a tap pair for Q15, a
//! tap for Q31 and `f32`): the loop takes a whole pass of units at a time, and the units left
//! over (fewer than a pass) run through the same steps once each (the `unit_loop!` template),
//! inside the same `asm!` block. Only the last tap of an odd Q15 length is summed in Rust. So
//! a tap count known only at run time runs the same instructions as one known when compiling,
//! which the compiler cannot specialise: the cost table's rows at 85 taps in a capacity of 128
//! and at exactly 85 taps differ by the filter's bookkeeping, not by the sum.

use super::{add_odd_tap, add_remaining, plain_sum, reversed_sum_i32};
use crate::kernel::portable::{groups_of, singles};
use crate::num::fixed_point::finish_fixed_i32;
use crate::num::{MulAcc, Rounding};
use core::arch::asm;

/// The loop frame of every kernel here, as one assembly template: `{n}` holds the number of
/// units on entry (any value ≥ 0); the `$pass` steps run while a whole pass of `$pass` units
/// is left, then `$rest` takes the rest (1 to `$pass − 1` units, branching to `4f` or ending
/// at `5f` itself). Labels 2–5 are local to the template.
macro_rules! unit_loop {
    ($pass:literal, [$($step:expr),* $(,)?], [$($rest:expr),* $(,)?]) => {
        concat!(
            "subs {n}, {n}, #", stringify!($pass), "\n",
            "blt 3f\n",
            "2:\n",
            $($step,)*
            "subs {n}, {n}, #", stringify!($pass), "\n",
            "bge 2b\n",
            "3:\n",
            "adds {n}, {n}, #", stringify!($pass), "\n",
            "beq 5f\n",
            $($rest,)*
            "5:\n",
        )
    };
}

/// Q15, four outputs, one tap pair (2j, 2j + 1) against the sample pairs of outputs 0..3. The
/// pairs of outputs 2 and 3 are those outputs 0 and 1 used one tap pair earlier, so each step
/// loads two pairs and keeps the other two: step A loads into `a`, `b` and keeps `c`, `d`;
/// step B the reverse. Steps alternate A, B, A, … from the preloaded `c`, `d`.
macro_rules! q15_four_step {
    ($new0:literal, $new1:literal, $kept0:literal, $kept1:literal) => {
        concat!(
            "ldr {t}, [{h}], #4\n",
            "ldr ",
            $new0,
            ", [{x}, #-4]!\n",
            "ldr ",
            $new1,
            ", [{x}, #2]\n",
            "smladx {a0}, {t}, ",
            $new0,
            ", {a0}\n",
            "smladx {a1}, {t}, ",
            $new1,
            ", {a1}\n",
            "smladx {a2}, {t}, ",
            $kept0,
            ", {a2}\n",
            "smladx {a3}, {t}, ",
            $kept1,
            ", {a3}\n",
        )
    };
    (A) => {
        q15_four_step!("{a}", "{b}", "{c}", "{d}")
    };
    (B) => {
        q15_four_step!("{c}", "{d}", "{a}", "{b}")
    };
}

/// Q15, two outputs, 64-bit sums: one tap pair against the sample pair of output 0 (loaded
/// with pre-decrement) and of output 1 (one sample higher).
macro_rules! q15_two_step {
    () => {
        concat!(
            "ldr {t}, [{h}], #4\n",
            "ldr {s0}, [{x}, #-4]!\n",
            "ldr {s1}, [{x}, #2]\n",
            "smlaldx {lo0}, {hi0}, {t}, {s0}\n",
            "smlaldx {lo1}, {hi1}, {t}, {s1}\n",
        )
    };
}

/// Q15, one output: one tap pair against one sample pair, into `$mac` (`smladx` for a 32-bit
/// sum in `{a}`, `smlaldx` for a 64-bit sum in `{lo}`, `{hi}`).
macro_rules! q15_one_step {
    ($mac:literal) => {
        concat!("ldr {t}, [{h}], #4\n", "ldr {s}, [{x}, #-4]!\n", $mac, "\n")
    };
}

/// Q31, two outputs, taps k and k + 1: output 0 takes x[L−1−k], x[L−2−k] (the pair just
/// loaded into `$lo_new`, `{q}`), output 1 takes x[L−k] (`$carry`) and x[L−1−k] (`{q}`).
/// `ldrd` puts the lower address in the first register; `$lo_new` is the next step's carry.
macro_rules! q31_two_step {
    ($lo_new:literal, $carry:literal) => {
        concat!(
            "ldrd {h0}, {h1}, [{h}], #8\n",
            "ldrd ",
            $lo_new,
            ", {q}, [{x}, #-8]!\n",
            "smlal {lo0}, {hi0}, {h0}, {q}\n",
            "smlal {lo1}, {hi1}, {h0}, ",
            $carry,
            "\n",
            "smlal {lo0}, {hi0}, {h1}, ",
            $lo_new,
            "\n",
            "smlal {lo1}, {hi1}, {h1}, {q}\n",
        )
    };
}

/// Q31, one output, taps k and k + 1 against x[n−k], x[n−k−1].
macro_rules! q31_one_step {
    () => {
        concat!(
            "ldrd {h0}, {h1}, [{h}], #8\n",
            "ldrd {p}, {q}, [{x}, #-8]!\n",
            "smlal {lo}, {hi}, {h0}, {q}\n",
            "smlal {lo}, {hi}, {h1}, {p}\n",
        )
    };
}

/// `f32`, four outputs, four taps k..k+3 (in s8..s11) against four new samples
/// x[L−4−k ..= L−1−k] (loaded into `$new`, the registers `$n0`..`$n3`) and the three carried
/// from the step before (`$c0`..`$c2`, x[L−k ..= L+2−k]). Each output takes its taps in
/// ascending order. Two steps make a pass: the first loads s12..s15 and carries s16..s18, the
/// second loads s16..s19 and carries s12..s14, so no register moves are needed.
macro_rules! f32_four_step {
    ($new:literal, $n0:literal, $n1:literal, $n2:literal, $n3:literal,
     $c0:literal, $c1:literal, $c2:literal) => {
        concat!(
            "vldmia {h}!, {{s8-s11}}\n",
            "vldmdb {x}!, {{",
            $new,
            "}}\n",
            "vmla.f32 s0, s8, ",
            $n3,
            "\n",
            "vmla.f32 s1, s8, ",
            $c0,
            "\n",
            "vmla.f32 s2, s8, ",
            $c1,
            "\n",
            "vmla.f32 s3, s8, ",
            $c2,
            "\n",
            "vmla.f32 s0, s9, ",
            $n2,
            "\n",
            "vmla.f32 s1, s9, ",
            $n3,
            "\n",
            "vmla.f32 s2, s9, ",
            $c0,
            "\n",
            "vmla.f32 s3, s9, ",
            $c1,
            "\n",
            "vmla.f32 s0, s10, ",
            $n1,
            "\n",
            "vmla.f32 s1, s10, ",
            $n2,
            "\n",
            "vmla.f32 s2, s10, ",
            $n3,
            "\n",
            "vmla.f32 s3, s10, ",
            $c0,
            "\n",
            "vmla.f32 s0, s11, ",
            $n0,
            "\n",
            "vmla.f32 s1, s11, ",
            $n1,
            "\n",
            "vmla.f32 s2, s11, ",
            $n2,
            "\n",
            "vmla.f32 s3, s11, ",
            $n3,
            "\n",
        )
    };
    (A) => {
        f32_four_step!("s12-s15", "s12", "s13", "s14", "s15", "s16", "s17", "s18")
    };
    (B) => {
        f32_four_step!("s16-s19", "s16", "s17", "s18", "s19", "s12", "s13", "s14")
    };
}

/// `f32`, one output, four taps against the four samples below the sample pointer.
macro_rules! f32_one_step {
    () => {
        concat!(
            "vldmia {h}!, {{s8-s11}}\n",
            "vldmdb {x}!, {{s12-s15}}\n",
            "vmla.f32 s0, s8, s15\n",
            "vmla.f32 s0, s9, s14\n",
            "vmla.f32 s0, s10, s13\n",
            "vmla.f32 s0, s11, s12\n",
        )
    };
}

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

/// Q15, one output step of a proven 32-bit sum `$a` into the half-word at `[{out}, #$at]`:
/// the rounding offset `{off}` added with `QADD` (a sum within 2^14 of `i32::MAX` stays at
/// `i32::MAX`, which still saturates to `i16::MAX` as the exact value would), one `SSAT` with
/// the shift by 15, the store, and the saturation counted without a branch (`SSAT` changed the
/// value exactly when the shifted sum and the result differ). `$parity` is empty, or adds bit 15
/// of the sum (the lowest kept bit) to the offset for half-even.
macro_rules! q15_finish_step {
    ($a:literal, $at:literal, [$($parity:literal),*]) => {
        concat!(
            $($parity,)*
            "qadd ", $a, ", ", $a, ", {t}\n",
            "ssat {y}, #16, ", $a, ", asr #15\n",
            "strh {y}, [{out}, #", $at, "]\n",
            "cmp.w {y}, ", $a, ", asr #15\n",
            "it ne\n",
            "addne {cnt}, {cnt}, #1\n",
        )
    };
    (plain $a:literal, $at:literal) => {
        q15_finish_step!($a, $at, [])
    };
    (parity $a:literal, $at:literal) => {
        q15_finish_step!($a, $at, ["and {t}, {even}, ", $a, ", lsr #15\n", "add {t}, {t}, {off}\n"])
    };
}

/// [`dot_block_q15_i32`] with the output step of the proven path fused into the assembly: each
/// sum rounded by `rounding`, saturated to `i16` and stored into the next slot of `out` (outputs
/// past its end are computed and counted, not stored); returns how many saturated.
///
/// **Numerics:** bit-identical to `MulAcc::finish` (the 32-bit output step of the proven
/// accumulator) on each sum of [`dot_block_q15_i32`], for every [`Rounding`] mode and every
/// `i32` sum, wrapped or not: q = ⌊(acc + offset + parity)/2^15⌋ clamped to `i16`, with
/// offset 2^14 (half-up), 0 (truncate) or 2^14 − 1 plus the lowest kept bit (half-even).
///
/// **Cost:** per four outputs, after the sums, six instructions each (`QADD`, `SSAT`, `STRH`,
/// `CMP`, `IT`, `ADDNE`), two more each for half-even; the rest as [`dot_block_q15_i32`].
#[inline]
pub fn dot_block_q15_i32_finished(
    taps: &[i16],
    span: &[i16],
    rounding: Rounding,
    out: &mut [i16],
) -> u32 {
    let len = taps.len();
    if len == 0 {
        return 0;
    }
    let (offset, even) = rounding.offset_and_parity_i32(1 << 14);
    let mut saturated = 0u32;
    let mut rest = span;
    let mut slots = out;
    while let (Some(window), true) = (rest.get(..len + 3), slots.len() >= 4) {
        let Some((four, after)) = core::mem::take(&mut slots).split_first_chunk_mut::<4>() else {
            break;
        };
        let sums = four_outputs(taps, window);
        saturated = finish_four(sums, offset, even, four, saturated);
        rest = rest.get(4..).unwrap_or(&[]);
        slots = after;
    }
    let mut slots = slots.iter_mut();
    singles(
        len,
        rest,
        |w| reversed_sum_i32(0, taps, w),
        |acc| {
            let (y, clamped) = finish_fixed_i32::<i16>(acc, rounding);
            saturated = saturated.wrapping_add(u32::from(clamped));
            if let Some(slot) = slots.next() {
                *slot = y;
            }
        },
    );
    saturated
}

/// The output step of four proven sums into `out`, counting saturations onto `count`; `offset`
/// and `even` as `Rounding::offset_and_parity_i32` gives them for half an LSB of 2^14.
#[inline(always)]
fn finish_four(sums: [i32; 4], offset: i32, even: i32, out: &mut [i16; 4], count: u32) -> u32 {
    let [a0, a1, a2, a3] = sums;
    let mut cnt = count;
    // The four steps of one kind and the operands both kinds share; `$own` adds the rounding
    // registers of that kind.
    macro_rules! four_steps {
        ($kind:ident, $($own:tt)*) => {
            asm!(
                q15_finish_step!($kind "{a0}", "0"),
                q15_finish_step!($kind "{a1}", "2"),
                q15_finish_step!($kind "{a2}", "4"),
                q15_finish_step!($kind "{a3}", "6"),
                $($own)*
                out = in(reg) out.as_mut_ptr(),
                y = out(reg) _,
                cnt = inout(reg) cnt,
                a0 = inout(reg) a0 => _,
                a1 = inout(reg) a1 => _,
                a2 = inout(reg) a2 => _,
                a3 = inout(reg) a3 => _,
                options(nostack),
            )
        };
    }
    // SAFETY: `out` is a `&mut [i16; 4]`: the four `strh` write its half-words at byte offsets
    // 0, 2, 4, 6 (2-aligned, inside it); nothing else is read or written in memory; the stack
    // is untouched; the flags and the Q flag are clobbered (no `preserves_flags`; nothing here
    // or in Rust reads the Q flag). Every register written is an operand. In the half-even
    // form `{t}` is a scratch register, set from `{off}` per output.
    unsafe {
        if even == 0 {
            four_steps!(plain, t = in(reg) offset,);
        } else {
            four_steps!(parity, off = in(reg) offset, even = in(reg) even, t = out(reg) _,);
        }
    }
    cnt
}

/// Output m < 4 over `window` (L + 3 samples): Σ_k taps\[k\]·window\[L − 1 + m − k\].
#[inline(always)]
fn four_outputs(taps: &[i16], window: &[i16]) -> [i32; 4] {
    let len = taps.len();
    // The window must have L + 3 samples (checked, so a wrong caller gets the portable path).
    let Some(newest) = window.get(len..len + 3).map(<[i16]>::as_ptr) else {
        return add_remaining([0; 4], taps, window, 0, reversed_sum_i32);
    };
    let [mut a0, mut a1, mut a2, mut a3] = [0i32; 4];
    // SAFETY: `newest` points at window[L], and window has L + 3 elements, so the two
    // first loads (pairs at L and L + 1) read window[L ..= L + 2]. Each step, in the loop or in
    // the remainder, moves the sample pointer back by 2 elements and reads the pairs at the new
    // position and one element after it, and reads one tap pair; there are ⌊L/2⌋ steps, so the
    // lowest sample read is window[L mod 2] and the highest tap taps[2·⌊L/2⌋ − 1] < taps[L].
    // Only `ldr` (which may be unaligned on Armv7-M) reads memory; nothing is written; the
    // stack is not touched; the flags are clobbered (no `preserves_flags`). Every register
    // written is an operand.
    unsafe {
        asm!(
            "ldr {c}, [{x}]",
            "ldr {d}, [{x}, #2]",
            unit_loop!(
                4,
                [q15_four_step!(A), q15_four_step!(B), q15_four_step!(A), q15_four_step!(B)],
                [
                    "cmp {n}, #2\n",
                    "blt 4f\n",
                    q15_four_step!(A),
                    q15_four_step!(B),
                    "subs {n}, {n}, #2\n",
                    "beq 5f\n",
                    "4:\n",
                    q15_four_step!(A),
                ]
            ),
            x = inout(reg) newest => _,
            h = inout(reg) taps.as_ptr() => _,
            n = inout(reg) len / 2 => _,
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
    add_odd_tap([a0, a1, a2, a3], taps, window, reversed_sum_i32)
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
    let mut acc = [0.0f32; 4];
    let Some(newest) = window.get(len..len + 3).map(<[f32]>::as_ptr) else {
        return add_remaining(acc, taps, window, 0, portable_f32);
    };
    // SAFETY: `newest` points at window[L] of a window of L + 3 elements: the first load
    // reads window[L ..= L + 2]. Each four-tap step moves the sample pointer back by 4
    // elements and reads the 4 below its old position, and reads 4 taps, moving the tap
    // pointer forward; each one-tap step of the remainder reads one tap and moves the sample
    // pointer back by one element, then reads the 4 elements from there (window[L − 1 − k ..=
    // L + 2 − k] for tap k ≤ L − 1, inside the window). Every tap k < L is taken once, so the
    // taps read are taps[..L] and the lowest sample window[0]. `f32` slices are 4-byte
    // aligned, as `vldm` needs. The only memory written is `acc`, a local array of four `f32`
    // (16 bytes, read first and stored last); the stack is not touched; the flags are
    // clobbered. Every register written is an operand or declared clobbered.
    unsafe {
        asm!(
            // Stable `asm!` cannot pass `f32` in s-registers on this target (it asks for the
            // double-precision `vfp2` feature), so the four sums go through `acc` in memory.
            "vldmia {acc}, {{s0-s3}}",
            "vldmia {x}, {{s16-s18}}",
            unit_loop!(
                8,
                [f32_four_step!(A), f32_four_step!(B)],
                [
                    "cmp {n}, #4\n",
                    "blt 4f\n",
                    f32_four_step!(A),
                    "subs {n}, {n}, #4\n",
                    "beq 5f\n",
                    "4:\n",
                    "vldmia {h}!, {{s8}}\n",
                    "sub {x}, {x}, #4\n",
                    "vldmia {x}, {{s12-s15}}\n",
                    "vmla.f32 s0, s8, s12\n",
                    "vmla.f32 s1, s8, s13\n",
                    "vmla.f32 s2, s8, s14\n",
                    "vmla.f32 s3, s8, s15\n",
                    "subs {n}, {n}, #1\n",
                    "bne 4b\n",
                ]
            ),
            "vstmia {acc}, {{s0-s3}}",
            x = inout(reg) newest => _,
            h = inout(reg) taps.as_ptr() => _,
            n = inout(reg) len => _,
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
    acc
}

/// The single-output sums (per-sample calls): `acc + Σ_k taps[k]·xs[len − 1 − k]` over
/// `k < len = min(taps.len(), xs.len())`, `xs` read backward from its end — the contract of
/// [`dot_reversed`](crate::kernel::dot_reversed), which is each function's portable twin.
///
/// Returns the equal-length tails the assembly works on: `taps[..len]` and the last `len`
/// samples, and a pointer one past the last sample.
#[inline(always)]
fn matched<'t, 'x, T, X>(taps: &'t [T], xs: &'x [X]) -> (&'t [T], &'x [X], *const X) {
    let len = taps.len().min(xs.len());
    let xs = xs.get(xs.len() - len..).unwrap_or(&[]);
    (taps.get(..len).unwrap_or(&[]), xs, xs.as_ptr_range().end)
}

/// Q15 samples and taps, one output, 32-bit wrapping sum (the proven accumulator): 16 taps per
/// loop pass as 8 `SMLADX`, each after one tap-pair and one sample-pair load.
///
/// **Numerics:** bit-identical to [`dot_reversed`](crate::kernel::dot_reversed) with
/// [`Acc32`](crate::num::Acc32) (integer sums modulo 2^32 do not depend on order).
#[inline]
#[must_use]
pub fn dot_reversed_q15_i32(acc: i32, taps: &[i16], xs: &[i16]) -> i32 {
    let (taps, xs, end) = matched(taps, xs);
    let mut acc = acc;
    // SAFETY: `end` is one past the last sample. Each pair step pre-decrements the sample
    // pointer by 2 elements and reads 2 there, and reads 2 taps at the tap pointer, then
    // advances it by 2. There are ⌊len/2⌋ steps (a pass is 8, the remainder fewer), so the
    // lowest sample read is xs[len mod 2] and the highest tap taps[2·⌊len/2⌋ − 1] < taps[len].
    // `ldr` may be unaligned on Armv7-M (see the module doc). Memory is only read; the stack
    // is untouched; the flags are clobbered; every register written is an operand.
    unsafe {
        asm!(
            unit_loop!(
                8,
                [
                    q15_one_step!("smladx {a}, {t}, {s}, {a}"),
                    q15_one_step!("smladx {a}, {t}, {s}, {a}"),
                    q15_one_step!("smladx {a}, {t}, {s}, {a}"),
                    q15_one_step!("smladx {a}, {t}, {s}, {a}"),
                    q15_one_step!("smladx {a}, {t}, {s}, {a}"),
                    q15_one_step!("smladx {a}, {t}, {s}, {a}"),
                    q15_one_step!("smladx {a}, {t}, {s}, {a}"),
                    q15_one_step!("smladx {a}, {t}, {s}, {a}"),
                ],
                [
                    "4:\n",
                    q15_one_step!("smladx {a}, {t}, {s}, {a}"),
                    "subs {n}, {n}, #1\n",
                    "bne 4b\n",
                ]
            ),
            x = inout(reg) end => _,
            h = inout(reg) taps.as_ptr() => _,
            n = inout(reg) taps.len() / 2 => _,
            t = out(reg) _,
            s = out(reg) _,
            a = inout(reg) acc,
            options(nostack, readonly),
        );
    }
    let [acc] = add_odd_tap([acc], taps, xs, reversed_sum_i32);
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
    let (taps, xs, end) = matched(taps, xs);
    let (mut lo, mut hi) = split64(acc);
    // SAFETY: as in `dot_reversed_q15_i32`: the same pointers, steps and step count, so the
    // same elements are read; only the accumulate instruction differs.
    unsafe {
        asm!(
            unit_loop!(
                8,
                [
                    q15_one_step!("smlaldx {lo}, {hi}, {t}, {s}"),
                    q15_one_step!("smlaldx {lo}, {hi}, {t}, {s}"),
                    q15_one_step!("smlaldx {lo}, {hi}, {t}, {s}"),
                    q15_one_step!("smlaldx {lo}, {hi}, {t}, {s}"),
                    q15_one_step!("smlaldx {lo}, {hi}, {t}, {s}"),
                    q15_one_step!("smlaldx {lo}, {hi}, {t}, {s}"),
                    q15_one_step!("smlaldx {lo}, {hi}, {t}, {s}"),
                    q15_one_step!("smlaldx {lo}, {hi}, {t}, {s}"),
                ],
                [
                    "4:\n",
                    q15_one_step!("smlaldx {lo}, {hi}, {t}, {s}"),
                    "subs {n}, {n}, #1\n",
                    "bne 4b\n",
                ]
            ),
            x = inout(reg) end => _,
            h = inout(reg) taps.as_ptr() => _,
            n = inout(reg) taps.len() / 2 => _,
            t = out(reg) _,
            s = out(reg) _,
            lo = inout(reg) lo,
            hi = inout(reg) hi,
            options(nostack, readonly),
        );
    }
    let [acc] = add_odd_tap([join64(lo, hi)], taps, xs, portable_q15);
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
    let (taps, _, end) = matched(taps, xs);
    let (mut lo, mut hi) = split64(acc);
    // SAFETY: `end` is one past the last sample. A two-tap step reads 2 taps (`ldrd` with
    // post-increment) and, pre-decrementing by 2 elements, the 2 samples below the sample
    // pointer; the one-tap step of the remainder reads 1 of each the same way. Every tap is
    // taken once, so the steps read taps[..len] and xs[..len], inside both. `i32` slices are
    // 4-byte aligned, which `ldrd` needs on Armv7-M. Memory is only read; the stack is
    // untouched; the flags are clobbered; every register written is an operand.
    unsafe {
        asm!(
            unit_loop!(
                4,
                [q31_one_step!(), q31_one_step!()],
                [
                    "cmp {n}, #2\n",
                    "blt 4f\n",
                    q31_one_step!(),
                    "subs {n}, {n}, #2\n",
                    "beq 5f\n",
                    "4:\n",
                    "ldr {h0}, [{h}], #4\n",
                    "ldr {p}, [{x}, #-4]!\n",
                    "smlal {lo}, {hi}, {h0}, {p}\n",
                ]
            ),
            x = inout(reg) end => _,
            h = inout(reg) taps.as_ptr() => _,
            n = inout(reg) taps.len() => _,
            h0 = out(reg) _,
            h1 = out(reg) _,
            p = out(reg) _,
            q = out(reg) _,
            lo = inout(reg) lo,
            hi = inout(reg) hi,
            options(nostack, readonly),
        );
    }
    join64(lo, hi)
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
    let Some(newest) = window.get(len..len + 1).map(<[i32]>::as_ptr) else {
        return add_remaining([0; 2], taps, window, 0, portable_q31);
    };
    let (mut lo0, mut hi0, mut lo1, mut hi1) = (0u32, 0u32, 0u32, 0u32);
    // SAFETY: `newest` points at window[L] of L + 1 elements; the first load reads it. A
    // two-tap step reads 2 taps (`ldrd`, post-increment) and the 2 samples below the sample
    // pointer (`ldrd` with pre-decrement); the one-tap step of the remainder reads 1 of each
    // the same way. Every tap is taken once, so that is taps[..L] and window[..=L], inside
    // both slices. `i32` slices are 4-byte aligned, as `ldrd` needs. Memory is only read; the
    // stack is untouched; the flags are clobbered; every register written is an operand.
    unsafe {
        asm!(
            "ldr {c}, [{x}]",
            unit_loop!(
                4,
                [q31_two_step!("{p}", "{c}"), q31_two_step!("{c}", "{p}")],
                [
                    "cmp {n}, #2\n",
                    "blt 4f\n",
                    q31_two_step!("{p}", "{c}"),
                    "mov {c}, {p}\n",
                    "subs {n}, {n}, #2\n",
                    "beq 5f\n",
                    "4:\n",
                    "ldr {h0}, [{h}], #4\n",
                    "ldr {p}, [{x}, #-4]!\n",
                    "smlal {lo0}, {hi0}, {h0}, {p}\n",
                    "smlal {lo1}, {hi1}, {h0}, {c}\n",
                ]
            ),
            x = inout(reg) newest => _,
            h = inout(reg) taps.as_ptr() => _,
            n = inout(reg) len => _,
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
    [join64(lo0, hi0), join64(lo1, hi1)]
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
    let Some(newest) = window.get(len..len + 1).map(<[i16]>::as_ptr) else {
        return add_remaining([0; 2], taps, window, 0, portable_q15);
    };
    let (mut lo0, mut hi0, mut lo1, mut hi1) = (0u32, 0u32, 0u32, 0u32);
    // SAFETY: `newest` points at window[L] of L + 1 elements. Each pair step moves the
    // sample pointer back by 2 elements and reads 2 there (output 0) and 2 one element
    // higher (output 1), up to window[L] on the first step; it reads 2 taps and advances
    // the tap pointer by 2. There are ⌊L/2⌋ steps, so the lowest sample read is
    // window[L mod 2] and the highest tap taps[2·⌊L/2⌋ − 1] < taps[L]. `ldr` may be
    // unaligned (module doc). Memory is only read; the stack is untouched; the flags are
    // clobbered; every register written is an operand.
    unsafe {
        asm!(
            unit_loop!(
                4,
                [q15_two_step!(), q15_two_step!(), q15_two_step!(), q15_two_step!()],
                [
                    "cmp {n}, #2\n",
                    "blt 4f\n",
                    q15_two_step!(),
                    q15_two_step!(),
                    "subs {n}, {n}, #2\n",
                    "beq 5f\n",
                    "4:\n",
                    q15_two_step!(),
                ]
            ),
            x = inout(reg) newest => _,
            h = inout(reg) taps.as_ptr() => _,
            n = inout(reg) len / 2 => _,
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
    add_odd_tap(
        [join64(lo0, hi0), join64(lo1, hi1)],
        taps,
        window,
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
    let (taps, _, end) = matched(taps, xs);
    let mut sum = [acc];
    // SAFETY: `end` is one past the last sample. A four-tap step reads 4 taps (`vldmia` with
    // write-back) and the 4 samples below the sample pointer (`vldmdb`); a one-tap step of the
    // remainder reads 1 of each the same way. Every tap is taken once, so that is taps[..len]
    // and xs[..len], inside both. `f32` slices are 4-byte aligned, as `vldm` needs. The only
    // memory written is `sum`, a local `[f32; 1]` read first and stored last (s-registers
    // cannot be operands on this target, see `four_outputs_f32`); the stack is untouched; the
    // flags are clobbered; every register written is an operand or declared clobbered.
    unsafe {
        asm!(
            "vldr s0, [{sum}]",
            unit_loop!(
                8,
                [f32_one_step!(), f32_one_step!()],
                [
                    "cmp {n}, #4\n",
                    "blt 4f\n",
                    f32_one_step!(),
                    "subs {n}, {n}, #4\n",
                    "beq 5f\n",
                    "4:\n",
                    "vldmia {h}!, {{s8}}\n",
                    "vldmdb {x}!, {{s12}}\n",
                    "vmla.f32 s0, s8, s12\n",
                    "subs {n}, {n}, #1\n",
                    "bne 4b\n",
                ]
            ),
            "vstr s0, [{sum}]",
            x = inout(reg) end => _,
            h = inout(reg) taps.as_ptr() => _,
            n = inout(reg) taps.len() => _,
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
    let [acc] = sum;
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
