//! Portable kernels: plain iterator loops that compile to tight code on every target.

use super::FoldMulAcc;
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
    // Four taps per step against four samples read from the end: fixed-size arrays give the
    // compiler constant offsets (no index arithmetic, no bounds checks, no division) on every
    // target. The accumulation order stays ascending in tap index, as in the plain loop.
    let (mut tap_rest, mut x_rest) = (taps, xs);
    while let (Some((h, taps_after)), Some((xs_before, x))) = (
        tap_rest.split_first_chunk::<4>(),
        x_rest.split_last_chunk::<4>(),
    ) {
        let [h0, h1, h2, h3] = *h;
        let [x0, x1, x2, x3] = *x;
        acc = S::mul_acc(acc, h0, x3);
        acc = S::mul_acc(acc, h1, x2);
        acc = S::mul_acc(acc, h2, x1);
        acc = S::mul_acc(acc, h3, x0);
        tap_rest = taps_after;
        x_rest = xs_before;
    }
    for (&h, &x) in tap_rest.iter().zip(x_rest.iter().rev()) {
        acc = S::mul_acc(acc, h, x);
    }
    acc
}

/// `acc + Σ taps[i] · xs[xs.len() − 1 − i·x_step]`, taking every `tap_step`-th tap: the `i`-th
/// term pairs `taps[i·tap_step]` with the sample `i·x_step` places before the last one. Stops
/// when either runs out. A step of 0 is taken as 1.
///
/// With `xs` a history ordered oldest→newest, `tap_step = L, x_step = 1` is one phase of an
/// L-fold interpolator (taps p, p+L, p+2L, … against the newest low-rate samples), and
/// `tap_step = x_step = 2` skips the zero taps of a half-band filter.
///
/// Same numeric behaviour as [`dot`]; taps are visited in ascending index.
///
/// ```
/// use tapline::{kernel::dot_reversed_strided, num::DefaultAcc};
/// // Taps 0, 2, 4 of [1, 9, 2, 9, 3] against the newest three of [10, 20, 30]: 1·30 + 2·20 + 3·10.
/// let acc = dot_reversed_strided::<i16, i16, DefaultAcc>(0, &[1, 9, 2, 9, 3], 2, &[10, 20, 30], 1);
/// assert_eq!(acc, 100);
/// // Full scale: (−1)·(−1) in Q30, every other sample.
/// let acc = dot_reversed_strided::<i16, i16, DefaultAcc>(0, &[i16::MIN], 1, &[5, i16::MIN], 2);
/// assert_eq!(acc, 1 << 30);
/// ```
#[inline]
#[must_use]
pub fn dot_reversed_strided<S: MulAcc<T, W>, T: Sample, W>(
    mut acc: S::Acc,
    taps: &[T],
    tap_step: usize,
    xs: &[S],
    x_step: usize,
) -> S::Acc {
    let taps = taps.iter().step_by(tap_step.max(1));
    for (&h, &x) in taps.zip(xs.iter().rev().step_by(x_step.max(1))) {
        acc = S::mul_acc(acc, h, x);
    }
    acc
}

/// The pre-add of a folded kernel: the pair of samples that share a tap is added (symmetric
/// taps) or subtracted (antisymmetric taps) before the one multiply.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Fold {
    /// `tap·(newer + older)`, for h\[k\] = h\[N−1−k\].
    Sum,
    /// `tap·(newer − older)`, for h\[k\] = −h\[N−1−k\].
    Difference,
}

/// `acc + Σ taps[i] · (newer[newer.len() − 1 − i] ± older[i])` over
/// `i < min(taps.len(), newer.len(), older.len())`: one multiply per pair of samples.
///
/// With a history ordered oldest→newest, `newer` read backward from its end gives x\[n−k\] and
/// `older` read forward gives x\[n−(N−1−k)\]; with the first ⌊N/2⌋ taps this is the folded form
/// of a linear-phase FIR (the centre tap of an odd length is added by the caller).
///
/// **Numerics:** [`FoldMulAcc`] — bit-identical to the unfolded sum in fixed point for taps that
/// pass [`MulAcc::accumulator_fits`]; floats round the pre-add once more.
///
/// ```
/// use tapline::kernel::{Fold, dot_folded};
/// use tapline::num::DefaultAcc;
/// // h = [3, 1, 1, 3] on x oldest→newest [1, 2, 4, 8]: 3·(8 + 1) + 1·(4 + 2) = 33.
/// assert_eq!(dot_folded::<i16, i16, DefaultAcc>(0, &[3, 1], &[4, 8], &[1, 2], Fold::Sum), 33);
/// // Full scale, antisymmetric: (−1)·(−1 − 32767 LSB) in Q30.
/// let acc = dot_folded::<i16, i16, DefaultAcc>(0, &[i16::MIN], &[i16::MIN], &[i16::MAX], Fold::Difference);
/// assert_eq!(acc, 65535 << 15);
/// ```
#[inline]
#[must_use]
pub fn dot_folded<S: FoldMulAcc<T, W>, T: Sample, W>(
    mut acc: S::Acc,
    taps: &[T],
    newer: &[S],
    older: &[S],
    fold: Fold,
) -> S::Acc {
    let pairs = taps.iter().zip(newer.iter().rev().zip(older));
    match fold {
        Fold::Sum => {
            for (&h, (&a, &b)) in pairs {
                acc = S::mul_acc_sum(acc, h, a, b);
            }
        }
        Fold::Difference => {
            for (&h, (&a, &b)) in pairs {
                acc = S::mul_acc_difference(acc, h, a, b);
            }
        }
    }
    acc
}

/// The block form of [`dot_reversed`]: for every `i` with `i + taps.len() ≤ span.len()`, in
/// ascending `i`, calls `emit(Σ_k taps[k] · span[i + L − 1 − k])`, L = `taps.len()`. That is
/// `span.len() + 1 − L` outputs, each the convolution sum over `span[i .. i + L]` (a history
/// ordered oldest→newest); no outputs when `taps` is empty or `span` shorter than `taps`.
///
/// Four outputs share each pass over the taps (register blocking): every tap is loaded once
/// per four outputs and each sample once per tap step, instead of once per output.
///
/// **Numerics:** each output is summed from `S::ACC_ZERO` in ascending tap index, exactly as
/// [`dot_reversed`] sums it — so the results are bit-identical to calling [`dot_reversed`] on
/// each window, floats included. Fixed point: exact as in [`dot`].
///
/// ```
/// use tapline::{kernel::dot_block, num::DefaultAcc};
/// // h = [1, 2, 3] over 0, 1, 2, 3, 4, 5: outputs 1·2 + 2·1 + 3·0 = 4, then 10, 16, 22.
/// let mut out = Vec::new();
/// dot_block::<i32, i32, DefaultAcc>(&[1, 2, 3], &[0, 1, 2, 3, 4, 5], |acc| out.push(acc));
/// assert_eq!(out, [4, 10, 16, 22]);
/// ```
#[inline]
pub fn dot_block<S: MulAcc<T, W>, T: Sample, W>(
    taps: &[T],
    span: &[S],
    mut emit: impl FnMut(S::Acc),
) {
    let len = taps.len();
    let mut rest = span;
    // Hosts: sixteen outputs per pass, four SIMD vectors of four `f32` sums (measured against
    // 4 and 8 with `benches/versus_numpy.py`: 0.63 / 1.91 / 2.50 times numpy at 64 taps).
    if cfg!(any(target_arch = "x86_64", target_arch = "aarch64")) {
        rest =
            groups_of::<S, S::Acc, 16>(len, rest, |w| in_lanes::<S, T, W, 16>(taps, w), &mut emit);
    }
    let rest = groups_of::<S, S::Acc, 4>(
        len,
        rest,
        |w| dot_reversed_four::<S, T, W>(taps, w),
        &mut emit,
    );
    singles(
        len,
        rest,
        |w| dot_reversed::<S, T, W>(S::ACC_ZERO, taps, w),
        emit,
    );
}

/// The driver of every block kernel (portable and assembly): while `span` holds `K` more
/// outputs of a `len`-tap sum (`len + K − 1` samples), hands that window to `group` and emits
/// its K sums in order; returns the rest of the span, which holds fewer than K outputs.
/// Nothing when `len` is 0.
#[inline(always)]
pub(crate) fn groups_of<'x, X, A, const K: usize>(
    len: usize,
    span: &'x [X],
    mut group: impl FnMut(&[X]) -> [A; K],
    emit: &mut impl FnMut(A),
) -> &'x [X] {
    if len == 0 {
        return &[];
    }
    let mut rest = span;
    while let Some(window) = rest.get(..len + K - 1) {
        for acc in group(window) {
            emit(acc);
        }
        rest = rest.get(K..).unwrap_or(&[]);
    }
    rest
}

/// The remaining outputs of a block, one at a time: `single` over each `len`-sample window.
#[inline(always)]
pub(crate) fn singles<X, A>(
    len: usize,
    span: &[X],
    mut single: impl FnMut(&[X]) -> A,
    mut emit: impl FnMut(A),
) {
    if len == 0 {
        return;
    }
    let mut rest = span;
    while let Some(window) = rest.get(..len) {
        emit(single(window));
        rest = rest.get(1..).unwrap_or(&[]);
    }
}

/// Four consecutive outputs over `window` (`taps.len() + 3` samples): output m is
/// Σ_k taps\[k\]·window\[L − 1 + m − k\].
///
/// On 64-bit hosts the four sums are written as one array updated from four consecutive
/// samples per tap, the shape the compiler turns into SIMD (one vector of four sums, each lane
/// still summed in tap order, so the results are the same bits). On microcontrollers, which
/// have no such vectors, the scalar form below keeps the samples in registers instead.
#[inline(always)]
fn dot_reversed_four<S: MulAcc<T, W>, T: Sample, W>(taps: &[T], window: &[S]) -> [S::Acc; 4] {
    if cfg!(any(target_arch = "x86_64", target_arch = "aarch64")) {
        four_in_lanes::<S, T, W>(taps, window)
    } else {
        four_in_registers::<S, T, W>(taps, window)
    }
}

/// [`dot_reversed_four`] as one array of four sums (vectorised on hosts).
#[inline(always)]
fn four_in_lanes<S: MulAcc<T, W>, T: Sample, W>(taps: &[T], window: &[S]) -> [S::Acc; 4] {
    in_lanes::<S, T, W, 4>(taps, window)
}

/// `K` consecutive outputs over `window` (`taps.len() + K − 1` samples) as one array of sums,
/// each updated from K consecutive samples per tap: output m is Σ_k taps\[k\]·window\[L − 1 + m − k\],
/// summed in ascending k.
#[inline(always)]
fn in_lanes<S: MulAcc<T, W>, T: Sample, W, const K: usize>(
    taps: &[T],
    window: &[S],
) -> [S::Acc; K] {
    let mut acc = [S::ACC_ZERO; K];
    // Tap k meets window[L−1−k .. L−1−k+K]: the windows of K, last to first.
    for (&h, xs) in taps.iter().zip(window.windows(K).rev()) {
        if let Some(xs) = xs.first_chunk::<K>() {
            for (a, &x) in acc.iter_mut().zip(xs) {
                *a = S::mul_acc(*a, h, x);
            }
        }
    }
    acc
}

/// [`dot_reversed_four`] with the samples carried in registers (scalar cores).
#[inline(always)]
fn four_in_registers<S: MulAcc<T, W>, T: Sample, W>(taps: &[T], window: &[S]) -> [S::Acc; 4] {
    let zero = S::ACC_ZERO;
    let (mut a0, mut a1, mut a2, mut a3) = (zero, zero, zero, zero);
    let Some((older, &[mut x1, mut x2, mut x3])) = window.split_last_chunk::<3>() else {
        return [zero; 4];
    };
    // At tap k, output m reads window[L−1−k+m]: output 0 takes the next sample read backward
    // from `older`, outputs 1..3 the three samples before it, held in x1..x3 and shifted one
    // place per tap. Unrolled by four, the shifts become register renaming. The number of
    // passes is computed once, so the loop keeps one counter whether the tap count is a
    // constant or known only at run time.
    let groups = taps.len().min(older.len()) / 4;
    let (Some((tap_main, tap_rest)), Some((x_rest, x_main))) = (
        taps.split_at_checked(4 * groups),
        older.split_at_checked(older.len() - 4 * groups),
    ) else {
        return [zero; 4];
    };
    for (h, y) in tap_main.chunks_exact(4).zip(x_main.rchunks_exact(4)) {
        let (Some(&[h0, h1, h2, h3]), Some(&[y0, y1, y2, y3])) =
            (h.first_chunk::<4>(), y.first_chunk::<4>())
        else {
            continue;
        };
        a0 = S::mul_acc(a0, h0, y3);
        a1 = S::mul_acc(a1, h0, x1);
        a2 = S::mul_acc(a2, h0, x2);
        a3 = S::mul_acc(a3, h0, x3);
        a0 = S::mul_acc(a0, h1, y2);
        a1 = S::mul_acc(a1, h1, y3);
        a2 = S::mul_acc(a2, h1, x1);
        a3 = S::mul_acc(a3, h1, x2);
        a0 = S::mul_acc(a0, h2, y1);
        a1 = S::mul_acc(a1, h2, y2);
        a2 = S::mul_acc(a2, h2, y3);
        a3 = S::mul_acc(a3, h2, x1);
        a0 = S::mul_acc(a0, h3, y0);
        a1 = S::mul_acc(a1, h3, y1);
        a2 = S::mul_acc(a2, h3, y2);
        a3 = S::mul_acc(a3, h3, y3);
        (x1, x2, x3) = (y0, y1, y2);
    }
    for (&h, &y) in tap_rest.iter().zip(x_rest.iter().rev()) {
        a0 = S::mul_acc(a0, h, y);
        a1 = S::mul_acc(a1, h, x1);
        a2 = S::mul_acc(a2, h, x2);
        a3 = S::mul_acc(a3, h, x3);
        (x1, x2, x3) = (y, x1, x2);
    }
    [a0, a1, a2, a3]
}

#[cfg(test)]
mod tests {
    extern crate std;
    use super::{four_in_lanes, four_in_registers};
    use crate::num::DefaultAcc;
    use std::vec::Vec;

    /// The two shapes of the four-output sum give the same bits for every tap count from 1 to
    /// 40: floats (where order matters) and Q15 at full scale.
    #[test]
    fn both_four_output_forms_agree() {
        let mut state = 0x2545_f491u32;
        let mut next = move || {
            state ^= state << 13;
            state ^= state >> 17;
            state ^= state << 5;
            state
        };
        for len in 1..=40 {
            let taps: Vec<f32> = (0..len).map(|_| next() as f32 / 3.0e9 - 0.7).collect();
            let xs: Vec<f32> = (0..len + 3).map(|_| next() as f32 / 1.0e9 - 2.0).collect();
            let lanes = four_in_lanes::<f32, f32, DefaultAcc>(&taps, &xs);
            let regs = four_in_registers::<f32, f32, DefaultAcc>(&taps, &xs);
            assert_eq!(
                lanes.map(f32::to_bits),
                regs.map(f32::to_bits),
                "f32, {len} taps"
            );
            let taps: Vec<i16> = (0..len).map(|_| next() as i16 | i16::MIN).collect();
            let xs: Vec<i16> = (0..len + 3).map(|_| (next() >> 7) as i16).collect();
            assert_eq!(
                four_in_lanes::<i16, i16, DefaultAcc>(&taps, &xs),
                four_in_registers::<i16, i16, DefaultAcc>(&taps, &xs),
                "q15, {len} taps"
            );
        }
    }
}
