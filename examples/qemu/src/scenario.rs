//! The invented test scenario shared by the firmware (`check`, `cost`) and the host (build.rs):
//! a deterministic ADC signal and tap tables. Integer-only, so host and target see the very
//! same inputs. Nothing here is measured data.

/// Samples streamed through each filter.
pub const SAMPLES: usize = 512;
/// Block length of the DMA half-buffer the firmware processes.
pub const BLOCK: usize = 64;

/// A 12-bit ADC code, mid-scale subtracted and left-aligned in 16 bits (Q15): a slow ramp (a
/// load being applied), a triangular 50 Hz-like hum, white-ish noise from xorshift32 and a few
/// full-scale spikes so that saturation is exercised.
pub fn adc_q15(n: usize) -> i16 {
    let mut s = (n as u32).wrapping_mul(0x9E37_79B9) ^ 0x1234_5678;
    s ^= s << 13;
    s ^= s >> 17;
    s ^= s << 5;
    let noise = (s % 61) as i32 - 30;
    let ramp = n as i32 * 10 - 2600;
    let phase = (n % 20) as i32;
    let hum = if phase < 10 {
        phase * 24 - 120
    } else {
        (20 - phase) * 24 - 120
    };
    let code = (ramp + hum + noise).clamp(-2048, 2047);
    let code = match n % 97 {
        13 => 2047,
        14 => -2048,
        _ => code,
    };
    (code << 4) as i16
}

/// The same signal as a Q31 sample (the Q15 code in the top bits plus low-order detail).
pub fn adc_q31(n: usize) -> i32 {
    (i32::from(adc_q15(n)) << 16) | ((n as i32 * 7919) & 0xFFFF)
}

/// The same signal as f32 in [−1, 1).
pub fn adc_f32(n: usize) -> f32 {
    f32::from(adc_q15(n)) / 32768.0
}

/// Weights of a symmetric triangular smoother of `len` taps: min(k + 1, len − k).
const fn weight(k: usize, len: usize) -> i64 {
    if k + 1 < len - k {
        (k + 1) as i64
    } else {
        (len - k) as i64
    }
}

const fn weight_sum(len: usize) -> i64 {
    let mut s = 0;
    let mut k = 0;
    while k < len {
        s += weight(k, len);
        k += 1;
    }
    s
}

/// Q15 taps of the smoother, scaled to a DC gain of 1.25 so that some outputs saturate.
pub const fn q15_taps<const N: usize>() -> [i16; N] {
    let mut t = [0i16; N];
    let total = weight_sum(N);
    let mut k = 0;
    while k < N {
        t[k] = (weight(k, N) * 40960 / total) as i16;
        k += 1;
    }
    t
}

/// Q31 taps of the same smoother, DC gain 0.9.
pub const fn q31_taps<const N: usize>() -> [i32; N] {
    let mut t = [0i32; N];
    let total = weight_sum(N);
    let mut k = 0;
    while k < N {
        t[k] = (weight(k, N) * 1_932_735_283 / total) as i32;
        k += 1;
    }
    t
}

/// f32 taps of the same smoother, DC gain 1.
pub const fn f32_taps<const N: usize>() -> [f32; N] {
    let mut t = [0f32; N];
    let total = weight_sum(N) as f32;
    let mut k = 0;
    while k < N {
        t[k] = weight(k, N) as f32 / total;
        k += 1;
    }
    t
}
