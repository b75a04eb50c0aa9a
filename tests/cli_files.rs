//! The host tool never loses or half-writes a file, and reads its inputs bounded (issue 15,
//! points 2, 3, 4 and 10): no output replaces an input; the outputs of one command appear
//! together or not at all, also when a rename fails or the run is interrupted; directories the
//! run created go again on failure; inputs that are not regular files, or lines beyond 64 KiB,
//! are refused before any output exists; `prepare --filtered` thins or skips filtered.csv.
//! Built with `--features cli`; Unix only (FIFOs, links, signals).

mod tool_run;

use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Output, Stdio};
use std::time::{Duration, Instant};
use tool_run::*;

const CAPTURE: &str = "0,1\n1,-7\n2,300\n3,-2048\n4,2047\n";

fn replay_dir() -> tempfile::TempDir {
    let dir = scratch();
    write(dir.path(), "taps.txt", TAPS);
    write(dir.path(), "capture.csv", CAPTURE);
    dir
}

fn read(path: &Path) -> String {
    fs::read_to_string(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

/// Runs the tool but gives up after `seconds` (a FIFO that hangs it, an input it reads without
/// end): None then, the process killed.
fn tool_within(args: &[&str], dir: &Path, seconds: u64) -> Option<Output> {
    let mut child = spawn(args, dir);
    let deadline = Instant::now() + Duration::from_secs(seconds);
    while Instant::now() < deadline {
        match child.try_wait() {
            Ok(Some(_)) => return child.wait_with_output().ok(),
            Ok(None) => std::thread::sleep(Duration::from_millis(20)),
            Err(e) => panic!("{e}"),
        }
    }
    let _ = child.kill();
    let _ = child.wait();
    None
}

fn spawn(args: &[&str], dir: &Path) -> Child {
    Command::new(env!("CARGO_BIN_EXE_tapline"))
        .args(args)
        .current_dir(dir)
        .stdin(Stdio::null())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap_or_else(|e| panic!("could not run the tool: {e}"))
}

fn mkfifo(path: &Path) {
    let made = Command::new("mkfifo").arg(path).status();
    assert!(matches!(made, Ok(s) if s.success()), "mkfifo {made:?}");
}

// ---- point 2: no output replaces an input ----------------------------------------------------

#[test]
fn replay_refuses_an_output_that_is_its_capture_by_any_name() {
    let dir = replay_dir();
    let d = dir.path();
    fs::hard_link(d.join("capture.csv"), d.join("hard.csv")).unwrap_or_else(|e| panic!("{e}"));
    std::os::unix::fs::symlink("capture.csv", d.join("soft.csv")).unwrap_or_else(|e| panic!("{e}"));
    fs::create_dir(d.join("sub")).unwrap_or_else(|e| panic!("{e}"));
    let cases = [
        ("capture.csv", "capture.csv"),
        ("capture.csv", "./capture.csv"),
        ("capture.csv", "sub/../capture.csv"),
        ("capture.csv", "hard.csv"),
        ("capture.csv", "soft.csv"),
        ("soft.csv", "capture.csv"),
        // The tap table is an input too.
        ("capture.csv", "taps.txt"),
    ];
    for (capture, out) in cases {
        let run = tool(&replay_args(capture, out), d);
        let what = format!("replay {capture} --out {out}");
        assert_bad_input(&run, "expected an output file that is not an input", &what);
        assert!(stderr(&run).contains(out), "{what}: {}", stderr(&run));
        assert_eq!(read(&d.join("capture.csv")), CAPTURE, "{what}");
        assert_eq!(read(&d.join("taps.txt")), TAPS, "{what}");
        assert_files(
            d,
            &["capture.csv", "hard.csv", "soft.csv", "sub", "taps.txt"],
        );
    }
    // A new file beside them is still fine.
    let run = tool(&replay_args("capture.csv", "new.csv"), d);
    assert_eq!(status(&run), 0, "{}", stderr(&run));
    assert_eq!(read(&d.join("new.csv")).lines().count(), 6);
}

#[test]
fn prepare_and_emit_refuse_to_replace_their_inputs() {
    let dir = scratch();
    let d = dir.path();
    let capture = fs::read(silo_capture()).unwrap_or_else(|e| panic!("{e}"));
    fs::create_dir(d.join("job")).unwrap_or_else(|e| panic!("{e}"));
    fs::write(d.join("job/filtered.csv"), &capture).unwrap_or_else(|e| panic!("{e}"));
    let spec = silo_spec_path();
    let run = tool(
        &[
            "prepare",
            "--spec",
            &spec,
            "--capture",
            "job/filtered.csv",
            "--channels",
            "adc_code",
            "--out-dir",
            "job",
        ],
        d,
    );
    assert_bad_input(
        &run,
        "expected an output file that is not an input",
        "prepare",
    );
    assert_eq!(fs::read(d.join("job/filtered.csv")).ok(), Some(capture));
    assert_files(&d.join("job"), &["filtered.csv"]);

    // The spec, linked as the file emit would write.
    fs::copy(repo().join(SILO_SPEC), d.join("spec.toml")).unwrap_or_else(|e| panic!("{e}"));
    fs::hard_link(d.join("spec.toml"), d.join("taps.rs")).unwrap_or_else(|e| panic!("{e}"));
    let before = read(&d.join("spec.toml"));
    let run = tool(&["emit", "--spec", "spec.toml", "--out", "taps.rs"], d);
    assert_bad_input(&run, "the same file as the input spec.toml", "emit");
    assert_eq!(read(&d.join("spec.toml")), before);
    assert_files(d, &["job", "spec.toml", "taps.rs"]);
}

// ---- point 3: together or not at all ---------------------------------------------------------

#[test]
fn prepare_writes_all_four_files_or_none() {
    let dir = scratch();
    let d = dir.path();
    // report.txt cannot be renamed into place: a directory holds its name.
    fs::create_dir_all(d.join("job/report.txt")).unwrap_or_else(|e| panic!("{e}"));
    let run = prepare_silo(d, "job", &[]);
    assert_bad_input(&run, "report.txt: could not write", "prepare");
    assert_files(&d.join("job"), &["report.txt"]);
    assert_files(&d.join("job/report.txt"), &[]);

    // Over the files of an earlier run: a failed commit leaves them as they were.
    let first = prepare_silo(d, "again", &["--name", "FIRST"]);
    assert_eq!(status(&first), 0, "{}", stderr(&first));
    let job = d.join("again");
    let before: Vec<Vec<u8>> = ["filtered.csv", "response.svg", "taps.rs"]
        .iter()
        .map(|f| fs::read(job.join(f)).unwrap_or_default())
        .collect();
    assert!(String::from_utf8_lossy(&before[2]).contains("FIRST"));
    fs::remove_file(job.join("report.txt")).unwrap_or_else(|e| panic!("{e}"));
    fs::create_dir(job.join("report.txt")).unwrap_or_else(|e| panic!("{e}"));
    // Every other row, so that filtered.csv would differ too.
    let run = prepare_silo(d, "again", &["--name", "SECOND", "--filtered", "every=2"]);
    assert_bad_input(&run, "report.txt: could not write", "prepare again");
    assert_files(
        &job,
        &["filtered.csv", "report.txt", "response.svg", "taps.rs"],
    );
    let after: Vec<Vec<u8>> = ["filtered.csv", "response.svg", "taps.rs"]
        .iter()
        .map(|f| fs::read(job.join(f)).unwrap_or_default())
        .collect();
    assert!(after == before, "the earlier run's files changed");
}

#[test]
fn a_failed_final_rename_leaves_no_partial_file() {
    let dir = replay_dir();
    let d = dir.path();
    fs::create_dir(d.join("taken")).unwrap_or_else(|e| panic!("{e}"));
    let run = tool(&replay_args("capture.csv", "taken"), d);
    assert_bad_input(&run, "taken: could not write", "replay --out a directory");
    assert_files(d, &["capture.csv", "taken", "taps.txt"]);
    assert_files(&d.join("taken"), &[]);
}

#[test]
fn a_bad_capture_leaves_none_of_the_directories_prepare_made() {
    let spec = silo_spec_path();
    // Refused at the header (before any output), and at row 3 (while filtered.csv streams).
    let cases = [
        ("time_s,load\n0,1\n", "expected a column named \"adc_code\""),
        (
            "time_s,adc_code\n0,1\n0.001,2\n0.002,5000\n",
            "bad.csv:4:7: expected a sample code in -2048..=2047",
        ),
    ];
    for (text, message) in cases {
        let dir = scratch();
        let d = dir.path();
        write(d, "bad.csv", text);
        fs::create_dir(d.join("kept")).unwrap_or_else(|e| panic!("{e}"));
        for out_dir in ["a/b/c/job", "kept/x/y"] {
            let run = tool(
                &[
                    "prepare",
                    "--spec",
                    &spec,
                    "--capture",
                    "bad.csv",
                    "--channels",
                    "adc_code",
                    "--out-dir",
                    out_dir,
                ],
                d,
            );
            assert_bad_input(&run, message, out_dir);
            assert_files(d, &["bad.csv", "kept"]);
            // A directory that was there before stays.
            assert_files(&d.join("kept"), &[]);
        }
    }
}

/// A capture long enough that the tool is still writing when the signal comes.
fn big_capture(path: &Path, rows: usize, header: bool) {
    let mut text = String::with_capacity(rows * 12);
    if header {
        text.push_str("time_s,adc_code\n");
    }
    for i in 0..rows {
        let code = (i * 37 % 4000) as i64 - 2000;
        text.push_str(&format!("{i},{code}\n"));
    }
    fs::write(path, text).unwrap_or_else(|e| panic!("{e}"));
}

/// The hidden partial files in `dir` (and its size so far), if any is there and not empty.
fn partial_in(dir: &Path) -> Option<(PathBuf, u64)> {
    fs::read_dir(dir)
        .ok()?
        .filter_map(|e| e.ok())
        .find_map(|e| {
            let name = e.file_name().to_string_lossy().into_owned();
            let size = e.metadata().map(|m| m.len()).unwrap_or(0);
            (name.starts_with('.') && name.contains(".partial-") && size > 0)
                .then(|| (e.path(), size))
        })
}

/// Starts the tool, waits until a partial file in `watch` has data, sends `signal`, and
/// returns the exit code.
fn interrupt(args: &[&str], dir: &Path, watch: &Path, signal: &str) -> Option<i32> {
    let mut child = spawn(args, dir);
    let deadline = Instant::now() + Duration::from_secs(120);
    let mut started = false;
    while Instant::now() < deadline {
        if let Ok(Some(status)) = child.try_wait() {
            let out = child.wait_with_output().ok();
            panic!(
                "the tool ended ({status}) before it was interrupted: {:?}",
                out.map(|o| stderr(&o))
            );
        }
        if partial_in(watch).is_some() {
            started = true;
            break;
        }
        std::thread::sleep(Duration::from_millis(5));
    }
    assert!(started, "no partial file appeared in {}", watch.display());
    let pid = child.id().to_string();
    let sent = Command::new("kill").args([signal, &pid]).status();
    assert!(
        matches!(sent, Ok(s) if s.success()),
        "kill {signal}: {sent:?}"
    );
    let status = child.wait().unwrap_or_else(|e| panic!("{e}"));
    status.code()
}

#[test]
fn an_interrupted_replay_or_prepare_leaves_nothing_and_exits_130_or_143() {
    let dir = scratch();
    let d = dir.path();
    write(d, "taps.txt", TAPS);
    big_capture(&d.join("big.csv"), 3_000_000, false);
    big_capture(&d.join("big_named.csv"), 3_000_000, true);
    for (signal, code) in [("-INT", 130), ("-TERM", 143)] {
        let exit = interrupt(&replay_args("big.csv", "out.csv"), d, d, signal);
        assert_eq!(exit, Some(code), "replay, kill {signal}");
        assert_files(d, &["big.csv", "big_named.csv", "taps.txt"]);

        let spec = silo_spec_path();
        let args = [
            "prepare",
            "--spec",
            &spec,
            "--capture",
            "big_named.csv",
            "--channels",
            "adc_code",
            "--out-dir",
            "new/job",
        ];
        // The directory appears only once the run writes: wait for it, then for the file.
        let exit = interrupt(&args, d, &d.join("new/job"), signal);
        assert_eq!(exit, Some(code), "prepare, kill {signal}");
        assert_files(d, &["big.csv", "big_named.csv", "taps.txt"]);
    }
}

// ---- point 4: bounded input, checked before any output ---------------------------------------

#[test]
fn inputs_that_are_not_regular_files_are_refused_before_any_output() {
    let dir = scratch();
    let d = dir.path();
    write(d, "taps.txt", TAPS);
    write(d, "capture.csv", CAPTURE);
    fs::create_dir(d.join("folder")).unwrap_or_else(|e| panic!("{e}"));
    mkfifo(&d.join("pipe"));
    let listing = ["capture.csv", "folder", "pipe", "taps.txt"];
    let spec = silo_spec_path();
    let cases: [(&str, &str, &str); 3] = [
        ("folder", "folder: is a directory", "a directory"),
        ("pipe", "pipe: is not a regular file (a FIFO)", "a FIFO"),
        (
            "/dev/zero",
            "/dev/zero: is not a regular file (a device)",
            "a device",
        ),
    ];
    for (input, message, what) in cases {
        let Some(run) = tool_within(&replay_args(input, "out.csv"), d, 20) else {
            panic!("replay of {what} did not end within 20 s");
        };
        assert_bad_input(&run, message, &format!("replay of {what}"));
        assert_files(d, &listing);

        let args = [
            "prepare",
            "--spec",
            &spec,
            "--capture",
            input,
            "--column",
            "2",
            "--out-dir",
            "job",
        ];
        let Some(run) = tool_within(&args, d, 20) else {
            panic!("prepare of {what} did not end within 20 s");
        };
        assert_bad_input(&run, message, &format!("prepare of {what}"));
        // Not even the output directory.
        assert_files(d, &listing);

        // A tap table or a spec that is no regular file: the same.
        let mut args = replay_args("capture.csv", "out.csv");
        args[3] = input;
        let Some(run) = tool_within(&args, d, 20) else {
            panic!("a tap table that is {what} did not end within 20 s");
        };
        assert_bad_input(&run, message, &format!("a tap table that is {what}"));
        let Some(run) = tool_within(&["design", "--spec", input], d, 20) else {
            panic!("a spec that is {what} did not end within 20 s");
        };
        assert_bad_input(&run, message, &format!("a spec that is {what}"));
        assert_files(d, &listing);
    }
}

#[test]
fn a_line_beyond_64_kib_is_refused_with_its_file_and_line() {
    let dir = replay_dir();
    let d = dir.path();
    // Line 2 holds exactly 65536 bytes (a comment: skipped); line 4 one byte more.
    let at_limit = format!("#{}\n", "x".repeat(65535));
    let beyond = format!("5,{}\n", "7".repeat(65535));
    write(d, "long.csv", &format!("0,1\n{at_limit}1,2\n{beyond}6,1\n"));
    let run = tool(&replay_args("long.csv", "out.csv"), d);
    assert_bad_input(
        &run,
        "long.csv:4:1: expected a line of at most 65536 bytes",
        "capture",
    );
    // A line of 2 MiB without a break: refused as soon as 64 KiB are read.
    write(d, "endless.csv", &format!("0,1\n{}", "1".repeat(2 << 20)));
    let run = tool(&replay_args("endless.csv", "out.csv"), d);
    assert_bad_input(
        &run,
        "endless.csv:2:1: expected a line of at most 65536 bytes",
        "capture without a break",
    );
    // The limit holds at exactly 65536 bytes.
    write(d, "fits.csv", &format!("0,1\n{at_limit}1,2\n"));
    let run = tool(&replay_args("fits.csv", "out.csv"), d);
    assert_eq!(status(&run), 0, "{}", stderr(&run));
    fs::remove_file(d.join("out.csv")).unwrap_or_else(|e| panic!("{e}"));

    // Tap tables and specs, read whole, are bounded the same way.
    write(
        d,
        "long_taps.txt",
        &format!("16384\n{}\n", "1".repeat(70_000)),
    );
    let mut args = replay_args("capture.csv", "out.csv");
    args[3] = "long_taps.txt";
    let run = tool(&args, d);
    assert_bad_input(
        &run,
        "long_taps.txt:2:1: expected a line of at most 65536 bytes",
        "tap table",
    );
    write(
        d,
        "long.toml",
        &format!("band = \"lowpass\"\n# {}\n", "y".repeat(70_000)),
    );
    let run = tool(&["design", "--spec", "long.toml"], d);
    assert_bad_input(
        &run,
        "long.toml:2:1: expected a line of at most 65536 bytes",
        "spec",
    );
    assert_files(
        d,
        &[
            "capture.csv",
            "endless.csv",
            "fits.csv",
            "long.csv",
            "long.toml",
            "long_taps.txt",
            "taps.txt",
        ],
    );
}

// ---- point 10: prepare can thin or skip filtered.csv -----------------------------------------

/// The rows of a filtered.csv: the sample index and the error (last column).
fn rows(text: &str) -> Vec<(u64, f64, String)> {
    text.lines()
        .skip(1)
        .map(|l| {
            let fields: Vec<&str> = l.split(',').collect();
            let index = fields.first().and_then(|f| f.parse().ok());
            let error = fields.last().and_then(|f| f.parse().ok());
            match (index, error) {
                (Some(i), Some(e)) => (i, e, l.to_string()),
                _ => panic!("bad row {l:?}"),
            }
        })
        .collect()
}

#[test]
fn prepare_can_skip_or_thin_filtered_csv() {
    let dir = scratch();
    let d = dir.path();
    let all = prepare_silo(d, "all", &[]);
    assert_eq!(status(&all), 0, "{}", stderr(&all));
    let full = read(&d.join("all/filtered.csv"));
    let every = rows(&full);
    assert_eq!(every.len(), 2000);

    // None: three files, the report says why, the figures are those of the full run.
    let none = prepare_silo(d, "none", &["--filtered", "none"]);
    assert_eq!(status(&none), 0, "{}", stderr(&none));
    assert_files(&d.join("none"), &["report.txt", "response.svg", "taps.rs"]);
    assert!(read(&d.join("none/report.txt")).contains("filtered.csv not written"));
    let (a, n) = (json(&all), json(&none));
    assert_eq!(a["replay"]["channels"], n["replay"]["channels"]);
    assert_eq!(n["replay"]["samples"], 2000);
    assert!(n["files"].get("filtered.csv").is_none(), "{}", n["files"]);

    // One row in 7: samples 0, 7, 14, ..., each as the full file has it.
    let thin = prepare_silo(d, "thin", &["--filtered", "every=7"]);
    assert_eq!(status(&thin), 0, "{}", stderr(&thin));
    let text = read(&d.join("thin/filtered.csv"));
    assert_eq!(text.lines().next(), full.lines().next(), "header");
    let expected: Vec<&(u64, f64, String)> = every.iter().filter(|r| r.0 % 7 == 0).collect();
    let got = rows(&text);
    assert_eq!(got.len(), 286);
    assert_eq!(got.iter().collect::<Vec<_>>(), expected);
    assert_eq!(json(&thin)["replay"]["channels"], a["replay"]["channels"]);
    assert!(read(&d.join("thin/report.txt")).contains("1 row in 7"));

    // Only the rows whose error exceeds 0.4 LSB: exactly those of the full file.
    let above = prepare_silo(d, "above", &["--filtered", "error-above=0.4"]);
    assert_eq!(status(&above), 0, "{}", stderr(&above));
    let got = rows(&read(&d.join("above/filtered.csv")));
    let expected: Vec<&(u64, f64, String)> = every.iter().filter(|r| r.1.abs() > 0.4).collect();
    assert!(!expected.is_empty() && expected.len() < every.len());
    assert_eq!(got.iter().collect::<Vec<_>>(), expected);

    for bad in ["every=0", "every=x", "error-above=-1", "some"] {
        let run = prepare_silo(d, "bad", &["--filtered", bad]);
        assert_eq!(status(&run), 2, "--filtered {bad}");
        assert!(!d.join("bad").exists(), "--filtered {bad}");
    }
    // Documented in the help.
    let help = stdout(&tool(&["prepare", "--help"], d));
    assert!(help.contains("--filtered"), "{help}");
    assert!(help.contains("error-above=E"), "{help}");
}
