//! The host tool's internals (feature `cli`, `std`): what `src/bin/tapline.rs` runs. It is not
//! part of the library's firmware API and may change with the tool; it is public so that the
//! binary and the fuzz targets reach it through the crate.
//!
//! The tool asks the library and prints: every numeric decision (the design searches and their
//! quantization margins, the verdict against a spec, the headroom verdict, the error bounds,
//! the float64 reference filter) is made in [`design`](crate::design) and
//! [`headroom`](crate::headroom).
//!
//! | module | holds |
//! |---|---|
//! | [`input`] | readers: the spec (flags or TOML), tap tables, captures |
//! | `jobs` | one module per command: design and emit, check, replay, plot, prepare |
//! | [`output`] | the report (text, JSON, exit status), atomic file writing, the progress bar |
//! | [`args`] | the command line and the dispatch of one command to its job |
//! | [`failure`] | the tool's failure type: one line, exit status 2 |

pub mod args;
pub mod failure;
pub mod input;
pub(crate) mod jobs;
pub mod output;
