//! The exact moving average: its frequency response measured from its impulse response, and its
//! running sum over 10^8 samples against an integer reference. Data is invented.

mod common;
mod structure_models;

use structure_models::*;
use tapline::{MovingAverage, Rounding};

/// The N-point average's impulse response, measured: an impulse of N·2^20 gives exactly 2^20
/// for N samples (the division is exact), so the response is known without rounding.
fn measured_response<const N: usize>() -> Vec<f64> {
    let mut avg = MovingAverage::<i32, N>::new();
    (0..2 * N)
        .map(|n| {
            f64::from(avg.push(if n == 0 { (N as i32) << 20 } else { 0 })) / f64::from(1 << 20)
        })
        .collect()
}

#[test]
fn nulls_at_multiples_of_fs_over_n_and_the_closed_form() {
    // H(f) = sin(πNf)/(N·sin(πf)): zero at f = k/N (CHECKS.md item 13; S. W. Smith, *The
    // Scientist and Engineer's Guide to Digital Signal Processing*, 1997, ch. 15, from memory).
    fn check<const N: usize>() {
        let h = measured_response::<N>();
        assert!(h[..N].iter().all(|&v| v == 1.0) && h[N..].iter().all(|&v| v == 0.0));
        for k in 1..=N / 2 {
            let f = k as f64 / N as f64;
            assert!(
                dtft_magnitude(&h, f) / N as f64 <= 1e-12,
                "N={N}: |H({k}/{N})|"
            );
        }
        for j in 0..=500 {
            let f = j as f64 / 1000.0;
            let pi = std::f64::consts::PI;
            let want = if j == 0 {
                1.0
            } else {
                ((pi * N as f64 * f).sin() / (N as f64 * (pi * f).sin())).abs()
            };
            let got = dtft_magnitude(&h, f) / N as f64;
            assert!((got - want).abs() <= 1e-12, "N={N} f={f}: {got} vs {want}");
        }
    }
    check::<3>();
    check::<5>();
    check::<7>();
    check::<10>();
    check::<20>();
}

#[test]
fn half_power_points() {
    // |H(f)| = 1/√2, f as a fraction of fs, 1e-6: N=2 0.25, N=4 0.113848, N=5 0.0901587,
    // N=10 0.0444870, N=100 0.00442966 [computed: scipy 1.17 root finding on the closed form,
    // CHECKS.md item 13]. Found by bisection on the response measured from the structure.
    fn crossing<const N: usize>() -> f64 {
        let h = measured_response::<N>();
        let (mut lo, mut hi) = (1e-9, 1.0 / N as f64);
        for _ in 0..100 {
            let mid = 0.5 * (lo + hi);
            if dtft_magnitude(&h, mid) / N as f64 > std::f64::consts::FRAC_1_SQRT_2 {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        0.5 * (lo + hi)
    }
    for (got, want) in [
        (crossing::<2>(), 0.25),
        (crossing::<4>(), 0.113848),
        (crossing::<5>(), 0.0901587),
        (crossing::<10>(), 0.0444870),
        (crossing::<100>(), 0.00442966),
    ] {
        assert!((got - want).abs() <= 1e-6, "{got} vs {want}");
    }
}

/// xorshift64* (S. Vigna, ACM TOMS 42(4), 2016; constants from memory): invented samples.
struct Noise(u64);

impl Noise {
    fn next_i32(&mut self) -> i32 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        (self.0.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 32) as i32
    }
}

#[test]
fn running_sum_is_exact_over_a_hundred_million_samples() {
    // The running sum adds the newest sample and subtracts the one leaving; an error would
    // persist forever. After 10^8 full-scale i32 samples (a run of i32::MIN every 2^20 samples
    // to push the sum to its extreme), the sum must be exactly the sum of the last N samples,
    // kept here in a separate ring, and every 2^20-th output must be the exact rounded mean.
    const N: usize = 7; // not a power of two: a true division
    const SAMPLES: u64 = 100_000_000;
    let mut avg = MovingAverage::<i32, N>::new().with_rounding(Rounding::HalfEven);
    let mut noise = Noise(0x0DDB_A11C_AFE5_F00D);
    let mut last = [0i64; N];
    let started = std::time::Instant::now();
    for n in 0..SAMPLES {
        let x = if n % (1 << 20) < 16 {
            i32::MIN
        } else {
            noise.next_i32()
        };
        let y = avg.push(x);
        last[(n % N as u64) as usize] = i64::from(x);
        if n % (1 << 20) == 15 || n == SAMPLES - 1 {
            let sum: i64 = last.iter().sum();
            assert_eq!(avg.sum(), sum, "sample {n}");
            assert_eq!(
                i128::from(y),
                divide_exact(i128::from(sum), N as i128, Rounding::HalfEven)
            );
        }
    }
    assert_eq!(avg.saturations(), 0);
    println!("10^8 samples in {:.1} s", started.elapsed().as_secs_f64());
}
