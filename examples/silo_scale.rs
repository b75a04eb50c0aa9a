//! Demo: smoothing a silo scale's load-cell signal in Q15.
//!
//! **Everything here is invented**: the scenario, the signal and its numbers. A grain silo
//! stands on load cells whose bridge amplifier feeds a 12-bit ADC sampled at 1 kHz. The signal
//! is a slow weight change (filling, a truck unloading) buried in 50 Hz mains hum and white
//! noise. The firmware smooths it with a 20-tap moving average in Q15: at 1 kHz its nulls sit at
//! every multiple of 50 Hz, so the hum cancels, and white noise power drops by about 20×.
//!
//! A last stage decimates to 100 Hz: the same table as a polyphase decimator by 10 (its nulls
//! at 50 Hz multiples stop the hum from aliasing), computing only the outputs it keeps.
//!
//! Run: `cargo run --release --example silo_scale`

use tapline::headroom::{
    Acc32, AccTrace, Align, ErrorBound, Headroom, InputRange, ProvenTaps, measure_deviation,
};
use tapline::{Decimator, Fir, Rounding, Sample};

const SAMPLE_RATE_HZ: f64 = 1000.0;
const TAPS: usize = 20;

/// The Q15 tap table as firmware would hold it in flash: 1/20 = 1638.4 LSB does not exist in
/// Q15, so twelve taps get 1638 and eight get 1639, placed symmetrically (linear phase kept)
/// and summing to exactly 32768: the DC gain is exactly 1.
static SMOOTHING_Q15: [i16; TAPS] = {
    let mut taps = [1638i16; TAPS];
    let mut i = 0;
    while i < 4 {
        taps[2 + 2 * i] = 1639;
        taps[TAPS - 3 - 2 * i] = 1639;
        i += 1;
    }
    taps
};

/// What the ADC can deliver: 12-bit codes, mid-scale subtracted, left-aligned in 16 bits.
const ADC: InputRange = match InputRange::adc(12, Align::Left, 16) {
    Ok(range) => range,
    Err(_) => panic!("impossible ADC description"),
};

/// The table and the ADC range, named so the compiler can prove the 32-bit accumulator safe.
struct Smoothing;

impl ProvenTaps for Smoothing {
    const TAPS: &'static [i16] = &SMOOTHING_Q15;
    const INPUT: InputRange = ADC;
}

/// The ideal taps, for the float64 reference.
static SMOOTHING_F64: [f64; TAPS] = [1.0 / TAPS as f64; TAPS];

/// A small deterministic generator (xorshift64*) so every run prints the same numbers.
struct Noise(u64);

impl Noise {
    fn uniform(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        let bits = self.0.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11;
        (bits as f64 + 0.5) / (1u64 << 53) as f64
    }

    /// Standard normal by the Box–Muller transform.
    fn gaussian(&mut self) -> f64 {
        let (u1, u2) = (self.uniform(), self.uniform());
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    }
}

/// The true (noise-free) load in ADC codes at time `t` seconds: empty silo, a truck unloads
/// from 1 s to 3 s, then the level holds.
fn true_load_codes(t: f64) -> f64 {
    let empty = 1500.0;
    let full = 3100.0;
    match t {
        t if t < 1.0 => empty,
        t if t < 3.0 => empty + (full - empty) * (t - 1.0) / 2.0,
        _ => full,
    }
}

/// A 12-bit unipolar ADC code (0..=4095) as a bipolar Q15 sample: subtract mid-scale and
/// left-align the 12 bits in the 16-bit word.
fn code_to_q15(code: u16) -> i16 {
    ((i32::from(code) - 2048) << 4) as i16
}

fn rms(v: impl Iterator<Item = f64>) -> f64 {
    let (sum, n) = v.fold((0.0, 0usize), |(s, n), x| (s + x * x, n + 1));
    (sum / n as f64).sqrt()
}

fn main() -> Result<(), tapline::Error> {
    let seconds = 5.0;
    let samples = (seconds * SAMPLE_RATE_HZ) as usize;
    let mut noise = Noise(0x5EED_1DEA_F00D_CAFE);

    // Simulated ADC: hum at 50 Hz (35 codes peak), white noise (σ = 6 codes), 12-bit clipping.
    let clean: Vec<f64> = (0..samples)
        .map(|n| true_load_codes(n as f64 / SAMPLE_RATE_HZ))
        .collect();
    let codes: Vec<u16> = clean
        .iter()
        .enumerate()
        .map(|(n, &c)| {
            let t = n as f64 / SAMPLE_RATE_HZ;
            let hum = 35.0 * (2.0 * std::f64::consts::PI * 50.0 * t + 0.3).sin();
            (c + hum + 6.0 * noise.gaussian())
                .round()
                .clamp(0.0, 4095.0) as u16
        })
        .collect();
    let input: Vec<i16> = codes.iter().map(|&c| code_to_q15(c)).collect();

    // Before flashing: prove the headroom for what the ADC can produce, at compile time.
    const REPORT: Headroom = Headroom::q15(&SMOOTHING_Q15, ADC);
    const _: () = assert!(REPORT.fits(32) && !REPORT.can_saturate(Rounding::HalfUp));
    let bound = ErrorBound::new::<i16, i16>(&SMOOTHING_F64, &SMOOTHING_Q15, ADC, Rounding::HalfUp)?;

    // Firmware path: Q15 in, Q15 out, the proven 32-bit accumulator, filtered one DMA
    // half-buffer (64 samples) at a time.
    let mut fir: Fir<'static, i16, TAPS, i16, Acc32<Smoothing>> = Fir::proven();
    let mut output = input.clone();
    for half_buffer in output.chunks_mut(64) {
        fir.process_in_place(half_buffer);
    }

    // Host evidence, replaying the same capture: the accumulator the real signal used, and the
    // distance from the ideal filter (the same input values through the exact taps in float64).
    let mut replay: Fir<'static, i16, TAPS, i16, Acc32<Smoothing>> = Fir::proven();
    let mut trace = AccTrace::new();
    let replayed: Vec<i16> = input
        .iter()
        .map(|&x| replay.push_traced(x, &mut trace))
        .collect();
    assert_eq!(
        replayed, output,
        "per-sample and block paths must agree bit for bit"
    );
    let mut checked: Fir<'static, i16, TAPS, i16, Acc32<Smoothing>> = Fir::proven();
    let deviation = measure_deviation(&mut checked, &SMOOTHING_F64, input.iter().copied());

    let delay = fir
        .group_delay()
        .map_or(f64::NAN, |d| f64::from(d.samples()));

    // Noise and hum on the full-silo plateau (3.1 s .. 5 s, past the filter's settling time):
    // deviation from the true load, in ADC codes, before and after smoothing.
    let plateau = 3100..samples;
    let to_codes = |q: i16| q.to_f64() * 2048.0 + 2048.0;
    let rms_in = rms(plateau.clone().map(|n| to_codes(input[n]) - clean[n]));
    let rms_out = rms(plateau.map(|n| to_codes(output[n]) - clean[n]));

    println!("tapline demo: silo scale load cell (invented scenario and data)");
    println!(
        "  12-bit ADC at {SAMPLE_RATE_HZ} Hz, 50 Hz hum 35 codes peak, white noise 6 codes rms"
    );
    println!(
        "  filter: {TAPS}-tap moving average, Q15 taps summing to {}",
        SMOOTHING_Q15.iter().map(|&t| i32::from(t)).sum::<i32>()
    );
    println!("  samples filtered:         {samples} (in 64-sample blocks)");
    println!("  noise + hum, input:       {rms_in:.2} codes rms");
    println!("  noise + hum, output:      {rms_out:.2} codes rms");
    println!(
        "  noise reduction:          {:.1} dB",
        20.0 * (rms_in / rms_out).log10()
    );
    println!(
        "  group delay:              {delay} samples = {:.1} ms",
        delay / SAMPLE_RATE_HZ * 1000.0
    );
    println!("  saturated outputs:        {}", fir.saturations());
    println!();
    println!("headroom, proven before flashing (12-bit ADC left-aligned in 16 bits):");
    for line in REPORT.to_string().lines() {
        println!("  {line}");
    }
    println!(
        "  accumulator: the proven 32-bit one, spare bits for any ADC input: {}",
        REPORT.spare_bits(32)
    );
    println!(
        "  error bound vs float64:   {:.2} LSB (taps) + {:.2} LSB (rounding) = {:.2} LSB",
        bound.quantization_lsb(),
        bound.rounding_lsb(),
        bound.lsb()
    );
    println!("measured on this capture:");
    println!(
        "  accumulator used:         {}..={} ({} bits of 32, {} spare)",
        trace.min(),
        trace.max(),
        trace.bits_used(),
        trace.spare_bits(32)
    );
    println!(
        "  max |Q15 - float64|:      {:.2} LSB over {} outputs ({} saturated, counted apart)",
        deviation.max_lsb, deviation.compared, deviation.saturated
    );

    // Decimation, 1 kHz → 100 Hz: the same 20 taps as a polyphase decimator by 10. Only every
    // 10th output is computed (2 multiply-accumulates per input instead of 20), and those are
    // bit for bit the full-rate filter's outputs at the 10th, 20th, … input.
    const FACTOR: usize = 10;
    let mut decimator = Decimator::<i16, TAPS, FACTOR>::new(&SMOOTHING_Q15)?;
    let mut decimated = vec![0i16; decimator.outputs_for(input.len())];
    let mut written = 0;
    for half_buffer in input.chunks(64) {
        let rest = decimated.get_mut(written..).unwrap_or_default();
        written += decimator.process(half_buffer, rest)?;
    }
    // Output k comes with input FACTOR·k + FACTOR − 1 (the group's last).
    let input_index = |k: usize| FACTOR * k + FACTOR - 1;
    let same_bits = decimated
        .iter()
        .enumerate()
        .all(|(k, &y)| y == output[input_index(k)]);
    // Noise power on the plateau, per input sample and per 100 Hz output: their ratio is what
    // the averaging buys (10·log10 of it in dB; 6.02 dB per bit of resolution).
    let kept: Vec<usize> = (0..decimated.len())
        .filter(|&k| input_index(k) >= 3100)
        .collect();
    let rms_dec = rms(kept
        .iter()
        .map(|&k| to_codes(decimated[k]) - clean[input_index(k)]));
    let reduction_db = 10.0 * (rms_in / rms_dec).powi(2).log10();
    println!(
        "decimation to {} Hz (polyphase, factor {FACTOR}, same taps):",
        SAMPLE_RATE_HZ / FACTOR as f64
    );
    println!(
        "  outputs:                  {written} from {samples} inputs, {} multiply-accumulates per input",
        TAPS / FACTOR
    );
    println!("  bit-identical to every {FACTOR}th full-rate output: {same_bits}");
    println!("  noise + hum at 100 Hz:    {rms_dec:.2} codes rms");
    println!(
        "  noise power reduction:    {reduction_db:.1} dB = {:.2} bits of resolution gained",
        reduction_db / 6.02
    );
    println!(
        "  (white noise alone: 10·log10(20) = {:.1} dB = {:.2} bits; the rest is hum in the nulls)",
        10.0 * 20f64.log10(),
        10.0 * 20f64.log10() / 6.02
    );
    println!(
        "  group delay:              {delay} input samples = {:.2} output samples = {:.1} ms",
        delay / FACTOR as f64,
        delay / SAMPLE_RATE_HZ * 1000.0
    );
    println!("  saturated outputs:        {}", decimator.saturations());
    if !same_bits {
        eprintln!("the decimator differs from the full-rate filter: the polyphase path is wrong");
        std::process::exit(1);
    }
    if deviation.max_lsb > bound.lsb() {
        eprintln!("deviation exceeds its bound: the fixed-point path is wrong");
        std::process::exit(1);
    }
    Ok(())
}
