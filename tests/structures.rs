//! The filter structures against their exact models (tests/structure_models, built on the FIR
//! model in tests/common) and against the plain FIR: bit for bit in fixed point, for random
//! taps, factors, rounding modes, saturating inputs and block splits — at least 256 proptest
//! cases per property. Group delays are measured from impulse responses. All data is invented.

mod common;
mod structure_models;

use common::*;
use fixed::types::{I1F15, I1F31, I4F12, I8F24};
use proptest::prelude::*;
use structure_models::*;
use tapline::kernel::FoldMulAcc;
use tapline::num::{Acc128, DefaultAcc, FixedPoint, RuntimeChecked};
use tapline::{
    Decimator, Error, Fir, HalfBandDecimator, Interpolator, LinearPhaseFir, MovingAverage, MulAcc,
    MultiChannelFir, Resampler, Rounding, Sample,
};

/// Feeds `x` to `block` cut by `sizes`, concatenating what each call returns.
fn in_blocks<S: Copy, Y>(
    x: &[S],
    sizes: &[usize],
    mut block: impl FnMut(&[S]) -> Vec<Y>,
) -> Vec<Y> {
    let mut out = Vec::new();
    let mut at = 0;
    for len in block_lengths(x.len(), sizes) {
        out.extend(block(&x[at..at + len]));
        at += len;
    }
    out
}

fn raws<S: Raw>(x: &[i64]) -> Vec<S> {
    x.iter().map(|&v| S::from_raw(v)).collect()
}

/// The model's outputs as samples, and how many of them saturated.
fn expected<S: Raw>(model: &[(i128, bool)]) -> (Vec<S>, u32) {
    let y = model.iter().map(|&(v, _)| S::from_raw(v as i64)).collect();
    (y, model.iter().filter(|m| m.1).count() as u32)
}

/// A block call given room for one output fewer than the `needed` it produces is refused with
/// `OutputTooShort` naming both counts.
fn refuses_one_short<S: Sample>(
    needed: usize,
    process: impl FnOnce(&mut [S]) -> Result<usize, Error>,
) {
    let mut short = vec![S::ZERO; needed - 1];
    assert_eq!(
        process(&mut short),
        Err(Error::OutputTooShort {
            needed,
            found: needed - 1
        })
    );
}

/// The API every same-rate structure offers, so one checker drives them all.
trait SameRate<S> {
    fn push(&mut self, x: S) -> S;
    fn process(&mut self, input: &[S], output: &mut [S]) -> Result<(), Error>;
    fn process_in_place(&mut self, buffer: &mut [S]);
    fn reset(&mut self);
    fn saturations(&self) -> u32;
}

/// The API every decimating structure offers.
trait Decimating<S> {
    fn push(&mut self, x: S) -> Option<S>;
    fn process(&mut self, input: &[S], output: &mut [S]) -> Result<usize, Error>;
    fn process_in_place(&mut self, buffer: &mut [S]) -> usize;
    fn outputs_for(&self, len: usize) -> usize;
    fn reset(&mut self);
    fn saturations(&self) -> u32;
}

macro_rules! forward {
    ($trait:ident for $ty:ty, [$($gen:tt)*], $out:ty, $blk:ty, $inpl:ty $(, $extra:item)*) => {
        impl<$($gen)*> $trait<S> for $ty {
            fn push(&mut self, x: S) -> $out { <$ty>::push(self, x) }
            fn process(&mut self, i: &[S], o: &mut [S]) -> Result<$blk, Error> { <$ty>::process(self, i, o) }
            fn process_in_place(&mut self, b: &mut [S]) -> $inpl { <$ty>::process_in_place(self, b) }
            fn reset(&mut self) { <$ty>::reset(self) }
            fn saturations(&self) -> u32 { <$ty>::saturations(self) }
            $($extra)*
        }
    };
}

forward!(SameRate for LinearPhaseFir<'_, S, N, T, W>, [S: FoldMulAcc<T, W>, T: Sample, W, const N: usize], S, (), ());
forward!(SameRate for MovingAverage<S, N>, [S: FixedPoint, const N: usize], S, (), ());
forward!(Decimating for Decimator<'_, S, N, M, T, W>, [S: MulAcc<T, W>, T: Sample, W, const N: usize, const M: usize], Option<S>, usize, usize,
    fn outputs_for(&self, len: usize) -> usize { Decimator::outputs_for(self, len) });
forward!(Decimating for HalfBandDecimator<'_, S, N, T, W>, [S: MulAcc<T, W>, T: Sample, W, const N: usize], Option<S>, usize, usize,
    fn outputs_for(&self, len: usize) -> usize { HalfBandDecimator::outputs_for(self, len) });

/// Runs a same-rate structure per sample, per block with the given splits and in place, after
/// resets, against the expected outputs and saturation count.
fn run_same_rate<S: Copy + PartialEq + std::fmt::Debug + Sample>(
    f: &mut impl SameRate<S>,
    xs: &[S],
    sizes: &[usize],
    want: &[S],
    sats: u32,
) {
    let got: Vec<S> = xs.iter().map(|&v| f.push(v)).collect();
    assert_eq!(got, want, "per sample");
    assert_eq!(f.saturations(), sats);
    f.reset();
    assert_eq!(f.saturations(), 0);
    let got = in_blocks(xs, sizes, |b| {
        let mut out = vec![S::ZERO; b.len()];
        f.process(b, &mut out).unwrap();
        out
    });
    assert_eq!(got, want, "process, splits {sizes:?}");
    f.reset();
    let got = in_blocks(xs, sizes, |b| {
        let mut buf = b.to_vec();
        f.process_in_place(&mut buf);
        buf
    });
    assert_eq!(got, want, "process_in_place, splits {sizes:?}");
    assert_eq!(f.saturations(), sats);
    let mut wrong = vec![S::ZERO; xs.len() + 1];
    assert_eq!(
        f.process(xs, &mut wrong),
        Err(Error::OutputLength {
            expected: xs.len(),
            found: xs.len() + 1
        })
    );
}

/// Runs a decimating structure by `m` every way against the expected (kept) outputs: `Some`
/// exactly on every m-th input, blocks of any split (the phase carries), in place, and a too
/// short output buffer refused without consuming anything.
fn run_decimating<S: Copy + PartialEq + std::fmt::Debug + Sample>(
    d: &mut impl Decimating<S>,
    m: usize,
    xs: &[S],
    sizes: &[usize],
    want: &[S],
    sats: u32,
) {
    let mut got = Vec::new();
    for (n, &v) in xs.iter().enumerate() {
        let y = d.push(v);
        assert_eq!(y.is_some(), n % m == m - 1, "output cadence at input {n}");
        got.extend(y);
    }
    assert_eq!(got, want, "per sample");
    assert_eq!(d.saturations(), sats);
    d.reset();
    let got = in_blocks(xs, sizes, |b| {
        let mut out = vec![S::ZERO; d.outputs_for(b.len())];
        let written = d.process(b, &mut out).unwrap();
        assert_eq!(written, out.len());
        out
    });
    assert_eq!(got, want, "process, splits {sizes:?}");
    d.reset();
    let got = in_blocks(xs, sizes, |b| {
        let mut buf = b.to_vec();
        let written = d.process_in_place(&mut buf);
        buf.truncate(written);
        buf
    });
    assert_eq!(got, want, "process_in_place, splits {sizes:?}");
    assert_eq!(d.saturations(), sats);
    d.reset();
    let needed = d.outputs_for(xs.len());
    if needed > 0 {
        refuses_one_short::<S>(needed, |short| d.process(xs, short));
        assert_eq!(
            d.outputs_for(xs.len()),
            needed,
            "a refused call consumed input"
        );
    }
}

// ------------------------------------------------------------------------------------------
// Linear-phase (folded) FIR
// ------------------------------------------------------------------------------------------

/// Symmetric (kind 0), antisymmetric (kind 1) or unconstrained (kind 2) taps of length `n`.
fn linear_phase_taps(bits: u32) -> impl Strategy<Value = Vec<i64>> {
    (
        prop::sample::select(vec![1usize, 2, 3, 4, 5, 7, 8, 13, 16, 31]),
        0u8..3,
    )
        .prop_flat_map(move |(n, kind)| {
            scaled_codes(bits, n).prop_map(move |v| {
                let mut h = v.clone();
                let lowest = -(1i64 << (bits - 1)) + 1; // −MIN does not exist
                for k in 0..n / 2 {
                    match kind {
                        0 => h[n - 1 - k] = h[k],
                        1 => {
                            h[k] = h[k].max(lowest);
                            h[n - 1 - k] = -h[k];
                        }
                        _ => {}
                    }
                }
                if kind == 1 && n % 2 == 1 {
                    h[n / 2] = 0;
                }
                h
            })
        })
}

fn check_linear_phase<S, T, W, const N: usize>(
    acc_bits: u32,
    h: &[i64],
    x: &[i64],
    sizes: &[usize],
    mode: Rounding,
) where
    S: FoldMulAcc<T, W> + FixedPoint + Raw,
    T: Sample + Raw,
    W: RuntimeChecked,
{
    let taps: [T; N] = core::array::from_fn(|k| T::from_raw(h[k]));
    let symmetric = (0..N).all(|k| h[k] == h[N - 1 - k]);
    let antisymmetric = (0..N).all(|k| h[k] == -h[N - 1 - k]);
    let built = LinearPhaseFir::<S, N, T, W>::with_accumulator(&taps);
    if !symmetric && !antisymmetric {
        assert_eq!(built.err(), Some(Error::NotLinearPhase), "taps {h:?}");
        return;
    }
    let plain = Fir::<S, N, T, W>::with_accumulator(&taps);
    let (mut folded, mut plain) = match (built, plain) {
        (Ok(f), Ok(p)) => (f.with_rounding(mode), p.with_rounding(mode)),
        (Err(a), Err(b)) => {
            assert_eq!(
                (a, b),
                (Error::AccumulatorOverflow, Error::AccumulatorOverflow)
            );
            assert!(overflows(h, <S as Raw>::BITS, acc_bits));
            return;
        }
        (a, b) => panic!(
            "folded and plain disagree on acceptance: {:?} vs {:?}",
            a.err(),
            b.err()
        ),
    };
    assert!(!overflows(h, <S as Raw>::BITS, acc_bits));
    assert_eq!(
        folded.multiplies(),
        if symmetric { N.div_ceil(2) } else { N / 2 }
    );
    assert_eq!(folded.group_delay().half_samples(), N - 1);

    let xs: Vec<S> = raws(x);
    let (want, sats) = expected::<S>(&fir_finished(h, x, T::FRAC, <S as Raw>::BITS, mode));
    let from_plain: Vec<S> = xs.iter().map(|&v| plain.push(v)).collect();
    assert_eq!(from_plain, want, "the plain FIR itself");
    run_same_rate(&mut folded, &xs, sizes, &want, sats);

    // The worst-case input for these taps after the random history: folded = plain still.
    let (x_max, x_min) = (
        (1i64 << (<S as Raw>::BITS - 1)) - 1,
        -(1i64 << (<S as Raw>::BITS - 1)),
    );
    let worst: Vec<i64> = h
        .iter()
        .rev()
        .map(|&t| if t > 0 { x_max } else { x_min })
        .chain(h.iter().rev().map(|&t| if t > 0 { x_min } else { x_max }))
        .collect();
    let tail: Vec<i64> = x.iter().chain(&worst).copied().collect();
    let (want, _) = expected::<S>(&fir_finished(h, &tail, T::FRAC, <S as Raw>::BITS, mode));
    folded.reset();
    let got: Vec<S> = raws::<S>(&tail).iter().map(|&v| folded.push(v)).collect();
    assert_eq!(got, want, "worst-case input");
}

proptest! {
    #![proptest_config(cases::config())]

    /// Folded = plain FIR = exact model, bit for bit: Q15, Q31 (i64 and i128 accumulators),
    /// `fixed` formats; symmetric, antisymmetric and (refused) other taps; even and odd N.
    #[test]
    fn linear_phase_is_bit_identical_to_the_plain_fir(h16 in linear_phase_taps(16), h32 in linear_phase_taps(32),
            x16 in signal(16), x32 in signal(32), sizes in splits(), mode in any_rounding()) {
        with_const!(h16.len(), [1, 2, 3, 4, 5, 7, 8, 13, 16, 31], |N| {
            check_linear_phase::<i16, i16, DefaultAcc, N>(64, &h16, &x16, &sizes, mode);
            check_linear_phase::<I4F12, I1F15, DefaultAcc, N>(64, &h16, &x16, &sizes, mode);
        });
        with_const!(h32.len(), [1, 2, 3, 4, 5, 7, 8, 13, 16, 31], |N| {
            check_linear_phase::<i32, i32, DefaultAcc, N>(64, &h32, &x32, &sizes, mode);
            check_linear_phase::<i32, i32, Acc128, N>(128, &h32, &x32, &sizes, mode);
            check_linear_phase::<I8F24, I1F31, DefaultAcc, N>(64, &h32, &x32, &sizes, mode);
        });
    }

    /// f32: the folded sum differs from the plain one only by rounding, within
    /// (γ_N(2^−24) of each) of the f64 reference — Higham 2002, §3.1 — with one extra rounding
    /// per pre-add counted in γ_(N+1).
    #[test]
    fn linear_phase_f32_within_higham_bound(seed in prop::collection::vec(-1.0f32..1.0, 16 + 100)) {
        const N: usize = 16;
        let mut taps = [0.0f32; N];
        for k in 0..N / 2 { taps[k] = seed[k]; taps[N - 1 - k] = seed[k]; }
        let x = &seed[16..];
        let h64: Vec<f64> = taps.iter().map(|&v| v.into()).collect();
        let x64: Vec<f64> = x.iter().map(|&v| v.into()).collect();
        let reference = fir_f64(&h64, &x64);
        let magnitude = fir_abs_f64(&h64, &x64);
        let mut fir = LinearPhaseFir::<f32, N>::new(&taps).unwrap();
        for (i, &v) in x.iter().enumerate() {
            let err = (f64::from(fir.push(v)) - reference[i]).abs();
            prop_assert!(err <= (gamma(N + 1, U_F32) + gamma(N, U_F64)) * magnitude[i]);
        }
    }
}

// ------------------------------------------------------------------------------------------
// Decimator, half-band decimator
// ------------------------------------------------------------------------------------------

fn check_decimator<S, T, W, const N: usize, const M: usize>(
    acc_bits: u32,
    h: &[i64],
    x: &[i64],
    sizes: &[usize],
    mode: Rounding,
) where
    S: MulAcc<T, W> + FixedPoint + Raw,
    T: Sample + Raw,
    W: RuntimeChecked,
{
    let taps: [T; N] = core::array::from_fn(|k| T::from_raw(h[k]));
    let mut dec = match Decimator::<S, N, M, T, W>::with_accumulator(&taps) {
        Ok(d) => d.with_rounding(mode),
        Err(e) => {
            assert_eq!(e, Error::AccumulatorOverflow);
            assert!(overflows(h, <S as Raw>::BITS, acc_bits));
            return;
        }
    };
    assert!(!overflows(h, <S as Raw>::BITS, acc_bits));
    assert_eq!(dec.factor(), M);
    // "Full-rate FIR, then keep every M-th output", from the model.
    let (want, sats) = expected::<S>(&keep_every(
        &fir_finished(h, x, T::FRAC, <S as Raw>::BITS, mode),
        M,
    ));
    run_decimating(&mut dec, M, &raws::<S>(x), sizes, &want, sats);
}

/// Half-band taps of odd length: random, then every tap an even non-zero distance from the
/// centre set to zero; with `spoil`, one of those set back to non-zero (must be refused).
fn half_band_taps(bits: u32) -> impl Strategy<Value = (Vec<i64>, bool)> {
    (
        prop::sample::select(vec![1usize, 3, 5, 7, 9, 11, 15, 19]),
        any::<bool>(),
        any::<prop::sample::Index>(),
    )
        .prop_flat_map(move |(n, spoil, which)| {
            scaled_codes(bits, n).prop_map(move |mut h| {
                let c = n / 2;
                let even: Vec<usize> = (0..n)
                    .filter(|&k| k != c && k.abs_diff(c) % 2 == 0)
                    .collect();
                for &k in &even {
                    h[k] = 0;
                }
                let spoilt = spoil && !even.is_empty();
                if spoilt {
                    h[even[which.index(even.len())]] = 1;
                }
                (h, spoilt)
            })
        })
}

fn check_half_band<S, T, const N: usize>(
    h: &[i64],
    spoilt: bool,
    x: &[i64],
    sizes: &[usize],
    mode: Rounding,
) where
    S: MulAcc<T> + FixedPoint + Raw,
    T: Sample + Raw,
{
    let taps: [T; N] = core::array::from_fn(|k| T::from_raw(h[k]));
    let mut hb = match HalfBandDecimator::<S, N, T>::new(&taps) {
        Ok(d) => d.with_rounding(mode),
        Err(Error::NotHalfBand) => return assert!(spoilt, "refused half-band taps {h:?}"),
        Err(e) => {
            assert_eq!(e, Error::AccumulatorOverflow);
            return assert!(overflows(h, <S as Raw>::BITS, 64));
        }
    };
    assert!(!spoilt, "accepted taps that are not half-band: {h:?}");
    let c = N / 2;
    let odd_distance = (0..N).filter(|&k| k.abs_diff(c) % 2 == 1).count();
    assert_eq!(hb.multiplies(), odd_distance + 1);
    let (want, sats) = expected::<S>(&keep_every(
        &fir_finished(h, x, T::FRAC, <S as Raw>::BITS, mode),
        2,
    ));
    run_decimating(&mut hb, 2, &raws::<S>(x), sizes, &want, sats);
}

proptest! {
    #![proptest_config(cases::config())]

    /// Decimator = full-rate FIR then every M-th output, bit for bit, for factors 1…8 and any
    /// block split: Q15, Q31 (both accumulators), `fixed` formats.
    #[test]
    fn decimator_equals_fir_then_keep_every_mth(n in prop::sample::select(vec![1usize, 2, 3, 5, 8, 13, 16]), m in prop::sample::select(vec![1usize, 2, 3, 4, 5, 8]),
            seed16 in scaled_codes(16, 16), seed32 in scaled_codes(32, 16),
            x16 in signal(16), x32 in signal(32), sizes in splits(), mode in any_rounding()) {
        with_const!(n, [1, 2, 3, 5, 8, 13, 16], |N| with_const!(m, [1, 2, 3, 4, 5, 8], |M| {
            check_decimator::<i16, i16, DefaultAcc, N, M>(64, &seed16[..N], &x16, &sizes, mode);
            check_decimator::<I4F12, I1F15, DefaultAcc, N, M>(64, &seed16[..N], &x16, &sizes, mode);
            check_decimator::<i32, i32, DefaultAcc, N, M>(64, &seed32[..N], &x32, &sizes, mode);
            check_decimator::<i32, i32, Acc128, N, M>(128, &seed32[..N], &x32, &sizes, mode);
        }));
    }

    /// Half-band decimator = decimator by 2 = FIR then every 2nd output, bit for bit, with the
    /// zero taps skipped; taps that are not half-band are refused.
    #[test]
    fn half_band_equals_fir_then_keep_every_second((h, spoilt) in half_band_taps(16), (h32, spoilt32) in half_band_taps(32),
            x in signal(16), x32 in signal(32), sizes in splits(), mode in any_rounding()) {
        with_const!(h.len(), [1, 3, 5, 7, 9, 11, 15, 19], |N| check_half_band::<i16, i16, N>(&h, spoilt, &x, &sizes, mode));
        with_const!(h32.len(), [1, 3, 5, 7, 9, 11, 15, 19], |N| check_half_band::<i32, i32, N>(&h32, spoilt32, &x32, &sizes, mode));
    }
}

// ------------------------------------------------------------------------------------------
// Resampler
// ------------------------------------------------------------------------------------------

/// The history capacity the resampler tests use: tap sets of up to 24 taps need ⌈K/L⌉ ≤ 16.
const RESAMPLER_CAPACITY: usize = 16;

fn check_resampler<S, T, W>(
    acc_bits: u32,
    h: &[i64],
    x: &[i64],
    (l, m): (usize, usize),
    sizes: &[usize],
    mode: Rounding,
) where
    S: MulAcc<T, W> + FixedPoint + Raw,
    T: Sample + Raw,
    W: RuntimeChecked,
{
    let taps: Vec<T> = h.iter().map(|&v| T::from_raw(v)).collect();
    let phase_overflows = (0..l).any(|p| {
        let phase: Vec<i64> = h.iter().skip(p).step_by(l).copied().collect();
        overflows(&phase, <S as Raw>::BITS, acc_bits)
    });
    let too_long = h.len().div_ceil(l) > RESAMPLER_CAPACITY;
    let built =
        Resampler::<S, RESAMPLER_CAPACITY, T, W>::with_accumulator(&taps, l as u16, m as u16);
    let mut rs = match built {
        Ok(r) => r.with_rounding(mode),
        Err(e) if too_long => {
            return assert_eq!(
                e,
                Error::TooManyTaps {
                    capacity: RESAMPLER_CAPACITY * l,
                    found: h.len()
                }
            );
        }
        Err(e) => {
            assert_eq!(e, Error::AccumulatorOverflow);
            return assert!(phase_overflows, "refused taps whose phases fit: {h:?}");
        }
    };
    assert!(!too_long, "accepted {} taps at L = {l}", h.len());
    assert!(
        !phase_overflows,
        "accepted taps with a phase that overflows: {h:?}"
    );
    let (want, sats) = expected::<S>(&resample_finished(
        h,
        x,
        l,
        m,
        T::FRAC,
        <S as Raw>::BITS,
        mode,
    ));
    let xs: Vec<S> = raws(x);
    assert_eq!(
        rs.outputs_for(xs.len()),
        want.len(),
        "outputs_for, L/M = {l}/{m}"
    );
    let mut got = Vec::new();
    for &v in &xs {
        let before = got.len();
        let produced = rs.push(v, |y| got.push(y));
        assert_eq!(produced, got.len() - before);
        assert!(
            produced <= l.div_ceil(m) && produced >= l / m,
            "burst of {produced} at {l}/{m}"
        );
    }
    assert_eq!(got, want, "per sample, L/M = {l}/{m}");
    assert_eq!(rs.saturations(), sats);
    rs.reset();
    let got = in_blocks(&xs, sizes, |b| {
        let needed = rs.outputs_for(b.len());
        let mut out = vec![S::ZERO; needed + 1]; // one spare slot: must stay untouched
        assert_eq!(rs.process(b, &mut out).unwrap(), needed);
        assert_eq!(out.pop(), Some(S::ZERO));
        out
    });
    assert_eq!(got, want, "process, L/M = {l}/{m}, splits {sizes:?}");
    assert_eq!(rs.clear_saturations(), sats);
    rs.reset();
    let needed = rs.outputs_for(xs.len());
    if needed > 0 {
        refuses_one_short::<S>(needed, |short| rs.process(&xs, short));
        // Nothing was processed: the whole stream still gives the model's outputs.
        let mut out = vec![S::ZERO; needed];
        assert_eq!(rs.process(&xs, &mut out), Ok(needed));
        assert_eq!(out, want);
    }
}

proptest! {
    #![proptest_config(cases::config())]

    /// Resampler = zero-stuff by L, full exact convolution, every M-th from index 0, round,
    /// saturate (the upfirdn definition), bit for bit, for L, M in 1…6 (coprime or not), 1 to 24
    /// taps, every rounding mode, saturating inputs and any block split; tap sets whose phases
    /// overflow are refused exactly when the model says a phase can overflow.
    #[test]
    fn resampler_equals_zero_stuffing_convolving_and_keeping_every_mth(
            k in 1usize..=24, l in 1usize..=6, m in 1usize..=6,
            seed16 in scaled_codes(16, 24), seed32 in scaled_codes(32, 24),
            x16 in signal(16), x32 in signal(32), sizes in splits(), mode in any_rounding()) {
        check_resampler::<i16, i16, DefaultAcc>(64, &seed16[..k], &x16, (l, m), &sizes, mode);
        check_resampler::<I4F12, I1F15, DefaultAcc>(64, &seed16[..k], &x16, (l, m), &sizes, mode);
        check_resampler::<i32, i32, DefaultAcc>(64, &seed32[..k], &x32, (l, m), &sizes, mode);
        check_resampler::<I1F31, I1F31, Acc128>(128, &seed32[..k], &x32, (l, m), &sizes, mode);
    }
}

// ------------------------------------------------------------------------------------------
// Interpolator
// ------------------------------------------------------------------------------------------

fn check_interpolator<S, T, W, const N: usize, const L: usize>(
    acc_bits: u32,
    h: &[i64],
    x: &[i64],
    sizes: &[usize],
    mode: Rounding,
) where
    S: MulAcc<T, W> + FixedPoint + Raw,
    T: Sample + Raw,
    W: RuntimeChecked,
{
    let taps: [T; N] = core::array::from_fn(|k| T::from_raw(h[k]));
    let phase_overflows = (0..L).any(|p| {
        let phase: Vec<i64> = h.iter().skip(p).step_by(L).copied().collect();
        overflows(&phase, <S as Raw>::BITS, acc_bits)
    });
    let mut up = match Interpolator::<S, N, L, T, W>::with_accumulator(&taps) {
        Ok(u) => u.with_rounding(mode),
        Err(e) => {
            assert_eq!(e, Error::AccumulatorOverflow);
            return assert!(phase_overflows, "refused taps whose phases fit: {h:?}");
        }
    };
    assert!(
        !phase_overflows,
        "accepted taps with a phase that overflows: {h:?}"
    );
    // "Zero-stuff, then the FIR", from the model.
    let (want, sats) = expected::<S>(&fir_finished(
        h,
        &zero_stuff(x, L),
        T::FRAC,
        <S as Raw>::BITS,
        mode,
    ));
    let xs: Vec<S> = raws(x);
    let got: Vec<S> = xs.iter().flat_map(|&v| up.push(v)).collect();
    assert_eq!(got, want, "per sample");
    assert_eq!(up.saturations(), sats);
    up.reset();
    let got = in_blocks(&xs, sizes, |b| {
        let mut out = vec![S::ZERO; b.len() * L + 1]; // one spare slot: must stay untouched
        assert_eq!(up.process(b, &mut out).unwrap(), b.len() * L);
        assert_eq!(out.pop(), Some(S::ZERO));
        out
    });
    assert_eq!(got, want, "process, splits {sizes:?}");
    assert_eq!(up.clear_saturations(), sats);
    if !xs.is_empty() {
        let mut short = vec![S::ZERO; xs.len() * L - 1];
        assert_eq!(
            up.process(&xs, &mut short),
            Err(Error::OutputTooShort {
                needed: xs.len() * L,
                found: xs.len() * L - 1
            })
        );
    }
}

proptest! {
    #![proptest_config(cases::config())]

    /// Interpolator = zero-stuff then FIR, bit for bit, for factors 1…5 and any split; Q31
    /// tables whose phases fit `i64` are accepted even when the whole table does not.
    #[test]
    fn interpolator_equals_zero_stuffing_then_fir(n in prop::sample::select(vec![1usize, 2, 3, 4, 7, 8, 13, 16]), l in 1usize..=5,
            seed16 in scaled_codes(16, 16), seed32 in scaled_codes(32, 16),
            x16 in signal(16), x32 in signal(32), sizes in splits(), mode in any_rounding()) {
        with_const!(n, [1, 2, 3, 4, 7, 8, 13, 16], |N| with_const!(l, [1, 2, 3, 4, 5], |L| {
            check_interpolator::<i16, i16, DefaultAcc, N, L>(64, &seed16[..N], &x16, &sizes, mode);
            check_interpolator::<I4F12, I1F15, DefaultAcc, N, L>(64, &seed16[..N], &x16, &sizes, mode);
            check_interpolator::<i32, i32, DefaultAcc, N, L>(64, &seed32[..N], &x32, &sizes, mode);
            check_interpolator::<I1F31, I1F31, Acc128, N, L>(128, &seed32[..N], &x32, &sizes, mode);
        }));
    }
}

// ------------------------------------------------------------------------------------------
// Multi-channel FIR
// ------------------------------------------------------------------------------------------

fn check_multichannel<S, T, const N: usize, const C: usize>(
    h: &[i64],
    x: &[i64],
    sizes: &[usize],
    mode: Rounding,
) where
    S: MulAcc<T> + FixedPoint + Raw,
    T: Sample + Raw,
{
    let taps: [T; N] = core::array::from_fn(|k| T::from_raw(h[k]));
    let mut fir = match MultiChannelFir::<S, N, C, T>::new(&taps) {
        Ok(f) => f.with_rounding(mode),
        Err(e) => {
            assert_eq!(e, Error::AccumulatorOverflow);
            return assert!(overflows(h, <S as Raw>::BITS, 64));
        }
    };
    let x = &x[..x.len() / C * C];
    // Each channel alone through the model, then interleaved again.
    let per_channel: Vec<Vec<(i128, bool)>> = (0..C)
        .map(|c| {
            let xc: Vec<i64> = x.iter().skip(c).step_by(C).copied().collect();
            fir_finished(h, &xc, T::FRAC, <S as Raw>::BITS, mode)
        })
        .collect();
    let model: Vec<(i128, bool)> = (0..x.len()).map(|i| per_channel[i % C][i / C]).collect();
    let (want, sats) = expected::<S>(&model);
    let xs: Vec<S> = raws(x);
    let got: Vec<S> = xs
        .chunks(C)
        .flat_map(|f| fir.push(f.try_into().unwrap()))
        .collect();
    assert_eq!(got, want, "per frame");
    assert_eq!(fir.saturations(), sats);
    fir.reset();
    let frame_sizes: Vec<usize> = sizes.iter().map(|s| s * C).collect();
    let got = in_blocks(&xs, &frame_sizes, |b| {
        let mut out = vec![S::ZERO; b.len()];
        fir.process(b, &mut out).unwrap();
        out
    });
    assert_eq!(got, want, "process, splits {frame_sizes:?}");
    fir.reset();
    let got = in_blocks(&xs, &frame_sizes, |b| {
        let mut buf = b.to_vec();
        fir.process_in_place(&mut buf).unwrap();
        buf
    });
    assert_eq!(got, want, "process_in_place");
    assert_eq!(fir.saturations(), sats);
    // Each channel's history holds that channel's newest sample.
    for (c, frame_value) in xs.iter().rev().take(C).rev().enumerate() {
        assert_eq!(
            fir.history(c).map(|r| r.latest()),
            Some(*frame_value),
            "channel {c}"
        );
    }
    assert!(fir.history(C).is_none());
    if C > 1 {
        let mut partial = vec![S::ZERO; C + 1];
        assert_eq!(
            fir.process_in_place(&mut partial),
            Err(Error::PartialFrame {
                len: C + 1,
                channels: C
            })
        );
        assert!(
            partial.iter().all(|&v| v == S::ZERO),
            "a refused call wrote output"
        );
    }
}

proptest! {
    #![proptest_config(cases::config())]

    /// Each of C interleaved channels = its own FIR on its own samples, bit for bit.
    #[test]
    fn multichannel_equals_one_fir_per_channel(n in prop::sample::select(vec![1usize, 2, 5, 8, 13]), c in 1usize..=4,
            seed16 in scaled_codes(16, 13), seed32 in scaled_codes(32, 13),
            x16 in signal(16), x32 in signal(32), sizes in splits(), mode in any_rounding()) {
        with_const!(n, [1, 2, 5, 8, 13], |N| with_const!(c, [1, 2, 3, 4], |C| {
            check_multichannel::<i16, i16, N, C>(&seed16[..N], &x16, &sizes, mode);
            check_multichannel::<i32, i32, N, C>(&seed32[..N], &x32, &sizes, mode);
        }));
    }
}

// ------------------------------------------------------------------------------------------
// Moving average
// ------------------------------------------------------------------------------------------

fn check_moving_average<S: FixedPoint + Raw, const N: usize>(
    x: &[i64],
    sizes: &[usize],
    mode: Rounding,
) {
    let mut avg = MovingAverage::<S, N>::new().with_rounding(mode);
    let model = moving_average_exact(x, N, mode);
    let want: Vec<S> = model
        .iter()
        .map(|&v| <S as Raw>::from_raw(v as i64))
        .collect();
    run_same_rate(&mut avg, &raws::<S>(x), sizes, &want, 0);
    let last: i64 = x[x.len().saturating_sub(N)..].iter().sum();
    assert_eq!(avg.sum(), last, "running sum = sum of the last N inputs");
    assert_eq!(avg.group_delay().half_samples(), N - 1);
}

proptest! {
    #![proptest_config(cases::config())]

    /// Moving average = round(Σ of the last N / N) for any N (powers of two or not), every
    /// rounding mode, i16/i32/`fixed` samples, any split.
    #[test]
    fn moving_average_equals_exact_mean(n in prop::sample::select(vec![1usize, 2, 3, 4, 5, 7, 10, 16, 20]),
            x16 in signal(16), x32 in signal(32), sizes in splits(), mode in any_rounding()) {
        with_const!(n, [1, 2, 3, 4, 5, 7, 10, 16, 20], |N| {
            check_moving_average::<i16, N>(&x16, &sizes, mode);
            check_moving_average::<I4F12, N>(&x16, &sizes, mode);
            check_moving_average::<i32, N>(&x32, &sizes, mode);
        });
    }
}

// ------------------------------------------------------------------------------------------
// Group delay, measured from each structure's impulse response
// ------------------------------------------------------------------------------------------

/// Measured τ(f) at several frequencies where |H| is not small equals the documented delay.
fn assert_group_delay(h: &[f64], documented: f64, frequencies: &[f64], what: &str) {
    for &f in frequencies {
        assert!(
            dtft_magnitude(h, f) > 1e-3,
            "{what}: |H({f})| too small to measure"
        );
        let tau = group_delay_at(h, f);
        assert!(
            (tau - documented).abs() < 1e-9,
            "{what}: τ({f}) = {tau}, documented {documented}"
        );
    }
}

/// Invented symmetric lowpass taps (a raised-cosine-like bump), length N, mirrored exactly.
fn bump<const N: usize>() -> [f64; N] {
    core::array::from_fn(|k| {
        let k = k.min(N - 1 - k) as f64;
        1.0 - (2.0 * std::f64::consts::PI * (k + 1.0) / (N as f64 + 1.0)).cos()
    })
}

#[test]
fn group_delays_measured_from_impulse_responses() {
    let fs = [0.0, 0.01, 0.03, 0.05];

    // Linear phase: the response of an impulse is the taps.
    let h9 = bump::<9>();
    let mut lp = LinearPhaseFir::<f64, 9>::new(&h9).unwrap();
    let h: Vec<f64> = (0..12)
        .map(|n| lp.push(if n == 0 { 1.0 } else { 0.0 }))
        .collect();
    assert_group_delay(
        &h,
        f64::from(lp.group_delay().samples()),
        &fs,
        "linear phase, N=9",
    );
    let h8 = bump::<8>();
    let mut lp8 = LinearPhaseFir::<f64, 8>::new(&h8).unwrap();
    let h: Vec<f64> = (0..12)
        .map(|n| lp8.push(if n == 0 { 1.0 } else { 0.0 }))
        .collect();
    assert_group_delay(
        &h,
        f64::from(lp8.group_delay().samples()),
        &fs,
        "linear phase, N=8",
    );

    // Decimator by 3: the full-rate response, gathered from impulses at each of the 3 phases
    // (an impulse d samples before an output shows h[d], h[d+3], …). Delay in input samples.
    let mut full = vec![0.0; 12];
    for d in 0..3 {
        let mut dec = Decimator::<f64, 9, 3>::new(&h9).unwrap();
        let lead = 2 - d; // the impulse sits d inputs before the group's last one
        let outs: Vec<f64> = (0..lead + 12)
            .filter_map(|n| dec.push(if n == lead { 1.0 } else { 0.0 }))
            .collect();
        for (j, &y) in outs.iter().enumerate() {
            if d + 3 * j < full.len() {
                full[d + 3 * j] = y;
            }
        }
    }
    let dec = Decimator::<f64, 9, 3>::new(&h9).unwrap();
    assert_group_delay(
        &full,
        f64::from(dec.group_delay().unwrap().samples()),
        &fs,
        "decimator",
    );

    // Interpolator by 4: one impulse in gives the whole response at the output rate.
    let mut up = Interpolator::<f64, 9, 4>::new(&h9).unwrap();
    let h: Vec<f64> = (0..4)
        .flat_map(|n| up.push(if n == 0 { 1.0 } else { 0.0 }))
        .collect();
    assert_group_delay(
        &h,
        f64::from(up.group_delay().unwrap().samples()),
        &fs,
        "interpolator",
    );

    // Half-band by 2: the same gathering over 2 phases.
    static HB: [f64; 7] = [-0.0625, 0.0, 0.5625, 1.0, 0.5625, 0.0, -0.0625];
    let mut full = vec![0.0; 8];
    for d in 0..2 {
        let mut hb = HalfBandDecimator::<f64, 7>::new(&HB).unwrap();
        let lead = 1 - d;
        let outs: Vec<f64> = (0..lead + 8)
            .filter_map(|n| hb.push(if n == lead { 1.0 } else { 0.0 }))
            .collect();
        for (j, &y) in outs.iter().enumerate() {
            if d + 2 * j < full.len() {
                full[d + 2 * j] = y;
            }
        }
    }
    assert_eq!(&full[..7], &HB[..], "half-band gathered response");
    let hb = HalfBandDecimator::<f64, 7>::new(&HB).unwrap();
    assert_group_delay(
        &full,
        f64::from(hb.group_delay().unwrap().samples()),
        &fs,
        "half-band",
    );

    // Multi-channel: channel 2 of 3 alone carries the impulse.
    let mut mc = MultiChannelFir::<f64, 9, 3>::new(&h9).unwrap();
    let h: Vec<f64> = (0..12)
        .map(|n| mc.push([0.0, 0.0, if n == 0 { 1.0 } else { 0.0 }])[2])
        .collect();
    assert_group_delay(
        &h,
        f64::from(mc.group_delay().unwrap().samples()),
        &fs,
        "multi-channel",
    );

    // Moving average (integer): an impulse of 7·2^20 gives exactly 2^20 for 7 samples.
    let mut avg = MovingAverage::<i32, 7>::new();
    let h: Vec<f64> = (0..10)
        .map(|n| f64::from(avg.push(if n == 0 { 7 << 20 } else { 0 })))
        .collect();
    assert_eq!(&h[..7], &[f64::from(1 << 20); 7]);
    assert_group_delay(
        &h,
        f64::from(avg.group_delay().samples()),
        &[0.0, 0.05, 0.1],
        "moving average",
    );
}

#[test]
fn structures_with_unsuitable_taps_are_refused_with_their_error() {
    static RAMP: [i16; 4] = [1, 2, 3, 4];
    assert_eq!(
        LinearPhaseFir::<i16, 4>::new(&RAMP).err(),
        Some(Error::NotLinearPhase)
    );
    static NOT_HALF_BAND: [i16; 7] = [1, 5, 1, 2, 1, 0, 1]; // tap 1 is 2 from the centre
    assert_eq!(
        HalfBandDecimator::<i16, 7>::new(&NOT_HALF_BAND).err(),
        Some(Error::NotHalfBand)
    );
    assert_eq!(
        Error::PartialFrame {
            len: 6,
            channels: 4
        }
        .to_string(),
        "interleaved buffer of 6 samples is not a whole number of 4-channel frames"
    );
}

#[test]
fn half_band_lowpass_has_zero_taps_a_centre_of_one_half_and_skips_them() {
    // A windowed sinc cut off at a quarter of the sample rate is a half-band filter: every tap
    // an even, non-zero distance from the centre is zero, the centre is exactly ½, and the
    // zero-phase response satisfies A(f) + A(½ − f) = 1, i.e. it is symmetric about fs/4
    // (R. Lyons, *Understanding Digital Signal Processing*, §5.7; CHECKS.md item 10). N = 11
    // (N + 1 a multiple of 4): (N + 1)/2 + 1 = 7 non-zero taps. Hann window (common practice).
    const N: usize = 11;
    let c = (N / 2) as f64;
    let pi = std::f64::consts::PI;
    let ideal: Vec<f64> = (0..N)
        .map(|k| {
            let t = k as f64 - c;
            let sinc = if t == 0.0 {
                0.5
            } else {
                (pi * t / 2.0).sin() / (pi * t)
            };
            sinc * (0.5 - 0.5 * (2.0 * pi * (k as f64 + 1.0) / (N as f64 + 1.0)).cos())
        })
        .collect();
    assert_eq!(ideal[N / 2], 0.5);
    for k in (0..N).filter(|&k| k != N / 2 && k.abs_diff(N / 2) % 2 == 0) {
        assert!(ideal[k].abs() < 1e-16, "tap {k} = {}", ideal[k]);
    }
    // Unnormalised (normalising the DC gain would move the centre off ½); Q15 by rounding.
    let q15: [i16; N] = core::array::from_fn(|k| (ideal[k] * 32768.0).round() as i16);
    assert_eq!(q15[N / 2], 16384, "centre 0.5 in Q15");
    assert_eq!(q15.iter().filter(|&&v| v != 0).count(), N.div_ceil(2) + 1); // (N+1)/2 + 1
    let hb = HalfBandDecimator::<i16, N>::new(&q15).unwrap();
    assert_eq!(hb.multiplies(), 7);

    // Symmetry about fs/4, measured on the f64 filter's gathered impulse response.
    // In f64 the sine leaves ~1e-17 where the zeros are; the structure demands exact zeros, so
    // they are written as such (as a designer would).
    let taps: [f64; N] = core::array::from_fn(|k| {
        if k != N / 2 && k.abs_diff(N / 2) % 2 == 0 {
            0.0
        } else {
            ideal[k]
        }
    });
    let mut full = vec![0.0; N + 1];
    for d in 0..2 {
        let mut hb = HalfBandDecimator::<f64, N>::new(&taps).unwrap();
        let lead = 1 - d;
        let outs: Vec<f64> = (0..lead + N + 2)
            .filter_map(|n| hb.push(if n == lead { 1.0 } else { 0.0 }))
            .collect();
        for (j, &y) in outs.iter().enumerate() {
            if d + 2 * j < full.len() {
                full[d + 2 * j] = y;
            }
        }
    }
    // Zero-phase amplitude: A(f) = Re{H(f)·e^{j2πfc}}.
    let amplitude = |f: f64| {
        let (re, im) = dtft(&full, f);
        re * (2.0 * pi * f * c).cos() - im * (2.0 * pi * f * c).sin()
    };
    for j in 0..=50 {
        let f = 0.25 * j as f64 / 50.0;
        assert!(
            (amplitude(f) + amplitude(0.5 - f) - 1.0).abs() < 1e-12,
            "f = {f}"
        );
    }
}

// ------------------------------------------------------------------------------------------
// Whole signals: stream, flush the tail, start the next signal
// ------------------------------------------------------------------------------------------

/// The calls that end a finite signal, for one checker over every structure that has them.
trait Flushing<S: Sample> {
    fn process(&mut self, input: &[S], output: &mut [S]) -> Result<usize, Error>;
    fn tail_len(&self) -> usize;
    fn flush(&mut self, output: &mut [S]) -> Result<usize, Error>;
    fn saturations(&self) -> u32;

    /// One block call, with room for the most outputs any factor here gives (L ≤ 6).
    fn stream(&mut self, block: &[S]) -> Vec<S> {
        let mut out = vec![S::ZERO; block.len() * 6];
        let written = self.process(block, &mut out).unwrap();
        out.truncate(written);
        out
    }
}

macro_rules! flushing {
    ($ty:ty, [$($gen:tt)*]) => {
        impl<$($gen)*> Flushing<S> for $ty {
            fn process(&mut self, i: &[S], o: &mut [S]) -> Result<usize, Error> { <$ty>::process(self, i, o) }
            fn tail_len(&self) -> usize { <$ty>::tail_len(self) }
            fn flush(&mut self, o: &mut [S]) -> Result<usize, Error> { <$ty>::flush(self, o) }
            fn saturations(&self) -> u32 { <$ty>::saturations(self) }
        }
    };
}

flushing!(Decimator<'a, S, N, M, T, W, H>, ['a, S: MulAcc<T, W>, const N: usize, const M: usize, T: Sample + 'a, W, H: tapline::filter::TapTable<'a, T, N>]);
flushing!(Interpolator<'_, S, N, L, T, W>, [S: MulAcc<T, W>, const N: usize, const L: usize, T: Sample, W]);
flushing!(Resampler<'_, S, C, T, W>, [S: MulAcc<T, W>, const C: usize, T: Sample, W]);
flushing!(HalfBandDecimator<'_, S, N, T, W>, [S: MulAcc<T, W>, const N: usize, T: Sample, W]);

/// Two whole signals, one after the other, each streamed in blocks cut by `sizes` and then
/// flushed, against the exact upfirdn model (`factors` = (L, M, start phase)): upfirdn's length
/// (stream + tail), every output bit for bit, a too short flush buffer refused without a
/// change, nothing written past the tail, the saturations of both signals (tails included)
/// counted across the flush. The second signal checks the state a flush leaves: a new start.
fn check_whole_signals<S: Sample + Raw>(
    f: &mut impl Flushing<S>,
    h: &[i64],
    factors: (usize, usize, usize),
    frac: u32,
    run: &WholeRun<'_>,
) {
    let (signals, sizes, mode) = (run.signals, run.sizes, run.mode);
    let mut sats = 0;
    for (which, x) in signals.into_iter().enumerate() {
        let what = format!(
            "signal {which} of {} inputs, (L, M, phase) {factors:?}",
            x.len()
        );
        let (want, s) = expected::<S>(&upfirdn_finished(h, x, factors, frac, S::BITS, mode));
        sats += s;
        let mut got = in_blocks(&raws::<S>(x), sizes, |b| f.stream(b));
        let tail = f.tail_len();
        if got.len() > want.len() {
            // Fewer taps than L: the phases without taps give zeros, and the last input's past
            // upfirdn's end have no tail after them.
            assert!(h.len() < factors.0 && tail == 0, "{what}");
            let past = got.split_off(want.len());
            assert!(past.iter().all(|&v| v == S::ZERO), "{what}: {past:?}");
        }
        assert_eq!(got.len() + tail, want.len(), "{what}: stream + tail");
        if tail > 0 {
            refuses_one_short::<S>(tail, |short| f.flush(short));
            assert_eq!(
                f.tail_len(),
                tail,
                "{what}: a refused flush changed the state"
            );
        }
        let spare = S::from_raw(1);
        let mut room = vec![spare; tail + 1];
        assert_eq!(f.flush(&mut room), Ok(tail), "{what}");
        assert_eq!(room.pop(), Some(spare), "{what}: written past the tail");
        got.extend(room);
        assert_eq!(got, want, "{what}, splits {sizes:?}");
        assert_eq!(f.saturations(), sats, "{what}: saturations");
    }
}

/// Two signals, the block split and the rounding mode of one whole-signal case.
struct WholeRun<'r> {
    signals: [&'r [i64]; 2],
    sizes: &'r [usize],
    mode: Rounding,
}

/// Raw taps as a table of `N`.
fn table<T: Raw, const N: usize>(h: &[i64]) -> [T; N] {
    core::array::from_fn(|k| T::from_raw(h[k]))
}

/// Both decimator forms from start phase `phase`: `Decimator<S, N, M>` on `h[..N]` and
/// `DecimatorUpTo<S, 16, M>` on all of `h` (1 to 16 taps), refusing the start phase M.
fn whole_decimators<S, T, W, const N: usize, const M: usize>(
    h: &[i64],
    phase: usize,
    run: &WholeRun<'_>,
) where
    S: MulAcc<T, W> + FixedPoint + Raw,
    T: Sample + Raw,
    W: RuntimeChecked,
{
    let taps: [T; N] = table(h);
    let dec = Decimator::<S, N, M, T, W>::with_accumulator(&taps).unwrap();
    assert_eq!(dec.start_phase(), M - 1, "the default start phase");
    let again = Decimator::<S, N, M, T, W>::with_accumulator(&taps).unwrap();
    let refused = again.with_start_phase(M).err();
    assert_eq!(
        refused,
        Some(Error::StartPhaseTooLarge {
            phase: M,
            factor: M
        })
    );
    let mut dec = dec.with_rounding(run.mode).with_start_phase(phase).unwrap();
    assert_eq!((dec.start_phase(), dec.phase()), (phase, M - 1 - phase));
    check_whole_signals(&mut dec, &h[..N], (1, M, phase), T::FRAC, run);
    let run_time: Vec<T> = h.iter().map(|&v| T::from_raw(v)).collect();
    let up_to = tapline::filter::DecimatorUpTo::<S, 16, M, T, W>::with_taps(&run_time).unwrap();
    let mut up_to = up_to
        .with_rounding(run.mode)
        .with_start_phase(phase)
        .unwrap();
    check_whole_signals(&mut up_to, h, (1, M, phase), T::FRAC, run);
}

fn whole_interpolator<S, T, W, const N: usize, const L: usize>(h: &[i64], run: &WholeRun<'_>)
where
    S: MulAcc<T, W> + FixedPoint + Raw,
    T: Sample + Raw,
    W: RuntimeChecked,
{
    let taps: [T; N] = table(h);
    let up = Interpolator::<S, N, L, T, W>::with_accumulator(&taps).unwrap();
    let mut up = up.with_rounding(run.mode);
    check_whole_signals(&mut up, h, (L, 1, 0), T::FRAC, run);
}

fn whole_resampler<S, T, W>(h: &[i64], (l, m): (usize, usize), run: &WholeRun<'_>)
where
    S: MulAcc<T, W> + FixedPoint + Raw,
    T: Sample + Raw,
    W: RuntimeChecked,
{
    let taps: Vec<T> = h.iter().map(|&v| T::from_raw(v)).collect();
    let rs = Resampler::<S, 24, T, W>::with_accumulator(&taps, l as u16, m as u16).unwrap();
    let mut rs = rs.with_rounding(run.mode);
    check_whole_signals(&mut rs, h, (l, m, 0), T::FRAC, run);
}

/// A half-band decimator on `h` with the taps at even, non-zero distance from the centre
/// zeroed, from start phase `phase` (refusing 2), against the exact upfirdn model by 2.
fn whole_half_band<S, T, W, const N: usize>(h: &[i64], phase: usize, run: &WholeRun<'_>)
where
    S: MulAcc<T, W> + FixedPoint + Raw,
    T: Sample + Raw,
    W: RuntimeChecked,
{
    let c = N / 2;
    let h: Vec<i64> = (0..N)
        .map(|k| {
            if k != c && k.abs_diff(c) % 2 == 0 {
                0
            } else {
                h[k]
            }
        })
        .collect();
    let taps: [T; N] = table(&h);
    let hb = HalfBandDecimator::<S, N, T, W>::with_accumulator(&taps).unwrap();
    assert_eq!(hb.start_phase(), 1, "the default start phase");
    let refused = HalfBandDecimator::<S, N, T, W>::with_accumulator(&taps)
        .unwrap()
        .with_start_phase(2)
        .err();
    assert_eq!(
        refused,
        Some(Error::StartPhaseTooLarge {
            phase: 2,
            factor: 2
        })
    );
    let mut hb = hb.with_rounding(run.mode).with_start_phase(phase).unwrap();
    check_whole_signals(&mut hb, &h, (1, 2, phase), T::FRAC, run);
}

/// A second, shorter signal (to follow a flush).
fn next_signal(bits: u32) -> impl Strategy<Value = Vec<i64>> {
    prop::collection::vec(code(bits), 0..40)
}

proptest! {
    #![proptest_config(cases::config())]

    /// Decimators from every start phase, streamed and flushed, = the exact upfirdn model
    /// (full convolution, every M-th output from the phase, the zero-padded tail included),
    /// bit for bit: compile-time and run-time taps, Q15, Q4.12/Q1.15 and Q31 with `i128`.
    #[test]
    fn decimator_whole_signals_equal_the_upfirdn_model(
            n in prop::sample::select(vec![1usize, 2, 5, 13]), m in prop::sample::select(vec![1usize, 2, 3, 5]),
            phase in any::<prop::sample::Index>(), k in 1usize..=16,
            seed16 in scaled_codes(16, 16), seed32 in scaled_codes(32, 16),
            x16 in signal(16), y16 in next_signal(16), x32 in signal(32), y32 in next_signal(32),
            sizes in splits(), mode in any_rounding()) {
        let run16 = WholeRun { signals: [&x16, &y16], sizes: &sizes, mode };
        let run32 = WholeRun { signals: [&x32, &y32], sizes: &sizes, mode };
        with_const!(n, [1, 2, 5, 13], |N| with_const!(m, [1, 2, 3, 5], |M| {
            let p = phase.index(M);
            whole_decimators::<i16, i16, DefaultAcc, N, M>(&seed16[..k.max(N)], p, &run16);
            whole_decimators::<I4F12, I1F15, DefaultAcc, N, M>(&seed16[..k.max(N)], p, &run16);
            whole_decimators::<i32, i32, Acc128, N, M>(&seed32[..k.max(N)], p, &run32);
        }));
    }

    /// Interpolators streamed and flushed = the exact upfirdn model by L, bit for bit,
    /// including N < L (no tail; the stream's last outputs past upfirdn's end are zeros).
    #[test]
    fn interpolator_whole_signals_equal_the_upfirdn_model(
            n in prop::sample::select(vec![1usize, 2, 3, 4, 7, 16]), l in prop::sample::select(vec![1usize, 2, 3, 5]),
            seed16 in scaled_codes(16, 16), seed32 in scaled_codes(32, 16),
            x16 in signal(16), y16 in next_signal(16), x32 in signal(32), y32 in next_signal(32),
            sizes in splits(), mode in any_rounding()) {
        let run16 = WholeRun { signals: [&x16, &y16], sizes: &sizes, mode };
        let run32 = WholeRun { signals: [&x32, &y32], sizes: &sizes, mode };
        with_const!(n, [1, 2, 3, 4, 7, 16], |N| with_const!(l, [1, 2, 3, 5], |L| {
            whole_interpolator::<i16, i16, DefaultAcc, N, L>(&seed16[..N], &run16);
            whole_interpolator::<I4F12, I1F15, DefaultAcc, N, L>(&seed16[..N], &run16);
            whole_interpolator::<i32, i32, Acc128, N, L>(&seed32[..N], &run32);
        }));
    }

    /// Half-band decimators from both start phases, streamed and flushed = the exact upfirdn
    /// model by 2, bit for bit (the flush sums the zero taps too: they add nothing).
    #[test]
    fn half_band_whole_signals_equal_the_upfirdn_model(
            n in prop::sample::select(vec![1usize, 3, 5, 7, 11]), phase in 0usize..2,
            seed16 in scaled_codes(16, 11), seed32 in scaled_codes(32, 11),
            x16 in signal(16), y16 in next_signal(16), x32 in signal(32), y32 in next_signal(32),
            sizes in splits(), mode in any_rounding()) {
        let run16 = WholeRun { signals: [&x16, &y16], sizes: &sizes, mode };
        let run32 = WholeRun { signals: [&x32, &y32], sizes: &sizes, mode };
        with_const!(n, [1, 3, 5, 7, 11], |N| {
            whole_half_band::<i16, i16, DefaultAcc, N>(&seed16, phase, &run16);
            whole_half_band::<I4F12, I1F15, DefaultAcc, N>(&seed16, phase, &run16);
            whole_half_band::<i32, i32, Acc128, N>(&seed32, phase, &run32);
        });
    }

    /// Resamplers by L/M (1 to 6 each, not reduced) streamed and flushed = the exact upfirdn
    /// model, bit for bit, for 1 to 24 taps.
    #[test]
    fn resampler_whole_signals_equal_the_upfirdn_model(
            k in 1usize..=24, l in 1usize..=6, m in 1usize..=6,
            seed16 in scaled_codes(16, 24), seed32 in scaled_codes(32, 24),
            x16 in signal(16), y16 in next_signal(16), x32 in signal(32), y32 in next_signal(32),
            sizes in splits(), mode in any_rounding()) {
        let run16 = WholeRun { signals: [&x16, &y16], sizes: &sizes, mode };
        let run32 = WholeRun { signals: [&x32, &y32], sizes: &sizes, mode };
        whole_resampler::<i16, i16, DefaultAcc>(&seed16[..k], (l, m), &run16);
        whole_resampler::<I4F12, I1F15, DefaultAcc>(&seed16[..k], (l, m), &run16);
        whole_resampler::<i32, i32, Acc128>(&seed32[..k], (l, m), &run32);
    }
}
