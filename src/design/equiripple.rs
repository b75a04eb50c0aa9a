//! Parks–McClellan: the linear-phase FIR whose weighted error is smallest in the worst case
//! (equiripple), found by the Remez exchange. `std` only: it works in `f64` and allocates.
//!
//! Source: T. W. Parks & J. H. McClellan, "Chebyshev approximation for nonrecursive digital
//! filters with linear phase", IEEE Trans. Circuit Theory CT-19(2), 1972, pp. 189–194; the
//! alternation theorem and the exchange as in A. V. Oppenheim & R. W. Schafer, *Discrete-Time
//! Signal Processing*, 3rd ed., 2010, §7.7 (section number from memory).
//!
//! The amplitude of a symmetric length-N filter is A(ω) = Q(ω)·P(cos ω), P a polynomial of
//! degree r − 1: Q = 1 and r = (N + 1)/2 for odd N; Q = cos(ω/2) and r = N/2 for even N. On a
//! dense grid over the bands, each iteration solves for the polynomial whose weighted error
//! W·(D − A) takes ±δ with alternating signs on r + 1 trial frequencies (barycentric Lagrange
//! form), then moves the trial frequencies to the error's extremes, until they stop moving.
//! The taps come from A sampled at N equally spaced frequencies (an exact inverse DFT for
//! length N).

use super::DesignError;
use super::real::Real;
use std::vec::Vec;

/// One band of an equiripple spec: edges in Hz (0 ≤ low < high ≤ fs/2), the desired gain over
/// it, and the weight of its error (larger = smaller error there; the ratio of two bands'
/// deviations is the inverse ratio of their weights).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EquirippleBand {
    /// Lower edge in Hz.
    pub low_hz: f64,
    /// Upper edge in Hz.
    pub high_hz: f64,
    /// Desired gain (1 in a passband, 0 in a stopband).
    pub gain: f64,
    /// Error weight, > 0.
    pub weight: f64,
}

/// An equiripple design and what it achieved.
#[derive(Debug, Clone, PartialEq)]
pub struct Equiripple {
    /// The taps, exactly symmetric.
    pub taps: Vec<f64>,
    /// δ: the weighted error the exchange converged to (every band's deviation × its weight
    /// equals δ at the optimum).
    pub weighted_ripple: f64,
    /// Per band, the largest deviation of the final taps' gain from the desired gain,
    /// max(|max|H| − D|, |D − min|H||), measured by [`gain_range`](super::gain_range) (in the
    /// order the bands were given). For a band with D > 0 this assumes the amplitude keeps its
    /// sign in the band, as it does in any useful passband.
    pub band_deviation: Vec<f64>,
    /// Exchange iterations used.
    pub iterations: u32,
}

/// The grid density [`equiripple`] uses: points per 1/(2r) of the band (r = the number of
/// cosine terms), 16 as in Parks & McClellan's program.
pub const EQUIRIPPLE_GRID_DENSITY: usize = 16;

/// The longest filter [`equiripple`] designs; a longer length is refused with
/// [`DesignError::InvalidTransition`]. The exchange's work per iteration grows with the square of
/// the length, so the cap keeps a host-side design within seconds.
///
/// **The real limit depends on the bands:** the optimal error falls by a fixed number of dB
/// per tap (about 14.6·Δf/fs·20 dB, Kaiser's estimate), and once it falls below about −180 dB
/// rounding in `f64` decides the error's signs and the exchange cannot settle. A fit that
/// gets within −180 dB is returned even if unsettled; beyond that the design ends with
/// [`DesignError::NoConvergence`]. The invented silo spec (1 kHz, 5 Hz/50 Hz, 0.1 dB, 60 dB),
/// which about 60 taps meet, converges up to 280 taps (−208 dB) but not at 300
/// (`tests/design_edges.rs` checks up to 250).
pub const MAX_EQUIRIPPLE_TAPS: usize = 1024;

/// The iteration cap [`equiripple`] uses.
pub const EQUIRIPPLE_MAX_ITERATIONS: u32 = 100;

/// Designs the `len`-tap linear-phase (symmetric) FIR that minimises the largest weighted error
/// over `bands` (Parks–McClellan), with [`EQUIRIPPLE_GRID_DENSITY`] and [`EQUIRIPPLE_MAX_ITERATIONS`].
///
/// **Accuracy:** the exchange stops when the trial frequencies no longer move or the extremes
/// of the weighted error agree with δ to 10⁻¹⁰ relative; taps agree with scipy 1.17.1's
/// `remez` (same grid density) to 5·10⁻⁵ and the per-band deviations to 1 % relative (the grids
/// are built differently; `tests/design_scipy.rs`). The reported deviations are measured on
/// the final taps between grid points as well, by [`gain_range`](super::gain_range).
///
/// # Errors
/// [`DesignError::TooShort`] for fewer than 3 taps or no band; [`DesignError::FrequencyOutOfRange`];
/// [`DesignError::EdgesNotIncreasing`] for overlapping or unordered bands; [`DesignError::InvalidBandGain`];
/// [`DesignError::InvalidTransition`] for more than [`MAX_EQUIRIPPLE_TAPS`] taps; [`DesignError::NoConvergence`] when the
/// exchange does not settle within the cap or its arithmetic overflows, unless its best fit
/// is already within −180 dB (see [`MAX_EQUIRIPPLE_TAPS`]: lengths far beyond what the bands
/// need end here). It never loops without bound.
///
/// ```
/// use tapline::design::{EquirippleBand, equiripple};
/// let bands = [
///     EquirippleBand { low_hz: 0.0, high_hz: 150.0, gain: 1.0, weight: 1.0 },
///     EquirippleBand { low_hz: 250.0, high_hz: 500.0, gain: 0.0, weight: 1.0 },
/// ];
/// let d = equiripple(12, &bands, 1000.0)?;
/// assert_eq!(d.taps.len(), 12);
/// let (pass, stop) = (d.band_deviation[0], d.band_deviation[1]);
/// assert!((pass - stop).abs() < 0.01 * pass); // equal weights: equal ripple
/// // Edge case: bands that overlap are refused.
/// let overlap = [bands[0], EquirippleBand { low_hz: 100.0, ..bands[1] }];
/// assert!(equiripple(12, &overlap, 1000.0).is_err());
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
pub fn equiripple(
    len: usize,
    bands: &[EquirippleBand],
    sample_rate_hz: f64,
) -> Result<Equiripple, DesignError> {
    equiripple_with(
        len,
        bands,
        sample_rate_hz,
        EQUIRIPPLE_GRID_DENSITY,
        EQUIRIPPLE_MAX_ITERATIONS,
    )
}

/// [`equiripple`] with a chosen grid density (≥ 1) and iteration cap (≥ 1).
///
/// # Errors
/// As [`equiripple`]; [`DesignError::TooShort`] for a density or cap of 0.
pub fn equiripple_with(
    len: usize,
    bands: &[EquirippleBand],
    sample_rate_hz: f64,
    grid_density: usize,
    max_iterations: u32,
) -> Result<Equiripple, DesignError> {
    if len < 3 || bands.is_empty() || grid_density == 0 || max_iterations == 0 {
        return Err(DesignError::TooShort {
            minimum: 3,
            found: len,
        });
    }
    if len > MAX_EQUIRIPPLE_TAPS {
        return Err(DesignError::InvalidTransition);
    }
    if !(sample_rate_hz.is_finite() && sample_rate_hz > 0.0) {
        return Err(DesignError::FrequencyOutOfRange);
    }
    let half = sample_rate_hz / 2.0;
    let mut previous_high = f64::NEG_INFINITY;
    for b in bands {
        if !(b.low_hz >= 0.0 && b.high_hz <= half && b.low_hz.is_finite() && b.high_hz.is_finite())
        {
            return Err(DesignError::FrequencyOutOfRange);
        }
        if !(b.low_hz < b.high_hz && b.low_hz >= previous_high) {
            return Err(DesignError::EdgesNotIncreasing);
        }
        if !(b.gain.is_finite() && b.weight.is_finite() && b.weight > 0.0) {
            return Err(DesignError::InvalidBandGain);
        }
        previous_high = b.high_hz;
    }
    let odd = len % 2 == 1;
    let r = if odd { len.div_ceil(2) } else { len / 2 };
    let grid = Grid::new(bands, sample_rate_hz, r, grid_density, odd);
    if grid.nu.len() < r + 1 {
        return Err(DesignError::TooShort {
            minimum: r + 1,
            found: grid.nu.len(),
        });
    }
    let (fit, iterations) = exchange(&grid, r, max_iterations)?;

    // Sample A at the N DFT frequencies and invert: h[n] = (1/N) Σ_k A(ω_k)·cos(ω_k(n − c)).
    let nf = len as f64;
    let amplitude: Vec<f64> = (0..len)
        .map(|k| {
            let nu = k as f64 / nf;
            fit.eval((nu.sin_cos_turns()).1) * q_factor(nu, odd)
        })
        .collect();
    let mut taps: Vec<f64> = (0..len)
        .map(|n| {
            amplitude
                .iter()
                .enumerate()
                .map(|(k, a)| {
                    // ω_k·(n − c) in turns; k·(2n − N + 1) is an exact integer.
                    let t = (k as f64 * (2.0 * n as f64 - nf + 1.0)) / (2.0 * nf);
                    a * t.sin_cos_turns().1
                })
                .sum::<f64>()
                / nf
        })
        .collect();
    for n in 0..len / 2 {
        let m = len - 1 - n;
        if let (Some(&a), Some(&b)) = (taps.get(n), taps.get(m)) {
            let v = 0.5 * (a + b);
            if let Some(t) = taps.get_mut(n) {
                *t = v;
            }
            if let Some(t) = taps.get_mut(m) {
                *t = v;
            }
        }
    }

    if taps.iter().any(|t| !t.is_finite()) {
        return Err(DesignError::NoConvergence { iterations });
    }
    // Achieved deviation per band, from the final taps: the refined extremes of |H| (|A| = |H|
    // for these symmetric taps), not just the design grid.
    let mut band_deviation = Vec::with_capacity(bands.len());
    for b in bands {
        let g = super::gain_range(&taps, b.low_hz, b.high_hz, sample_rate_hz)?;
        band_deviation.push((g.max - b.gain).abs().max((b.gain - g.min).abs()));
    }
    if taps.iter().any(|t| !t.is_finite()) {
        return Err(DesignError::NoConvergence { iterations });
    }
    Ok(Equiripple {
        taps,
        weighted_ripple: fit.delta.abs(),
        band_deviation,
        iterations,
    })
}

/// Q(ω): 1 for odd lengths, cos(ω/2) for even ones (ν = ω/2π in cycles per sample).
fn q_factor(nu: f64, odd: bool) -> f64 {
    if odd {
        1.0
    } else {
        (nu * 0.5).sin_cos_turns().1
    }
}

/// The dense grid: frequency (cycles per sample), x = cos ω, desired D/Q, weight W·Q, band.
struct Grid {
    nu: Vec<f64>,
    x: Vec<f64>,
    desired: Vec<f64>,
    target: Vec<f64>,
    weight: Vec<f64>,
    band: Vec<usize>,
}

impl Grid {
    fn new(bands: &[EquirippleBand], fs: f64, r: usize, density: usize, odd: bool) -> Grid {
        let step = 0.5 / (density * r) as f64;
        let mut g = Grid {
            nu: Vec::new(),
            x: Vec::new(),
            desired: Vec::new(),
            target: Vec::new(),
            weight: Vec::new(),
            band: Vec::new(),
        };
        for (i, b) in bands.iter().enumerate() {
            let lo = b.low_hz / fs;
            let mut hi = b.high_hz / fs;
            if !odd && hi >= 0.5 {
                // Q = cos(ω/2) vanishes at fs/2: stop one step short, as A(fs/2) = 0 anyway.
                hi = 0.5 - step;
            }
            if hi < lo {
                continue;
            }
            // Evenly spaced, both edges included, spacing at most `step`.
            let count = (((hi - lo) / step).round() as usize).max(1) + 1;
            for k in 0..count {
                let nu = lo + (hi - lo) * k as f64 / (count - 1) as f64;
                // Bands that touch share an edge: one grid point there, in the earlier band
                // (two equal nodes would make the interpolation divide by zero).
                if g.nu.last().is_some_and(|&last| nu <= last) {
                    continue;
                }
                let q = q_factor(nu, odd);
                g.nu.push(nu);
                g.x.push(nu.sin_cos_turns().1);
                g.desired.push(b.gain);
                g.target.push(b.gain / q);
                g.weight.push(b.weight * q);
                g.band.push(i);
            }
        }
        g
    }
}

/// The polynomial P in barycentric form through r nodes, and δ.
struct Fit {
    x: Vec<f64>,
    w: Vec<f64>,
    y: Vec<f64>,
    delta: f64,
}

impl Fit {
    /// P(x) by the barycentric formula (second kind).
    fn eval(&self, x: f64) -> f64 {
        let (mut num, mut den) = (0.0, 0.0);
        for ((&xi, &wi), &yi) in self.x.iter().zip(&self.w).zip(&self.y) {
            let d = x - xi;
            if d == 0.0 {
                return yi;
            }
            let c = wi / d;
            num += c * yi;
            den += c;
        }
        num / den
    }
}

/// Barycentric weights 1/Π_{j≠i}(x_i − x_j), scaled by a common factor (which cancels in
/// the barycentric formula). The products are summed as logarithms and only the differences
/// to the largest are exponentiated: a plain product of a few hundred factors below 1
/// underflows (long filters failed in their first iteration that way), while weights that
/// are 10⁻³⁰⁰ of the largest contribute nothing anyway.
fn bary_weights(x: &[f64]) -> Vec<f64> {
    let logs: Vec<(f64, bool)> = x
        .iter()
        .enumerate()
        .map(|(i, &xi)| {
            let (mut log, mut negative) = (0.0f64, false);
            for (j, &xj) in x.iter().enumerate() {
                if j != i {
                    let d = xi - xj;
                    log += d.abs().ln();
                    negative ^= d < 0.0;
                }
            }
            (-log, negative)
        })
        .collect();
    let top = logs.iter().fold(f64::NEG_INFINITY, |m, &(l, _)| m.max(l));
    logs.iter()
        .map(|&(l, negative)| {
            let w = (l - top).exp();
            if negative { -w } else { w }
        })
        .collect()
}

/// The best polynomial on the trial set `ext` (r + 1 grid indices).
fn solve(grid: &Grid, ext: &[usize]) -> Option<Fit> {
    let pick =
        |v: &Vec<f64>| -> Option<Vec<f64>> { ext.iter().map(|&i| v.get(i).copied()).collect() };
    let x = pick(&grid.x)?;
    let d = pick(&grid.target)?;
    let wt = pick(&grid.weight)?;
    let a = bary_weights(&x);
    let (mut num, mut den) = (0.0, 0.0);
    for (k, ((ak, dk), wk)) in a.iter().zip(&d).zip(&wt).enumerate() {
        let sign = if k % 2 == 0 { 1.0 } else { -1.0 };
        num += ak * dk;
        den += sign * ak / wk;
    }
    let delta = num / den;
    // Interpolate through the first r nodes; the last one agrees by the choice of δ.
    let r = ext.len() - 1;
    let nodes = x.get(..r)?.to_vec();
    let y: Vec<f64> = (0..r)
        .map(|k| {
            let sign = if k % 2 == 0 { 1.0 } else { -1.0 };
            d.get(k).copied().unwrap_or(0.0) - sign * delta / wt.get(k).copied().unwrap_or(1.0)
        })
        .collect();
    let w = bary_weights(&nodes);
    let fit = Fit {
        x: nodes,
        w,
        y,
        delta,
    };
    (delta.is_finite() && fit.w.iter().all(|v| v.is_finite())).then_some(fit)
}

/// The Remez exchange; returns the converged fit and the iterations used.
fn exchange(grid: &Grid, r: usize, cap: u32) -> Result<(Fit, u32), DesignError> {
    let g = grid.nu.len();
    // Start from evenly spread trial frequencies over the grid.
    let mut ext: Vec<usize> = (0..=r).map(|i| i * (g - 1) / r).collect();
    // The fit with the smallest largest weighted error seen, for the precision floor below.
    let mut best: Option<(Fit, f64, u32)> = None;
    for it in 1..=cap {
        let Some(fit) = solve(grid, &ext) else {
            break;
        };
        let err: Vec<f64> = (0..g)
            .map(|i| {
                let (x, t, w) = (
                    grid.x.get(i).copied().unwrap_or(0.0),
                    grid.target.get(i).copied().unwrap_or(0.0),
                    grid.weight.get(i).copied().unwrap_or(0.0),
                );
                w * (t - fit.eval(x))
            })
            .collect();
        if err.iter().any(|e| !e.is_finite()) {
            break;
        }
        let peak = err.iter().fold(0.0f64, |m, e| m.max(e.abs()));
        let Some((next, padded)) = extremes(grid, &err, r + 1, &ext) else {
            break;
        };
        // A padded set is no proof of an optimum, however little it moved.
        let settled = !padded && (next == ext || (peak - fit.delta.abs()) <= 1e-10 * peak);
        if settled {
            return Ok((fit, it));
        }
        ext = next;
        if best.as_ref().is_none_or(|b| peak < b.1) {
            best = Some((fit, peak, it));
        }
    }
    // A length far beyond what the bands need has an optimal error below what f64 resolves:
    // rounding then decides the signs of the error and the exchange wanders instead of
    // settling. A fit whose largest weighted error is at most PRECISION_FLOOR is as good as
    // any equiripple design can be in this arithmetic, so it is the answer.
    match best {
        Some((fit, peak, it)) if peak <= PRECISION_FLOOR => Ok((fit, it)),
        Some((_, _, it)) => Err(DesignError::NoConvergence { iterations: it }),
        None => Err(DesignError::NoConvergence { iterations: 1 }),
    }
}

/// The largest weighted error an unsettled exchange may end with and still be returned
/// (see [`exchange`]): −180 dB relative to a gain of 1, far below any spec a design serves
/// (a Q31 LSB is −187 dB, but a Q31 filter's rounding adds far more than that).
const PRECISION_FLOOR: f64 = 1e-9;

/// The new trial set: local extremes of the error (band ends included), alternating in sign,
/// trimmed to `want` by dropping the smallest (keeping alternation).
fn extremes(
    grid: &Grid,
    err: &[f64],
    want: usize,
    previous: &[usize],
) -> Option<(Vec<usize>, bool)> {
    let g = err.len();
    let at = |i: usize| err.get(i).copied().unwrap_or(0.0);
    let same_band = |i: usize, j: usize| grid.band.get(i) == grid.band.get(j);
    let mut cand: Vec<usize> = Vec::new();
    for i in 0..g {
        let e = at(i);
        let left = (i > 0 && same_band(i - 1, i)).then(|| at(i - 1));
        let right = (i + 1 < g && same_band(i + 1, i)).then(|| at(i + 1));
        let is_max = e > 0.0 && left.is_none_or(|l| e >= l) && right.is_none_or(|r| e > r);
        let is_min = e < 0.0 && left.is_none_or(|l| e <= l) && right.is_none_or(|r| e < r);
        if is_max || is_min {
            cand.push(i);
        }
    }
    // Alternation: among neighbours of equal sign keep the larger.
    let mut alt: Vec<usize> = Vec::with_capacity(cand.len());
    for i in cand {
        match alt.last().copied() {
            Some(j) if (at(j) > 0.0) == (at(i) > 0.0) => {
                if at(i).abs() > at(j).abs() {
                    if let Some(l) = alt.last_mut() {
                        *l = i;
                    }
                }
            }
            _ => alt.push(i),
        }
    }
    // Too many: drop the smallest. An interior one takes a neighbour with it (the two
    // neighbours then share a sign; the larger stays); with one too many, drop an end.
    while alt.len() > want {
        let excess = alt.len() - want;
        let first = alt.first().map_or(0.0, |&i| at(i).abs());
        let last = alt.last().map_or(0.0, |&i| at(i).abs());
        if excess == 1 {
            if first < last {
                alt.remove(0);
            } else {
                alt.pop();
            }
            continue;
        }
        let (k, _) = alt
            .iter()
            .enumerate()
            .map(|(k, &i)| (k, at(i).abs()))
            .fold((0, f64::INFINITY), |b, x| if x.1 < b.1 { x } else { b });
        if k == 0 || k + 1 == alt.len() {
            alt.remove(k);
        } else {
            alt.remove(k);
            // alt[k − 1] and alt[k] now have the same sign: keep the larger.
            let (a, b) = (alt.get(k - 1).copied()?, alt.get(k).copied()?);
            if at(a).abs() >= at(b).abs() {
                alt.remove(k);
            } else {
                alt.remove(k - 1);
            }
        }
    }
    let padded = alt.len() < want;
    if padded {
        // Too few alternating extremes: the error's sign changes drowned in rounding (the
        // trial set was far from the optimum and δ came out near 0). Keep the strongest
        // previous trial points that are not chosen again, so the set stays r + 1 distinct
        // points and the next solve can recover; δ is recomputed from the points, whatever
        // the signs of the old error there.
        let mut spare: Vec<usize> = previous
            .iter()
            .copied()
            .filter(|i| !alt.contains(i))
            .collect();
        spare.sort_by(|&a, &b| at(b).abs().total_cmp(&at(a).abs()));
        for i in spare.into_iter().take(want - alt.len()) {
            let pos = alt.partition_point(|&j| j < i);
            alt.insert(pos, i);
        }
    }
    (alt.len() == want).then_some((alt, padded))
}
