//! The edges of the design searches (issue 15, points 1 and 8): every search ends with a clear
//! answer in bounded time, explicit equiripple lengths converge, and a "meets" verdict holds on
//! the whole frequency axis, transition bands included, by this file's own dense-grid
//! measurement (a direct DFT sum in f64, written here from the definition, not by tapline).
//!
//! All specs are invented. Measured figures are printed: `cargo test --test design_edges --
//! --nocapture`.
#![cfg(feature = "std")]

use std::sync::mpsc;
use std::thread;
use std::time::{Duration, Instant};
use tapline::design::{DesignError, Shape, Spec};

/// Runs `f` on its own thread and fails the test if it has not answered within `limit` (the
/// old equiripple search could loop forever; a test must not).
fn within<T: Send + 'static>(limit: Duration, f: impl FnOnce() -> T + Send + 'static) -> T {
    let (tx, rx) = mpsc::channel();
    thread::spawn(move || {
        let _ = tx.send(f());
    });
    match rx.recv_timeout(limit) {
        Ok(v) => v,
        Err(_) => panic!("no answer within {limit:?}"),
    }
}

fn spec(shape: Shape<f64>, ripple_db: f64, attenuation_db: f64) -> Spec<f64> {
    Spec {
        sample_rate_hz: 1000.0,
        shape,
        passband_ripple_db: ripple_db,
        stopband_attenuation_db: attenuation_db,
    }
}

/// The invented silo-scale spec of `examples/tool/silo_scale.toml`.
fn silo() -> Spec<f64> {
    spec(
        Shape::Lowpass {
            pass_hz: 5.0,
            stop_hz: 50.0,
        },
        0.1,
        60.0,
    )
}

// ---------------------------------------------------------------------------------------------
// Point 8: the equiripple search ends, and explicit lengths converge
// ---------------------------------------------------------------------------------------------

/// Highpass and bandstop plans (odd lengths only) that no length up to the limit meets. With
/// an estimate within the limit (250 dB: below what f64 taps resolve, so every exchange
/// misses), the search used to wait for the even limit 1024, which odd-only bands never try,
/// and looped forever; with an estimate beyond it (a 1 Hz transition for 80 dB, about 5000
/// taps), it named 1024 taps, a length it had not tried.
#[test]
fn search_without_a_meeting_length_ends_with_the_longest_length_tried() {
    let cases = [
        spec(
            Shape::Highpass {
                stop_hz: 100.0,
                pass_hz: 300.0,
            },
            0.1,
            250.0,
        ),
        spec(
            Shape::Bandstop {
                pass_low_hz: 50.0,
                stop_low_hz: 150.0,
                stop_high_hz: 250.0,
                pass_high_hz: 350.0,
            },
            0.1,
            250.0,
        ),
        spec(
            Shape::Highpass {
                stop_hz: 100.0,
                pass_hz: 101.0,
            },
            0.1,
            80.0,
        ),
        spec(
            Shape::Bandstop {
                pass_low_hz: 100.0,
                stop_low_hz: 101.0,
                stop_high_hz: 200.0,
                pass_high_hz: 201.0,
            },
            0.1,
            80.0,
        ),
    ];
    for s in cases {
        let start = Instant::now();
        let r = within(Duration::from_secs(240), move || s.shortest_equiripple());
        println!(
            "{:?}: {:?} after {:?}",
            s.shape,
            r.as_ref().err(),
            start.elapsed()
        );
        assert!(
            matches!(r, Err(DesignError::SpecNotMet { taps: 1023, .. })),
            "{r:?}"
        );
    }
}

/// Explicit lengths beyond about 150 taps failed for the silo spec in the first exchange
/// iterations ("did not converge within 1 iterations"): the barycentric weights underflowed
/// and the trial set lost one alternation to rounding. Now they converge and meet the spec.
#[test]
fn silo_spec_converges_at_long_explicit_lengths() {
    for len in [151, 160, 200, 250] {
        let d = silo().equiripple_at(len);
        let d = match d {
            Ok(d) => d,
            Err(e) => panic!("{len} taps: {e}"),
        };
        println!(
            "silo {len} taps: weighted ripple {:.3e} after {} iterations, attenuation {:.1} dB",
            d.design.weighted_ripple, d.design.iterations, d.measured.stopband_attenuation_db
        );
        assert_eq!(d.design.taps.len(), len);
        assert!(d.measured.meets(), "{len} taps");
    }
}

// ---------------------------------------------------------------------------------------------
// Point 1: "meets" holds on the whole axis, by an independent dense grid
// ---------------------------------------------------------------------------------------------

/// |H(ν)| by a direct DFT sum in f64, ν in cycles per sample.
fn gain(h: &[f64], nu: f64) -> f64 {
    let (mut re, mut im) = (0.0, 0.0);
    for (n, &v) in h.iter().enumerate() {
        let w = 2.0 * std::f64::consts::PI * nu * n as f64;
        re += v * w.cos();
        im -= v * w.sin();
    }
    re.hypot(im)
}

/// Whether `taps` meet `s` on a grid 16× finer than the equiripple design grid (16 points
/// per 1/(2r), so 256·r points over 0..fs/2): the passband ripple, the stopband attenuation,
/// and nowhere outside the stopbands a gain above min(passband)·10^(ripple/20). `tol` is the
/// relative slack on each limit. Returns the largest gain found in a transition band.
fn dense_check(s: &Spec<f64>, taps: &[f64], tol: f64) -> Result<f64, String> {
    let fs = s.sample_rate_hz;
    type Edges = Vec<(f64, f64)>;
    let (pass, stop): (Edges, Edges) = match s.shape {
        Shape::Lowpass { pass_hz, stop_hz } => (vec![(0.0, pass_hz)], vec![(stop_hz, fs / 2.0)]),
        Shape::Highpass { stop_hz, pass_hz } => (vec![(pass_hz, fs / 2.0)], vec![(0.0, stop_hz)]),
        Shape::Bandpass {
            stop_low_hz,
            pass_low_hz,
            pass_high_hz,
            stop_high_hz,
        } => (
            vec![(pass_low_hz, pass_high_hz)],
            vec![(0.0, stop_low_hz), (stop_high_hz, fs / 2.0)],
        ),
        Shape::Bandstop {
            pass_low_hz,
            stop_low_hz,
            stop_high_hz,
            pass_high_hz,
        } => (
            vec![(0.0, pass_low_hz), (pass_high_hz, fs / 2.0)],
            vec![(stop_low_hz, stop_high_hz)],
        ),
        _ => return Err(String::from("unknown shape")),
    };
    let r = taps.len().div_ceil(2).max(1);
    let points = 256 * r;
    let inside = |f: f64, bands: &[(f64, f64)]| bands.iter().any(|&(a, b)| f >= a && f <= b);
    let (mut pmin, mut pmax, mut smax, mut tmax) = (f64::INFINITY, 0.0f64, 0.0f64, 0.0f64);
    for k in 0..=points {
        let f = fs / 2.0 * k as f64 / points as f64;
        let g = gain(taps, f / fs);
        if inside(f, &pass) {
            pmin = pmin.min(g);
            pmax = pmax.max(g);
        } else if inside(f, &stop) {
            smax = smax.max(g);
        } else {
            tmax = tmax.max(g);
        }
    }
    // The band edges themselves, exactly.
    for &(a, b) in &pass {
        for f in [a, b] {
            let g = gain(taps, f / fs);
            pmin = pmin.min(g);
            pmax = pmax.max(g);
        }
    }
    let ripple_db = 20.0 * (pmax / pmin).log10();
    let ceiling = pmin * 10f64.powf(s.passband_ripple_db / 20.0);
    let stop_limit = 10f64.powf(-s.stopband_attenuation_db / 20.0);
    if ripple_db > s.passband_ripple_db * (1.0 + tol) {
        return Err(format!("ripple {ripple_db} dB"));
    }
    if smax > stop_limit * (1.0 + tol) {
        return Err(format!("stopband gain {smax}"));
    }
    if tmax > ceiling * (1.0 + tol) || pmax > ceiling * (1.0 + tol) {
        return Err(format!("transition gain {tmax} above {ceiling}"));
    }
    Ok(tmax)
}

/// A small seeded generator (xorshift64*), so the plans are the same on every run.
struct Plans(u64);

impl Plans {
    fn next(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        (self.0.wrapping_mul(0x2545_f491_4f6c_dd1d) >> 11) as f64 / (1u64 << 53) as f64
    }
    fn between(&mut self, a: f64, b: f64) -> f64 {
        a + (b - a) * self.next()
    }
    /// An invented band plan at 1 kHz: transition widths 25..90 Hz (unequal for the
    /// four-edge bands), ripple 0.1..1 dB, attenuation 30..60 dB.
    fn spec(&mut self, kind: usize) -> Spec<f64> {
        let w1 = self.between(25.0, 90.0);
        let w2 = self.between(25.0, 90.0);
        let a = self.between(40.0, 120.0);
        let mid = self.between(40.0, 100.0);
        let shape = match kind % 4 {
            0 => Shape::Lowpass {
                pass_hz: a + 60.0,
                stop_hz: a + 60.0 + w1,
            },
            1 => Shape::Highpass {
                stop_hz: a + 60.0,
                pass_hz: a + 60.0 + w1,
            },
            2 => Shape::Bandpass {
                stop_low_hz: a,
                pass_low_hz: a + w1,
                pass_high_hz: a + w1 + mid,
                stop_high_hz: a + w1 + mid + w2,
            },
            _ => Shape::Bandstop {
                pass_low_hz: a,
                stop_low_hz: a + w1,
                stop_high_hz: a + w1 + mid,
                pass_high_hz: a + w1 + mid + w2,
            },
        };
        spec(shape, self.between(0.1, 1.0), self.between(30.0, 60.0))
    }
}

/// Designs `count` invented plans (all band types, both methods, f32/Q15/Q31) and checks every
/// "meets" against [`dense_check`]. Tolerance: 10⁻⁶ relative on each limit (the library
/// refines extremes between grid points; a grid value can only be below the true extreme, so
/// a real miss of more than 10⁻⁶ shows). Returns (designs, refused, largest transition dB).
fn audit(count: usize, seed: u64) -> (usize, usize, f64) {
    let mut plans = Plans(seed);
    let (mut refused, mut worst) = (0, f64::NEG_INFINITY);
    for k in 0..count {
        let s = plans.spec(k);
        let method = (k / 4) % 2;
        let format = (k / 8) % 3;
        let taps: Result<Vec<f64>, DesignError> = match (method, format) {
            (0, 0) => s.kaiser::<1024>().map(|d| d.taps.to_vec()),
            (0, 1) => s
                .kaiser_fixed::<i16, 1024>()
                .map(|d| d.taps.iter().map(|&c| f64::from(c) / 32768.0).collect()),
            (0, _) => s.kaiser_fixed::<i32, 1024>().map(|d| {
                d.taps
                    .iter()
                    .map(|&c| f64::from(c) / 2147483648.0)
                    .collect()
            }),
            (_, 0) => s.shortest_equiripple().map(|d| d.design.taps),
            (_, 1) => s
                .equiripple_fixed::<i16>(None)
                .map(|d| d.taps.iter().map(|&c| f64::from(c) / 32768.0).collect()),
            (_, _) => s.equiripple_fixed::<i32>(None).map(|d| {
                d.taps
                    .iter()
                    .map(|&c| f64::from(c) / 2147483648.0)
                    .collect()
            }),
        };
        match taps {
            Ok(h) => match dense_check(&s, &h, 1e-6) {
                Ok(t) => worst = worst.max(20.0 * t.log10()),
                Err(why) => panic!(
                    "plan {k} ({s:?}, method {method}, format {format}) meets by the library but not by the dense grid: {why}"
                ),
            },
            // A refusal is an answer; anything else (an internal error) is not.
            Err(DesignError::SpecNotMet { .. }) => refused += 1,
            Err(e) => panic!("plan {k} ({s:?}, method {method}, format {format}): {e}"),
        }
    }
    (count, refused, worst)
}

/// The default set: 96 designs (each band type × method × format, four times over).
#[test]
fn meets_holds_on_a_dense_grid_for_invented_plans() {
    let (n, refused, worst) = audit(96, 0x15_0001);
    println!("{n} designs, {refused} refused, largest transition gain {worst:+.3} dB");
    // Every plan here is within reach of 1024 taps; before the transition bands were
    // constrained, equiripple bandpass and bandstop plans with unequal widths were refused.
    assert_eq!(refused, 0, "{refused} of {n} refused");
}

/// The big set, 480 designs: `cargo test --release --test design_edges -- --ignored`.
#[test]
#[ignore = "about a minute in release"]
fn meets_holds_on_a_dense_grid_for_many_invented_plans() {
    let (n, refused, worst) = audit(480, 0x15_0002);
    println!("{n} designs, {refused} refused, largest transition gain {worst:+.3} dB");
    // Every plan here is within reach of 1024 taps; before the transition bands were
    // constrained, equiripple bandpass and bandstop plans with unequal widths were refused.
    assert_eq!(refused, 0, "{refused} of {n} refused");
}

/// A Q15 highpass with a tight passband ripple (0.0073 dB): the quantized taps of the
/// shortest float design miss at every stopband margin (margins buy attenuation, not
/// ripple), and the search used to refuse ("no design of up to 79 taps") while asking for
/// exactly 79 taps gave Q15 taps that meet. Now the search goes on over the lengths and
/// returns the shortest whose quantized taps meet, its neighbour one step shorter missing.
#[test]
fn q15_highpass_search_finds_the_length_that_meets() {
    let s = spec(
        Shape::Highpass {
            stop_hz: 180.0,
            pass_hz: 233.0,
        },
        0.0073,
        65.5,
    );
    let d = match s.equiripple_fixed::<i16>(None) {
        Ok(d) => d,
        Err(e) => panic!("refused: {e}"),
    };
    let n = d.taps.len();
    println!(
        "Q15 highpass 180/233 Hz, 0.0073 dB, 65.5 dB: {n} taps, margin {} dB",
        d.margin_db
    );
    assert!(d.measured.meets());
    let shorter = s.equiripple_fixed::<i16>(Some(n - 2));
    assert!(shorter.is_ok_and(|d| !d.measured.meets()));
}
