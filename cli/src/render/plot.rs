//! SVG plots of a frequency sweep ([`response_svg`]) and of a time history ([`time_svg`]),
//! drawn with plotters' SVG backend.
//!
//! Every number and mark comes from the engine ([`sprung_engine::sweep`]); this module only
//! lays them out. plotters is built without `ttf`, so text is placed by its built-in size
//! estimate and written as SVG `<text>` for the viewer's own fonts: no font is needed to build
//! or run. Label widths are estimated here the same way to keep labels from overlapping.

use plotters::coord::Shift;
use plotters::coord::ranged1d::{
    DefaultFormatting, KeyPointHint, KeyPointWeight, Ranged, ValueFormatter,
};
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use sprung_engine::model::DofKind;
use sprung_engine::sweep::{Sweep, TimeHistory, WithinSource};

use super::CAUTION;
use crate::args::Scale;

const WIDTH: u32 = 960;
const HEIGHT: u32 = 720;
const FONT: &str = "sans-serif";
/// Font sizes as plotters takes them (the SVG font-size is this / 1.24).
const TITLE_SIZE: f64 = 22.0;
const SUBTITLE_SIZE: f64 = 15.0;
const AXIS_SIZE: f64 = 16.0;
const TICK_SIZE: f64 = 14.0;
const MARK_SIZE: f64 = 14.0;
const CAUTION_SIZE: f64 = 13.0;

const CURVE: RGBColor = RGBColor(31, 87, 165);
const MODE: RGBColor = RGBColor(178, 34, 34);
const DRIVE: RGBColor = RGBColor(27, 120, 55);
const FINAL: RGBColor = RGBColor(90, 90, 90);
const BAND: RGBColor = RGBColor(230, 140, 20);
const PEAK: RGBColor = RGBColor(120, 40, 140);
const GRID: RGBColor = RGBColor(225, 225, 225);
const GRID_BOLD: RGBColor = RGBColor(190, 190, 190);

/// What the sweep shows, for titles and units.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Quantity {
    /// The coordinate's displacement (or rotation) amplitude.
    Amplitude,
    /// Force into ground over applied force (a force or torque drive).
    ForceTransmissibility,
    /// The coordinate's motion over the ground's (a `motion` drive).
    MotionTransmissibility,
}

/// A frequency sweep and what to call it.
pub struct ResponsePlot<'a> {
    pub file: &'a str,
    pub system: &'a str,
    pub system_title: Option<&'a str>,
    pub at: &'a str,
    pub kind: DofKind,
    pub quantity: Quantity,
    pub scale: Scale,
    pub sweep: &'a Sweep,
}

/// A time history and what to call it.
pub struct TimePlot<'a> {
    pub file: &'a str,
    pub system: &'a str,
    pub system_title: Option<&'a str>,
    pub at: &'a str,
    pub kind: DofKind,
    pub history: &'a TimeHistory,
}

/// The response plot: magnitude (dB or linear) over phase, log frequency axis, natural
/// frequencies and the drive marked.
pub fn response_svg(plot: &ResponsePlot) -> Result<String, String> {
    let sweep = plot.sweep;
    let points: Vec<(f64, f64, f64)> = sweep
        .points
        .iter()
        .filter(|p| {
            p.frequency_hz > 0.0
                && p.frequency_hz.is_finite()
                && p.magnitude.is_finite()
                && p.phase_deg.is_finite()
                && (plot.scale == Scale::Linear || p.magnitude > 0.0)
        })
        .map(|p| (p.frequency_hz, p.magnitude, p.phase_deg))
        .collect();
    if points.len() < 2 {
        return Err("the sweep has fewer than two finite points to plot".to_string());
    }
    let f_lo = points[0].0;
    let f_hi = points[points.len() - 1].0;
    if f_hi <= f_lo {
        return Err("the sweep's frequencies do not increase".to_string());
    }

    // Magnitude in the chosen scale.
    let peak = points.iter().map(|p| p.1).fold(0.0_f64, f64::max);
    let (unit, factor) = match plot.quantity {
        Quantity::Amplitude => si_unit(plot.kind, peak),
        _ => ("", 1.0),
    };
    let magnitude = |m: f64| match plot.scale {
        Scale::Db => 20.0 * m.log10(),
        Scale::Linear => m / factor,
    };
    let mag: Vec<(f64, f64)> = points.iter().map(|p| (p.0, magnitude(p.1))).collect();
    let (m_lo, m_hi) = match plot.scale {
        Scale::Db => {
            let (a, b) = extent(mag.iter().map(|p| p.1));
            (
                ((a - 3.0) / 10.0).floor() * 10.0,
                ((b + 3.0) / 10.0).ceil() * 10.0,
            )
        }
        Scale::Linear => {
            let (_, b) = extent(mag.iter().map(|p| p.1));
            (0.0, if b > 0.0 { b * 1.25 } else { 1.0 })
        }
    };
    let m_ticks = linear_ticks(m_lo, m_hi, 7);
    let mag_title = match (plot.quantity, plot.scale) {
        (Quantity::Amplitude, Scale::Db) => format!(
            "amplitude (dB re 1 {})",
            if plot.kind == DofKind::Rotational {
                "rad"
            } else {
                "m"
            }
        ),
        (Quantity::Amplitude, Scale::Linear) => format!("amplitude ({unit})"),
        (_, Scale::Db) => "transmissibility (dB, 20·log10 of the ratio)".to_string(),
        (_, Scale::Linear) => "transmissibility (ratio, 1 = no isolation)".to_string(),
    };

    // Phase, unwrapped so the curve has no 360° jumps.
    let phase = unwrap_degrees(points.iter().map(|p| p.2));
    let phase: Vec<(f64, f64)> = points.iter().map(|p| p.0).zip(phase).collect();
    let (p_lo, p_hi) = extent(phase.iter().map(|p| p.1));
    // The smallest step of 45° × 2^k that gives at most 8 ticks.
    let step = (0..24)
        .map(|k| 45.0 * f64::from(1u32 << k))
        .find(|s| (p_hi - p_lo) / s <= 8.0)
        .unwrap_or(360.0);
    let (p_lo, p_hi) = (
        (p_lo / step).floor() * step,
        ((p_hi / step).ceil() * step).max((p_lo / step).floor() * step + step),
    );
    let p_ticks: Vec<f64> = (0..)
        .map(|k| p_lo + k as f64 * step)
        .take_while(|v| *v <= p_hi + 1e-9)
        .collect();

    let (x_major, x_minor) = log_ticks(f_lo, f_hi);
    let drive = &sweep.drive;
    let band = sweep
        .drive_band_hz
        .filter(|(a, b)| a.is_finite() && b.is_finite() && *a > 0.0 && b >= a);

    let heading = match plot.quantity {
        Quantity::Amplitude => format!("Amplitude of `{}` under drive `{drive}`", plot.at),
        Quantity::ForceTransmissibility => {
            format!("Force transmissibility of drive `{drive}` (force into ground / applied)")
        }
        Quantity::MotionTransmissibility => format!(
            "Transmissibility of drive `{drive}` to `{}` (motion / ground motion)",
            plot.at
        ),
    };

    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (WIDTH, HEIGHT)).into_drawing_area();
        root.fill(&WHITE).or_text()?;
        let body = frame(
            &root,
            &heading,
            &subtitle(plot.file, plot.system, plot.system_title),
        )?;
        let (upper, lower) = body.split_vertically(body.dim_in_pixel().1 * 58 / 100);

        let x_axis = || {
            (f_lo..f_hi)
                .log_scale()
                .with_key_points(x_major.clone())
                .with_light_points(x_minor.clone())
        };
        let mut top = ChartBuilder::on(&upper)
            .margin_left(10)
            .margin_right(24)
            .margin_top(30)
            .x_label_area_size(46)
            .y_label_area_size(78)
            .build_cartesian_2d(x_axis(), Ticked::new(m_lo, m_hi, m_ticks.clone()))
            .or_text()?;
        mesh(&mut top, "frequency (Hz)", &mag_title)?;
        let mut bottom = ChartBuilder::on(&lower)
            .margin_left(10)
            .margin_right(24)
            .margin_top(12)
            .x_label_area_size(46)
            .y_label_area_size(78)
            .build_cartesian_2d(x_axis(), Ticked::new(p_lo, p_hi, p_ticks))
            .or_text()?;
        mesh(&mut bottom, "frequency (Hz)", "phase (degrees)")?;

        // The drive's band (or frequency), under the curves.
        let mut drive_label = None;
        if let Some((a, b)) = band {
            let (a, b) = (a.max(f_lo), b.min(f_hi));
            if a < b {
                for (chart, lo, hi) in [(&mut top, m_lo, m_hi), (&mut bottom, p_lo, p_hi)] {
                    chart
                        .draw_series(std::iter::once(Rectangle::new(
                            [(a, lo), (b, hi)],
                            BAND_FILL.filled(),
                        )))
                        .or_text()?;
                }
                let (l, h) = sweep.drive_band_hz.unwrap_or((a, b));
                drive_label = Some((
                    format!("drive band `{drive}` {} .. {} Hz", sig(l), sig(h)),
                    a,
                    b,
                    BAND_TEXT,
                ));
            } else if a == b {
                for (chart, lo, hi) in [(&mut top, m_lo, m_hi), (&mut bottom, p_lo, p_hi)] {
                    chart
                        .draw_series(DashedLineSeries::new(
                            [(a, lo), (a, hi)],
                            6,
                            4,
                            DRIVE.stroke_width(2),
                        ))
                        .or_text()?;
                }
                drive_label = Some((format!("drive `{drive}` {} Hz", sig(a)), a, a, DRIVE));
            }
        }

        top.draw_series(LineSeries::new(mag.iter().copied(), CURVE.stroke_width(2)))
            .or_text()?;
        bottom
            .draw_series(LineSeries::new(
                phase.iter().copied(),
                CURVE.stroke_width(2),
            ))
            .or_text()?;

        // Natural frequencies: a line through both panels, a label in the upper one.
        let modes: Vec<(usize, f64)> = sweep
            .natural_frequencies_hz
            .iter()
            .copied()
            .enumerate()
            .filter(|(_, f)| f.is_finite() && *f >= f_lo && *f <= f_hi)
            .collect();
        for &(_, f) in &modes {
            for (chart, lo, hi) in [(&mut top, m_lo, m_hi), (&mut bottom, p_lo, p_hi)] {
                chart
                    .draw_series(LineSeries::new([(f, lo), (f, hi)], MODE.stroke_width(1)))
                    .or_text()?;
            }
        }
        // Labels along the top of the magnitude panel, the drive's first so it always fits.
        let mut labels: Vec<Label> = Vec::new();
        if let Some((text, a, _, color)) = drive_label {
            labels.push(Label {
                x: top.backend_coord(&(a, m_hi)).0,
                text,
                color,
            });
        }
        labels.extend(modes.iter().map(|&(i, f)| Label {
            x: top.backend_coord(&(f, m_hi)).0,
            text: format!("f{} {} Hz", i + 1, sig(f)),
            color: MODE,
        }));
        let area_x = top.plotting_area().get_pixel_range().0;
        let top_y = top.backend_coord(&(f_lo, m_hi)).1;
        let left_out = place_labels(&root, &labels, (area_x.start, area_x.end), top_y + 4)?;
        if left_out > 0 {
            root.draw(&Text::new(
                format!(
                    "{left_out} natural frequencies marked but not labelled (too close); `sprung modes` lists them"
                ),
                (area_x.end, top_y - 8),
                text_style(MARK_SIZE, MODE).pos(Pos::new(HPos::Right, VPos::Bottom)),
            ))
            .or_text()?;
        }
        root.present().or_text()?;
    }
    Ok(svg)
}

/// The time plot: displacement over time, the final value, the settling band and time, and
/// the peak.
pub fn time_svg(plot: &TimePlot) -> Result<String, String> {
    let points: Vec<(f64, f64)> = plot
        .history
        .points
        .iter()
        .filter(|p| p.time_s.is_finite() && p.displacement.is_finite())
        .map(|p| (p.time_s, p.displacement))
        .collect();
    if points.len() < 2 {
        return Err("the time history has fewer than two finite points to plot".to_string());
    }
    let t_lo = points[0].0;
    let t_hi = points[points.len() - 1].0;
    if t_hi <= t_lo {
        return Err("the time history's times do not increase".to_string());
    }
    let measures = plot.history.measures;
    let (mut x_lo, mut x_hi) = extent(points.iter().map(|p| p.1));
    if let Some(m) = measures {
        let band = m.settling.half_width;
        x_lo = x_lo.min(m.final_value - band).min(0.0);
        x_hi = x_hi.max(m.final_value + band).max(0.0);
    }
    let (unit, factor) = si_unit(plot.kind, x_lo.abs().max(x_hi.abs()));
    let scaled: Vec<(f64, f64)> = points.iter().map(|p| (p.0, p.1 / factor)).collect();
    let pad = (x_hi - x_lo).max(f64::MIN_POSITIVE) / factor * 0.08;
    let (y_lo, y_hi) = (x_lo / factor - pad, x_hi / factor + pad);
    let (y_lo, y_hi) = if y_hi > y_lo {
        (y_lo, y_hi)
    } else {
        (y_lo - 1.0, y_hi + 1.0)
    };
    let word = match plot.kind {
        DofKind::Translational => "displacement",
        DofKind::Rotational => "rotation",
    };
    let heading = format!(
        "Time response of `{}` (steps, impulses, initial conditions)",
        plot.at
    );

    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (WIDTH, HEIGHT)).into_drawing_area();
        root.fill(&WHITE).or_text()?;
        let body = frame(
            &root,
            &heading,
            &subtitle(plot.file, plot.system, plot.system_title),
        )?;
        let mut chart = ChartBuilder::on(&body)
            .margin_left(10)
            .margin_right(24)
            .margin_top(16)
            .x_label_area_size(46)
            .y_label_area_size(78)
            .build_cartesian_2d(
                Ticked::new(t_lo, t_hi, linear_ticks(t_lo, t_hi, 10)),
                Ticked::new(y_lo, y_hi, linear_ticks(y_lo, y_hi, 8)),
            )
            .or_text()?;
        mesh(
            &mut chart,
            "time (s)",
            &format!("{word} of `{}` ({unit})", plot.at),
        )?;

        let area = chart.plotting_area().get_pixel_range();
        if let Some(m) = measures {
            let fin = m.final_value / factor;
            let half = m.settling.half_width / factor;
            let percent = tick(m.settling.within * 100.0);
            let from = match m.settling.source {
                WithinSource::Given => "given",
                WithinSource::Requirement => "from the requirement",
                WithinSource::Default => "default",
            };
            chart
                .draw_series(std::iter::once(Rectangle::new(
                    [(t_lo, fin - half), (t_hi, fin + half)],
                    BAND_FILL.filled(),
                )))
                .or_text()?;
            chart
                .draw_series(DashedLineSeries::new(
                    [(t_lo, fin), (t_hi, fin)],
                    8,
                    5,
                    FINAL.stroke_width(2),
                ))
                .or_text()?;
            chart
                .draw_series(LineSeries::new(
                    scaled.iter().copied(),
                    CURVE.stroke_width(2),
                ))
                .or_text()?;
            let right = area.0.end - 6;
            let (_, y_band) = chart.backend_coord(&(t_hi, fin + half));
            root.draw(&Text::new(
                format!(
                    "settling band ±{percent}%{} ({from})",
                    if m.settling.of_peak {
                        " of the peak"
                    } else {
                        ""
                    }
                ),
                (right, y_band - 4),
                text_style(MARK_SIZE, BAND_TEXT).pos(Pos::new(HPos::Right, VPos::Bottom)),
            ))
            .or_text()?;
            let (_, y_fin) = chart.backend_coord(&(t_hi, fin - half));
            root.draw(&Text::new(
                format!("final value {} {unit}", sig(fin)),
                (right, y_fin + 4),
                text_style(MARK_SIZE, FINAL).pos(Pos::new(HPos::Right, VPos::Top)),
            ))
            .or_text()?;

            // Settling time, or the word that it was not reached.
            let top_y = chart.backend_coord(&(t_lo, y_hi)).1 + 4;
            match m.settling.time_s {
                Some(ts) if ts >= t_lo && ts <= t_hi => {
                    chart
                        .draw_series(LineSeries::new(
                            [(ts, y_lo), (ts, y_hi)],
                            BAND_TEXT.stroke_width(2),
                        ))
                        .or_text()?;
                    let text = format!("settles at {} s (±{percent}%)", sig(ts));
                    let x = chart.backend_coord(&(ts, y_hi)).0;
                    let (x, anchor) = beside(x, &text, (area.0.start, area.0.end));
                    root.draw(&Text::new(
                        text,
                        (x, top_y),
                        text_style(MARK_SIZE, BAND_TEXT).pos(Pos::new(anchor, VPos::Top)),
                    ))
                    .or_text()?;
                }
                _ => {
                    root.draw(&Text::new(
                        format!(
                            "does not settle within ±{percent}% in {} s",
                            sig(t_hi - t_lo)
                        ),
                        (right, top_y),
                        text_style(MARK_SIZE, BAND_TEXT).pos(Pos::new(HPos::Right, VPos::Top)),
                    ))
                    .or_text()?;
                }
            }

            // The peak.
            let (tp, xp) = (m.peak.time_s, m.peak.displacement / factor);
            if tp.is_finite() && xp.is_finite() && tp >= t_lo && tp <= t_hi {
                let at = chart.backend_coord(&(tp, xp));
                root.draw(&Circle::new(at, 5, PEAK.stroke_width(2)))
                    .or_text()?;
                let text = format!("peak {} {unit} at {} s", sig(xp), sig(tp));
                let (x, anchor) = beside(at.0 + 4, &text, (area.0.start, area.0.end));
                let (y, v) = if xp >= fin {
                    (at.1 - 8, VPos::Bottom)
                } else {
                    (at.1 + 8, VPos::Top)
                };
                root.draw(&Text::new(
                    text,
                    (x, y.min(area.1.end - 2).max(area.1.start + 2)),
                    text_style(MARK_SIZE, PEAK).pos(Pos::new(anchor, v)),
                ))
                .or_text()?;
            }
        } else {
            chart
                .draw_series(LineSeries::new(
                    scaled.iter().copied(),
                    CURVE.stroke_width(2),
                ))
                .or_text()?;
        }
        root.present().or_text()?;
    }
    Ok(svg)
}

const BAND_FILL: RGBAColor = RGBAColor(BAND.0, BAND.1, BAND.2, 0.22);
/// The band's colour, darkened for text and lines on white.
const BAND_TEXT: RGBColor = RGBColor(176, 96, 0);

/// A linear axis with ticks of our choosing (plotters' own f64 axis picks its ticks, and
/// wrapped in `with_key_points` it loses its label formatting).
#[derive(Clone)]
struct Ticked {
    lo: f64,
    hi: f64,
    ticks: Vec<f64>,
}

impl Ticked {
    fn new(lo: f64, hi: f64, ticks: Vec<f64>) -> Ticked {
        Ticked { lo, hi, ticks }
    }
}

impl Ranged for Ticked {
    type FormatOption = DefaultFormatting;
    type ValueType = f64;

    fn map(&self, v: &f64, limit: (i32, i32)) -> i32 {
        let span = self.hi - self.lo;
        if span.is_nan() || span <= 0.0 {
            return (limit.0 + limit.1) / 2;
        }
        let pixels = f64::from(limit.1 - limit.0);
        let at = f64::from(limit.0) + pixels * (v - self.lo) / span;
        // Far outside the axis (never drawn) stays inside i32.
        at.clamp(-1e6, 1e6).round() as i32
    }

    fn key_points<Hint: KeyPointHint>(&self, hint: Hint) -> Vec<f64> {
        match hint.weight() {
            KeyPointWeight::Bold => self.ticks.clone(),
            // Light grid lines half way between the ticks.
            KeyPointWeight::Any => self.ticks.windows(2).map(|w| 0.5 * (w[0] + w[1])).collect(),
        }
    }

    fn range(&self) -> std::ops::Range<f64> {
        self.lo..self.hi
    }
}

/// Draws the title, subtitle and caution; returns the area left for the charts.
fn frame<'a>(
    root: &DrawingArea<SVGBackend<'a>, Shift>,
    heading: &str,
    subtitle: &str,
) -> Result<DrawingArea<SVGBackend<'a>, Shift>, String> {
    let centre = (WIDTH / 2) as i32;
    root.draw(&Text::new(
        heading.to_string(),
        (centre, 10),
        text_style(TITLE_SIZE, BLACK).pos(Pos::new(HPos::Center, VPos::Top)),
    ))
    .or_text()?;
    root.draw(&Text::new(
        subtitle.to_string(),
        (centre, 40),
        text_style(SUBTITLE_SIZE, FINAL).pos(Pos::new(HPos::Center, VPos::Top)),
    ))
    .or_text()?;
    root.draw(&Text::new(
        CAUTION.to_string(),
        (12, HEIGHT as i32 - 8),
        text_style(CAUTION_SIZE, FINAL).pos(Pos::new(HPos::Left, VPos::Bottom)),
    ))
    .or_text()?;
    Ok(root.margin(62, 26, 0, 0))
}

fn subtitle(file: &str, system: &str, title: Option<&str>) -> String {
    match title {
        Some(t) => format!("system `{system}` \u{201c}{t}\u{201d} in {file}"),
        None => format!("system `{system}` in {file}"),
    }
}

fn mesh<X, Y>(
    chart: &mut ChartContext<'_, SVGBackend<'_>, Cartesian2d<X, Y>>,
    x_title: &str,
    y_title: &str,
) -> Result<(), String>
where
    X: Ranged<ValueType = f64> + ValueFormatter<f64>,
    Y: Ranged<ValueType = f64> + ValueFormatter<f64>,
{
    chart
        .configure_mesh()
        .x_desc(x_title)
        .y_desc(y_title)
        .axis_desc_style((FONT, AXIS_SIZE))
        .label_style((FONT, TICK_SIZE))
        .x_label_formatter(&|v| tick(*v))
        .y_label_formatter(&|v| tick(*v))
        .bold_line_style(GRID_BOLD.stroke_width(1))
        .light_line_style(GRID.stroke_width(1))
        .draw()
        .or_text()
}

/// A label for a vertical mark at pixel `x`.
struct Label {
    x: i32,
    text: String,
    color: RGBColor,
}

/// Most rows of labels above a chart's curves.
const LABEL_ROWS: usize = 3;

/// Labels beside their marks (left-anchored just right of the mark, or right-anchored when
/// they would run off the area), in up to [`LABEL_ROWS`] rows: each goes in the first row it
/// fits without overlapping, in the order given. Returns how many found no room.
fn place_labels(
    root: &DrawingArea<SVGBackend<'_>, Shift>,
    labels: &[Label],
    area: (i32, i32),
    top: i32,
) -> Result<usize, String> {
    let mut left_out = 0;
    let row_height = (MARK_SIZE * 1.2).ceil() as i32;
    // The pixel spans taken in each row.
    let mut rows: Vec<Vec<(i32, i32)>> = Vec::new();
    for Label { x, text, color } in labels {
        let (left, anchor) = beside(*x, text, area);
        let width = text_width(text, MARK_SIZE);
        let (start, end) = match anchor {
            HPos::Right => (left - width, left),
            _ => (left, left + width),
        };
        let free = |row: &Vec<(i32, i32)>| row.iter().all(|(a, b)| end + 6 < *a || *b + 6 < start);
        let row = match rows.iter().position(free) {
            Some(r) => r,
            None if rows.len() < LABEL_ROWS => {
                rows.push(Vec::new());
                rows.len() - 1
            }
            None => {
                left_out += 1;
                continue;
            }
        };
        rows[row].push((start, end));
        root.draw(&Text::new(
            text.clone(),
            (left, top + row as i32 * row_height),
            text_style(MARK_SIZE, *color).pos(Pos::new(anchor, VPos::Top)),
        ))
        .or_text()?;
    }
    Ok(left_out)
}

/// Where a label for a mark at pixel `x` goes: just right of it, or just left when it
/// would run past the area's right edge.
fn beside(x: i32, text: &str, area: (i32, i32)) -> (i32, HPos) {
    if x + 4 + text_width(text, MARK_SIZE) > area.1 {
        (x - 4, HPos::Right)
    } else {
        (x + 4, HPos::Left)
    }
}

/// An over-estimate of a label's width in pixels (sans-serif runs about 0.55 em a
/// character; plotters' SVG font-size is the size / 1.24).
fn text_width(text: &str, size: f64) -> i32 {
    (text.chars().count() as f64 * size / 1.24 * 0.6).ceil() as i32
}

fn text_style(size: f64, color: RGBColor) -> TextStyle<'static> {
    (FONT, size).into_font().color(&color)
}

/// The least and greatest of some finite numbers ((0, 0) when there are none).
fn extent(values: impl Iterator<Item = f64>) -> (f64, f64) {
    let (lo, hi) = values.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
        (a.min(v), b.max(v))
    });
    if lo.is_finite() && hi.is_finite() {
        (lo, hi)
    } else {
        (0.0, 0.0)
    }
}

/// Phase in degrees with 360° jumps between neighbours removed.
fn unwrap_degrees(values: impl Iterator<Item = f64>) -> Vec<f64> {
    let mut out: Vec<f64> = Vec::new();
    let mut shift = 0.0;
    for v in values {
        if let Some(&last) = out.last() {
            let d = v + shift - last;
            shift -= (d / 360.0).round() * 360.0;
        }
        out.push(v + shift);
    }
    out
}

/// The unit and its size in SI for values up to `largest` (m, mm, µm, nm; rad, mrad...).
fn si_unit(kind: DofKind, largest: f64) -> (&'static str, f64) {
    let units: [(&str, f64); 4] = match kind {
        DofKind::Translational => [("m", 1.0), ("mm", 1e-3), ("µm", 1e-6), ("nm", 1e-9)],
        DofKind::Rotational => [("rad", 1.0), ("mrad", 1e-3), ("µrad", 1e-6), ("nrad", 1e-9)],
    };
    units
        .iter()
        .copied()
        .find(|(_, f)| largest >= *f)
        .unwrap_or(units[3])
}

/// Ticks for a log axis from `lo` to `hi`: the 1-2-5 values between them as labelled ticks
/// (decades alone past a dozen), the other 1..9 multiples as grid lines; a finer or linear
/// set when the range is too narrow for three ticks.
pub fn log_ticks(lo: f64, hi: f64) -> (Vec<f64>, Vec<f64>) {
    let in_range = |v: &f64| *v >= lo * (1.0 - 1e-9) && *v <= hi * (1.0 + 1e-9);
    let first = lo.log10().floor() as i32;
    let last = hi.log10().ceil() as i32;
    let set = |mantissas: &[f64]| -> Vec<f64> {
        (first..=last)
            .flat_map(|e| mantissas.iter().map(move |m| m * 10f64.powi(e)))
            .filter(in_range)
            .collect()
    };
    let all = set(&[1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0, 9.0]);
    let major = {
        let decades = set(&[1.0]);
        let one_two_five = set(&[1.0, 2.0, 5.0]);
        if one_two_five.len() > 12 && decades.len() >= 2 {
            decades
        } else if one_two_five.len() >= 3 {
            one_two_five
        } else if all.len() >= 3 {
            all.clone()
        } else {
            linear_ticks(lo, hi, 5)
                .into_iter()
                .filter(|v| *v > 0.0)
                .collect()
        }
    };
    let minor = all
        .into_iter()
        .filter(|v| !major.iter().any(|m| (m - v).abs() <= 1e-9 * v))
        .collect();
    (major, minor)
}

/// About `count` ticks at a 1-2-5 step between `lo` and `hi`.
pub fn linear_ticks(lo: f64, hi: f64, count: usize) -> Vec<f64> {
    let span = hi - lo;
    if !(span > 0.0 && span.is_finite()) || count == 0 {
        return vec![lo];
    }
    let raw = span / count as f64;
    let magnitude = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 2.5, 5.0, 10.0]
        .iter()
        .map(|m| m * magnitude)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * magnitude);
    let start = (lo / step).ceil() as i64;
    let end = (hi / step).floor() as i64;
    (start..=end.min(start + 100))
        .map(|k| {
            let v = k as f64 * step;
            // Snap values that should be zero.
            if v.abs() < step * 1e-9 { 0.0 } else { v }
        })
        .collect()
}

/// A tick label: as few digits as show the value (`0.5`, `20`, `1000`, `-90`).
fn tick(v: f64) -> String {
    if v == 0.0 {
        return "0".to_string();
    }
    let a = v.abs();
    if !(1e-4..1e6).contains(&a) {
        return format!("{v:.1e}");
    }
    let text = format!("{:.6}", v);
    let text = text.trim_end_matches('0').trim_end_matches('.');
    text.to_string()
}

/// A value to three significant digits (`8.60`, `77.3`, `0.0512`, `1.23e-6`).
pub fn sig(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let a = v.abs();
    if !(1e-3..1e5).contains(&a) {
        return format!("{v:.2e}");
    }
    let digits = (2 - a.log10().floor() as i32).max(0) as usize;
    format!("{v:.digits$}")
}

/// plotters' errors as text.
trait OrText<T> {
    fn or_text(self) -> Result<T, String>;
}

impl<T, E: std::fmt::Display> OrText<T> for Result<T, E> {
    fn or_text(self) -> Result<T, String> {
        self.map_err(|e| format!("cannot draw the plot: {e}"))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn log_ticks_are_one_two_five_or_decades() {
        let (major, minor) = log_ticks(2.9, 230.0);
        assert_eq!(major, vec![5.0, 10.0, 20.0, 50.0, 100.0, 200.0]);
        assert!(minor.contains(&3.0) && minor.contains(&30.0) && !minor.contains(&20.0));
        let (major, _) = log_ticks(0.01, 1e4);
        assert_eq!(major, vec![0.01, 0.1, 1.0, 10.0, 100.0, 1000.0, 10000.0]);
        // Narrower than one 1-2-5 step: every integer multiple.
        let (major, _) = log_ticks(15.0, 45.0);
        assert_eq!(major, vec![20.0, 30.0, 40.0]);
        // Narrower still: a linear set.
        let (major, _) = log_ticks(15.0, 16.0);
        assert!(major.len() >= 3 && major.iter().all(|v| (15.0..=16.0).contains(v)));
    }

    #[test]
    fn phase_unwraps_across_the_half_turn() {
        let u = unwrap_degrees([-170.0, 175.0, 160.0].into_iter());
        assert_eq!(u, vec![-170.0, -185.0, -200.0]);
    }

    #[test]
    fn numbers_read_as_three_figures() {
        assert_eq!(sig(8.6012), "8.60");
        assert_eq!(sig(77.34), "77.3");
        assert_eq!(sig(0.05123), "0.0512");
        assert_eq!(sig(1234.4), "1234");
        assert_eq!(sig(1.5e-6), "1.50e-6");
        assert_eq!(tick(0.5), "0.5");
        assert_eq!(tick(-90.0), "-90");
        assert_eq!(si_unit(DofKind::Translational, 0.0021), ("mm", 1e-3));
        assert_eq!(si_unit(DofKind::Rotational, 3e-5), ("µrad", 1e-6));
    }
}
