//! `plot`: one SVG page for a design review — a header with the spec and the measured figures,
//! the magnitude response in dB of the float and the quantized (shipped) taps with the spec's
//! bands shaded and the attenuation limit drawn, a close-up of the passband with the ripple
//! limit, and the impulse response of the shipped taps. For a design from a spec, or for an
//! existing tap table (with a spec to measure it against, or just a sample rate).

use crate::Rounding;
use crate::design::{Measured, response_at};
use crate::tool::failure::Failure;
use crate::tool::input::spec::{BandKind, Chosen};
use crate::tool::input::taps::{Adc, Codes, Format};
use crate::tool::jobs::design::{Designed, Taps};
use crate::tool::output::atomic;
use crate::tool::output::report::Report;
use plotters::coord::Shift;
use plotters::prelude::*;
use serde_json::{Value, json};
use std::path::{Path, PathBuf};
use std::prelude::rust_2024::*;
use std::{format, vec};

/// Frequencies evaluated across each axis.
const POINTS: usize = 1500;
/// The floor of the dB axes: exact zeros of the response would be −∞.
const FLOOR_DB: f64 = -160.0;
/// Page size in pixels.
const PAGE: (u32, u32) = (1200, 1560);

const FLOAT_COLOR: RGBColor = RGBColor(31, 90, 170);
const SHIPPED_COLOR: RGBColor = RGBColor(214, 84, 20);
const PASS_FILL: RGBAColor = RGBAColor(40, 160, 60, 0.13);
const STOP_FILL: RGBAColor = RGBAColor(200, 40, 40, 0.10);
const LIMIT_COLOR: RGBColor = RGBColor(60, 60, 60);
const GRID: RGBColor = RGBColor(243, 243, 243);
const FONT: &str = "sans-serif";

/// What one page shows.
pub struct Figure<'a> {
    pub title: String,
    /// Lines under the title: the spec and the measured figures.
    pub notes: Vec<String>,
    pub sample_rate_hz: f64,
    /// The float taps the shipped ones come from, if known.
    pub float: Option<Vec<f64>>,
    /// The taps the firmware runs, as real values (codes / 2^F for fixed point: exact in f64).
    pub shipped: Vec<f64>,
    /// Their format, for the legend ("Q15", "f32").
    pub shipped_label: String,
    /// The spec the bands and limits come from, if any.
    pub spec: Option<&'a Chosen>,
}

fn db(taps: &[f64], f: f64, fs: f64) -> f64 {
    response_at::<f64, f64>(taps, f, fs)
        .magnitude_db()
        .max(FLOOR_DB)
}

fn curve(taps: &[f64], lo: f64, hi: f64, fs: f64) -> Vec<(f64, f64)> {
    (0..=POINTS)
        .map(|k| {
            let f = lo + (hi - lo) * k as f64 / POINTS as f64;
            (f, db(taps, f, fs))
        })
        .collect()
}

/// (passbands, stopbands) in Hz.
type Bands = (Vec<(f64, f64)>, Vec<(f64, f64)>);

fn bands(c: &Chosen) -> Bands {
    let e = &c.edges;
    let half = c.spec.sample_rate_hz / 2.0;
    let at = |k: usize| e.get(k).copied().unwrap_or(0.0);
    match c.band {
        BandKind::Lowpass => (vec![(0.0, at(0))], vec![(at(1), half)]),
        BandKind::Highpass => (vec![(at(1), half)], vec![(0.0, at(0))]),
        BandKind::Bandpass => (vec![(at(1), at(2))], vec![(0.0, at(0)), (at(3), half)]),
        BandKind::Bandstop => (vec![(0.0, at(0)), (at(3), half)], vec![(at(1), at(2))]),
    }
}

/// A tick label without trailing zeros: 50 rather than 50.0, 0.25 rather than 0.250000.
fn tick(v: &f64) -> String {
    let text = format!("{:.6}", v);
    let text = text.trim_end_matches('0').trim_end_matches('.');
    if text == "-0" {
        String::from("0")
    } else {
        text.to_string()
    }
}

/// The widest run of frequencies where the gain is within 3 dB of its peak (a passband when
/// no spec names one).
fn auto_passband(taps: &[f64], fs: f64) -> (f64, f64) {
    let c = curve(taps, 0.0, fs / 2.0, fs);
    let peak = c.iter().fold(FLOOR_DB, |m, &(_, g)| m.max(g));
    let mut best = (0.0, fs / 2.0, -1.0);
    let mut start: Option<f64> = None;
    let mut last = 0.0;
    for &(f, g) in &c {
        if g >= peak - 3.0 {
            start.get_or_insert(f);
            last = f;
        } else if let Some(s) = start.take() {
            if last - s > best.2 {
                best = (s, last, last - s);
            }
        }
    }
    if let Some(s) = start {
        if last - s > best.2 {
            best = (s, last, last - s);
        }
    }
    if best.1 > best.0 {
        (best.0, best.1)
    } else {
        (0.0, fs / 2.0)
    }
}

type Chart<'b> = ChartContext<
    'b,
    SVGBackend<'b>,
    Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
>;

/// A tick label for a whole-number axis (tap index): none between the integers.
fn whole_tick(v: &f64) -> String {
    if (v - v.round()).abs() < 1e-9 {
        tick(&v.round())
    } else {
        String::new()
    }
}

fn frame<'b>(
    area: &DrawingArea<SVGBackend<'b>, Shift>,
    caption: &str,
    x: std::ops::Range<f64>,
    y: std::ops::Range<f64>,
    x_desc: &str,
    y_desc: &str,
) -> Result<Chart<'b>, Box<dyn std::error::Error>> {
    frame_with(area, caption, x, y, (x_desc, &tick), y_desc)
}

type Formatter<'f> = &'f dyn Fn(&f64) -> String;

fn frame_with<'b>(
    area: &DrawingArea<SVGBackend<'b>, Shift>,
    caption: &str,
    x: std::ops::Range<f64>,
    y: std::ops::Range<f64>,
    (x_desc, x_format): (&str, Formatter),
    y_desc: &str,
) -> Result<Chart<'b>, Box<dyn std::error::Error>> {
    let mut chart = ChartBuilder::on(area)
        .caption(caption, (FONT, 22))
        .margin(14)
        .x_label_area_size(52)
        .y_label_area_size(78)
        .build_cartesian_2d(x, y)?;
    chart
        .configure_mesh()
        .light_line_style(GRID)
        .bold_line_style(RGBColor(205, 205, 205))
        .label_style((FONT, 16))
        .axis_desc_style((FONT, 18))
        .x_label_formatter(x_format)
        .y_label_formatter(&tick)
        .x_desc(x_desc)
        .y_desc(y_desc)
        .draw()?;
    Ok(chart)
}

fn draw(f: &Figure, svg: &mut String) -> Result<(), Box<dyn std::error::Error>> {
    let fs = f.sample_rate_hz;
    let half = fs / 2.0;
    let root = SVGBackend::with_string(svg, PAGE).into_drawing_area();
    root.fill(&WHITE)?;
    let header_height = 60 + 26 * f.notes.len() as u32;
    let (header, rest) = root.split_vertically(header_height);
    let (top, rest) = rest.split_vertically(560);
    let (middle, bottom) = rest.split_vertically(400);

    // Header: the title and the figures a reviewer asks for first.
    header.draw(&Text::new(
        f.title.clone(),
        (24, 14),
        (FONT, 28).into_font().style(FontStyle::Bold),
    ))?;
    for (k, note) in f.notes.iter().enumerate() {
        header.draw(&Text::new(
            note.clone(),
            (24, 54 + 26 * k as i32),
            (FONT, 18).into_font(),
        ))?;
    }

    let shipped = curve(&f.shipped, 0.0, half, fs);
    let float = f.float.as_ref().map(|t| curve(t, 0.0, half, fs));
    let (pass, stop) = f.spec.map(bands).unwrap_or_default();

    // 1. The whole response.
    let lowest = shipped
        .iter()
        .chain(float.iter().flatten())
        .fold(0.0f64, |m, &(_, g)| m.min(g));
    let peak = shipped
        .iter()
        .chain(float.iter().flatten())
        .fold(FLOOR_DB, |m, &(_, g)| m.max(g));
    let low = match f.spec {
        Some(c) => -c.spec.stopband_attenuation_db - 40.0,
        None => (lowest / 20.0).floor() * 20.0,
    }
    .max(FLOOR_DB);
    let high = (peak / 10.0).ceil() * 10.0 + 10.0;
    let mut chart = frame(
        &top,
        "magnitude response",
        0.0..half,
        low..high,
        "frequency (Hz)",
        "gain (dB)",
    )?;
    for (k, &(a, b)) in pass.iter().enumerate() {
        let s = chart.draw_series(std::iter::once(Rectangle::new(
            [(a, low), (b, high)],
            PASS_FILL.filled(),
        )))?;
        if k == 0 {
            s.label("passband")
                .legend(|(x, y)| Rectangle::new([(x, y - 7), (x + 22, y + 7)], PASS_FILL.filled()));
        }
    }
    for (k, &(a, b)) in stop.iter().enumerate() {
        let s = chart.draw_series(std::iter::once(Rectangle::new(
            [(a, low), (b, high)],
            STOP_FILL.filled(),
        )))?;
        if k == 0 {
            s.label("stopband")
                .legend(|(x, y)| Rectangle::new([(x, y - 7), (x + 22, y + 7)], STOP_FILL.filled()));
        }
    }
    if let Some(c) = f.spec {
        let limit = -c.spec.stopband_attenuation_db;
        for (k, &(a, b)) in stop.iter().enumerate() {
            let s = chart.draw_series(DashedLineSeries::new(
                [(a, limit), (b, limit)],
                8,
                5,
                LIMIT_COLOR.stroke_width(2),
            ))?;
            if k == 0 {
                s.label(format!("attenuation limit, {limit} dB"))
                    .legend(|(x, y)| PathElement::new([(x, y), (x + 22, y)], LIMIT_COLOR));
            }
        }
    }
    if let Some(float) = &float {
        chart
            .draw_series(LineSeries::new(
                float.iter().copied(),
                FLOAT_COLOR.stroke_width(3),
            ))?
            .label("float64 taps")
            .legend(|(x, y)| PathElement::new([(x, y), (x + 22, y)], FLOAT_COLOR.stroke_width(3)));
    }
    chart
        .draw_series(LineSeries::new(
            shipped.iter().copied(),
            SHIPPED_COLOR.stroke_width(2),
        ))?
        .label(format!("{} taps", f.shipped_label))
        .legend(|(x, y)| PathElement::new([(x, y), (x + 22, y)], SHIPPED_COLOR.stroke_width(2)));
    // The worst stopband point of the shipped taps, labelled.
    if let Some(c) = f.spec {
        if let Ok(m) = c.spec.measure(&f.shipped) {
            let at = m.stopband.max_at_hz;
            let g = -m.stopband_attenuation_db;
            // A diamond, so that the circles stay one per tap.
            let (dx, dy) = (half * 0.008, (high - low) * 0.015);
            chart.draw_series(std::iter::once(Polygon::new(
                vec![(at - dx, g), (at, g + dy), (at + dx, g), (at, g - dy)],
                SHIPPED_COLOR.filled(),
            )))?;
            let x = if at < half * 0.6 {
                at + half * 0.015
            } else {
                at - half * 0.3
            };
            chart.draw_series(std::iter::once(Text::new(
                format!("worst: {g:.2} dB at {at:.1} Hz"),
                (x, g + (high - low) * 0.06),
                (FONT, 16).into_font(),
            )))?;
            mark_transition_peak(&mut chart, &m, half, (low, high))?;
        }
    }
    chart
        .configure_series_labels()
        .position(SeriesLabelPosition::UpperRight)
        .label_font((FONT, 16))
        .background_style(WHITE.mix(0.9))
        .border_style(BLACK)
        .draw()?;

    // 2. The passband, close up.
    let (zoom_bands, what): (Vec<(f64, f64)>, String) = match f.spec {
        Some(c) => (
            pass.clone(),
            format!(
                "passband close-up (ripple limit {} dB peak to peak, dashed)",
                c.spec.passband_ripple_db
            ),
        ),
        None => {
            let band = auto_passband(&f.shipped, fs);
            (
                vec![band],
                String::from("passband close-up (where the gain is within 3 dB of its peak)"),
            )
        }
    };
    let lo = zoom_bands.iter().fold(f64::MAX, |m, &(a, _)| m.min(a));
    let hi = zoom_bands.iter().fold(f64::MIN, |m, &(_, b)| m.max(b));
    let zoomed: Vec<Vec<(f64, f64)>> = zoom_bands
        .iter()
        .map(|&(a, b)| curve(&f.shipped, a, b, fs))
        .collect();
    let zoomed_float: Vec<Vec<(f64, f64)>> = match &f.float {
        Some(t) => zoom_bands
            .iter()
            .map(|&(a, b)| curve(t, a, b, fs))
            .collect(),
        None => Vec::new(),
    };
    let all = zoomed.iter().chain(&zoomed_float).flatten();
    let (g_min, g_max) = all
        .clone()
        .fold((f64::MAX, f64::MIN), |(l, h), &(_, g)| (l.min(g), h.max(g)));
    let (y_lo, y_hi) = match f.spec {
        Some(c) => {
            let r = c.spec.passband_ripple_db;
            (g_max - 1.5 * r, g_max + 0.5 * r)
        }
        None => {
            let pad = ((g_max - g_min) * 0.15).max(0.01);
            (g_min - pad, g_max + pad)
        }
    };
    let mut zoom = frame(
        &middle,
        &what,
        lo..hi,
        y_lo..y_hi,
        "frequency (Hz)",
        "gain (dB)",
    )?;
    if let Some(c) = f.spec {
        // Peak to peak: every passband gain must lie within `ripple` below the highest one.
        let r = c.spec.passband_ripple_db;
        for level in [g_max, g_max - r] {
            zoom.draw_series(DashedLineSeries::new(
                [(lo, level), (hi, level)],
                8,
                5,
                LIMIT_COLOR.stroke_width(2),
            ))?;
        }
    }
    for band in &zoomed_float {
        zoom.draw_series(LineSeries::new(
            band.iter().copied(),
            FLOAT_COLOR.stroke_width(3),
        ))?;
    }
    for band in &zoomed {
        zoom.draw_series(LineSeries::new(
            band.iter().copied(),
            SHIPPED_COLOR.stroke_width(2),
        ))?;
    }

    // 3. The impulse response of the shipped taps: one stem and marker per tap.
    let peak_tap = f
        .shipped
        .iter()
        .fold(0.0f64, |m, h| m.max(h.abs()))
        .max(1e-12);
    let n = f.shipped.len();
    let mirrored = |sign: f64| {
        f.shipped
            .iter()
            .zip(f.shipped.iter().rev())
            .all(|(a, b)| *a == sign * *b)
    };
    let delay = (n as f64 - 1.0) / 2.0;
    let delay = format!(
        "group delay {} sample{}",
        tick(&delay),
        if delay == 1.0 { "" } else { "s" }
    );
    let phase = if mirrored(1.0) {
        format!("symmetric: linear phase, {delay}")
    } else if mirrored(-1.0) {
        format!("antisymmetric: linear phase, {delay}")
    } else {
        String::from("not symmetric: the group delay varies with frequency")
    };
    let (first, last) = (-0.5, n as f64 - 0.5);
    let mut impulse = frame_with(
        &bottom,
        &format!(
            "impulse response: the {n} {} taps ({phase})",
            f.shipped_label
        ),
        first..last,
        -peak_tap * 1.2..peak_tap * 1.2,
        ("tap index", &whole_tick),
        "tap value",
    )?;
    impulse.draw_series(std::iter::once(PathElement::new(
        [(first, 0.0), (last, 0.0)],
        LIMIT_COLOR,
    )))?;
    impulse.draw_series(
        f.shipped
            .iter()
            .enumerate()
            .map(|(k, &h)| PathElement::new([(k as f64, 0.0), (k as f64, h)], SHIPPED_COLOR)),
    )?;
    let marker = if n > 300 { 1 } else { 3 };
    impulse.draw_series(
        f.shipped
            .iter()
            .enumerate()
            .map(|(k, &h)| Circle::new((k as f64, h), marker, SHIPPED_COLOR.filled())),
    )?;
    root.present()?;
    Ok(())
}

/// The SVG text of `figure`.
pub fn render(figure: &Figure) -> Result<String, Failure> {
    let mut svg = String::new();
    draw(figure, &mut svg).map_err(|e| Failure::plain(format!("plot: {e}")))?;
    Ok(svg)
}

/// Draws `figure` and writes it to `out` atomically.
pub fn write(figure: &Figure, out: &Path) -> Result<(), Failure> {
    atomic::write(out, render(figure)?.as_bytes())
}

/// The shipped taps of a design as real values.
fn shipped(taps: &Taps) -> Vec<f64> {
    match taps {
        Taps::Fixed(c) => fixed_reals(c),
        Taps::Float(v) => v.iter().map(|&x| f64::from(x)).collect(),
    }
}

fn fixed_reals(c: &Codes) -> Vec<f64> {
    let scale = match c {
        Codes::Q15(_) => f64::from(1u32 << 15),
        Codes::Q31(_) => f64::from(1u32 << 31),
    };
    c.raw().iter().map(|&v| v as f64 / scale).collect()
}

fn spec_line(c: &Chosen) -> String {
    let e = |k: usize| c.edges.get(k).map_or_else(String::new, tick);
    let half = tick(&(c.spec.sample_rate_hz / 2.0));
    let s = &c.spec;
    let bands = match c.band {
        BandKind::Lowpass => format!("pass 0-{} Hz, stop {}-{half} Hz", e(0), e(1)),
        BandKind::Highpass => format!("stop 0-{} Hz, pass {}-{half} Hz", e(0), e(1)),
        BandKind::Bandpass => format!(
            "stop 0-{} Hz, pass {}-{} Hz, stop {}-{half} Hz",
            e(0),
            e(1),
            e(2),
            e(3)
        ),
        BandKind::Bandstop => format!(
            "pass 0-{} Hz, stop {}-{} Hz, pass {}-{half} Hz",
            e(0),
            e(1),
            e(2),
            e(3)
        ),
    };
    format!(
        "spec: {} at {} Hz: {bands}; ripple <= {} dB, attenuation >= {} dB",
        c.band.name(),
        tick(&s.sample_rate_hz),
        s.passband_ripple_db,
        s.stopband_attenuation_db
    )
}

fn measured_line(label: &str, m: &Measured<f64>) -> String {
    format!(
        "{label}: ripple {:.4} dB, attenuation {:.2} dB -> {}",
        m.passband_ripple_db,
        m.stopband_attenuation_db,
        if m.meets() {
            "meets the spec"
        } else {
            "MISSES the spec"
        }
    )
}

/// The largest transition-band gain of the shipped taps (where an equiripple design would
/// overshoot): a small upward triangle at it and a label with its gain and frequency, the
/// gain clamped to the axis so that the mark stays on the page.
fn mark_transition_peak(
    chart: &mut ChartContext<
        '_,
        SVGBackend<'_>,
        Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
    >,
    m: &Measured<f64>,
    half: f64,
    (low, high): (f64, f64),
) -> Result<(), Box<dyn std::error::Error>> {
    let at = m.transition.max_at_hz;
    let peak = m.transition_peak_db();
    let g = peak.clamp(low, high);
    let (dx, dy) = (half * 0.007, (high - low) * 0.014);
    chart.draw_series(std::iter::once(Polygon::new(
        vec![(at - dx, g - dy), (at + dx, g - dy), (at, g + dy)],
        LIMIT_COLOR.filled(),
    )))?;
    let x = if at < half * 0.6 {
        at + half * 0.015
    } else {
        at - half * 0.36
    };
    chart.draw_series(std::iter::once(Text::new(
        format!("largest transition gain: {peak:+.2} dB at {at:.1} Hz"),
        (x, (g - (high - low) * 0.05).max(low)),
        (FONT, 16).into_font(),
    )))?;
    Ok(())
}

/// The page for a design from a spec.
pub fn design_figure(d: &Designed) -> Figure<'_> {
    let c = &d.chosen;
    let format = c.format.name();
    let how = match &d.how {
        crate::tool::jobs::design::How::Window { beta, .. } => {
            format!("Kaiser window (beta {beta:.3})")
        }
        crate::tool::jobs::design::How::Equiripple { .. } => {
            String::from("equiripple (Parks-McClellan)")
        }
    };
    let gd = d.group_delay_samples();
    let mut notes = vec![
        spec_line(c),
        format!(
            "{} {format} taps, {how}; group delay {gd} samples = {} ms",
            d.len(),
            tick(&(gd / c.spec.sample_rate_hz * 1000.0))
        ),
        format!(
            "{}; {}",
            measured_line("float64", &d.float_measured),
            measured_line(format, &d.measured)
        ),
    ];
    if let Some((h, b)) = &d.proof {
        notes.push(format!(
            "headroom ({}): {}; error bound vs float64 {:.2} LSB",
            c.adc.describe(c.format.word_bits()),
            if h.is_safe(Rounding::HalfUp) {
                "SAFE"
            } else {
                "CAN OVERFLOW"
            },
            b.lsb()
        ));
    }
    Figure {
        title: format!(
            "{} FIR, {} {format} taps: design review",
            c.band.name(),
            d.len()
        ),
        notes,
        sample_rate_hz: c.spec.sample_rate_hz,
        float: Some(d.ideal.clone()),
        shipped: shipped(&d.taps),
        shipped_label: format.to_string(),
        spec: Some(c),
    }
}

pub fn plot(d: &Designed, out: &Path) -> Result<Report, Failure> {
    write(&design_figure(d), out)?;
    let mut text = d.summary();
    text.push_str(&format!("plot written to {}\n", out.display()));
    let mut json = d.json("plot");
    if let Some(map) = json.as_object_mut() {
        map.insert("file".into(), json!(out.display().to_string()));
    }
    Ok(Report {
        text,
        json,
        status: 0,
    })
}

/// An existing tap table to plot.
pub struct TableRequest {
    pub table: PathBuf,
    pub format: Format,
    /// The taps as the firmware runs them, and the float taps they stand for (None for a table
    /// of codes: the codes are all there is).
    pub taps: Taps,
    pub float: Option<Vec<f64>>,
    /// A spec to draw and measure against, or only a sample rate.
    pub spec: Option<Chosen>,
    pub sample_rate_hz: f64,
    pub adc: Adc,
    pub out: PathBuf,
}

pub fn plot_table(r: &TableRequest) -> Result<Report, Failure> {
    let shipped = shipped(&r.taps);
    let label = r.format.name();
    let n = shipped.len();
    let written = if r.float.is_some() {
        "real values, quantized"
    } else {
        "integer codes"
    };
    let mut notes = vec![format!(
        "{}: {n} {label} taps ({}), sample rate {} Hz",
        r.table.display(),
        if r.format == Format::F32 {
            "real values, rounded to f32"
        } else {
            written
        },
        tick(&r.sample_rate_hz)
    )];
    let mut json = json!({
        "command": "plot",
        "table": r.table.display().to_string(),
        "format": label,
        "taps": n,
        "sample_rate_hz": r.sample_rate_hz,
        "file": r.out.display().to_string(),
    });
    let mut measured_json: Option<Value> = None;
    if let Some(c) = &r.spec {
        notes.push(spec_line(c));
        let m = c
            .spec
            .measure(&shipped)
            .map_err(|e| Failure::plain(format!("plot: {e}")))?;
        let mut line = measured_line(label, &m);
        if let Some(float) = &r.float {
            if let Ok(fm) = c.spec.measure(float) {
                line = format!("{}; {line}", measured_line("float64", &fm));
            }
        }
        notes.push(line);
        measured_json = Some(json!({
            "ripple_db": m.passband_ripple_db,
            "attenuation_db": m.stopband_attenuation_db,
            "meets_spec": m.meets(),
        }));
    }
    let mut safe = None;
    if let Taps::Fixed(codes) = &r.taps {
        let word = r.format.word_bits();
        let input = r
            .adc
            .range(word)
            .map_err(|e| Failure::argument("--adc-bits", format!("{e}: expected 1..={word}")))?;
        let h = codes.headroom(input);
        let is_safe = h.is_safe(Rounding::HalfUp);
        safe = Some(is_safe);
        notes.push(format!(
            "headroom ({}): {}; sum |h| = {:.6}, DC gain = {:.6}",
            r.adc.describe(word),
            if is_safe { "SAFE" } else { "CAN OVERFLOW" },
            h.l1_norm(),
            h.dc_gain()
        ));
    }
    let figure = Figure {
        title: format!("tap table {}: {n} {label} taps", file_name(&r.table)),
        notes,
        sample_rate_hz: r.sample_rate_hz,
        float: r.float.clone(),
        shipped,
        shipped_label: label.to_string(),
        spec: r.spec.as_ref(),
    };
    write(&figure, &r.out)?;
    let mut text: String = figure.notes.iter().map(|l| format!("{l}\n")).collect();
    text.push_str(&format!("plot written to {}\n", r.out.display()));
    if let Some(map) = json.as_object_mut() {
        map.insert("measured".into(), json!(measured_json));
        map.insert("safe".into(), json!(safe));
    }
    Ok(Report {
        text,
        json,
        status: 0,
    })
}

fn file_name(path: &Path) -> String {
    path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    )
}
