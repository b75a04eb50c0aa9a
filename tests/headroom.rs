//! The headroom proof checked against the exact i128 model, the float64 reference and published
//! scaling rules.

mod common;

use common::*;
use fixed::types::{I1F15, I4F12};
use proptest::prelude::*;
use tapline::headroom::{
    Acc32, AccTrace, AccWidth, Align, ErrorBound, Extreme, Headroom, InputRange, ProvenTaps,
    f32_error_bound, measure_deviation,
};
use tapline::num::{Acc128, FixedPoint};
use tapline::{Error, Fir, MulAcc, Rounding, Sample};

fn rounding() -> impl Strategy<Value = Rounding> {
    prop::sample::select(Rounding::ALL.to_vec())
}

/// Raw taps of a `bits`-wide format: random length from the instantiated counts, random scale,
/// the extremes over-represented.
fn taps(bits: u32) -> impl Strategy<Value = Vec<i64>> {
    let max = (1i64 << (bits - 1)) - 1;
    let code =
        prop_oneof![1 => Just(-max - 1), 1 => Just(max), 1 => Just(0i64), 6 => -max - 1..=max];
    (prop::sample::select(TAP_COUNTS.to_vec()), 0u32..=12).prop_flat_map(move |(n, shift)| {
        prop::collection::vec(code.clone(), n)
            .prop_map(move |v| v.into_iter().map(|h| h >> shift).collect::<Vec<_>>())
    })
}

/// Input ranges a firmware might declare for a 16-bit word.
fn range16() -> impl Strategy<Value = InputRange> {
    prop_oneof![
        Just(InputRange::FULL),
        (1u32..=16, any::<bool>()).prop_map(|(bits, left)| {
            InputRange::adc(bits, if left { Align::Left } else { Align::Right }, 16).unwrap()
        }),
        (-32768i64..=32767, -32768i64..=32767).prop_map(|(a, b)| InputRange::codes(
            a.min(b),
            a.max(b)
        )
        .unwrap()),
        (0i64..=4095).prop_map(|top| InputRange::codes(0, top).unwrap()),
    ]
}

fn sum_at_end(h: &[i64], x: &[i64]) -> i128 {
    *fir_exact(h, x).last().expect("non-empty input")
}

/// Inputs drawn from inside `range`, the ends over-represented.
fn inputs_in(range: InputRange, len: usize, seed: u64) -> Vec<i64> {
    let mut state = seed | 1;
    (0..len)
        .map(|_| {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            match state % 8 {
                0 => range.min(),
                1 => range.max(),
                _ => range.min() + (state >> 8) as i64 % (range.max() - range.min() + 1),
            }
        })
        .collect()
}

proptest! {
    #![proptest_config(cases::config())]

    /// The worst-case inputs make the exact model reach the accumulator bounds exactly, and
    /// no input in range goes beyond them. (Q15 taps, 16-bit samples, any declared range.)
    #[test]
    fn q15_bounds_are_exact_and_attained(h in taps(16), range in range16(), seed in any::<u64>()) {
        let q: Vec<i16> = h.iter().map(|&v| v as i16).collect();
        let report = Headroom::q15(&q, range);
        let (lo, hi) = report.accumulator_range();
        let high: Vec<i64> = report.worst_case_input(&q, Extreme::High).collect();
        let low: Vec<i64> = report.worst_case_input(&q, Extreme::Low).collect();
        let analysed = report.input();
        prop_assert!(analysed.min() <= range.min().clamp(-32768, 0) && analysed.max() >= range.max().clamp(0, 32767));
        prop_assert!(high.iter().chain(&low).all(|&x| x >= analysed.min() && x <= analysed.max()));
        prop_assert_eq!(sum_at_end(&h, &high), hi);
        prop_assert_eq!(sum_at_end(&h, &low), lo);
        for acc in fir_exact(&h, &inputs_in(report.input(), 300, seed)) {
            prop_assert!(acc >= lo && acc <= hi);
        }
        // The generic entry point agrees with the const one, and the I1F15 one with both.
        prop_assert_eq!(Headroom::of(&q, 16, range), report);
        let f: Vec<I1F15> = q.iter().map(|&v| I1F15::from_bits(v)).collect();
        prop_assert_eq!(Headroom::fixed16(&f, range), report);
        // L1 norm, DC gain and peak from the definitions.
        prop_assert_eq!(report.l1_norm_raw(), h.iter().map(|v| i128::from(v.abs())).sum::<i128>());
        prop_assert_eq!(report.dc_gain_raw(), h.iter().map(|&v| i128::from(v)).sum::<i128>());
        prop_assert_eq!(report.peak_raw(), h.iter().map(|v| i128::from(v.abs())).max().unwrap());
        // Accumulator bits: the bounds fit, one bit fewer would not.
        let bits = report.accumulator_bits();
        let fits = |b: u32| lo >= -(1i128 << (b - 1)) && hi < (1i128 << (b - 1));
        prop_assert!(fits(bits));
        prop_assert!(bits == 1 || !fits(bits - 1));
    }

    /// The same for Q31 taps on 32-bit samples over the full range, where the bound decides
    /// between i64 and i128; and the default filter refuses exactly the tap sets that do not
    /// fit 64 bits.
    #[test]
    fn q31_bounds_are_exact_and_pick_the_accumulator(h in taps(32)) {
        let q: Vec<i32> = h.iter().map(|&v| v as i32).collect();
        let report = Headroom::q31(&q, InputRange::FULL);
        let (lo, hi) = report.accumulator_range();
        let high: Vec<i64> = report.worst_case_input(&q, Extreme::High).collect();
        let low: Vec<i64> = report.worst_case_input(&q, Extreme::Low).collect();
        prop_assert_eq!(sum_at_end(&h, &high), hi);
        prop_assert_eq!(sum_at_end(&h, &low), lo);
        prop_assert_eq!(<i32 as MulAcc<i32>>::accumulator_fits(&q), report.fits(64));
        let expected = if report.fits(32) { AccWidth::Bits32 } else if report.fits(64) { AccWidth::Bits64 } else { AccWidth::Bits128 };
        prop_assert_eq!(report.safe_accumulator(), expected);
    }

    /// A configuration reported unable to saturate never saturates on its worst-case inputs
    /// (nor on random ones); one reported able to saturate does on a worst-case input, and the
    /// counter says so.
    #[test]
    fn saturation_verdict_holds(h in taps(16), seed in any::<u64>(), mode in rounding()) {
        let q: Vec<i16> = h.iter().map(|&v| v as i16).collect();
        let report = Headroom::q15(&q, InputRange::FULL);
        with_tap_count!(q.len(), |N| {
            let taps: [i16; N] = q.as_slice().try_into().unwrap();
            let mut fir = Fir::<i16, N>::new(&taps).unwrap().with_rounding(mode);
            let run = |fir: &mut Fir<i16, N>, x: &[i64]| -> u32 {
                fir.reset();
                for &v in x {
                    fir.push(v as i16);
                }
                fir.saturations()
            };
            let high: Vec<i64> = report.worst_case_input(&q, Extreme::High).collect();
            let low: Vec<i64> = report.worst_case_input(&q, Extreme::Low).collect();
            let worst = run(&mut fir, &high) + run(&mut fir, &low);
            if report.can_saturate(mode) {
                prop_assert!(worst >= 1, "reported able to saturate, worst-case input did not");
            } else {
                prop_assert_eq!(worst, 0);
                prop_assert_eq!(run(&mut fir, &inputs_in(report.input(), 300, seed)), 0);
            }
        });
    }

    /// The accumulator trace of a worst-case run shows the analysed bound, to the bit.
    #[test]
    fn trace_reaches_the_bound_on_worst_case_input(h in taps(16)) {
        let q: Vec<i16> = h.iter().map(|&v| v as i16).collect();
        let report = Headroom::q15(&q, InputRange::FULL);
        with_tap_count!(q.len(), |N| {
            let taps: [i16; N] = q.as_slice().try_into().unwrap();
            let mut fir = Fir::<i16, N>::new(&taps).unwrap();
            let mut trace = AccTrace::new();
            for x in report.worst_case_input(&q, Extreme::High).chain(report.worst_case_input(&q, Extreme::Low)) {
                fir.push_traced(x as i16, &mut trace);
            }
            let (lo, hi) = report.accumulator_range();
            prop_assert_eq!((trace.min(), trace.max()), (lo.min(0), hi.max(0)));
            prop_assert_eq!(trace.bits_used(), report.accumulator_bits());
            prop_assert_eq!(trace.outputs(), 2 * N as u64);
        });
    }

    /// Q31 with the 128-bit accumulator equals the exact model bit for bit for any taps, even
    /// those the default accumulator refuses.
    #[test]
    fn q31_wide_accumulator_is_exact(h in taps(32), x in prop::collection::vec(any::<i32>(), 0..150), mode in rounding()) {
        let xs: Vec<i64> = x.iter().map(|&v| v.into()).collect();
        let model = fir_exact(&h, &xs);
        with_tap_count!(h.len(), |N| {
            let taps: [i32; N] = core::array::from_fn(|k| h[k] as i32);
            let mut fir = Fir::<i32, N, i32, Acc128>::with_accumulator(&taps).unwrap().with_rounding(mode);
            let mut saturations = 0;
            for (n, &v) in x.iter().enumerate() {
                let (want, sat) = finish_exact(model[n], 31, 32, mode);
                saturations += u32::from(sat);
                prop_assert_eq!(i128::from(fir.push(v)), want);
            }
            prop_assert_eq!(fir.saturations(), saturations);
        });
    }

    /// Q15 taps quantized from float taps: the measured error against float64 never exceeds
    /// the computed bound, on random and on worst-case input.
    #[test]
    fn q15_error_within_bound(n in prop::sample::select(TAP_COUNTS.to_vec()), raw in prop::collection::vec(-1.0f64..1.0, 64), seed in any::<u64>(), mode in rounding()) {
        let (ideal, quantized) = quantize(&raw[..n], 15);
        let q: Vec<i16> = quantized.iter().map(|&v| v as i16).collect();
        let bound = ErrorBound::new::<i16, i16>(&ideal, &q, InputRange::FULL, mode).unwrap();
        let report = Headroom::q15(&q, InputRange::FULL);
        with_tap_count!(n, |N| {
            let taps: [i16; N] = q.as_slice().try_into().unwrap();
            let ideal_taps: [f64; N] = ideal.as_slice().try_into().unwrap();
            let mut fir = Fir::<i16, N>::new(&taps).unwrap().with_rounding(mode);
            let random: Vec<i16> = inputs_in(report.input(), 400, seed).into_iter().map(|v| v as i16).collect();
            let measured = measure_deviation(&mut fir, &ideal_taps, random);
            prop_assert!(measured.max_lsb <= bound.lsb(), "random: {} > {}", measured.max_lsb, bound.lsb());
            prop_assert_eq!(measured.saturated, 0);
            fir.reset();
            let worst = error_worst_case(&ideal, &quantized, 32767, 32768);
            let measured = measure_deviation(&mut fir, &ideal_taps, worst.iter().map(|&v| v as i16));
            prop_assert!(measured.max_lsb <= bound.lsb());
            // Tight, not vacuous: on the input that lines up every tap error, the measured
            // error comes within a factor of 4 of the bound (for tables long enough that tap
            // quantization, not the half-LSB output rounding, dominates).
            if n >= 13 {
                prop_assert!(measured.max_lsb >= bound.lsb() / 4.0, "{} vs bound {}", measured.max_lsb, bound.lsb());
            }
        });
    }

    /// The same for Q31.
    #[test]
    fn q31_error_within_bound(n in prop::sample::select(TAP_COUNTS.to_vec()), raw in prop::collection::vec(-1.0f64..1.0, 64), seed in any::<u64>(), mode in rounding()) {
        let (ideal, quantized) = quantize(&raw[..n], 31);
        let q: Vec<i32> = quantized.iter().map(|&v| v as i32).collect();
        let bound = ErrorBound::new::<i32, i32>(&ideal, &q, InputRange::FULL, mode).unwrap();
        with_tap_count!(n, |N| {
            let taps: [i32; N] = q.as_slice().try_into().unwrap();
            let ideal_taps: [f64; N] = ideal.as_slice().try_into().unwrap();
            let mut fir = Fir::<i32, N>::new(&taps).unwrap().with_rounding(mode);
            let random: Vec<i32> = inputs_in(InputRange::FULL.within_word(32), 400, seed).into_iter().map(|v| v as i32).collect();
            let measured = measure_deviation(&mut fir, &ideal_taps, random);
            prop_assert!(measured.max_lsb <= bound.lsb() * (1.0 + 1e-9), "random: {} > {}", measured.max_lsb, bound.lsb());
            fir.reset();
            let worst = error_worst_case(&ideal, &quantized, i64::from(i32::MAX), 1i64 << 31);
            let measured = measure_deviation(&mut fir, &ideal_taps, worst.iter().map(|&v| v as i32));
            prop_assert!(measured.max_lsb <= bound.lsb() * (1.0 + 1e-9));
            if n >= 13 {
                prop_assert!(measured.max_lsb >= bound.lsb() / 4.0, "{} vs bound {}", measured.max_lsb, bound.lsb());
            }
        });
    }
}

/// Float taps scaled to Σ|h| = 0.9 (so no output saturates), and their nearest codes with
/// `frac` fractional bits (as raw integers).
fn quantize(raw: &[f64], frac: u32) -> (Vec<f64>, Vec<i64>) {
    let l1: f64 = raw.iter().map(|v| v.abs()).sum::<f64>().max(1e-9);
    let ideal: Vec<f64> = raw.iter().map(|v| v * 0.9 / l1).collect();
    let scale = (1u64 << frac) as f64;
    let q = ideal.iter().map(|v| (v * scale).round() as i64).collect();
    (ideal, q)
}

/// The input, oldest first, that lines every tap's quantization error up with the same sign:
/// x[n−k] = sign(h_q[k] − h[k])·full scale.
fn error_worst_case(ideal: &[f64], quantized: &[i64], max: i64, scale: i64) -> Vec<i64> {
    ideal
        .iter()
        .zip(quantized)
        .rev()
        .map(|(&h, &q)| {
            if q as f64 / scale as f64 >= h {
                max
            } else {
                -max
            }
        })
        .collect()
}

// ---------------------------------------------------------------------------------------------
// The proven 32-bit accumulator: equal to the default path, bit for bit, inputs clamped.
// ---------------------------------------------------------------------------------------------

/// 5-point Savitzky–Golay smoother in Q15 (see worked_examples.rs): Σ|h| ≈ 1.34 fits i32 for
/// full-scale 16-bit input.
struct SavitzkyGolay5;
impl ProvenTaps for SavitzkyGolay5 {
    const TAPS: &'static [i16] = &[-2809, 11235, 15916, 11235, -2809];
    const INPUT: InputRange = InputRange::FULL;
}

/// Gain ≈ 8 (eight taps of 1.0 − 2^−15): only a 12-bit right-aligned ADC keeps it in i32.
struct Boost8;
impl ProvenTaps for Boost8 {
    const TAPS: &'static [i16] = &[32767; 8];
    const INPUT: InputRange = match InputRange::adc(12, Align::Right, 16) {
        Ok(r) => r,
        Err(_) => panic!("bad ADC description"),
    };
}

/// A unipolar 12-bit ADC (codes 0..=4095) and a 64-tap moving average with a derivative-like
/// twist: mixed signs, Σ|h| = 4.
struct Unipolar64;
const UNIPOLAR_TAPS: [i16; 64] = {
    let mut t = [2048i16; 64];
    let mut i = 0;
    while i < 64 {
        if i % 3 == 0 {
            t[i] = -2048;
        }
        i += 1;
    }
    t
};
impl ProvenTaps for Unipolar64 {
    const TAPS: &'static [i16] = &UNIPOLAR_TAPS;
    const INPUT: InputRange = match InputRange::codes(0, 4095) {
        Ok(r) => r,
        Err(_) => panic!("bad range"),
    };
}

/// Feeds the same raw codes to a proven `Acc32` filter and to the default `i64` filter (after
/// clamping to the proven range) and requires identical outputs; the proven filter's counter
/// adds the clamps.
fn check_proven<P: ProvenTaps, const N: usize>(x: &[i16], mode: Rounding) {
    let proven: Fir<'static, i16, N, i16, Acc32<P>> = Fir::proven();
    let mut fast = proven.with_rounding(mode);
    let taps: &'static [i16; N] = P::TAPS.try_into().unwrap();
    let mut reference = Fir::<i16, N>::new(taps).unwrap().with_rounding(mode);
    let range = P::INPUT.including_zero().within_word(16);
    let mut clamps = 0;
    let mut trace = AccTrace::new();
    for &v in x {
        let kept = range.clamp(v.into()) as i16;
        clamps += u32::from(i64::from(kept) != i64::from(v));
        assert_eq!(fast.push_traced(v, &mut trace), reference.push(kept));
    }
    assert_eq!(fast.saturations(), reference.saturations() + clamps);
    // What the proof promised: the trace never needed more than 32 bits.
    assert!(trace.bits_used() <= 32);
    assert!(Headroom::q15(P::TAPS, P::INPUT).fits(32));
}

proptest! {
    #![proptest_config(cases::config())]

    #[test]
    fn proven_accumulator_equals_default_path(x in prop::collection::vec(any::<i16>(), 0..300), mode in rounding()) {
        check_proven::<SavitzkyGolay5, 5>(&x, mode);
        check_proven::<Boost8, 8>(&x, mode);
        check_proven::<Unipolar64, 64>(&x, mode);
    }

    #[test]
    fn proven_accumulator_on_worst_case_inputs(mode in rounding()) {
        for (p, x) in [
            ("sg", worst_pair(SavitzkyGolay5::TAPS, SavitzkyGolay5::INPUT)),
            ("boost", worst_pair(Boost8::TAPS, Boost8::INPUT)),
            ("unipolar", worst_pair(Unipolar64::TAPS, Unipolar64::INPUT)),
        ] {
            match p {
                "sg" => check_proven::<SavitzkyGolay5, 5>(&x, mode),
                "boost" => check_proven::<Boost8, 8>(&x, mode),
                _ => check_proven::<Unipolar64, 64>(&x, mode),
            }
        }
    }
}

fn worst_pair(taps: &[i16], range: InputRange) -> Vec<i16> {
    let report = Headroom::q15(taps, range);
    report
        .worst_case_input(taps, Extreme::High)
        .chain(report.worst_case_input(taps, Extreme::Low))
        .chain(report.worst_case_input(taps, Extreme::High))
        .map(|v| v as i16)
        .collect()
}

#[test]
fn proven_filter_works_with_fixed_samples() {
    // 4.12 samples (a 12-bit ADC code as I4F12) through the proven Q15 smoother.
    let mut fir: Fir<'static, I4F12, 5, i16, Acc32<SavitzkyGolay5>> = Fir::proven();
    let mut last = I4F12::ZERO;
    for _ in 0..5 {
        last = fir.push(I4F12::from_num(1.5));
    }
    assert_eq!(last, I4F12::from_num(1.5)); // DC gain exactly 1 (taps sum to 32768)
}

// ---------------------------------------------------------------------------------------------
// Published values and facts of the trade.
// ---------------------------------------------------------------------------------------------

/// Worst-case (L1-norm) scaling: |y| ≤ max|x|·Σ|h|, guard bits ⌈log2 Σ|h|⌉ (A. V. Oppenheim &
/// R. W. Schafer, *Discrete-Time Signal Processing*, 3rd ed., 2010, §6.9 — section number from
/// memory). Worked on the 5-point Savitzky–Golay smoother (−3, 12, 17, 12, −3)/35 (Savitzky &
/// Golay, Anal. Chem. 36(8), 1964, as corrected by Steinier, Termonia & Deltour, Anal. Chem.
/// 44(11), 1972): Σ|h| = 47/35 ⇒ 1 guard bit; in Q15 with full-scale input the exact bound is
/// Y_max = (41·32767 + 6·32768)/35 = 44001.571… LSB (from memory, recomputed here).
#[test]
fn savitzky_golay_guard_bit_and_bound() {
    let q15 = [-2809i16, 11235, 15916, 11235, -2809];
    let report = Headroom::q15(&q15, InputRange::FULL);
    assert_eq!(report.guard_bits(), 1);
    assert_eq!((47.0f64 / 35.0).log2().ceil(), 1.0);
    // The quantized taps' norm differs from 47/35 by at most the quantization error.
    let ideal = [-3.0, 12.0, 17.0, 12.0, -3.0].map(|v: f64| v / 35.0);
    let tap_error: f64 = ideal
        .iter()
        .zip(q15)
        .map(|(h, q)| (f64::from(q) / 32768.0 - h).abs())
        .sum();
    assert!((report.l1_norm() - 47.0 / 35.0).abs() <= tap_error + 1e-12);
    let y_max_ideal: f64 = (41.0 * 32767.0 + 6.0 * 32768.0) / 35.0;
    assert!((y_max_ideal - 44_001.571_428).abs() < 1e-3);
    let (_, hi) = report.output_range(Rounding::HalfUp);
    assert!((hi as f64 - y_max_ideal).abs() <= 32768.0 * tap_error + 0.5);
    assert!(report.can_saturate(Rounding::HalfUp)); // 44002 > 32767
}

/// Guard bits = ⌈log2 Σ|h|⌉ for full-scale input (common practice), on tap sets whose Σ|h| is
/// well away from a power of two.
#[test]
fn guard_bits_follow_the_l1_norm() {
    for (l1, taps) in [
        (0.75, vec![8192i16, 16384]),
        (1.5, vec![16384, 16384, 16384]),
        (2.5, vec![32767, 32767, 16384]),
        (6.5, vec![-32768; 6].into_iter().chain([16384]).collect()),
    ] {
        let report = Headroom::q15(&taps, InputRange::FULL);
        assert!((report.l1_norm() - l1).abs() < 1e-3);
        assert_eq!(
            report.guard_bits(),
            l1.log2().ceil().max(0.0) as u32,
            "Σ|h| = {l1}"
        );
    }
}

/// Q15 and Q31 ranges (ISO/IEC TR 18037:2008 fixed-point types; common practice): Q15 is
/// [−1, 1 − 2^−15] with LSB 2^−15 = 3.0517578125e−5; Q31's largest value is 1 − 2^−31 =
/// 0.9999999995343387.
#[test]
fn q_format_ranges() {
    assert_eq!(i16::MIN.to_f64(), -1.0);
    assert_eq!(i16::MAX.to_f64(), 1.0 - 2f64.powi(-15));
    assert_eq!(1i16.to_f64(), 3.0517578125e-5);
    assert_eq!(i32::MAX.to_f64(), 0.9999999995343387);
    assert_eq!(<i16 as FixedPoint>::RAW_MIN, -32768);
    // A single Q15·Q15 product (Q30) always fits i32, even (−1)·(−1) = 2^30 (ITU-T G.191
    // basic operators; common practice): one tap of −1.0 needs 32 accumulator bits, not 33.
    let report = Headroom::q15(&[i16::MIN], InputRange::FULL);
    assert_eq!(report.accumulator_range(), (-(32768 * 32767), 1 << 30));
    assert_eq!(report.accumulator_bits(), 32);
}

/// Q31 taps with Σ|h| ≤ 1 leave exactly one spare bit in the default i64 accumulator.
#[test]
fn q31_default_accumulator_has_one_spare_bit() {
    let taps = [1 << 29, 1 << 30, 1 << 29]; // 0.25, 0.5, 0.25
    let report = Headroom::q31(&taps, InputRange::FULL);
    assert_eq!(report.spare_bits(64), 1);
    assert_eq!(report.safe_accumulator(), AccWidth::Bits64);
}

#[test]
fn input_ranges_describe_adcs() {
    // A 12-bit ADC left-aligned in 16 bits: codes step by 2^4.
    let left = InputRange::adc(12, Align::Left, 16).unwrap();
    assert_eq!((left.min(), left.max()), (-32768, 2047 * 16));
    let right = InputRange::adc(24, Align::Right, 32).unwrap();
    assert_eq!((right.min(), right.max()), (-(1 << 23), (1 << 23) - 1));
    assert_eq!(
        InputRange::adc(0, Align::Left, 16),
        Err(Error::InvalidRange)
    );
    assert_eq!(
        InputRange::adc(17, Align::Left, 16),
        Err(Error::InvalidRange)
    );
    assert_eq!(InputRange::codes(5, 4), Err(Error::InvalidRange));
    // Right-aligned 12 bits leave 4 guard bits for a gain-16 filter in i32.
    let loud = [32767i16; 16];
    assert!(Headroom::q15(&loud, InputRange::adc(12, Align::Right, 16).unwrap()).fits(32));
    assert!(!Headroom::q15(&loud, InputRange::FULL).fits(32));
}

#[test]
fn error_bound_checks_lengths_and_rounding() {
    let e = ErrorBound::new::<i16, i16>(&[0.5, 0.5], &[16384], InputRange::FULL, Rounding::HalfUp);
    assert_eq!(
        e,
        Err(Error::TapCountMismatch {
            ideal: 2,
            quantized: 1
        })
    );
    let exact = ErrorBound::new::<i16, i16>(
        &[0.5, 0.25],
        &[16384, 8192],
        InputRange::FULL,
        Rounding::Truncate,
    )
    .unwrap();
    assert_eq!(
        (exact.quantization_lsb(), exact.rounding_lsb(), exact.lsb()),
        (0.0, 1.0, 1.0)
    );
}

#[test]
fn report_prints_its_verdict() {
    let text = Headroom::q15(&[8192, 16384, 8192], InputRange::FULL).to_string();
    assert!(text.contains("cannot saturate"), "{text}");
    assert!(text.contains("sum |h| = 1.000000"), "{text}");
    let loud = Headroom::q15(&[32767, 32767], InputRange::FULL).to_string();
    assert!(loud.contains("CAN SATURATE"), "{loud}");
}

/// The f32 error bound holds for a real f32 filter: full-scale alternating and random inputs
/// through `Fir<f32>` stay within `f32_error_bound` of the test's own float64 filter, and the
/// bound equals the four terms as the test writes them from Higham's γ_n (N. J. Higham,
/// *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM 2002, §3.1).
#[test]
fn f32_bound_holds_and_matches_its_terms() {
    let ideal: Vec<f64> = (0..31)
        .map(|k| {
            let t = k as f64 - 15.0;
            if t == 0.0 {
                0.3
            } else {
                (0.3 * std::f64::consts::PI * t).sin() / (std::f64::consts::PI * t)
            }
        })
        .collect();
    let taps32: Vec<f32> = ideal.iter().map(|&h| h as f32).collect();
    let mut taps = [0.0f32; 31];
    taps.copy_from_slice(&taps32);
    let largest = 2047.5;
    let bound = f32_error_bound(&ideal, &taps32, largest);
    let x32 = largest * (1.0 + U_F32);
    let own = ideal
        .iter()
        .zip(&taps32)
        .map(|(h, t)| (f64::from(*t) - h).abs() * x32 + h.abs() * U_F32 * largest)
        .sum::<f64>()
        + gamma(31, U_F32) * taps32.iter().map(|t| f64::from(*t).abs()).sum::<f64>() * x32
        + gamma(31, U_F64) * ideal.iter().map(|h| h.abs()).sum::<f64>() * largest;
    assert!((bound - own).abs() <= 1e-12 * own, "{bound} vs {own}");
    assert_eq!(tapline::headroom::gamma(31, U_F32), gamma(31, U_F32));
    let mut seed = 7u64;
    let x: Vec<f64> = (0..4000)
        .map(|i| {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            if i < 1000 {
                if i % 2 == 0 { largest } else { -largest }
            } else {
                ((seed >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0) * largest
            }
        })
        .collect();
    let reference = fir_f64(&ideal, &x);
    let mut fir = Fir::<f32, 31>::new(&taps).unwrap();
    let mut worst = 0.0f64;
    for (xi, r) in x.iter().zip(&reference) {
        let y = f64::from(fir.push(*xi as f32));
        worst = worst.max((y - r).abs());
    }
    assert!(
        worst > 0.0 && worst <= bound,
        "worst {worst} vs bound {bound}"
    );
}

/// The headroom verdict: safe exactly when the exact model's worst-case sums fit 64 bits and
/// the rounded output stays in the word, for every rounding mode. Q15 taps summing to just
/// under 1 are safe; taps summing to 1 + 2⁻¹⁵ let a full-scale input exceed the word (a fact
/// of two's complement: −32768·(1 + 2⁻¹⁵) = −32769 lies below the word's −32768).
#[test]
fn headroom_verdict_follows_the_exact_model() {
    for (taps, safe) in [
        (vec![8192i16, 16383, 8192], true),
        (vec![8192i16, 16385, 8192], false),
        (vec![-32768i16, 32767], false),
    ] {
        let h = Headroom::q15(&taps, InputRange::FULL);
        let wide: Vec<i64> = taps.iter().map(|&t| i64::from(t)).collect();
        for mode in [Rounding::HalfUp, Rounding::Truncate, Rounding::HalfEven] {
            let mut fits = true;
            for extreme in [Extreme::High, Extreme::Low] {
                let worst: Vec<i64> = h.worst_case_input(&taps, extreme).collect();
                let acc = sum_at_end(&wide, &worst);
                let (_, clamped) = finish_exact(acc, 15, 16, mode);
                fits &= !clamped && i64::try_from(acc).is_ok();
            }
            assert_eq!(h.is_safe(mode), fits, "{taps:?} {mode:?}");
            assert_eq!(h.is_safe(mode), safe, "{taps:?} {mode:?}");
        }
    }
}
