//! Streaming filters: a [`Ring`](crate::Ring) of history, a kernel, and the output step.

mod fir;
mod group_delay;

pub use fir::Fir;
pub use group_delay::{GroupDelay, Symmetry};
