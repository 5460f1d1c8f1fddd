//! The lines of the forming-limit diagram in axis coordinates (percent of the strain measure
//! plotted), all from true strains ε1 ≥ ε2 mapped to the axis measure: the limit curve, the
//! safety band, the reference strain paths and the thinning iso-lines (formulas in the
//! diagram's module documentation).

use crate::plot;
use neckline_core::analysis::Analysis;
use neckline_core::strain::StrainMeasure;

/// Thinning iso-lines drawn, percent.
pub const THINNING_LINES: [f64; 3] = [10.0, 20.0, 30.0];

/// A line: points in axis coordinates.
pub type Line = Vec<(f64, f64)>;

/// The limit curve in axis coordinates (percent of `measure`).
pub fn curve_line(a: &Analysis, measure: StrainMeasure) -> Line {
    a.curve
        .true_polyline(16)
        .iter()
        .map(|p| {
            (
                plot::axis_value(measure, p[0]),
                plot::axis_value(measure, p[1]),
            )
        })
        .collect()
}

/// The curve's scatter band, when its file gives one (a laboratory curve's `scatter`): the
/// outline of the curve's points with their major strain raised and lowered by one standard
/// deviation (in the file's measure), in axis coordinates, ready to fill.
pub fn scatter_band(a: &Analysis, measure: StrainMeasure) -> Option<Line> {
    let sc = a.curve.scatter.as_ref()?;
    let to_axis = |minor: f64, major: f64| {
        let t = |v: f64| a.curve.measure.to_true(v).map(|s| s.value());
        Some((
            plot::axis_value(measure, t(minor)?),
            plot::axis_value(measure, t(major)?),
        ))
    };
    let pts = &a.curve.points;
    let upper = pts.iter().zip(sc).map(|(p, s)| to_axis(p[0], p[1] + s[1]));
    let lower = pts
        .iter()
        .zip(sc)
        .rev()
        .map(|(p, s)| to_axis(p[0], p[1] - s[1]));
    upper.chain(lower).collect()
}

/// The safety-band line: the curve's engineering major strain minus the margin, in axis
/// coordinates. Points where that would be no strain at all (e ≤ −1) are left out.
pub fn band_line(a: &Analysis, measure: StrainMeasure) -> Line {
    let m = a.settings.margin_pct / 100.0;
    a.curve
        .true_polyline(16)
        .iter()
        .filter_map(|p| {
            let e1 = p[1].exp() - 1.0 - m;
            (e1 > -1.0).then(|| {
                (
                    plot::axis_value(measure, p[0]),
                    plot::axis_value(measure, (1.0 + e1).ln()),
                )
            })
        })
        .collect()
}

/// A straight path in true strain, `(ε2, ε1) = s·(dir)`, for `s` in `0..=2`, in axis coordinates.
fn ray(dir: (f64, f64), measure: StrainMeasure) -> Line {
    (0..=400)
        .map(|k| {
            let s = k as f64 * 0.005;
            (
                plot::axis_value(measure, s * dir.0),
                plot::axis_value(measure, s * dir.1),
            )
        })
        .collect()
}

/// The reference strain paths with their labels.
pub fn reference_paths(measure: StrainMeasure) -> Vec<(&'static str, Line)> {
    vec![
        ("uniaxial β = −½", ray((-0.5, 1.0), measure)),
        ("plane strain β = 0", ray((0.0, 1.0), measure)),
        ("equibiaxial β = 1", ray((1.0, 1.0), measure)),
        ("constant thickness ε1 = −ε2", ray((-1.0, 1.0), measure)),
    ]
}

/// The thinning iso-line for `pct` percent: ε1 + ε2 = −ln(1 − pct/100), drawn from the
/// equibiaxial line (ε1 = ε2) towards negative minor strain, in axis coordinates.
pub fn thinning_line(pct: f64, measure: StrainMeasure) -> Line {
    let c = -(1.0 - pct / 100.0).ln();
    (0..=400)
        .map(|k| {
            let e2 = c / 2.0 - k as f64 * 0.005;
            (
                plot::axis_value(measure, e2),
                plot::axis_value(measure, c - e2),
            )
        })
        .collect()
}

/// The frame of a curve picture on true-strain axes (minor across, major up) with the
/// reference strain paths drawn: where the press-shop and the laboratory curve pictures start.
pub fn true_strain_frame<DB: plotters::prelude::DrawingBackend>(
    root: &plotters::prelude::DrawingArea<DB, plotters::coord::Shift>,
    x: (f64, f64),
    y: (f64, f64),
) -> Result<crate::chart::frame::Plot<DB>, plotters::prelude::DrawingAreaErrorKind<DB::ErrorType>> {
    let plot = crate::chart::frame::Frame {
        x,
        y,
        x_desc: "minor strain ε2, true %".into(),
        y_desc: "major strain ε1, true %".into(),
        look: crate::chart::frame::Look::Diagram,
    }
    .draw(root)?;
    for (_, line) in reference_paths(StrainMeasure::True) {
        for run in plot.runs(&line) {
            crate::chart::REFERENCE.draw(root, &run)?;
        }
    }
    Ok(plot)
}

#[cfg(test)]
mod tests {
    use super::*;
    use neckline_core::output::fixture;

    #[test]
    fn thinning_lines_hold_constant_thickness_product() {
        // t/t0 = 1/(λ1 λ2) by constant volume (any continuum mechanics text): on the 20 % line,
        // (1 + e1)(1 + e2) = 1 / 0.8 = 1.25 in engineering strain.
        for (x, y) in thinning_line(20.0, StrainMeasure::Engineering) {
            assert!(((1.0 + x / 100.0) * (1.0 + y / 100.0) - 1.25).abs() < 1e-9);
            assert!(y >= x - 1e-9, "major below minor at ({x}, {y})");
        }
    }

    #[test]
    fn reference_paths_have_their_strain_ratios() {
        // Uniaxial tension of an isotropic sheet: β = ε2/ε1 = −1/2 in true strain, i.e.
        // 1 + e2 = (1 + e1)^(−1/2) in engineering strain (FIELD notes §2, common practice).
        let paths = reference_paths(StrainMeasure::Engineering);
        for (x, y) in &paths[0].1[1..] {
            let beta = (1.0 + x / 100.0).ln() / (1.0 + y / 100.0).ln();
            assert!((beta + 0.5).abs() < 1e-9);
        }
        // Equibiaxial: e1 = e2.
        assert!(paths[2].1.iter().all(|(x, y)| (x - y).abs() < 1e-9));
    }

    #[test]
    fn band_is_curve_minus_margin_in_engineering_major() {
        let a = fixture::analysis(true);
        let c = curve_line(&a, StrainMeasure::Engineering);
        let b = band_line(&a, StrainMeasure::Engineering);
        assert_eq!(c.len(), b.len());
        for (p, q) in c.iter().zip(&b) {
            assert!((p.0 - q.0).abs() < 1e-9 && (p.1 - q.1 - 10.0).abs() < 1e-9);
        }
    }
}
