//! The floating-point types the design code is written for, once: `f32` (always, `no_std`) and
//! `f64` (with the `std` feature).
//!
//! Why not micromath throughout: its documented accuracies (sin/cos 0.002 absolute, sqrt about
//! 5 %, exp/ln 0.001 relative) are errors of −54 dB and worse, larger than the stopband a
//! 60 dB spec asks for. The `f32` path therefore takes only *starting values* from micromath
//! (square root, arctangent) and refines them with Newton steps in plain arithmetic, and it
//! evaluates sine, cosine, exp and ln with argument reduction and short series whose truncation
//! error is below one `f32` rounding. The result is within a few `f32` ulps of the `f64` path.

use crate::num::Sample;
use core::fmt::Debug;
use core::ops::{Add, AddAssign, Div, Mul, MulAssign, Neg, Sub, SubAssign};

/// A floating-point type the design functions compute in: `f32` (every target, `no_std`) or
/// `f64` (feature `std`, using the platform's libm). Sealed.
///
/// **Accuracy of the `f32` path** (measured on the host against `f64`, see `tests/design.rs`):
/// sine and cosine of a fraction of a turn, exp, ln and square root within 4 ulp of the correctly
/// rounded `f32` value; the arctangent within 2·10⁻⁷ rad. A whole design (taps) differs from the
/// `f64` design by the amounts each design function documents.
///
/// ```
/// use tapline::design::Real;
/// // sin and cos of a quarter turn: exact zero and one after argument reduction.
/// let (s, c) = 0.25f32.sin_cos_turns();
/// assert_eq!((s, c), (1.0, 0.0));
/// assert!((2.0f32.sqrt() - core::f32::consts::SQRT_2).abs() <= f32::EPSILON);
/// ```
pub trait Real:
    Sample
    + Debug
    + PartialOrd
    + Add<Output = Self>
    + Sub<Output = Self>
    + Mul<Output = Self>
    + Div<Output = Self>
    + Neg<Output = Self>
    + AddAssign
    + SubAssign
    + MulAssign
{
    /// 1.
    const ONE: Self;
    /// π.
    const PI: Self;
    /// The distance from 1 to the next larger value.
    const EPSILON: Self;

    /// The nearest value of this type to `v` (ties to even).
    fn from_f64(v: f64) -> Self;
    /// `n` as this type, rounded to nearest (exact up to 2^24 for `f32`).
    fn from_usize(n: usize) -> Self;
    /// |self|.
    #[must_use]
    fn abs(self) -> Self;
    /// Neither NaN nor infinite.
    fn is_finite(self) -> bool;
    /// The integer nearest to `self` (ties away from zero), as this type; `self` itself when it
    /// is already an integer, infinite or NaN.
    #[must_use]
    fn nearest_integer(self) -> Self;
    /// √self; NaN below zero.
    #[must_use]
    fn sqrt(self) -> Self;
    /// e^self.
    #[must_use]
    fn exp(self) -> Self;
    /// ln(self); −∞ at 0, NaN below.
    #[must_use]
    fn ln(self) -> Self;
    /// (sin 2πt, cos 2πt) for `t = self` in turns. The whole turns are removed exactly before
    /// any rounding happens, so the result is as accurate for t = 1000.25 as for t = 0.25.
    fn sin_cos_turns(self) -> (Self, Self);
    /// The angle of the point (x, y) = (`x`, `self`) in radians, in (−π, π].
    #[must_use]
    fn atan2(self, x: Self) -> Self;

    /// 10^(self/20): a level in dB as a linear gain.
    #[must_use]
    fn db_to_gain(self) -> Self {
        (self * Self::from_f64(core::f64::consts::LN_10 / 20.0)).exp()
    }
    /// 20·log10(self): a linear gain in dB (−∞ at 0).
    #[must_use]
    fn gain_to_db(self) -> Self {
        self.ln() * Self::from_f64(20.0 / core::f64::consts::LN_10)
    }
    /// self^e for self > 0.
    #[must_use]
    fn powf(self, e: Self) -> Self {
        (self.ln() * e).exp()
    }
    /// The larger of the two (`self` if either is NaN and `self` is not).
    #[must_use]
    fn max_of(self, other: Self) -> Self {
        if other > self { other } else { self }
    }
    /// The smaller of the two.
    #[must_use]
    fn min_of(self, other: Self) -> Self {
        if other < self { other } else { self }
    }
}

/// Sine and cosine of 2π·t after exact removal of whole turns and reduction to an eighth of a
/// turn, with `kernel` evaluating (sin x, cos x) for |x| ≤ π/4.
fn sin_cos_turns_with<R: Real>(t: R, kernel: impl Fn(R) -> (R, R)) -> (R, R) {
    if !t.is_finite() {
        let nan = R::from_f64(f64::NAN);
        return (nan, nan);
    }
    // t − round(t) is exact (the two are within a factor of two of each other, or round(t) = 0).
    let r = t - t.nearest_integer();
    let four = R::from_f64(4.0);
    let q = (r * four).nearest_integer();
    // q/4 is a short dyadic number close to r: the difference is exact as well.
    let s = r - q / four;
    let (sin, cos) = kernel(s * (R::PI + R::PI));
    // q ∈ {−2, −1, 0, 1, 2}: rotate by q quarter turns.
    let q = q.to_f64();
    if q == 1.0 {
        (cos, -sin)
    } else if q == -1.0 {
        (-cos, sin)
    } else if q == 0.0 {
        (sin, cos)
    } else {
        (-sin, -cos)
    }
}

impl Real for f32 {
    const ONE: f32 = 1.0;
    const PI: f32 = core::f32::consts::PI;
    const EPSILON: f32 = f32::EPSILON;

    #[inline]
    fn from_f64(v: f64) -> f32 {
        v as f32
    }
    #[inline]
    fn from_usize(n: usize) -> f32 {
        n as f32
    }
    #[inline]
    fn abs(self) -> f32 {
        f32::from_bits(self.to_bits() & 0x7fff_ffff)
    }
    #[inline]
    fn is_finite(self) -> bool {
        self.to_bits() & 0x7f80_0000 != 0x7f80_0000
    }
    fn nearest_integer(self) -> f32 {
        // From 2^23 on every f32 is an integer (and NaN/∞ pass through).
        if !(self.abs() < 8_388_608.0) {
            return self;
        }
        let half = if self < 0.0 { -0.5 } else { 0.5 };
        // |self| + 0.5 < 2^24: the cast truncates toward zero, giving round-half-away.
        ((self + half) as i32) as f32
    }
    fn sqrt(self) -> f32 {
        if !(self > 0.0) || !self.is_finite() {
            // 0, negative, NaN, +∞: the seed would be wrong or the steps would divide by 0.
            return if self == 0.0 || self == f32::INFINITY {
                self
            } else {
                f32::NAN
            };
        }
        // micromath's seed is within about 6 %; each Newton step squares the relative error
        // (6e−2 → 2e−3 → 2e−6 → 2e−12), so three steps reach f32 rounding.
        let mut y = micromath::F32Ext::sqrt(self);
        for _ in 0..3 {
            y = 0.5 * (y + self / y);
        }
        y
    }
    fn exp(self) -> f32 {
        if self.is_nan() {
            return self;
        }
        if self > 88.72 {
            return f32::INFINITY;
        }
        if self < -87.3 {
            return 0.0;
        }
        // self = k·ln2 + r, |r| ≤ ln2/2, with ln2 split so that k·LN2_HI is exact.
        const LN2_HI: f32 = 0.693_145_75;
        const LN2_LO: f32 = 1.428_606_8e-6;
        let k = (self * core::f32::consts::LOG2_E).nearest_integer();
        let r = (self - k * LN2_HI) - k * LN2_LO;
        // Taylor to r^8/8!: the first omitted term is below 2e−10 for |r| ≤ 0.35.
        let mut p = 1.0 / 40_320.0;
        for c in [
            1.0 / 5040.0,
            1.0 / 720.0,
            1.0 / 120.0,
            1.0 / 24.0,
            1.0 / 6.0,
            0.5,
            1.0,
            1.0,
        ] {
            p = p * r + c;
        }
        // 2^k as bits: −126 ≤ k ≤ 128 here; k = 128 is split to stay a normal number.
        let k = k as i32;
        let (k1, k2) = if k > 127 { (127, k - 127) } else { (k, 0) };
        let scale = |e: i32| f32::from_bits(((e + 127) as u32) << 23);
        p * scale(k1) * scale(k2)
    }
    fn ln(self) -> f32 {
        if self.is_nan() || self < 0.0 {
            return f32::NAN;
        }
        if self == 0.0 {
            return f32::NEG_INFINITY;
        }
        if self == f32::INFINITY {
            return self;
        }
        // Subnormals: scale into the normal range first (exact).
        let (x, extra) = if self < f32::MIN_POSITIVE {
            (self * 16_777_216.0, -24)
        } else {
            (self, 0)
        };
        let bits = x.to_bits();
        let mut e = ((bits >> 23) & 0xff) as i32 - 127 + extra;
        let mut m = f32::from_bits((bits & 0x007f_ffff) | 0x3f80_0000); // in [1, 2)
        if m > core::f32::consts::SQRT_2 {
            m *= 0.5;
            e += 1;
        }
        // ln m = 2·atanh(s), |s| ≤ 0.172: the series to s^9 leaves < 1e−9.
        let s = (m - 1.0) / (m + 1.0);
        let s2 = s * s;
        let mut p = 1.0 / 9.0;
        for c in [1.0 / 7.0, 1.0 / 5.0, 1.0 / 3.0, 1.0] {
            p = p * s2 + c;
        }
        let ln_m = 2.0 * s * p;
        // e·ln2 in two parts so the large part is exact.
        const LN2_HI: f32 = 0.693_145_75;
        const LN2_LO: f32 = 1.428_606_8e-6;
        let e = e as f32;
        e * LN2_HI + (e * LN2_LO + ln_m)
    }
    fn sin_cos_turns(self) -> (f32, f32) {
        sin_cos_turns_with(self, |x: f32| {
            // Taylor series on |x| ≤ π/4: the first omitted terms (x^11/11!, x^12/12!) are
            // below 2e−9, under half an f32 ulp of the results.
            let x2 = x * x;
            let mut s = 1.0 / 362_880.0;
            for c in [-1.0 / 5040.0, 1.0 / 120.0, -1.0 / 6.0, 1.0] {
                s = s * x2 + c;
            }
            let mut c = -1.0 / 3_628_800.0;
            for k in [1.0 / 40_320.0, -1.0 / 720.0, 1.0 / 24.0, -0.5, 1.0] {
                c = c * x2 + k;
            }
            (s * x, c)
        })
    }
    fn atan2(self, x: f32) -> f32 {
        let y = self;
        if y.is_nan() || x.is_nan() {
            return f32::NAN;
        }
        if y == 0.0 && x == 0.0 {
            return 0.0;
        }
        // micromath's estimate is within 0.003 rad. One Newton step on
        // f(θ) = y·cos θ − x·sin θ leaves an error near err³/3 (~1e−8 rad).
        let theta = micromath::F32Ext::atan2(y, x);
        let (s, c) = (theta * (0.5 / core::f32::consts::PI)).sin_cos_turns();
        let num = y * c - x * s;
        let den = x * c + y * s;
        let theta = theta + num / den;
        // Keep the documented range (−π, π].
        if theta > core::f32::consts::PI {
            theta - 2.0 * core::f32::consts::PI
        } else if theta <= -core::f32::consts::PI {
            theta + 2.0 * core::f32::consts::PI
        } else {
            theta
        }
    }
}

#[cfg(feature = "std")]
impl Real for f64 {
    const ONE: f64 = 1.0;
    const PI: f64 = core::f64::consts::PI;
    const EPSILON: f64 = f64::EPSILON;

    #[inline]
    fn from_f64(v: f64) -> f64 {
        v
    }
    #[inline]
    fn from_usize(n: usize) -> f64 {
        n as f64
    }
    #[inline]
    fn abs(self) -> f64 {
        f64::abs(self)
    }
    #[inline]
    fn is_finite(self) -> bool {
        f64::is_finite(self)
    }
    #[inline]
    fn nearest_integer(self) -> f64 {
        f64::round(self)
    }
    #[inline]
    fn sqrt(self) -> f64 {
        f64::sqrt(self)
    }
    #[inline]
    fn exp(self) -> f64 {
        f64::exp(self)
    }
    #[inline]
    fn ln(self) -> f64 {
        f64::ln(self)
    }
    fn sin_cos_turns(self) -> (f64, f64) {
        sin_cos_turns_with(self, f64::sin_cos)
    }
    #[inline]
    fn atan2(self, x: f64) -> f64 {
        f64::atan2(self, x)
    }
}

/// |v| for `f64` without std (core has no `f64::abs` at our MSRV).
pub(crate) fn abs_f64(v: f64) -> f64 {
    f64::from_bits(v.to_bits() & 0x7fff_ffff_ffff_ffff)
}

/// The integer nearest to a finite `f64`, ties away from zero, without std: exact for every
/// value (from 2^52 on every `f64` is an integer).
pub(crate) fn round_f64(v: f64) -> f64 {
    if !(abs_f64(v) < 4_503_599_627_370_496.0) {
        return v;
    }
    let t = (v as i64) as f64; // toward zero, exact in this range
    let frac = v - t; // exact: t and v share the exponent range
    if frac >= 0.5 {
        t + 1.0
    } else if frac <= -0.5 {
        t - 1.0
    } else {
        t
    }
}
