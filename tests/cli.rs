//! The host tool, run as a user runs it: good and bad inputs, exit statuses, text and JSON
//! output, and files that appear whole or not at all. Built with `--features cli`.
//!
//! Expected figures are worked out here from the definitions (products of extreme codes and
//! taps), not copied from the tool's output.

use serde_json::Value;
use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn tool(args: &[&str], dir: &Path) -> Output {
    let out = Command::new(env!("CARGO_BIN_EXE_tapline"))
        .args(args)
        .current_dir(dir)
        .output();
    match out {
        Ok(out) => out,
        Err(e) => panic!("could not run the tool: {e}"),
    }
}

fn status(out: &Output) -> i32 {
    out.status.code().unwrap_or(-1)
}

fn stdout(out: &Output) -> String {
    String::from_utf8_lossy(&out.stdout).into_owned()
}

fn stderr(out: &Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

fn json(out: &Output) -> Value {
    serde_json::from_slice(&out.stdout)
        .unwrap_or_else(|e| panic!("not JSON ({e}): {}", stdout(out)))
}

fn scratch() -> tempfile::TempDir {
    tempfile::tempdir().unwrap_or_else(|e| panic!("no temp dir: {e}"))
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let path = dir.join(name);
    fs::write(&path, text).unwrap_or_else(|e| panic!("could not write {name}: {e}"));
    path
}

/// The directory holds exactly these file names (nothing partial, no temporary files).
fn assert_files(dir: &Path, expected: &[&str]) {
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

#[test]
fn check_smoother_on_a_12_bit_adc_is_safe() {
    let dir = scratch();
    write(
        dir.path(),
        "smooth.txt",
        "# 1/4 1/2 1/4\n8192\n16384\n8192\n",
    );
    let out = tool(
        &[
            "--json",
            "check",
            "smooth.txt",
            "--adc-bits",
            "12",
            "--align",
            "left",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    let h = &v["headroom"];
    // 12-bit left-aligned codes: -32768..=32752 (step 16). Taps all positive, Σ = 32768.
    assert_eq!(h["input_min"], -32768);
    assert_eq!(h["input_max"], 32752);
    assert_eq!(h["accumulator_min"], -32768i64 * 32768);
    assert_eq!(h["accumulator_max"], 32752i64 * 32768);
    assert_eq!(h["accumulator_bits"], 31);
    assert_eq!(h["guard_bits"], 0);
    assert_eq!(h["output_can_saturate"], false);
    assert_eq!(v["safe"], true);

    let text = tool(&["check", "smooth.txt", "--adc-bits", "12"], dir.path());
    assert_eq!(status(&text), 0);
    assert!(stdout(&text).contains("verdict: SAFE"), "{}", stdout(&text));
}

#[test]
fn check_loud_table_can_overflow_and_writes_the_worst_case() {
    let dir = scratch();
    // Σ|h| = 70000/32768 ≈ 2.1 on full-scale input: the output can leave the 16-bit word.
    write(dir.path(), "loud.csv", "20000, 20000, -30000\n");
    let out = tool(
        &["--json", "check", "loud.csv", "--worst-case", "worst.csv"],
        dir.path(),
    );
    assert_eq!(status(&out), 1, "{}", stderr(&out));
    let v = json(&out);
    let h = &v["headroom"];
    // Largest sum: 20000·32767 twice, −30000·−32768.
    assert_eq!(h["accumulator_max"], 2 * 20000i64 * 32767 + 30000 * 32768);
    assert_eq!(h["accumulator_min"], 2 * 20000i64 * -32768 - 30000 * 32767);
    assert_eq!(h["output_can_saturate"], true);
    assert_eq!(v["safe"], false);
    // Oldest sample first: x[n−2] meets tap 2 (negative), x[n−1] tap 1, x[n] tap 0.
    let worst = fs::read_to_string(dir.path().join("worst.csv")).unwrap_or_default();
    let rows: Vec<&str> = worst.lines().filter(|l| !l.starts_with('#')).collect();
    assert_eq!(
        rows,
        [
            "toward_high,toward_low",
            "-32768,32767",
            "32767,-32768",
            "32767,-32768"
        ]
    );
    assert_files(dir.path(), &["loud.csv", "worst.csv"]);
}

#[test]
fn check_q31_table_too_loud_for_64_bits() {
    let dir = scratch();
    write(
        dir.path(),
        "q31.txt",
        "-2147483648 -2147483648 1073741824\n",
    );
    let out = tool(
        &["--json", "check", "q31.txt", "--format", "q31"],
        dir.path(),
    );
    assert_eq!(status(&out), 1);
    let v = json(&out);
    // Σ|h| = 2.5 in Q31 on full-scale 32-bit input: the sum reaches 2^63 + 2^61.
    assert_eq!(v["headroom"]["fits_64_bit_accumulator"], false);
    assert_eq!(v["headroom"]["smallest_safe_accumulator_bits"], 128);
    let max = (1i128 << 31) * 2 * (1i128 << 31) + (1i128 << 30) * ((1i128 << 31) - 1);
    assert_eq!(v["headroom"]["accumulator_max"], max.to_string());
}

#[test]
fn check_real_values_are_quantized_and_bounded() {
    let dir = scratch();
    write(dir.path(), "real.txt", "0.1\n0.8\n0.1\n");
    let out = tool(
        &["--json", "check", "real.txt", "--written", "real"],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    // Nearest codes 3277, 26214, 3277 sum to 32768 = round(1.0·2^15): DC gain exactly 1.
    assert_eq!(v["headroom"]["dc_gain"], 1.0);
    // Σ|h_q − h| = 0.8·2^−15; times max|x| = 32768 codes: 0.8 LSB, plus ½ LSB of rounding.
    let bound = v["error_bound_lsb"].as_f64().unwrap_or(f64::NAN);
    assert!((bound - 1.3).abs() < 1e-6, "{bound}");
}

#[test]
fn check_bad_tables_fail_with_place_and_write_nothing() {
    let cases: &[(&str, &str, &[&str], &str)] = &[
        (
            "ragged.csv",
            "1,2\n3,4\n5\n",
            &[],
            "ragged.csv:3:2: expected 2 field(s)",
        ),
        (
            "word.txt",
            "100\n2x0\n",
            &[],
            "word.txt:2:1: expected an integer code",
        ),
        (
            "nan.txt",
            "0.5\n  NaN\n",
            &["--written", "real"],
            "nan.txt:2:3: expected a finite number",
        ),
        (
            "inf.csv",
            "0.1,inf\n",
            &["--written", "real"],
            "inf.csv:1:5: expected a finite number",
        ),
        (
            "empty.txt",
            "",
            &[],
            "empty.txt:1:1: expected at least one row",
        ),
        (
            "comments.txt",
            "# nothing\n\n",
            &[],
            "comments.txt:1:1: expected at least one row",
        ),
        (
            "big.txt",
            "1\n40000\n",
            &[],
            "big.txt:2:1: expected an integer code in -32768..=32767",
        ),
        (
            "hole.csv",
            "1,,2\n",
            &[],
            "hole.csv:1:3: expected an integer code",
        ),
        (
            "wide.txt",
            "0.5\n1.5\n",
            &["--written", "real"],
            "wide.txt:2:1: expected a tap value",
        ),
    ];
    for (name, text, extra, message) in cases {
        let dir = scratch();
        write(dir.path(), name, text);
        let mut args = vec!["check", name, "--worst-case", "worst.csv"];
        args.extend_from_slice(extra);
        let out = tool(&args, dir.path());
        assert_eq!(status(&out), 2, "{name}: {}", stdout(&out));
        let err = stderr(&out);
        assert_eq!(err.lines().count(), 1, "{name}: {err}");
        assert!(err.contains(message), "{name}: {err}");
        assert_files(dir.path(), &[name]);
    }
}

#[test]
fn check_missing_file_and_bad_flags_exit_2() {
    let dir = scratch();
    let out = tool(&["check", "absent.txt"], dir.path());
    assert_eq!(status(&out), 2);
    assert!(stderr(&out).contains("absent.txt: could not read"));
    let out = tool(&["check", "absent.txt", "--format", "q7"], dir.path());
    assert_eq!(status(&out), 2);
    let out = tool(&["--json", "check", "absent.txt"], dir.path());
    assert_eq!(status(&out), 2);
    assert!(
        json(&out)["error"]
            .as_str()
            .is_some_and(|e| e.contains("absent.txt"))
    );
}
