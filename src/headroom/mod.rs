//! Headroom: proof, before flashing, that a fixed-point filter cannot overflow, and a bound on
//! how far it strays from the ideal (float64) filter.
//!
//! * [`Headroom`] — exact `const` analysis of a tap set for an [`InputRange`]: Σ|h|, DC gain,
//!   peak tap, accumulator and output bounds, guard bits, the smallest safe accumulator, and
//!   the worst-case input that reaches each bound.
//! * [`ProvenTaps`] + [`Fir::proven`](crate::Fir::proven) — the 32-bit Q15 accumulator
//!   ([`Acc32`]), reachable only through a proof the compiler checks.
//! * [`CheckedTaps`] — the same 32-bit accumulator ([`Acc32Checked`]) for taps known only at
//!   run time, reachable only through a check of the taps against an input range.
//! * [`ErrorBound`] and [`measure_deviation`] — the computed and the measured distance from
//!   float64, in output LSBs, with saturation counted apart.
//! * [`AccTrace`] — the accumulator extremes a real (replayed) signal used.
//! * [`Symmetry`] — whether a tap set is symmetric or antisymmetric (linear phase).

mod analysis;
mod deviation;
mod proof;
mod range;
mod symmetry;
mod trace;

pub use crate::num::Acc32Checked;
pub use analysis::{AccWidth, Extreme, Headroom};
pub use deviation::{Deviation, ErrorBound, f32_error_bound, gamma, measure_deviation};
pub(crate) use proof::proof_holds;
pub use proof::{Acc32, CheckedTaps, ProvenTaps};
pub use range::{Align, InputRange};
pub use symmetry::Symmetry;
pub use trace::AccTrace;
