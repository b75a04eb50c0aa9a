//! Kernels: the dot products every filter and convolution is built from.
//!
//! Each kernel works on contiguous slices and stops at the shorter one, so its loop has no
//! modulo and no bounds checks. Accumulation order is fixed (ascending tap index), which is what
//! makes float results reproducible and block processing bit-identical to per-sample processing.
//!
//! [`portable`] holds the reference kernels, written for every target. Faster target-specific
//! kernels, when added, sit beside it with the same names and are tested bit-identical to it.

#[cfg(all(target_arch = "arm", any(tapline_arm_dsp, tapline_armv6m)))]
pub mod arm;
pub mod folding;
pub mod portable;

pub use portable::{dot, dot_block, dot_reversed};

pub use folding::FoldMulAcc;
pub use portable::{Fold, dot_folded, dot_reversed_strided};
