//! Opening and reading the tool's input files, bounded: every input must be a regular file
//! (a directory, FIFO, device or socket is refused by name, and is opened without blocking so a
//! FIFO with no writer cannot hang the tool), no line may exceed [`MAX_LINE_BYTES`], and a file
//! read whole (spec, tap table) may not exceed [`MAX_TEXT_BYTES`]. Each input opened is
//! remembered by device and inode, so that no output of the same run can replace it
//! ([`replaced_input`]), whatever name or link the output is given.
//!
//! Decoding the bytes into text is not done here; this module only opens and reads.

#[cfg(not(unix))]
compile_error!(
    "the tapline host tool (feature `cli`) builds on Unix only: it opens inputs with O_NONBLOCK, \
     compares files by device and inode, and cleans up on SIGINT/SIGTERM"
);

use crate::tool::failure::Failure;
use std::format;
use std::fs::{File, Metadata, OpenOptions};
use std::io::{BufRead, Read};
use std::os::unix::fs::{FileTypeExt, MetadataExt, OpenOptionsExt};
use std::path::{Path, PathBuf};
use std::prelude::rust_2024::*;
use std::sync::{Mutex, PoisonError};

/// The longest line any input may hold, line break excluded: far beyond any capture row, spec
/// line or tap table line, and small enough that a file without line breaks (`/dev/zero`
/// copied to a file, a binary) is refused after 64 KiB instead of being read whole.
pub const MAX_LINE_BYTES: usize = 64 * 1024;

/// The largest spec or tap table (files read whole): the longest table the tool runs is 4096
/// taps, a few tens of KiB as text.
pub const MAX_TEXT_BYTES: u64 = 16 * 1024 * 1024;

/// Which file a path names, links followed: two paths name the same file exactly when their
/// identities are equal (hard links, symbolic links, `./x` and `x` alike).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Identity {
    device: u64,
    inode: u64,
}

impl Identity {
    fn of(metadata: &Metadata) -> Identity {
        Identity {
            device: metadata.dev(),
            inode: metadata.ino(),
        }
    }
}

/// The identity of the file at `path` (links followed), or None when there is none.
pub fn identity(path: &Path) -> Option<Identity> {
    std::fs::metadata(path).ok().map(|m| Identity::of(&m))
}

/// Every input this process opened, by identity (each once), with the path it was opened by.
static OPENED: Mutex<Vec<(Identity, PathBuf)>> = Mutex::new(Vec::new());

fn remember(identity: Identity, path: &Path) {
    let mut opened = OPENED.lock().unwrap_or_else(PoisonError::into_inner);
    if !opened.iter().any(|(i, _)| *i == identity) {
        opened.push((identity, path.to_path_buf()));
    }
}

/// The path of the input that writing `target` would replace, if any: `target` names a file
/// this process opened as an input.
pub fn replaced_input(target: &Path) -> Option<PathBuf> {
    let identity = identity(target)?;
    let opened = OPENED.lock().unwrap_or_else(PoisonError::into_inner);
    opened
        .iter()
        .find(|(i, _)| *i == identity)
        .map(|(_, p)| p.clone())
}

/// Opens an input for reading: a regular file, or a one-line failure naming what it is instead.
/// O_NONBLOCK makes opening a FIFO return at once even with no writer (and changes nothing
/// for a regular file), so the check below is reached.
pub fn open(path: &Path) -> Result<File, Failure> {
    let file = OpenOptions::new()
        .read(true)
        .custom_flags(libc::O_NONBLOCK)
        .open(path)
        .map_err(|e| Failure::file(path, format!("could not read: {e}")))?;
    let metadata = file
        .metadata()
        .map_err(|e| Failure::file(path, format!("could not read: {e}")))?;
    let kind = metadata.file_type();
    let what = if kind.is_file() {
        remember(Identity::of(&metadata), path);
        return Ok(file);
    } else if kind.is_dir() {
        "is a directory, expected a regular file"
    } else if kind.is_fifo() {
        "is not a regular file (a FIFO): expected a file on disk"
    } else if kind.is_char_device() || kind.is_block_device() {
        "is not a regular file (a device): expected a file on disk"
    } else if kind.is_socket() {
        "is not a regular file (a socket): expected a file on disk"
    } else {
        "is not a regular file: expected a file on disk"
    };
    Err(Failure::file(path, what))
}

/// The failure for line `line` of `path` being longer than [`MAX_LINE_BYTES`].
fn too_long(path: &Path, line: usize) -> Failure {
    Failure::at(
        path,
        line,
        1,
        format!(
            "expected a line of at most {MAX_LINE_BYTES} bytes, found a longer one (is this a text file?)"
        ),
    )
}

/// Appends the next line of `reader` to `buf`, its line break included, and returns the bytes
/// read (0 at the end). `line` is its 1-based number, for the failure when it is longer than
/// [`MAX_LINE_BYTES`]: at most that many bytes (and the break) are read, whatever follows.
pub fn read_line(
    reader: &mut impl BufRead,
    buf: &mut Vec<u8>,
    path: &Path,
    line: usize,
) -> Result<usize, Failure> {
    let before = buf.len();
    // One byte for the break, one more to tell "\r\n" at the limit from a longer line.
    let limit = MAX_LINE_BYTES as u64 + 2;
    let read = reader
        .by_ref()
        .take(limit)
        .read_until(b'\n', buf)
        .map_err(|e| Failure::at(path, line, 1, format!("could not read: {e}")))?;
    let got = buf.get(before..).unwrap_or(&[]);
    let content = got
        .strip_suffix(b"\n")
        .map(|l| l.strip_suffix(b"\r").unwrap_or(l))
        .unwrap_or(got);
    if content.len() > MAX_LINE_BYTES {
        return Err(too_long(path, line));
    }
    Ok(read)
}

/// The whole of a small input (spec, tap table) as bytes, after the checks of [`open`], with
/// its size bounded by [`MAX_TEXT_BYTES`] and each line by [`MAX_LINE_BYTES`].
pub fn read_bytes(path: &Path) -> Result<Vec<u8>, Failure> {
    let file = open(path)?;
    let mut bytes = Vec::new();
    file.take(MAX_TEXT_BYTES + 1)
        .read_to_end(&mut bytes)
        .map_err(|e| Failure::file(path, format!("could not read: {e}")))?;
    if bytes.len() as u64 > MAX_TEXT_BYTES {
        return Err(Failure::file(
            path,
            format!("expected a file of at most {MAX_TEXT_BYTES} bytes, found a larger one"),
        ));
    }
    if let Some(index) = bytes
        .split(|&b| b == b'\n')
        .position(|l| l.strip_suffix(b"\r").unwrap_or(l).len() > MAX_LINE_BYTES)
    {
        return Err(too_long(path, index + 1));
    }
    Ok(bytes)
}

/// The whole of a small input as text: [`read_bytes`], then the one decoding of
/// `text::decode` (UTF-8 byte-order mark dropped, UTF-16
/// refused by name, a byte that is not text refused at its line, column and byte offset).
pub fn read_text(path: &Path) -> Result<String, Failure> {
    crate::tool::input::text::decode(path, read_bytes(path)?)
}
