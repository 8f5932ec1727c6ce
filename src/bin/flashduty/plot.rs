//! The heating or cooling curve as an SVG picture (plotters, SVG backend; no fonts needed)
//! and as CSV.

use crate::compute::CurveOutcome;
use crate::error::{CliError, CliResult};
use crate::text::{fixed, num};
use plotters::prelude::*;
use std::path::Path;

const WIDTH: u32 = 960;
const HEIGHT: u32 = 640;

fn draw_error(e: impl std::fmt::Display) -> CliError {
    CliError::new(format!("--svg: cannot draw the curve ({e})"))
}

/// The picture as SVG text.
pub fn svg_text(c: &CurveOutcome) -> CliResult<String> {
    let curve = &c.curve;
    let pts: Vec<(f64, f64)> = curve
        .points
        .iter()
        .map(|p| (p.duty_w / 1e3, p.temperature_k - 273.15))
        .collect();
    if pts.is_empty() {
        return Err(CliError::new("--svg: the curve has no points"));
    }
    let (mut x0, mut x1) = pts
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| (a.min(p.0), b.max(p.0)));
    let (mut y0, mut y1) = pts
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| (a.min(p.1), b.max(p.1)));
    if !(x0.is_finite() && x1.is_finite() && y0.is_finite() && y1.is_finite()) {
        return Err(CliError::new("--svg: the curve has points that are not finite"));
    }
    if x1 - x0 < 1e-9 {
        x0 -= 1.0;
        x1 += 1.0;
    }
    let pad_x = 0.04 * (x1 - x0);
    let (x0, x1) = (x0 - pad_x, x1 + pad_x);
    if y1 - y0 < 1e-6 {
        y0 -= 1.0;
        y1 += 1.0;
    }
    let pad = 0.08 * (y1 - y0);
    let (y0, y1) = (y0 - pad, y1 + pad);

    let heating = curve.duty_w >= 0.0;
    let mix = c
        .feed
        .names
        .as_ref()
        .map(|n| {
            n.iter()
                .zip(&c.feed.z)
                .map(|(n, z)| format!("{n} {}", fixed(*z, 3)))
                .collect::<Vec<_>>()
                .join(", ")
        })
        .unwrap_or_default();
    let title = format!(
        "{} curve at {} kPa",
        if heating { "Heating" } else { "Cooling" },
        num(curve.pressure_pa / 1e3, 6)
    );

    let mut out = String::new();
    {
        let root = SVGBackend::with_string(&mut out, (WIDTH, HEIGHT)).into_drawing_area();
        root.fill(&WHITE).map_err(draw_error)?;
        let (top, rest) = root.split_vertically(70);
        let (plot_area, foot) = rest.split_vertically(HEIGHT - 70 - 40);
        top.draw(&Text::new(
            title,
            (60, 14),
            ("sans-serif", 26).into_font().color(&BLACK),
        ))
        .map_err(draw_error)?;
        top.draw(&Text::new(
            format!("feed mole fractions: {mix}"),
            (60, 46),
            ("sans-serif", 15).into_font().color(&RGBColor(60, 60, 60)),
        ))
        .map_err(draw_error)?;
        foot.draw(&Text::new(
            "Estimates from ideal-mixture (Raoult's law) models; check they suit the mixture. Design follows local codes and a qualified, licensed engineer.",
            (20, 14),
            ("sans-serif", 12).into_font().color(&RGBColor(90, 90, 90)),
        ))
        .map_err(draw_error)?;

        let mut chart = ChartBuilder::on(&plot_area)
            .margin_left(20)
            .margin_right(40)
            .margin_top(10)
            .margin_bottom(10)
            .x_label_area_size(55)
            .y_label_area_size(75)
            .build_cartesian_2d(x0..x1, y0..y1)
            .map_err(draw_error)?;
        chart
            .configure_mesh()
            .x_desc(if heating {
                "cumulative duty [kW] (heat into the stream)"
            } else {
                "cumulative duty [kW] (negative: heat removed)"
            })
            .y_desc("temperature [°C]")
            .axis_desc_style(("sans-serif", 17))
            .label_style(("sans-serif", 14))
            .light_line_style(RGBColor(235, 235, 235))
            .bold_line_style(RGBColor(205, 205, 205))
            .x_label_formatter(&|x| tick(*x, x1 - x0))
            .y_label_formatter(&|y| tick(*y, y1 - y0))
            .draw()
            .map_err(draw_error)?;

        // The bubble and dew temperatures as faint horizontal lines across the chart.
        let grey = RGBColor(150, 150, 150);
        let mut marks = vec![(
            "bubble point",
            curve.bubble_temperature_k - 273.15,
            RGBColor(200, 60, 20),
        )];
        if let Some(d) = curve.dew_temperature_k {
            marks.push(("dew point", d - 273.15, RGBColor(20, 120, 60)));
        }
        for (_, t, _) in &marks {
            if *t > y0 && *t < y1 {
                chart
                    .draw_series(LineSeries::new(vec![(x0, *t), (x1, *t)], grey.stroke_width(1)))
                    .map_err(draw_error)?;
            }
        }

        let blue = RGBColor(30, 90, 180);
        chart
            .draw_series(LineSeries::new(pts.clone(), blue.stroke_width(3)))
            .map_err(draw_error)?;
        chart
            .draw_series(pts.iter().map(|p| Circle::new(*p, 3, blue.filled())))
            .map_err(draw_error)?;

        // Labels for the bubble and dew points: at the breakpoint where the curve crosses
        // it, else at the end of the faint line.
        for (name, t, color) in &marks {
            if !(*t > y0 && *t < y1) {
                continue;
            }
            let at = curve
                .points
                .iter()
                .find(|p| {
                    (p.breakpoint == "bubble" && *name == "bubble point")
                        || (p.breakpoint == "dew" && *name == "dew point")
                })
                .map(|p| p.duty_w / 1e3);
            let label = format!("{name} {} °C", fixed(*t, 1));
            let style = ("sans-serif", 15).into_font().color(color);
            match at {
                Some(x) => {
                    // Bubble labels sit below-right of the marker and dew labels above-left:
                    // there the curve never passes (the two-phase line rises gently from
                    // the bubble to the dew point), heating or cooling, and the two labels
                    // never overlap on a narrow-boiling feed.
                    let width = 8 * label.chars().count() as i32;
                    let offset = if *name == "bubble point" {
                        (12, 8)
                    } else {
                        (-width - 12, -26)
                    };
                    chart
                        .draw_series(std::iter::once(
                            EmptyElement::at((x, *t))
                                + Circle::new((0, 0), 7, color.filled())
                                + Text::new(label, offset, style),
                        ))
                        .map_err(draw_error)?;
                }
                None => {
                    // Just below the faint line, at the left (text hangs down from its anchor).
                    chart
                        .draw_series(std::iter::once(
                            EmptyElement::at((x0, *t)) + Text::new(format!("{label} (not crossed)"), (8, 4), style),
                        ))
                        .map_err(draw_error)?;
                }
            }
        }
        root.present().map_err(draw_error)?;
    }
    Ok(out)
}

/// A tick label with as many decimals as the axis span needs (the same for every tick).
fn tick(v: f64, span: f64) -> String {
    let step = (span / 10.0).abs();
    let decimals = if step > 0.0 && step.is_finite() {
        (-step.log10().floor()).clamp(0.0, 6.0) as usize
    } else {
        0
    };
    fixed(v, decimals)
}

/// Writes the SVG picture.
pub fn write_svg(path: &Path, c: &CurveOutcome) -> CliResult<()> {
    let text = svg_text(c)?;
    std::fs::write(path, text).map_err(|e| CliError::new(format!("--svg: cannot write '{}' ({e})", path.display())))
}

/// The curve points as CSV text.
pub fn csv_text(c: &CurveOutcome) -> CliResult<String> {
    let mut w = csv::WriterBuilder::new().from_writer(Vec::new());
    let io = |e: csv::Error| CliError::new(format!("--csv: {e}"));
    w.write_record(["T_K", "T_degC", "duty_W", "vapour_fraction", "breakpoint"])
        .map_err(io)?;
    for p in &c.curve.points {
        w.write_record([
            p.temperature_k.to_string(),
            (p.temperature_k - 273.15).to_string(),
            p.duty_w.to_string(),
            p.vapour_fraction.to_string(),
            p.breakpoint.to_string(),
        ])
        .map_err(io)?;
    }
    let bytes = w.into_inner().map_err(|e| CliError::new(format!("--csv: {e}")))?;
    String::from_utf8(bytes).map_err(|_| CliError::new("--csv: not UTF-8"))
}

/// Writes the curve points as CSV.
pub fn write_csv(path: &Path, c: &CurveOutcome) -> CliResult<()> {
    let text = csv_text(c)?;
    std::fs::write(path, text).map_err(|e| CliError::new(format!("--csv: cannot write '{}' ({e})", path.display())))
}
