//! The host tool, run as a user runs it: good and bad inputs, exit statuses, text and JSON
//! output, and files that appear whole or not at all. Built with `--features cli`.
//!
//! Expected figures are worked out here from the definitions (products of extreme codes and
//! taps), not copied from the tool's output.

mod tool_run;

use serde_json::Value;
use std::fs;
use std::path::Path;
use std::process::Command;
use tool_run::*;

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

    let text = tool(
        &["check", "smooth.txt", "--adc-bits", "12", "--align", "left"],
        dir.path(),
    );
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
        assert_bad_input(&out, message, name);
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

// ---- design and emit ----------------------------------------------------------------------

/// The library's own answer for the invented silo-scale spec (kept in step with the TOML file).
fn silo_spec() -> tapline::design::Spec<f64> {
    tapline::design::Spec {
        sample_rate_hz: 1000.0,
        shape: tapline::design::Shape::Lowpass {
            pass_hz: 5.0,
            stop_hz: 50.0,
        },
        passband_ripple_db: 0.1,
        stopband_attenuation_db: 60.0,
    }
}

fn library_q15() -> Vec<i16> {
    match silo_spec().kaiser_fixed::<i16, 2048>() {
        Ok(d) => d.taps.to_vec(),
        Err(e) => panic!("library design failed: {e}"),
    }
}

/// Compiles `source` (which defines `pub static TAPS`) with a `main` that prints every value,
/// runs it, and returns the printed lines.
fn compile_and_print(dir: &Path, source: &Path) -> Vec<String> {
    let main = write(
        dir,
        "print_taps.rs",
        &format!(
            "include!({:?});\nfn main() {{ for v in TAPS.iter() {{ println!(\"{{v:?}}\"); }} }}\n",
            source.display().to_string()
        ),
    );
    let rustc = std::env::var("RUSTC").unwrap_or_else(|_| String::from("rustc"));
    let exe = dir.join("print_taps");
    let built = Command::new(rustc)
        .args(["--edition", "2021", "-o"])
        .arg(&exe)
        .arg(&main)
        .output()
        .unwrap_or_else(|e| panic!("rustc: {e}"));
    assert!(
        built.status.success(),
        "{}",
        String::from_utf8_lossy(&built.stderr)
    );
    let run = Command::new(&exe)
        .output()
        .unwrap_or_else(|e| panic!("{e}"));
    String::from_utf8_lossy(&run.stdout)
        .lines()
        .map(String::from)
        .collect()
}

#[test]
fn design_from_the_toml_spec_reports_the_library_design() {
    let out = tool(&["--json", "design", "--spec", SILO_SPEC], &repo());
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    let q = library_q15();
    assert_eq!(v["taps"], q.len());
    assert_eq!(v["group_delay_samples"], (q.len() as f64 - 1.0) / 2.0);
    let values: Vec<i64> = v["values"]
        .as_array()
        .map(|a| a.iter().filter_map(Value::as_i64).collect())
        .unwrap_or_default();
    assert_eq!(values, q.iter().map(|&c| i64::from(c)).collect::<Vec<_>>());
    assert_eq!(v["quantized"]["meets_spec"], true);
    assert!(
        v["quantized"]["attenuation_db"]
            .as_f64()
            .is_some_and(|a| a >= 60.0)
    );
    // 12-bit codes right-aligned: -2048..=2047; Σ|h| a little over 1 cannot leave 16 bits.
    assert_eq!(v["headroom"]["input_min"], -2048);
    assert_eq!(v["headroom"]["input_max"], 2047);
    assert_eq!(v["safe"], true);

    // The same spec as flags gives the same taps; the text names the figures.
    let mut flags = vec!["design"];
    flags.extend(SILO_FLAGS);
    flags.extend(["12", "--align", "right"]);
    let text = tool(&flags, &repo());
    assert_eq!(status(&text), 0, "{}", stderr(&text));
    let t = stdout(&text);
    assert!(t.contains(&format!("length: {} taps", q.len())), "{t}");
    assert!(
        t.contains("Q15 taps: ripple") && t.contains("-> meets the spec"),
        "{t}"
    );
    assert!(t.contains("verdict: SAFE"), "{t}");
}

#[test]
fn emitted_rust_compiles_and_equals_the_library_taps() {
    let dir = scratch();
    let out = tool(
        &[
            "emit",
            "--spec",
            &repo().join(SILO_SPEC).display().to_string(),
            "--out",
            "taps.rs",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let source = fs::read_to_string(dir.path().join("taps.rs")).unwrap_or_default();
    assert!(
        source.contains("/// Generated by: `tapline emit --spec "),
        "{source}"
    );
    assert!(source.contains("verdict: SAFE"), "{source}");
    let printed = compile_and_print(dir.path(), &dir.path().join("taps.rs"));
    let expected: Vec<String> = library_q15().iter().map(|c| c.to_string()).collect();
    assert_eq!(printed, expected);
}

#[test]
fn emitted_q31_and_f32_compile_and_equal_the_library() {
    let spec = silo_spec();
    let q31 = match spec.kaiser_fixed::<i32, 2048>() {
        Ok(d) => d.taps.iter().map(|c| c.to_string()).collect::<Vec<_>>(),
        Err(e) => panic!("{e}"),
    };
    let f32s = match spec.kaiser::<2048>() {
        Ok(d) => d
            .taps
            .iter()
            .map(|&h| format!("{:?}", h as f32))
            .collect::<Vec<_>>(),
        Err(e) => panic!("{e}"),
    };
    for (format, expected) in [("q31", q31), ("f32", f32s)] {
        let dir = scratch();
        let args = [
            "emit",
            "--band",
            "lowpass",
            "--rate",
            "1000",
            "--edges",
            "5,50",
            "--attenuation",
            "60",
            "--format",
            format,
            "--out",
            "taps.rs",
        ];
        let out = tool(&args, dir.path());
        // Full-scale 32-bit input: the Q31 lowpass has Σ|h| > 1 (negative side lobes), so some
        // input drives its output past the word and emit says so with exit 1, as check does;
        // float taps have no headroom to prove.
        let expected_status = if format == "q31" { 1 } else { 0 };
        assert_eq!(status(&out), expected_status, "{format}: {}", stderr(&out));
        assert_eq!(
            compile_and_print(dir.path(), &dir.path().join("taps.rs")),
            expected
        );
    }
}

/// Σ h·x over the input that drives a Q15 output highest: x = 32767 where h > 0, −32768 where
/// h < 0 (the definition of the worst case), rounded half up to the output word.
fn q15_worst_output(codes: &[i64]) -> i64 {
    let acc: i64 = codes
        .iter()
        .map(|&h| if h > 0 { h * 32767 } else { h * -32768 })
        .sum();
    (acc + (1 << 14)) >> 15
}

fn values(v: &Value) -> Vec<i64> {
    v["values"]
        .as_array()
        .map(|a| a.iter().filter_map(Value::as_i64).collect())
        .unwrap_or_default()
}

#[test]
fn design_exits_1_when_the_taps_can_overflow() {
    let dir = scratch();
    let lowpass = [
        "--json",
        "design",
        "--band",
        "lowpass",
        "--rate",
        "1000",
        "--edges",
        "5,50",
        "--attenuation",
        "60",
    ];
    // On the full 16-bit word the worst input, worked out here from the taps, leaves the word.
    let full = tool(&lowpass, dir.path());
    assert_eq!(status(&full), 1, "{}", stderr(&full));
    let v = json(&full);
    assert!(q15_worst_output(&values(&v)) > 32767);
    assert_eq!(v["safe"], false);
    // The same taps on a 12-bit right-aligned ADC cannot: exit 0.
    let mut narrow = lowpass.to_vec();
    narrow.extend_from_slice(&["--adc-bits", "12", "--align", "right"]);
    let safe = tool(&narrow, dir.path());
    assert_eq!(status(&safe), 0, "{}", stderr(&safe));
    assert_eq!(values(&json(&safe)), values(&v));
    assert_eq!(json(&safe)["safe"], true);
    // The text says it too.
    let text = tool(&lowpass[1..], dir.path());
    assert_eq!(status(&text), 1);
    assert!(
        stdout(&text).contains("verdict: CAN OVERFLOW"),
        "{}",
        stdout(&text)
    );
}

/// (δp, δs) of a spec, from the definitions of ripple (peak to peak) and attenuation.
fn deviations(ripple_db: f64, attenuation_db: f64) -> (f64, f64) {
    let g = 10f64.powf(ripple_db / 20.0);
    ((g - 1.0) / (g + 1.0), 10f64.powf(-attenuation_db / 20.0))
}

fn silo_equiripple_bands(attenuation_db: f64) -> [tapline::design::EquirippleBand; 2] {
    let (dp, ds) = deviations(0.1, attenuation_db);
    [
        tapline::design::EquirippleBand {
            low_hz: 0.0,
            high_hz: 5.0,
            gain: 1.0,
            weight: 1.0,
        },
        tapline::design::EquirippleBand {
            low_hz: 50.0,
            high_hz: 500.0,
            gain: 0.0,
            weight: dp / ds,
        },
    ]
}

#[test]
fn equiripple_design_is_the_shortest_and_equals_the_library() {
    let dir = scratch();
    let spec = fs::read_to_string(repo().join(SILO_SPEC)).unwrap_or_default();
    write(
        dir.path(),
        "spec.toml",
        &format!("{spec}method = \"equiripple\"\n"),
    );
    let out = tool(&["--json", "design", "--spec", "spec.toml"], dir.path());
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    assert_eq!(v["method"], "equiripple");
    assert_eq!(v["quantized"]["meets_spec"], true);
    let len = v["taps"].as_u64().unwrap_or(0) as usize;
    let margin = v["margin_db"].as_f64().unwrap_or(f64::NAN);
    // The library's equiripple at that length, with the spec's weights, quantized: the same
    // codes.
    let bands = silo_equiripple_bands(60.0 + margin);
    let float = tapline::design::equiripple(len, &bands, 1000.0)
        .unwrap_or_else(|e| panic!("library equiripple: {e}"));
    let mut q = vec![0i16; len];
    tapline::design::quantize(&float.taps, &mut q).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(
        values(&v),
        q.iter().map(|&c| i64::from(c)).collect::<Vec<_>>()
    );
    // Shortest: one tap fewer misses the (margin-raised) spec it was searched for.
    let stricter = tapline::design::Spec {
        stopband_attenuation_db: 60.0 + margin,
        ..silo_spec()
    };
    let shorter =
        tapline::design::equiripple(len - 1, &bands, 1000.0).unwrap_or_else(|e| panic!("{e}"));
    let m = stricter
        .measure(&shorter.taps)
        .unwrap_or_else(|e| panic!("{e}"));
    assert!(!m.meets(), "{} taps would do", len - 1);
    // Equal ripple: the float design's pass and stop deviations stand in the weights' ratio.
    let (dp, ds) = deviations(
        v["float"]["ripple_db"].as_f64().unwrap_or(f64::NAN),
        v["float"]["attenuation_db"].as_f64().unwrap_or(f64::NAN),
    );
    let ratio = dp / ds / bands[1].weight;
    assert!((ratio - 1.0).abs() < 0.02, "{ratio}");
    // Common practice: for the same spec an equiripple filter is shorter than a window design.
    assert!(len < library_q15().len(), "{len}");
}

#[test]
fn equiripple_refusals_are_one_line() {
    let dir = scratch();
    let flag_cases: &[(&[&str], &str)] = &[
        (
            &["--band", "highpass", "--edges", "50,100", "--length", "40"],
            "command line: --length: expected an odd length for a highpass with method equiripple, found 40",
        ),
        (
            &[
                "--band",
                "bandstop",
                "--edges",
                "40,48,52,60",
                "--length",
                "90",
            ],
            "command line: --length: expected an odd length for a bandstop",
        ),
        (
            &["--band", "lowpass", "--edges", "5,50", "--length", "2"],
            "command line: --length: expected an equiripple length in 3..=1024 taps, found 2",
        ),
    ];
    for (args, message) in flag_cases {
        let mut all = vec![
            "emit",
            "--out",
            "taps.rs",
            "--rate",
            "1000",
            "--attenuation",
            "40",
            "--method",
            "equiripple",
        ];
        all.extend_from_slice(args);
        let out = tool(&all, dir.path());
        assert_bad_input(&out, message, &format!("{args:?}"));
        assert_files(dir.path(), &[]);
    }
    // An odd length is accepted for the same highpass and gives that many taps.
    let out = tool(
        &[
            "--json",
            "design",
            "--band",
            "highpass",
            "--rate",
            "1000",
            "--edges",
            "50,100",
            "--attenuation",
            "40",
            "--method",
            "equiripple",
            "--length",
            "41",
        ],
        dir.path(),
    );
    assert_eq!(json(&out)["taps"], 41, "{}", stderr(&out));
    let good = "band = \"lowpass\"\nsample_rate_hz = 1000\nedges_hz = [5, 50]\nripple_db = 0.1\nattenuation_db = 60\nformat = \"q15\"\n";
    let toml_cases: &[(&str, &str)] = &[
        (
            "method = \"remez\"\n",
            "spec.toml:7:10: expected method = \"window\"",
        ),
        (
            "length = 41\n",
            "spec.toml:7:10: expected a length only with method equiripple",
        ),
        (
            "method = \"equiripple\"\nlength = 2000\n",
            "spec.toml:8:10: expected an equiripple length in 3..=1024",
        ),
    ];
    for (extra, message) in toml_cases {
        write(dir.path(), "spec.toml", &format!("{good}{extra}"));
        let out = tool(&["design", "--spec", "spec.toml"], dir.path());
        assert_bad_input(&out, message, extra);
    }
}

// The committed example file, compiled into this test: it must still be what the library
// designs for the spec beside it.
mod committed {
    include!("../examples/tool/silo_scale_taps.rs");
}

#[test]
fn committed_example_taps_are_current() {
    assert_eq!(committed::SILO_SCALE_TAPS.to_vec(), library_q15());
    // The committed file is a copy of what the emit command in examples/tool/README.md writes,
    // byte for byte (doc comment, figures and recorded command included): run that command, with
    // the same arguments from the same place, and compare.
    let readme = fs::read_to_string(repo().join("examples/tool/README.md")).unwrap_or_default();
    let line = readme
        .lines()
        .find(|l| l.starts_with("cargo run --features cli -- emit "))
        .unwrap_or_else(|| panic!("examples/tool/README.md has no emit command"));
    let args: Vec<&str> = line["cargo run --features cli -- ".len()..]
        .split_whitespace()
        .collect();
    let out_at = args.iter().position(|a| *a == "--out").map(|i| args[i + 1]);
    let written = repo().join(out_at.unwrap_or_else(|| panic!("the emit command has no --out")));
    assert!(
        written.starts_with(repo().join("target")),
        "{line}: writes outside target/"
    );
    if let Some(parent) = written.parent() {
        fs::create_dir_all(parent).unwrap_or_else(|e| panic!("{}: {e}", parent.display()));
    }
    let out = tool(&args, &repo());
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let again = fs::read_to_string(&written).unwrap_or_default();
    let committed =
        fs::read_to_string(repo().join("examples/tool/silo_scale_taps.rs")).unwrap_or_default();
    assert!(
        again == committed,
        "examples/tool/silo_scale_taps.rs is not what `{line}` writes today; run it and copy \
         {} over the committed file\n--- committed\n{committed}\n--- written\n{again}",
        written.display()
    );
}

#[test]
fn bad_specs_fail_with_place_and_write_nothing() {
    let flag_cases: &[(&[&str], &str)] = &[
        (
            &[
                "--band",
                "lowpass",
                "--rate",
                "1000",
                "--edges",
                "50,5",
                "--attenuation",
                "60",
            ],
            "command line: --edges: expected edges in increasing order, found 5 after 50",
        ),
        (
            &[
                "--band",
                "lowpass",
                "--rate",
                "1000",
                "--edges",
                "5,500",
                "--attenuation",
                "60",
            ],
            "command line: --edges: expected an edge strictly between 0 and fs/2 = 500 Hz",
        ),
        (
            &[
                "--band",
                "bandpass",
                "--rate",
                "1000",
                "--edges",
                "5,50",
                "--attenuation",
                "60",
            ],
            "command line: --edges: expected 4 edges",
        ),
        (
            &[
                "--band",
                "lowpass",
                "--edges",
                "5,50",
                "--attenuation",
                "60",
            ],
            "command line: --rate: expected a sample rate",
        ),
        (
            &[
                "--band",
                "lowpass",
                "--rate",
                "-8",
                "--edges",
                "5,50",
                "--attenuation",
                "60",
            ],
            "command line: --rate: expected a positive sample rate",
        ),
        (
            &[
                "--band",
                "lowpass",
                "--rate",
                "1000",
                "--edges",
                "5,50",
                "--attenuation",
                "60",
                "--adc-bits",
                "17",
            ],
            "command line: --adc-bits: expected ADC bits in 1..=16",
        ),
        (
            &[
                "--band",
                "lowpass",
                "--rate",
                "1000",
                "--edges",
                "5,50",
                "--attenuation",
                "60",
                "--name",
                "taps",
            ],
            "command line: --name: expected an upper-case Rust identifier",
        ),
        (
            &[
                "--band",
                "lowpass",
                "--rate",
                "1000",
                "--edges",
                "50,50",
                "--attenuation",
                "60",
            ],
            "command line: --edges: expected edges in increasing order, found 50 after 50",
        ),
    ];
    for (args, message) in flag_cases {
        let dir = scratch();
        let mut all = vec!["emit", "--out", "taps.rs"];
        all.extend_from_slice(args);
        let out = tool(&all, dir.path());
        assert_bad_input(&out, message, &format!("{args:?}"));
        assert_files(dir.path(), &[]);
    }

    let good = "band = \"lowpass\"\nsample_rate_hz = 1000\nedges_hz = [5, 50]\nripple_db = 0.1\nattenuation_db = 60\nformat = \"q15\"\n";
    let toml_cases: &[(&str, &str, &str)] = &[
        (
            "edges_hz = [5, 50]",
            "edges_hz = [50, 5]",
            "spec.toml:3:17: expected edges in increasing order",
        ),
        (
            "edges_hz = [5, 50]",
            "edges_hz = [5, 501]",
            "spec.toml:3:16: expected an edge strictly between 0 and fs/2",
        ),
        ("ripple_db = 0.1", "ripple_db = 0.x1", "spec.toml:4:"),
        (
            "band = \"lowpass\"",
            "band = \"lowish\"",
            "spec.toml:1:8: expected band =",
        ),
        (
            "format = \"q15\"",
            "format = \"q7\"",
            "spec.toml:6:10: expected format =",
        ),
        (
            "format = \"q15\"",
            "format = \"q15\"\ncolour = 3",
            "spec.toml:7:1:",
        ),
        (
            "attenuation_db = 60",
            "attenuation_db = inf",
            "spec.toml:5:18: expected an attenuation",
        ),
        (
            "edges_hz = [5, 50]",
            "edges_hz = [5, nan]",
            "spec.toml:3:16: expected an edge",
        ),
        ("sample_rate_hz = 1000", "", "spec.toml:1:1:"),
    ];
    for (from, to, message) in toml_cases {
        let dir = scratch();
        write(dir.path(), "spec.toml", &good.replace(from, to));
        let out = tool(
            &["emit", "--spec", "spec.toml", "--out", "taps.rs"],
            dir.path(),
        );
        assert_bad_input(&out, message, to);
        assert_files(dir.path(), &["spec.toml"]);
    }
}

#[test]
fn a_spec_too_deep_for_q15_fails_cleanly() {
    let dir = scratch();
    let out = tool(
        &[
            "emit",
            "--band",
            "lowpass",
            "--rate",
            "1000",
            "--edges",
            "5,50",
            "--attenuation",
            "100",
            "--out",
            "taps.rs",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 2);
    assert!(
        stderr(&out).contains("command line: --attenuation: ")
            && stderr(&out).contains("meets the spec in Q15 once quantized"),
        "{}",
        stderr(&out)
    );
    assert_files(dir.path(), &[]);
}

#[test]
fn a_write_that_fails_leaves_no_temporary_file() {
    let dir = scratch();
    fs::create_dir(dir.path().join("taken")).unwrap_or_else(|e| panic!("{e}"));
    // The rename cannot replace a directory: the temporary file must be cleaned away.
    let out = tool(
        &[
            "emit",
            "--band",
            "lowpass",
            "--rate",
            "1000",
            "--edges",
            "5,50",
            "--attenuation",
            "40",
            "--out",
            "taken",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 2);
    assert!(
        stderr(&out).contains("taken: could not write"),
        "{}",
        stderr(&out)
    );
    assert_files(dir.path(), &["taken"]);
    let out = tool(
        &[
            "emit",
            "--band",
            "lowpass",
            "--rate",
            "1000",
            "--edges",
            "5,50",
            "--attenuation",
            "40",
            "--out",
            "missing/taps.rs",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 2);
    assert_files(dir.path(), &["taken"]);
}

// ---- replay --------------------------------------------------------------------------------

/// Half-up rounding of sum / 2^15 and saturation to i16, from the definitions.
fn q15_model(taps: &[i64], xs: &[i64]) -> (Vec<i64>, usize) {
    let mut saturated = 0;
    let ys = (0..xs.len())
        .map(|n| {
            let acc: i64 = taps
                .iter()
                .enumerate()
                .filter(|(k, _)| *k <= n)
                .map(|(k, h)| h * xs[n - k])
                .sum();
            let y = (acc + (1 << 14)).div_euclid(1 << 15);
            if !(-32768..=32767).contains(&y) {
                saturated += 1;
            }
            y.clamp(-32768, 32767)
        })
        .collect();
    (ys, saturated)
}

fn csv_column(text: &str, column: usize) -> Vec<i64> {
    text.lines()
        .skip(1)
        .filter_map(|l| l.split(',').nth(column).and_then(|v| v.parse().ok()))
        .collect()
}

#[test]
fn replay_matches_the_exact_model_and_writes_the_output() {
    let dir = scratch();
    let taps = [5000i64, -12000, 30000, 7];
    write(
        dir.path(),
        "taps.txt",
        &taps
            .iter()
            .map(|t| t.to_string())
            .collect::<Vec<_>>()
            .join("\n"),
    );
    let xs: Vec<i64> = (0..300).map(|n| (n * 7919 % 4001) - 2000).collect();
    let capture: String = std::iter::once("when,code\n".to_string())
        .chain(xs.iter().enumerate().map(|(n, x)| format!("{n},{x}\n")))
        .collect();
    write(dir.path(), "capture.csv", &capture);
    let out = tool(
        &[
            "--json",
            "replay",
            "capture.csv",
            "--taps",
            "taps.txt",
            "--column",
            "2",
            "--header",
            "--adc-bits",
            "12",
            "--align",
            "right",
            "--out",
            "filtered.csv",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    assert_eq!(v["samples"], 300);
    assert_eq!(v["saturated"], 0);
    // Codes as taps: the reference has the same taps, so only the output rounding differs.
    assert!(v["max_error"].as_f64().is_some_and(|e| e <= 0.5), "{v}");
    assert_eq!(v["error_bound"], 0.5);
    assert_eq!(v["error_unit"], "LSB");
    let written = fs::read_to_string(dir.path().join("filtered.csv")).unwrap_or_default();
    assert_eq!(csv_column(&written, 1), xs);
    assert_eq!(csv_column(&written, 2), q15_model(&taps, &xs).0);
    assert_files(dir.path(), &["capture.csv", "filtered.csv", "taps.txt"]);
}

#[test]
fn replay_counts_saturation_and_exits_1() {
    let dir = scratch();
    write(dir.path(), "loud.txt", "32767\n32767\n");
    let xs = [30000i64, 30000, -30000, -30000, 100];
    write(
        dir.path(),
        "capture.txt",
        &xs.iter().map(|x| format!("{x}\n")).collect::<String>(),
    );
    let out = tool(
        &["--json", "replay", "capture.txt", "--taps", "loud.txt"],
        dir.path(),
    );
    assert_eq!(status(&out), 1, "{}", stderr(&out));
    let (_, saturated) = q15_model(&[32767, 32767], &xs);
    // 30000 + 30000 and −30000 − 30000 leave the word; the sums around them do not.
    assert_eq!(saturated, 2);
    assert_eq!(json(&out)["saturated"], saturated);
}

#[test]
fn replay_of_the_invented_capture_stays_within_the_bound() {
    let out = tool(
        &[
            "--json",
            "replay",
            "examples/tool/silo_capture.csv",
            "--spec",
            SILO_SPEC,
            "--column",
            "2",
            "--header",
        ],
        &repo(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    assert_eq!(v["samples"], 2000);
    assert_eq!(v["within_bound"], true);
    let c = &v["channels"][0];
    assert_eq!(c["name"], "adc_code");
    assert!(c["accumulator_bits_used"].as_u64() <= c["accumulator_bits_worst_case"].as_u64());
    assert!(c["snr_db"].as_f64().is_some_and(|s| s > 40.0), "{v}");
}

#[test]
fn replay_bad_captures_fail_with_place_and_write_nothing() {
    let cases: &[(&str, &str, &str)] = &[
        (
            "ragged.csv",
            "0,1\n1,2\n2\n",
            "ragged.csv:3:2: expected 2 field(s) as on line 1",
        ),
        (
            "word.csv",
            "0,1\n1,x2\n",
            "word.csv:2:3: expected a sample code in -2048..=2047",
        ),
        (
            "range.csv",
            "0,1\n1,3000\n",
            "range.csv:2:3: expected a sample code in -2048..=2047",
        ),
        (
            "empty.csv",
            "# nothing here\n",
            "empty.csv:1:1: expected at least one row",
        ),
        (
            "narrow.csv",
            "5\n6\n",
            "narrow.csv:1:1: expected at least 2 field(s)",
        ),
    ];
    for (name, text, message) in cases {
        let dir = scratch();
        write(dir.path(), "taps.txt", TAPS);
        write(dir.path(), name, text);
        let out = tool(&replay_args(name, "out.csv"), dir.path());
        assert_bad_input(&out, message, name);
        assert_files(dir.path(), &["taps.txt", name]);
    }
}

/// The named column of a CSV with a header row.
fn named_column(text: &str, name: &str) -> Vec<f64> {
    let mut lines = text.lines();
    let header: Vec<&str> = lines.next().unwrap_or("").split(',').collect();
    let Some(k) = header.iter().position(|h| *h == name) else {
        panic!("no column {name} in {header:?}");
    };
    lines
        .filter_map(|l| l.split(',').nth(k).and_then(|v| v.parse().ok()))
        .collect()
}

#[test]
fn replay_filters_named_channels_each_with_its_own_state() {
    let dir = scratch();
    let taps = [9000i64, -4000, 20000, 3000, -1500];
    write(
        dir.path(),
        "taps.txt",
        &taps.iter().map(|t| format!("{t}\n")).collect::<String>(),
    );
    // Two channels that differ everywhere, plus columns that are not chosen.
    let left: Vec<i64> = (0..400).map(|n| (n * 37 % 1201) - 600).collect();
    let right: Vec<i64> = (0..400).map(|n| 900 - (n * 91 % 1777)).collect();
    let mut capture = String::from("# invented two-channel capture\ntime,left,temp,right\n");
    for n in 0..400 {
        capture.push_str(&format!("{n},{},21,{}\n", left[n], right[n]));
    }
    write(dir.path(), "two.csv", &capture);
    let out = tool(
        &[
            "--json",
            "replay",
            "two.csv",
            "--taps",
            "taps.txt",
            "--channels",
            "right,left",
            "--out",
            "filtered.csv",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    assert_eq!(v["samples"], 400);
    assert_eq!(v["channels"][0]["name"], "right");
    assert_eq!(v["channels"][1]["name"], "left");
    let written = fs::read_to_string(dir.path().join("filtered.csv")).unwrap_or_default();
    assert_eq!(
        written.lines().next(),
        Some(
            "sample,right_input,right_fixed,right_reference,right_error_lsb,left_input,left_fixed,left_reference,left_error_lsb"
        )
    );
    let as_f64 = |v: &[i64]| v.iter().map(|&x| x as f64).collect::<Vec<_>>();
    for (name, xs) in [("left", &left), ("right", &right)] {
        assert_eq!(named_column(&written, &format!("{name}_input")), as_f64(xs));
        assert_eq!(
            named_column(&written, &format!("{name}_fixed")),
            as_f64(&q15_model(&taps, xs).0),
            "{name}"
        );
    }
}

#[test]
fn replay_refuses_unknown_names_and_ragged_rows_in_one_line() {
    let cases: &[(&str, &str, &str, &str)] = &[
        (
            "names.csv",
            "# invented\ntime,left,right\n0,1,2\n",
            "left,middle",
            "names.csv:2:1: expected a column named \"middle\" in the header, found time, left, right",
        ),
        (
            "ragged.csv",
            "time,left,right\n0,1,2\n1,3\n",
            "left,right",
            "ragged.csv:3:4: expected 3 field(s) as on line 1, found 2",
        ),
        (
            "twice.csv",
            "left,right,left\n0,1,2\n",
            "left",
            "twice.csv:1:12: expected one column named \"left\" in the header",
        ),
        (
            "word.csv",
            "time,left\n0,1\n1, 7x\n",
            "left",
            "word.csv:3:4: expected a sample code in -32768..=32767",
        ),
        (
            "bare.csv",
            "# only a comment\n",
            "left",
            "bare.csv:1:1: expected a header row, found none",
        ),
        (
            "headonly.csv",
            "time,left\n",
            "left",
            "headonly.csv:1:1: expected at least one row of samples, found none",
        ),
    ];
    for (name, text, channels, message) in cases {
        let dir = scratch();
        write(dir.path(), "taps.txt", "16384 16384\n");
        write(dir.path(), name, text);
        let out = tool(
            &[
                "replay",
                name,
                "--taps",
                "taps.txt",
                "--channels",
                channels,
                "--out",
                "out.csv",
            ],
            dir.path(),
        );
        assert_bad_input(&out, message, name);
        assert_files(dir.path(), &["taps.txt", name]);
    }
    let dir = scratch();
    write(dir.path(), "taps.txt", "16384\n");
    write(dir.path(), "c.csv", "a,b\n1,2\n");
    let out = tool(
        &[
            "replay",
            "c.csv",
            "--taps",
            "taps.txt",
            "--channels",
            "a,b,a",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 2);
    assert!(
        stderr(&out)
            .contains("command line: --channels: expected each channel once, found \"a\" twice"),
        "{}",
        stderr(&out)
    );
}

/// Higham's γ_n = n·u/(1 − n·u) (Accuracy and Stability of Numerical Algorithms, 2nd ed., §3.1).
fn gamma(n: usize, u: f64) -> f64 {
    n as f64 * u / (1.0 - n as f64 * u)
}

#[test]
fn replay_in_f32_reports_errors_in_the_capture_unit_within_the_bound() {
    let dir = scratch();
    // Real taps that f32 cannot hold exactly, and volts (invented) that it cannot either.
    let taps = [0.1f64, -0.3, 0.7, 0.45, -0.05];
    write(
        dir.path(),
        "taps.txt",
        &taps.iter().map(|t| format!("{t}\n")).collect::<String>(),
    );
    let xs: Vec<f64> = (0..500)
        .map(|n| 2.5 * ((n as f64) * 0.37).sin() + 0.001 * n as f64)
        .collect();
    write(
        dir.path(),
        "volts.csv",
        &std::iter::once("t,volts\n".to_string())
            .chain(xs.iter().enumerate().map(|(n, x)| format!("{n},{x}\n")))
            .collect::<String>(),
    );
    let out = tool(
        &[
            "--json",
            "replay",
            "volts.csv",
            "--taps",
            "taps.txt",
            "--format",
            "f32",
            "--channels",
            "volts",
            "--out",
            "filtered.csv",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    assert_eq!(v["error_unit"], "capture units");
    assert_eq!(v["format"], "f32");
    // The bound, from its terms: taps and samples rounded to f32, the f32 dot product, the f64
    // reference's own rounding.
    let largest = xs.iter().fold(0.0f64, |m, x| m.max(x.abs()));
    let u = f64::powi(2.0, -24);
    let h32: Vec<f64> = taps.iter().map(|&h| f64::from(h as f32)).collect();
    let sum = |v: &[f64]| v.iter().map(|h| h.abs()).sum::<f64>();
    let rounding: f64 = taps.iter().zip(&h32).map(|(h, t)| (t - h).abs()).sum();
    let bound = rounding * largest * (1.0 + u)
        + sum(&taps) * u * largest
        + gamma(5, u) * sum(&h32) * largest * (1.0 + u)
        + gamma(5, f64::powi(2.0, -53)) * sum(&taps) * largest;
    let reported = v["error_bound"].as_f64().unwrap_or(f64::NAN);
    assert!(
        (reported - bound).abs() <= 1e-12 * bound,
        "{reported} vs {bound}"
    );
    // The output against this test's own float64 filter: within the bound, and really f32 (a
    // float64 filter would agree to ~1e-15).
    let written = fs::read_to_string(dir.path().join("filtered.csv")).unwrap_or_default();
    let ys = named_column(&written, "volts_f32");
    assert_eq!(ys.len(), xs.len());
    let mut worst = 0.0f64;
    for n in 0..xs.len() {
        let reference: f64 = (0..taps.len())
            .filter(|&k| k <= n)
            .map(|k| taps[k] * xs[n - k])
            .sum();
        worst = worst.max((ys[n] - reference).abs());
        assert_eq!(
            ys[n],
            f64::from(ys[n] as f32),
            "row {n} is not an f32 value"
        );
    }
    assert!(worst <= bound, "{worst} > {bound}");
    assert!(worst > 1e-9, "{worst}: not computed in f32?");
    let max_error = v["max_error"].as_f64().unwrap_or(f64::NAN);
    assert!(
        (max_error - worst).abs() <= 1e-9 * worst + 1e-12,
        "{max_error} vs {worst}"
    );
    // A sample that is not a finite number is refused where it stands.
    write(dir.path(), "bad.csv", "t,volts\n0,1.5\n1,NaN\n");
    let bad = tool(
        &[
            "replay",
            "bad.csv",
            "--taps",
            "taps.txt",
            "--format",
            "f32",
            "--channels",
            "volts",
        ],
        dir.path(),
    );
    assert_eq!(status(&bad), 2);
    assert!(
        stderr(&bad).contains("bad.csv:3:3: expected a finite number, found \"NaN\""),
        "{}",
        stderr(&bad)
    );
}

#[test]
fn f32_replay_counts_a_sample_beyond_f32_only_while_the_taps_see_it() {
    // Invented capture: 1e39 is finite as f64 but infinite once rounded to f32 (f32::MAX is
    // about 3.4e38). By the definition of an FIR filter, an input reaches exactly as many
    // outputs as the filter has taps: five here, whatever capacity the tool runs them in.
    let dir = scratch();
    write(dir.path(), "taps.txt", "0.2\n0.2\n0.2\n0.2\n0.2\n");
    let mut capture = String::from("v\n");
    for i in 0..200 {
        capture.push_str(if i == 10 { "1e39\n" } else { "1.0\n" });
    }
    write(dir.path(), "huge.csv", &capture);
    let args = "replay huge.csv --taps taps.txt --format f32 --channels v --json";
    let out = tool(&args.split(' ').collect::<Vec<_>>(), dir.path());
    let v = json(&out);
    assert_eq!(
        (v["samples"].as_u64(), v["saturated"].as_u64()),
        (Some(200), Some(5)),
        "{v}"
    );
    // Non-finite outputs make the replay's exit status 1.
    assert_eq!(status(&out), 1, "{}", stderr(&out));
}

#[test]
fn replay_of_an_f32_spec_design() {
    let dir = scratch();
    let spec = fs::read_to_string(repo().join(SILO_SPEC)).unwrap_or_default();
    write(
        dir.path(),
        "spec.toml",
        &spec
            .replace("format = \"q15\"", "format = \"f32\"")
            .replace("adc_bits = 12\n", "")
            .replace("adc_align = \"right\"\n", ""),
    );
    let out = tool(
        &[
            "--json",
            "replay",
            &repo()
                .join("examples/tool/silo_capture.csv")
                .display()
                .to_string(),
            "--spec",
            "spec.toml",
            "--channels",
            "adc_code",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    assert_eq!(v["samples"], 2000);
    assert_eq!(v["within_bound"], true);
    // f32 keeps about 24 bits: far cleaner than the Q15 path's ~72 dB on the same capture.
    assert!(
        v["channels"][0]["snr_db"]
            .as_f64()
            .is_some_and(|s| s > 100.0),
        "{v}"
    );
}

#[test]
fn replay_draws_no_progress_bar_when_stderr_is_not_a_terminal() {
    let dir = scratch();
    write(dir.path(), "taps.txt", "8192\n16384\n8192\n");
    let capture: String = (0..200_000)
        .map(|n| format!("{}\n", n % 2001 - 1000))
        .collect();
    write(dir.path(), "long.txt", &capture);
    let out = tool(&["replay", "long.txt", "--taps", "taps.txt"], dir.path());
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    assert_eq!(
        stderr(&out),
        "",
        "stderr is a pipe here: nothing may be drawn on it"
    );
    assert!(stdout(&out).contains("200000 rows"), "{}", stdout(&out));
    // The same run on a terminal (util-linux `script` gives it one) does draw the bar, so the
    // check above is not empty by accident. Skipped where `script` is missing.
    let exe = env!("CARGO_BIN_EXE_tapline");
    let Ok(on_tty) = Command::new("script")
        .args([
            "-qec",
            &format!("{exe} replay long.txt --taps taps.txt"),
            "/dev/null",
        ])
        .current_dir(dir.path())
        .output()
    else {
        eprintln!("`script` not found: the terminal half of this test did not run");
        return;
    };
    let screen = stdout(&on_tty);
    assert!(
        screen.contains("replay [") && screen.contains("%"),
        "{screen}"
    );
    assert!(screen.contains("200000 rows"), "{screen}");
}

// ---- prepare (the whole job) ---------------------------------------------------------------

/// The raw codes of the invented capture's adc_code column (from the file, as the tool reads
/// it: `#` lines skipped, the header row skipped).
fn silo_capture_codes() -> Vec<i64> {
    let text =
        fs::read_to_string(repo().join("examples/tool/silo_capture.csv")).unwrap_or_default();
    text.lines()
        .filter(|l| !l.starts_with('#'))
        .skip(1)
        .filter_map(|l| l.split(',').nth(1).and_then(|v| v.trim().parse().ok()))
        .collect()
}

#[test]
fn prepare_writes_the_four_files_of_the_job() {
    let dir = scratch();
    let out = prepare_silo(dir.path(), "job", &[]);
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    assert_eq!(stderr(&out), "", "no progress bar on a pipe");
    let v = json(&out);
    let job = dir.path().join("job");
    assert_files(
        &job,
        &["filtered.csv", "report.txt", "response.svg", "taps.rs"],
    );
    // taps.rs compiles and holds the library's design for the spec.
    let q = library_q15();
    let printed = compile_and_print(dir.path(), &job.join("taps.rs"));
    assert_eq!(printed, q.iter().map(|c| c.to_string()).collect::<Vec<_>>());
    // filtered.csv is the capture through those taps, output for output (exact model).
    let xs = silo_capture_codes();
    assert_eq!(xs.len(), 2000);
    let taps: Vec<i64> = q.iter().map(|&c| i64::from(c)).collect();
    let filtered = fs::read_to_string(job.join("filtered.csv")).unwrap_or_default();
    let as_f64 = |v: &[i64]| v.iter().map(|&x| x as f64).collect::<Vec<_>>();
    assert_eq!(named_column(&filtered, "adc_code_input"), as_f64(&xs));
    assert_eq!(
        named_column(&filtered, "adc_code_fixed"),
        as_f64(&q15_model(&taps, &xs).0)
    );
    // The report states the figures the JSON carries.
    let report = fs::read_to_string(job.join("report.txt")).unwrap_or_default();
    let replay = &v["replay"];
    let channel = &replay["channels"][0];
    for needle in [
        format!("length: {} taps", q.len()),
        format!("group delay: {} samples", (q.len() - 1) / 2),
        String::from("float64 taps: ripple"),
        String::from("Q15 taps: ripple"),
        String::from("verdict: SAFE"),
        format!(
            "max |Q15 - float64|: {:.3} LSB; error bound {:.3} LSB: within",
            channel["max_error"].as_f64().unwrap_or(f64::NAN),
            replay["error_bound"].as_f64().unwrap_or(f64::NAN)
        ),
        format!(
            "SNR of the Q15 output against float64: {:.2} dB",
            channel["snr_db"].as_f64().unwrap_or(f64::NAN)
        ),
        String::from("saturated outputs: 0"),
        format!(
            "{} bits of the {} the worst case needs",
            channel["accumulator_bits_used"], channel["accumulator_bits_worst_case"]
        ),
        String::from("PASS (exit 0)"),
        String::from("taps.rs "),
        String::from("response.svg "),
        String::from("filtered.csv "),
    ] {
        assert!(
            report.contains(&needle),
            "report lacks {needle:?}:\n{report}"
        );
    }
    assert_eq!(v["status"], 0);
    assert_eq!(v["design"]["taps"], q.len());
    // The plot is the design's.
    let svg = fs::read_to_string(job.join("response.svg")).unwrap_or_default();
    assert_eq!(svg.matches("<circle").count(), q.len());
}

#[test]
fn prepare_exits_1_when_the_taps_can_overflow() {
    let dir = scratch();
    // The silo spec on the full 16-bit word: Σ|h| > 1, so some input could saturate the
    // output, however quietly the capture behaves.
    let spec = fs::read_to_string(repo().join(SILO_SPEC)).unwrap_or_default();
    write(
        dir.path(),
        "full.toml",
        &spec
            .replace("adc_bits = 12\n", "")
            .replace("adc_align = \"right\"\n", ""),
    );
    let capture = repo()
        .join("examples/tool/silo_capture.csv")
        .display()
        .to_string();
    let out = tool(
        &[
            "prepare",
            "--spec",
            "full.toml",
            "--capture",
            &capture,
            "--column",
            "2",
            "--header",
            "--out-dir",
            "job",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 1, "{}", stderr(&out));
    let report = fs::read_to_string(dir.path().join("job/report.txt")).unwrap_or_default();
    assert!(report.contains("verdict: CAN OVERFLOW"), "{report}");
    assert!(
        report.contains("FAIL (exit 1): the headroom proof says some input in range can overflow"),
        "{report}"
    );
    // The replay itself stayed within its bound: the failure is the proof's.
    assert!(report.contains(": within"), "{report}");
}

#[test]
fn prepare_on_bad_input_writes_nothing() {
    let spec = repo().join(SILO_SPEC).display().to_string();
    let cases: &[(&str, &str, &[&str], &str)] = &[
        (
            "ragged.csv",
            "time_s,adc_code\n0,1\n0.001,2\n0.002\n",
            &["--channels", "adc_code"],
            "ragged.csv:4:6: expected 2 field(s) as on line 1, found 1",
        ),
        (
            "names.csv",
            "time_s,adc_code\n0,1\n",
            &["--channels", "load"],
            "names.csv:1:1: expected a column named \"load\" in the header",
        ),
        (
            "range.csv",
            "time_s,adc_code\n0,1\n0.001,4000\n",
            &["--channels", "adc_code"],
            "range.csv:3:7: expected a sample code in -2048..=2047",
        ),
    ];
    for (name, text, extra, message) in cases {
        let dir = scratch();
        write(dir.path(), name, text);
        let mut args = vec![
            "prepare",
            "--spec",
            &spec,
            "--capture",
            name,
            "--out-dir",
            "job",
        ];
        args.extend_from_slice(extra);
        let out = tool(&args, dir.path());
        assert_bad_input(&out, message, name);
        // Not even the directory it would have made.
        assert_files(dir.path(), &[name]);
    }
    // A bad spec: nothing, either; an existing directory stays as it was.
    let dir = scratch();
    fs::create_dir(dir.path().join("job")).unwrap_or_else(|e| panic!("{e}"));
    write(dir.path(), "c.csv", "1\n2\n");
    write(dir.path(), "bad.toml", "band = \"lowpass\"\n");
    let out = tool(
        &[
            "prepare",
            "--spec",
            "bad.toml",
            "--capture",
            "c.csv",
            "--out-dir",
            "job",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 2);
    assert!(stderr(&out).contains("bad.toml:1:1:"), "{}", stderr(&out));
    assert_files(&dir.path().join("job"), &[]);
}

// ---- plot ----------------------------------------------------------------------------------

#[test]
fn plot_draws_the_response_and_one_marker_per_tap() {
    let dir = scratch();
    let spec = repo().join(SILO_SPEC).display().to_string();
    let out = tool(
        &["--json", "plot", "--spec", &spec, "--out", "silo.svg"],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    assert_eq!(json(&out)["file"], "silo.svg");
    let svg = fs::read_to_string(dir.path().join("silo.svg")).unwrap_or_default();
    assert!(svg.starts_with("<svg") && svg.trim_end().ends_with("</svg>"));
    assert!(
        svg.contains(&format!(
            "lowpass FIR, {} Q15 taps: design review",
            library_q15().len()
        )),
        "no title"
    );
    assert!(svg.contains("magnitude response"), "no magnitude panel");
    assert!(svg.contains("passband close-up"), "no passband zoom");
    assert!(svg.contains("impulse response"), "no impulse response");
    assert!(
        svg.contains("float64 taps") && svg.contains("Q15 taps"),
        "no legend"
    );
    assert!(svg.contains("attenuation limit, -60 dB"), "no limit");
    assert!(svg.contains("SAFE"), "no verdict in the header");
    assert_eq!(svg.matches("<circle").count(), library_q15().len());
    // Two bands shaded (pass and stop) as filled rectangles beyond the background.
    assert!(svg.matches("<rect").count() >= 3);
    assert_files(dir.path(), &["silo.svg"]);
}

/// The centres of the SVG's circles, in drawing order.
fn circles(svg: &str) -> Vec<(f64, f64)> {
    let attr = |tag: &str, name: &str| -> f64 {
        tag.split_once(&format!(" {name}=\""))
            .and_then(|(_, rest)| rest.split_once('"'))
            .and_then(|(v, _)| v.parse().ok())
            .unwrap_or(f64::NAN)
    };
    svg.split("<circle")
        .skip(1)
        .map(|tag| (attr(tag, "cx"), attr(tag, "cy")))
        .collect()
}

#[test]
fn plot_of_a_tap_table_draws_its_taps() {
    let dir = scratch();
    // Not symmetric, with a wide spread of values: the markers must sit where these codes are.
    let codes = [12000i64, -20000, 31000, 4000, -9000, 0, 15000];
    write(
        dir.path(),
        "table.csv",
        &codes
            .iter()
            .map(|c| c.to_string())
            .collect::<Vec<_>>()
            .join(","),
    );
    let out = tool(
        &[
            "--json",
            "plot",
            "--taps",
            "table.csv",
            "--rate",
            "8000",
            "--out",
            "table.svg",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    assert_eq!(v["taps"], codes.len());
    assert_eq!(v["format"], "Q15");
    let svg = fs::read_to_string(dir.path().join("table.svg")).unwrap_or_default();
    assert!(svg.contains("tap table table.csv: 7 Q15 taps"), "no title");
    assert!(svg.contains("not symmetric"), "symmetry not reported");
    assert!(
        !svg.contains("float64 taps"),
        "a table of codes has no float taps to draw"
    );
    let marks = circles(&svg);
    assert_eq!(marks.len(), codes.len());
    // One marker per tap, left to right, at heights proportional to the codes (SVG y grows
    // downward; pixel positions are rounded, so within a pixel).
    let (hi, lo) = (2, 1); // the largest and smallest codes
    let scale = (marks[hi].1 - marks[lo].1) / (codes[hi] - codes[lo]) as f64;
    assert!(scale < 0.0);
    for (k, &(x, y)) in marks.iter().enumerate() {
        let expected = marks[lo].1 + scale * (codes[k] - codes[lo]) as f64;
        assert!(
            (y - expected).abs() <= 1.5,
            "tap {k}: y {y}, expected {expected}"
        );
        if k > 0 {
            assert!(x > marks[k - 1].0);
        }
    }
    assert_files(dir.path(), &["table.csv", "table.svg"]);
}

#[test]
fn plot_of_a_real_table_against_a_spec_measures_it() {
    let dir = scratch();
    // The library's float Kaiser design for the silo spec, written as real values: quantized
    // by the tool, it is the Q15 table the design would ship (margin 0 here, so it may miss).
    let float = match silo_spec().kaiser::<2048>() {
        Ok(d) => d.taps.to_vec(),
        Err(e) => panic!("{e}"),
    };
    write(
        dir.path(),
        "real.txt",
        &float.iter().map(|h| format!("{h:e}\n")).collect::<String>(),
    );
    let spec = repo().join(SILO_SPEC).display().to_string();
    let out = tool(
        &[
            "--json",
            "plot",
            "--taps",
            "real.txt",
            "--written",
            "real",
            "--spec",
            &spec,
            "--out",
            "real.svg",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let v = json(&out);
    // The measurement of the quantized table, from the library directly.
    let mut q = vec![0i16; float.len()];
    tapline::design::quantize(&float, &mut q).unwrap_or_else(|e| panic!("{e}"));
    let m = silo_spec().measure(&q).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(v["measured"]["meets_spec"], m.meets());
    let reported = v["measured"]["attenuation_db"].as_f64().unwrap_or(f64::NAN);
    assert!(
        (reported - m.stopband_attenuation_db).abs() < 1e-9,
        "{reported}"
    );
    let svg = fs::read_to_string(dir.path().join("real.svg")).unwrap_or_default();
    assert!(svg.contains("float64 taps") && svg.contains("passband") && svg.contains("stopband"));
    assert!(svg.contains("symmetric: linear phase"));
    assert_eq!(circles(&svg).len(), float.len());
    // f32 tables hold real values and plot too.
    write(dir.path(), "f32.txt", "0.25 0.5 0.25\n");
    let out = tool(
        &[
            "plot", "--taps", "f32.txt", "--format", "f32", "--rate", "100", "--out", "f32.svg",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    assert!(stdout(&out).contains("3 f32 taps"), "{}", stdout(&out));
}

#[test]
fn plot_of_a_bad_table_or_no_rate_writes_nothing() {
    let dir = scratch();
    write(dir.path(), "t.txt", "100\n2x0\n");
    let cases: &[(&[&str], &str)] = &[
        (
            &[
                "plot", "--taps", "t.txt", "--rate", "1000", "--out", "t.svg",
            ],
            "t.txt:2:1: expected an integer code",
        ),
        (
            &["plot", "--taps", "t.txt", "--out", "t.svg"],
            "command line: --rate: expected a sample rate in Hz (or a spec)",
        ),
        (
            &["plot", "--taps", "t.txt", "--rate", "0", "--out", "t.svg"],
            "command line: --rate: expected a positive sample rate",
        ),
    ];
    for (args, message) in cases {
        let out = tool(args, dir.path());
        assert_bad_input(&out, message, &format!("{args:?}"));
        assert_files(dir.path(), &["t.txt"]);
    }
}

#[test]
fn plot_of_a_bad_spec_writes_nothing() {
    let dir = scratch();
    let out = tool(
        &[
            "plot",
            "--band",
            "bandstop",
            "--rate",
            "1000",
            "--edges",
            "10,20,30",
            "--attenuation",
            "40",
            "--out",
            "bad.svg",
        ],
        dir.path(),
    );
    assert_eq!(status(&out), 2);
    assert!(
        stderr(&out).contains("--edges: expected 4 edges"),
        "{}",
        stderr(&out)
    );
    assert_files(dir.path(), &[]);
}

#[test]
fn usage_mistakes_are_one_line_and_exit_2() {
    let dir = scratch();
    for args in [
        &["check", "t.txt", "--format", "q7"][..],
        &["frobnicate"][..],
        &[
            "design", "--band", "lowpass", "--rate", "1000", "--edges", "5,50",
        ][..],
        &["replay", "capture.csv"][..],
    ] {
        let out = tool(args, dir.path());
        assert_eq!(status(&out), 2, "{args:?}");
        assert_eq!(
            stderr(&out).lines().count(),
            1,
            "{args:?}: {}",
            stderr(&out)
        );
    }
    let out = tool(&["--json", "check", "t.txt", "--format", "q7"], dir.path());
    assert!(
        json(&out)["error"]
            .as_str()
            .is_some_and(|e| e.contains("q7"))
    );
    assert_files(dir.path(), &[]);
    let help = tool(&["--help"], dir.path());
    assert_eq!(status(&help), 0);
    for command in ["prepare", "design", "emit", "check", "replay", "plot"] {
        assert!(stdout(&help).contains(command), "{command}");
    }
}
