//! The replay figure: the scatter coloured by verdict with the baseline mean, the gate ellipse
//! and the tolerance zone; below it the chart statistic against sample index, with its limit
//! and the alarms. Drawn once through plotters into SVG and into PNG.

use std::path::Path;

use plotters::coord::Shift;
use plotters::prelude::*;

use crate::replay::{Outcome, ZoneSpec};

const GO: RGBColor = RGBColor(40, 140, 60);
const NOGO: RGBColor = RGBColor(200, 40, 40);
const LEARN: RGBColor = RGBColor(150, 150, 150);

static FONT: std::sync::Once = std::sync::Once::new();

fn register_font() {
    FONT.call_once(|| {
        // A font shipped inside a crates.io package, so no system fonts are needed.
        let _ = plotters::style::register_font(
            "sans-serif",
            FontStyle::Normal,
            epaint_default_fonts::UBUNTU_LIGHT,
        );
    });
}

/// Everything the figure shows.
pub struct Figure<'a> {
    /// The first two columns of every sample.
    pub points: &'a [[f64; 2]],
    /// The replay's outcome.
    pub outcome: &'a Outcome,
    /// The zone, if any.
    pub zone: Option<ZoneSpec>,
    /// Column names for the axes.
    pub names: [&'a str; 2],
    /// Title.
    pub title: &'a str,
}

fn err<E: std::fmt::Debug>(e: E) -> String {
    format!("figure: {e:?}")
}

fn draw<DB: DrawingBackend>(root: DrawingArea<DB, Shift>, f: &Figure) -> Result<(), String>
where
    DB::ErrorType: 'static,
{
    root.fill(&WHITE).map_err(err)?;
    let (top, bottom) = root.split_vertically(620);
    let o = f.outcome;
    // Scatter extent: the points, the gate ellipse and the finite zone edges.
    let ell: Vec<(f64, f64)> = if o.dim == 2 {
        let r = o.gate_limit.sqrt();
        (0..=120)
            .map(|k| {
                let t = std::f64::consts::TAU * f64::from(k) / 120.0;
                let (u, v) = (r * t.cos(), r * t.sin());
                (
                    o.mean[0] + o.factor[0][0] * u,
                    o.mean[1] + o.factor[1][0] * u + o.factor[1][1] * v,
                )
            })
            .collect()
    } else {
        Vec::new()
    };
    let zone_path: Vec<(f64, f64)> = match f.zone {
        Some(ZoneSpec::Circle([cx, cy, d])) => (0..=120)
            .map(|k| {
                let t = std::f64::consts::TAU * f64::from(k) / 120.0;
                (cx + d / 2.0 * t.cos(), cy + d / 2.0 * t.sin())
            })
            .collect(),
        Some(ZoneSpec::Ellipse([cx, cy, a, b, deg])) => {
            let (s, c) = deg.to_radians().sin_cos();
            (0..=120)
                .map(|k| {
                    let t = std::f64::consts::TAU * f64::from(k) / 120.0;
                    let (u, v) = (a * t.cos(), b * t.sin());
                    (cx + c * u - s * v, cy + s * u + c * v)
                })
                .collect()
        }
        _ => Vec::new(),
    };
    let mut xs: Vec<f64> = f
        .points
        .iter()
        .map(|p| p[0])
        .chain(ell.iter().map(|p| p.0))
        .chain(zone_path.iter().map(|p| p.0))
        .collect();
    let mut ys: Vec<f64> = f
        .points
        .iter()
        .map(|p| p[1])
        .chain(ell.iter().map(|p| p.1))
        .chain(zone_path.iter().map(|p| p.1))
        .collect();
    if let Some(ZoneSpec::Rect(r)) = f.zone {
        xs.extend([r[0], r[1]].iter().filter(|v| v.is_finite()));
        ys.extend([r[2], r[3]].iter().filter(|v| v.is_finite()));
    }
    let span = |v: &[f64]| {
        let lo = v.iter().cloned().fold(f64::INFINITY, f64::min);
        let hi = v.iter().cloned().fold(f64::NEG_INFINITY, f64::max);
        let pad = 0.06 * (hi - lo).max(1e-9);
        (lo - pad, hi + pad)
    };
    let (mut x0, mut x1) = span(&xs);
    let (mut y0, mut y1) = span(&ys);
    // Equal scales on both axes (a circle looks round): widen the narrower span to the plot
    // area's aspect ratio (about 830 x 530 pixels).
    let aspect = 830.0 / 530.0;
    let (w, h) = (x1 - x0, y1 - y0);
    if w / h < aspect {
        let grow = (h * aspect - w) / 2.0;
        x0 -= grow;
        x1 += grow;
    } else {
        let grow = (w / aspect - h) / 2.0;
        y0 -= grow;
        y1 += grow;
    }
    let mut chart = ChartBuilder::on(&top)
        .caption(f.title, ("sans-serif", 22))
        .margin(12)
        .x_label_area_size(36)
        .y_label_area_size(56)
        .build_cartesian_2d(x0..x1, y0..y1)
        .map_err(err)?;
    chart
        .configure_mesh()
        .x_desc(f.names[0])
        .y_desc(f.names[1])
        .label_style(("sans-serif", 14))
        .draw()
        .map_err(err)?;
    for (p, r) in f.points.iter().zip(&o.rows) {
        let c = match r.verdict {
            "go" => GO,
            "no-go" => NOGO,
            _ => LEARN,
        };
        chart
            .draw_series(std::iter::once(Circle::new((p[0], p[1]), 3, c.filled())))
            .map_err(err)?;
    }
    if o.dim == 2 {
        chart
            .draw_series(std::iter::once(Cross::new(
                (o.mean[0], o.mean[1]),
                8,
                BLACK.stroke_width(2),
            )))
            .map_err(err)?
            .label("baseline mean")
            .legend(|(x, y)| Cross::new((x, y), 5, BLACK.stroke_width(2)));
        chart
            .draw_series(LineSeries::new(ell, BLUE.stroke_width(2)))
            .map_err(err)?
            .label("gate (Phase II limit)")
            .legend(|(x, y)| PathElement::new(vec![(x - 10, y), (x + 10, y)], BLUE));
    }
    let zone_style = RGBColor(230, 140, 0).stroke_width(2);
    if let Some(ZoneSpec::Rect(r)) = f.zone {
        let cl = |v: f64, lo: f64, hi: f64| v.clamp(lo, hi);
        let (a, b, c, d) = (
            cl(r[0], x0, x1),
            cl(r[1], x0, x1),
            cl(r[2], y0, y1),
            cl(r[3], y0, y1),
        );
        chart
            .draw_series(std::iter::once(PathElement::new(
                vec![(a, c), (b, c), (b, d), (a, d), (a, c)],
                zone_style,
            )))
            .map_err(err)?
            .label("tolerance zone")
            .legend(move |(x, y)| PathElement::new(vec![(x - 10, y), (x + 10, y)], zone_style));
    } else if !zone_path.is_empty() {
        chart
            .draw_series(LineSeries::new(zone_path, zone_style))
            .map_err(err)?
            .label("tolerance zone")
            .legend(move |(x, y)| PathElement::new(vec![(x - 10, y), (x + 10, y)], zone_style));
    }
    chart
        .draw_series(std::iter::once(Circle::new((x0, y0), 0, GO.filled())))
        .map_err(err)?
        .label("go")
        .legend(|(x, y)| Circle::new((x, y), 4, GO.filled()));
    chart
        .draw_series(std::iter::once(Circle::new((x0, y0), 0, NOGO.filled())))
        .map_err(err)?
        .label("no-go")
        .legend(|(x, y)| Circle::new((x, y), 4, NOGO.filled()));
    chart
        .draw_series(std::iter::once(Circle::new((x0, y0), 0, LEARN.filled())))
        .map_err(err)?
        .label("learning")
        .legend(|(x, y)| Circle::new((x, y), 4, LEARN.filled()));
    chart
        .configure_series_labels()
        .position(SeriesLabelPosition::UpperLeft)
        .background_style(WHITE.mix(0.85))
        .border_style(BLACK)
        .label_font(("sans-serif", 14))
        .draw()
        .map_err(err)?;

    // Chart statistic against sample index.
    let stats: Vec<(f64, f64)> = o
        .rows
        .iter()
        .enumerate()
        .filter_map(|(k, r)| r.statistic.or(r.d2).map(|s| (k as f64, s)))
        .collect();
    let label = if o.chart_limit.is_some() {
        "chart statistic"
    } else {
        "d^2"
    };
    let limit = o.chart_limit.unwrap_or(o.gate_limit);
    let smax = stats.iter().map(|s| s.1).fold(limit, f64::max) * 1.1;
    let n = o.rows.len().max(1) as f64;
    let mut c2 = ChartBuilder::on(&bottom)
        .margin(12)
        .x_label_area_size(36)
        .y_label_area_size(56)
        .build_cartesian_2d(0.0..n, 0.0..smax)
        .map_err(err)?;
    c2.configure_mesh()
        .x_desc("sample")
        .y_desc(label)
        .label_style(("sans-serif", 14))
        .draw()
        .map_err(err)?;
    c2.draw_series(LineSeries::new(stats, BLACK)).map_err(err)?;
    c2.draw_series(LineSeries::new(
        vec![(0.0, limit), (n, limit)],
        RED.stroke_width(2),
    ))
    .map_err(err)?;
    for (k, r) in o.rows.iter().enumerate() {
        if r.alarm {
            c2.draw_series(std::iter::once(PathElement::new(
                vec![(k as f64, 0.0), (k as f64, smax)],
                NOGO.stroke_width(2),
            )))
            .map_err(err)?;
        }
    }
    root.present().map_err(err)?;
    Ok(())
}

/// Writes `figure.svg` and `figure.png` (900 x 920 pixels) into `dir`.
pub fn write(dir: &Path, f: &Figure) -> Result<(), String> {
    register_font();
    let svg = dir.join("figure.svg");
    let png = dir.join("figure.png");
    draw(SVGBackend::new(&svg, (900, 920)).into_drawing_area(), f)?;
    draw(BitMapBackend::new(&png, (900, 920)).into_drawing_area(), f)?;
    Ok(())
}
