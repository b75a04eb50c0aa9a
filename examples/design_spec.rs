//! From a spec to Q15 taps, with the response measured: the invented silo-scale scenario (a
//! 12-bit load-cell ADC sampled at 1 kHz, 50 Hz mains hum). The spec asks for a lowpass that
//! passes the slow weight signal up to 5 Hz with at most 0.1 dB ripple and attenuates 50 Hz and
//! everything above by at least 60 dB.
//!
//! The design runs in `f32` — the `no_std` path a firmware build would use — and is checked
//! against the same design in `f64`. Run: `cargo run --release --example design_spec`.

use tapline::design::DesignError;
use tapline::design::{
    Shape, Spec, dc_gain, group_delay_at, half_power_frequency, response_at, windowed_sinc,
};

fn main() -> Result<(), DesignError> {
    let spec = Spec {
        sample_rate_hz: 1000.0f32,
        shape: Shape::Lowpass {
            pass_hz: 5.0,
            stop_hz: 50.0,
        },
        passband_ripple_db: 0.1,
        stopband_attenuation_db: 60.0,
    };
    println!("spec (invented silo scale): fs 1000 Hz, pass 0..5 Hz (ripple <= 0.1 dB),");
    println!("  stop 50..500 Hz (>= 60 dB)");

    // Float design, no_std path (f32): Kaiser's estimate, then measured against the spec.
    let float = spec.kaiser::<128>()?;
    println!("Kaiser design (f32):");
    println!(
        "  beta {:.4}, estimate {} taps, designed {} taps (cutoff {:?})",
        float.beta,
        float.estimated_len,
        float.taps.len(),
        float.band
    );
    println!(
        "  measured: ripple {:.4} dB, attenuation {:.2} dB (worst at {:.1} Hz)",
        float.measured.passband_ripple_db,
        float.measured.stopband_attenuation_db,
        float.measured.stopband.max_at_hz
    );

    // The same taps rounded to Q15 do not necessarily keep the spec: measure them.
    let mut plain_q15 = [0i16; 128];
    let n = float.taps.len();
    tapline::design::quantize(&float.taps, &mut plain_q15[..n])?;
    let plain = spec.measure(&plain_q15[..n])?;
    println!(
        "  rounded to Q15: attenuation {:.2} dB -> {}",
        plain.stopband_attenuation_db,
        if plain.meets() {
            "meets the spec"
        } else {
            "misses the spec"
        }
    );

    // Q15 taps that meet the spec themselves.
    let fixed = spec.kaiser_fixed::<i16, 128>()?;
    let q = &fixed.taps;
    println!(
        "Q15 design (kaiser_fixed): {} taps, {} dB extra margin asked of the float design",
        q.len(),
        fixed.margin_db
    );
    println!(
        "  measured: ripple {:.4} dB, attenuation {:.2} dB (worst at {:.1} Hz) -> {}",
        fixed.measured.passband_ripple_db,
        fixed.measured.stopband_attenuation_db,
        fixed.measured.stopband.max_at_hz,
        if fixed.measured.meets() {
            "meets the spec"
        } else {
            "misses the spec"
        }
    );
    println!(
        "  sum of taps {} = DC gain {:.6} (float {:.6}), largest tap error {:.2} LSB",
        fixed.quantized.raw_sum(),
        dc_gain(q),
        fixed.quantized.float_dc_gain(),
        fixed.quantized.max_error_lsb()
    );
    let f3 = half_power_frequency(q, 1000.0f32).unwrap_or(f32::NAN);
    let delay = group_delay_at(q, 1.0f32, 1000.0).unwrap_or(f32::NAN);
    println!(
        "  -3 dB at {f3:.2} Hz, group delay {delay:.1} samples ({:.1} ms)",
        delay / 1000.0 * 1000.0 // samples / fs, in ms
    );
    for f in [1.0f32, 5.0, 50.0, 100.0, 150.0] {
        println!(
            "  gain at {f:>5.1} Hz: {:8.2} dB",
            response_at(q, f, 1000.0).magnitude_db()
        );
    }

    // The f64 design of the same length and window, for the accuracy of the f32 path.
    let mut taps64 = vec![0.0f64; float.taps.len()];
    let band64 = match float.band {
        tapline::design::Band::Lowpass { cutoff_hz } => tapline::design::Band::Lowpass {
            cutoff_hz: f64::from(cutoff_hz),
        },
        _ => unreachable!("a lowpass spec gives a lowpass band"),
    };
    windowed_sinc(
        band64,
        1000.0,
        tapline::design::Window::Kaiser {
            beta: f64::from(float.beta),
        },
        &mut taps64,
    )?;
    let worst = float
        .taps
        .iter()
        .zip(&taps64)
        .map(|(&a, &b)| (f64::from(a) - b).abs())
        .fold(0.0, f64::max);
    println!("f32 path vs f64: largest tap difference {worst:.2e}");
    if !fixed.measured.meets() {
        std::process::exit(1);
    }
    Ok(())
}
