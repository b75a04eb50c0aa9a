//! Published worked examples, checked against tapline.
//!
//! Markings beside values: a citation is a printed source; "from memory" is recalled without
//! the source at hand (equation or page numbers especially); "[computed]" was computed outside
//! this crate with the named tool; "common practice" is a fact of the trade. All input signals
//! are invented here (a fixed pseudo-random generator written below, or hand-picked values).

use tapline::{Fir, Rounding};

// ---------------------------------------------------------------------------------------------
// Moving average: S. W. Smith, *The Scientist and Engineer's Guide to Digital Signal
// Processing*, California Technical Publishing, 1997, ch. 15 "Moving Average Filters".
// ---------------------------------------------------------------------------------------------

/// xorshift64* (S. Vigna, "An experimental exploration of Marsaglia's xorshift generators,
/// scrambled", ACM TOMS 42(4), 2016 — citation and constants from memory). Only its being a fixed,
/// roughly uniform, roughly independent sequence matters here: the noise is invented.
struct Noise(u64);

impl Noise {
    /// Uniform on [−1, 1): the top 53 bits as a fraction.
    fn next(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        let r = self.0.wrapping_mul(0x2545_F491_4F6C_DD1D);
        (r >> 11) as f64 / (1u64 << 52) as f64 - 1.0
    }
}

/// The output of `fir` for a unit impulse followed by `len − 1` zeros.
fn impulse_response<const N: usize>(taps: &[f64; N], len: usize) -> Vec<f64> {
    let mut fir = Fir::<f64, N>::new(taps).unwrap();
    (0..len)
        .map(|n| fir.push(if n == 0 { 1.0 } else { 0.0 }))
        .collect()
}

/// |Σ h[k]·e^{−j2πfk}|, the magnitude of the DTFT of `h` at `f` cycles/sample.
fn dtft_magnitude(h: &[f64], f: f64) -> f64 {
    let (mut re, mut im) = (0.0, 0.0);
    for (k, &hk) in h.iter().enumerate() {
        let w = 2.0 * core::f64::consts::PI * f * k as f64;
        re += hk * w.cos();
        im -= hk * w.sin();
    }
    re.hypot(im)
}

/// |sin(πNf) / (N·sin(πf))|, the N-point moving average's magnitude response
/// (Smith 1997, ch. 15, eq. 15-2 — equation number from memory).
fn moving_average_magnitude(n: usize, f: f64) -> f64 {
    let pi = core::f64::consts::PI;
    ((pi * n as f64 * f).sin() / (n as f64 * (pi * f).sin())).abs()
}

#[test]
fn moving_average_noise_power_gain_is_exactly_one_over_n() {
    // White noise of variance σ² through taps h comes out with variance σ²·Σh² (common
    // practice); for the N-point average Σh² = N·(1/N)² = 1/N, which is Smith's "reduces the
    // noise standard deviation by √N" (Smith 1997, ch. 15). For N a power of two every step is
    // exact in f64, so equality is exact.
    fn check<const N: usize>() {
        let taps = [1.0 / N as f64; N];
        let h = impulse_response(&taps, 2 * N);
        assert!(h[..N].iter().all(|&v| v == 1.0 / N as f64), "N={N}: {h:?}");
        assert!(h[N..].iter().all(|&v| v == 0.0), "N={N}: finite response");
        let power_gain: f64 = h.iter().map(|v| v * v).sum();
        assert_eq!(power_gain, 1.0 / N as f64, "N={N}");
        assert_eq!(h.iter().sum::<f64>(), 1.0, "N={N}: DC gain");
    }
    check::<2>();
    check::<4>();
    check::<8>();
    check::<16>();
}

#[test]
fn moving_average_reduces_measured_noise_by_sqrt_n() {
    // Smith 1997, ch. 15: an N-point moving average divides the standard deviation of white
    // noise by √N. Measured on M = 2^20 invented uniform samples.
    //
    // Tolerance: the output is correlated over N lags, with autocorrelation ρ(k) = (N−|k|)/N.
    // The sample variance of M such values has relative standard deviation about
    // √(2·Σ_k ρ(k)²/M) (Bartlett's formula for Gaussian input, from memory; uniform input has
    // lower kurtosis, which only narrows it). For N = 16, Σρ² = 1 + 2·Σ_{j=1}^{15}(j/16)² =
    // 10.6875, so ≈ 0.45 % on the variance ratio, ≈ 0.23 % on the σ ratio. We allow 1.5 % on
    // the σ ratio: more than 6 standard deviations, yet far from √(N/2) or N.
    const N: usize = 16;
    const M: usize = 1 << 20;
    let taps = [1.0 / N as f64; N];
    let mut fir = Fir::<f64, N>::new(&taps).unwrap();
    let mut noise = Noise(0x9E37_79B9_7F4A_7C15);
    let (mut sx, mut sxx, mut sy, mut syy) = (0.0, 0.0, 0.0, 0.0);
    let mut count = 0.0;
    for n in 0..M + N - 1 {
        let x = noise.next();
        let y = fir.push(x);
        if n >= N - 1 {
            // Past the start-up transient: every output averages N real samples.
            sx += x;
            sxx += x * x;
            sy += y;
            syy += y * y;
            count += 1.0;
        }
    }
    let var = |s: f64, ss: f64| (ss - s * s / count) / (count - 1.0);
    let ratio = (var(sx, sxx) / var(sy, syy)).sqrt();
    let want = (N as f64).sqrt();
    println!("σ_in/σ_out = {ratio}, √N = {want}");
    assert!(
        (ratio - want).abs() <= 0.015 * want,
        "σ_in/σ_out = {ratio}, expected √{N} = {want} within 1.5 %"
    );
}

#[test]
fn moving_average_frequency_response_matches_closed_form_and_has_nulls_at_k_over_n() {
    // H(f) = sin(πNf)/(N·sin(πf)) (Smith 1997, ch. 15, eq. 15-2 from memory), zero at f = k/N.
    // The response is evaluated from tapline's impulse response, not from the taps.
    fn check<const N: usize>() {
        let taps = [1.0 / N as f64; N];
        let h = impulse_response(&taps, 2 * N);
        assert!(
            (dtft_magnitude(&h, 0.0) - 1.0).abs() <= 1e-12,
            "N={N}: H(0)"
        );
        for j in 1..=500 {
            let f = j as f64 / 1000.0;
            let (got, want) = (dtft_magnitude(&h, f), moving_average_magnitude(N, f));
            assert!((got - want).abs() <= 1e-12, "N={N} f={f}: {got} vs {want}");
        }
        for k in 1..=N / 2 {
            let f = k as f64 / N as f64;
            let got = dtft_magnitude(&h, f);
            assert!(got <= 1e-12, "N={N}: |H({k}/{N})| = {got}, expected a null");
        }
    }
    check::<3>();
    check::<4>();
    check::<5>();
    check::<8>();
}

/// The f in (0, 1/4) where |H(f)| of the N = 4 average, measured from tapline's impulse
/// response, falls to `level`: bisection (|H| decreases from 1 to 0 on that interval).
fn crossing_n4(level: f64) -> f64 {
    let h = impulse_response(&[0.25; 4], 8);
    let (mut lo, mut hi) = (1e-9, 0.25);
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        if dtft_magnitude(&h, mid) > level {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

#[test]
fn four_point_average_half_power_frequency() {
    // Half-power point, |H| = 1/√2 (−3.0103 dB): 0.113848 cycles/sample [computed: scipy 1.17.1,
    // scipy.optimize.brentq on |sin(4πf)/(4 sin πf)| − 1/√2, which gave 0.11384810648…].
    let f = crossing_n4(core::f64::consts::FRAC_1_SQRT_2);
    assert!((f - 0.113848).abs() <= 1e-6, "half-power point {f}");
    // The exactly −3.000 dB point, |H| = 10^(−3/20), is a little lower: 0.113669 cycles/sample
    // [computed: scipy 1.17.1, same method, 0.11366914075…]. The two differ by more than the
    // tolerance, so this also checks which definition the value above follows.
    let f3 = crossing_n4(10f64.powf(-3.0 / 20.0));
    assert!((f3 - 0.113669).abs() <= 1e-6, "−3 dB point {f3}");
}

// ---------------------------------------------------------------------------------------------
// Savitzky–Golay 5-point quadratic smoother in Q15: A. Savitzky & M. J. E. Golay, "Smoothing
// and Differentiation of Data by Simplified Least Squares Procedures", Anal. Chem. 36(8),
// 1964, pp. 1627–1639, as corrected by J. Steinier, Y. Termonia & J. Deltour, Anal. Chem.
// 44(11), 1972, pp. 1906–1909 (titles and pages from memory). Coefficients (−3, 12, 17, 12,
// −3)/35.
// ---------------------------------------------------------------------------------------------

/// The published numerators over the published normaliser 35.
const SG5_NUM: [i64; 5] = [-3, 12, 17, 12, -3];
const SG5_DEN: i64 = 35;

/// (−2809, 11235, 15916, 11235, −2809) [computed: by hand from the rationals; the test
/// recomputes it].
const SG5_Q15: [i16; 5] = [-2809, 11235, 15916, 11235, -2809];

/// Round-to-nearest of num/den·2^15 with exact integers (den > 0 and odd, so no ties).
fn q15_nearest(num: i64, den: i64) -> i16 {
    i16::try_from((2 * num * 32768 + den).div_euclid(2 * den)).unwrap()
}

/// Reference for one Q15 output, independent of tapline: Σ h[k]·x[n−k] in i64 over the
/// history (newest last, zeros before time 0), then ⌊acc/2^15 + ½⌋ and a clamp.
fn reference_q15(taps: &[i16], history: &[i16]) -> (i16, bool) {
    let acc: i64 = taps
        .iter()
        .zip(history.iter().rev())
        .map(|(&h, &x)| i64::from(h) * i64::from(x))
        .sum();
    let q = (acc + (1 << 14)).div_euclid(1 << 15);
    let y = q.clamp(i64::from(i16::MIN), i64::from(i16::MAX));
    (i16::try_from(y).unwrap(), y != q)
}

/// tapline's outputs and saturation count for `input` (HalfUp) next to the reference's.
fn run_against_reference(taps: &[i16; 5], input: &[i16]) -> (Vec<i16>, u32, Vec<i16>, u32) {
    let mut fir = Fir::<i16, 5>::new(taps).unwrap();
    let got: Vec<i16> = input.iter().map(|&x| fir.push(x)).collect();
    let (mut want, mut want_sat) = (Vec::new(), 0);
    for n in 0..input.len() {
        let (y, sat) = reference_q15(taps, &input[..=n]);
        want.push(y);
        want_sat += u32::from(sat);
    }
    (got, fir.saturations(), want, want_sat)
}

#[test]
fn savitzky_golay_coefficients_follow_from_least_squares() {
    // Fitting a + b·i + c·i² to y at i = −2..2 by least squares, the fitted value at i = 0 is
    // a = (Σi⁴·Σy − Σi²·Σi²y) / (n·Σi⁴ − (Σi²)²) with n = 5, Σi² = 10, Σi⁴ = 34 (the odd sums
    // vanish): the weight of y_i is (34 − 10·i²)/70 (derivation: common practice).
    let (n, s2, s4) = (5i64, 10i64, 34i64);
    let det = n * s4 - s2 * s2;
    for (i, &num) in (-2i64..=2).zip(&SG5_NUM) {
        let weight_num = s4 - s2 * i * i;
        // weight_num/det == num/35, cross-multiplied. Source: Savitzky & Golay 1964 table.
        assert_eq!(weight_num * SG5_DEN, num * det, "i = {i}");
    }
    assert_eq!(SG5_NUM.iter().sum::<i64>(), SG5_DEN, "DC gain 1");
}

#[test]
fn savitzky_golay_q15_quantisation_sums_to_exactly_one() {
    let quantised: Vec<i16> = SG5_NUM.iter().map(|&c| q15_nearest(c, SG5_DEN)).collect();
    assert_eq!(quantised, SG5_Q15, "round-to-nearest of c/35 in Q15");
    // 32768 = 2^15 is exactly 1.0 in Q15: the quantised smoother keeps DC gain exactly 1.
    assert_eq!(SG5_Q15.iter().map(|&h| i32::from(h)).sum::<i32>(), 32768);
}

#[test]
fn savitzky_golay_q15_passes_constants_exactly_in_every_rounding_mode() {
    // Step response overshoot: the partial tap sums are −2809, 8426, 24342, 35577, 32768, so
    // the 4th output of a constant c is c·35577/2^15; it saturates when |c| is near full scale
    // (common practice: a filter with negative taps overshoots a step).
    let partial = [-2809i64, 8426, 24342, 35577, 32768];
    let mut acc = 0;
    for (k, &h) in SG5_Q15.iter().enumerate() {
        acc += i64::from(h);
        assert_eq!(acc, partial[k]);
    }
    for c in [i16::MIN, -30000, -12345, -1, 0, 1, 777, 30000, i16::MAX] {
        // c·35577/2^15 leaves the Q15 range only for the two full-scale constants in this list
        // (30000·35577/32768 ≈ 32572), so no rounding mode can change which ones saturate.
        let overshoot = i64::from(c) * 35577 / 32768;
        let transient_sat =
            u32::from(!(i64::from(i16::MIN)..=i64::from(i16::MAX)).contains(&overshoot));
        for r in Rounding::ALL {
            let mut fir = Fir::<i16, 5>::new(&SG5_Q15).unwrap().with_rounding(r);
            for _ in 0..4 {
                fir.push(c);
            }
            assert_eq!(
                fir.clear_saturations(),
                transient_sat,
                "c={c} {r:?}: start-up"
            );
            for n in 0..20 {
                // DC gain exactly 1: c·32768/2^15 = c with no rounding in any mode.
                assert_eq!(fir.push(c), c, "c={c} {r:?} n={n}");
            }
            assert_eq!(fir.saturations(), 0, "c={c} {r:?}");
        }
    }
}

#[test]
fn savitzky_golay_q15_worst_case_input_saturates_and_is_counted() {
    let (hi, lo) = (i16::MAX, i16::MIN);
    // Σ|h| = 44004 > 32768: gain up to 44004/32768 ≈ 1.34 when each x[n−k] is full scale with
    // the sign of h[k]. In time order that is (−, +, +, +, −): it alternates with the taps'
    // signs.
    assert_eq!(
        SG5_Q15.iter().map(|&h| i32::from(h).abs()).sum::<i32>(),
        44004
    );
    let worst_up = [lo, hi, hi, hi, lo];
    let (got, sat, want, want_sat) = run_against_reference(&SG5_Q15, &worst_up);
    assert_eq!(got, want);
    assert_eq!(
        (got[4], sat, want_sat),
        (hi, 1, 1),
        "clamps to +full scale once"
    );

    let worst_down = [hi, lo, lo, lo, hi];
    let (got, sat, want, want_sat) = run_against_reference(&SG5_Q15, &worst_down);
    assert_eq!(got, want);
    assert_eq!(
        (got[4], sat, want_sat),
        (lo, 1, 1),
        "clamps to −full scale once"
    );

    // The same patterns back to back for 60 samples: the count matches the reference.
    let stream: Vec<i16> = worst_up
        .iter()
        .chain(&worst_down)
        .cycle()
        .take(60)
        .copied()
        .collect();
    let (got, sat, want, want_sat) = run_against_reference(&SG5_Q15, &stream);
    assert_eq!(got, want);
    assert_eq!(sat, want_sat);
    assert!(sat >= 6, "{sat} saturations");

    // A plain ±full-scale alternation (f = ½) is *not* the worst case here: its gain is
    // Σ(−1)^k·h[k] = −12172/32768 (exact −13/35 ≈ −0.371), so nothing saturates.
    assert_eq!(
        SG5_Q15
            .iter()
            .zip([1i32, -1, 1, -1, 1])
            .map(|(&h, s)| i32::from(h) * s)
            .sum::<i32>(),
        -12172
    );
    let alternating: Vec<i16> = (0..40).map(|n| if n % 2 == 0 { hi } else { lo }).collect();
    let (got, sat, want, want_sat) = run_against_reference(&SG5_Q15, &alternating);
    assert_eq!(got, want);
    assert_eq!((sat, want_sat), (0, 0));
}
