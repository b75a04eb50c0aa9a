//! Armv6-M (Cortex-M0, M0+): 16-bit Thumb, one 32 × 32 → 32-bit multiply (`MULS`), no
//! multiply-accumulate, no unaligned loads, and eight low registers for most instructions.
//!
//! **The floor.** Each tap of each output needs at least a `MULS` and an add, and each tap and
//! each sample a half-word load and a sign extension (`LDRSH` has no immediate-offset form).
//! With two outputs per pass every loaded tap serves two outputs and every loaded sample two
//! taps, so the loop below spends 9 instructions per tap for two outputs (4.5 per tap and
//! output) plus 4 per pass of 8 taps; the taps left over (fewer than 8) take 14 each. More
//! outputs per pass would need more low registers than the six that `asm!` may use (r6 and r7
//! are reserved), so this is as low as it goes here;
//! the output step (rounding, saturation, store) comes on top.

use super::{add_remaining, reversed_sum_i32};
use crate::kernel::portable::{groups_of, singles};
use core::arch::asm;

/// The block sum of Q15 samples with Q15 taps in a 32-bit accumulator (the proven path): for
/// every `i` with `i + taps.len() ≤ span.len()`, in ascending `i`, calls
/// `emit(Σ_k taps[k]·span[i + L − 1 − k])` (L = `taps.len()`), the sum wrapping modulo 2^32.
///
/// **Numerics:** bit-identical to [`dot_block`](crate::kernel::dot_block) with the proven
/// 32-bit accumulator ([`Acc32`](crate::num::Acc32)), whose sums wrap the same way.
/// **Cost:** two outputs per pass over the taps, 9 instructions per tap and pair of outputs.
#[inline]
pub fn dot_block_q15_i32(taps: &[i16], span: &[i16], mut emit: impl FnMut(i32)) {
    let rest = groups_of::<_, _, 2>(taps.len(), span, |w| two_outputs(taps, w), &mut emit);
    singles(taps.len(), rest, |w| reversed_sum_i32(0, taps, w), emit);
}

/// Outputs 0 and 1 over `window` (L + 1 samples): Σ_k taps\[k\]·window\[L − 1 + m − k\].
///
/// Every tap is taken by the assembly, the whole passes of 8 in the loop and the rest one at a
/// time after it, so a tap count known only at run time runs the same instructions as one
/// known when compiling.
#[inline(always)]
fn two_outputs(taps: &[i16], window: &[i16]) -> [i32; 2] {
    let len = taps.len();
    let Some(newest) = window.get(len..len + 1).map(<[i16]>::as_ptr) else {
        return add_remaining([0; 2], taps, window, 0, reversed_sum_i32);
    };
    let mut sums = [0i32; 2];
    // SAFETY: `newest` points at window[L] and the window has L + 1 elements. The sample
    // pointer starts 16 bytes below it (only an address: nothing is read through it before a
    // whole pass is known to exist), so the first load (offset 16) reads window[L]. A pass reads
    // the 8 samples at offsets 0..=14 bytes from the sample pointer and the 8 taps at offsets
    // 0..=14 from the tap pointer, then moves the sample pointer back and the tap pointer
    // forward by 8 elements, while the tap pointer is below taps[8·⌊L/8⌋]. So the passes read
    // taps[..8·⌊L/8⌋] and window[L − 8·⌊L/8⌋ ..= L]. The remainder then points at
    // window[L − 1 − 8·⌊L/8⌋] and reads one tap and one sample per step, moving forward and
    // back by one element, until the tap pointer reaches taps[L]: taps[8·⌊L/8⌋..L] and
    // window[0 ..= L − 1 − 8·⌊L/8⌋]. All inside both slices. Half-word loads need 2-byte
    // alignment, which `i16` slices have. The only memory written is `sums`, a local
    // `[i32; 2]`, at the end. The stack is untouched; the flags are clobbered; every register
    // written is an operand or a declared clobber (fixed low registers r0–r5, because Thumb-1
    // `ldrh`, `sxth` and `muls` take only those).
    unsafe {
        asm!(
            // r8 and r10 hold the two sums, r12 the end of the whole passes and r9 the end of
            // the taps: Thumb-1 code can only name high registers as clobbers, so they are set
            // up and read out here, through the result pointer (saved in r11).
            "mov r11, r2",
            "lsls r2, r3, #1",
            "adds r2, r0, r2",
            "mov r9, r2",
            "lsrs r3, r3, #3",
            "lsls r3, r3, #4",
            "adds r3, r0, r3",
            "mov r12, r3",
            "movs r3, #0",
            "mov r8, r3",
            "mov r10, r3",
            "subs r1, #16",
            "ldrh r5, [r1, #16]",
            "sxth r5, r5",
            "cmp r0, r12",
            "beq 3f",
            "2:",
            "ldrh r2, [r0, #0]",
            "sxth r2, r2",
            "ldrh r4, [r1, #14]",
            "sxth r4, r4",
            "mov r3, r2",
            "muls r3, r4, r3",
            "add r8, r3",
            "muls r2, r5, r2",
            "add r10, r2",
            "ldrh r2, [r0, #2]",
            "sxth r2, r2",
            "ldrh r5, [r1, #12]",
            "sxth r5, r5",
            "mov r3, r2",
            "muls r3, r5, r3",
            "add r8, r3",
            "muls r2, r4, r2",
            "add r10, r2",
            "ldrh r2, [r0, #4]",
            "sxth r2, r2",
            "ldrh r4, [r1, #10]",
            "sxth r4, r4",
            "mov r3, r2",
            "muls r3, r4, r3",
            "add r8, r3",
            "muls r2, r5, r2",
            "add r10, r2",
            "ldrh r2, [r0, #6]",
            "sxth r2, r2",
            "ldrh r5, [r1, #8]",
            "sxth r5, r5",
            "mov r3, r2",
            "muls r3, r5, r3",
            "add r8, r3",
            "muls r2, r4, r2",
            "add r10, r2",
            "ldrh r2, [r0, #8]",
            "sxth r2, r2",
            "ldrh r4, [r1, #6]",
            "sxth r4, r4",
            "mov r3, r2",
            "muls r3, r4, r3",
            "add r8, r3",
            "muls r2, r5, r2",
            "add r10, r2",
            "ldrh r2, [r0, #10]",
            "sxth r2, r2",
            "ldrh r5, [r1, #4]",
            "sxth r5, r5",
            "mov r3, r2",
            "muls r3, r5, r3",
            "add r8, r3",
            "muls r2, r4, r2",
            "add r10, r2",
            "ldrh r2, [r0, #12]",
            "sxth r2, r2",
            "ldrh r4, [r1, #2]",
            "sxth r4, r4",
            "mov r3, r2",
            "muls r3, r4, r3",
            "add r8, r3",
            "muls r2, r5, r2",
            "add r10, r2",
            "ldrh r2, [r0, #14]",
            "sxth r2, r2",
            "ldrh r5, [r1, #0]",
            "sxth r5, r5",
            "mov r3, r2",
            "muls r3, r5, r3",
            "add r8, r3",
            "muls r2, r4, r2",
            "add r10, r2",
            "adds r0, #16",
            "subs r1, #16",
            "cmp r0, r12",
            "bne 2b",
            // The taps left over, one at a time: tap k against window[L − 1 − k] (output 0)
            // and the carried window[L − k] (output 1).
            "3:",
            "adds r1, #14",
            "cmp r0, r9",
            "beq 5f",
            "4:",
            "ldrh r2, [r0, #0]",
            "sxth r2, r2",
            "ldrh r4, [r1, #0]",
            "sxth r4, r4",
            "mov r3, r2",
            "muls r3, r4, r3",
            "add r8, r3",
            "muls r2, r5, r2",
            "add r10, r2",
            "mov r5, r4",
            "adds r0, #2",
            "subs r1, #2",
            "cmp r0, r9",
            "bne 4b",
            "5:",
            "mov r2, r11",
            "mov r3, r8",
            "str r3, [r2]",
            "mov r3, r10",
            "str r3, [r2, #4]",
            inout("r0") taps.as_ptr() => _,
            inout("r1") newest => _,
            inout("r2") sums.as_mut_ptr() => _,
            inout("r3") len => _,
            out("r4") _,
            out("r5") _,
            out("r8") _,
            out("r9") _,
            out("r10") _,
            out("r11") _,
            out("r12") _,
            options(nostack),
        );
    }
    sums
}
