//! Kernels: the dot products every filter and convolution is built from.
//!
//! Each kernel works on contiguous slices and stops at the shorter one, so its loop has no
//! modulo and no bounds checks. Accumulation order is fixed (ascending tap index), which is what
//! makes float results reproducible and block processing bit-identical to per-sample processing.
//!
//! **Layer rule:** this is the one place that picks a kernel per target. [`Kernels`] (named in
//! `num` with its contract, a supertrait of [`MulAcc`](crate::MulAcc)) is implemented here,
//! in the private module `select`, once per sample/tap/accumulator combination: the portable
//! kernel, or under the cfgs `build.rs` sets from the target triple an assembly kernel of
//! `kernel::arm` (Armv7E-M: Q15, Q31, `f32`; Armv6-M: the proven Q15 block sum). Filters,
//! structures and [`convolve`](crate::convolve()) reach the kernels only through `Kernels`;
//! nothing else in the crate names a target kernel. The kernels depend on `num` alone.
//!
//! [`portable`] holds the reference kernels, written for every target; each target kernel is
//! tested bit-identical to its portable twin, so the choice changes speed, never a result.
//! The strided and folded sums have no target kernels and are called directly.

#[cfg(all(target_arch = "arm", any(tapline_arm_dsp, tapline_armv6m)))]
pub mod arm;
pub mod folding;
pub mod portable;
mod select;

pub use portable::{dot, dot_block, dot_reversed};

pub use crate::num::Kernels;
pub use folding::FoldMulAcc;
pub use portable::{Fold, dot_folded, dot_reversed_strided};
