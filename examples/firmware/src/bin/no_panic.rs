//! Link-time proof that no panic is reachable from tapline's streaming paths.
//!
//! Every streaming filter and kernel is exercised on inputs the optimiser cannot see
//! (`black_box`). The panic handler calls a function that exists nowhere: if any panic path
//! survives optimisation, the linker cannot resolve it and the build fails. Built by CI with
//! `cargo build --release --bin no_panic` for thumbv7em-none-eabihf and thumbv6m-none-eabi.
#![no_std]
#![no_main]

use core::hint::black_box;
use fixed::types::{I1F15, I4F12};
use tapline::headroom::{
    Acc32, Acc32Checked, AccTrace, CheckedTaps, InputRange, measure_deviation,
};
use tapline::num::Acc128;
use tapline::{
    CicDecimator, Decimator, DecimatorUpTo, Fir, FirUpTo, GroupDelay, HalfBandDecimator,
    Interpolator, LinearPhaseFir, MovingAverage, MultiChannelFir, MultiChannelFirUpTo, Resampler,
    Ring, Rounding, Span, convolve, convolve_with_rounding, correlate, correlate_with_rounding,
};
use tapline_firmware::{SMOOTH_64, Smooth64};

#[panic_handler]
fn panic(_: &core::panic::PanicInfo) -> ! {
    unsafe extern "C" {
        /// Deliberately undefined: referencing it means a panic path was linked in.
        fn tapline_streaming_path_can_panic() -> !;
    }
    // SAFETY: never executed in a successful build — the symbol does not exist, so a build
    // that references it does not link.
    unsafe { tapline_streaming_path_can_panic() }
}

static Q15_TAPS: [i16; 13] = [
    -600, 0, 1800, 4000, 6500, 8200, 9000, 8200, 6500, 4000, 1800, 0, -600,
];
static Q31_TAPS: [i32; 7] = [
    1 << 27,
    1 << 28,
    1 << 29,
    1 << 30,
    1 << 29,
    1 << 28,
    1 << 27,
];
static LOUD_Q31: [i32; 3] = [i32::MIN, i32::MIN, i32::MAX];
static F32_TAPS: [f32; 9] = [0.02, 0.06, 0.12, 0.18, 0.24, 0.18, 0.12, 0.06, 0.02];
static F64_TAPS: [f64; 9] = [0.02, 0.06, 0.12, 0.18, 0.24, 0.18, 0.12, 0.06, 0.02];
static FIXED_TAPS: [I1F15; 4] = [I1F15::from_bits(8192); 4];

/// Filters `len` opaque samples of each type every way the API offers.
fn exercise(seed: i32, len: usize, rounding: Rounding) {
    let mut block_i16 = [0i16; 64];
    let mut block_i32 = [0i32; 64];
    let mut block_f32 = [0f32; 64];
    let len = len.min(64);
    for (i, ((a, b), c)) in block_i16
        .iter_mut()
        .zip(block_i32.iter_mut())
        .zip(block_f32.iter_mut())
        .enumerate()
    {
        let v = seed.wrapping_mul(i as i32 + 1);
        *a = v as i16;
        *b = v;
        *c = v as f32;
    }

    if let Ok(fir) = Fir::<i16, 13>::new(black_box(&Q15_TAPS)) {
        let mut fir = fir.with_rounding(rounding);
        black_box(fir.push(black_box(block_i16[0])));
        let mut out = [0i16; 64];
        let _ = fir.process(&block_i16[..len], &mut out[..len]);
        fir.process_in_place(&mut block_i16[..len]);
        let mut trace = AccTrace::new();
        black_box(fir.push_traced(block_i16[1], &mut trace));
        black_box(fir.group_delay());
        let _ = fir.set_taps(black_box(&Q15_TAPS));
        black_box(fir.clear_saturations());
        fir.reset();
        black_box(out);
    }

    // Taps known only at run time: an opaque count of the table, the run-time check, and
    // every structure that takes them.
    let used = black_box(9usize).min(Q15_TAPS.len());
    let taps = Q15_TAPS.get(..used).unwrap_or(&Q15_TAPS);
    if let Ok(fir) = FirUpTo::<i16, 32>::with_taps(taps) {
        let mut fir = fir.with_rounding(rounding);
        black_box(fir.push(black_box(block_i16[0])));
        let mut out = [0i16; 64];
        let _ = fir.process(&block_i16[..len], &mut out[..len]);
        fir.process_in_place(&mut block_i16[..len]);
        let _ = fir.set_taps(black_box(&Q15_TAPS[..]));
        black_box(fir.push(block_i16[1]));
        black_box(out);
    }
    if let Ok(fir) = FirUpTo::<i32, 16>::with_taps(black_box(&Q31_TAPS[..])) {
        let mut fir = fir;
        fir.process_in_place(&mut block_i32[..len]);
    }
    if let Ok(fir) = FirUpTo::<f32, 16>::with_taps(black_box(&F32_TAPS[..])) {
        let mut fir = fir;
        fir.process_in_place(&mut block_f32[..len]);
    }
    let range = InputRange::codes(black_box(-2048), black_box(2047)).unwrap_or(InputRange::FULL);
    if let Ok(checked) = CheckedTaps::check(taps, range) {
        if let Ok(mut fir) = FirUpTo::<i16, 32, i16, Acc32Checked>::with_checked(checked) {
            black_box(fir.push(black_box(block_i16[2])));
            fir.process_in_place(&mut block_i16[..len]);
            let _ = fir.set_checked(black_box(checked));
        }
        if let Ok(mut dec) = DecimatorUpTo::<i16, 32, 4, i16, Acc32Checked>::with_checked(checked) {
            black_box(dec.push(black_box(block_i16[3])));
            let mut out = [0i16; 16];
            let _ = dec.process(&block_i16[..len], &mut out);
            let _ = black_box(dec.flush(&mut out));
            black_box(out);
        }
        if let Ok(mut multi) =
            MultiChannelFirUpTo::<i16, 32, 4, i16, Acc32Checked>::with_checked(checked)
        {
            let _ = multi.process_in_place(&mut block_i16[..len - len % 4]);
        }
    }
    if let Ok(mut dec) = DecimatorUpTo::<i16, 32, 4>::with_taps(taps) {
        // A start phase the optimiser cannot see (refused when ≥ 4).
        let _ = dec.set_start_phase(black_box(len % 6));
        black_box(dec.push(black_box(block_i16[4])));
        black_box(dec.process_in_place(&mut block_i16[..len]));
        let _ = dec.set_taps(black_box(&Q15_TAPS[..]));
        let mut tail = [0i16; 8];
        black_box(dec.tail_len());
        let _ = black_box(dec.flush(tail.get_mut(..black_box(len % 9)).unwrap_or_default()));
        black_box(tail);
    }
    if let Ok(mut multi) = MultiChannelFirUpTo::<i16, 32, 4>::with_taps(taps) {
        black_box(multi.push(black_box([block_i16[5]; 4])));
        let _ = multi.process_in_place(&mut block_i16[..len - len % 4]);
        let _ = multi.set_taps(black_box(&Q15_TAPS[..]));
    }

    let mut proven: Fir<'static, i16, 64, i16, Acc32<Smooth64>> = Fir::proven();
    proven.process_in_place(&mut block_i16[..len]);
    black_box(proven.push(block_i16[2]));
    black_box(&SMOOTH_64);

    if let Ok(mut fir) = Fir::<i32, 7>::new(black_box(&Q31_TAPS)) {
        fir.process_in_place(&mut block_i32[..len]);
        black_box(fir.saturations());
    }
    if let Ok(mut fir) = Fir::<i32, 3, i32, Acc128>::with_accumulator(black_box(&LOUD_Q31)) {
        black_box(fir.push(block_i32[3]));
    }
    // The one-line wide constructors, on an opaque tap count for the run-time ones.
    if let Ok(mut fir) = Fir::new_wide(black_box(&LOUD_Q31)) {
        fir.process_in_place(&mut block_i32[..len]);
    }
    let loud_used = black_box(2usize).min(LOUD_Q31.len());
    if let Ok(mut fir) = FirUpTo::<i32, 8>::with_taps_wide(&LOUD_Q31[..loud_used]) {
        black_box(fir.push(block_i32[4]));
        fir.process_in_place(&mut block_i32[..len]);
    }
    if let Ok(mut f) = MultiChannelFir::<i32, 3, 2>::new_wide(black_box(&LOUD_Q31)) {
        black_box(f.push([block_i32[5], block_i32[6]]));
        let _ = f.process_in_place(&mut block_i32[..len & !1]);
    }
    if let Ok(mut f) = MultiChannelFirUpTo::<i32, 8, 2>::with_taps_wide(&LOUD_Q31[..loud_used]) {
        let _ = f.process_in_place(&mut block_i32[..len & !1]);
    }
    if let Ok(mut f) = LinearPhaseFir::<i32, 3>::new_wide(black_box(&LOUD_Q31)) {
        f.process_in_place(&mut block_i32[..len]);
    }
    if let Ok(mut fir) = Fir::<f32, 9>::new(black_box(&F32_TAPS)) {
        fir.process_in_place(&mut block_f32[..len]);
    }
    if let Ok(mut fir) = Fir::<f32, 9, f64>::new(black_box(&F64_TAPS)) {
        black_box(fir.push(block_f32[4]));
    }
    if let Ok(mut fir) = Fir::<f64, 9>::new(black_box(&F64_TAPS)) {
        black_box(fir.push(f64::from(block_f32[5])));
    }
    if let Ok(mut fir) = Fir::<I4F12, 4, I1F15>::new(black_box(&FIXED_TAPS)) {
        black_box(fir.push(I4F12::from_bits(block_i16[6])));
        if let Ok(mut checked) = Fir::<i16, 13>::new(&Q15_TAPS) {
            let deviation =
                measure_deviation(&mut checked, &[0.1; 13], block_i16[..len].iter().copied());
            black_box(deviation);
        }
    }

    let mut conv = [0i16; 80];
    let h_len = black_box(7usize).min(len).min(Q15_TAPS.len());
    for span in [Span::Full, Span::Same, Span::Valid] {
        let (out_len, _) = span.layout(len, h_len);
        if let Some(out) = conv.get_mut(..out_len) {
            let _ =
                convolve_with_rounding(&block_i16[..len], &Q15_TAPS[..h_len], out, span, rounding);
            let _ =
                correlate_with_rounding(&block_i16[..len], &Q15_TAPS[..h_len], out, span, rounding);
            let _ = convolve(&block_i16[..len], &Q15_TAPS[..h_len], out, span);
            let _ = correlate(&block_i16[..len], &Q15_TAPS[..h_len], out, span);
        }
    }
    let mut conv_f = [0f32; 80];
    let _ = convolve(
        &block_f32[..len],
        &F32_TAPS,
        &mut conv_f[..len + 8],
        Span::Full,
    );
    black_box(conv);
    black_box(conv_f);

    exercise_structures(&mut block_i16, &mut block_i32, len, rounding);

    let mut ring = Ring::<i32, 5>::new(0);
    for &v in &block_i32[..len] {
        ring.push(v);
    }
    black_box(ring.latest());
    black_box(ring.window());
    black_box(GroupDelay::of(&F32_TAPS));
}

static HALF_BAND: [i16; 7] = [-1024, 0, 9216, 16384, 9216, 0, -1024];

/// The structures beside `Fir`: every per-sample and block call on opaque input.
fn exercise_structures(b16: &mut [i16; 64], b32: &mut [i32; 64], len: usize, rounding: Rounding) {
    if let Ok(f) = LinearPhaseFir::<i16, 13>::new(black_box(&Q15_TAPS)) {
        let mut f = f.with_rounding(rounding);
        black_box(f.push(b16[0]));
        f.process_in_place(&mut b16[..len]);
        let mut out = [0i16; 64];
        let _ = f.process(&b16[..len], &mut out[..len]);
    }
    if let Ok(mut f) = LinearPhaseFir::<i32, 7>::new(black_box(&Q31_TAPS)) {
        f.process_in_place(&mut b32[..len]);
    }
    if let Ok(f) = Decimator::<i16, 13, 4>::new(black_box(&Q15_TAPS)) {
        if let Ok(mut f) = f.with_start_phase(black_box(len % 5)) {
            black_box(f.push(b16[1]));
            let mut out = [0i16; 64];
            let _ = black_box(f.process(&b16[..len], &mut out));
            black_box(f.process_in_place(&mut b16[..len]));
            black_box((f.start_phase(), f.tail_len()));
            let _ = black_box(f.flush(out.get_mut(..black_box(len % 5)).unwrap_or_default()));
            black_box(out);
        }
    }
    if let Ok(mut f) = Interpolator::<i16, 13, 3>::new(black_box(&Q15_TAPS)) {
        black_box(f.push(b16[2]));
        let mut out = [0i16; 192];
        let _ = black_box(f.process(&b16[..len], &mut out));
        black_box(f.tail_len());
        let _ = black_box(f.flush(out.get_mut(..black_box(len % 12)).unwrap_or_default()));
        black_box(out);
    }
    // Factors the optimiser cannot see: the phase loop and outputs_for must stay panic-free
    // for any pair the constructor accepts.
    let (up, down) = (black_box(3u16), black_box(4u16));
    if let Ok(mut f) = Resampler::<i16, 5>::new(black_box(&Q15_TAPS), up, down) {
        let mut sink = 0i16;
        black_box(f.push(b16[2], |y| sink ^= y));
        black_box(sink);
        let mut out = [0i16; 192];
        let _ = black_box(f.process(&b16[..len], &mut out));
        black_box(f.outputs_for(black_box(len)));
        black_box(f.max_outputs_per_input());
        black_box(f.group_delay());
        black_box(f.tail_len());
        let _ = black_box(f.flush(out.get_mut(..black_box(len % 6)).unwrap_or_default()));
        black_box(f.clear_saturations());
        f.reset();
    }
    if let Ok(mut f) =
        Resampler::<i32, 7, i32, Acc128>::with_accumulator(black_box(&Q31_TAPS), down, up)
    {
        let mut out = [0i32; 64];
        let _ = black_box(f.process(&b32[..len], &mut out));
        let _ = black_box(f.flush(&mut out));
    }
    if let Ok(mut f) = Resampler::<f32, 9>::new(black_box(&F32_TAPS), up, black_box(2)) {
        let bf: [f32; 64] = core::array::from_fn(|i| f32::from(b16[i]));
        let mut out = [0f32; 192];
        let _ = black_box(f.process(&bf[..len], &mut out));
        let _ = black_box(f.flush(&mut out));
    }
    if let Ok(mut f) = HalfBandDecimator::<i16, 7>::new(black_box(&HALF_BAND)) {
        black_box(f.push(b16[3]));
        black_box(f.process_in_place(&mut b16[..len]));
        let _ = black_box(f.set_start_phase(black_box(len % 3)));
        black_box((f.start_phase(), f.tail_len()));
        let mut out = [0i16; 4];
        let _ = black_box(f.flush(out.get_mut(..black_box(len % 5)).unwrap_or_default()));
    }
    let mut cic = CicDecimator::<i16, 3, 8, 1>::new();
    black_box(cic.push(b16[4]));
    black_box(cic.push_full(b16[5]));
    black_box(cic.process_in_place(&mut b16[..len]));
    let mut avg = MovingAverage::<i16, 20>::new();
    black_box(avg.push(b16[6]));
    avg.process_in_place(&mut b16[..len]);
    if let Ok(mut f) = MultiChannelFir::<i16, 13, 4>::new(black_box(&Q15_TAPS)) {
        black_box(f.push([b16[7], b16[8], b16[9], b16[10]]));
        let _ = f.process_in_place(&mut b16[..len]);
    }
}

#[unsafe(no_mangle)]
pub extern "C" fn _start() -> ! {
    let modes = [Rounding::HalfUp, Rounding::Truncate, Rounding::HalfEven];
    let mut i = 0usize;
    loop {
        let rounding = black_box(modes)[i % 3];
        exercise(black_box(i as i32), black_box(i), rounding);
        i = i.wrapping_add(1);
    }
}
