//! FIR throughput of tapline against a hand-written circular-buffer FIR.
//!
//! For Q15 (`i16`), Q31 (`i32`) and `f32` at 16, 64 and 256 taps, one criterion group holds:
//!
//! * `tapline_push` — [`Fir::push`] once per sample over a block;
//! * `tapline_process` — [`Fir::process`] of the block into an output buffer;
//! * `tapline_process_in_place` — [`Fir::process_in_place`] on the block;
//! * `naive_modulo` — the baseline: a `[T; N]` ring indexed with `%` in the inner loop, as a
//!   filter is commonly written by hand, called once per sample over the same block.
//!
//! Throughput is reported in samples per second. Before any timing, each group checks that the
//! baseline and all three tapline paths produce bit-identical outputs, so that the numbers
//! compare equal work.
//!
//! Run with `cargo bench --bench throughput`.

use std::hint::black_box;
use std::time::Duration;

use criterion::{BatchSize, Criterion, Throughput, criterion_group, criterion_main};
use tapline::{Fir, MulAcc};

/// Samples per timed block: a typical DMA buffer, large enough that per-call overhead of the
/// block paths is amortised.
const BLOCK: usize = 1024;

/// Samples run through both implementations before timing; several times the longest filter, so
/// the comparison covers the start-up transient, wrap-around of the ring and steady state.
const CHECK_LEN: usize = 700;

/// A small xorshift generator: deterministic input with no dependency, identical on every run.
struct XorShift32(u32);

impl XorShift32 {
    fn next(&mut self) -> u32 {
        let mut x = self.0;
        x ^= x << 13;
        x ^= x >> 17;
        x ^= x << 5;
        self.0 = x;
        x
    }
}

/// What a sample format needs to be benchmarked here: tap design, noise input, an exact
/// comparison, and its hand-written baseline.
trait Format: MulAcc<Self> {
    const NAME: &'static str;

    /// The baseline filter for this format.
    type Naive<'a, const N: usize>: Baseline<Self>
    where
        Self: 'a;

    /// `weight / total` of full scale, rounded down so that Σ|h| stays at or below one.
    fn tap(weight: u32, total: u32) -> Self;

    /// Uniform noise over (nearly) the whole sample range, from 32 random bits.
    fn noise(bits: u32) -> Self;

    /// The exact bit pattern, so float outputs are compared bit for bit (−0.0 ≠ +0.0).
    fn bits(self) -> u64;

    fn naive<const N: usize>(taps: &[Self; N]) -> Self::Naive<'_, N>;
}

/// The per-sample interface shared by the baselines.
trait Baseline<S> {
    fn push(&mut self, x: S) -> S;
}

/// Q15 by hand: 64-bit accumulator, half-up rounding by adding half an LSB before the shift,
/// then clamping to `i16`.
struct NaiveQ15<'a, const N: usize> {
    taps: &'a [i16; N],
    buf: [i16; N],
    pos: usize,
}

impl<const N: usize> Baseline<i16> for NaiveQ15<'_, N> {
    fn push(&mut self, x: i16) -> i16 {
        self.buf[self.pos] = x;
        let mut acc: i64 = 0;
        for k in 0..N {
            acc += i64::from(self.taps[k]) * i64::from(self.buf[(self.pos + N - k) % N]);
        }
        self.pos = (self.pos + 1) % N;
        let y = (acc + (1 << 14)) >> 15;
        y.clamp(i64::from(i16::MIN), i64::from(i16::MAX)) as i16
    }
}

/// Q31 by hand: the same shape as Q15 with a 31-bit shift.
struct NaiveQ31<'a, const N: usize> {
    taps: &'a [i32; N],
    buf: [i32; N],
    pos: usize,
}

impl<const N: usize> Baseline<i32> for NaiveQ31<'_, N> {
    fn push(&mut self, x: i32) -> i32 {
        self.buf[self.pos] = x;
        let mut acc: i64 = 0;
        for k in 0..N {
            acc += i64::from(self.taps[k]) * i64::from(self.buf[(self.pos + N - k) % N]);
        }
        self.pos = (self.pos + 1) % N;
        let y = (acc + (1 << 30)) >> 31;
        y.clamp(i64::from(i32::MIN), i64::from(i32::MAX)) as i32
    }
}

/// `f32` by hand: `f32` accumulator, newest sample against h[0], as tapline sums, so rounding
/// happens in the same order and outputs match bit for bit.
struct NaiveF32<'a, const N: usize> {
    taps: &'a [f32; N],
    buf: [f32; N],
    pos: usize,
}

impl<const N: usize> Baseline<f32> for NaiveF32<'_, N> {
    fn push(&mut self, x: f32) -> f32 {
        self.buf[self.pos] = x;
        let mut acc = 0.0f32;
        for k in 0..N {
            acc += self.taps[k] * self.buf[(self.pos + N - k) % N];
        }
        self.pos = (self.pos + 1) % N;
        acc
    }
}

impl Format for i16 {
    const NAME: &'static str = "q15";
    type Naive<'a, const N: usize> = NaiveQ15<'a, N>;

    fn tap(weight: u32, total: u32) -> i16 {
        (i64::from(weight) * i64::from(i16::MAX) / i64::from(total)) as i16
    }
    fn noise(bits: u32) -> i16 {
        (bits >> 16) as u16 as i16
    }
    fn bits(self) -> u64 {
        u64::from(self as u16)
    }
    fn naive<const N: usize>(taps: &[i16; N]) -> NaiveQ15<'_, N> {
        NaiveQ15 {
            taps,
            buf: [0; N],
            pos: 0,
        }
    }
}

impl Format for i32 {
    const NAME: &'static str = "q31";
    type Naive<'a, const N: usize> = NaiveQ31<'a, N>;

    fn tap(weight: u32, total: u32) -> i32 {
        (i64::from(weight) * i64::from(i32::MAX) / i64::from(total)) as i32
    }
    fn noise(bits: u32) -> i32 {
        bits as i32
    }
    fn bits(self) -> u64 {
        u64::from(self as u32)
    }
    fn naive<const N: usize>(taps: &[i32; N]) -> NaiveQ31<'_, N> {
        NaiveQ31 {
            taps,
            buf: [0; N],
            pos: 0,
        }
    }
}

impl Format for f32 {
    const NAME: &'static str = "f32";
    type Naive<'a, const N: usize> = NaiveF32<'a, N>;

    fn tap(weight: u32, total: u32) -> f32 {
        // Computed in f64 and nudged below one so that float rounding cannot push Σh over it.
        (f64::from(weight) / f64::from(total) * (1.0 - 1e-6)) as f32
    }
    fn noise(bits: u32) -> f32 {
        // 24 random bits map exactly onto [-1, 1) in steps of 2^-23.
        (bits >> 8) as f32 / (1u32 << 23) as f32 - 1.0
    }
    fn bits(self) -> u64 {
        u64::from(self.to_bits())
    }
    fn naive<const N: usize>(taps: &[f32; N]) -> NaiveF32<'_, N> {
        NaiveF32 {
            taps,
            buf: [0.0; N],
            pos: 0,
        }
    }
}

/// A triangular window scaled to unit sum: a plain low-pass of realistic tap magnitudes.
fn triangular_taps<S: Format, const N: usize>() -> [S; N] {
    let weight = |k: usize| (k + 1).min(N - k) as u32;
    let total: u32 = (0..N).map(weight).sum();
    core::array::from_fn(|k| S::tap(weight(k), total))
}

fn noise_input<S: Format>(len: usize, seed: u32) -> Vec<S> {
    let mut rng = XorShift32(seed);
    (0..len).map(|_| S::noise(rng.next())).collect()
}

/// Runs the baseline and every tapline path on the same input and stops the bench run at the
/// first output that differs, since a throughput comparison of different results means nothing.
fn check_agreement<S: Format, const N: usize>(taps: &[S; N]) {
    let input = noise_input::<S>(CHECK_LEN, 0x2545_f491);
    let label = format!("{} with {N} taps", S::NAME);
    let fir = Fir::<S, N>::new(taps)
        .unwrap_or_else(|e| panic!("{label}: tapline rejected the taps: {e}"));

    let mut naive = S::naive(taps);
    let expected: Vec<S> = input.iter().map(|&x| naive.push(x)).collect();

    let mut pushed = fir.clone();
    let by_push: Vec<S> = input.iter().map(|&x| pushed.push(x)).collect();

    let mut by_process = vec![S::ZERO; input.len()];
    fir.clone()
        .process(&input, &mut by_process)
        .unwrap_or_else(|e| panic!("{label}: process failed: {e}"));

    let mut in_place = input.clone();
    fir.clone().process_in_place(&mut in_place);

    for (path, got) in [
        ("push", &by_push),
        ("process", &by_process),
        ("process_in_place", &in_place),
    ] {
        if let Some(n) = (0..input.len()).find(|&n| got[n].bits() != expected[n].bits()) {
            eprintln!(
                "{label}: tapline {path} and the naive baseline disagree at sample {n}: \
                 tapline {:?}, baseline {:?}; the benchmark would compare unequal work",
                got[n], expected[n]
            );
            std::process::exit(1);
        }
    }
}

fn bench_fir<S: Format, const N: usize>(c: &mut Criterion) {
    let taps = triangular_taps::<S, N>();
    check_agreement(&taps);

    let input = noise_input::<S>(BLOCK, 0x9e37_79b9);
    let mut group = c.benchmark_group(format!("fir_{}_{N}taps", S::NAME));
    group.throughput(Throughput::Elements(BLOCK as u64));

    // The filters keep their history from one iteration to the next, as a firmware filter
    // does from one block to the next; only the first block of all sees the start-up zeros.
    let mut fir = Fir::<S, N>::new(&taps).unwrap();
    group.bench_function("tapline_push", |b| {
        b.iter(|| {
            for &x in black_box(input.as_slice()) {
                black_box(fir.push(x));
            }
        });
    });

    let mut fir = Fir::<S, N>::new(&taps).unwrap();
    let mut output = vec![S::ZERO; BLOCK];
    group.bench_function("tapline_process", |b| {
        b.iter(|| {
            fir.process(black_box(&input), &mut output).unwrap();
            black_box(&mut output);
        });
    });

    // Each iteration gets a fresh copy of the noise (copied outside the timing): filtering the
    // same buffer over and over would shrink it towards zero, and f32 subnormals would then
    // measure the FPU's slow path instead of the filter.
    let mut fir = Fir::<S, N>::new(&taps).unwrap();
    group.bench_function("tapline_process_in_place", |b| {
        b.iter_batched_ref(
            || input.clone(),
            |buf| {
                fir.process_in_place(black_box(buf.as_mut_slice()));
                black_box(buf);
            },
            BatchSize::SmallInput,
        );
    });

    let mut naive = S::naive(&taps);
    group.bench_function("naive_modulo", |b| {
        b.iter(|| {
            for &x in black_box(input.as_slice()) {
                black_box(naive.push(x));
            }
        });
    });

    group.finish();
}

fn q15(c: &mut Criterion) {
    bench_fir::<i16, 16>(c);
    bench_fir::<i16, 64>(c);
    bench_fir::<i16, 256>(c);
}

fn q31(c: &mut Criterion) {
    bench_fir::<i32, 16>(c);
    bench_fir::<i32, 64>(c);
    bench_fir::<i32, 256>(c);
}

fn float32(c: &mut Criterion) {
    bench_fir::<f32, 16>(c);
    bench_fir::<f32, 64>(c);
    bench_fir::<f32, 256>(c);
}

criterion_group! {
    name = throughput;
    // 36 benchmarks at about 3.5 s each keeps the whole run near two minutes on two cores;
    // each iteration already averages over a 1024-sample block, so 40 samples are plenty.
    config = Criterion::default()
        .warm_up_time(Duration::from_millis(1000))
        .measurement_time(Duration::from_secs(2))
        .sample_size(40);
    targets = q15, q31, float32
}
criterion_main!(throughput);
