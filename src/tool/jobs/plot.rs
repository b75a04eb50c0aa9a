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
use crate::tool::jobs::plot_axes::{FreqAxis, FreqScaleArg, engineering};
use crate::tool::output::atomic;
use crate::tool::output::report::Report;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
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
/// Line widths of the response curves, in the charts and in their legends alike.
const FLOAT_WIDTH: u32 = 3;
const SHIPPED_WIDTH: u32 = 2;
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
    /// Fixed point: codes per unit (2^15, 2^31), so the impulse response shows the codes.
    pub code_scale: Option<f64>,
    /// How the frequency axes are scaled.
    pub freq_scale: FreqScaleArg,
}

fn db(taps: &[f64], f: f64, fs: f64) -> f64 {
    response_at::<f64, f64>(taps, f, fs)
        .magnitude_db()
        .max(FLOOR_DB)
}

fn curve(taps: &[f64], lo: f64, hi: f64, fs: f64) -> Vec<(f64, f64)> {
    curve_on(
        taps,
        &FreqAxis {
            lo_hz: lo,
            hi_hz: hi,
            log: false,
        },
        fs,
    )
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
type Area<'b> = DrawingArea<SVGBackend<'b>, Shift>;
type Drawn = Result<(), Box<dyn std::error::Error>>;
type Formatter<'f> = &'f dyn Fn(&f64) -> String;

/// A tick label for a whole-number axis (tap index, codes): none between the integers.
fn whole_tick(v: &f64) -> String {
    if (v - v.round()).abs() < 1e-9 {
        tick(&v.round())
    } else {
        String::new()
    }
}

/// What a legend entry shows: a sample of the element exactly as the chart draws it.
#[derive(Clone, Copy)]
enum Swatch {
    Line { color: RGBColor, width: u32 },
    Dashed { color: RGBColor, width: u32 },
    Fill(RGBAColor),
    Diamond(RGBColor),
    Triangle(RGBColor),
}

/// One legend entry.
struct Key {
    label: String,
    swatch: Swatch,
}

/// The legend entries of the response curves: the float64 taps (when drawn) and the shipped
/// ones, with the widths their series are drawn with.
fn taps_keys(keys: &mut Vec<Key>, float: bool, shipped_label: &str) {
    if float {
        keys.push(key(
            "float64 taps",
            Swatch::Line {
                color: FLOAT_COLOR,
                width: FLOAT_WIDTH,
            },
        ));
    }
    keys.push(key(
        format!("{shipped_label} taps"),
        Swatch::Line {
            color: SHIPPED_COLOR,
            width: SHIPPED_WIDTH,
        },
    ));
}

fn key(label: impl Into<String>, swatch: Swatch) -> Key {
    Key {
        label: label.into(),
        swatch,
    }
}

/// The dash pattern of every dashed line (pixels drawn, pixels skipped).
const DASH: (u32, u32) = (8, 5);
/// Height of a panel's caption row and of its legend row, above the chart.
const CAPTION_ROW: u32 = 34;
const LEGEND_ROW: u32 = 28;
/// Left edge of the plotting area inside a panel (the y label area's width plus margin).
const Y_LABELS: u32 = 92;

/// A panel's caption and its legend in rows of their own above the chart, so the legend never
/// covers a curve; returns the area left for the chart.
fn panel<'b>(
    area: &Area<'b>,
    caption: &str,
    keys: &[Key],
) -> Result<Area<'b>, Box<dyn std::error::Error>> {
    let (caption_row, rest) = area.split_vertically(CAPTION_ROW);
    caption_row.draw(&Text::new(
        caption.to_string(),
        (Y_LABELS as i32, 8),
        (FONT, 21).into_font().style(FontStyle::Bold),
    ))?;
    if keys.is_empty() {
        return Ok(rest);
    }
    // Lay the entries out left to right, wrapping to a new row where the page ends.
    let width = rest.dim_in_pixel().0 as i32 - 24;
    let mut places = Vec::new();
    let (mut x, mut row) = (Y_LABELS as i32, 0);
    for k in keys {
        // The swatch, the text at about 0.48 em per character at 16 px, a gap.
        let w = 28 + 6 + (k.label.chars().count() as f64 * 7.8) as i32 + 22;
        if x + w - 22 > width && x > Y_LABELS as i32 {
            x = Y_LABELS as i32;
            row += 1;
        }
        places.push((x, row));
        x += w;
    }
    let rows = places.last().map_or(1, |&(_, r)| r + 1);
    let (legend_rows, chart) = rest.split_vertically(LEGEND_ROW * rows as u32);
    for (k, &(x0, row)) in keys.iter().zip(&places) {
        let (x1, y) = (x0 + 28, 10 + LEGEND_ROW as i32 * row);
        match k.swatch {
            Swatch::Line { color, width } => {
                legend_rows.draw(&PathElement::new(
                    [(x0, y), (x1, y)],
                    color.stroke_width(width),
                ))?;
            }
            Swatch::Dashed { color, width } => {
                // The same dash and gap lengths as the chart's dashed lines.
                let mut a = x0;
                while a < x1 {
                    let b = (a + DASH.0 as i32).min(x1);
                    legend_rows.draw(&PathElement::new(
                        [(a, y), (b, y)],
                        color.stroke_width(width),
                    ))?;
                    a = b + DASH.1 as i32;
                }
            }
            Swatch::Fill(color) => {
                legend_rows.draw(&Rectangle::new([(x0, y - 8), (x1, y + 8)], color.filled()))?;
            }
            Swatch::Diamond(color) => {
                let c = (x0 + x1) / 2;
                legend_rows.draw(&Polygon::new(
                    vec![(c - 7, y), (c, y - 7), (c + 7, y), (c, y + 7)],
                    color.filled(),
                ))?;
            }
            Swatch::Triangle(color) => {
                let c = (x0 + x1) / 2;
                legend_rows.draw(&Polygon::new(
                    vec![(c - 7, y + 6), (c + 7, y + 6), (c, y - 7)],
                    color.filled(),
                ))?;
            }
        }
        legend_rows.draw(&Text::new(
            k.label.clone(),
            (x1 + 6, y - 8),
            (FONT, 16).into_font(),
        ))?;
    }
    Ok(chart)
}

/// A chart over `area` whose x axis is a frequency axis: plotters draws the y axis; the
/// frequency ticks, grid lines and labels are drawn here, where the axis decides them.
fn freq_chart<'b>(
    area: &Area<'b>,
    axis: &FreqAxis,
    y: std::ops::Range<f64>,
    y_desc: &str,
) -> Result<Chart<'b>, Box<dyn std::error::Error>> {
    let (y_lo, y_hi) = (y.start, y.end);
    let mut chart = ChartBuilder::on(area)
        .margin_left(14)
        .margin_right(34)
        .margin_bottom(6)
        .x_label_area_size(56)
        .y_label_area_size(Y_LABELS - 14)
        .build_cartesian_2d(axis.range(), y)?;
    chart
        .configure_mesh()
        .disable_x_mesh()
        .x_labels(0)
        .light_line_style(GRID)
        .bold_line_style(RGBColor(205, 205, 205))
        .label_style((FONT, 16))
        .axis_desc_style((FONT, 18))
        .y_label_formatter(&tick)
        .y_desc(y_desc)
        .draw()?;
    let base = area.get_base_pixel();
    let ticks = axis.ticks(10);
    for t in &ticks {
        let x = axis.x(t.hz);
        let color = if t.label.is_empty() {
            GRID
        } else {
            RGBColor(205, 205, 205)
        };
        chart.draw_series(std::iter::once(PathElement::new(
            [(x, y_lo), (x, y_hi)],
            color,
        )))?;
    }
    let (_, bottom) = chart.backend_coord(&(axis.x(axis.lo_hz), y_lo));
    let (right, _) = chart.backend_coord(&(axis.x(axis.hi_hz), y_lo));
    for t in ticks.iter().filter(|t| !t.label.is_empty()) {
        let (px, _) = chart.backend_coord(&(axis.x(t.hz), y_lo));
        // The last label ends at the axis's end rather than running past the page.
        let h = if right - px < 24 {
            HPos::Right
        } else {
            HPos::Center
        };
        let style = (FONT, 16)
            .into_font()
            .into_text_style(area)
            .pos(Pos::new(h, VPos::Top));
        area.draw(&Text::new(
            t.label.clone(),
            (px - base.0, bottom - base.1 + 8),
            style,
        ))?;
        area.draw(&PathElement::new(
            [
                (px - base.0, bottom - base.1),
                (px - base.0, bottom - base.1 + 5),
            ],
            BLACK,
        ))?;
    }
    let (left, _) = chart.backend_coord(&(axis.x(axis.lo_hz), y_lo));
    let style = (FONT, 18)
        .into_font()
        .into_text_style(area)
        .pos(Pos::new(HPos::Center, VPos::Top));
    area.draw(&Text::new(
        axis.title(),
        ((left + right) / 2 - base.0, bottom - base.1 + 30),
        style,
    ))?;
    Ok(chart)
}

/// The band edges of a figure (for choosing its frequency axis).
fn edges_of(f: &Figure) -> Vec<f64> {
    f.spec.map(|c| c.edges.clone()).unwrap_or_default()
}

fn curve_on(taps: &[f64], axis: &FreqAxis, fs: f64) -> Vec<(f64, f64)> {
    (0..=POINTS)
        .map(|k| {
            let hz = axis.point(k, POINTS);
            (axis.x(hz), db(taps, hz, fs))
        })
        .collect()
}

fn draw(f: &Figure, svg: &mut String) -> Drawn {
    let fs = f.sample_rate_hz;
    let half = fs / 2.0;
    let root = SVGBackend::with_string(svg, PAGE).into_drawing_area();
    root.fill(&WHITE)?;
    let header_height = 60 + 26 * f.notes.len() as u32;
    let (header, rest) = root.split_vertically(header_height);
    let (top, rest) = rest.split_vertically(600);
    let (middle, bottom) = rest.split_vertically(430);

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
    magnitude(f, &top, half)?;
    close_up(f, &middle, fs)?;
    impulse(f, &bottom)?;
    root.present()?;
    Ok(())
}

/// The whole response, 0 to fs/2 (the first panel).
fn magnitude(f: &Figure, area: &Area, half: f64) -> Drawn {
    let fs = f.sample_rate_hz;
    let axis = FreqAxis::new(0.0, half, &edges_of(f), f.freq_scale);
    let shipped = curve_on(&f.shipped, &axis, fs);
    let float = f.float.as_ref().map(|t| curve_on(t, &axis, fs));
    let (pass, stop) = f.spec.map(bands).unwrap_or_default();
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

    let mut keys = Vec::new();
    if !pass.is_empty() {
        keys.push(key("passband", Swatch::Fill(PASS_FILL)));
    }
    if !stop.is_empty() {
        keys.push(key("stopband", Swatch::Fill(STOP_FILL)));
    }
    let limit = f.spec.map(|c| -c.spec.stopband_attenuation_db);
    if let Some(limit) = limit {
        keys.push(key(
            format!("attenuation limit, {limit} dB"),
            Swatch::Dashed {
                color: LIMIT_COLOR,
                width: 2,
            },
        ));
    }
    taps_keys(&mut keys, float.is_some(), &f.shipped_label);
    let measured = f.spec.and_then(|c| c.spec.measure(&f.shipped).ok());
    let worst = measured
        .as_ref()
        .map(|m| (m.stopband.max_at_hz, -m.stopband_attenuation_db));
    if let Some((at, g)) = worst {
        keys.push(key(
            format!("worst stopband point: {g:.2} dB at {}", engineering(at, 4)),
            Swatch::Diamond(SHIPPED_COLOR),
        ));
    }
    // Only a plan with transition bands has a transition peak to show.
    let transition = measured
        .as_ref()
        .filter(|m| m.transition.max_at_hz.is_finite())
        .map(|m| (m.transition.max_at_hz, m.transition_peak_db()));
    if let Some((at, peak)) = transition {
        keys.push(key(
            format!(
                "largest transition gain: {peak:+.2} dB at {}",
                engineering(at, 4)
            ),
            Swatch::Triangle(LIMIT_COLOR),
        ));
    }
    let chart_area = panel(area, "magnitude response", &keys)?;
    let mut chart = freq_chart(&chart_area, &axis, low..high, "gain (dB)")?;
    for &(a, b) in pass.iter() {
        chart.draw_series(std::iter::once(Rectangle::new(
            [(axis.x(a), low), (axis.x(b), high)],
            PASS_FILL.filled(),
        )))?;
    }
    for &(a, b) in stop.iter() {
        chart.draw_series(std::iter::once(Rectangle::new(
            [(axis.x(a), low), (axis.x(b), high)],
            STOP_FILL.filled(),
        )))?;
    }
    if let Some(limit) = limit {
        for &(a, b) in stop.iter() {
            chart.draw_series(DashedLineSeries::new(
                [(axis.x(a), limit), (axis.x(b), limit)],
                DASH.0,
                DASH.1,
                LIMIT_COLOR.stroke_width(2),
            ))?;
        }
    }
    if let Some(float) = &float {
        chart.draw_series(LineSeries::new(
            float.iter().copied(),
            FLOAT_COLOR.stroke_width(FLOAT_WIDTH),
        ))?;
    }
    chart.draw_series(LineSeries::new(
        shipped.iter().copied(),
        SHIPPED_COLOR.stroke_width(SHIPPED_WIDTH),
    ))?;
    // The worst stopband point of the shipped taps: a diamond (the circles stay one per tap);
    // its figures are in the legend.
    if let Some((at, g)) = worst {
        let r = axis.range();
        let (x, dx, dy) = (axis.x(at), (r.end - r.start) * 0.006, (high - low) * 0.015);
        chart.draw_series(std::iter::once(Polygon::new(
            vec![(x - dx, g), (x, g + dy), (x + dx, g), (x, g - dy)],
            SHIPPED_COLOR.filled(),
        )))?;
    }
    // The largest transition-band gain (where an equiripple design would overshoot): an upward
    // triangle, clamped to the axis so that it stays on the page; its figures are in the legend.
    if let Some((at, peak)) = transition {
        let r = axis.range();
        let g = peak.clamp(low, high);
        let (x, dx, dy) = (axis.x(at), (r.end - r.start) * 0.006, (high - low) * 0.014);
        chart.draw_series(std::iter::once(Polygon::new(
            vec![(x - dx, g - dy), (x + dx, g - dy), (x, g + dy)],
            LIMIT_COLOR.filled(),
        )))?;
    }
    Ok(())
}

/// The passband (or, without a spec, where the gain is within 3 dB of its peak), close up
/// (the second panel).
fn close_up(f: &Figure, area: &Area, fs: f64) -> Drawn {
    let (zoom_bands, what): (Vec<(f64, f64)>, String) = match f.spec {
        Some(c) => (
            bands(c).0,
            format!(
                "passband close-up (ripple limit {} dB peak to peak)",
                c.spec.passband_ripple_db
            ),
        ),
        None => (
            vec![auto_passband(&f.shipped, fs)],
            String::from("passband close-up (where the gain is within 3 dB of its peak)"),
        ),
    };
    let lo = zoom_bands.iter().fold(f64::MAX, |m, &(a, _)| m.min(a));
    let hi = zoom_bands.iter().fold(f64::MIN, |m, &(_, b)| m.max(b));
    let inner: Vec<f64> = zoom_bands.iter().flat_map(|&(a, b)| [a, b]).collect();
    let axis = FreqAxis::new(lo, hi, &inner, f.freq_scale);
    let on = |taps: &[f64]| -> Vec<Vec<(f64, f64)>> {
        zoom_bands
            .iter()
            .map(|&(a, b)| {
                let band = FreqAxis {
                    lo_hz: a.max(axis.lo_hz),
                    hi_hz: b,
                    log: axis.log,
                };
                (0..=POINTS)
                    .map(|k| {
                        let hz = band.point(k, POINTS);
                        (axis.x(hz), db(taps, hz, fs))
                    })
                    .collect()
            })
            .collect()
    };
    let zoomed = on(&f.shipped);
    let zoomed_float = f.float.as_deref().map(on).unwrap_or_default();
    let (g_min, g_max) = zoomed
        .iter()
        .chain(&zoomed_float)
        .flatten()
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
    let mut keys = Vec::new();
    if f.spec.is_some() {
        keys.push(key(
            "ripple limit (highest gain, and that less the ripple)",
            Swatch::Dashed {
                color: LIMIT_COLOR,
                width: 2,
            },
        ));
    }
    taps_keys(&mut keys, !zoomed_float.is_empty(), &f.shipped_label);
    let chart_area = panel(area, &what, &keys)?;
    let mut zoom = freq_chart(&chart_area, &axis, y_lo..y_hi, "gain (dB)")?;
    if let Some(c) = f.spec {
        // Peak to peak: every passband gain must lie within `ripple` below the highest one.
        let r = c.spec.passband_ripple_db;
        let x = axis.range();
        for level in [g_max, g_max - r] {
            zoom.draw_series(DashedLineSeries::new(
                [(x.start, level), (x.end, level)],
                DASH.0,
                DASH.1,
                LIMIT_COLOR.stroke_width(2),
            ))?;
        }
    }
    for band in &zoomed_float {
        zoom.draw_series(LineSeries::new(
            band.iter().copied(),
            FLOAT_COLOR.stroke_width(FLOAT_WIDTH),
        ))?;
    }
    for band in &zoomed {
        zoom.draw_series(LineSeries::new(
            band.iter().copied(),
            SHIPPED_COLOR.stroke_width(SHIPPED_WIDTH),
        ))?;
    }
    Ok(())
}

/// The impulse response of the shipped taps (the third panel): one stem and marker per tap,
/// in codes for fixed point (what the table and the firmware hold), in values for float.
fn impulse(f: &Figure, area: &Area) -> Drawn {
    let scale = f.code_scale.unwrap_or(1.0);
    let values: Vec<f64> = f.shipped.iter().map(|h| h * scale).collect();
    let peak_tap = values.iter().fold(0.0f64, |m, h| m.max(h.abs())).max(1e-12);
    let n = values.len();
    let mirrored = |sign: f64| {
        values
            .iter()
            .zip(values.iter().rev())
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
    let (y_desc, y_format): (String, Formatter) = match f.code_scale {
        Some(s) => (format!("tap code (value x {})", tick(&s)), &whole_tick),
        None => (String::from("tap value"), &tick),
    };
    let chart_area = panel(
        area,
        &format!(
            "impulse response: the {n} {} taps ({phase})",
            f.shipped_label
        ),
        &[],
    )?;
    let (first, last) = (-0.5, n as f64 - 0.5);
    let mut impulse = ChartBuilder::on(&chart_area)
        .margin_left(14)
        .margin_right(34)
        .margin_bottom(10)
        .x_label_area_size(52)
        .y_label_area_size(
            Y_LABELS - 14
                + if f.code_scale.is_some_and(|s| s > 1e6) {
                    40
                } else {
                    0
                },
        )
        .build_cartesian_2d(first..last, -peak_tap * 1.2..peak_tap * 1.2)?;
    impulse
        .configure_mesh()
        .light_line_style(GRID)
        .bold_line_style(RGBColor(205, 205, 205))
        .label_style((FONT, 16))
        .axis_desc_style((FONT, 18))
        .x_label_formatter(&whole_tick)
        .y_label_formatter(y_format)
        .x_desc("tap index")
        .y_desc(y_desc)
        .draw()?;
    impulse.draw_series(std::iter::once(PathElement::new(
        [(first, 0.0), (last, 0.0)],
        LIMIT_COLOR,
    )))?;
    impulse.draw_series(
        values
            .iter()
            .enumerate()
            .map(|(k, &h)| PathElement::new([(k as f64, 0.0), (k as f64, h)], SHIPPED_COLOR)),
    )?;
    let marker = if n > 300 { 1 } else { 3 };
    impulse.draw_series(
        values
            .iter()
            .enumerate()
            .map(|(k, &h)| Circle::new((k as f64, h), marker, SHIPPED_COLOR.filled())),
    )?;
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

/// Codes per unit of fixed-point taps (None for float taps).
fn code_scale(taps: &Taps) -> Option<f64> {
    match taps {
        Taps::Fixed(Codes::Q15(_)) => Some(f64::from(1u32 << 15)),
        Taps::Fixed(Codes::Q31(_)) => Some(f64::from(1u32 << 31)),
        Taps::Float(_) => None,
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
    let e = |k: usize| {
        c.edges
            .get(k)
            .map_or_else(String::new, |&hz| engineering(hz, 9))
    };
    let half = engineering(c.spec.sample_rate_hz / 2.0, 9);
    let s = &c.spec;
    let bands = match c.band {
        BandKind::Lowpass => format!("pass 0 to {}, stop {} to {half}", e(0), e(1)),
        BandKind::Highpass => format!("stop 0 to {}, pass {} to {half}", e(0), e(1)),
        BandKind::Bandpass => format!(
            "stop 0 to {}, pass {} to {}, stop {} to {half}",
            e(0),
            e(1),
            e(2),
            e(3)
        ),
        BandKind::Bandstop => format!(
            "pass 0 to {}, stop {} to {}, pass {} to {half}",
            e(0),
            e(1),
            e(2),
            e(3)
        ),
    };
    format!(
        "spec: {} at {}: {bands}; ripple <= {} dB, attenuation >= {} dB",
        c.band.name(),
        engineering(s.sample_rate_hz, 9),
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

/// The page for a design from a spec.
pub fn design_figure(d: &Designed, freq_scale: FreqScaleArg) -> Figure<'_> {
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
        code_scale: code_scale(&d.taps),
        freq_scale,
    }
}

pub fn plot(d: &Designed, out: &Path, freq_scale: FreqScaleArg) -> Result<Report, Failure> {
    write(&design_figure(d, freq_scale), out)?;
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
    pub freq_scale: FreqScaleArg,
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
        "{}: {n} {label} taps ({}), sample rate {}",
        r.table.display(),
        if r.format == Format::F32 {
            "real values, rounded to f32"
        } else {
            written
        },
        engineering(r.sample_rate_hz, 9)
    )];
    let mut json = json!({
        "command": "plot",
        "table": r.table.display().to_string(),
        "format": label,
        "taps": n,
        "sample_rate_hz": r.sample_rate_hz,
        "adc": r.adc.json(r.format.word_bits()),
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
        code_scale: code_scale(&r.taps),
        freq_scale: r.freq_scale,
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
