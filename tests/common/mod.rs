//! Host-side truth shared by the integration tests: a float64 reference of the convolution sum
//! written for clarity, and an exact integer (`i128`) model of every fixed-point path.
//!
//! Nothing here calls tapline's arithmetic; the models are written from the definitions so that
//! a mistake in the library cannot hide in the reference.
#![allow(dead_code)]

use fixed::types::extra::{LeEqU16, LeEqU32};
use fixed::{FixedI16, FixedI32};
use tapline::Rounding;

/// y[n] = Σ_{k=0}^{N−1} h[k]·x[n−k] with x[m] = 0 for m < 0: the output of an FIR filter with
/// zero initial history, one output per input, summed in f64 in ascending k.
pub fn fir_f64(h: &[f64], x: &[f64]) -> Vec<f64> {
    (0..x.len())
        .map(|n| {
            let mut sum = 0.0;
            for (k, &hk) in h.iter().enumerate() {
                if k <= n {
                    sum += hk * x[n - k];
                }
            }
            sum
        })
        .collect()
}

/// The full linear convolution of two sequences, length L + K − 1, in f64, ascending k.
pub fn convolve_full_f64(x: &[f64], h: &[f64]) -> Vec<f64> {
    let len = x.len() + h.len() - 1;
    (0..len)
        .map(|n| {
            let mut sum = 0.0;
            for (k, &hk) in h.iter().enumerate() {
                if k <= n && n - k < x.len() {
                    sum += hk * x[n - k];
                }
            }
            sum
        })
        .collect()
}

/// For every output of [`fir_f64`]: Σ|h[k]|·|x[n−k]|, the scale of the summation error.
pub fn fir_abs_f64(h: &[f64], x: &[f64]) -> Vec<f64> {
    let ah: Vec<f64> = h.iter().map(|v| v.abs()).collect();
    let ax: Vec<f64> = x.iter().map(|v| v.abs()).collect();
    fir_f64(&ah, &ax)
}

/// γ_n = n·u/(1 − n·u): the worst-case relative error of an n-term sum of products computed in
/// a precision with unit roundoff u (N. J. Higham, *Accuracy and Stability of Numerical
/// Algorithms*, 2nd ed., 2002, §3.1; from memory).
pub fn gamma(n: usize, unit_roundoff: f64) -> f64 {
    let nu = n as f64 * unit_roundoff;
    nu / (1.0 - nu)
}

/// Unit roundoff of f32 and f64 (IEEE 754 binary32/binary64, round to nearest): 2^−24, 2^−53.
pub const U_F32: f64 = 1.0 / 16_777_216.0;
pub const U_F64: f64 = f64::EPSILON / 2.0;

/// The exact sums Σ h[k]·x[n−k] of an FIR with zero initial history, one per input.
pub fn fir_exact(h: &[i64], x: &[i64]) -> Vec<i128> {
    (0..x.len())
        .map(|n| {
            (0..h.len())
                .filter(|&k| k <= n)
                .map(|k| i128::from(h[k]) * i128::from(x[n - k]))
                .sum()
        })
        .collect()
}

/// The exact full convolution of two integer sequences.
pub fn convolve_full_exact(x: &[i64], h: &[i64]) -> Vec<i128> {
    let len = x.len() + h.len() - 1;
    (0..len)
        .map(|n| {
            (0..h.len())
                .filter(|&k| k <= n && n - k < x.len())
                .map(|k| i128::from(h[k]) * i128::from(x[n - k]))
                .sum()
        })
        .collect()
}

/// acc / 2^frac rounded by `mode`, by floor division and remainder (not by shifts).
pub fn round_exact(acc: i128, frac: u32, mode: Rounding) -> i128 {
    let d = 1i128 << frac;
    let q = acc.div_euclid(d);
    let r = acc.rem_euclid(d); // 0 ≤ r < d, acc = q·d + r
    match mode {
        Rounding::Truncate => q,
        Rounding::HalfUp => {
            if 2 * r >= d && frac > 0 {
                q + 1
            } else {
                q
            }
        }
        Rounding::HalfEven => {
            if 2 * r > d || (2 * r == d && frac > 0 && q % 2 != 0) {
                q + 1
            } else {
                q
            }
        }
        _ => unreachable!("a rounding mode the model does not know"),
    }
}

/// Clamps `v` to a `bits`-bit two's-complement range; the flag says whether it had to.
pub fn saturate(v: i128, bits: u32) -> (i128, bool) {
    let max = (1i128 << (bits - 1)) - 1;
    let min = -max - 1;
    let c = v.clamp(min, max);
    (c, c != v)
}

/// The exact model of a fixed-point output: the exact sum, one rounding step, saturation.
pub fn finish_exact(acc: i128, tap_frac: u32, sample_bits: u32, mode: Rounding) -> (i128, bool) {
    saturate(round_exact(acc, tap_frac, mode), sample_bits)
}

/// Raw two's-complement access to the fixed-point types under test, written here (not taken from
/// tapline) so the model does not depend on the code it checks.
pub trait Raw: Copy + PartialEq + std::fmt::Debug {
    const BITS: u32;
    const FRAC: u32;
    fn raw(self) -> i64;
    fn from_raw(raw: i64) -> Self;
}

impl Raw for i16 {
    const BITS: u32 = 16;
    const FRAC: u32 = 15;
    fn raw(self) -> i64 {
        self.into()
    }
    fn from_raw(raw: i64) -> Self {
        i16::try_from(raw).expect("raw value in range")
    }
}

impl Raw for i32 {
    const BITS: u32 = 32;
    const FRAC: u32 = 31;
    fn raw(self) -> i64 {
        self.into()
    }
    fn from_raw(raw: i64) -> Self {
        i32::try_from(raw).expect("raw value in range")
    }
}

impl<F: LeEqU16> Raw for FixedI16<F> {
    const BITS: u32 = 16;
    const FRAC: u32 = F::U32;
    fn raw(self) -> i64 {
        self.to_bits().into()
    }
    fn from_raw(raw: i64) -> Self {
        Self::from_bits(i16::try_from(raw).expect("raw value in range"))
    }
}

impl<F: LeEqU32> Raw for FixedI32<F> {
    const BITS: u32 = 32;
    const FRAC: u32 = F::U32;
    fn raw(self) -> i64 {
        self.to_bits().into()
    }
    fn from_raw(raw: i64) -> Self {
        Self::from_bits(i32::try_from(raw).expect("raw value in range"))
    }
}

/// Cuts `len` items into consecutive block lengths taken cyclically from `sizes` (zeros skipped
/// as empty blocks, which must also work).
pub fn block_lengths(len: usize, sizes: &[usize]) -> Vec<usize> {
    let mut out = Vec::new();
    let mut left = len;
    let mut i = 0;
    while left > 0 {
        let s = sizes
            .get(i % sizes.len().max(1))
            .copied()
            .unwrap_or(1)
            .min(left);
        out.push(s);
        left -= s;
        i += 1;
        if i > 10 * len + 10 {
            out.push(left);
            break;
        }
    }
    out
}

/// Calls `$body` with the const `N` equal to `$len`, for the tap counts the tests cover.
#[macro_export]
macro_rules! with_tap_count {
    ($len:expr, |$n:ident| $body:expr) => {
        match $len {
            1 => {
                const $n: usize = 1;
                $body
            }
            2 => {
                const $n: usize = 2;
                $body
            }
            3 => {
                const $n: usize = 3;
                $body
            }
            4 => {
                const $n: usize = 4;
                $body
            }
            5 => {
                const $n: usize = 5;
                $body
            }
            7 => {
                const $n: usize = 7;
                $body
            }
            8 => {
                const $n: usize = 8;
                $body
            }
            13 => {
                const $n: usize = 13;
                $body
            }
            16 => {
                const $n: usize = 16;
                $body
            }
            31 => {
                const $n: usize = 31;
                $body
            }
            64 => {
                const $n: usize = 64;
                $body
            }
            other => panic!("tap count {other} not instantiated"),
        }
    };
}

/// The tap counts [`with_tap_count!`] instantiates.
pub const TAP_COUNTS: [usize; 11] = [1, 2, 3, 4, 5, 7, 8, 13, 16, 31, 64];
