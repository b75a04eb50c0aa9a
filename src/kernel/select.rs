//! The one place that picks a kernel per target: one impl of [`Kernels`] per sample, tap and
//! accumulator combination of [`MulAcc`], choosing between the portable loops of
//! [`portable`](super::portable) and the assembly of `kernel::arm` under the cfgs `build.rs`
//! sets from the target triple (`tapline_arm_dsp`, `tapline_arm_fpu`, `tapline_armv6m`).
//!
//! Every assembly kernel chosen here is bit-identical to the portable twin it replaces (on the
//! host the twins are tested against the exact model; on the emulated boards, `examples/qemu`
//! bin `check`, each kernel runs beside its twin), so the choice changes speed, never a result.
//! A target or combination without an entry below fails to compile rather than run a guess.
//!
//! Everything is `#[inline(always)]`, as the hooks on `MulAcc` were before they moved here:
//! the block driver and the output step must inline into the caller for the measured costs of
//! `examples/qemu/COSTS.md`.

#[cfg(all(target_arch = "arm", any(tapline_arm_dsp, tapline_armv6m)))]
use super::arm;
use super::portable;
use crate::num::{Acc32, Acc32Checked, Acc128, DefaultAcc, Kernels, MulAcc, Rounding};
use fixed::types::extra::{LeEqU16, LeEqU32};
use fixed::{FixedI16, FixedI32};

/// The portable kernels for combinations that have no target kernel.
macro_rules! portable_kernels {
    ($( [$($gen:tt)*] $s:ty => $t:ty, $w:ty; )*) => {$(
        impl<$($gen)*> Kernels<$t, $w> for $s {
            #[inline(always)]
            fn dot_block(taps: &[$t], span: &[Self], emit: impl FnMut(<Self as MulAcc<$t, $w>>::Acc))
            where
                Self: MulAcc<$t, $w>,
            {
                portable::dot_block::<Self, $t, $w>(taps, span, emit);
            }

            #[inline(always)]
            fn dot_reversed(
                acc: <Self as MulAcc<$t, $w>>::Acc,
                taps: &[$t],
                xs: &[Self],
            ) -> <Self as MulAcc<$t, $w>>::Acc
            where
                Self: MulAcc<$t, $w>,
            {
                portable::dot_reversed::<Self, $t, $w>(acc, taps, xs)
            }
        }
    )*};
}

portable_kernels! {
    [Fs: LeEqU16, Ft: LeEqU16] FixedI16<Fs> => FixedI16<Ft>, DefaultAcc;
    [Fs: LeEqU32, Ft: LeEqU32] FixedI32<Fs> => FixedI32<Ft>, DefaultAcc;
    [] i32 => i32, Acc128;
    [Fs: LeEqU32, Ft: LeEqU32] FixedI32<Fs> => FixedI32<Ft>, Acc128;
    [P, Fs: LeEqU16] FixedI16<Fs> => i16, Acc32<P>;
    [Fs: LeEqU16] FixedI16<Fs> => i16, Acc32Checked;
    [] f32 => f64, DefaultAcc;
    [] f64 => f64, DefaultAcc;
}

/// Combinations with target kernels: `$block` and `$reversed` name the kernel functions of
/// `kernel::arm` and the cfg under which each is used; elsewhere the portable one runs. The
/// where clause on `$acc` lets the impl name the accumulator type the assembly works in.
macro_rules! chosen_kernels {
    ($( [$($gen:tt)*] $s:ty => $t:ty, $w:ty, $acc:ty;
        block: $block:ident if ($($block_cfg:tt)*);
        reversed: $reversed:ident if ($($reversed_cfg:tt)*);
        $(finished: $finished:ident if ($($finished_cfg:tt)*);)? )*) => {$(
        impl<$($gen)*> Kernels<$t, $w> for $s
        where
            $s: MulAcc<$t, $w, Acc = $acc>,
        {
            #[inline(always)]
            fn dot_block(taps: &[$t], span: &[Self], emit: impl FnMut($acc)) {
                #[cfg(all(target_arch = "arm", $($block_cfg)*))]
                arm::$block(taps, span, emit);
                #[cfg(not(all(target_arch = "arm", $($block_cfg)*)))]
                portable::dot_block::<Self, $t, $w>(taps, span, emit);
            }

            #[inline(always)]
            fn dot_reversed(acc: $acc, taps: &[$t], xs: &[Self]) -> $acc {
                #[cfg(all(target_arch = "arm", $($reversed_cfg)*))]
                let sum = arm::$reversed(acc, taps, xs);
                #[cfg(not(all(target_arch = "arm", $($reversed_cfg)*)))]
                let sum = portable::dot_reversed::<Self, $t, $w>(acc, taps, xs);
                sum
            }

            $(
            #[inline(always)]
            fn dot_block_fused(
                taps: &[$t],
                span: &[Self],
                rounding: Rounding,
                out: &mut [Self],
            ) -> Option<u32> {
                #[cfg(all(target_arch = "arm", $($finished_cfg)*))]
                let fused = Some(arm::$finished(taps, span, rounding, out));
                #[cfg(not(all(target_arch = "arm", $($finished_cfg)*)))]
                let fused = {
                    let _ = (taps, span, rounding, out);
                    None
                };
                fused
            }
            )?
        }
    )*};
}

chosen_kernels! {
    // Q15, 64-bit sum: SMLALDX on Armv7E-M.
    [] i16 => i16, DefaultAcc, i64;
        block: dot_block_q15_i64 if (tapline_arm_dsp);
        reversed: dot_reversed_q15_i64 if (tapline_arm_dsp);
    // Q31, 64-bit sum: SMLAL on Armv7E-M.
    [] i32 => i32, DefaultAcc, i64;
        block: dot_block_q31_i64 if (tapline_arm_dsp);
        reversed: dot_reversed_q31_i64 if (tapline_arm_dsp);
    // Q15 with the proven 32-bit sum: SMLADX on Armv7E-M, two outputs per pass with MULS on
    // Armv6-M (which has no single-output kernel: the portable sum is as fast there).
    [P] i16 => i16, Acc32<P>, i32;
        block: dot_block_q15_i32 if (any(tapline_arm_dsp, tapline_armv6m));
        reversed: dot_reversed_q15_i32 if (tapline_arm_dsp);
        finished: dot_block_q15_i32_finished if (tapline_arm_dsp);
    // The same 32-bit sum for taps checked at run time: the same kernels.
    [] i16 => i16, Acc32Checked, i32;
        block: dot_block_q15_i32 if (any(tapline_arm_dsp, tapline_armv6m));
        reversed: dot_reversed_q15_i32 if (tapline_arm_dsp);
        finished: dot_block_q15_i32_finished if (tapline_arm_dsp);
    // f32 on the Cortex-M4F/M7 FPU: VLDM + VMLA.F32.
    [] f32 => f32, DefaultAcc, f32;
        block: dot_block_f32 if (tapline_arm_fpu);
        reversed: dot_reversed_f32 if (tapline_arm_fpu);
}
