//! A recorded capture, read one row at a time so that a capture of any length takes the same
//! memory: CSV (commas) or plain text (spaces or tabs), blank lines and `#` lines skipped, every
//! row as wide as the first. The samples come from one column chosen by number, or from several
//! chosen by the names in a header row — one channel each. Every mistake is one line naming the
//! file, line and column.

use crate::tool::failure::Failure;
use crate::tool::input::{file, text};
use std::format;
use std::fs::File;
use std::io::{BufRead, BufReader};
use std::path::{Path, PathBuf};
use std::prelude::rust_2024::*;

/// Which columns hold the samples.
#[derive(Debug, Clone)]
pub enum Pick {
    /// One column, 1-based.
    Column(usize),
    /// Columns named in the header row, one channel each, in this order.
    Names(Vec<String>),
}

/// What a sample is.
#[derive(Debug, Clone)]
pub enum Kind {
    /// A raw integer code in `min..=max`; `what` describes the range for messages.
    Codes { min: i64, max: i64, what: String },
    /// Any finite real number.
    Reals,
}

/// A field of the current row: the byte range of its trimmed text, and the byte where its
/// column is counted from (its first character, or for an empty field the separator after it).
#[derive(Debug, Clone, Copy)]
struct Span {
    start: usize,
    end: usize,
    anchor: usize,
}

pub struct Capture {
    path: PathBuf,
    reader: BufReader<File>,
    /// The current line's bytes as read, without its line break.
    raw: Vec<u8>,
    /// The current line, without its line break.
    line: String,
    /// Its 1-based number.
    number: usize,
    /// The byte offset in the file where it starts.
    line_start: u64,
    spans: Vec<Span>,
    /// Fields per row and the line that set it.
    width: Option<(usize, usize)>,
    /// 0-based field index of each channel.
    fields: Vec<usize>,
    names: Vec<String>,
    kind: Kind,
    /// Bytes in the file, and read so far (for a progress bar).
    pub total_bytes: u64,
    pub bytes_read: u64,
}

impl Capture {
    /// Opens a capture; with `header` (implied by [`Pick::Names`]) reads the header row now, so
    /// the channel names are known before the first sample.
    pub fn open(path: &Path, pick: &Pick, header: bool, kind: Kind) -> Result<Capture, Failure> {
        let file = file::open(path)?;
        let total_bytes = file.metadata().map(|m| m.len()).unwrap_or(0);
        let mut reader = BufReader::with_capacity(1 << 16, file);
        let head = reader
            .fill_buf()
            .map_err(|e| Failure::file(path, format!("could not read: {e}")))?;
        text::refuse_utf16(path, head)?;
        let mut c = Capture {
            path: path.to_path_buf(),
            reader,
            raw: Vec::new(),
            line: String::new(),
            number: 0,
            line_start: 0,
            spans: Vec::new(),
            width: None,
            fields: Vec::new(),
            names: Vec::new(),
            kind,
            total_bytes,
            bytes_read: 0,
        };
        let header = header || matches!(pick, Pick::Names(_));
        if header && !c.advance()? {
            return Err(Failure::at(
                path,
                c.number.max(1),
                1,
                "expected a header row, found none",
            ));
        }
        match pick {
            Pick::Column(column) => {
                c.fields.push(column.saturating_sub(1));
                c.names.push(if header {
                    c.check_column(*column)?;
                    c.text(column - 1).to_string()
                } else {
                    format!("column {column}")
                });
            }
            Pick::Names(wanted) => {
                for (k, name) in wanted.iter().enumerate() {
                    if wanted.iter().take(k).any(|n| n == name) {
                        return Err(Failure::argument(
                            "--channels",
                            format!("expected each channel once, found {name:?} twice"),
                        ));
                    }
                    let found: Vec<usize> =
                        (0..c.spans.len()).filter(|&i| c.text(i) == name).collect();
                    match found.as_slice() {
                        [one] => c.fields.push(*one),
                        [] => {
                            let header: Vec<&str> = (0..c.spans.len()).map(|i| c.text(i)).collect();
                            return Err(c.fail_here(
                                1,
                                format!(
                                    "expected a column named {name:?} in the header, found {}",
                                    header.join(", ")
                                ),
                            ));
                        }
                        [_, second, ..] => {
                            return Err(Failure::at(
                                path,
                                c.number,
                                c.column(*second),
                                format!(
                                    "expected one column named {name:?} in the header, found it again here"
                                ),
                            ));
                        }
                    }
                    c.names.push(name.clone());
                }
            }
        }
        Ok(c)
    }

    /// The channels' names: header names, or `column N` without a header.
    pub fn names(&self) -> &[String] {
        &self.names
    }

    /// The next data row's samples, one per channel, into `out`; false at the end of the file.
    pub fn next_row(&mut self, out: &mut Vec<f64>) -> Result<bool, Failure> {
        if !self.advance()? {
            return Ok(false);
        }
        out.clear();
        for k in 0..self.fields.len() {
            let index = self.fields.get(k).copied().unwrap_or(0);
            out.push(self.sample(index)?);
        }
        Ok(true)
    }

    /// Reads up to the next row with fields, checks its width; false at the end of the file.
    fn advance(&mut self) -> Result<bool, Failure> {
        loop {
            // The last line's text becomes the buffer for this one: no allocation per line.
            self.raw = std::mem::take(&mut self.line).into_bytes();
            self.raw.clear();
            let read =
                file::read_line(&mut self.reader, &mut self.raw, &self.path, self.number + 1)?;
            if read == 0 {
                return Ok(false);
            }
            self.number += 1;
            self.line_start = self.bytes_read;
            self.bytes_read += read as u64;
            while self.raw.ends_with(b"\n") || self.raw.ends_with(b"\r") {
                self.raw.pop();
            }
            let raw = std::mem::take(&mut self.raw);
            self.line = text::decode_line(&self.path, self.number, self.line_start, raw)?;
            let trimmed = self.line.trim();
            if trimmed.is_empty() || trimmed.starts_with('#') {
                continue;
            }
            split(&self.line, &mut self.spans);
            match self.width {
                None => {
                    self.width = Some((self.spans.len(), self.number));
                    if let Some(&index) = self.fields.iter().max() {
                        self.check_column(index + 1)?;
                    }
                }
                Some((n, first)) if n != self.spans.len() => {
                    let column = match self.spans.get(n) {
                        Some(_) => self.column(n),
                        None => self.line.chars().count() + 1,
                    };
                    return Err(self.fail_here(
                        column,
                        format!(
                            "expected {n} field(s) as on line {first}, found {}",
                            self.spans.len()
                        ),
                    ));
                }
                Some(_) => {}
            }
            return Ok(true);
        }
    }

    /// A failure at `column` of the current line — unless its text explains it better (a NUL
    /// byte, semicolons between the fields), which these checks leave to the failure path so
    /// that a row that parses costs no extra scan.
    fn fail_here(&self, column: usize, what: impl std::fmt::Display) -> Failure {
        match text::explain(&self.path, self.number, self.line_start, &self.line) {
            Err(better) => better,
            Ok(()) => Failure::at(&self.path, self.number, column, what),
        }
    }

    /// The first row must reach the highest column asked for.
    fn check_column(&self, column: usize) -> Result<(), Failure> {
        if column > self.spans.len() {
            return Err(self.fail_here(
                1,
                format!(
                    "expected at least {column} field(s) for --column {column}, found {}",
                    self.spans.len()
                ),
            ));
        }
        Ok(())
    }

    fn text(&self, index: usize) -> &str {
        self.spans
            .get(index)
            .and_then(|s| self.line.get(s.start..s.end))
            .unwrap_or("")
    }

    /// The 1-based column (in characters) of field `index`.
    fn column(&self, index: usize) -> usize {
        let anchor = self.spans.get(index).map_or(0, |s| s.anchor);
        self.line.get(..anchor).map_or(0, |b| b.chars().count()) + 1
    }

    fn sample(&self, index: usize) -> Result<f64, Failure> {
        let text = self.text(index);
        let fail = |what: String| self.fail_here(self.column(index), what);
        match &self.kind {
            Kind::Codes { min, max, what } => match text.parse::<i64>() {
                Ok(v) if (*min..=*max).contains(&v) => Ok(v as f64),
                _ => Err(fail(format!(
                    "expected a sample code in {min}..={max} ({what}), found {text:?}"
                ))),
            },
            Kind::Reals => match text.parse::<f64>() {
                Ok(v) if v.is_finite() => Ok(v),
                _ => Err(fail(format!("expected a finite number, found {text:?}"))),
            },
        }
    }
}

/// The fields of `line`: separated by commas if it has any, else by runs of spaces and tabs;
/// each trimmed. (The same rule as the tap-table reader.)
fn split(line: &str, spans: &mut Vec<Span>) {
    spans.clear();
    let field = |from: usize, to: usize| {
        let raw = line.get(from..to).unwrap_or("");
        let start = from + (raw.len() - raw.trim_start().len());
        let end = from + raw.trim_end().len();
        Span {
            start,
            end: end.max(start),
            anchor: if end > start { start } else { to },
        }
    };
    if line.contains(',') {
        let mut from = 0;
        for (at, _) in line.match_indices(',') {
            spans.push(field(from, at));
            from = at + 1;
        }
        spans.push(field(from, line.len()));
    } else {
        let mut from = None;
        for (at, c) in line.char_indices() {
            if c == ' ' || c == '\t' {
                if let Some(f) = from.take() {
                    spans.push(field(f, at));
                }
            } else if from.is_none() && !c.is_whitespace() {
                from = Some(at);
            }
        }
        if let Some(f) = from {
            spans.push(field(f, line.len()));
        }
    }
}
