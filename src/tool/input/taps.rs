//! Tap tables in the formats the tool knows: Q15 and Q31 codes (fixed point, with a headroom
//! analysis) and f32 (float; no headroom to prove).

use crate::design::DesignError;
use crate::headroom::{Align, ErrorBound, Headroom, InputRange};
use crate::tool::failure::Failure;
use crate::tool::input::table;
use crate::{Error, Rounding};
use clap::ValueEnum;
use std::path::Path;
use std::prelude::rust_2024::*;
use std::{format, vec};

/// The number format of a tap table.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// 16-bit codes, 15 fractional bits, on 16-bit samples.
    Q15,
    /// 32-bit codes, 31 fractional bits, on 32-bit samples.
    Q31,
    /// 32-bit float.
    F32,
}

impl Format {
    /// The format's name as the tool prints it (`Q15`, `Q31`, `f32`).
    pub fn name(self) -> &'static str {
        match self {
            Format::Q15 => "Q15",
            Format::Q31 => "Q31",
            Format::F32 => "f32",
        }
    }

    /// The sample word the taps filter (16 for Q15, 32 otherwise).
    pub fn word_bits(self) -> u32 {
        match self {
            Format::Q15 => 16,
            Format::Q31 | Format::F32 => 32,
        }
    }
}

/// How the numbers in a table are written.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Written {
    /// Raw integer codes of the format.
    Codes,
    /// Real values (quantized to the format with an exact DC gain).
    Real,
}

/// Output rounding, as the filters offer it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
// No doc comments on these variants: clap would turn them into per-value help text and
// change `--help`.
#[allow(missing_docs)]
pub enum RoundingArg {
    HalfUp,
    Truncate,
    HalfEven,
}

impl From<RoundingArg> for Rounding {
    fn from(r: RoundingArg) -> Rounding {
        match r {
            RoundingArg::HalfUp => Rounding::HalfUp,
            RoundingArg::Truncate => Rounding::Truncate,
            RoundingArg::HalfEven => Rounding::HalfEven,
        }
    }
}

/// Where an ADC's bits sit in the sample word.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
// No doc comments on these variants: clap would turn them into per-value help text and
// change `--help`.
#[allow(missing_docs)]
pub enum AlignArg {
    Left,
    Right,
}

/// The ADC feeding the filter: `bits` (None: the whole sample word) and alignment.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Adc {
    /// ADC resolution in bits (None: the whole sample word).
    pub bits: Option<u32>,
    /// Where the ADC's bits sit in the sample word (of no account for the whole word).
    pub align: AlignArg,
}

/// Why an ADC narrower than its sample word needs its alignment said: `key` names the flag
/// or the file key to add.
pub fn alignment_needed(bits: u32, word_bits: u32, key: &str) -> String {
    format!(
        "expected {key} for a {bits}-bit ADC in {word_bits}-bit samples: where its bits sit in the word changes the input range, and so the headroom verdict (right-aligned is what most microcontroller ADC data registers deliver)"
    )
}

impl Adc {
    /// An ADC from flags: `align` must be given when `bits` is narrower than the sample word
    /// of `format` (a silent default would decide the verdict).
    ///
    /// # Errors
    /// A failure at `--align` when it is needed and missing.
    pub fn from_flags(
        bits: Option<u32>,
        align: Option<AlignArg>,
        format: Format,
    ) -> Result<Adc, Failure> {
        let word = format.word_bits();
        match (bits, align) {
            (Some(b), None) if b < word => Err(Failure::argument(
                "--align",
                alignment_needed(b, word, "--align left or --align right"),
            )),
            // For the whole word the alignment has no effect.
            (bits, align) => Ok(Adc {
                bits,
                align: align.unwrap_or(AlignArg::Right),
            }),
        }
    }

    /// Whether the ADC fills the whole sample word (its alignment then has no effect).
    pub fn whole_word(self, word_bits: u32) -> bool {
        self.bits.is_none_or(|b| b >= word_bits)
    }

    /// The input range of the ADC in a sample word of `word_bits` bits.
    ///
    /// # Errors
    /// [`Error::InvalidRange`] for an impossible ADC (0 bits or more than the word).
    pub fn range(self, word_bits: u32) -> Result<InputRange, Error> {
        match self.bits {
            None => Ok(InputRange::FULL.within_word(word_bits)),
            Some(bits) => InputRange::adc(
                bits,
                match self.align {
                    AlignArg::Left => Align::Left,
                    AlignArg::Right => Align::Right,
                },
                word_bits,
            ),
        }
    }

    /// The alignment as reports name it: `left`, `right`, or `whole word`.
    pub fn align_name(self, word_bits: u32) -> &'static str {
        match self.align {
            _ if self.whole_word(word_bits) => "whole word",
            AlignArg::Left => "left",
            AlignArg::Right => "right",
        }
    }

    /// The ADC in words, for reports (`12-bit ADC, right-aligned in 16 bits`).
    pub fn describe(self, word_bits: u32) -> String {
        match self.bits {
            Some(bits) if !self.whole_word(word_bits) => {
                format!(
                    "{bits}-bit ADC, {}-aligned in {word_bits} bits",
                    self.align_name(word_bits)
                )
            }
            _ => format!("full {word_bits}-bit sample word"),
        }
    }

    /// The ADC for JSON reports: its bits, the sample word and the alignment assumed.
    pub fn json(self, word_bits: u32) -> serde_json::Value {
        serde_json::json!({
            "bits": self.bits.unwrap_or(word_bits),
            "word_bits": word_bits,
            "align": self.align_name(word_bits),
        })
    }
}

/// Fixed-point taps (raw codes) with, when known, the real values they stand for.
#[derive(Debug, Clone)]
pub enum Codes {
    /// Q15 codes (15 fractional bits).
    Q15(Vec<i16>),
    /// Q31 codes (31 fractional bits).
    Q31(Vec<i32>),
}

impl Codes {
    /// The codes widened to `i64`, in tap order.
    pub fn raw(&self) -> Vec<i64> {
        match self {
            Codes::Q15(c) => c.iter().map(|&v| i64::from(v)).collect(),
            Codes::Q31(c) => c.iter().map(|&v| i64::from(v)).collect(),
        }
    }

    /// The number of taps.
    pub fn len(&self) -> usize {
        match self {
            Codes::Q15(c) => c.len(),
            Codes::Q31(c) => c.len(),
        }
    }

    /// Whether there are no taps (a table reader never returns such a table).
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The library's headroom analysis of the codes for inputs in `input`.
    pub fn headroom(&self, input: InputRange) -> Headroom {
        match self {
            Codes::Q15(c) => Headroom::q15(c, input),
            Codes::Q31(c) => Headroom::q31(c, input),
        }
    }

    /// The library's error bound against float64 of the codes standing in for `ideal`.
    ///
    /// # Errors
    /// [`Error::TapCountMismatch`] if `ideal` has another length.
    pub fn error_bound(
        &self,
        ideal: &[f64],
        input: InputRange,
        rounding: Rounding,
    ) -> Result<ErrorBound, Error> {
        match self {
            Codes::Q15(c) => ErrorBound::new::<i16, _>(ideal, c, input, rounding),
            Codes::Q31(c) => ErrorBound::new::<i32, _>(ideal, c, input, rounding),
        }
    }

    /// Quantizes real taps into `format` (Q15 or Q31).
    ///
    /// # Errors
    /// As [`quantize`](crate::design::quantize).
    pub fn quantize(ideal: &[f64], format: Format) -> Result<Codes, DesignError> {
        Ok(match format {
            Format::Q15 => {
                let mut q = vec![0i16; ideal.len()];
                crate::design::quantize(ideal, &mut q)?;
                Codes::Q15(q)
            }
            Format::Q31 | Format::F32 => {
                let mut q = vec![0i32; ideal.len()];
                crate::design::quantize(ideal, &mut q)?;
                Codes::Q31(q)
            }
        })
    }
}

/// A table read from a file: the codes, and the real values if the file held real values.
pub struct Table {
    /// The codes the table holds (quantized when it held real values).
    pub codes: Codes,
    /// The real values the table held (None when it held codes).
    pub ideal: Option<Vec<f64>>,
}

/// Reads a tap table: all fields in row order.
pub fn read(path: &Path, format: Format, written: Written) -> Result<Table, Failure> {
    let rows = table::read_rows(path)?;
    let fields: Vec<&table::Field> = rows.iter().flatten().collect();
    match written {
        Written::Codes => {
            let (min, max) = match format {
                Format::Q15 => (i64::from(i16::MIN), i64::from(i16::MAX)),
                Format::Q31 => (i64::from(i32::MIN), i64::from(i32::MAX)),
                Format::F32 => {
                    return Err(Failure::argument(
                        "--written",
                        "f32 tables hold real values: expected --written real",
                    ));
                }
            };
            let raw = fields
                .iter()
                .map(|f| table::integer(path, f, min, max))
                .collect::<Result<Vec<i64>, Failure>>()?;
            // The range check above makes the narrowing exact.
            let codes = match format {
                Format::Q15 => Codes::Q15(raw.iter().map(|&v| v as i16).collect()),
                _ => Codes::Q31(raw.iter().map(|&v| v as i32).collect()),
            };
            Ok(Table { codes, ideal: None })
        }
        Written::Real => {
            let ideal = fields
                .iter()
                .map(|f| table::real(path, f))
                .collect::<Result<Vec<f64>, Failure>>()?;
            if format == Format::F32 {
                return Err(Failure::argument(
                    "--format",
                    "headroom applies to fixed-point taps: expected q15 or q31",
                ));
            }
            let codes = Codes::quantize(&ideal, format).map_err(|e| match e {
                DesignError::TapOutOfRange { index, .. }
                | DesignError::TapBeyondFormat { index, .. } => {
                    let (line, column) = fields.get(index).map_or((1, 1), |f| (f.line, f.column));
                    Failure::at(
                        path,
                        line,
                        column,
                        format!("expected a tap value in [-1, 1) for {}", format.name()),
                    )
                }
                other => Failure::file(path, other),
            })?;
            Ok(Table {
                codes,
                ideal: Some(ideal),
            })
        }
    }
}

/// Reads a table of real tap values (f32 tables), every field in row order, each finite.
pub fn read_reals(path: &Path) -> Result<Vec<f64>, Failure> {
    let rows = table::read_rows(path)?;
    rows.iter()
        .flatten()
        .map(|f| table::real(path, f))
        .collect()
}
