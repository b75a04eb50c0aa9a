//! The tool's one error type: every failure is one line, and every failure means exit status 2
//! (bad input or a file that could not be read or written). "Can overflow" is not a failure:
//! `check` reports it and exits 1.

use std::fmt;
use std::format;
use std::path::Path;
use std::prelude::rust_2024::*;

/// A one-line reason the command could not do its work.
#[derive(Debug)]
pub struct Failure(String);

impl Failure {
    /// A problem at a place in a file: `file:line:column: what was expected`.
    pub fn at(file: &Path, line: usize, column: usize, what: impl fmt::Display) -> Failure {
        Failure(format!("{}:{line}:{column}: {what}", file.display()))
    }

    /// A problem with the file as a whole (it could not be read or written).
    pub fn file(file: &Path, what: impl fmt::Display) -> Failure {
        Failure(format!("{}: {what}", file.display()))
    }

    /// A problem with a command-line argument.
    pub fn argument(flag: &str, what: impl fmt::Display) -> Failure {
        Failure(format!("command line: {flag}: {what}"))
    }

    /// Anything else.
    pub fn plain(what: impl fmt::Display) -> Failure {
        Failure(what.to_string())
    }
}

impl fmt::Display for Failure {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        // One line, whatever the message held.
        f.write_str(&self.0.replace('\n', " "))
    }
}

/// 1-based line and column (in characters) of byte `offset` in `text`.
pub fn line_column(text: &str, offset: usize) -> (usize, usize) {
    let before = text.get(..offset.min(text.len())).unwrap_or(text);
    let line = before.matches('\n').count() + 1;
    let column = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
    (line, column)
}
