//! The CIC decimator against its definition and against E. B. Hogenauer, "An economical class of
//! digital filters for decimation and interpolation", IEEE Trans. Acoustics, Speech and Signal
//! Processing 29(2), 1981 (gain (R·M)^N, register growth N·log2(R·M), magnitude
//! |sin(πRMf)/sin(πf)|^N), and the droop compensator's measured residual. Data is invented.

mod common;
mod structure_models;

use common::*;
use proptest::prelude::*;
use structure_models::*;
use tapline::filter::{cic_compensator, cic_growth_bits, cic_magnitude, cic_register_bits};
use tapline::num::FixedPoint;
use tapline::{CicDecimator, Error, Rounding};

/// The closed form, normalised by the DC gain, written here with std's sine (Hogenauer 1981).
fn closed_form(stages: usize, rm: usize, f: f64) -> f64 {
    let pi = std::f64::consts::PI;
    if f == 0.0 {
        return 1.0;
    }
    ((pi * rm as f64 * f).sin() / (rm as f64 * (pi * f).sin()))
        .abs()
        .powi(stages as i32)
}

/// Runs one CIC configuration every way against the model: the full-precision output equals
/// the FIR with N boxcars of R·M ones (kept every R-th input), and the scaled output equals
/// that value ÷ 2^shift with one rounding and saturation — per sample and for any split.
fn check_cic<S, const N: usize, const R: usize, const M: usize, Reg>(
    x: &[i64],
    shift: u32,
    sizes: &[usize],
    mode: Rounding,
) where
    S: FixedPoint + Raw,
    Reg: tapline::filter::CicRegister,
{
    let shift = shift % (CicDecimator::<S, N, R, M, Reg>::MAX_SHIFT + 1);
    let mut cic = CicDecimator::<S, N, R, M, Reg>::new()
        .with_output_shift(shift)
        .unwrap()
        .with_rounding(mode);
    let h = cic_impulse_response(N, R, M);
    let full = keep_every(&fir_exact(&h, x), R);
    let model: Vec<(i128, bool)> = full
        .iter()
        .map(|&a| finish_exact(a, shift, <S as Raw>::BITS, mode))
        .collect();
    let want: Vec<S> = model
        .iter()
        .map(|&(v, _)| <S as Raw>::from_raw(v as i64))
        .collect();
    let sats = model.iter().filter(|m| m.1).count() as u32;
    let xs: Vec<S> = x.iter().map(|&v| <S as Raw>::from_raw(v)).collect();

    let got_full: Vec<i128> = xs
        .iter()
        .filter_map(|&v| cic.push_full(v))
        .map(i128::from)
        .collect();
    assert_eq!(got_full, full, "unscaled output, N={N} R={R} M={M}");
    cic.reset();
    let got: Vec<S> = xs.iter().filter_map(|&v| cic.push(v)).collect();
    assert_eq!(got, want, "scaled output, shift {shift}, {mode:?}");
    assert_eq!(cic.saturations(), sats);
    cic.reset();
    let mut blocked = Vec::new();
    let mut at = 0;
    for len in block_lengths(xs.len(), sizes) {
        let mut out = vec![S::ZERO; cic.outputs_for(len)];
        assert_eq!(cic.process(&xs[at..at + len], &mut out).unwrap(), out.len());
        blocked.extend(out);
        at += len;
    }
    assert_eq!(blocked, want, "process, splits {sizes:?}");
    cic.reset();
    let mut in_place: Vec<S> = Vec::new();
    let mut at = 0;
    for len in block_lengths(xs.len(), sizes) {
        let mut buf = xs[at..at + len].to_vec();
        let n = cic.process_in_place(&mut buf);
        in_place.extend(&buf[..n]);
        at += len;
    }
    assert_eq!(in_place, want, "process_in_place");
    assert_eq!(cic.saturations(), sats);
}

proptest! {
    #![proptest_config(cases::config())]

    /// Integrators at the input rate and combs at the output rate, in wrapping registers, give
    /// exactly the FIR of N boxcars decimated — including registers exactly as wide as
    /// Hogenauer's rule (i16 input, N = 4, R = 16: 16 + 16 = 32-bit `i32` registers).
    #[test]
    fn cic_equals_boxcar_fir_then_keep_every_rth(x16 in prop::collection::vec(code(16), 0..300),
            x32 in prop::collection::vec(code(32), 0..300), shift in 0u32..64, sizes in splits(), mode in any_rounding()) {
        check_cic::<i16, 1, 1, 1, i64>(&x16, shift, &sizes, mode);
        check_cic::<i16, 1, 4, 1, i32>(&x16, shift, &sizes, mode);
        check_cic::<i16, 2, 3, 2, i64>(&x16, shift, &sizes, mode);
        check_cic::<i16, 3, 8, 1, i32>(&x16, shift, &sizes, mode);
        check_cic::<i16, 3, 10, 1, i64>(&x16, shift, &sizes, mode);
        check_cic::<i16, 4, 16, 1, i32>(&x16, shift, &sizes, mode);
        check_cic::<i16, 4, 5, 2, i64>(&x16, shift, &sizes, mode);
        check_cic::<fixed::types::I4F12, 3, 7, 1, i64>(&x16, shift, &sizes, mode);
        check_cic::<i32, 2, 6, 1, i64>(&x32, shift, &sizes, mode);
        check_cic::<i32, 5, 16, 1, i64>(&x32, shift, &sizes, mode);
    }
}

#[test]
fn register_growth_matches_hogenauer_and_the_worked_examples() {
    // Hogenauer 1981: B_max = ⌈N·log2(R·M) + B_in − 1⌉ (MSB index), so B_max + 1 bits.
    // R. Lyons, "Computing CIC filter register pruning" (worked example, CHECKS.md item 14,
    // confirmed): N = 3, R = 8, M = 1, B_in = 12 → gain 512, 21-bit registers.
    assert_eq!(cic_growth_bits(3, 8, 1), 9);
    assert_eq!(cic_register_bits(12, 3, 8, 1), 21);
    // Hogenauer's pruning example as given there: N = 5, R = 128, M = 1, B_in = 8 → growth 35
    // bits, 43-bit registers.
    assert_eq!(cic_growth_bits(5, 128, 1), 35);
    assert_eq!(cic_register_bits(8, 5, 128, 1), 43);
    // The rule for every small configuration, against the definition ⌈N·log2(R·M)⌉ computed
    // here from the integer gain by a different route (the smallest b with 2^b ≥ (R·M)^N).
    for n in 1..=6usize {
        for r in 1..=40usize {
            for m in 1..=2usize {
                let gain = ((r * m) as u128).pow(n as u32);
                let bits = (0..128).find(|&b| (1u128 << b) >= gain).unwrap();
                assert_eq!(cic_growth_bits(n, r, m), bits, "N={n} R={r} M={m}");
            }
        }
    }
    assert_eq!(CicDecimator::<i16, 3, 8, 1>::REGISTER_BITS, 25);
    assert_eq!(CicDecimator::<i32, 5, 128, 1>::REGISTER_BITS, 67); // 32 + 35
}

#[test]
fn dc_gain_is_rm_to_the_n_measured() {
    // Hogenauer 1981: DC gain (R·M)^N. Measured with a constant input once the transient,
    // N·(R·M − 1) input samples, has passed. The registers wrap throughout (the integrators
    // grow without bound); the outputs must not.
    fn check<const N: usize, const R: usize, const M: usize>(level: i16) {
        let mut cic = CicDecimator::<i16, N, R, M>::new();
        let outs: Vec<i64> = (0..(N * R * M + 4 * R) * 50)
            .filter_map(|_| cic.push_full(level))
            .collect();
        let gain = ((R * M) as i64).pow(N as u32);
        assert_eq!(cic.dc_gain(), gain as u128);
        assert!(
            outs[N * M + 1..]
                .iter()
                .all(|&y| y == gain * i64::from(level)),
            "N={N} R={R} M={M}: {:?}",
            &outs[..8]
        );
    }
    check::<1, 5, 1>(1);
    check::<3, 8, 1>(-1);
    check::<3, 10, 1>(i16::MAX);
    check::<4, 16, 1>(i16::MIN);
    check::<2, 7, 2>(1234);
    check::<5, 16, 1>(i16::MIN);
    // Exactly at Hogenauer's width: 32-bit registers, output −2^15·16^4 = −2^31 = i32::MIN.
    let mut tight = CicDecimator::<i16, 4, 16, 1, i32>::new();
    let last = (0..16 * 100)
        .filter_map(|_| tight.push_full(i16::MIN))
        .last();
    assert_eq!(last, Some(i64::from(i32::MIN)));
    // And the default output shift (the growth, 16 bits) gives back −1.0 exactly.
    let mut scaled = CicDecimator::<i16, 4, 16, 1, i32>::new();
    let last = (0..16 * 100).filter_map(|_| scaled.push(i16::MIN)).last();
    assert_eq!((last, scaled.saturations()), (Some(i16::MIN), 0));
}

/// The CIC's impulse response at the input rate, gathered from its decimated full-precision
/// outputs: an impulse d inputs before an output's input shows h[d], h[d + R], …
fn gathered_response<const N: usize, const R: usize, const M: usize>() -> Vec<f64> {
    let len = N * (R * M - 1) + 1;
    let mut h = vec![0.0; len + R];
    for d in 0..R {
        let mut cic = CicDecimator::<i16, N, R, M>::new();
        let lead = R - 1 - d;
        let outs: Vec<i64> = (0..lead + len + R)
            .filter_map(|n| cic.push_full(if n == lead { 1 } else { 0 }))
            .collect();
        for (j, &y) in outs.iter().enumerate() {
            if d + R * j < h.len() {
                h[d + R * j] = y as f64;
            }
        }
    }
    h
}

#[test]
fn magnitude_response_matches_the_closed_form() {
    // |H(f)| / (R·M)^N = |sin(πRMf) / (RM·sin(πf))|^N (Hogenauer 1981), measured from the
    // structure's own impulse response; nulls at multiples of 1/(R·M) of the input rate.
    fn check<const N: usize, const R: usize, const M: usize>() {
        let h = gathered_response::<N, R, M>();
        let gain = ((R * M) as f64).powi(N as i32);
        assert_eq!(h.iter().sum::<f64>(), gain, "Σh = DC gain");
        for j in 0..=1000 {
            let f = j as f64 / 2000.0;
            let measured = dtft_magnitude(&h, f) / gain;
            let want = closed_form(N, R * M, f);
            assert!(
                (measured - want).abs() <= 1e-11,
                "N={N} R={R} M={M} f={f}: {measured} vs {want}"
            );
            // The library's own closed form (used by the compensator design) agrees too.
            // Hz with the input rate beside them (an invented 48 kHz input).
            assert!(
                (cic_magnitude(N, R, M, f * 48_000.0, 48_000.0) - want).abs() <= 1e-13,
                "cic_magnitude at {f}"
            );
        }
        for k in 1..=(R * M) / 2 {
            let f = k as f64 / (R * M) as f64;
            assert!(
                dtft_magnitude(&h, f) / gain <= 1e-12,
                "null at {k}/{}",
                R * M
            );
        }
    }
    check::<1, 4, 1>();
    check::<3, 8, 1>();
    check::<2, 5, 2>();
    check::<4, 10, 1>();
}

#[test]
fn first_sidelobe_is_n_times_that_of_a_boxcar() {
    // A length-L boxcar's first sidelobe tends to −13.26 dB as L grows (the sinc's; common
    // practice; O&S Table 7.2 lists −13 dB for the rectangular window); N cascaded stages
    // multiply it by N: −39.8 dB for N = 3 (CHECKS.md item 15, computed). Measured between the
    // first two nulls at R·M = 128, where the limit holds to 0.01 dB per stage (at R·M = 16 it
    // is −13.15 dB per stage, −39.44 dB for three).
    let h = gathered_response::<3, 128, 1>();
    let gain = 128f64.powi(3);
    let peak = (0..=1000)
        .map(|j| 1.0 / 128.0 + j as f64 / 1000.0 / 128.0)
        .map(|f| dtft_magnitude(&h, f) / gain)
        .fold(0.0, f64::max);
    let db = 20.0 * peak.log10();
    println!("first sidelobe, N=3 R=128 M=1: {db:.2} dB");
    assert!((db - -39.8).abs() <= 0.2, "{db}");
}

#[test]
fn group_delay_measured_from_the_impulse_response() {
    fn check<const N: usize, const R: usize, const M: usize>() {
        let h = gathered_response::<N, R, M>();
        let documented = f64::from(CicDecimator::<i16, N, R, M>::new().group_delay().samples());
        assert_eq!(documented, (N * (R * M - 1)) as f64 / 2.0);
        for f in [0.0, 0.2 / (R * M) as f64, 0.4 / (R * M) as f64] {
            let tau = group_delay_at(&h, f);
            assert!(
                (tau - documented).abs() < 1e-9,
                "N={N} R={R} M={M}: τ({f}) = {tau}"
            );
        }
    }
    check::<1, 4, 1>();
    check::<3, 8, 1>();
    check::<2, 5, 2>();
}

/// The largest |20·log10 g| over the passband [0, edge] of the output rate, g the CIC's
/// normalised response (closed form) times the compensator's (from its taps, by the DTFT).
fn passband_deviation_db(stages: usize, rate: usize, delay: usize, taps: &[f64], edge: f64) -> f64 {
    (0..=400)
        .map(|j| edge * j as f64 / 400.0)
        .map(|f| closed_form(stages, rate * delay, f / rate as f64) * dtft_magnitude(taps, f))
        .map(|g| (20.0 * g.log10()).abs())
        .fold(0.0, f64::max)
}

#[test]
fn compensator_flattens_the_passband_droop() {
    // Invented scenario: N = 3, R = 10, M = 1, passband to 0.2 of the output rate. The droop
    // and its residual are measured here, on a grid 400 points dense, independently of the
    // design's own 256-point grid.
    let before = passband_deviation_db(3, 10, 1, &[1.0], 0.2);
    // 0.2 of the output rate: 200 Hz for an invented 10 kHz input (1 kHz out).
    let taps3 = cic_compensator::<3>(3, 10, 1, 200.0, 10_000.0).unwrap();
    let taps5 = cic_compensator::<5>(3, 10, 1, 200.0, 10_000.0).unwrap();
    let after3 = passband_deviation_db(3, 10, 1, &taps3, 0.2);
    let after5 = passband_deviation_db(3, 10, 1, &taps5, 0.2);
    println!(
        "droop N=3 R=10 M=1 to 0.2·fs_out: {before:.3} dB; 3 taps {after3:.4} dB {taps3:?}; 5 taps {after5:.4} dB {taps5:?}"
    );
    assert!(before > 1.5, "{before}");
    assert!(after3 < 0.1 && after5 < 0.03, "{after3} {after5}");
    assert!(after5 < after3);
    // Symmetric (linear phase), about unity DC gain.
    assert!(taps5.iter().zip(taps5.iter().rev()).all(|(a, b)| a == b));
    assert!((taps5.iter().sum::<f64>() - 1.0).abs() < 0.01);
    // A wider passband and more stages: still well under the uncompensated droop.
    let before = passband_deviation_db(5, 16, 1, &[1.0], 0.3);
    let taps = cic_compensator::<7>(5, 16, 1, 300.0, 16_000.0).unwrap();
    let after = passband_deviation_db(5, 16, 1, &taps, 0.3);
    println!("droop N=5 R=16 M=1 to 0.3·fs_out: {before:.3} dB; 7 taps {after:.4} dB");
    assert!(after < before / 20.0, "{before} {after}");
    for bad in [0.0, 0.5, -0.1, f64::NAN] {
        assert_eq!(
            cic_compensator::<5>(3, 10, 1, bad * 1000.0, 10_000.0),
            Err(Error::InvalidPassband)
        );
    }
    for bad_rate in [0.0, -10_000.0, f64::INFINITY, f64::NAN] {
        assert_eq!(
            cic_compensator::<5>(3, 10, 1, 200.0, bad_rate),
            Err(Error::InvalidPassband)
        );
        assert!(cic_magnitude(3, 10, 1, 200.0, bad_rate).is_nan());
    }
}

#[test]
fn output_shift_beyond_the_register_is_refused() {
    let max = CicDecimator::<i16, 3, 8, 1>::MAX_SHIFT;
    assert_eq!(max, 25);
    assert_eq!(
        CicDecimator::<i16, 3, 8, 1>::new()
            .with_output_shift(max + 1)
            .err(),
        Some(Error::ShiftTooLarge {
            shift: max + 1,
            max
        })
    );
}
