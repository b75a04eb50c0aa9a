//! Turning the bytes of an input file into text, the same way for every reader (spec, tap
//! table, capture): a UTF-8 byte-order mark is dropped, UTF-16 is refused by name, and a byte
//! that is not text is refused at its line, column and byte offset. Opening and reading the
//! file is the readers' business; this module only decodes what they read.

use crate::tool::failure::Failure;
use std::format;
use std::path::Path;
use std::prelude::rust_2024::*;

/// The UTF-8 byte-order mark some editors on Windows write at the start of a file.
const UTF8_BOM: &[u8] = b"\xEF\xBB\xBF";

/// How many leading bytes decide whether a file without a byte-order mark is UTF-16: enough
/// for a few lines, little enough to cost nothing.
const SNIFF: usize = 512;

/// A whole file's bytes as text: the UTF-8 byte-order mark dropped, anything else that is
/// not UTF-8 text refused with its place.
pub fn decode(path: &Path, mut bytes: Vec<u8>) -> Result<String, Failure> {
    refuse_utf16(path, &bytes)?;
    let start = drop_bom(&mut bytes);
    into_text(path, 1, start, bytes, true)
}

/// One line of a file read line by line (`number` is 1-based, `start` the byte offset of the
/// line in the file, `bytes` without its line break): on the first line a UTF-8 byte-order
/// mark is dropped and UTF-16 refused; on every line a byte that is not UTF-8 is refused with
/// its place. Takes the bytes and returns them as the text, without a copy, so that a reader
/// can reuse one buffer for every line. A NUL (valid UTF-8) is left to [`explain`], which a
/// line-by-line reader calls when a line fails to parse: the hot path of a capture of
/// millions of rows then pays for no scan beyond UTF-8's own.
#[inline]
pub fn decode_line(
    path: &Path,
    number: usize,
    start: u64,
    mut bytes: Vec<u8>,
) -> Result<String, Failure> {
    let mut start = start;
    if number == 1 {
        refuse_utf16(path, &bytes)?;
        start += drop_bom(&mut bytes);
    }
    into_text(path, number, start, bytes, false)
}

/// Why a line that failed to parse is not what the readers take, when the reason is its text
/// rather than a value: a NUL byte (`start` is the line's byte offset in the file), or
/// semicolons between the fields. `Ok` when neither: the reader's own message stands.
pub fn explain(path: &Path, number: usize, start: u64, line: &str) -> Result<(), Failure> {
    if let Some(at) = line.find('\0') {
        return Err(fail_at(
            path,
            number,
            start,
            line.as_bytes(),
            at,
            String::from("a NUL byte"),
            NUL_HINT,
        ));
    }
    refuse_semicolons(path, number, line)
}

const NUL_HINT: &str = " (is it a binary file?)";

/// Drops a leading UTF-8 byte-order mark; returns how many bytes went.
fn drop_bom(bytes: &mut Vec<u8>) -> u64 {
    if bytes.starts_with(UTF8_BOM) {
        bytes.drain(..UTF8_BOM.len());
        UTF8_BOM.len() as u64
    } else {
        0
    }
}

/// Refuses a line whose fields are separated by semicolons (a spreadsheet export in a locale
/// that writes decimal commas): the readers split at commas, spaces and tabs only, and a
/// semicolon would otherwise surface as a confusing "expected a number".
pub fn refuse_semicolons(path: &Path, number: usize, line: &str) -> Result<(), Failure> {
    match line.find(';') {
        None => Ok(()),
        Some(at) => {
            let column = line.get(..at).map_or(0, |b| b.chars().count()) + 1;
            Err(Failure::at(
                path,
                number,
                column,
                "expected fields separated by commas, spaces or tabs, found a semicolon: this looks like a semicolon-separated export; save it as CSV with commas and decimal points (for example with: tr ';' ',')",
            ))
        }
    }
}

/// UTF-16 (with a byte-order mark, or without one but with a NUL in every other byte, as
/// ASCII text in UTF-16 has) is refused by name rather than shown as strange characters.
/// `head` is the start of the file: a reader that goes line by line passes what it has
/// buffered, since UTF-16's first line break ends its first "line" in the middle of a pair.
pub fn refuse_utf16(path: &Path, bytes: &[u8]) -> Result<(), Failure> {
    let bom = match bytes {
        [0xFF, 0xFE, ..] => Some("UTF-16 little-endian (byte-order mark FF FE)"),
        [0xFE, 0xFF, ..] => Some("UTF-16 big-endian (byte-order mark FE FF)"),
        _ => None,
    };
    let what = bom.or_else(|| looks_utf16(bytes));
    match what {
        Some(what) => Err(Failure::file(
            path,
            format!("expected UTF-8 text, found {what}: save the file as UTF-8"),
        )),
        None => Ok(()),
    }
}

/// UTF-16 without a byte-order mark: at least 2 leading byte pairs, and in the first few
/// hundred bytes nearly every even (big-endian) or every odd (little-endian) byte is NUL.
/// Text in UTF-8 holds no NUL at all, so the pattern is a strong sign.
fn looks_utf16(bytes: &[u8]) -> Option<&'static str> {
    let head = bytes.get(..bytes.len().min(SNIFF)).unwrap_or(bytes);
    let pairs = head.len() / 2;
    if pairs < 2 {
        return None;
    }
    let zeros = |parity: usize| {
        head.iter()
            .skip(parity)
            .step_by(2)
            .take(pairs)
            .filter(|&&b| b == 0)
            .count()
    };
    // Nine in ten: a few non-ASCII characters may have both bytes set.
    let mostly = |n: usize| n * 10 >= pairs * 9;
    if mostly(zeros(1)) && !mostly(zeros(0)) {
        Some("UTF-16 little-endian (no byte-order mark; every other byte is NUL)")
    } else if mostly(zeros(0)) && !mostly(zeros(1)) {
        Some("UTF-16 big-endian (no byte-order mark; every other byte is NUL)")
    } else {
        None
    }
}

/// The bytes as text, or the first byte that is not text (not UTF-8, or with `nul` a NUL)
/// refused at its place (see [`fail_at`]).
#[inline]
fn into_text(
    path: &Path,
    first_line: usize,
    start: u64,
    bytes: Vec<u8>,
    nul: bool,
) -> Result<String, Failure> {
    match String::from_utf8(bytes) {
        Ok(text) => match if nul { text.find('\0') } else { None } {
            None => Ok(text),
            Some(at) => Err(fail_at(
                path,
                first_line,
                start,
                text.as_bytes(),
                at,
                String::from("a NUL byte"),
                NUL_HINT,
            )),
        },
        Err(e) => {
            let at = e.utf8_error().valid_up_to();
            let bytes = e.as_bytes();
            let byte = bytes.get(at).copied().unwrap_or(0);
            Err(fail_at(
                path,
                first_line,
                start,
                bytes,
                at,
                format!("byte 0x{byte:02X}"),
                "",
            ))
        }
    }
}

/// `what` found at byte `offset` of `bytes`, which start at line `first_line` and at byte
/// `start` of the file: the failure names the line, the column and the file's byte offset.
fn fail_at(
    path: &Path,
    first_line: usize,
    start: u64,
    bytes: &[u8],
    offset: usize,
    what: String,
    hint: &str,
) -> Failure {
    let before = bytes.get(..offset).unwrap_or(bytes);
    // Everything before `offset` is valid UTF-8: count lines and characters in it.
    let prefix = String::from_utf8_lossy(before);
    let (line, column) = crate::tool::failure::line_column(&prefix, prefix.len());
    Failure::at(
        path,
        first_line + line - 1,
        column,
        format!(
            "expected UTF-8 text, found {what} at byte offset {}{hint}",
            start + offset as u64
        ),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn path() -> &'static Path {
        Path::new("in.txt")
    }

    #[test]
    fn utf8_bom_is_dropped() {
        let text = decode(path(), b"\xEF\xBB\xBFa,b\n1,2\n".to_vec());
        assert_eq!(text.ok().as_deref(), Some("a,b\n1,2\n"));
        let line = decode_line(path(), 1, 0, b"\xEF\xBB\xBFa,b".to_vec());
        assert_eq!(line.ok().as_deref(), Some("a,b"));
        // Only at the start of the file.
        assert!(
            decode_line(path(), 2, 9, b"\xEF\xBB\xBFa,b".to_vec())
                .is_ok_and(|l| l.starts_with('\u{feff}'))
        );
    }

    #[test]
    fn utf16_is_named() {
        let le: Vec<u8> = "a,b\n1,2\n".bytes().flat_map(|b| [b, 0]).collect();
        let be: Vec<u8> = "a,b\n1,2\n".bytes().flat_map(|b| [0, b]).collect();
        for (bytes, word) in [
            (
                [&[0xFF, 0xFE][..], &le[..]].concat(),
                "little-endian (byte-order mark",
            ),
            (
                [&[0xFE, 0xFF][..], &be[..]].concat(),
                "big-endian (byte-order mark",
            ),
            (le.clone(), "little-endian (no byte-order mark"),
            (be.clone(), "big-endian (no byte-order mark"),
        ] {
            let e = decode(path(), bytes).err().map(|e| e.to_string());
            assert!(e.as_deref().is_some_and(|e| e.contains(word)), "{e:?}");
        }
    }

    #[test]
    fn a_bad_byte_has_its_place() {
        let e = decode(path(), b"ab\ncd\xFFe\n".to_vec())
            .err()
            .map(|e| e.to_string());
        assert_eq!(
            e.as_deref(),
            Some("in.txt:2:3: expected UTF-8 text, found byte 0xFF at byte offset 5")
        );
        let e = decode(path(), b"x = 1\n\0\0".to_vec())
            .err()
            .map(|e| e.to_string());
        assert_eq!(
            e.as_deref(),
            Some(
                "in.txt:2:1: expected UTF-8 text, found a NUL byte at byte offset 6 (is it a binary file?)"
            )
        );
        let e = decode_line(path(), 7, 40, b"1,\xC3".to_vec())
            .err()
            .map(|e| e.to_string());
        assert_eq!(
            e.as_deref(),
            Some("in.txt:7:3: expected UTF-8 text, found byte 0xC3 at byte offset 42")
        );
    }

    #[test]
    fn a_line_that_failed_is_explained_by_its_nul_or_semicolon() {
        assert!(explain(path(), 4, 100, "12 13").is_ok());
        let e = explain(path(), 4, 100, "12\u{0}13")
            .err()
            .map(|e| e.to_string());
        assert_eq!(
            e.as_deref(),
            Some(
                "in.txt:4:3: expected UTF-8 text, found a NUL byte at byte offset 102 (is it a binary file?)"
            )
        );
        let e = explain(path(), 4, 100, "1;2").err().map(|e| e.to_string());
        assert!(e.is_some_and(|e| e.starts_with("in.txt:4:2: ")));
    }

    #[test]
    fn semicolons_are_named_at_their_column() {
        assert!(refuse_semicolons(path(), 3, "1,5 2,5").is_ok());
        let e = refuse_semicolons(path(), 3, "1,5;2,5")
            .err()
            .map(|e| e.to_string());
        assert!(e.as_deref().is_some_and(|e| e.starts_with("in.txt:3:4: ") && e.contains("semicolon-separated")));
    }
}
