//! Taps known only at run time (a slice of 1 to N taps in a filter of capacity N) and the
//! run-time headroom check, against the exact i128 model in `common` (written from the
//! definition of the convolution sum, rounding and saturation) and against the filters of a
//! compile-time length, bit for bit.

mod common;

use common::*;
use proptest::prelude::*;
use tapline::filter::{DecimatorUpTo, FirUpTo, MultiChannelFirUpTo};
use tapline::headroom::{Acc32Checked, Align, CheckedTaps, InputRange};
use tapline::num::RuntimeChecked;
use tapline::{Decimator, Error, Fir, MulAcc, MultiChannelFir, Rounding, Sample};

/// The capacity of every run-time filter below: at least the longest instantiated tap count.
const CAP: usize = 64;

fn rounding() -> impl Strategy<Value = Rounding> {
    prop::sample::select(Rounding::ALL.to_vec())
}

/// Raw codes of a `bits`-wide format, the extremes and zero over-represented.
fn raw_code(bits: u32) -> impl Strategy<Value = i64> {
    let max = (1i64 << (bits - 1)) - 1;
    prop_oneof![1 => Just(-max - 1), 1 => Just(max), 1 => Just(0i64), 6 => -max - 1..=max]
}

/// Raw taps of an instantiated count at a random scale.
fn raw_taps(bits: u32) -> impl Strategy<Value = Vec<i64>> {
    (prop::sample::select(TAP_COUNTS.to_vec()), 0u32..=10).prop_flat_map(move |(n, shift)| {
        prop::collection::vec(raw_code(bits), n)
            .prop_map(move |v| v.into_iter().map(|h| h >> shift).collect::<Vec<_>>())
    })
}

fn inputs(bits: u32) -> impl Strategy<Value = Vec<i64>> {
    prop::collection::vec(raw_code(bits), 0..200)
}

fn block_sizes() -> impl Strategy<Value = Vec<usize>> {
    prop::collection::vec(0usize..=70, 1..6)
}

/// The exact model's outputs and saturation count for raw taps `h` and raw inputs `x`.
fn exact(h: &[i64], x: &[i64], frac: u32, bits: u32, mode: Rounding) -> (Vec<i64>, u32) {
    let model: Vec<(i128, bool)> = fir_exact(h, x)
        .into_iter()
        .map(|acc| finish_exact(acc, frac, bits, mode))
        .collect();
    let outputs = model.iter().map(|&(v, _)| v as i64).collect();
    (outputs, model.iter().filter(|&&(_, s)| s).count() as u32)
}

/// Per sample, per block with the given splits, and in place: the outputs of `fir`.
fn every_way<
    S: MulAcc<T, W>,
    T: Sample + 'static,
    W,
    H: tapline::filter::TapTable<'static, T, CAP>,
>(
    fir: &mut Fir<'static, S, CAP, T, W, H>,
    xs: &[S],
    sizes: &[usize],
) -> [(Vec<S>, u32); 3] {
    fir.reset();
    let per_sample: Vec<S> = xs.iter().map(|&v| fir.push(v)).collect();
    let first = fir.clear_saturations();
    fir.reset();
    let mut blocked = vec![S::ZERO; xs.len()];
    let mut at = 0;
    for len in block_lengths(xs.len(), sizes) {
        fir.process(&xs[at..at + len], &mut blocked[at..at + len])
            .unwrap();
        at += len;
    }
    let second = fir.clear_saturations();
    fir.reset();
    let mut in_place = xs.to_vec();
    let mut at = 0;
    for len in block_lengths(xs.len(), sizes) {
        fir.process_in_place(&mut in_place[at..at + len]);
        at += len;
    }
    [
        (per_sample, first),
        (blocked, second),
        (in_place, fir.saturations()),
    ]
}

/// A run-time tap set in a capacity of 64 against the exact model and against `Fir<S, N>` of
/// the same taps, bit for bit, every way of calling it.
fn check_fixed<S, T, W, const N: usize>(h: &[i64], x: &[i64], sizes: &[usize], mode: Rounding)
where
    S: MulAcc<T, W> + Raw + tapline::num::FixedPoint,
    T: Sample + Raw + 'static,
    W: RuntimeChecked,
{
    let taps: &'static [T] = Vec::leak(h.iter().map(|&v| T::from_raw(v)).collect());
    let table: &'static [T; N] = taps.try_into().unwrap();
    let xs: Vec<S> = x.iter().map(|&v| <S as Raw>::from_raw(v)).collect();
    let fixed = Fir::<S, N, T, W>::with_accumulator(table);
    let run_time = FirUpTo::<S, CAP, T, W>::with_taps(taps);
    let (mut fixed, mut run_time) = match (fixed, run_time) {
        (Ok(a), Ok(b)) => (a.with_rounding(mode), b.with_rounding(mode)),
        (Err(a), Err(b)) => {
            assert_eq!(
                (a, b),
                (Error::AccumulatorOverflow, Error::AccumulatorOverflow)
            );
            return;
        }
        (a, b) => panic!(
            "the two forms disagree on taps {h:?}: {:?} vs {:?}",
            a.err(),
            b.err()
        ),
    };
    assert_eq!(run_time.tap_count(), N);
    assert_eq!(run_time.capacity(), CAP);
    let (want, saturations) = exact(h, x, T::FRAC, <S as Raw>::BITS, mode);
    let want: Vec<S> = want.into_iter().map(<S as Raw>::from_raw).collect();
    let compile_time: Vec<S> = xs.iter().map(|&v| fixed.push(v)).collect();
    assert_eq!(compile_time, want);
    for (way, (got, count)) in every_way(&mut run_time, &xs, sizes).into_iter().enumerate() {
        assert_eq!(
            got, want,
            "way {way}, taps {h:?}, splits {sizes:?}, {mode:?}"
        );
        assert_eq!(count, saturations, "way {way}");
    }
}

proptest! {
    #![proptest_config(cases::config())]

    #[test]
    fn q15_run_time_taps_match_exact_model(h in raw_taps(16), x in inputs(16), sizes in block_sizes(), mode in rounding()) {
        with_tap_count!(h.len(), |N| check_fixed::<i16, i16, tapline::num::DefaultAcc, N>(&h, &x, &sizes, mode));
    }

    #[test]
    fn q31_run_time_taps_match_exact_model(h in raw_taps(32), x in inputs(32), sizes in block_sizes(), mode in rounding()) {
        with_tap_count!(h.len(), |N| check_fixed::<i32, i32, tapline::num::DefaultAcc, N>(&h, &x, &sizes, mode));
        with_tap_count!(h.len(), |N| check_fixed::<i32, i32, tapline::num::Acc128, N>(&h, &x, &sizes, mode));
    }

    /// f32: the same float operations in the same order as `Fir<f32, N>`, so the same bits.
    #[test]
    fn f32_run_time_taps_equal_compile_time_bits(n in prop::sample::select(TAP_COUNTS.to_vec()), v in prop::collection::vec(-2.0f32..2.0, 64 + 200), sizes in block_sizes()) {
        let (h, x) = v.split_at(64);
        let mut x = x.to_vec();
        x[7] = f32::NAN;
        x[9] = f32::INFINITY;
        let taps: &'static [f32] = Vec::leak(h[..n].to_vec());
        with_tap_count!(n, |N| {
            let table: &'static [f32; N] = taps.try_into().unwrap();
            let mut fixed = Fir::<f32, N>::new(table).unwrap();
            let want: Vec<u32> = x.iter().map(|&s| fixed.push(s).to_bits()).collect();
            let mut run_time = FirUpTo::<f32, CAP>::with_taps(taps).unwrap();
            for (way, (got, _)) in every_way(&mut run_time, &x, &sizes).into_iter().enumerate() {
                let got: Vec<u32> = got.iter().map(|y| y.to_bits()).collect();
                prop_assert_eq!(&got, &want, "way {}", way);
            }
            // And within Higham's bound γ_n(2^-24)·Σ|h||x| of the float64 reference (Higham,
            // Accuracy and Stability of Numerical Algorithms, 2nd ed., 2002, §3.1), where finite.
            let h64: Vec<f64> = taps.iter().map(|&t| t.into()).collect();
            let x64: Vec<f64> = x.iter().map(|&t| t.into()).collect();
            let reference = fir_f64(&h64, &x64);
            let magnitude = fir_abs_f64(&h64, &x64);
            let bound = gamma(n, 2f64.powi(-24)) + gamma(n, 2f64.powi(-53));
            for i in 0..x.len() {
                if reference[i].is_finite() && magnitude[i].is_finite() {
                    let err = (f64::from(f32::from_bits(want[i])) - reference[i]).abs();
                    prop_assert!(err <= bound * magnitude[i], "i={} err={}", i, err);
                }
            }
        });
    }

    /// The run-time check accepts exactly the tap sets whose exact worst-case sum over inputs
    /// in the range (0 included) fits i32 — bounds computed here in i128 from the definition —
    /// and says by how much each bound is exceeded otherwise. Accepted filters equal the exact
    /// model of the clamped inputs, bit for bit, every way of calling them.
    #[test]
    fn run_time_check_accepts_exactly_what_fits_i32(h in raw_taps(16), x in inputs(16), sizes in block_sizes(), range in range16(), mode in rounding()) {
        let taps: &'static [i16] = Vec::leak(h.iter().map(|&v| v as i16).collect());
        let (lo, hi) = {
            let (a, b) = (range.min().clamp(-32768, 32767), range.max().clamp(-32768, 32767));
            (a.min(0), b.max(0))
        };
        let high: i128 = h.iter().map(|&t| (i128::from(t) * i128::from(lo)).max(i128::from(t) * i128::from(hi))).sum();
        let low: i128 = h.iter().map(|&t| (i128::from(t) * i128::from(lo)).min(i128::from(t) * i128::from(hi))).sum();
        let above = (high - i128::from(i32::MAX)).max(0) as u64;
        let below = (i128::from(i32::MIN) - low).max(0) as u64;
        match CheckedTaps::check(taps, range) {
            Err(e) => {
                prop_assert!(above > 0 || below > 0, "refused taps that fit: {:?}", h);
                prop_assert_eq!(e, Error::Acc32Overflow { above, below });
            }
            Ok(checked) => {
                prop_assert!(above == 0 && below == 0, "accepted taps that do not fit: {:?}", h);
                prop_assert_eq!(checked.width().input(), (lo as i16, hi as i16));
                let mut fir = FirUpTo::<i16, CAP, i16, Acc32Checked>::with_checked(checked)
                    .unwrap()
                    .with_rounding(mode);
                let kept: Vec<i64> = x.iter().map(|&v| v.clamp(lo, hi)).collect();
                let clamps = x.iter().zip(&kept).filter(|(a, b)| a != b).count() as u32;
                let (want, saturations) = exact(&h, &kept, 15, 16, mode);
                let xs: Vec<i16> = x.iter().map(|&v| v as i16).collect();
                let want: Vec<i16> = want.into_iter().map(|v| v as i16).collect();
                for (way, (got, count)) in every_way(&mut fir, &xs, &sizes).into_iter().enumerate() {
                    prop_assert_eq!(&got, &want, "way {}", way);
                    prop_assert_eq!(count, saturations + clamps, "way {}", way);
                }
                // The worst-case sequences of the range, after the random input: still exact.
                let worst: Vec<i64> = h.iter().rev().map(|&t| if t > 0 { hi } else { lo })
                    .chain(h.iter().rev().map(|&t| if t > 0 { lo } else { hi }))
                    .collect();
                let mut tail = kept.clone();
                tail.extend(&worst);
                let (want_tail, _) = exact(&h, &tail, 15, 16, mode);
                fir.reset();
                for (n, &v) in tail.iter().enumerate() {
                    prop_assert_eq!(i64::from(fir.push(v as i16)), want_tail[n], "worst case at {}", n);
                }
                // The checked decimator by 3 from a start phase, flushed: every 3rd output from
                // the phase of the full convolution (the input zero-padded by K − 1). The tail
                // sums fewer taps than the proof covered, which stays within it (the range
                // holds 0, and a dropped term is a term times 0).
                let phase = tail.len() % 3;
                let mut dec = DecimatorUpTo::<i16, CAP, 3, i16, Acc32Checked>::with_checked(checked)
                    .and_then(|d| d.with_start_phase(phase))
                    .unwrap()
                    .with_rounding(mode);
                let mut padded = tail.clone();
                padded.extend(std::iter::repeat_n(0, h.len() - 1));
                let (full, _) = exact(&h, &padded, 15, 16, mode);
                let want: Vec<i16> = full.iter().skip(phase).step_by(3).map(|&v| v as i16).collect();
                let ins: Vec<i16> = tail.iter().map(|&v| v as i16).collect();
                let mut got = vec![0i16; dec.outputs_for(ins.len())];
                prop_assert_eq!(dec.process(&ins, &mut got), Ok(got.len()));
                let mut rest = vec![0i16; dec.tail_len()];
                prop_assert_eq!(dec.flush(&mut rest), Ok(rest.len()));
                got.extend(rest);
                prop_assert_eq!(got, want, "checked decimator from phase {}, flushed", phase);
            }
        }
    }

    /// Replacing the taps (another length, up to the capacity) keeps the history: from then on
    /// the outputs are the exact model of the new taps over the whole input.
    #[test]
    fn replaced_taps_continue_on_the_kept_history(h1 in raw_taps(16), h2 in raw_taps(16), x in prop::collection::vec(raw_code(16), 0..150), cut in 0usize..150, mode in rounding()) {
        let first: Vec<i16> = h1.iter().map(|&v| v as i16).collect();
        let second: Vec<i16> = h2.iter().map(|&v| v as i16).collect();
        let cut = cut.min(x.len());
        let mut fir = FirUpTo::<i16, CAP>::with_taps(&first).unwrap().with_rounding(mode);
        let xs: Vec<i16> = x.iter().map(|&v| v as i16).collect();
        let mut got: Vec<i16> = xs[..cut].iter().map(|&v| fir.push(v)).collect();
        fir.set_taps(&second).unwrap();
        let mut rest = xs[cut..].to_vec();
        fir.process_in_place(&mut rest);
        got.extend(rest);
        let (before, _) = exact(&h1, &x[..cut], 15, 16, mode);
        let (after, _) = exact(&h2, &x, 15, 16, mode);
        let want: Vec<i16> = before.iter().chain(&after[cut..]).map(|&v| v as i16).collect();
        prop_assert_eq!(got, want);
    }

    /// The decimator and the multi-channel filter with run-time taps equal their compile-time
    /// forms bit for bit, and the exact model (every M-th output; each channel alone).
    #[test]
    fn structures_with_run_time_taps(h in raw_taps(16), x in prop::collection::vec(raw_code(16), 0..200), mode in rounding()) {
        let taps: &'static [i16] = Vec::leak(h.iter().map(|&v| v as i16).collect());
        let xs: Vec<i16> = x.iter().map(|&v| v as i16).collect();
        let (full, _) = exact(&h, &x, 15, 16, mode);
        let every_third: Vec<i16> = full.iter().skip(2).step_by(3).map(|&v| v as i16).collect();
        with_tap_count!(h.len(), |N| {
            let table: &'static [i16; N] = taps.try_into().unwrap();
            let mut fixed = Decimator::<i16, N, 3>::new(table).unwrap().with_rounding(mode);
            let mut run_time = DecimatorUpTo::<i16, CAP, 3>::with_taps(taps).unwrap().with_rounding(mode);
            let a: Vec<i16> = xs.iter().filter_map(|&v| fixed.push(v)).collect();
            let mut b = vec![0; xs.len() / 3];
            prop_assert_eq!(run_time.process(&xs, &mut b).unwrap(), b.len());
            prop_assert_eq!(&a, &every_third);
            prop_assert_eq!(&b, &every_third);
            prop_assert_eq!(run_time.saturations(), fixed.saturations());

            let frames: Vec<i16> = xs.iter().flat_map(|&v| [v, v.saturating_neg()]).collect();
            let mut fixed = MultiChannelFir::<i16, N, 2>::new(table).unwrap().with_rounding(mode);
            let mut run_time = MultiChannelFirUpTo::<i16, CAP, 2>::with_taps(taps).unwrap().with_rounding(mode);
            let mut a = frames.clone();
            fixed.process_in_place(&mut a).unwrap();
            let mut b = frames.clone();
            run_time.process_in_place(&mut b).unwrap();
            prop_assert_eq!(&a, &b);
            let first: Vec<i16> = b.iter().step_by(2).copied().collect();
            let want: Vec<i16> = full.iter().map(|&v| v as i16).collect();
            prop_assert_eq!(first, want);
        });
    }
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
    ]
}

#[test]
fn capacity_edges() {
    static TAPS: [i16; 5] = [1, 2, 3, 4, 5];
    // One tap, and exactly the capacity.
    let mut one = FirUpTo::<i16, 4>::with_taps(&TAPS[..1]).unwrap();
    assert_eq!(one.push(i16::MIN), -1); // -32768 · 1 / 32768
    let mut full = FirUpTo::<i16, 4>::with_taps(&TAPS[..4]).unwrap();
    assert_eq!(full.tap_count(), full.capacity());
    let mut table = Fir::<i16, 4>::new(TAPS[..4].try_into().unwrap()).unwrap();
    for x in [i16::MAX, i16::MIN, 7, 0, -1, i16::MAX] {
        assert_eq!(full.push(x), table.push(x));
    }
    // More than the capacity, and none: refused by every structure and by the checked form.
    let too_many = Error::TooManyTaps {
        capacity: 4,
        found: 5,
    };
    assert_eq!(FirUpTo::<i16, 4>::with_taps(&TAPS).err(), Some(too_many));
    assert_eq!(FirUpTo::<i16, 4>::with_taps(&[]).err(), Some(Error::NoTaps));
    assert_eq!(
        DecimatorUpTo::<i16, 4, 2>::with_taps(&TAPS).err(),
        Some(too_many)
    );
    assert_eq!(
        DecimatorUpTo::<i16, 4, 2>::with_taps(&[]).err(),
        Some(Error::NoTaps)
    );
    assert_eq!(
        MultiChannelFirUpTo::<i16, 4, 3>::with_taps(&TAPS).err(),
        Some(too_many)
    );
    assert_eq!(
        MultiChannelFirUpTo::<i16, 4, 3>::with_taps(&[]).err(),
        Some(Error::NoTaps)
    );
    let checked = CheckedTaps::check(&TAPS, InputRange::FULL).unwrap();
    assert_eq!(
        FirUpTo::<i16, 4, i16, Acc32Checked>::with_checked(checked).err(),
        Some(too_many)
    );
    assert_eq!(
        DecimatorUpTo::<i16, 4, 2, i16, Acc32Checked>::with_checked(checked).err(),
        Some(too_many)
    );
    assert_eq!(
        MultiChannelFirUpTo::<i16, 4, 2, i16, Acc32Checked>::with_checked(checked).err(),
        Some(too_many)
    );
    let empty = CheckedTaps::check(&[], InputRange::FULL).unwrap();
    assert_eq!(
        FirUpTo::<i16, 4, i16, Acc32Checked>::with_checked(empty).err(),
        Some(Error::NoTaps)
    );
    // A refused replacement leaves the old taps in place.
    assert_eq!(full.set_taps(&TAPS), Err(too_many));
    assert_eq!(full.set_taps(&[]), Err(Error::NoTaps));
    assert_eq!(full.taps(), &TAPS[..4]);
    let loud = [i32::MIN; 3];
    let mut q31 = FirUpTo::<i32, 4>::with_taps(&[i32::MAX]).unwrap();
    assert_eq!(q31.set_taps(&loud), Err(Error::AccumulatorOverflow));
    assert_eq!(q31.tap_count(), 1);
}

#[test]
fn replacing_a_checked_tap_set_clamps_the_history_into_the_new_range() {
    let wide = CheckedTaps::check(&[i16::MAX], InputRange::FULL).unwrap();
    let mut fir = FirUpTo::<i16, 4, i16, Acc32Checked>::with_checked(wide).unwrap();
    for x in [i16::MIN, 5000, -3, i16::MAX] {
        fir.push(x);
    }
    assert_eq!(fir.saturations(), 0);
    // Gain 4 is safe only for 12-bit codes: the three history values outside are clamped.
    let narrow = CheckedTaps::check(&[32767; 4], InputRange::codes(-2048, 2047).unwrap()).unwrap();
    fir.set_checked(narrow).unwrap();
    assert_eq!(fir.saturations(), 3);
    assert_eq!(fir.width().input(), (-2048, 2047));
    // The next output sums the clamped history, as the exact model of the clamped inputs says.
    let (want, _) = exact(
        &[32767; 4],
        &[-2048, 2047, -3, 2047, 100],
        15,
        16,
        Rounding::HalfUp,
    );
    assert_eq!(i64::from(fir.push(100)), want[4]);
    // A refused replacement (too many taps) changes nothing.
    let long = CheckedTaps::check(&[1; 5], InputRange::FULL).unwrap();
    assert_eq!(
        fir.set_checked(long),
        Err(Error::TooManyTaps {
            capacity: 4,
            found: 5
        })
    );
    assert_eq!(fir.width().input(), (-2048, 2047));
}

#[test]
fn checked_filter_uses_the_range_it_was_checked_for() {
    // A unipolar 12-bit ADC (codes 0..=4095, invented for this test) and gain 8: fits i32
    // only because the codes are small. Negative inputs are clamped to 0, large ones to 4095.
    let taps = [32767i16; 8];
    let adc = InputRange::adc(12, Align::Right, 16).unwrap();
    assert!(CheckedTaps::check(&taps, InputRange::FULL).is_err());
    let unipolar = InputRange::codes(0, 4095).unwrap();
    let checked = CheckedTaps::check(&taps, unipolar).unwrap();
    assert_eq!(checked.width().input(), (0, 4095));
    assert_eq!(
        CheckedTaps::check(&taps, adc).unwrap().width().input(),
        (-2048, 2047)
    );
    let mut fir = FirUpTo::<i16, 8, i16, Acc32Checked>::with_checked(checked).unwrap();
    let mut block = [i16::MAX, -5, 4095, 4095, 4095, 4095, 4095, 4095];
    fir.process_in_place(&mut block);
    assert_eq!(fir.saturations(), 2);
    let (want, _) = exact(
        &[32767; 8],
        &[4095, 0, 4095, 4095, 4095, 4095, 4095, 4095],
        15,
        16,
        Rounding::HalfUp,
    );
    assert_eq!(block.map(i64::from).to_vec(), want);
}
