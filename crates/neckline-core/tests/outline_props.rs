//! Properties of the traced part outline (`part_outline::trace`), on locations binned as the
//! summary bins them for the map.
//!
//! References:
//! - the area of a simple polygon by the shoelace formula (Gauss's area formula),
//!   A = ½ |Σ (x_i·y_{i+1} − x_{i+1}·y_i)|, e.g. de Berg, Cheong, van Kreveld, Overmars,
//!   "Computational Geometry: Algorithms and Applications", 3rd ed., Springer 2008, ch. 3;
//!   computed here by its own few lines, not by the crate's `signed_area`;
//! - the convex hull by Andrew's monotone chain (A. M. Andrew, "Another efficient algorithm
//!   for convex hulls in two dimensions", Information Processing Letters 9 (5), 1979, 216-219);
//! - the point-in-polygon crossing test (even-odd rule; W. R. Franklin, "PNPOLY - Point
//!   Inclusion in Polygon Test", 1970s note reprinted in many texts), written here again
//!   independently of the crate's.

use neckline_core::part_outline::{trace, OutlineSource, PartOutline};
use neckline_core::summary::{Bins, ZoneCounts};
use proptest::prelude::*;

/// The map's binning as the summary makes it (0.01 units, at most 40 000 cells).
fn bins_of(pts: &[(f64, f64)]) -> Bins<ZoneCounts> {
    let mut b: Bins<ZoneCounts> = Bins::new(0.01, 40_000);
    for &(x, y) in pts {
        b.add(x, y, |c| c.0[0] += 1);
    }
    b.flush();
    b
}

/// The outline traced as `Analysis::finish` traces it: the binned locations, cut to their box.
fn traced(pts: &[(f64, f64)]) -> Option<PartOutline> {
    let e = pts
        .iter()
        .fold([f64::MAX, f64::MAX, f64::MIN, f64::MIN], |e, &(x, y)| {
            [e[0].min(x), e[1].min(y), e[2].max(x), e[3].max(y)]
        });
    let b = bins_of(pts);
    trace(b.cells().keys().copied(), b.size(), Some(e))
}

/// Shoelace area of a closed ring, absolute value.
fn shoelace(ring: &[(f64, f64)]) -> f64 {
    let n = ring.len();
    let twice: f64 = (0..n)
        .map(|i| {
            let (a, b) = (ring[i], ring[(i + 1) % n]);
            a.0 * b.1 - b.0 * a.1
        })
        .sum();
    twice.abs() / 2.0
}

fn cross(o: (f64, f64), a: (f64, f64), b: (f64, f64)) -> f64 {
    (a.0 - o.0) * (b.1 - o.1) - (a.1 - o.1) * (b.0 - o.0)
}

/// Convex hull by Andrew's monotone chain, counter-clockwise, not closed.
fn convex_hull(pts: &[(f64, f64)]) -> Vec<(f64, f64)> {
    let mut p = pts.to_vec();
    p.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
    p.dedup_by(|a, b| (a.0 - b.0).abs() < 1e-12 && (a.1 - b.1).abs() < 1e-12);
    if p.len() < 3 {
        return p;
    }
    let mut lower: Vec<(f64, f64)> = Vec::new();
    for &q in &p {
        while lower.len() >= 2 && cross(lower[lower.len() - 2], lower[lower.len() - 1], q) <= 0.0 {
            lower.pop();
        }
        lower.push(q);
    }
    let mut upper: Vec<(f64, f64)> = Vec::new();
    for &q in p.iter().rev() {
        while upper.len() >= 2 && cross(upper[upper.len() - 2], upper[upper.len() - 1], q) <= 0.0 {
            upper.pop();
        }
        upper.push(q);
    }
    lower.pop();
    upper.pop();
    lower.extend(upper);
    lower
}

/// Even-odd crossing test over every ring, or within `tol` of an edge.
fn inside_or_on(o: &PartOutline, p: (f64, f64), tol: f64) -> bool {
    let mut odd = false;
    for r in &o.rings {
        let n = r.len();
        for i in 0..n {
            let (a, b) = (r[i], r[(i + 1) % n]);
            let (dx, dy) = (b.0 - a.0, b.1 - a.1);
            let t = (((p.0 - a.0) * dx + (p.1 - a.1) * dy) / (dx * dx + dy * dy)).clamp(0.0, 1.0);
            if (p.0 - a.0 - t * dx).hypot(p.1 - a.1 - t * dy) <= tol {
                return true;
            }
            if (a.1 > p.1) != (b.1 > p.1) && p.0 < a.0 + (p.1 - a.1) * dx / dy {
                odd = !odd;
            }
        }
    }
    odd
}

/// Locations on a square lattice of pitch `h` inside an ellipse (a convex set), turned by
/// `angle` and moved to `(cx, cy)`.
fn ellipse_field(a: f64, b: f64, angle: f64, h: f64, c: (f64, f64)) -> Vec<(f64, f64)> {
    let n = (a.max(b) / h).ceil() as i64;
    let (s, co) = angle.sin_cos();
    let mut v = Vec::new();
    for i in -n..=n {
        for j in -n..=n {
            let (x, y) = (i as f64 * h, j as f64 * h);
            if (x / a).powi(2) + (y / b).powi(2) <= 1.0 {
                v.push((c.0 + co * x - s * y, c.1 + s * x + co * y));
            }
        }
    }
    v
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    // Any scatter of locations: every one lies inside or on the traced outline.
    #[test]
    fn every_location_is_inside_or_on_the_outline(
        pts in prop::collection::vec((-500.0f64..500.0, -300.0f64..300.0), 1..400),
        scale in 0.01f64..100.0,
    ) {
        let pts: Vec<(f64, f64)> = pts.iter().map(|&(x, y)| (x * scale, y * scale)).collect();
        let o = traced(&pts).expect("locations give an outline");
        prop_assert_eq!(&o.source, &OutlineSource::Traced);
        let tol = 1e-9 * (1.0 + 500.0 * scale);
        for &p in &pts {
            prop_assert!(inside_or_on(&o, p, tol), "{:?} outside {:?}", p, o.rings);
        }
    }

    // A convex field of locations (a lattice filling an ellipse): the traced outline's area is
    // the convex hull's within a band of two cells round the hull's perimeter (the outline
    // follows the cells, which reach up to a cell beyond the outermost locations, plus the
    // cut corners), and never less than the hull's less that band.
    #[test]
    fn a_convex_field_traces_to_its_convex_hull_area(
        a in 20.0f64..400.0,
        ratio in 0.4f64..1.0,
        angle in 0.0f64..std::f64::consts::PI,
        cx in -1000.0f64..1000.0,
        cy in -1000.0f64..1000.0,
    ) {
        let b = a * ratio;
        let h = a / 60.0;
        let pts = ellipse_field(a, b, angle, h, (cx, cy));
        let o = traced(&pts).expect("an outline");
        let hull = convex_hull(&pts);
        let hull_area = shoelace(&hull);
        let perimeter: f64 = (0..hull.len())
            .map(|i| {
                let (p, q) = (hull[i], hull[(i + 1) % hull.len()]);
                (q.0 - p.0).hypot(q.1 - p.1)
            })
            .sum();
        let cell = o.cell.expect("a traced outline has its cell size");
        let traced: f64 = o.rings.iter().map(|r| shoelace(r)).sum();
        prop_assert_eq!(o.rings.len(), 1, "one ring round a convex field");
        let band = 2.0 * cell * perimeter;
        prop_assert!(
            (traced - hull_area).abs() <= band,
            "traced {} hull {} band {} (cell {})", traced, hull_area, band, cell
        );
        // And the band is narrow: the cells are fine against the field.
        prop_assert!(band < 0.5 * hull_area, "band {} hull {}", band, hull_area);
    }
}

// A square field, once of 100 locations and once of 250 000 (sides 99 and 99.8): both
// outlines hold the square and neither is more than two cells wider.
#[test]
fn a_few_and_very_many_locations_trace_alike() {
    for (n, pitch) in [(10usize, 11.0), (500, 0.2)] {
        let pts: Vec<(f64, f64)> = (0..n * n)
            .map(|k| ((k % n) as f64 * pitch, (k / n) as f64 * pitch))
            .collect();
        let side = (n - 1) as f64 * pitch;
        let o = traced(&pts).unwrap();
        let cell = o.cell.unwrap();
        let area: f64 = o.rings.iter().map(|r| shoelace(r)).sum();
        assert_eq!(o.rings.len(), 1, "n = {n}");
        assert!(
            area >= side * side - 1e-6 && area <= (side + 2.0 * cell).powi(2),
            "n = {n}: area {area}, square {}",
            side * side
        );
        assert!(pts.iter().all(|&p| inside_or_on(&o, p, 1e-9 * side)));
    }
}
