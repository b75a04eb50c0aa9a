//! Portable kernels: plain iterator loops that compile to tight code on every target.

use crate::num::{MulAcc, Sample};

// `W` (the accumulator width) cannot be inferred from `S::Acc`; callers name it, e.g.
// `dot::<i16, i16, DefaultAcc>`.

/// `acc + Σ taps[i] · xs[i]` over `i < min(taps.len(), xs.len())`, in ascending `i`.
///
/// **Rounding / saturation:** none here — products and sums are exact for fixed-point types
/// whose taps pass [`MulAcc::accumulator_fits`]; floats round per operation. The caller
/// finishes the accumulator once with [`MulAcc::finish`].
///
/// ```
/// use tapline::{kernel::dot, num::DefaultAcc};
/// let acc = dot::<i16, i16, DefaultAcc>(0, &[i16::MIN, 16384], &[i16::MIN, -2]);
/// assert_eq!(acc, (1 << 30) - 32768); // (-1)(-1) + 0.5·(-2 LSB), in Q30
/// ```
#[inline]
#[must_use]
pub fn dot<S: MulAcc<T, W>, T: Sample, W>(mut acc: S::Acc, taps: &[T], xs: &[S]) -> S::Acc {
    for (&h, &x) in taps.iter().zip(xs) {
        acc = S::mul_acc(acc, h, x);
    }
    acc
}

/// `acc + Σ taps[i] · xs[xs.len() − 1 − i]` over `i < min(taps.len(), xs.len())`: taps
/// forward against `xs` read backward from its last element. With `xs` a history ordered oldest→newest this is
/// the convolution sum Σ h\[k\]·x\[n−k\].
///
/// Same numeric behaviour as [`dot`]; the taps are visited in ascending index.
///
/// ```
/// use tapline::{kernel::dot_reversed, num::DefaultAcc};
/// // h = [1, 2, 3], history oldest→newest [10, 20, 30]: 1·30 + 2·20 + 3·10.
/// assert_eq!(dot_reversed::<f64, f64, DefaultAcc>(0.0, &[1.0, 2.0, 3.0], &[10.0, 20.0, 30.0]), 100.0);
/// ```
#[inline]
#[must_use]
pub fn dot_reversed<S: MulAcc<T, W>, T: Sample, W>(
    mut acc: S::Acc,
    taps: &[T],
    xs: &[S],
) -> S::Acc {
    let len = taps.len().min(xs.len());
    let xs = xs.get(xs.len() - len..).unwrap_or(&[]);
    let taps = taps.get(..len).unwrap_or(&[]);
    #[allow(clippy::indexing_slicing)]
    for i in 0..len {
        acc = S::mul_acc(acc, taps[i], xs[len - 1 - i]);
    }
    acc
}
