//! The one-line 128-bit-accumulator constructors (`Fir::new_wide`, `FirUpTo::with_taps_wide`,
//! `MultiChannelFir::new_wide`, `MultiChannelFirUpTo::with_taps_wide`,
//! `LinearPhaseFir::new_wide`, and the rate changers' `Decimator::new_wide`,
//! `DecimatorUpTo::with_taps_wide`, `Interpolator::new_wide`, `Resampler::new_wide`,
//! `HalfBandDecimator::new_wide`) against the exact `i128` model of `tests/common`, bit for bit:
//! every rounding mode, inputs that saturate, per sample and for random block splits. The taps
//! are drawn over the whole Q31 range (extremes over-represented), so most tap sets have
//! Σ|h| ≥ 2 and are refused by the `i64` default: the test counts them, to show the wide path
//! is what runs. All data is invented by the strategies.

mod common;
mod structure_models;

use common::*;
use fixed::types::I1F31;
use proptest::prelude::*;
use structure_models::{
    any_rounding, code, fir_finished, keep_every, overflows, signal, splits, upfirdn_finished,
};
use tapline::filter::{DecimatorUpTo, FirUpTo, MultiChannelFirUpTo};
use tapline::kernel::FoldMulAcc;
use tapline::num::{Acc128, FixedPoint};
use tapline::{
    Decimator, Fir, HalfBandDecimator, Interpolator, LinearPhaseFir, MulAcc, MultiChannelFir,
    Resampler, Rounding,
};

/// The model's outputs and saturation count for taps `h` on input `x`.
fn model<S: Raw>(h: &[i64], x: &[i64], mode: Rounding) -> (Vec<S>, u32) {
    let finished: Vec<(i128, bool)> = fir_exact(h, x)
        .into_iter()
        .map(|acc| finish_exact(acc, S::FRAC, S::BITS, mode))
        .collect();
    let outputs = finished
        .iter()
        .map(|&(v, _)| S::from_raw(v as i64))
        .collect();
    (outputs, finished.iter().filter(|f| f.1).count() as u32)
}

/// Runs `x` through a filter per sample, and through a fresh one block by block, returning both
/// output streams and saturation counts.
fn both_ways<S: Copy + Default, F>(
    mut fresh: impl FnMut() -> F,
    push: impl Fn(&mut F, S) -> S,
    process: impl Fn(&mut F, &[S], &mut [S]),
    saturations: impl Fn(&F) -> u32,
    x: &[S],
    sizes: &[usize],
) -> [(Vec<S>, u32); 2] {
    let mut f = fresh();
    let per_sample: Vec<S> = x.iter().map(|&v| push(&mut f, v)).collect();
    let first = saturations(&f);
    let mut f = fresh();
    let mut blocked = vec![S::default(); x.len()];
    let mut at = 0;
    for len in block_lengths(x.len(), sizes) {
        process(&mut f, &x[at..at + len], &mut blocked[at..at + len]);
        at += len;
    }
    [(per_sample, first), (blocked, saturations(&f))]
}

/// `Fir::new_wide` and `FirUpTo::with_taps_wide` (capacity 16) against the model.
fn check_fir<S, const N: usize>(h: &[i64], x: &[i64], sizes: &[usize], mode: Rounding) -> bool
where
    S: MulAcc<S> + MulAcc<S, Acc128> + FixedPoint + Raw + Default,
{
    let taps: [S; N] = core::array::from_fn(|k| <S as Raw>::from_raw(h[k]));
    let xs: Vec<S> = x.iter().map(|&v| <S as Raw>::from_raw(v)).collect();
    let want = model::<S>(h, x, mode);
    let refused_by_default = Fir::<S, N>::new(&taps).is_err();
    assert_eq!(
        refused_by_default,
        overflows(h, <S as Raw>::BITS, 64),
        "{h:?}"
    );
    let fixed = both_ways(
        || Fir::new_wide(&taps).unwrap().with_rounding(mode),
        |f, v| f.push(v),
        |f, i, o| f.process(i, o).unwrap(),
        |f| f.saturations(),
        &xs,
        sizes,
    );
    let run_time = both_ways(
        || {
            FirUpTo::<S, 16>::with_taps_wide(&taps[..])
                .unwrap()
                .with_rounding(mode)
        },
        |f, v| f.push(v),
        |f, i, o| f.process(i, o).unwrap(),
        |f| f.saturations(),
        &xs,
        sizes,
    );
    for got in fixed.iter().chain(&run_time) {
        assert_eq!(got, &want, "taps {h:?}, {mode:?}");
    }
    refused_by_default
}

/// `MultiChannelFir::new_wide` and `MultiChannelFirUpTo::with_taps_wide`, two channels (the
/// input and the input reversed, interleaved), each channel against the model.
fn check_multi<S, const N: usize>(h: &[i64], x: &[i64], sizes: &[usize], mode: Rounding)
where
    S: MulAcc<S> + MulAcc<S, Acc128> + FixedPoint + Raw + Default,
{
    let taps: [S; N] = core::array::from_fn(|k| <S as Raw>::from_raw(h[k]));
    let other: Vec<i64> = x.iter().rev().copied().collect();
    let (want0, sat0) = model::<S>(h, x, mode);
    let (want1, sat1) = model::<S>(h, &other, mode);
    let interleaved: Vec<S> = x
        .iter()
        .zip(&other)
        .flat_map(|(&a, &b)| [<S as Raw>::from_raw(a), <S as Raw>::from_raw(b)])
        .collect();
    let want: Vec<S> = want0
        .iter()
        .zip(&want1)
        .flat_map(|(&a, &b)| [a, b])
        .collect();
    // Frame by frame, and in blocks of whole frames.
    let frames: Vec<usize> = sizes.iter().map(|s| 2 * s).collect();
    let mut wide = MultiChannelFir::<S, N, 2>::new_wide(&taps)
        .unwrap()
        .with_rounding(mode);
    let mut run_time = MultiChannelFirUpTo::<S, 16, 2>::with_taps_wide(&taps[..])
        .unwrap()
        .with_rounding(mode);
    let per_frame: Vec<S> = interleaved
        .chunks(2)
        .flat_map(|c| wide.push([c[0], c[1]]))
        .collect();
    assert_eq!(per_frame, want, "taps {h:?}, {mode:?}");
    assert_eq!(wide.saturations(), sat0 + sat1);
    let mut blocked = vec![S::default(); interleaved.len()];
    let mut at = 0;
    for len in block_lengths(interleaved.len(), &frames) {
        let len = len - len % 2;
        if len == 0 {
            continue;
        }
        run_time
            .process(&interleaved[at..at + len], &mut blocked[at..at + len])
            .unwrap();
        at += len;
    }
    // A trailing odd remainder cannot occur: the input is whole frames.
    assert_eq!(at, interleaved.len());
    assert_eq!(blocked, want, "run-time taps {h:?}, {mode:?}");
    assert_eq!(run_time.saturations(), sat0 + sat1);
}

/// `LinearPhaseFir::new_wide` on symmetric taps (the first half mirrored) against the model.
fn check_linear_phase<S, const N: usize>(h: &[i64], x: &[i64], sizes: &[usize], mode: Rounding)
where
    S: FoldMulAcc<S> + FoldMulAcc<S, Acc128> + FixedPoint + Raw + Default,
{
    let h: Vec<i64> = (0..N).map(|k| h[k.min(N - 1 - k)]).collect();
    let taps: [S; N] = core::array::from_fn(|k| <S as Raw>::from_raw(h[k]));
    let xs: Vec<S> = x.iter().map(|&v| <S as Raw>::from_raw(v)).collect();
    let want = model::<S>(&h, x, mode);
    let got = both_ways(
        || LinearPhaseFir::new_wide(&taps).unwrap().with_rounding(mode),
        |f, v| f.push(v),
        |f, i, o| f.process(i, o).unwrap(),
        |f| f.saturations(),
        &xs,
        sizes,
    );
    for g in &got {
        assert_eq!(g, &want, "taps {h:?}, {mode:?}");
    }
}

/// Finished model outputs as samples.
fn samples<S: Raw>(finished: &[(i128, bool)]) -> Vec<S> {
    finished
        .iter()
        .map(|&(v, _)| S::from_raw(v as i64))
        .collect()
}

/// The rate changers' wide constructors on Q31 taps `h` (5 of them; the half-band form zeroes
/// the taps at even, non-zero distance from the centre): each whole signal, streamed per sample
/// and then flushed, equals the exact `upfirdn` model bit for bit (decimators from their
/// default start phase M − 1, the interpolator, a 3/2 resampler); the half-band decimator,
/// which has no flush, equals every second output of the exact FIR.
fn check_rate_changers(h: &[i64], x: &[i64], mode: Rounding) {
    let taps: [i32; 5] = core::array::from_fn(|k| h[k] as i32);
    let xs: Vec<i32> = x.iter().map(|&v| v as i32).collect();
    let model = |factors| samples::<i32>(&upfirdn_finished(h, x, factors, 31, 32, mode));
    let flushed = |mut got: Vec<i32>, tail: usize, flush: &mut dyn FnMut(&mut [i32]) -> usize| {
        let mut rest = vec![0; tail];
        assert_eq!(flush(&mut rest), tail);
        got.extend(rest);
        got
    };

    let mut dec = Decimator::<i32, 5, 3>::new_wide(&taps)
        .unwrap()
        .with_rounding(mode);
    let got: Vec<i32> = xs.iter().filter_map(|&v| dec.push(v)).collect();
    let tail = dec.tail_len();
    let got = flushed(got, tail, &mut |o| dec.flush(o).unwrap());
    assert_eq!(got, model((1, 3, 2)), "decimator, taps {h:?}, {mode:?}");

    let mut up_to = DecimatorUpTo::<i32, 8, 3>::with_taps_wide(&taps[..])
        .unwrap()
        .with_rounding(mode);
    let got: Vec<i32> = xs.iter().filter_map(|&v| up_to.push(v)).collect();
    let tail = up_to.tail_len();
    let got = flushed(got, tail, &mut |o| up_to.flush(o).unwrap());
    assert_eq!(
        got,
        model((1, 3, 2)),
        "run-time decimator, taps {h:?}, {mode:?}"
    );

    let mut up = Interpolator::<i32, 5, 2>::new_wide(&taps)
        .unwrap()
        .with_rounding(mode);
    let got: Vec<i32> = xs.iter().flat_map(|&v| up.push(v)).collect();
    let tail = up.tail_len();
    let got = flushed(got, tail, &mut |o| up.flush(o).unwrap());
    assert_eq!(got, model((2, 1, 0)), "interpolator, taps {h:?}, {mode:?}");

    let mut rs = Resampler::<i32, 4>::new_wide(&taps, 3, 2)
        .unwrap()
        .with_rounding(mode);
    let mut got = vec![0; rs.outputs_for(xs.len())];
    assert_eq!(rs.process(&xs, &mut got).unwrap(), got.len());
    let tail = rs.tail_len();
    let got = flushed(got, tail, &mut |o| rs.flush(o).unwrap());
    assert_eq!(got, model((3, 2, 0)), "resampler, taps {h:?}, {mode:?}");

    let half: Vec<i64> = (0..5)
        .map(|k| if k % 2 == 0 && k != 2 { 0 } else { h[k] })
        .collect();
    let half_taps: [i32; 5] = core::array::from_fn(|k| half[k] as i32);
    let mut hb = HalfBandDecimator::<i32, 5>::new_wide(&half_taps)
        .unwrap()
        .with_rounding(mode);
    let got: Vec<i32> = xs.iter().filter_map(|&v| hb.push(v)).collect();
    let want = samples::<i32>(&keep_every(&fir_finished(&half, x, 31, 32, mode), 2));
    assert_eq!(got, want, "half-band, taps {half:?}, {mode:?}");
}

proptest! {
    #![proptest_config(cases::config())]

    #[test]
    fn q31_wide_constructors_match_the_exact_model(
        h in prop::collection::vec(code(32), 8),
        x in signal(32),
        sizes in splits(),
        mode in any_rounding(),
    ) {
        check_fir::<i32, 1>(&h[..1], &x, &sizes, mode);
        check_fir::<i32, 3>(&h[..3], &x, &sizes, mode);
        check_fir::<i32, 8>(&h, &x, &sizes, mode);
        check_multi::<i32, 5>(&h[..5], &x, &sizes, mode);
        check_linear_phase::<i32, 7>(&h, &x, &sizes, mode);
        check_linear_phase::<i32, 6>(&h, &x, &sizes, mode);
        check_rate_changers(&h[..5], &x, mode);
    }

    #[test]
    fn fixed_i32_wide_constructors_match_the_exact_model(
        h in prop::collection::vec(code(32), 4),
        x in signal(32),
        sizes in splits(),
        mode in any_rounding(),
    ) {
        check_fir::<I1F31, 4>(&h, &x, &sizes, mode);
        check_multi::<I1F31, 4>(&h, &x, &sizes, mode);
        check_linear_phase::<I1F31, 3>(&h, &x, &sizes, mode);
    }
}

/// The strategies above must reach what only the wide accumulator takes: over a fixed set of
/// invented loud tables, the `i64` default refuses each and the wide constructor runs it.
#[test]
fn loud_tables_run_only_through_the_wide_constructors() {
    let x: Vec<i64> = [i32::MIN as i64, i32::MAX as i64, 0, -12345, i32::MIN as i64]
        .into_iter()
        .cycle()
        .take(40)
        .collect();
    let tables: [[i64; 3]; 3] = [
        [i32::MIN as i64; 3],
        [i32::MAX as i64, i32::MIN as i64, i32::MAX as i64],
        [i32::MIN as i64, 1 << 30, i32::MIN as i64],
    ];
    for h in tables {
        for mode in Rounding::ALL {
            assert!(check_fir::<i32, 3>(&h, &x, &[1, 7, 0, 3], mode), "{h:?}");
        }
    }
}
