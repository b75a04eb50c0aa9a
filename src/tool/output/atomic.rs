//! All the output files of one command appear together or not at all. Each is first staged:
//! written to a hidden temporary file beside its target (`.NAME.partial-PID`), flushed and
//! synced. Only when every file is staged does [`Outputs::commit`] rename them over their
//! targets (a rename within one directory is atomic on POSIX file systems); if one rename
//! fails, the files this commit already put in place are removed again. A command that fails,
//! or is interrupted (SIGINT, SIGTERM: see [`clean_up_on_interrupt`]), leaves no temporary
//! file and none of the directories it created.
//!
//! No output may replace an input of the same run: a target that is, by device and inode, a
//! file the run opened as an input is refused (see
//! [`replaced_input`](crate::tool::input::file::replaced_input)).
//!
//! What is staged lives in one place per process, so that the interrupt handler, on its own
//! thread, sees exactly what the command's thread has left to undo.

use crate::tool::failure::Failure;
use crate::tool::input::file;
use std::format;
use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::prelude::rust_2024::*;
use std::sync::{Mutex, MutexGuard, PoisonError};

/// One staged file.
struct Staged {
    temp: PathBuf,
    target: PathBuf,
    /// Written, flushed and synced: ready to be renamed.
    ready: bool,
}

/// What this process would have to undo if it stopped now.
struct Pending {
    /// Directories this run created, outermost first.
    created: Vec<PathBuf>,
    staged: Vec<Staged>,
}

impl Pending {
    /// Removes every staged temporary file and every directory this run created (innermost
    /// first, and only while empty: a directory someone else filled meanwhile stays).
    fn undo(&mut self) {
        for s in self.staged.drain(..) {
            let _ = fs::remove_file(&s.temp);
        }
        for dir in self.created.drain(..).rev() {
            let _ = fs::remove_dir(&dir);
        }
    }
}

static PENDING: Mutex<Pending> = Mutex::new(Pending {
    created: Vec::new(),
    staged: Vec::new(),
});

fn pending() -> MutexGuard<'static, Pending> {
    // A panic elsewhere while holding the lock leaves lists that are still right to undo.
    PENDING.lock().unwrap_or_else(PoisonError::into_inner)
}

/// Installs the handler that, on SIGINT or SIGTERM, removes what the running command staged
/// and the directories it created, then exits with 130 (SIGINT) or 143 (SIGTERM), as a shell
/// reports a command ended by those signals. A signal that arrives during a commit waits for
/// it: the command's files are then all in place, never some.
/// Only the first call installs it; later calls do nothing.
pub fn clean_up_on_interrupt() -> Result<(), Failure> {
    use signal_hook::consts::{SIGINT, SIGTERM};
    static INSTALLED: std::sync::atomic::AtomicBool = std::sync::atomic::AtomicBool::new(false);
    if INSTALLED.swap(true, std::sync::atomic::Ordering::SeqCst) {
        return Ok(());
    }
    let mut signals = signal_hook::iterator::Signals::new([SIGINT, SIGTERM])
        .map_err(|e| Failure::plain(format!("could not watch for interrupts: {e}")))?;
    std::thread::Builder::new()
        .name("interrupts".into())
        .spawn(move || {
            if let Some(signal) = signals.forever().next() {
                pending().undo();
                std::process::exit(128 + signal);
            }
        })
        .map_err(|e| Failure::plain(format!("could not watch for interrupts: {e}")))?;
    Ok(())
}

fn could_not_write(path: &Path, e: impl std::fmt::Display) -> Failure {
    Failure::file(path, format!("could not write: {e}"))
}

/// The output files of one command, staged and then committed together. Dropped without a
/// [`commit`](Outputs::commit) (the command failed), it takes away everything it staged and
/// every directory it created.
pub struct Outputs {
    /// Created, with its missing parents, when the first file is staged.
    dir: Option<PathBuf>,
}

impl Outputs {
    /// Outputs that go where their paths say (the directories must exist).
    pub fn new() -> Outputs {
        Outputs { dir: None }
    }

    /// Outputs that go into `dir`, created (with any missing parents) only when the first file
    /// is staged, so that a command refusing its inputs creates nothing. `flag` names the
    /// option that gave `dir`, for the message when it is a file.
    pub fn in_directory(dir: &Path, flag: &str) -> Result<Outputs, Failure> {
        if dir.exists() && !dir.is_dir() {
            return Err(Failure::argument(
                flag,
                format!("expected a directory, found a file: {}", dir.display()),
            ));
        }
        Ok(Outputs {
            dir: Some(dir.to_path_buf()),
        })
    }

    /// Refuses `target` if writing it would replace an input of this run.
    pub fn check(&self, target: &Path) -> Result<(), Failure> {
        match file::replaced_input(target) {
            Some(input) if input.as_path() == target => Err(Failure::file(
                target,
                "is an input of this command: expected an output file that is not an input",
            )),
            Some(input) => Err(Failure::file(
                target,
                format!(
                    "is the same file as the input {} (a link or another name for it): expected an output file that is not an input",
                    input.display()
                ),
            )),
            None => Ok(()),
        }
    }

    /// Creates the directory (and its missing parents), each one remembered before it is made
    /// so that an interrupt in between still finds it.
    fn make_directory(&mut self) -> Result<(), Failure> {
        let Some(dir) = self.dir.take() else {
            return Ok(());
        };
        let missing: Vec<&Path> = dir
            .ancestors()
            .filter(|p| !p.as_os_str().is_empty())
            .take_while(|p| !p.exists())
            .collect();
        for path in missing.into_iter().rev() {
            let mut p = pending();
            p.created.push(path.to_path_buf());
            if let Err(e) = fs::create_dir(path) {
                p.created.pop();
                return Err(Failure::file(
                    path,
                    format!("could not create the directory: {e}"),
                ));
            }
        }
        Ok(())
    }

    /// Stages `target`: checks it, creates its temporary file (registered before it exists)
    /// and returns the file and its index among the staged.
    fn stage(&mut self, target: &Path) -> Result<(fs::File, usize), Failure> {
        self.check(target)?;
        let temp = hidden(target, "partial")?;
        self.make_directory()?;
        let mut p = pending();
        p.staged.push(Staged {
            temp: temp.clone(),
            target: target.to_path_buf(),
            ready: false,
        });
        match fs::File::create(&temp) {
            Ok(f) => Ok((f, p.staged.len() - 1)),
            Err(e) => {
                p.staged.pop();
                Err(could_not_write(target, e))
            }
        }
    }

    /// Stages `contents` as the whole of `target`.
    pub fn write(&mut self, target: &Path, contents: &[u8]) -> Result<(), Failure> {
        let (mut file, index) = self.stage(target)?;
        file.write_all(contents)
            .and_then(|()| file.sync_all())
            .map_err(|e| could_not_write(target, e))?;
        mark_ready(index);
        Ok(())
    }

    /// Stages `target` to be written in pieces ([`Streaming::write_line`]) and then
    /// [`finish`](Outputs::finish)ed.
    pub fn stream(&mut self, target: &Path) -> Result<Streaming, Failure> {
        let (file, index) = self.stage(target)?;
        Ok(Streaming {
            target: target.to_path_buf(),
            out: std::io::BufWriter::with_capacity(1 << 16, file),
            index,
        })
    }

    /// Flushes and syncs a streamed file: it is then staged like the others.
    pub fn finish(&mut self, streaming: Streaming) -> Result<(), Failure> {
        let Streaming { target, out, index } = streaming;
        let file = out
            .into_inner()
            .map_err(|e| could_not_write(&target, e.into_error()))?;
        file.sync_all().map_err(|e| could_not_write(&target, e))?;
        mark_ready(index);
        Ok(())
    }

    /// Renames every staged file over its target, all under the lock the interrupt handler
    /// takes. A file a target replaces is first kept under a second name (a hard link,
    /// `.NAME.previous-PID`); if one rename fails, the targets this commit already renamed are
    /// put back as they were (the kept file, or nothing), and the rest unstaged, so that the
    /// directory holds what it held before. (Where hard links are not supported, a replaced
    /// file cannot be kept, and a failed commit only removes this run's files.)
    pub fn commit(self) -> Result<(), Failure> {
        let mut p = pending();
        if let Some(s) = p.staged.iter().find(|s| !s.ready) {
            return Err(could_not_write(&s.target, "not finished"));
        }
        let staged = std::mem::take(&mut p.staged);
        let kept: Vec<Option<PathBuf>> = staged
            .iter()
            .map(|s| {
                let previous = hidden(&s.target, "previous").ok()?;
                let _ = fs::remove_file(&previous);
                fs::hard_link(&s.target, &previous).ok().map(|()| previous)
            })
            .collect();
        for (k, s) in staged.iter().enumerate() {
            if let Err(e) = fs::rename(&s.temp, &s.target) {
                let failure = could_not_write(&s.target, e);
                for (done, previous) in staged.iter().zip(&kept).take(k) {
                    match previous {
                        Some(previous) => {
                            let _ = fs::rename(previous, &done.target);
                        }
                        None => {
                            let _ = fs::remove_file(&done.target);
                        }
                    }
                }
                for previous in kept.iter().skip(k).flatten() {
                    let _ = fs::remove_file(previous);
                }
                p.staged = staged.into_iter().skip(k).collect();
                p.undo();
                return Err(failure);
            }
        }
        for previous in kept.iter().flatten() {
            let _ = fs::remove_file(previous);
        }
        // Everything is in place: the directories made for it stay.
        p.created.clear();
        Ok(())
    }
}

impl Default for Outputs {
    fn default() -> Outputs {
        Outputs::new()
    }
}

impl Drop for Outputs {
    fn drop(&mut self) {
        // Committed: nothing is left to undo. Otherwise the command failed.
        pending().undo();
    }
}

/// The hidden name beside `target` that this process uses for it: `.NAME.TAG-PID`.
fn hidden(target: &Path, tag: &str) -> Result<PathBuf, Failure> {
    let name = target
        .file_name()
        .ok_or_else(|| Failure::file(target, "expected a file name, found a directory"))?;
    let dir = match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let mut hidden = std::ffi::OsString::from(".");
    hidden.push(name);
    hidden.push(format!(".{tag}-{}", std::process::id()));
    Ok(dir.join(hidden))
}

fn mark_ready(index: usize) {
    if let Some(s) = pending().staged.get_mut(index) {
        s.ready = true;
    }
}

/// A staged file written in pieces. It stays hidden until its [`Outputs`] commits; if the
/// command fails first, the file goes with the rest of the staged outputs.
pub struct Streaming {
    target: PathBuf,
    out: std::io::BufWriter<fs::File>,
    index: usize,
}

impl Streaming {
    pub fn write_line(&mut self, line: &str) -> Result<(), Failure> {
        writeln!(self.out, "{line}").map_err(|e| could_not_write(&self.target, e))
    }
}

/// Writes `contents` to `path` as a command's one output: staged, then committed.
pub fn write(path: &Path, contents: &[u8]) -> Result<(), Failure> {
    let mut outputs = Outputs::new();
    outputs.write(path, contents)?;
    outputs.commit()
}
