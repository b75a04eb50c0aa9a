//! Arbitrary signals, kernels, spans, rounding modes and output lengths through `convolve` and
//! `correlate` (Q15 and Q31): right lengths must match the exact model bit for bit, wrong ones
//! must be refused with the expected length, and nothing may panic.
#![no_main]

// tests/common, through the tapline-model crate (fuzz/model).
use tapline_model as common;

use arbitrary::Arbitrary;
use libfuzzer_sys::fuzz_target;
use tapline::num::FixedPoint;
use tapline::{Error, MulAcc, Rounding, Span, convolve_with_rounding, correlate_with_rounding};

#[derive(Debug, Arbitrary)]
struct Case {
    wide: bool,
    signal: Vec<i32>,
    kernel: Vec<i32>,
    span: u8,
    rounding: u8,
    out_len_delta: i8,
}

fn check<S>(signal: &[S], kernel: &[S], span: Span, mode: Rounding, delta: i8)
where
    S: MulAcc<S, Acc = i64> + FixedPoint + Default + Copy,
{
    let (len, first) = span.layout(signal.len(), kernel.len());
    let (corr_len, corr_first) = span.correlation_layout(signal.len(), kernel.len());
    let out_len = (len as isize + isize::from(delta)).max(0) as usize;
    let mut out = vec![S::default(); out_len];
    let result = convolve_with_rounding(signal, kernel, &mut out, span, mode);
    let x: Vec<i64> = signal.iter().map(|v| v.raw()).collect();
    let h: Vec<i64> = kernel.iter().map(|v| v.raw()).collect();
    if signal.is_empty() || kernel.is_empty() {
        assert_eq!(result, Err(Error::EmptyInput));
        return;
    }
    if !S::accumulator_fits(kernel) {
        assert!(matches!(
            result,
            Err(Error::AccumulatorOverflow) | Err(Error::OutputLength { .. })
        ));
        return;
    }
    if out_len != len {
        assert_eq!(
            result,
            Err(Error::OutputLength {
                expected: len,
                found: out_len
            })
        );
        return;
    }
    let full = common::convolve_full_exact(&x, &h);
    let model: Vec<(i128, bool)> = full[first..first + len]
        .iter()
        .map(|&a| common::finish_exact(a, S::FRAC, S::BITS, mode))
        .collect();
    assert_eq!(result, Ok(model.iter().filter(|m| m.1).count()));
    assert!(
        out.iter()
            .zip(&model)
            .all(|(o, m)| i128::from(o.raw()) == m.0)
    );

    let h_rev: Vec<i64> = h.iter().rev().copied().collect();
    let full = common::convolve_full_exact(&x, &h_rev);
    let mut corr = vec![S::default(); corr_len];
    correlate_with_rounding(signal, kernel, &mut corr, span, mode).expect("valid correlation");
    assert!(
        corr.iter()
            .zip(&full[corr_first..corr_first + corr_len])
            .all(|(o, &a)| i128::from(o.raw()) == common::finish_exact(a, S::FRAC, S::BITS, mode).0)
    );
}

fuzz_target!(|case: Case| {
    if case.signal.len() > 300 || case.kernel.len() > 300 {
        return;
    }
    let span = [Span::Full, Span::Same, Span::Valid][usize::from(case.span) % 3];
    let mode = Rounding::ALL[usize::from(case.rounding) % Rounding::ALL.len()];
    if case.wide {
        check::<i32>(&case.signal, &case.kernel, span, mode, case.out_len_delta);
    } else {
        let s: Vec<i16> = case.signal.iter().map(|&v| v as i16).collect();
        let k: Vec<i16> = case.kernel.iter().map(|&v| v as i16).collect();
        check::<i16>(&s, &k, span, mode, case.out_len_delta);
    }
});
