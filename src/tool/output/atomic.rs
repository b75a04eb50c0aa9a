//! Output files appear whole or not at all: written to a temporary file in the same directory,
//! flushed, then renamed over the target (a rename within one directory is atomic on POSIX file
//! systems). A failure on the way removes the temporary file.

use crate::tool::failure::Failure;
use std::format;
use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::prelude::rust_2024::*;

/// Writes `contents` to `path` atomically.
pub fn write(path: &Path, contents: &[u8]) -> Result<(), Failure> {
    let name = path
        .file_name()
        .ok_or_else(|| Failure::file(path, "expected a file name, found a directory"))?;
    let dir = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let mut temp_name = std::ffi::OsString::from(".");
    temp_name.push(name);
    temp_name.push(format!(".partial-{}", std::process::id()));
    let temp = dir.join(temp_name);
    let result = (|| -> std::io::Result<()> {
        let mut file = fs::File::create(&temp)?;
        file.write_all(contents)?;
        file.sync_all()?;
        fs::rename(&temp, path)
    })();
    if let Err(e) = result {
        let _ = fs::remove_file(&temp);
        return Err(Failure::file(path, format!("could not write: {e}")));
    }
    Ok(())
}

/// A file written in pieces that appears at its path only on [`commit`](Streaming::commit);
/// dropped without a commit (an error on the way), it leaves nothing behind.
pub struct Streaming {
    path: PathBuf,
    temp: PathBuf,
    out: Option<std::io::BufWriter<fs::File>>,
}

impl Streaming {
    pub fn create(path: &Path) -> Result<Streaming, Failure> {
        let name = path
            .file_name()
            .ok_or_else(|| Failure::file(path, "expected a file name, found a directory"))?;
        let dir = match path.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        };
        let mut temp_name = std::ffi::OsString::from(".");
        temp_name.push(name);
        temp_name.push(format!(".partial-{}", std::process::id()));
        let temp = dir.join(temp_name);
        let file = fs::File::create(&temp)
            .map_err(|e| Failure::file(path, format!("could not write: {e}")))?;
        Ok(Streaming {
            path: path.to_path_buf(),
            temp,
            out: Some(std::io::BufWriter::new(file)),
        })
    }

    pub fn write_line(&mut self, line: &str) -> Result<(), Failure> {
        let path = &self.path;
        match &mut self.out {
            Some(out) => writeln!(out, "{line}")
                .map_err(|e| Failure::file(path, format!("could not write: {e}"))),
            None => Err(Failure::file(path, "already closed")),
        }
    }

    pub fn commit(mut self) -> Result<(), Failure> {
        let path = self.path.clone();
        let fail = |e: std::io::Error| Failure::file(&path, format!("could not write: {e}"));
        let out = self
            .out
            .take()
            .ok_or_else(|| Failure::file(&path, "already closed"))?;
        let file = out.into_inner().map_err(|e| fail(e.into_error()))?;
        file.sync_all().map_err(fail)?;
        fs::rename(&self.temp, &self.path).map_err(fail)
    }
}

impl Drop for Streaming {
    fn drop(&mut self) {
        // Still open: the work did not finish, so the partial file goes.
        if self.out.take().is_some() {
            let _ = fs::remove_file(&self.temp);
        }
    }
}
