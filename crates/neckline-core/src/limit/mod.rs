//! Forming-limit curves: loading from TOML, interpolation, and distances along strain paths.
//!
//! A curve file (`limits/*.toml`) carries `name`, `source` (required: where the curve comes from),
//! optional `material` and `thickness_mm`, `strain = "engineering" | "true"` (required: lab
//! curves after ISO 12004-2 are usually in true strain, press-shop ones in engineering, and
//! reading one as the other moves the curve by several points), and either `points = [[minor, major], ...]` in percent with minor strictly
//! increasing, or a `[keeler_brazier]` table that generates the empirical steel curve.
//! Between points the curve is linear in the file's own strain measure.

pub mod from_parts;
pub mod keeler_brazier;
pub mod mk;
pub mod necking;
pub mod sections;
pub mod writer;

use crate::error::{Error, Location, Result};
use crate::kinematics::StrainState;
use crate::strain::{EngStrain, StrainMeasure, TrueStrain};
use keeler_brazier::KeelerBrazier;
use serde::Deserialize;
use std::path::Path;
use std::sync::OnceLock;
use toml::Spanned;

/// A forming-limit curve, ready to judge points against.
#[derive(Debug, Clone, PartialEq)]
pub struct LimitCurve {
    /// Short name shown on outputs.
    pub name: String,
    /// Where the curve comes from (test report, model and parameters, publication).
    pub source: String,
    /// Material grade and lot, if stated.
    pub material: Option<String>,
    /// Sheet thickness the curve is for, mm, if stated.
    pub thickness_mm: Option<f64>,
    /// The strain measure of `points`.
    pub measure: StrainMeasure,
    /// `[minor, major]` as fractions in `measure`, minor strictly increasing.
    pub points: Vec<[f64; 2]>,
    /// Warnings raised while building the curve (clamps that acted).
    pub warnings: Vec<String>,
    /// The part of the minor-strain range the curve's evidence supports, `[from, to]` as
    /// fractions in `measure` (a press-shop curve's `supported`); `None` = all of it.
    pub supported: Option<[f64; 2]>,
    /// The scatter of each point, `[minor, major]` as fractions in `measure` (one standard
    /// deviation, a laboratory curve's `scatter`); `None` when the file gives none.
    pub scatter: Option<Vec<[f64; 2]>>,
    /// The curve in true strain, built on first use by [`LimitCurve::limit_use_pct`].
    pub true_path: OnceLock<TruePath>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct CurveFile {
    name: String,
    source: String,
    material: Option<String>,
    thickness_mm: Option<f64>,
    strain: Option<StrainMeasure>,
    points: Option<Vec<Spanned<Vec<f64>>>>,
    keeler_brazier: Option<KeelerBrazier>,
    supported: Option<Spanned<Vec<f64>>>,
    /// The 50 % line of a press-shop curve: information, not judged against.
    #[allow(dead_code)]
    points_50: Option<Vec<Vec<f64>>>,
    /// One standard deviation per point, `[minor, major]` in percent (a laboratory curve).
    scatter: Option<Spanned<Vec<Vec<f64>>>>,
}

/// A curve as a polyline in true strain, ready for ray queries.
#[derive(Debug, Clone, PartialEq)]
pub struct TruePath {
    /// Vertices `[ε2, ε1]`, minor strain increasing.
    pub points: Vec<[f64; 2]>,
    /// Whether the origin sees the vertices under a strictly turning angle (true of every
    /// forming-limit curve drawn above the origin): then a ray meets at most one segment.
    pub star_shaped: bool,
    /// The safety band below the curve, built on first use by
    /// [`LimitCurve::band_point_on_ray`] for one band width (its bits), so that judging many
    /// paths does not build it again for each.
    pub band: OnceLock<(u64, Option<Box<TruePath>>)>,
}

impl TruePath {
    /// Build from vertices.
    pub fn new(points: Vec<[f64; 2]>) -> Self {
        let star_shaped = points.windows(2).all(|w| cross(w[0], w[1]) < 0.0);
        TruePath {
            points,
            star_shaped,
            band: OnceLock::new(),
        }
    }
}

/// How far (strain, as a fraction) a minor strain may lie outside a curve's range and still be
/// read at its end: 1e-9, i.e. 1e-7 percentage points. Round-off of a double near 1 is about
/// 1e-16 per operation, and a strain passes through a handful of them (a division, a logarithm
/// and an exponential), so 1e-9 covers it with a wide margin, while the smallest difference any
/// output shows is 0.001 % (1e-5): a point this close to the end prints at the end.
pub const RANGE_TOLERANCE: f64 = 1e-9;

/// Most points a curve file may have: tabulated and generated curves have tens to a few hundred
/// (a generated one at most 301 paths), so more is not a curve but a mistake, refused before
/// any work.
pub const MAX_POINTS: usize = 10_000;

/// Largest strain magnitude accepted in a curve file, percent (a plausibility bound).
const PLAUSIBLE_PCT: f64 = 300.0;

pub use crate::error::line_col;

impl LimitCurve {
    /// Load and validate a curve file.
    ///
    /// ```
    /// use neckline_core::limit::LimitCurve;
    /// use std::path::Path;
    ///
    /// # let limits = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../limits");
    /// let curve = LimitCurve::load(&limits.join("steel-1.50mm-n0.18-keeler-brazier.toml"))?;
    /// // Keeler-Brazier (Keeler & Brazier 1977, NADDRG form): FLC0 = (23.3 + 14.13 t) n / 0.21
    /// // = (23.3 + 14.13 × 1.5) × 0.18 / 0.21 = 38.14 % engineering major strain.
    /// assert!((curve.major_at(0.0).unwrap() - 0.3814).abs() < 1e-4);
    /// assert_eq!(curve.thickness_mm, Some(1.5));
    /// # Ok::<(), neckline_core::Error>(())
    /// ```
    pub fn load(path: &Path) -> Result<Self> {
        let text = crate::text::read_text(path)?;
        Self::parse(&text, path)
    }

    /// Parse and validate curve TOML; `path` is used in messages.
    ///
    /// A tabulated curve is read as written; a `[keeler_brazier]` table generates the empirical
    /// steel curve:
    ///
    /// ```
    /// use neckline_core::limit::LimitCurve;
    /// use neckline_core::strain::StrainMeasure;
    /// use std::path::Path;
    ///
    /// let text = r#"
    /// name = "Keeler-Brazier, steel 0.80 mm, n 0.20"
    /// source = "Keeler & Brazier 1977, NADDRG form"
    /// strain = "engineering"
    ///
    /// [keeler_brazier]
    /// n = 0.20
    /// thickness_mm = 0.8
    /// "#;
    /// let curve = LimitCurve::parse(text, Path::new("kb.toml"))?;
    /// assert_eq!(curve.measure, StrainMeasure::Engineering);
    /// // FLC0 = (23.3 + 14.13 t) n / 0.21 = (23.3 + 14.13 × 0.8) × 0.20 / 0.21 = 32.96 %
    /// // (Keeler & Brazier 1977); right of plane strain the major strain rises by 0.6 of the
    /// // minor (common practice): 32.96 + 0.6 × 10 = 38.96 % at 10 % minor.
    /// assert!((curve.major_at(0.0).unwrap() - 0.3296).abs() < 1e-4);
    /// assert!((curve.major_at(0.10).unwrap() - 0.3896).abs() < 1e-4);
    ///
    /// // A curve without its strain measure is refused, naming the file.
    /// let err = LimitCurve::parse("name = \"x\"\nsource = \"y\"\npoints = [[0, 30], [10, 35]]\n",
    ///     Path::new("bare.toml")).unwrap_err();
    /// assert!(err.to_string().contains("bare.toml") && err.to_string().contains("`strain`"));
    /// # Ok::<(), neckline_core::Error>(())
    /// ```
    pub fn parse(text: &str, path: &Path) -> Result<Self> {
        let at = |offset: usize| {
            let (l, c) = line_col(text, offset);
            let mut loc = Location::file(path).at_line(l);
            loc.column = Some(c);
            loc
        };
        let file: CurveFile =
            toml::from_str(text).map_err(|e| crate::error::toml_error(path, text, &e))?;
        let whole = |m: String| Error::input(Location::file(path), m);
        let Some(strain) = file.strain else {
            return Err(whole(
                "`strain` is missing: give the strain measure of the points, one of \
                 `strain = \"engineering\"` or `strain = \"true\"`"
                    .into(),
            ));
        };
        if file.source.trim().is_empty() {
            return Err(whole(
                "`source` is empty: say where the curve comes from".into(),
            ));
        }
        if let Some(t) = file.thickness_mm {
            if !(t.is_finite() && t > 0.0 && t <= 25.0) {
                return Err(whole(format!("thickness_mm = {t} is outside 0 < t <= 25")));
            }
        }
        let (pct, warnings) = match (file.points, file.keeler_brazier) {
            (Some(_), Some(_)) => {
                return Err(whole(
                    "give either `points` or `[keeler_brazier]`, not both".into(),
                ))
            }
            (None, None) => {
                return Err(whole(
                    "no curve: give `points = [[minor, major], ...]` in percent \
                                  or a `[keeler_brazier]` table"
                        .into(),
                ))
            }
            (None, Some(kb)) => {
                kb.validate()
                    .map_err(|m| whole(format!("[keeler_brazier]: {m}")))?;
                if strain != StrainMeasure::Engineering {
                    return Err(whole(
                        "a [keeler_brazier] curve is defined in engineering strain: \
                         set `strain = \"engineering\"`"
                            .into(),
                    ));
                }
                let (_, _, w) = kb.clamped();
                (kb.points_pct(), w)
            }
            (Some(points), None) => (validate_points(&points, &at, strain)?, Vec::new()),
        };
        let supported = match &file.supported {
            None => None,
            Some(r) => {
                let v = r.get_ref();
                let (lo, hi) = (pct[0][0], pct[pct.len() - 1][0]);
                let ok = v.len() == 2
                    && v.iter().all(|x| x.is_finite())
                    && v[0] <= v[1]
                    && v[0] >= lo - 1e-6
                    && v[1] <= hi + 1e-6;
                if !ok {
                    return Err(Error::input(
                        at(r.span().start),
                        format!(
                            "`supported` must be [from, to] in percent minor strain, from <= \
                             to, within the points' range {lo} to {hi}"
                        ),
                    ));
                }
                Some([v[0] / 100.0, v[1] / 100.0])
            }
        };
        let scatter = match &file.scatter {
            None => None,
            Some(sc) => {
                let v = sc.get_ref();
                let ok = v.len() == pct.len()
                    && v.iter().all(|p| {
                        p.len() == 2
                            && p.iter()
                                .all(|x| x.is_finite() && *x >= 0.0 && *x <= PLAUSIBLE_PCT)
                    });
                if !ok {
                    return Err(Error::input(
                        at(sc.span().start),
                        format!(
                            "`scatter` must give [minor, major] in percent, each finite and not \
                             negative, for each of the {} points",
                            pct.len()
                        ),
                    ));
                }
                Some(v.iter().map(|p| [p[0] / 100.0, p[1] / 100.0]).collect())
            }
        };
        Ok(LimitCurve {
            scatter,
            supported,
            name: file.name,
            source: file.source,
            material: file.material,
            thickness_mm: file.thickness_mm,
            measure: strain,
            points: pct.iter().map(|p| [p[0] / 100.0, p[1] / 100.0]).collect(),
            warnings,
            true_path: OnceLock::new(),
        })
    }

    /// The supported part of the minor-strain range in true strain, when the file states one.
    pub fn supported_true(&self) -> Option<(f64, f64)> {
        let [a, b] = self.supported?;
        let t = |v: f64| self.measure.to_true(v).map(|t| t.value());
        Some((t(a)?, t(b)?))
    }

    /// The minor-strain range covered by the curve, in its own measure.
    pub fn minor_range(&self) -> (f64, f64) {
        (self.points[0][0], self.points[self.points.len() - 1][0])
    }

    /// Major limit strain at a minor strain, both in the curve's own measure; `None` outside range.
    /// A minor strain within [`RANGE_TOLERANCE`] of an end counts as at that end: a reading such
    /// as 3.25/2.5 − 1 = 0.30000000000000004, or a strain converted from true to engineering
    /// and back, must not fall off the curve by round-off.
    pub fn major_at(&self, minor: f64) -> Option<f64> {
        let (lo, hi) = self.minor_range();
        if !(minor >= lo - RANGE_TOLERANCE && minor <= hi + RANGE_TOLERANCE) {
            return None;
        }
        let minor = minor.clamp(lo, hi);
        let i = self.points.partition_point(|p| p[0] < minor).max(1);
        let ([x0, y0], [x1, y1]) = (self.points[i - 1], self.points[i]);
        Some(y0 + (y1 - y0) * (minor - x0) / (x1 - x0))
    }

    /// The curve's engineering major strain at a point's minor strain; `None` when the minor
    /// strain is outside the curve's range.
    pub fn limit_major_eng(&self, minor: TrueStrain) -> Option<EngStrain> {
        let own = self.measure.from_true(minor);
        let major = self.major_at(own)?;
        self.measure.to_true(major).map(TrueStrain::to_eng)
    }

    /// [`LimitCurve::limit_major_eng`] at a location whose engineering minor strain is known
    /// too: an engineering curve is read with it directly (no round trip through true strain).
    pub fn limit_major_eng_of(&self, minor: TrueStrain, minor_eng: EngStrain) -> Option<EngStrain> {
        match self.measure {
            StrainMeasure::Engineering => self.major_at(minor_eng.value()).map(EngStrain),
            StrainMeasure::True => self.limit_major_eng(minor),
        }
    }

    /// The curve as a polyline in true strain `[ε2, ε1]`; each straight piece of an engineering
    /// curve is split in `pieces` so that the bend it takes in true strain is followed.
    pub fn true_polyline(&self, pieces: usize) -> Vec<[f64; 2]> {
        let conv = |v: f64| self.measure.to_true(v).map_or(f64::NAN, |t| t.value());
        let pieces = if self.measure == StrainMeasure::True {
            1
        } else {
            pieces.max(1)
        };
        let mut out = Vec::with_capacity(self.points.len() * pieces);
        for w in self.points.windows(2) {
            for k in 0..pieces {
                let s = k as f64 / pieces as f64;
                let minor = w[0][0] + s * (w[1][0] - w[0][0]);
                let major = w[0][1] + s * (w[1][1] - w[0][1]);
                out.push([conv(minor), conv(major)]);
            }
        }
        let last = self.points[self.points.len() - 1];
        out.push([conv(last[0]), conv(last[1])]);
        out
    }

    /// Limit use along the point's own strain path, percent: 100 × (distance of the point from
    /// the origin in true strain) / (distance from the origin to the curve along the same ray).
    /// `None` for a point whose ray does not meet the curve.
    pub fn limit_use_pct(&self, state: &StrainState) -> Option<f64> {
        let p = [
            state.true_strain.minor.value(),
            state.true_strain.major.value(),
        ];
        if p[0].hypot(p[1]) < 1e-12 {
            return Some(0.0);
        }
        ray_hit(
            self.true_path
                .get_or_init(|| TruePath::new(self.true_polyline(16))),
            p,
        )
        .map(|s| 100.0 / s)
    }
}

impl LimitCurve {
    /// Where the straight path from the origin in direction `d = [ε2, ε1]` (true strain) meets
    /// the curve: the curve's point on that ray, or `None` when the ray leaves its range.
    pub fn point_on_ray(&self, d: [f64; 2]) -> Option<[f64; 2]> {
        let path = self
            .true_path
            .get_or_init(|| TruePath::new(self.true_polyline(16)));
        ray_hit(path, d).map(|s| [s * d[0], s * d[1]])
    }

    /// Where the same ray meets the safety band: the curve lowered by `band_pct` percentage
    /// points of engineering major strain at each minor strain (in true strain).
    pub fn band_point_on_ray(&self, band_pct: f64, d: [f64; 2]) -> Option<[f64; 2]> {
        let build = || {
            let band: Vec<[f64; 2]> = self
                .true_polyline(16)
                .into_iter()
                .filter_map(|[e2, e1]| {
                    let eng = e1.exp() - 1.0 - band_pct / 100.0;
                    (eng > -1.0).then(|| [e2, (1.0 + eng).ln()])
                })
                .collect();
            (band.len() >= 2).then(|| Box::new(TruePath::new(band)))
        };
        let path = self
            .true_path
            .get_or_init(|| TruePath::new(self.true_polyline(16)));
        let (bits, cached) = path.band.get_or_init(|| (band_pct.to_bits(), build()));
        let hit = |band: &TruePath| ray_hit(band, d).map(|s| [s * d[0], s * d[1]]);
        if *bits == band_pct.to_bits() {
            cached.as_deref().and_then(hit)
        } else {
            build().as_deref().and_then(hit)
        }
    }
}

fn cross(a: [f64; 2], b: [f64; 2]) -> f64 {
    a[0] * b[1] - a[1] * b[0]
}

/// Where the ray `s·d, s > 0` meets the segment `p`–`q`: `Some(s)`, or `None`.
fn segment_hit(p: [f64; 2], q: [f64; 2], d: [f64; 2]) -> Option<f64> {
    let e = [q[0] - p[0], q[1] - p[1]];
    let den = cross(d, e);
    if den.abs() < 1e-15 {
        return None;
    }
    let s = cross(p, e) / den;
    let u = cross(p, d) / den;
    (s > 0.0 && (-1e-12..=1.0 + 1e-12).contains(&u)).then_some(s)
}

/// Smallest `s > 0` with `s·d` on the path, or `None`.
///
/// On a star-shaped path the vertices lie on the left of the ray, then on its right, so the
/// one segment it can cross is found by bisection; any other path is searched segment by segment.
fn ray_hit(path: &TruePath, d: [f64; 2]) -> Option<f64> {
    let poly = &path.points;
    if path.star_shaped {
        let i = poly.partition_point(|&p| cross(d, p) > 0.0);
        let i = i.clamp(1, poly.len() - 1);
        return segment_hit(poly[i - 1], poly[i], d);
    }
    poly.windows(2)
        .filter_map(|w| segment_hit(w[0], w[1], d))
        .min_by(|a, b| a.total_cmp(b))
}

/// A number for a message: as written when ordinary, in exponent form when huge (1e308 has 309
/// digits in full).
fn short(v: f64) -> String {
    if v.abs() >= 1e9 {
        format!("{v:e}")
    } else {
        v.to_string()
    }
}

fn validate_points(
    points: &[Spanned<Vec<f64>>],
    at: &dyn Fn(usize) -> Location,
    measure: StrainMeasure,
) -> Result<Vec<[f64; 2]>> {
    if points.len() < 2 {
        let loc = points.first().map_or_else(|| at(0), |p| at(p.span().start));
        return Err(Error::input(
            loc,
            "a curve needs at least two points [minor, major]",
        ));
    }
    if let Some(p) = points.get(MAX_POINTS) {
        return Err(Error::input(
            at(p.span().start),
            format!(
                "{} points: a curve has at most {MAX_POINTS} (a tabulated or generated curve \
                 needs a few hundred at most)",
                points.len()
            ),
        ));
    }
    let mut out: Vec<[f64; 2]> = Vec::with_capacity(points.len());
    for p in points {
        let loc = at(p.span().start);
        let v = p.get_ref();
        if v.len() != 2 {
            return Err(Error::input(
                loc,
                format!("expected [minor, major], found {} numbers", v.len()),
            ));
        }
        let [minor, major] = [v[0], v[1]];
        if !v.iter().all(|x| x.is_finite() && x.abs() <= PLAUSIBLE_PCT) {
            return Err(Error::input(
                loc,
                format!(
                    "[{}, {}]: strains must be finite percent values within ±{PLAUSIBLE_PCT}",
                    short(minor),
                    short(major)
                ),
            ));
        }
        if measure == StrainMeasure::Engineering && minor <= -100.0 {
            return Err(Error::input(
                loc,
                format!("minor {minor} %: engineering strain must be above -100 %"),
            ));
        }
        if major <= 0.0 || major < minor {
            return Err(Error::input(
                loc,
                format!("[{minor}, {major}]: the limit major strain must be positive and at least the minor strain"),
            ));
        }
        if let Some(prev) = out.last() {
            if minor <= prev[0] {
                return Err(Error::input(
                    loc,
                    format!("minor strain {minor} does not increase (previous point has {}): sort the points by minor strain", prev[0]),
                ));
            }
        }
        out.push([minor, major]);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    fn curve(text: &str) -> Result<LimitCurve> {
        LimitCurve::parse(text, Path::new("c.toml"))
    }

    const TAB: &str = "name = \"t\"\nsource = \"test\"\nstrain = \"engineering\"\npoints = [[-20, 50], [0, 30], [20, 40]]\n";

    #[test]
    fn linear_interpolation_in_own_measure() {
        let c = curve(TAB).unwrap();
        assert_abs_diff_eq!(c.major_at(-0.1).unwrap(), 0.40, epsilon = 1e-12);
        assert_abs_diff_eq!(c.major_at(0.1).unwrap(), 0.35, epsilon = 1e-12);
        assert!(c.major_at(0.25).is_none());
    }

    #[test]
    fn unsorted_points_name_the_line() {
        let e = curve("name = \"t\"\nsource = \"s\"\nstrain = \"engineering\"\npoints = [\n [0, 30],\n [-5, 40],\n]\n")
            .unwrap_err()
            .to_string();
        assert!(
            e.starts_with("c.toml:6:") && e.contains("does not increase"),
            "{e}"
        );
    }

    // A curve without its strain measure is refused, and the message names the measures.
    #[test]
    fn missing_strain_is_refused_naming_the_measures() {
        let e = curve("name = \"t\"\nsource = \"s\"\npoints = [[0, 30], [1, 31]]\n")
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("`strain` is missing")
                && e.contains("\"engineering\"")
                && e.contains("\"true\""),
            "{e}"
        );
    }

    #[test]
    fn missing_source_is_a_toml_error_with_position() {
        let e = curve("name = \"t\"\npoints = [[0, 30], [1, 31]]\n")
            .unwrap_err()
            .to_string();
        assert!(e.contains("source"), "{e}");
    }

    // The ends of the range are in it, also when the minor strain of a reading overshoots them
    // by round-off: 1.75/2.5 − 1 and 2.75/2.5 − 1 are −0.30000000000000004 and
    // 0.10000000000000009 in binary floating point (IEEE 754 double), one unit in the last place
    // beyond −30 % and 10 %; 1e-6 beyond is outside.
    #[test]
    fn range_ends_hold_against_round_off() {
        let c = curve("name = \"t\"\nsource = \"s\"\nstrain = \"engineering\"\npoints = [[-30, 60], [0, 30], [10, 36]]\n")
            .unwrap();
        let (lo, hi) = (1.75 / 2.5 - 1.0, 2.75 / 2.5 - 1.0);
        assert!(lo < -0.3 && hi > 0.1, "the round-off this test is about");
        assert_abs_diff_eq!(c.major_at(lo).unwrap(), 0.60, epsilon = 1e-12);
        assert_abs_diff_eq!(c.major_at(hi).unwrap(), 0.36, epsilon = 1e-12);
        for e in [lo, hi] {
            let t = EngStrain(e).to_true().unwrap();
            assert!(c.limit_major_eng(t).is_some(), "{e}");
        }
        assert!(c.major_at(-0.300001).is_none());
        assert!(c.major_at(0.100001).is_none());
    }

    // A point on the curve along its own ray has limit use 100 %; half way, 50 %.
    #[test]
    fn limit_use_along_the_ray() {
        let c = curve("name = \"t\"\nsource = \"s\"\nstrain = \"true\"\npoints = [[-20, 40], [0, 20], [20, 40]]\n")
            .unwrap();
        let on = StrainState::from_stretches(
            crate::strain::TrueStrain(0.2).stretch(),
            crate::strain::TrueStrain(0.0).stretch(),
        );
        assert_abs_diff_eq!(c.limit_use_pct(&on).unwrap(), 100.0, epsilon = 1e-9);
        let half = StrainState::from_stretches(
            crate::strain::TrueStrain(0.1).stretch(),
            crate::strain::TrueStrain(0.0).stretch(),
        );
        assert_abs_diff_eq!(c.limit_use_pct(&half).unwrap(), 50.0, epsilon = 1e-9);
    }
}
