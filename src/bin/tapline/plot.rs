//! `plot`: one SVG page for a design — the magnitude response in dB of the float64 and the
//! quantized taps with the spec's bands shaded, a zoom on the passband(s), and the impulse
//! response.

use crate::atomic;
use crate::design::{Designed, Taps};
use crate::failure::Failure;
use crate::report::Report;
use crate::spec::BandKind;
use plotters::prelude::*;
use serde_json::json;
use std::path::Path;
use tapline::design::response_at;

/// Frequencies evaluated across 0..=fs/2.
const POINTS: usize = 1500;
/// The floor of the dB axes: exact zeros of the response would be −∞.
const FLOOR_DB: f64 = -160.0;

fn db<T: tapline::Sample>(taps: &[T], f: f64, fs: f64) -> f64 {
    response_at::<f64, T>(taps, f, fs)
        .magnitude_db()
        .max(FLOOR_DB)
}

fn curve<T: tapline::Sample>(taps: &[T], lo: f64, hi: f64, fs: f64) -> Vec<(f64, f64)> {
    (0..=POINTS)
        .map(|k| {
            let f = lo + (hi - lo) * k as f64 / POINTS as f64;
            (f, db(taps, f, fs))
        })
        .collect()
}

fn quantized_curve(d: &Designed, lo: f64, hi: f64) -> Vec<(f64, f64)> {
    let fs = d.chosen.spec.sample_rate_hz;
    match &d.taps {
        Taps::Fixed(crate::taps::Codes::Q15(c)) => curve(c, lo, hi, fs),
        Taps::Fixed(crate::taps::Codes::Q31(c)) => curve(c, lo, hi, fs),
        Taps::Float(v) => curve(v, lo, hi, fs),
    }
}

/// (passbands, stopbands) in Hz.
type Bands = (Vec<(f64, f64)>, Vec<(f64, f64)>);

fn bands(d: &Designed) -> Bands {
    let e = &d.chosen.edges;
    let half = d.chosen.spec.sample_rate_hz / 2.0;
    let at = |k: usize| e.get(k).copied().unwrap_or(0.0);
    match d.chosen.band {
        BandKind::Lowpass => (vec![(0.0, at(0))], vec![(at(1), half)]),
        BandKind::Highpass => (vec![(at(1), half)], vec![(0.0, at(0))]),
        BandKind::Bandpass => (vec![(at(1), at(2))], vec![(0.0, at(0)), (at(3), half)]),
        BandKind::Bandstop => (vec![(0.0, at(0)), (at(3), half)], vec![(at(1), at(2))]),
    }
}

fn draw(d: &Designed, svg: &mut String) -> Result<(), Box<dyn std::error::Error>> {
    let spec = &d.chosen.spec;
    let fs = spec.sample_rate_hz;
    let half = fs / 2.0;
    let format = d.chosen.format.name();
    let (pass, stop) = bands(d);
    let float_color = RGBColor(31, 90, 170);
    let quant_color = RGBColor(210, 80, 30);

    let root = SVGBackend::with_string(svg, (1000, 1100)).into_drawing_area();
    root.fill(&WHITE)?;
    let (top, rest) = root.split_vertically(480);
    let (middle, bottom) = rest.split_vertically(320);

    // 1. The whole response, bands shaded, the attenuation limit drawn.
    let low = (-spec.stopband_attenuation_db - 40.0).max(FLOOR_DB);
    let mut chart = ChartBuilder::on(&top)
        .caption(
            format!(
                "magnitude: float64 and {format} taps ({} taps, fs {fs} Hz)",
                d.len()
            ),
            ("sans-serif", 20),
        )
        .margin(12)
        .x_label_area_size(36)
        .y_label_area_size(56)
        .build_cartesian_2d(0.0..half, low..10.0)?;
    chart
        .configure_mesh()
        .x_desc("frequency (Hz)")
        .y_desc("gain (dB)")
        .draw()?;
    for &(a, b) in &pass {
        chart.draw_series(std::iter::once(Rectangle::new(
            [(a, low), (b, 10.0)],
            RGBAColor(40, 160, 60, 0.12).filled(),
        )))?;
    }
    for &(a, b) in &stop {
        chart.draw_series(std::iter::once(Rectangle::new(
            [(a, low), (b, 10.0)],
            RGBAColor(200, 40, 40, 0.10).filled(),
        )))?;
        chart.draw_series(LineSeries::new(
            [
                (a, -spec.stopband_attenuation_db),
                (b, -spec.stopband_attenuation_db),
            ],
            BLACK.stroke_width(1),
        ))?;
    }
    chart
        .draw_series(LineSeries::new(
            curve(&d.ideal, 0.0, half, fs),
            float_color.stroke_width(2),
        ))?
        .label("float64")
        .legend(move |(x, y)| PathElement::new([(x, y), (x + 20, y)], float_color));
    chart
        .draw_series(LineSeries::new(
            quantized_curve(d, 0.0, half),
            quant_color.stroke_width(1),
        ))?
        .label(format)
        .legend(move |(x, y)| PathElement::new([(x, y), (x + 20, y)], quant_color));
    chart
        .configure_series_labels()
        .background_style(WHITE.mix(0.8))
        .border_style(BLACK)
        .draw()?;

    // 2. The passband(s), close up: the ripple limit either side of 0 dB.
    let (lo, hi) = pass
        .iter()
        .fold((f64::MAX, f64::MIN), |(l, h), &(a, b)| (l.min(a), h.max(b)));
    let ripple = spec.passband_ripple_db;
    let mut zoom = ChartBuilder::on(&middle)
        .caption(
            format!("passband, {lo}..{hi} Hz (ripple limit {ripple} dB peak to peak)"),
            ("sans-serif", 18),
        )
        .margin(12)
        .x_label_area_size(36)
        .y_label_area_size(56)
        .build_cartesian_2d(lo..hi, -ripple..ripple)?;
    zoom.configure_mesh()
        .x_desc("frequency (Hz)")
        .y_desc("gain (dB)")
        .draw()?;
    for &(a, b) in &pass {
        zoom.draw_series(LineSeries::new(
            curve(&d.ideal, a, b, fs),
            float_color.stroke_width(2),
        ))?;
        zoom.draw_series(LineSeries::new(
            quantized_curve(d, a, b),
            quant_color.stroke_width(1),
        ))?;
    }

    // 3. The impulse response: one marker per tap.
    let peak = d
        .ideal
        .iter()
        .fold(0.0f64, |m, h| m.max(h.abs()))
        .max(1e-12);
    let mut impulse = ChartBuilder::on(&bottom)
        .caption("impulse response (float64 taps)", ("sans-serif", 18))
        .margin(12)
        .x_label_area_size(36)
        .y_label_area_size(56)
        .build_cartesian_2d(-1.0..d.len() as f64, -peak * 1.15..peak * 1.15)?;
    impulse
        .configure_mesh()
        .x_desc("tap")
        .y_desc("value")
        .draw()?;
    impulse.draw_series(
        d.ideal
            .iter()
            .enumerate()
            .map(|(k, &h)| PathElement::new([(k as f64, 0.0), (k as f64, h)], float_color)),
    )?;
    impulse.draw_series(
        d.ideal
            .iter()
            .enumerate()
            .map(|(k, &h)| Circle::new((k as f64, h), 3, float_color.filled())),
    )?;
    root.present()?;
    Ok(())
}

pub fn plot(d: &Designed, out: &Path) -> Result<Report, Failure> {
    let mut svg = String::new();
    draw(d, &mut svg).map_err(|e| Failure::plain(format!("plot: {e}")))?;
    atomic::write(out, svg.as_bytes())?;
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
