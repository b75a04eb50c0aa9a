//! Running the built tool as a user runs it, shared by the CLI test files (`tests/cli.rs`,
//! `tests/cli_files.rs`, `tests/cli_messages.rs`): the command, its exit status and output,
//! scratch directories, the files it left, and the one-line failure check.
#![allow(dead_code)]

use serde_json::Value;
use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

/// The invented silo-scale spec of the examples.
pub const SILO_SPEC: &str = "examples/tool/silo_scale.toml";

pub fn repo() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// A two-tap Q15 table (1/2, 1/2), and the flags with which `replay` runs it on 12-bit
/// right-aligned codes in column 2 of a capture.
pub const TAPS: &str = "16384 16384\n";
pub const REPLAY: [&str; 8] = [
    "--taps",
    "taps.txt",
    "--column",
    "2",
    "--adc-bits",
    "12",
    "--align",
    "right",
];

/// `replay CAPTURE` with [`TAPS`] (written as taps.txt) and [`REPLAY`], output to `out`.
pub fn replay_args<'a>(capture: &'a str, out: &'a str) -> Vec<&'a str> {
    let mut args = vec!["replay", capture];
    args.extend_from_slice(&REPLAY);
    args.extend_from_slice(&["--out", out]);
    args
}

pub fn silo_spec_path() -> String {
    repo().join(SILO_SPEC).display().to_string()
}

/// The invented silo capture of the examples (columns `time_s`, `adc_code`).
pub fn silo_capture() -> String {
    repo()
        .join("examples/tool/silo_capture.csv")
        .display()
        .to_string()
}

/// `prepare` of the silo spec and capture (channel `adc_code`, JSON) into `out_dir`, in `dir`.
pub fn prepare_silo(dir: &Path, out_dir: &str, extra: &[&str]) -> Output {
    let (spec, capture) = (silo_spec_path(), silo_capture());
    let mut args = vec![
        "--json",
        "prepare",
        "--spec",
        &spec,
        "--capture",
        &capture,
        "--channels",
        "adc_code",
        "--out-dir",
        out_dir,
    ];
    args.extend_from_slice(extra);
    tool(&args, dir)
}

pub fn tool(args: &[&str], dir: &Path) -> Output {
    let out = Command::new(env!("CARGO_BIN_EXE_tapline"))
        .args(args)
        .current_dir(dir)
        .output();
    match out {
        Ok(out) => out,
        Err(e) => panic!("could not run the tool: {e}"),
    }
}

pub fn status(out: &Output) -> i32 {
    out.status.code().unwrap_or(-1)
}

pub fn stdout(out: &Output) -> String {
    String::from_utf8_lossy(&out.stdout).into_owned()
}

pub fn stderr(out: &Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

pub fn json(out: &Output) -> Value {
    serde_json::from_slice(&out.stdout)
        .unwrap_or_else(|e| panic!("not JSON ({e}): {}", stdout(out)))
}

pub fn scratch() -> tempfile::TempDir {
    tempfile::tempdir().unwrap_or_else(|e| panic!("no temp dir: {e}"))
}

pub fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let path = dir.join(name);
    fs::write(&path, text).unwrap_or_else(|e| panic!("could not write {name}: {e}"));
    path
}

/// The words of a command line written as one string (no quoting: for arguments without
/// spaces).
pub fn words(line: &str) -> Vec<&str> {
    line.split_whitespace().collect()
}

/// The run failed on bad input: exit 2 and exactly one line on stderr that contains `message`.
pub fn assert_bad_input(out: &Output, message: &str, what: &str) {
    assert_eq!(status(out), 2, "{what}: {}", stdout(out));
    let err = stderr(out);
    assert_eq!(err.lines().count(), 1, "{what}: {err}");
    assert!(err.contains(message), "{what}: {err}");
}

/// The directory holds exactly these file names (nothing partial, no temporary files).
pub fn assert_files(dir: &Path, expected: &[&str]) {
    let mut names: Vec<String> = fs::read_dir(dir)
        .unwrap_or_else(|e| panic!("{e}"))
        .filter_map(|e| e.ok())
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    let mut expected: Vec<String> = expected.iter().map(|s| s.to_string()).collect();
    expected.sort();
    assert_eq!(names, expected);
}

/// The invented silo-scale spec of examples/tool/silo_scale.toml as flags, up to --adc-bits
/// (its value and the alignment follow).
pub const SILO_FLAGS: [&str; 13] = [
    "--band",
    "lowpass",
    "--rate",
    "1000",
    "--edges",
    "5,50",
    "--ripple",
    "0.1",
    "--attenuation",
    "60",
    "--format",
    "q15",
    "--adc-bits",
];
