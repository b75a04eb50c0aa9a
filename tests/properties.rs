//! Properties of LTI systems and of tapline's numeric contract, checked with proptest against
//! the float64 reference and the exact i128 models in `common`.
//!
//! Every property runs at least 256 cases (`PROPTEST_CASES` raises it, never lowers it).

mod common;

use common::*;
use fixed::types::{I1F15, I1F31, I4F12, I8F24, I16F16};
use fixed::{FixedI16, types::extra::U0};
use proptest::prelude::*;
use tapline::num::DefaultAcc;
use tapline::{
    Error, Fir, Ring, Rounding, Span, convolve, convolve_with_rounding, correlate,
    correlate_with_rounding,
};

fn rounding() -> impl Strategy<Value = Rounding> {
    prop::sample::select(Rounding::ALL.to_vec())
}

fn tap_count() -> impl Strategy<Value = usize> {
    prop::sample::select(TAP_COUNTS.to_vec())
}

/// Raw codes of a `bits`-wide format, with the two extremes and zero over-represented so that
/// saturation, the −1·−1 product and long zero runs all occur often.
fn raw_code(bits: u32) -> impl Strategy<Value = i64> {
    let max = (1i64 << (bits - 1)) - 1;
    let min = -max - 1;
    prop_oneof![
        1 => Just(min),
        1 => Just(max),
        1 => Just(0i64),
        6 => min..=max,
    ]
}

/// Taps of a `bits`-wide format at random scales (shifted right 0..=10 bits), so that both tap
/// sets the accumulator check accepts and ones it rejects (for 32-bit) occur.
fn raw_taps(bits: u32) -> impl Strategy<Value = Vec<i64>> {
    (tap_count(), 0u32..=10).prop_flat_map(move |(n, shift)| {
        prop::collection::vec(raw_code(bits), n)
            .prop_map(move |v| v.into_iter().map(|h| h >> shift).collect::<Vec<_>>())
    })
}

fn block_sizes() -> impl Strategy<Value = Vec<usize>> {
    prop::collection::vec(0usize..=40, 1..6)
}

fn inputs(bits: u32) -> impl Strategy<Value = Vec<i64>> {
    prop::collection::vec(raw_code(bits), 0..200)
}

proptest! {
    #![proptest_config(cases::config())]

    /// Q15 samples and Q15 taps (raw i16), every rounding mode, inputs that saturate.
    #[test]
    fn q15_matches_exact_model(h in raw_taps(16), x in inputs(16), sizes in block_sizes(), mode in rounding()) {
        with_tap_count!(h.len(), |N| check_fixed_fir::<i16, i16, DefaultAcc, N>(64, &h, &x, &sizes, mode));
    }

    /// Q31 samples and taps (raw i32), including tap sets the accumulator check must reject.
    #[test]
    fn q31_matches_exact_model(h in raw_taps(32), x in inputs(32), sizes in block_sizes(), mode in rounding()) {
        with_tap_count!(h.len(), |N| check_fixed_fir::<i32, i32, DefaultAcc, N>(64, &h, &x, &sizes, mode));
    }

    /// `fixed` types: I1F15 taps on I1F15 samples and on 4.12 samples (a 12-bit ADC code).
    #[test]
    fn fixed16_formats_match_exact_model(h in raw_taps(16), x in inputs(16), sizes in block_sizes(), mode in rounding()) {
        with_tap_count!(h.len(), |N| {
            check_fixed_fir::<I1F15, I1F15, DefaultAcc, N>(64, &h, &x, &sizes, mode);
            check_fixed_fir::<I4F12, I1F15, DefaultAcc, N>(64, &h, &x, &sizes, mode);
            // Integer taps (no fractional bits): the rounding step is the identity.
            check_fixed_fir::<FixedI16<U0>, FixedI16<U0>, DefaultAcc, N>(64, &h, &x, &sizes, mode);
        });
    }

    /// `fixed` 32-bit types: I1F31 taps on 8.24 samples, 16.16 taps on I1F31 samples.
    #[test]
    fn fixed32_formats_match_exact_model(h in raw_taps(32), x in inputs(32), sizes in block_sizes(), mode in rounding()) {
        with_tap_count!(h.len(), |N| {
            check_fixed_fir::<I8F24, I1F31, DefaultAcc, N>(64, &h, &x, &sizes, mode);
            check_fixed_fir::<I1F31, I16F16, DefaultAcc, N>(64, &h, &x, &sizes, mode);
        });
    }

    /// The f64 filter performs exactly the reference sum (same terms, same order): bit-equal.
    #[test]
    fn f64_fir_equals_reference(n in tap_count(), seed in prop::collection::vec(-1.0f64..1.0, 64 + 300), sizes in block_sizes()) {
        let (h, x) = seed.split_at(64);
        let h = &h[..n];
        let x = &x[..300];
        let expected = fir_f64(h, x);
        with_tap_count!(n, |N| {
            let taps: [f64; N] = h.try_into().unwrap();
            let mut fir = Fir::<f64, N>::new(&taps).unwrap();
            let got: Vec<f64> = x.iter().map(|&v| fir.push(v)).collect();
            prop_assert_eq!(&got, &expected);
            fir.reset();
            let mut blocked = vec![0.0; x.len()];
            let mut at = 0;
            for len in block_lengths(x.len(), &sizes) {
                fir.process(&x[at..at + len], &mut blocked[at..at + len]).unwrap();
                at += len;
            }
            prop_assert_eq!(&blocked, &expected);
        });
    }

    /// f32 accumulating in f32 stays within γ_N(2^−24)·Σ|h||x| of the f64 reference (Higham
    /// §3.1), plus the reference's own γ_N(2^−53) error; per-sample and block outputs are
    /// bit-identical.
    #[test]
    fn f32_within_documented_bound(n in tap_count(), seed in prop::collection::vec(-1.0f32..1.0, 64 + 300), scale in -3i32..4, sizes in block_sizes()) {
        let scale = 10f32.powi(scale);
        let (h, x) = seed.split_at(64);
        let h: Vec<f32> = h[..n].to_vec();
        let x: Vec<f32> = x.iter().map(|v| v * scale).collect();
        let h64: Vec<f64> = h.iter().map(|&v| v.into()).collect();
        let x64: Vec<f64> = x.iter().map(|&v| v.into()).collect();
        let reference = fir_f64(&h64, &x64);
        let magnitude = fir_abs_f64(&h64, &x64);
        let bound_factor = gamma(n, U_F32) + gamma(n, U_F64);
        with_tap_count!(n, |N| {
            let taps: [f32; N] = h.as_slice().try_into().unwrap();
            let mut fir = Fir::<f32, N>::new(&taps).unwrap();
            let got: Vec<f32> = x.iter().map(|&v| fir.push(v)).collect();
            for i in 0..x.len() {
                let err = (f64::from(got[i]) - reference[i]).abs();
                prop_assert!(err <= bound_factor * magnitude[i], "n={} i={} err={} bound={}", n, i, err, bound_factor * magnitude[i]);
            }
            fir.reset();
            let mut blocked = x.clone();
            let mut at = 0;
            for len in block_lengths(x.len(), &sizes) {
                fir.process_in_place(&mut blocked[at..at + len]);
                at += len;
            }
            prop_assert!(blocked.iter().zip(&got).all(|(a, b)| a.to_bits() == b.to_bits()));

            // f32 samples with f64 taps: f64 accumulation, one rounding to f32 at the end.
            let taps64: [f64; N] = h64.as_slice().try_into().unwrap();
            let mut wide = Fir::<f32, N, f64>::new(&taps64).unwrap();
            for i in 0..x.len() {
                let y = f64::from(wide.push(x[i]));
                let bound = U_F32 * reference[i].abs() * (1.0 + U_F32) + 2.0 * gamma(n, U_F64) * magnitude[i];
                prop_assert!((y - reference[i]).abs() <= bound);
            }
        });
    }

    /// Linearity: F(a·x1 + b·x2) = a·F(x1) + b·F(x2) in f64, within the rounding of the three
    /// filter runs, the input mix and the output mix: (2γ_N + 4u)·(|a|·Σ|h||x1| + |b|·Σ|h||x2|),
    /// with 1 % slack for the second-order terms.
    #[test]
    fn linearity_f64(n in tap_count(), v in prop::collection::vec(-1.0f64..1.0, 64 + 2 * 150), a in -4.0f64..4.0, b in -4.0f64..4.0) {
        let h = &v[..n];
        let (x1, x2) = v[64..].split_at(150);
        let mix: Vec<f64> = x1.iter().zip(x2).map(|(p, q)| a * p + b * q).collect();
        let y1 = fir_f64(h, x1);
        let y2 = fir_f64(h, x2);
        let (s1, s2) = (fir_abs_f64(h, x1), fir_abs_f64(h, x2));
        with_tap_count!(n, |N| {
            let taps: [f64; N] = h.try_into().unwrap();
            let mut fir = Fir::<f64, N>::new(&taps).unwrap();
            for i in 0..mix.len() {
                let y = fir.push(mix[i]);
                let bound = 1.01 * (2.0 * gamma(n, U_F64) + 4.0 * U_F64) * (a.abs() * s1[i] + b.abs() * s2[i]);
                prop_assert!((y - (a * y1[i] + b * y2[i])).abs() <= bound);
            }
        });
    }

    /// Shift invariance: delaying the input by d samples delays the output by d samples and
    /// changes nothing else — exactly, since the history starts at zero and zero terms add
    /// nothing in any of the formats.
    #[test]
    fn shift_invariance(h in raw_taps(16), x in inputs(16), d in 0usize..70, mode in rounding()) {
        with_tap_count!(h.len(), |N| {
            let taps: [i16; N] = core::array::from_fn(|k| h[k] as i16);
            let xs: Vec<i16> = x.iter().map(|&v| v as i16).collect();
            let run = |input: &[i16]| -> Vec<i16> {
                let mut fir = Fir::<i16, N>::new(&taps).unwrap().with_rounding(mode);
                input.iter().map(|&v| fir.push(v)).collect()
            };
            let mut delayed = vec![0i16; d];
            delayed.extend(&xs);
            let mut expected = vec![0i16; d];
            expected.extend(run(&xs));
            prop_assert_eq!(run(&delayed), expected);

            let tf: [f32; N] = core::array::from_fn(|k| h[k] as f32 / 32768.0);
            let xf: Vec<f32> = x.iter().map(|&v| v as f32 / 32768.0).collect();
            let run_f = |input: &[f32]| -> Vec<u32> {
                let mut fir = Fir::<f32, N>::new(&tf).unwrap();
                input.iter().map(|&v| fir.push(v).to_bits()).collect()
            };
            let mut delayed = vec![0.0f32; d];
            delayed.extend(&xf);
            let out = run_f(&delayed);
            prop_assert!(out[..d].iter().all(|&b| b == 0));
            prop_assert_eq!(&out[d..], &run_f(&xf)[..]);
        });
    }

    /// The impulse response is the taps: exactly in f64; in Q15/Q31 a −1.0 impulse gives −h
    /// exactly, except that −(−1.0) saturates to the largest code (and is counted).
    #[test]
    fn impulse_response_is_the_taps(h16 in raw_taps(16), hf in prop::collection::vec(-2.0f64..2.0, 64)) {
        let n = h16.len();
        with_tap_count!(n, |N| {
            let taps: [f64; N] = hf[..N].try_into().unwrap();
            let mut fir = Fir::<f64, N>::new(&taps).unwrap();
            let mut impulse = vec![0.0; N + 3];
            impulse[0] = 1.0;
            fir.process_in_place(&mut impulse);
            prop_assert_eq!(&impulse[..N], &taps[..]);
            prop_assert!(impulse[N..].iter().all(|&v| v == 0.0));
            prop_assert_eq!(fir.taps(), &taps);

            let q: [i16; N] = core::array::from_fn(|k| h16[k] as i16);
            let mut fir = Fir::<i16, N>::new(&q).unwrap();
            let response: Vec<i16> = (0..N).map(|i| fir.push(if i == 0 { i16::MIN } else { 0 })).collect();
            let expected: Vec<i16> = q.iter().map(|&t| t.checked_neg().unwrap_or(i16::MAX)).collect();
            prop_assert_eq!(response, expected);
            prop_assert_eq!(fir.saturations() as usize, q.iter().filter(|&&t| t == i16::MIN).count());

            let q31: [i32; N] = core::array::from_fn(|k| (h16[k] as i32) << 8);
            let mut fir = Fir::<i32, N>::new(&q31).unwrap();
            let response: Vec<i32> = (0..N).map(|i| fir.push(if i == 0 { i32::MIN } else { 0 })).collect();
            let expected: Vec<i32> = q31.iter().map(|&t| -t).collect();
            prop_assert_eq!(response, expected);
        });
    }

    /// The ring holds exactly the last N values, oldest first, across any number of wraps.
    #[test]
    fn ring_holds_the_last_n(values in prop::collection::vec(any::<i32>(), 0..300)) {
        fn check<const N: usize>(values: &[i32]) {
            let mut ring = Ring::<i32, N>::new(-7);
            let mut model: Vec<i32> = vec![-7; N];
            for &v in values {
                ring.push(v);
                model.remove(0);
                model.push(v);
                assert_eq!(ring.window(), &model[..]);
                assert_eq!(ring.latest(), v);
                assert!(ring.iter().copied().eq(model.iter().copied()));
            }
        }
        check::<1>(&values);
        check::<2>(&values);
        check::<5>(&values);
        check::<16>(&values);
        check::<37>(&values);
    }

    /// Convolution and correlation of Q15 codes equal the exact model in every span and rounding
    /// mode; convolution is commutative (bit for bit, since the sums are exact); correlation is
    /// convolution with the kernel reversed.
    #[test]
    fn q15_convolution_exact_and_commutative(
        x in prop::collection::vec(raw_code(16), 1..60),
        h in prop::collection::vec(raw_code(16), 1..60),
        mode in rounding(),
    ) {
        let xs: Vec<i16> = x.iter().map(|&v| v as i16).collect();
        let hs: Vec<i16> = h.iter().map(|&v| v as i16).collect();
        let full = convolve_full_exact(&x, &h);
        let h_rev: Vec<i64> = h.iter().rev().copied().collect();
        let full_corr = convolve_full_exact(&x, &h_rev);
        for span in [Span::Full, Span::Same, Span::Valid] {
            let (len, first) = span.layout(x.len(), h.len());
            let model: Vec<(i128, bool)> = full[first..first + len].iter().map(|&a| finish_exact(a, 15, 16, mode)).collect();
            let mut out = vec![0i16; len];
            let sat = convolve_with_rounding(&xs, &hs, &mut out, span, mode).unwrap();
            prop_assert_eq!(out.iter().map(|&v| i128::from(v)).collect::<Vec<_>>(), model.iter().map(|m| m.0).collect::<Vec<_>>());
            prop_assert_eq!(sat, model.iter().filter(|m| m.1).count());

            let mut swapped = vec![0i16; len];
            convolve_with_rounding(&hs, &xs, &mut swapped, span, mode).unwrap();
            prop_assert_eq!(&swapped, &out);

            let (len, first) = span.correlation_layout(x.len(), h.len());
            let mut corr = vec![0i16; len];
            correlate_with_rounding(&xs, &hs, &mut corr, span, mode).unwrap();
            let model: Vec<i128> = full_corr[first..first + len].iter().map(|&a| finish_exact(a, 15, 16, mode).0).collect();
            prop_assert_eq!(corr.iter().map(|&v| i128::from(v)).collect::<Vec<_>>(), model);

            let mut wrong = vec![0i16; len + 1];
            prop_assert_eq!(convolve_with_rounding(&xs, &hs, &mut wrong, span, mode), Err(Error::OutputLength { expected: len, found: len + 1 }));
        }
    }

    /// f64 convolution performs the reference sum exactly; swapping the operands changes the
    /// summation order only, within 2γ_K·Σ|h||x|; correlation matches its reference in the
    /// same way.
    #[test]
    fn f64_convolution(x in prop::collection::vec(-1.0f64..1.0, 1..60), h in prop::collection::vec(-1.0f64..1.0, 1..60)) {
        let full = convolve_full_f64(&x, &h);
        let abs_x: Vec<f64> = x.iter().map(|v| v.abs()).collect();
        let abs_h: Vec<f64> = h.iter().map(|v| v.abs()).collect();
        let magnitude = convolve_full_f64(&abs_x, &abs_h);
        let k = x.len().min(h.len());
        let mut out = vec![0.0; full.len()];
        convolve(&x, &h, &mut out, Span::Full).unwrap();
        prop_assert_eq!(&out, &full);
        convolve(&h, &x, &mut out, Span::Full).unwrap();
        for i in 0..full.len() {
            prop_assert!((out[i] - full[i]).abs() <= 2.0 * gamma(k, U_F64) * magnitude[i]);
        }
        let h_rev: Vec<f64> = h.iter().rev().copied().collect();
        let abs_h_rev: Vec<f64> = abs_h.iter().rev().copied().collect();
        let corr_ref = convolve_full_f64(&x, &h_rev);
        let corr_magnitude = convolve_full_f64(&abs_x, &abs_h_rev);
        correlate(&x, &h, &mut out, Span::Full).unwrap();
        for i in 0..full.len() {
            prop_assert!((out[i] - corr_ref[i]).abs() <= 2.0 * gamma(k, U_F64) * corr_magnitude[i]);
        }
    }
}

#[test]
fn empty_operands_are_errors() {
    let mut out = [0i16; 1];
    assert_eq!(
        convolve::<i16, i16>(&[], &[1], &mut out, Span::Full),
        Err(Error::EmptyInput)
    );
    assert_eq!(
        correlate_with_rounding::<i16, i16>(&[1], &[], &mut out, Span::Valid, Rounding::Truncate),
        Err(Error::EmptyInput)
    );
}

#[test]
fn set_taps_keeps_history_and_checks_the_accumulator() {
    static A: [i32; 2] = [1 << 30, 0];
    static B: [i32; 2] = [0, 1 << 30];
    static LOUD: [i32; 2] = [i32::MIN, i32::MIN];
    let mut fir = Fir::<i32, 2>::new(&A).unwrap();
    fir.push(1 << 20);
    fir.set_taps(&B).unwrap();
    // B delays by one sample and halves: the sample pushed before the swap comes out now.
    assert_eq!(fir.push(0), 1 << 19);
    assert_eq!(fir.set_taps(&LOUD), Err(Error::AccumulatorOverflow));
    assert_eq!(fir.taps(), &B);
}
