//! Host-side truth shared by the integration tests: a float64 reference of the convolution sum
//! written for clarity, and an exact integer (`i128`) model of every fixed-point path.
//!
//! Nothing here calls tapline's arithmetic; the models are written from the definitions so that
//! a mistake in the library cannot hide in the reference.
#![allow(dead_code)]

pub mod cases;

use fixed::types::extra::{LeEqU16, LeEqU32};
use fixed::{FixedI16, FixedI32};
use tapline::num::RuntimeChecked;
use tapline::{Error, Fir, MulAcc, Rounding, Sample};

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

/// Runs one fixed-point FIR every way the API offers — per sample, per block with the given
/// splits, in place, after `reset` — and checks each output and the saturation counter against
/// the exact model, bit for bit. Rejected tap sets must be exactly the ones whose worst-case
/// input overflows the accumulator.
///
/// `acc_bits` is the accumulator width `W` stands for (64 for `DefaultAcc`, 128 for `Acc128`).
/// Shared by the proptest properties and the fuzz targets, so both check the same things.
pub fn check_fixed_fir<S, T, W, const N: usize>(
    acc_bits: u32,
    h: &[i64],
    x: &[i64],
    sizes: &[usize],
    mode: Rounding,
) where
    S: MulAcc<T, W> + Raw + tapline::num::FixedPoint,
    T: Sample + Raw,
    W: RuntimeChecked,
{
    let taps: [T; N] = core::array::from_fn(|k| T::from_raw(h[k]));
    let xs: Vec<S> = x.iter().map(|&v| <S as Raw>::from_raw(v)).collect();

    let x_max = (1i64 << (<S as Raw>::BITS - 1)) - 1;
    let x_min = -x_max - 1;
    // The input that drives the sum to each extreme: every x[n−k] at the end of the range whose
    // product with h[k] is largest (resp. smallest).
    let worst_high: i128 = h
        .iter()
        .map(|&t| i128::from(t) * i128::from(if t > 0 { x_max } else { x_min }))
        .sum();
    let worst_low: i128 = h
        .iter()
        .map(|&t| i128::from(t) * i128::from(if t > 0 { x_min } else { x_max }))
        .sum();
    let acc_max = if acc_bits >= 128 {
        i128::MAX
    } else {
        (1i128 << (acc_bits - 1)) - 1
    };
    let overflows = worst_high > acc_max || worst_low < -acc_max - 1;

    let mut fir = match Fir::<S, N, T, W>::with_accumulator(&taps) {
        Ok(f) => {
            assert!(
                !overflows,
                "accepted taps whose worst case overflows i64: {h:?}"
            );
            f.with_rounding(mode)
        }
        Err(e) => {
            assert_eq!(e, Error::AccumulatorOverflow);
            assert!(
                overflows,
                "rejected taps whose worst case fits {acc_bits} bits: {h:?}"
            );
            return;
        }
    };

    let model: Vec<(i128, bool)> = fir_exact(h, x)
        .into_iter()
        .map(|acc| finish_exact(acc, T::FRAC, <S as Raw>::BITS, mode))
        .collect();
    let expected: Vec<S> = model
        .iter()
        .map(|&(v, _)| <S as Raw>::from_raw(v as i64))
        .collect();
    let expected_saturations = model.iter().filter(|&&(_, s)| s).count() as u32;

    let per_sample: Vec<S> = xs.iter().map(|&v| fir.push(v)).collect();
    assert_eq!(
        per_sample, expected,
        "push vs exact model, taps {h:?}, {mode:?}"
    );
    assert_eq!(fir.saturations(), expected_saturations);

    fir.reset();
    assert_eq!(fir.saturations(), 0);
    let mut blocked = vec![S::ZERO; xs.len()];
    let mut at = 0;
    for len in block_lengths(xs.len(), sizes) {
        fir.process(&xs[at..at + len], &mut blocked[at..at + len])
            .unwrap();
        at += len;
    }
    assert_eq!(blocked, expected, "process with splits {sizes:?}");
    assert_eq!(fir.clear_saturations(), expected_saturations);

    fir.reset();
    let mut in_place = xs.clone();
    let mut at = 0;
    for len in block_lengths(xs.len(), sizes) {
        fir.process_in_place(&mut in_place[at..at + len]);
        at += len;
    }
    assert_eq!(in_place, expected, "process_in_place with splits {sizes:?}");
    assert_eq!(fir.saturations(), expected_saturations);

    // The worst-case sequences themselves, fed after an arbitrary history: no wraparound.
    let worst: Vec<i64> = h
        .iter()
        .rev()
        .map(|&t| if t > 0 { x_max } else { x_min })
        .chain(h.iter().rev().map(|&t| if t > 0 { x_min } else { x_max }))
        .collect();
    let mut tail: Vec<i64> = x.to_vec();
    tail.extend(&worst);
    let model_tail = fir_exact(h, &tail);
    fir.reset();
    for (n, &v) in tail.iter().enumerate() {
        let y = fir.push(<S as Raw>::from_raw(v));
        let (want, _) = finish_exact(model_tail[n], T::FRAC, <S as Raw>::BITS, mode);
        assert_eq!(Raw::raw(y), want as i64, "worst-case input at {n}");
    }
}
