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
pub fn decode(path: &Path, bytes: Vec<u8>) -> Result<String, Failure> {
    refuse_utf16(path, &bytes)?;
    let body = match bytes.strip_prefix(UTF8_BOM) {
        Some(rest) => rest.to_vec(),
        None => bytes,
    };
    check_bytes(path, 1, 0, &body)?;
    // check_bytes has found every byte valid, so this cannot fail; the error arm only keeps
    // the tool free of panics.
    String::from_utf8(body).map_err(|e| Failure::file(path, format!("expected UTF-8 text ({e})")))
}

/// One line of a file read line by line (`number` is 1-based, `start` the byte offset of the
/// line in the file, `bytes` with or without its line break): on the first line a UTF-8
/// byte-order mark is dropped and UTF-16 refused; on every line a byte that is not UTF-8 text
/// is refused with its place.
pub fn decode_line<'a>(
    path: &Path,
    number: usize,
    start: u64,
    bytes: &'a [u8],
) -> Result<&'a str, Failure> {
    let (body, start) = match bytes.strip_prefix(UTF8_BOM) {
        Some(rest) if number == 1 => (rest, start + UTF8_BOM.len() as u64),
        _ => (bytes, start),
    };
    if number == 1 {
        refuse_utf16(path, bytes)?;
    }
    check_bytes(path, number, start, body)?;
    std::str::from_utf8(body)
        .map_err(|e| Failure::at(path, number, 1, format!("expected UTF-8 text ({e})")))
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

/// The first byte that is not text (a NUL, or not UTF-8), refused at its line (counted from
/// `first_line`), column and byte offset in the file (`bytes` start at offset `start`).
fn check_bytes(path: &Path, first_line: usize, start: u64, bytes: &[u8]) -> Result<(), Failure> {
    let (offset, what, hint) = match std::str::from_utf8(bytes) {
        Ok(text) => match text.find('\0') {
            Some(at) => (at, String::from("a NUL byte"), " (is it a binary file?)"),
            None => return Ok(()),
        },
        Err(e) => {
            let at = e.valid_up_to();
            let byte = bytes.get(at).copied().unwrap_or(0);
            (at, format!("byte 0x{byte:02X}"), "")
        }
    };
    let before = bytes.get(..offset).unwrap_or(bytes);
    // Everything before `offset` is valid UTF-8: count lines and characters in it.
    let prefix = String::from_utf8_lossy(before);
    let (line, column) = crate::tool::failure::line_column(&prefix, prefix.len());
    Err(Failure::at(
        path,
        first_line + line - 1,
        column,
        format!(
            "expected UTF-8 text, found {what} at byte offset {}{hint}",
            start + offset as u64
        ),
    ))
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
        let line = decode_line(path(), 1, 0, b"\xEF\xBB\xBFa,b");
        assert_eq!(line.ok(), Some("a,b"));
        // Only at the start of the file.
        assert!(
            decode_line(path(), 2, 9, b"\xEF\xBB\xBFa,b").is_ok_and(|l| l.starts_with('\u{feff}'))
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
        let e = decode_line(path(), 7, 40, b"1,\xC3")
            .err()
            .map(|e| e.to_string());
        assert_eq!(
            e.as_deref(),
            Some("in.txt:7:3: expected UTF-8 text, found byte 0xC3 at byte offset 42")
        );
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
