//! What the tool reads: a spec (flags or a TOML file), tap tables, captures. Every reader
//! returns a value or a one-line [`Failure`](crate::tool::failure::Failure) naming the file,
//! line and column; the `tool_parsers` fuzz target holds them to that.

pub(crate) mod capture;
pub mod file;
pub mod spec;
pub mod table;
pub mod taps;
pub(crate) mod text;
