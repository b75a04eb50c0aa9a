//! The host tool's messages name their place and tell the truth (issue 15, points 5, 6, 7 and
//! 9): design-size failures name the file and key and the tool's real limit; text decoding
//! (byte-order marks, UTF-16, binary bytes, semicolons) is the same for every reader; `emit`
//! writes only names rustc accepts; an ADC narrower than its sample word needs its alignment
//! said, and every report says the one it used; plot axes read in engineering units.

mod tool_run;

use std::fs;
use std::path::Path;
use tool_run::*;

/// A spec file of our schema with the given lines after the band and rate.
fn spec_file(dir: &Path, name: &str, rest: &str) -> String {
    write(
        dir,
        name,
        &format!("band = \"lowpass\"\nsample_rate_hz = 1000\n{rest}"),
    );
    name.to_string()
}

/// `design --spec` of such a file fails as bad input with `message`; returns its stderr.
fn design_file_fails(dir: &Path, name: &str, rest: &str, message: &str) -> String {
    let name = spec_file(dir, name, rest);
    let out = tool(&["design", "--spec", &name], dir);
    assert_bad_input(&out, message, &name);
    stderr(&out)
}

// ---- point 5: design-size failures name the file, the key and the real limit ----

#[test]
fn a_spec_too_long_for_the_tool_names_the_flag_and_the_real_limit() {
    let dir = scratch();
    // 0.01 Hz of transition at 1 kHz: Kaiser's estimate is far beyond any limit.
    let narrow = words("design --band lowpass --rate 1000 --edges 100,100.01 --attenuation 80");
    let out = tool(&narrow, dir.path());
    assert_bad_input(&out, "command line: --edges: ", "too narrow, flags");
    let err = stderr(&out);
    assert!(err.contains("2048 taps") && !err.contains("65536"), "{err}");

    // 0.5 Hz: an estimate of about 10 000 taps, beyond the tool's 2048.
    let out = tool(
        &words("design --band lowpass --rate 1000 --edges 100,100.5 --attenuation 80"),
        dir.path(),
    );
    assert_bad_input(&out, "command line: --edges: ", "beyond 2048, flags");
    assert!(stderr(&out).contains("2048 taps"), "{}", stderr(&out));

    // Equiripple: the limit is the library's 1024.
    let mut equiripple = narrow.to_vec();
    equiripple.extend(["--method", "equiripple"]);
    let out = tool(&equiripple, dir.path());
    assert_bad_input(&out, "command line: --edges: ", "too narrow, equiripple");
    let err = stderr(&out);
    assert!(err.contains("1024 taps") && !err.contains("65536"), "{err}");
}

#[test]
fn a_spec_file_too_long_for_the_tool_names_the_file_line_and_key() {
    let dir = scratch();
    let err = design_file_fails(
        dir.path(),
        "narrow.toml",
        "ripple_db = 0.1\nattenuation_db = 80\nformat = \"f32\"\nedges_hz = [100, 100.01]\n",
        "narrow.toml:6:12: edges_hz: ",
    );
    // (edges_hz is on line 6, its value at column 12.)
    assert!(err.contains("2048 taps") && !err.contains("65536"), "{err}");

    let err = design_file_fails(
        dir.path(),
        "deep.toml",
        "edges_hz = [100, 101]\nripple_db = 0.1\nattenuation_db = 90\nformat = \"q15\"\nmethod = \"equiripple\"\n",
        "deep.toml:3:12: edges_hz: ",
    );
    assert!(err.contains("1024 taps"), "{err}");
}

// ---- point 5: one text decoding for specs, tap tables and captures ----

const SMOOTHER: &str = "# 1/4 1/2 1/4\n8192\n16384\n8192\n";

fn utf16le(text: &str, bom: bool) -> Vec<u8> {
    let mut bytes = if bom { vec![0xFF, 0xFE] } else { vec![] };
    for unit in text.encode_utf16() {
        bytes.extend(unit.to_le_bytes());
    }
    bytes
}

fn replay_column(dir: &Path, capture: &str, header: bool) -> std::process::Output {
    let mut args = vec!["replay", capture, "--taps", "smooth.txt"];
    if header {
        args.extend(["--channels", "adc"]);
    }
    tool(&args, dir)
}

#[test]
fn a_utf8_byte_order_mark_is_accepted_by_every_reader() {
    let dir = scratch();
    let bom = "\u{feff}";
    write(dir.path(), "smooth.txt", &format!("{bom}{SMOOTHER}"));
    let out = tool(&["check", "smooth.txt"], dir.path());
    assert_eq!(status(&out), 0, "tap table with a BOM: {}", stderr(&out));

    write(
        dir.path(),
        "capture.csv",
        &format!("{bom}adc,other\n5,1\n7,2\n"),
    );
    let out = replay_column(dir.path(), "capture.csv", true);
    assert_eq!(
        status(&out),
        0,
        "capture header with a BOM: {}",
        stderr(&out)
    );
    assert!(
        stdout(&out).contains("3 rows") || stdout(&out).contains("2 rows"),
        "{}",
        stdout(&out)
    );

    // A BOM before the first number of a capture without a header.
    write(dir.path(), "bare.txt", &format!("{bom}5\n7\n"));
    let out = replay_column(dir.path(), "bare.txt", false);
    assert_eq!(status(&out), 0, "capture with a BOM: {}", stderr(&out));

    let name = spec_file(
        dir.path(),
        "spec.toml",
        "edges_hz = [5, 50]\nripple_db = 0.1\nattenuation_db = 60\nformat = \"f32\"\n",
    );
    let text = fs::read_to_string(dir.path().join(&name)).unwrap_or_default();
    write(dir.path(), &name, &format!("{bom}{text}"));
    let out = tool(&["design", "--spec", &name], dir.path());
    assert_eq!(status(&out), 0, "spec with a BOM: {}", stderr(&out));
}

#[test]
fn utf16_is_refused_by_name_in_every_reader() {
    let dir = scratch();
    write(dir.path(), "smooth.txt", SMOOTHER);
    for bom in [true, false] {
        let what = if bom { "with BOM" } else { "without BOM" };
        fs::write(dir.path().join("t16.txt"), utf16le(SMOOTHER, bom)).unwrap_or_default();
        let out = tool(&["check", "t16.txt"], dir.path());
        assert_bad_input(&out, "t16.txt: expected UTF-8 text, found UTF-16", what);

        fs::write(dir.path().join("c16.csv"), utf16le("adc\n5\n7\n", bom)).unwrap_or_default();
        let out = replay_column(dir.path(), "c16.csv", true);
        assert_bad_input(&out, "c16.csv: expected UTF-8 text, found UTF-16", what);

        let spec = "band = \"lowpass\"\nsample_rate_hz = 1000\nedges_hz = [5, 50]\nripple_db = 0.1\nattenuation_db = 60\nformat = \"f32\"\n";
        fs::write(dir.path().join("s16.toml"), utf16le(spec, bom)).unwrap_or_default();
        let out = tool(&["design", "--spec", "s16.toml"], dir.path());
        assert_bad_input(&out, "s16.toml: expected UTF-8 text, found UTF-16", what);
    }
}

#[test]
fn a_binary_byte_is_refused_at_its_line_column_and_offset() {
    let dir = scratch();
    // Line 3, after "format = " (9 characters): byte offset 21 + 15 + 9 = 45.
    let mut spec = b"band = \"lowpass\"\nsample_rate_hz = 1000\nformat = ".to_vec();
    spec.extend([0xFF, 0x00, 0x7F, 0x80]);
    fs::write(dir.path().join("bin.toml"), &spec).unwrap_or_default();
    let out = tool(&["design", "--spec", "bin.toml"], dir.path());
    assert_bad_input(
        &out,
        "bin.toml:3:10: expected UTF-8 text, found byte 0xFF at byte offset 48",
        "binary spec",
    );

    let mut spec = b"band = \"lowpass\"\n".to_vec();
    spec.extend([0x00; 8]);
    fs::write(dir.path().join("nul.toml"), &spec).unwrap_or_default();
    let out = tool(&["design", "--spec", "nul.toml"], dir.path());
    assert_bad_input(
        &out,
        "nul.toml:2:1: expected UTF-8 text, found a NUL byte at byte offset 17",
        "NUL in spec",
    );

    // In a capture, the offset counts the lines before.
    write(dir.path(), "smooth.txt", SMOOTHER);
    let mut capture = b"5\n6\n7".to_vec();
    capture.extend([0xC3, b'\n']);
    fs::write(dir.path().join("bin.csv"), &capture).unwrap_or_default();
    let out = replay_column(dir.path(), "bin.csv", false);
    assert_bad_input(
        &out,
        "bin.csv:3:2: expected UTF-8 text, found byte 0xC3 at byte offset 5",
        "binary capture",
    );
    // A NUL is valid UTF-8: the row that holds it fails, and the NUL is named.
    fs::write(dir.path().join("nul.csv"), b"5\n6\n7\x008\n").unwrap_or_default();
    let out = replay_column(dir.path(), "nul.csv", false);
    assert_bad_input(
        &out,
        "nul.csv:3:2: expected UTF-8 text, found a NUL byte at byte offset 5",
        "NUL in capture",
    );
}

#[test]
fn a_semicolon_separated_capture_is_named_as_such() {
    let dir = scratch();
    write(dir.path(), "smooth.txt", SMOOTHER);
    // A spreadsheet export with decimal commas.
    write(dir.path(), "semi.csv", "time;adc\n0,000;806\n0,001;885\n");
    let out = tool(
        &words("replay semi.csv --taps smooth.txt --channels adc"),
        dir.path(),
    );
    assert_bad_input(&out, "semi.csv:1:5: ", "semicolon header");
    assert_bad_input(&out, "semicolon-separated", "semicolon-separated");

    write(dir.path(), "semi.txt", "806;1\n885;2\n");
    let out = replay_column(dir.path(), "semi.txt", false);
    assert_bad_input(&out, "semi.txt:1:4: ", "semicolon rows");
    assert_bad_input(&out, "semicolon-separated", "semicolon-separated");

    write(dir.path(), "semi_taps.txt", "8192;16384;8192\n");
    let out = tool(&["check", "semi_taps.txt"], dir.path());
    assert_bad_input(&out, "semi_taps.txt:1:5: ", "semicolon tap table");
    assert_bad_input(&out, "semicolon-separated", "semicolon-separated");
}

// ---- point 6: emit writes only names rustc accepts ----

#[test]
fn emit_refuses_names_rustc_would_reject() {
    let dir = scratch();
    let base = words(
        "emit --band lowpass --rate 1000 --edges 5,50 --attenuation 60 --format f32 --out taps.rs --name",
    );
    for name in ["_", "r#TAPS", "1TAPS", "", "TAPS-2", "ÄTAPS"] {
        let mut args = base.to_vec();
        args.push(name);
        let out = tool(&args, dir.path());
        assert_bad_input(&out, "command line: --name: ", name);
        assert!(
            !dir.path().join("taps.rs").exists(),
            "{name}: a file was written"
        );
    }
    let out = tool(
        &words(
            "prepare --band lowpass --rate 1000 --edges 5,50 --attenuation 60 --capture none.csv --out-dir job --name _",
        ),
        dir.path(),
    );
    assert_bad_input(&out, "command line: --name: ", "prepare _");
    // An underscore followed by something is a name.
    let mut args = base.to_vec();
    args.push("_TAPS");
    let out = tool(&args, dir.path());
    assert_eq!(status(&out), 0, "{}", stderr(&out));
    let source = fs::read_to_string(dir.path().join("taps.rs")).unwrap_or_default();
    assert!(source.contains("pub static _TAPS: [f32; "), "{source}");
}

// ---- point 7: an ADC narrower than its word needs its alignment; reports say it ----

#[test]
fn a_narrow_adc_without_its_alignment_is_refused() {
    let dir = scratch();
    let mut args = vec!["design"];
    args.extend(SILO_FLAGS);
    args.push("12");
    let out = tool(&args, dir.path());
    assert_bad_input(&out, "command line: --align: ", "design flags");
    assert_bad_input(
        &out,
        "12-bit ADC in 16-bit samples",
        "12-bit ADC in 16-bit samples",
    );

    write(dir.path(), "smooth.txt", SMOOTHER);
    let out = tool(&["check", "smooth.txt", "--adc-bits", "12"], dir.path());
    assert_bad_input(&out, "command line: --align: ", "check");
    write(dir.path(), "c.txt", "5\n7\n");
    let out = tool(
        &words("replay c.txt --taps smooth.txt --adc-bits 12"),
        dir.path(),
    );
    assert_bad_input(&out, "command line: --align: ", "replay");
    let out = tool(
        &words("plot --taps smooth.txt --rate 1000 --adc-bits 12 --out p.svg"),
        dir.path(),
    );
    assert_bad_input(&out, "command line: --align: ", "plot table");
    assert!(!dir.path().join("p.svg").exists());

    // The file: the place of adc_bits, and the key to add.
    design_file_fails(
        dir.path(),
        "silo.toml",
        "edges_hz = [5, 50]\nripple_db = 0.1\nattenuation_db = 60\nformat = \"q15\"\nadc_bits = 12\n",
        "silo.toml:7:12: expected adc_align = ",
    );

    // The whole word needs none.
    let out = tool(&["check", "smooth.txt", "--adc-bits", "16"], dir.path());
    assert_eq!(status(&out), 0, "{}", stderr(&out));
}

#[test]
fn every_report_says_which_alignment_it_assumed() {
    let dir = scratch();
    write(dir.path(), "smooth.txt", SMOOTHER);
    write(dir.path(), "c.txt", "5\n7\n");
    for align in ["left", "right"] {
        let word = format!("{align}-aligned");
        let mut design = vec!["design"];
        design.extend(SILO_FLAGS);
        design.extend(["12", "--align", align]);
        let check = vec!["check", "smooth.txt", "--adc-bits", "12", "--align", align];
        let replay = vec![
            "replay",
            "c.txt",
            "--taps",
            "smooth.txt",
            "--adc-bits",
            "12",
            "--align",
            align,
        ];
        let mut plot = vec!["plot", "--out", "p.svg"];
        plot.extend(&design[1..]);
        for args in [&design, &check, &replay, &plot] {
            let out = tool(args, dir.path());
            assert!(status(&out) < 2, "{args:?}: {}", stderr(&out));
            assert!(stdout(&out).contains(&word), "{args:?}: {}", stdout(&out));
            let mut with_json = args.to_vec();
            with_json.push("--json");
            let v = json(&tool(&with_json, dir.path()));
            assert_eq!(v["adc"]["align"], align, "{args:?}: {v}");
            assert_eq!(v["adc"]["bits"], 12, "{args:?}: {v}");
            assert_eq!(v["adc"]["word_bits"], 16, "{args:?}: {v}");
        }
    }
    // The whole word: no alignment to assume, and the report says so.
    let out = tool(&["check", "smooth.txt", "--json"], dir.path());
    let v = json(&out);
    assert_eq!(v["adc"]["align"], "whole word", "{v}");
    let out = tool(&["check", "smooth.txt"], dir.path());
    assert!(
        stdout(&out).contains("full 16-bit sample word"),
        "{}",
        stdout(&out)
    );
}

#[test]
fn the_silo_spec_by_flags_and_by_file_agree() {
    // The case: the same spec by flags and by the example file must give one verdict.
    let repo = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut flags = vec!["design", "--json"];
    flags.extend(SILO_FLAGS);
    flags.extend(["12", "--align", "right"]);
    let by_flags = json(&tool(&flags, repo));
    let by_file = json(&tool(
        &[
            "design",
            "--json",
            "--spec",
            "examples/tool/silo_scale.toml",
        ],
        repo,
    ));
    assert_eq!(by_flags["safe"], true, "{by_flags}");
    assert_eq!(by_flags["safe"], by_file["safe"]);
    assert_eq!(by_flags["adc"], by_file["adc"]);
    assert_eq!(by_flags["values"], by_file["values"]);
}

// ---- point 9: plots in engineering units, log axes over decades, legends clear of curves ----

/// The SVG's text elements in document order: (x, y, text), with XML entities as written.
fn texts(svg: &str) -> Vec<(f64, f64, String)> {
    let attr = |tag: &str, name: &str| -> f64 {
        tag.split_once(&format!(" {name}=\""))
            .and_then(|(_, rest)| rest.split_once('"'))
            .and_then(|(v, _)| v.parse().ok())
            .unwrap_or(f64::NAN)
    };
    svg.split("<text")
        .skip(1)
        .filter_map(|chunk| {
            let (tag, rest) = chunk.split_once('>')?;
            let (body, _) = rest.split_once("</text>")?;
            Some((attr(tag, "x"), attr(tag, "y"), body.trim().to_string()))
        })
        .collect()
}

fn plot_svg(dir: &Path, args: &[&str]) -> String {
    let mut all = vec!["plot", "--out", "p.svg"];
    all.extend(args);
    let out = tool(&all, dir);
    assert_eq!(status(&out), 0, "{args:?}: {}", stderr(&out));
    fs::read_to_string(dir.join("p.svg")).unwrap_or_default()
}

fn labels(svg: &str) -> Vec<String> {
    texts(svg).into_iter().map(|(_, _, t)| t).collect()
}

#[test]
fn a_2_mhz_plot_reads_in_khz_and_mhz_with_no_long_numbers() {
    let dir = scratch();
    for band in [
        ["lowpass", "200000,300000"],
        ["highpass", "100000,200000"],
        ["bandstop", "300000,350000,450000,500000"],
    ] {
        let svg = plot_svg(
            dir.path(),
            &[
                "--band",
                band[0],
                "--rate",
                "2000000",
                "--edges",
                band[1],
                "--attenuation",
                "40",
            ],
        );
        let l = labels(&svg);
        assert!(l.iter().any(|t| t == "frequency (MHz)"), "{band:?}: {l:?}");
        // Ticks 0, 0.1, ... 1 (MHz) up to the axis's end; nothing like 1000000 or 300000.
        assert!(
            l.iter().any(|t| t == "0.5") && l.iter().any(|t| t == "1"),
            "{band:?}: {l:?}"
        );
        assert!(!l.iter().any(|t| t.contains("00000")), "{band:?}: {l:?}");
        assert!(
            l.iter().any(|t| t.contains("at 2 MHz")),
            "{band:?}: the spec line in MHz"
        );
    }
}

#[test]
fn bands_spanning_decades_get_a_log_frequency_axis_and_an_option_overrides_it() {
    let dir = scratch();
    // 0–20 Hz at 1 kHz: a sliver on a linear axis.
    let lowpass = words("--band lowpass --rate 1000 --edges 20,50 --attenuation 60");
    let svg = plot_svg(dir.path(), &lowpass);
    let l = labels(&svg);
    assert!(
        l.iter().any(|t| t.starts_with("frequency (log scale")),
        "{l:?}"
    );
    for tick in ["1 Hz", "10 Hz", "20 Hz", "100 Hz", "500 Hz"] {
        assert!(l.iter().any(|t| t == tick), "{tick}: {l:?}");
    }
    // 2 MHz, a bandpass from 20 kHz: labels in Hz, kHz and MHz on one log axis.
    let svg = plot_svg(
        dir.path(),
        &words("--band bandpass --rate 2000000 --edges 5000,20000,100000,150000 --attenuation 50"),
    );
    let l = labels(&svg);
    for tick in ["100 Hz", "1 kHz", "100 kHz", "1 MHz"] {
        assert!(l.iter().any(|t| t == tick), "{tick}: {l:?}");
    }
    let mut linear = lowpass.to_vec();
    linear.extend(["--freq-scale", "linear"]);
    let l = labels(&plot_svg(dir.path(), &linear));
    assert!(!l.iter().any(|t| t.contains("log scale")), "{l:?}");
    assert!(l.iter().any(|t| t == "frequency (Hz)"), "{l:?}");
    let mut log = words("--band highpass --rate 1000 --edges 100,150 --attenuation 60");
    let l = labels(&plot_svg(dir.path(), &log));
    assert!(
        !l.iter().any(|t| t.contains("log scale")),
        "auto: linear for 100 Hz of 500"
    );
    log.extend(["--freq-scale", "log"]);
    let l = labels(&plot_svg(dir.path(), &log));
    assert!(l.iter().any(|t| t.contains("log scale")), "{l:?}");
}

#[test]
fn legends_sit_above_their_charts_and_the_close_up_has_its_own() {
    let dir = scratch();
    let svg = plot_svg(
        dir.path(),
        &words("--band bandpass --rate 1000 --edges 50,80,150,200 --attenuation 50"),
    );
    let t = texts(&svg);
    let index = |what: &str, from: usize| {
        t.iter()
            .skip(from)
            .position(|(_, _, s)| s == what)
            .map(|k| k + from)
            .unwrap_or_else(|| panic!("no {what:?} after {from}: {t:?}"))
    };
    // Each panel: its caption, its legend, then the y axis title and labels. Every legend
    // entry lies above the highest y label, that is above the plotting area.
    for (caption, entries) in [
        (
            "magnitude response",
            &["passband", "stopband", "float64 taps", "Q15 taps"][..],
        ),
        (
            "passband close-up (ripple limit 0.1 dB peak to peak)",
            &[
                "float64 taps",
                "Q15 taps",
                "ripple limit (highest gain, and that less the ripple)",
            ][..],
        ),
    ] {
        let start = index(caption, 0);
        let axis = index("gain (dB)", start);
        let top = t
            .iter()
            .skip(axis + 1)
            .take_while(|(_, _, s)| s.parse::<f64>().is_ok())
            .fold(f64::MAX, |m, &(_, y, _)| m.min(y));
        for entry in entries {
            let k = index(entry, start);
            assert!(k < axis, "{caption}: {entry} is not in the panel's legend");
            assert!(
                t[k].1 + 16.0 < top,
                "{caption}: {entry} at y {} overlaps the chart (top {top})",
                t[k].1
            );
        }
    }
    // The attenuation limit is dashed in the chart, so its legend swatch is dashed too: short
    // segments of the chart's width and dash length on the line of the legend text.
    let limit = index("attenuation limit, -50 dB", 0);
    let line_y = t[limit].1 + 8.0;
    let segments: Vec<(f64, f64)> = svg
        .split("<polyline")
        .skip(1)
        .filter(|p| p.contains("stroke=\"#3C3C3C\"") && p.contains("stroke-width=\"2\""))
        .filter_map(|p| {
            let points = p.split_once("points=\"")?.1.split_once('"')?.0;
            let xy: Vec<f64> = points
                .split([' ', ','])
                .filter_map(|v| v.parse().ok())
                .collect();
            match xy.as_slice() {
                [x0, y0, x1, y1] if *y0 == line_y && *y1 == line_y => Some((*x0, *x1)),
                _ => None,
            }
        })
        .collect();
    assert!(segments.len() >= 3, "no dashed legend swatch: {segments:?}");
    assert!(segments.iter().all(|(a, b)| b - a <= 8.0), "{segments:?}");
}

#[test]
fn the_impulse_response_shows_codes_for_fixed_point() {
    let dir = scratch();
    let spec = words("--band lowpass --rate 1000 --edges 100,200 --attenuation 40");
    let mut q15 = spec.to_vec();
    q15.extend(["--format", "q15", "--json"]);
    let svg = plot_svg(dir.path(), &q15);
    let l = labels(&svg);
    assert!(l.iter().any(|t| t == "tap code (value x 32768)"), "{l:?}");
    // The codes of the largest tap appear as whole numbers on the axis, not fractions below 1.
    let axis = l
        .iter()
        .position(|t| t == "tap code (value x 32768)")
        .unwrap_or(0);
    let ticks: Vec<f64> = l
        .iter()
        .skip(axis + 1)
        .filter_map(|t| t.parse().ok())
        .collect();
    assert!(ticks.iter().any(|&v| v >= 1000.0), "{ticks:?}");
    assert!(ticks.iter().all(|v| v.fract() == 0.0), "{ticks:?}");
    let mut f32 = spec.to_vec();
    f32.extend(["--format", "f32"]);
    let l = labels(&plot_svg(dir.path(), &f32));
    assert!(l.iter().any(|t| t == "tap value"), "{l:?}");
}
