//! What the tool writes: the report of a command (text, JSON, exit status), files written
//! whole or not at all, and the progress bar on a terminal.

pub(crate) mod atomic;
pub(crate) mod progress;
pub mod report;
