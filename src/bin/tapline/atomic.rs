//! Output files appear whole or not at all: written to a temporary file in the same directory,
//! flushed, then renamed over the target (a rename within one directory is atomic on POSIX file
//! systems). A failure on the way removes the temporary file.

use crate::failure::Failure;
use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};

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
