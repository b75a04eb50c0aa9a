//! Reading numbers from plain text or CSV: one or more fields per line, separated by commas
//! (CSV) or by spaces and tabs (plain text); blank lines and lines starting with `#` are skipped.
//! Every data row must have as many fields as the first one.

use crate::tool::failure::Failure;
use crate::tool::input::text;
use std::format;
use std::path::Path;
use std::prelude::rust_2024::*;

/// One field: its text and where it starts (1-based line and column).
#[derive(Debug, Clone)]
pub struct Field {
    /// The field as written, trimmed.
    pub text: String,
    /// 1-based line of the field.
    pub line: usize,
    /// 1-based column (in characters) where the field starts.
    pub column: usize,
}

/// The data rows of a file, checked to be rectangular and non-empty.
pub fn read_rows(path: &Path) -> Result<Vec<Vec<Field>>, Failure> {
    let text = crate::tool::input::file::read_text(path)?;
    let mut rows: Vec<Vec<Field>> = Vec::new();
    for (index, raw) in text.lines().enumerate() {
        let line = index + 1;
        let trimmed = raw.trim();
        if trimmed.is_empty() || trimmed.starts_with('#') {
            continue;
        }
        text::refuse_semicolons(path, line, raw)?;
        let fields = split(raw, line);
        if let Some(first) = rows.first() {
            if fields.len() != first.len() {
                let column = fields
                    .get(first.len())
                    .map_or(raw.chars().count() + 1, |f| f.column);
                let first_line = first.first().map_or(0, |f| f.line);
                return Err(Failure::at(
                    path,
                    line,
                    column,
                    format!(
                        "expected {} field(s) as on line {first_line}, found {}",
                        first.len(),
                        fields.len()
                    ),
                ));
            }
        }
        rows.push(fields);
    }
    if rows.is_empty() {
        return Err(Failure::at(
            path,
            1,
            1,
            "expected at least one row of numbers, found none",
        ));
    }
    Ok(rows)
}

/// The fields of one line (`raw`, line number `line`): split at commas or whitespace.
pub fn split(raw: &str, line: usize) -> Vec<Field> {
    let comma = raw.contains(',');
    let mut fields = Vec::new();
    let mut current = String::new();
    let mut start: Option<usize> = None;
    let mut column = 0;
    let mut flush = |current: &mut String, start: &mut Option<usize>, at: usize| {
        fields.push(Field {
            text: current.trim().to_string(),
            line,
            column: start.take().unwrap_or(at),
        });
        current.clear();
    };
    for c in raw.chars() {
        column += 1;
        let separator = if comma {
            c == ','
        } else {
            c == ' ' || c == '\t'
        };
        if separator {
            if comma || start.is_some() {
                flush(&mut current, &mut start, column);
            }
        } else {
            if start.is_none() && !c.is_whitespace() {
                start = Some(column);
            }
            current.push(c);
        }
    }
    if comma || start.is_some() {
        flush(&mut current, &mut start, column + 1);
    }
    fields
}

/// A finite real number.
pub fn real(path: &Path, field: &Field) -> Result<f64, Failure> {
    match field.text.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        Ok(_) => Err(Failure::at(
            path,
            field.line,
            field.column,
            format!("expected a finite number, found {:?}", field.text),
        )),
        Err(_) => Err(Failure::at(
            path,
            field.line,
            field.column,
            format!("expected a number, found {:?}", field.text),
        )),
    }
}

/// An integer in `min..=max`.
pub fn integer(path: &Path, field: &Field, min: i64, max: i64) -> Result<i64, Failure> {
    let v = field.text.parse::<i64>().map_err(|_| {
        Failure::at(
            path,
            field.line,
            field.column,
            format!("expected an integer code, found {:?}", field.text),
        )
    })?;
    if !(min..=max).contains(&v) {
        return Err(Failure::at(
            path,
            field.line,
            field.column,
            format!("expected an integer code in {min}..={max}, found {v}"),
        ));
    }
    Ok(v)
}
