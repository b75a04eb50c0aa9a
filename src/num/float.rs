//! Floating-point samples. No rounding modes and no saturation: IEEE 754 arithmetic, summed in
//! tap order, without fused multiply-add, so results are the same on every target.

use super::{MulAcc, Rounding, Sample, sealed::Sealed};

impl Sealed for f32 {}
impl Sealed for f64 {}

impl Sample for f32 {
    const ZERO: Self = 0.0;
    #[inline]
    fn to_f64(self) -> f64 {
        f64::from(self)
    }
}

impl Sample for f64 {
    const ZERO: Self = 0.0;
    #[inline]
    fn to_f64(self) -> f64 {
        self
    }
}

/// `f32` samples, `f32` taps, `f32` accumulator: the embedded float path (one FPU MAC per tap on
/// a Cortex-M4F). **Accuracy:** |y − Σhx| ≤ γ_N·Σ|h||x| with γ_N = N·u/(1 − N·u), u = 2^−24
/// (N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., 2002, §3.1).
impl MulAcc<f32> for f32 {
    type Acc = f32;
    const ACC_ZERO: f32 = 0.0;
    #[inline(always)]
    fn mul_acc(acc: f32, tap: f32, x: f32) -> f32 {
        acc + tap * x
    }
    #[inline(always)]
    fn finish(acc: f32, _: Rounding) -> (f32, bool) {
        (acc, false)
    }
    fn accumulator_fits(_: &[f32]) -> bool {
        true
    }
}

/// `f32` samples with `f64` taps accumulate in `f64` and round once to `f32` at the output: the
/// host-side variant whose error is dominated by that final rounding (½ ulp of `f32`) for
/// moderate N.
impl MulAcc<f64> for f32 {
    type Acc = f64;
    const ACC_ZERO: f64 = 0.0;
    #[inline(always)]
    fn mul_acc(acc: f64, tap: f64, x: f32) -> f64 {
        acc + tap * f64::from(x)
    }
    #[inline(always)]
    fn finish(acc: f64, _: Rounding) -> (f32, bool) {
        (acc as f32, false)
    }
    fn accumulator_fits(_: &[f64]) -> bool {
        true
    }
}

/// `f64` throughout: the host reference precision, u = 2^−53 in the bound above.
impl MulAcc<f64> for f64 {
    type Acc = f64;
    const ACC_ZERO: f64 = 0.0;
    #[inline(always)]
    fn mul_acc(acc: f64, tap: f64, x: f64) -> f64 {
        acc + tap * x
    }
    #[inline(always)]
    fn finish(acc: f64, _: Rounding) -> (f64, bool) {
        (acc, false)
    }
    fn accumulator_fits(_: &[f64]) -> bool {
        true
    }
}
