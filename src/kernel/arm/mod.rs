//! The only `unsafe` in the crate: inline-assembly kernels for Arm Cortex-M cores. Each has a
//! safe portable twin in [`kernel`](super) that it is tested bit-identical against: on the host
//! the twins are tested against the exact integer model, and on the emulated boards
//! (`examples/qemu`, bin `check`, in CI) every kernel here runs beside its twin on the same
//! data, including full-scale and wrapping sums and f32 NaN/∞. Every `unsafe` block carries a
//! `// SAFETY:` argument for the memory it reads and writes.
//!
//! Why assembly: the compiler does not keep several outputs' sums and the samples in registers
//! on its own, and does not pair 16-bit samples for the dual multiply-accumulate; it spilled to
//! the stack at about 3.6 instructions per tap (Cortex-M4F, Q15) where these loops take 0.94.
//!
//! * `dsp`, re-exported here on `thumbv7em-*`: Q15, Q31 and `f32` kernels for Armv7E-M.
//! * `v6m`, re-exported here on `thumbv6m-*`: the Q15 block kernel for Armv6-M.
#![allow(unsafe_code)]

#[cfg(tapline_arm_dsp)]
pub mod dsp;
#[cfg(tapline_arm_dsp)]
pub use dsp::*;

#[cfg(tapline_armv6m)]
pub mod v6m;
#[cfg(tapline_armv6m)]
pub use v6m::*;
