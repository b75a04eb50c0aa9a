//! Exact models of the filter structures, written from their definitions in `i128`/`f64` and
//! built on the FIR model in `common` — never calling tapline's arithmetic — plus the
//! strategies and measurements the structure tests share. All test data is invented.
#![allow(dead_code)]

use crate::common::*;
use proptest::prelude::*;
use tapline::Rounding;

/// Raw codes of a `bits`-wide format, the extremes and zero over-represented (saturation, the
/// −1·−1 product and zero runs occur often).
pub fn code(bits: u32) -> impl Strategy<Value = i64> {
    let max = (1i64 << (bits - 1)) - 1;
    let min = -max - 1;
    prop_oneof![1 => Just(min), 1 => Just(max), 1 => Just(0i64), 5 => min..=max]
}

/// `len` codes of a `bits`-wide format shifted right by 0..=10 bits (random scale).
pub fn scaled_codes(bits: u32, len: usize) -> impl Strategy<Value = Vec<i64>> {
    (prop::collection::vec(code(bits), len), 0u32..=10)
        .prop_map(|(v, s)| v.into_iter().map(|h| h >> s).collect())
}

pub fn signal(bits: u32) -> impl Strategy<Value = Vec<i64>> {
    prop::collection::vec(code(bits), 0..160)
}

pub fn splits() -> impl Strategy<Value = Vec<usize>> {
    prop::collection::vec(0usize..=23, 1..6)
}

pub fn any_rounding() -> impl Strategy<Value = Rounding> {
    prop::sample::select(Rounding::ALL.to_vec())
}

/// The outputs a decimator by `m` keeps from the full-rate ones: those at n = m−1, 2m−1, …
pub fn keep_every<T: Clone>(full: &[T], m: usize) -> Vec<T> {
    full.iter().skip(m - 1).step_by(m).cloned().collect()
}

/// `x` with `l − 1` zeros after each sample.
pub fn zero_stuff(x: &[i64], l: usize) -> Vec<i64> {
    x.iter()
        .flat_map(|&v| std::iter::once(v).chain(std::iter::repeat_n(0, l - 1)))
        .collect()
}

/// Exact model of a rational resampler by `l`/`m`, from its definition: zero-stuff `x` by `l`,
/// convolve fully with `h` in `i128`, keep up-sampled indices 0, m, 2m, … (y[j] = Σ h[k]·u[jm − k],
/// the outputs of `scipy.signal.upfirdn(h, x, l, m)`) below `l·x.len()` — those a stream of
/// `x.len()` inputs has produced — then one rounding (÷2^frac) and saturation to `bits` each.
pub fn resample_finished(
    h: &[i64],
    x: &[i64],
    l: usize,
    m: usize,
    frac: u32,
    bits: u32,
    mode: Rounding,
) -> Vec<(i128, bool)> {
    let u = zero_stuff(x, l);
    if u.is_empty() {
        return Vec::new();
    }
    let full = convolve_full_exact(&u, h);
    full[..u.len()]
        .iter()
        .step_by(m)
        .map(|&acc| finish_exact(acc, frac, bits, mode))
        .collect()
}

/// Exact model of a whole finite signal through `scipy.signal.upfirdn(h, x, l, m)`, written
/// from its definition, with a start phase: the up-sampled indices i = phase, phase + m, …
/// below (n − 1)·l + K (where the full convolution of the zero-stuffed x, without its trailing
/// zeros, ends; for n = 0, below K − l), each y = Σ_k h[k]·u[i − k] in `i128` with u[t·l] =
/// x[t] and zero elsewhere, then one rounding (÷2^frac) and saturation to `bits`. A
/// decimator from start phase p is (l, m, phase) = (1, M, p), an interpolator (L, 1, 0), a
/// resampler (L, M, 0).
pub fn upfirdn_finished(
    h: &[i64],
    x: &[i64],
    (l, m, phase): (usize, usize, usize),
    frac: u32,
    bits: u32,
    mode: Rounding,
) -> Vec<(i128, bool)> {
    let end = (x.len() * l + h.len()) as i64 - l as i64;
    (phase..)
        .step_by(m)
        .take_while(|&i| (i as i64) < end)
        .map(|i| {
            let acc: i128 = (0..h.len().min(i + 1))
                .filter(|&k| (i - k) % l == 0 && (i - k) / l < x.len())
                .map(|k| i128::from(h[k]) * i128::from(x[(i - k) / l]))
                .sum();
            finish_exact(acc, frac, bits, mode)
        })
        .collect()
}

/// Exact model of a fixed-point FIR: the exact sums of `common::fir_exact`, each finished with
/// one rounding (÷2^frac) and saturation to `bits`.
pub fn fir_finished(
    h: &[i64],
    x: &[i64],
    frac: u32,
    bits: u32,
    mode: Rounding,
) -> Vec<(i128, bool)> {
    fir_exact(h, x)
        .into_iter()
        .map(|acc| finish_exact(acc, frac, bits, mode))
        .collect()
}

/// Whether the worst-case input in the full range of a `bits`-wide sample takes Σ h·x outside
/// an accumulator of `acc_bits` bits.
pub fn overflows(h: &[i64], bits: u32, acc_bits: u32) -> bool {
    let x_max = (1i128 << (bits - 1)) - 1;
    let x_min = -x_max - 1;
    let hi: i128 = h
        .iter()
        .map(|&t| (t as i128 * x_max).max(t as i128 * x_min))
        .sum();
    let lo: i128 = h
        .iter()
        .map(|&t| (t as i128 * x_max).min(t as i128 * x_min))
        .sum();
    let acc_max = if acc_bits >= 128 {
        i128::MAX
    } else {
        (1i128 << (acc_bits - 1)) - 1
    };
    hi > acc_max || lo < -acc_max - 1
}

/// The impulse response of a CIC with `stages` N, rate R and differential delay M at the input
/// rate: N boxcars of R·M ones convolved (H(z) = ((1 − z^−RM)/(1 − z^−1))^N, Hogenauer 1981).
pub fn cic_impulse_response(stages: usize, rate: usize, delay: usize) -> Vec<i64> {
    let boxcar = vec![1i64; rate * delay];
    let mut h = vec![1i64];
    for _ in 0..stages {
        h = convolve_full_exact(&h, &boxcar)
            .into_iter()
            .map(|v| i64::try_from(v).unwrap())
            .collect();
    }
    h
}

/// sum/n (n > 0) rounded by `mode`, decided by comparing distances to the two neighbouring
/// integers (not by a remainder rule): the nearer wins; a tie goes up (HalfUp) or to the even
/// one (HalfEven); Truncate takes the lower.
pub fn divide_exact(sum: i128, n: i128, mode: Rounding) -> i128 {
    let lower = sum.div_euclid(n);
    let upper = lower + 1;
    // Distances scaled by n: sum − lower·n and upper·n − sum.
    let (d_lo, d_up) = (sum - lower * n, upper * n - sum);
    if d_lo == 0 {
        return lower;
    }
    match mode {
        Rounding::Truncate => lower,
        Rounding::HalfUp => {
            if d_up <= d_lo {
                upper
            } else {
                lower
            }
        }
        Rounding::HalfEven => match d_up.cmp(&d_lo) {
            std::cmp::Ordering::Less => upper,
            std::cmp::Ordering::Greater => lower,
            std::cmp::Ordering::Equal => {
                if upper % 2 == 0 {
                    upper
                } else {
                    lower
                }
            }
        },
        _ => unreachable!("a rounding mode the model does not know"),
    }
}

/// y[n] = round((x[n] + … + x[n−N+1]) / N), zeros before time 0, summed afresh for every n.
pub fn moving_average_exact(x: &[i64], n: usize, mode: Rounding) -> Vec<i128> {
    (0..x.len())
        .map(|i| {
            let sum: i128 = x[i.saturating_sub(n - 1)..=i]
                .iter()
                .map(|&v| v as i128)
                .sum();
            divide_exact(sum, n as i128, mode)
        })
        .collect()
}

/// H(f) = Σ h[k]·e^{−j2πfk} as (re, im).
pub fn dtft(h: &[f64], f: f64) -> (f64, f64) {
    h.iter().enumerate().fold((0.0, 0.0), |(re, im), (k, &v)| {
        let w = 2.0 * std::f64::consts::PI * f * k as f64;
        (re + v * w.cos(), im - v * w.sin())
    })
}

pub fn dtft_magnitude(h: &[f64], f: f64) -> f64 {
    let (re, im) = dtft(h, f);
    re.hypot(im)
}

/// The group delay of the impulse response `h` at `f` cycles/sample, measured:
/// τ(f) = Re{ Σ k·h[k]·e^{−j2πfk} / Σ h[k]·e^{−j2πfk} } (the derivative of the phase, written
/// through the transform of k·h[k]; common practice).
pub fn group_delay_at(h: &[f64], f: f64) -> f64 {
    let kh: Vec<f64> = h.iter().enumerate().map(|(k, &v)| k as f64 * v).collect();
    let (a, b) = dtft(&kh, f);
    let (c, d) = dtft(h, f);
    (a * c + b * d) / (c * c + d * d)
}

/// Calls `$body` with the const `$n` equal to `$v`, for the listed values.
#[macro_export]
macro_rules! with_const {
    ($v:expr, [$($c:literal),*], |$n:ident| $body:expr) => {
        match $v {
            $($c => {
                const $n: usize = $c;
                $body
            })*
            other => panic!("{other} not instantiated"),
        }
    };
}
