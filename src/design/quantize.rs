//! Float taps to fixed-point taps, keeping the DC gain exact.

use super::DesignError;
use super::real::{abs_f64, round_f64};
use crate::Error;
use crate::headroom::Symmetry;
use crate::num::{FixedPoint, Sample};

/// What [`quantize`] did: the DC gain it kept, the largest tap error, and whether symmetry and
/// an exact DC gain could both be kept.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Quantized {
    frac_bits: u32,
    sum: i64,
    target: i64,
    exact_sum: f64,
    max_error_lsb: f64,
    symmetric: bool,
}

impl Quantized {
    /// Σ of the quantized taps in raw codes (the DC gain × 2^F).
    #[must_use]
    pub const fn raw_sum(&self) -> i64 {
        self.sum
    }
    /// round(Σh·2^F): the raw sum an exact DC gain needs (clamped to what N taps can hold).
    #[must_use]
    pub const fn target_sum(&self) -> i64 {
        self.target
    }
    /// Whether Σ quantized = round(Σh·2^F).
    #[must_use]
    pub const fn dc_exact(&self) -> bool {
        self.sum == self.target
    }
    /// The DC gain of the quantized taps, Σ q / 2^F (exact).
    #[must_use]
    pub fn dc_gain(&self) -> f64 {
        self.sum as f64 / (1u64 << self.frac_bits) as f64
    }
    /// The DC gain of the float taps, Σh (summed in f64 with compensation).
    #[must_use]
    pub fn float_dc_gain(&self) -> f64 {
        self.exact_sum / (1u64 << self.frac_bits) as f64
    }
    /// The largest |q − h·2^F| over the taps, in LSB of the tap format (≤ 0.5 for plain
    /// rounding; up to 1 where a tap was moved to make the DC gain exact).
    #[must_use]
    pub const fn max_error_lsb(&self) -> f64 {
        self.max_error_lsb
    }
    /// The same as a real number: max |q/2^F − h|.
    #[must_use]
    pub fn max_error(&self) -> f64 {
        self.max_error_lsb / (1u64 << self.frac_bits) as f64
    }
    /// Whether the float taps were exactly symmetric; the quantized taps then are as well.
    #[must_use]
    pub const fn symmetric(&self) -> bool {
        self.symmetric
    }
}

/// Quantizes `taps` (float, or fixed point of another format) into `out`, in any fixed-point
/// format the filters accept: `i16` (Q15), `i32` (Q31), `fixed::FixedI16<F>`, `FixedI32<F>`.
///
/// **Rounding:** each tap goes to the nearest code (ties away from zero); then, so that the
/// quantized DC gain is the float DC gain rounded to the format, the taps whose rounding lost
/// most are moved by one code until Σq = round(Σh·2^F) (the largest-remainder method); no tap
/// moves twice. Taps that were exactly symmetric stay symmetric: codes move in mirror pairs,
/// and when the distance to the target is odd the centre tap of an odd length moves first, by
/// one code toward its exact value. When that is impossible — even length, symmetric taps and an odd
/// distance to the target — **symmetry wins**: Σq lands on the nearer of round(Σh·2^F) ± 1,
/// within 1 LSB of Σh·2^F, and [`Quantized::dc_exact`] is `false`. (Linear phase is structural:
/// [`GroupDelay::of`](crate::GroupDelay::of) depends on it.) A target beyond what N codes can
/// sum to is clamped.
///
/// **Saturation:** a tap up to one LSB beyond the format's range (1.0 in Q15) is clamped to the
/// limit, its error reported; further out is an error.
///
/// **Accuracy:** h·2^F is exact in f64 for `f32`, fixed-point and (unless it underflows) `f64`
/// taps; Σh·2^F is summed in f64 with Neumaier compensation, so only a sum within about
/// 10⁻¹² LSB of a rounding tie could round the other way. Every tap error is ≤ 1 LSB; the
/// report says how large the largest was.
///
/// # Errors
/// [`DesignError::Filter`]([`Error::TapCountMismatch`]) if the lengths differ; [`DesignError::TooShort`] for no taps;
/// [`DesignError::TapOutOfRange`] for a non-finite tap; [`DesignError::TapBeyondFormat`] (naming
/// the largest tap) for one beyond the format by more than 1 LSB.
///
/// ```
/// use tapline::design::{moving_average, quantize};
/// // 20-point moving average in Q15: 32768/20 = 1638.4 is not a code, but Σ stays 32768.
/// let mut h = [0.0f64; 20];
/// moving_average(&mut h)?;
/// let mut q = [0i16; 20];
/// let report = quantize(&h, &mut q)?;
/// assert_eq!(q.iter().map(|&c| i64::from(c)).sum::<i64>(), 32768);
/// assert!(report.dc_exact() && report.symmetric() && report.max_error_lsb() <= 0.6 + 1e-12);
/// // Full scale: 1.0 is one LSB beyond Q15 and clamps to 32767; 1.5 is refused.
/// let mut one = [0i16; 1];
/// assert_eq!(quantize(&[1.0f32], &mut one)?.max_error_lsb(), 1.0);
/// assert!(quantize(&[1.5f32], &mut one).is_err());
/// # Ok::<(), tapline::design::DesignError>(())
/// ```
pub fn quantize<S: Sample, T: FixedPoint>(
    taps: &[S],
    out: &mut [T],
) -> Result<Quantized, DesignError> {
    if taps.len() != out.len() {
        return Err(Error::TapCountMismatch {
            ideal: taps.len(),
            quantized: out.len(),
        }
        .into());
    }
    let n = taps.len();
    if n == 0 {
        return Err(DesignError::TooShort {
            minimum: 1,
            found: 0,
        });
    }
    let scale = (1u64 << T::FRAC) as f64;
    let scaled = |k: usize| taps.get(k).map_or(0.0, |h| h.to_f64() * scale);
    let (lo, hi) = (T::RAW_MIN as f64, T::RAW_MAX as f64);

    // Nearest codes, and Σ h·2^F with Neumaier's compensated summation.
    let (mut sum, mut comp) = (0.0f64, 0.0f64);
    for (k, slot) in out.iter_mut().enumerate() {
        let v = scaled(k);
        if !v.is_finite() {
            return Err(DesignError::TapOutOfRange { index: k });
        }
        if !(v >= lo - 1.0 && v <= hi + 1.0) {
            return Err(beyond_format(n, &scaled, hi));
        }
        *slot = T::from_raw(round_f64(v).clamp(lo, hi) as i64);
        let t = sum + v;
        comp += if abs_f64(sum) >= abs_f64(v) {
            (sum - t) + v
        } else {
            (v - t) + sum
        };
        sum = t;
    }
    let exact_sum = sum + comp;
    let symmetric = Symmetry::of(taps) == Symmetry::Symmetric;
    let (n_lo, n_hi) = (T::RAW_MIN * n as i64, T::RAW_MAX * n as i64);
    let target = (round_f64(exact_sum) as i64).clamp(n_lo, n_hi);
    let raw_sum = |out: &[T]| out.iter().map(|q| q.raw()).sum::<i64>();

    let mut goal = target;
    let centre = (n % 2 == 1).then_some(n / 2);
    if symmetric {
        let odd_gap = (goal - raw_sum(out)) % 2 != 0;
        match centre {
            // The centre tap alone moves the sum by one. It moves toward its exact value
            // (an error of 1 − |remainder| ≤ 1 LSB); the gap stays even either way and the
            // pairs close the rest.
            Some(c) if odd_gap => {
                let v = scaled(c);
                let q = out.get(c).map_or(0, |q| q.raw()) as f64;
                let toward = if v > q {
                    1
                } else if v < q {
                    -1
                } else {
                    (goal - raw_sum(out)).signum()
                };
                nudge(out, c, toward);
            }
            // Only pairs move: settle for the nearer reachable sum (same parity as now).
            None if odd_gap => {
                goal += if exact_sum >= target as f64 { 1 } else { -1 };
                goal = goal.clamp(n_lo, n_hi);
            }
            _ => {}
        }
    }
    // Largest remainder: each step moves the tap (or mirror pair) whose rounding lost most in
    // the needed direction. A moved tap's remainder drops by 1, below every unmoved one, so no
    // tap moves twice before all have moved once; n steps always suffice.
    for _ in 0..=n {
        let gap = goal - raw_sum(out);
        let step = gap.signum();
        if step == 0 {
            break;
        }
        if symmetric && gap.abs() == 1 {
            // Pairs cannot close an odd gap and the centre has had its move (only a tap at the
            // format's limit gets here): stop one LSB short rather than move a tap twice.
            break;
        }
        let candidates = if symmetric { n / 2 } else { n };
        let mut best: Option<(usize, f64)> = None;
        for k in 0..candidates {
            let Some(q) = out.get(k).map(|q| q.raw()) else {
                continue;
            };
            if (step > 0 && q >= T::RAW_MAX) || (step < 0 && q <= T::RAW_MIN) {
                continue;
            }
            let remainder = (scaled(k) - q as f64) * step as f64;
            if best.is_none_or(|(_, r)| remainder > r) {
                best = Some((k, remainder));
            }
        }
        let Some((k, _)) = best else {
            break;
        };
        nudge(out, k, step);
        if symmetric {
            // The mirror tap holds the same code, so it moves as well.
            nudge(out, n - 1 - k, step);
        }
    }

    let max_error_lsb = out
        .iter()
        .enumerate()
        .map(|(k, q)| abs_f64(q.raw() as f64 - scaled(k)))
        .fold(0.0f64, |a, e| if e > a { e } else { a });
    Ok(Quantized {
        frac_bits: T::FRAC,
        sum: raw_sum(out),
        target,
        exact_sum,
        max_error_lsb,
        symmetric,
    })
}

/// Moves tap `k` by one code in the direction `step`, unless that leaves the format.
fn nudge<T: FixedPoint>(out: &mut [T], k: usize, step: i64) -> bool {
    match out.get_mut(k) {
        Some(q) => {
            let moved = q.raw() + step;
            if (T::RAW_MIN..=T::RAW_MAX).contains(&moved) {
                *q = T::from_raw(moved);
                true
            } else {
                false
            }
        }
        None => false,
    }
}

/// The error for taps beyond the format: which tap is the largest, and by how much (all taps
/// are finite when this is called).
fn beyond_format(n: usize, scaled: &impl Fn(usize) -> f64, hi: f64) -> DesignError {
    let (index, largest) = (0..n)
        .map(|k| (k, abs_f64(scaled(k))))
        .fold((0, 0.0f64), |b, x| if x.1 > b.1 { x } else { b });
    DesignError::TapBeyondFormat {
        index,
        taps: n,
        // Finite and non-negative; the cast saturates beyond u64.
        lsb: {
            let r = round_f64(largest);
            (if r < largest { r + 1.0 } else { r }) as u64
        },
        limit_lsb: hi as u64 + 1,
    }
}
