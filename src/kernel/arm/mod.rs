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

/// `acc + Σ_k taps[k]·xs[len − 1 − k]` term by term with `mul_acc`, in ascending k: the plain
/// loop for the taps an assembly loop leaves over. The kernels pass the per-term arithmetic of
/// their portable twin (`MulAcc::mul_acc`), so the remainder is summed exactly as there; a
/// plain fold keeps the per-output cost small where no taps are left.
#[inline(always)]
fn plain_sum<T: Copy, X: Copy, A>(
    acc: A,
    taps: &[T],
    xs: &[X],
    mul_acc: impl Fn(A, T, X) -> A,
) -> A {
    taps.iter()
        .zip(xs.iter().rev())
        .fold(acc, |acc, (&h, &x)| mul_acc(acc, h, x))
}

/// Q15 in a 32-bit sum wrapping modulo 2^32 (the proven accumulator's `mul_acc`, which needs a
/// proof type to be named).
#[inline(always)]
fn reversed_sum_i32(acc: i32, taps: &[i16], xs: &[i16]) -> i32 {
    plain_sum(acc, taps, xs, |acc: i32, h: i16, x: i16| {
        acc.wrapping_add(i32::from(h) * i32::from(x))
    })
}

/// Adds the taps an assembly loop did not take, `taps[done..]`, to each of its K sums: output
/// m (summing over `window`, `taps.len() + m` samples or more) reads
/// `window[L − 1 + m − k]` for tap k, i.e. `window[..L + m − done]` backward, with `sum` the
/// plain sum for that type. With `done` = 0 this is the whole sum.
#[inline(always)]
fn add_remaining<T, X, A: Copy, const K: usize>(
    mut sums: [A; K],
    taps: &[T],
    window: &[X],
    done: usize,
    sum: impl Fn(A, &[T], &[X]) -> A,
) -> [A; K] {
    let len = taps.len();
    let taps_left = taps.get(done..).unwrap_or(&[]);
    for (m, acc) in sums.iter_mut().enumerate() {
        let xs = window.get(..(len + m).saturating_sub(done)).unwrap_or(&[]);
        *acc = sum(*acc, taps_left, xs);
    }
    sums
}

/// Adds the last tap of an odd length, k = L − 1, to each of the K sums of a Q15 kernel whose
/// assembly took the taps in pairs: output m takes it against `window[m]`
/// (`window[L − 1 + m − k]`). Nothing for an even length.
#[cfg(tapline_arm_dsp)]
#[inline(always)]
fn add_odd_tap<T: Copy, X: Copy, A: Copy, const K: usize>(
    mut sums: [A; K],
    taps: &[T],
    window: &[X],
    sum: impl Fn(A, &[T], &[X]) -> A,
) -> [A; K] {
    if taps.len() % 2 == 1 {
        let last = taps.get(taps.len() - 1..).unwrap_or(&[]);
        for (m, acc) in sums.iter_mut().enumerate() {
            *acc = sum(*acc, last, window.get(m..=m).unwrap_or(&[]));
        }
    }
    sums
}
