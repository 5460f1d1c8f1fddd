//! A laboratory curve from test-section strain profiles: the position-dependent ("section")
//! method after ISO 12004-2 (2008, clause 7.2 and its annex; revised 2021), as neckline
//! implements it.
//!
//! Each specimen (Nakajima or Marciniak, one width per geometry) is stretched to fracture; on
//! the last image before fracture, lines across the crack give strain profiles. For each
//! section ([`evaluate`]):
//!
//! 1. the crack position: the middle of the gap of missing points, else the maximum of the
//!    major strain ([`profile::crack_position`]);
//! 2. the window width `w = 10 mm × (1 + ε2/ε1)` from the strain ratio near the crack
//!    ([`profile::window_width`]; the formula from memory, the clamp ours);
//! 3. on each side, the inner limit at the maximum of the filtered second derivative of the
//!    major strain (the foot of the neck), the window of width `w` beyond it
//!    ([`profile::window`]);
//! 4. the inverse parabola `1/(a x² + b x + c)` fitted by least squares to the points of both
//!    windows, for the major and the minor strain; the limit strains are its values at the
//!    crack ([`profile::fit_inverse_parabola`]);
//! 5. validity checks ([`Problem`]): a crack off the section, too few points in a window, an
//!    implausible fit (residual or curvature), an asymmetric profile.
//!
//! Per geometry ([`geometry_stats`]): mean and scatter over the valid sections of every
//! specimen, outliers named and left out; the series is warned about ([`series_warnings`]) with
//! fewer than five geometries, no geometry near plane strain, or fewer than three sections on
//! each of three specimens (common practice). The curve ([`lab_curve`]) is written as the curve
//! TOML `check` reads, in true strain, with the scatter per point.
//!
//! Where the standard's text could not be verified the doc comments say "from memory"; every
//! choice of ours says "ours".

pub mod profile;
pub mod read;
#[cfg(test)]
mod tests;

use profile::{CrackBy, InverseParabola, NoWindow, Side, Window};
use std::fmt;

/// Fewest points a fit window must hold (ours: three determine the parabola; five leave two
/// degrees of freedom for the residual).
pub const MIN_WINDOW_POINTS: usize = 5;

/// Largest root-mean-square residual of a fit, true strain (1 percentage point; ours: an optical
/// system's strain noise is a few tenths of a point, common practice).
pub const MAX_RMS: f64 = 0.01;

/// Fewest measured points of a section worth evaluating (ours).
pub const MIN_SECTION_POINTS: usize = 10;

/// A minor strain is fitted with the inverse parabola only when every window point has the same
/// sign and at least this magnitude, true strain (ours: near zero the reciprocal is
/// meaningless); else with an ordinary parabola.
pub const MINOR_INVERSE_MIN: f64 = 0.01;

/// Which section: its geometry, specimen and section labels as read.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct SectionKey {
    /// The specimen geometry's label (its width, for example).
    pub geometry: String,
    /// The specimen's label.
    pub specimen: String,
    /// The section's label.
    pub section: String,
}

impl fmt::Display for SectionKey {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "geometry {}, specimen {}, section {}",
            self.geometry, self.specimen, self.section
        )
    }
}

/// The points of one section, sorted by position.
#[derive(Debug, Clone, PartialEq)]
pub struct SectionProfile {
    /// Which section.
    pub key: SectionKey,
    /// Position along the section line, mm, increasing.
    pub x: Vec<f64>,
    /// Major true strain at each position (fraction).
    pub major: Vec<f64>,
    /// Minor true strain at each position (fraction).
    pub minor: Vec<f64>,
    /// Positions of the points without strains (where the crack opened), increasing.
    pub gaps: Vec<f64>,
    /// The file line of the section's first row.
    pub line: u64,
}

/// Which side of the crack.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Flank {
    /// Smaller positions.
    Left,
    /// Larger positions.
    Right,
}

impl Flank {
    fn words(self) -> &'static str {
        match self {
            Flank::Left => "left (smaller positions)",
            Flank::Right => "right (larger positions)",
        }
    }
}

/// A validity check that a section failed; the section is left out of the curve.
#[derive(Debug, Clone, PartialEq)]
pub enum Problem {
    /// Fewer than [`MIN_SECTION_POINTS`] measured points.
    FewPoints {
        /// Measured points.
        found: usize,
    },
    /// The crack is at or near an end of the section: no window fits on one side.
    CrackOffSection {
        /// The side.
        flank: Flank,
        /// Why.
        why: NoWindow,
        /// The crack position, mm.
        crack: f64,
    },
    /// A window holds fewer than [`MIN_WINDOW_POINTS`] points.
    TooFewPoints {
        /// The side.
        flank: Flank,
        /// Points found.
        found: usize,
    },
    /// A fit's residual is larger than [`MAX_RMS`].
    Residual {
        /// `major` or `minor`.
        strain: &'static str,
        /// Root-mean-square residual, true strain.
        rms: f64,
    },
    /// The fitted major-strain profile is not a bell: no inverse parabola fits, it has no
    /// maximum, a pole within the windows, or it rises above every measured strain.
    Curvature {
        /// What is wrong, in words.
        what: String,
    },
    /// The fitted profile's apex lies more than half a window from the crack.
    Asymmetric {
        /// Apex position relative to the crack, mm.
        apex: f64,
        /// The window width, mm.
        width: f64,
    },
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Problem::FewPoints { found } => write!(
                f,
                "too few points: the section has {found} measured points, at least \
                 {MIN_SECTION_POINTS} are needed"
            ),
            Problem::CrackOffSection { flank, why, crack } => match why {
                NoWindow::TooShort => write!(
                    f,
                    "crack off the section: the crack at {crack:.2} mm leaves too few points on \
                     the {} side for a fit window",
                    flank.words()
                ),
                NoWindow::PastTheEnd { to, last } => write!(
                    f,
                    "crack off the section: on the {} side the fit window would reach {to:.2} mm \
                     from the crack at {crack:.2} mm, but the section ends {last:.2} mm from it",
                    flank.words()
                ),
            },
            Problem::TooFewPoints { flank, found } => write!(
                f,
                "too few points in a window: the {} window holds {found} points, at least \
                 {MIN_WINDOW_POINTS} are needed",
                flank.words()
            ),
            Problem::Residual { strain, rms } => write!(
                f,
                "implausible fit: the {strain} strain's residual is {:.2} pp true strain (root \
                 mean square), more than {:.1} pp",
                100.0 * rms,
                100.0 * MAX_RMS
            ),
            Problem::Curvature { what } => write!(f, "implausible fit: {what}"),
            Problem::Asymmetric { apex, width } => write!(
                f,
                "asymmetric profile: the fitted profile peaks {apex:+.2} mm from the crack, more \
                 than half the window width ({:.2} mm)",
                width / 2.0
            ),
        }
    }
}

/// How the minor strain was fitted.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum MinorFit {
    /// The inverse parabola, as the major strain.
    Inverse(InverseParabola),
    /// An ordinary parabola `[a, b, c]` (a minor strain near zero or changing sign; ours).
    Parabola([f64; 3]),
}

impl MinorFit {
    /// The fitted minor strain at `u` mm from the crack.
    pub fn at(&self, u: f64) -> Option<f64> {
        match self {
            MinorFit::Inverse(p) => p.at(u),
            MinorFit::Parabola([a, b, c]) => Some(a * u * u + b * u + c),
        }
    }
}

/// What the evaluation of one section found, as far as it got.
#[derive(Debug, Clone, PartialEq)]
pub struct SectionFit {
    /// Crack position, mm.
    pub crack: f64,
    /// How the crack was found.
    pub crack_by: CrackBy,
    /// Strain ratio ε2/ε1 near the crack.
    pub ratio: f64,
    /// Window width, mm.
    pub width: f64,
    /// The windows, left and right (distances from the crack).
    pub windows: [Option<Window>; 2],
    /// The major-strain fit (position relative to the crack).
    pub major: Option<InverseParabola>,
    /// The minor-strain fit.
    pub minor: Option<MinorFit>,
    /// Root-mean-square residuals of the fits, `[minor, major]`, true strain.
    pub rms: [f64; 2],
    /// The limit pair at the crack, `[minor, major]` true strain, when both fits exist.
    pub limit: Option<[f64; 2]>,
}

/// One section evaluated: its profile, what was found and the checks it failed.
#[derive(Debug, Clone, PartialEq)]
pub struct SectionResult {
    /// The profile.
    pub profile: SectionProfile,
    /// The evaluation (`None` when the section has too few points to find a crack).
    pub fit: Option<SectionFit>,
    /// The failed checks; empty = valid.
    pub problems: Vec<Problem>,
}

impl SectionResult {
    /// The limit pair `[minor, major]` (true strain) of a valid section.
    pub fn limit(&self) -> Option<[f64; 2]> {
        if self.problems.is_empty() {
            self.fit.as_ref()?.limit
        } else {
            None
        }
    }
}

/// The points of one side of the crack, outwards, with their signed positions relative to it.
fn side(p: &SectionProfile, crack: f64, flank: Flank) -> (Side, Vec<(f64, f64)>) {
    let mut idx: Vec<usize> = (0..p.x.len())
        .filter(|&i| match flank {
            Flank::Left => p.x[i] < crack,
            Flank::Right => p.x[i] > crack,
        })
        .collect();
    if flank == Flank::Left {
        idx.reverse();
    }
    let s = Side {
        d: idx.iter().map(|&i| (p.x[i] - crack).abs()).collect(),
        major: idx.iter().map(|&i| p.major[i]).collect(),
    };
    let uv = idx.iter().map(|&i| (p.x[i] - crack, p.minor[i])).collect();
    (s, uv)
}

/// Evaluate one section by the position-dependent method (see the module documentation).
pub fn evaluate(profile: SectionProfile) -> SectionResult {
    let n = profile.x.len();
    if n < MIN_SECTION_POINTS {
        return SectionResult {
            profile,
            fit: None,
            problems: vec![Problem::FewPoints { found: n }],
        };
    }
    let pts: Vec<(f64, f64)> = profile
        .x
        .iter()
        .copied()
        .zip(profile.major.clone())
        .collect();
    let Some((crack, crack_by)) = profile::crack_position(&pts, &profile.gaps) else {
        return SectionResult {
            profile,
            fit: None,
            problems: vec![Problem::FewPoints { found: n }],
        };
    };
    let triples: Vec<(f64, f64, f64)> = (0..n)
        .map(|i| (profile.x[i], profile.major[i], profile.minor[i]))
        .collect();
    let ratio = profile::crack_ratio(&triples, crack);
    let width = profile::window_width(ratio);
    let mut problems = Vec::new();
    let mut windows = [None, None];
    let mut chosen: Vec<(f64, f64, f64)> = Vec::new(); // (u, major, minor)
    for (k, flank) in [Flank::Left, Flank::Right].into_iter().enumerate() {
        let (s, uv) = side(&profile, crack, flank);
        match profile::window(&s, width) {
            Err(why) => problems.push(Problem::CrackOffSection { flank, why, crack }),
            Ok(w) => {
                if w.points < MIN_WINDOW_POINTS {
                    problems.push(Problem::TooFewPoints {
                        flank,
                        found: w.points,
                    });
                }
                for ((d, e1), (u, e2)) in s.d.iter().zip(&s.major).zip(&uv) {
                    if *d >= w.from - 1e-9 && *d <= w.to + 1e-9 {
                        chosen.push((*u, *e1, *e2));
                    }
                }
                windows[k] = Some(w);
            }
        }
    }
    let mut fit = SectionFit {
        crack,
        crack_by,
        ratio,
        width,
        windows,
        major: None,
        minor: None,
        rms: [0.0, 0.0],
        limit: None,
    };
    if windows.iter().any(Option::is_none) {
        return SectionResult {
            profile,
            fit: Some(fit),
            problems,
        };
    }
    let u: Vec<f64> = chosen.iter().map(|c| c.0).collect();
    let major: Vec<f64> = chosen.iter().map(|c| c.1).collect();
    let minor: Vec<f64> = chosen.iter().map(|c| c.2).collect();
    fit.major = profile::fit_inverse_parabola(&u, &major);
    fit.minor = fit_minor(&u, &minor);
    let Some(m) = fit.major else {
        problems.push(Problem::Curvature {
            what: "no inverse parabola fits the major strain in the windows".into(),
        });
        return SectionResult {
            profile,
            fit: Some(fit),
            problems,
        };
    };
    fit.rms[1] = profile::rms(
        u.iter()
            .zip(&major)
            .map(|(&u, &y)| m.at(u).unwrap_or(0.0) - y),
    );
    if let Some(mf) = fit.minor {
        fit.rms[0] = profile::rms(
            u.iter()
                .zip(&minor)
                .map(|(&u, &y)| mf.at(u).unwrap_or(0.0) - y),
        );
    }
    let reach = [
        -windows[0].map_or(0.0, |w| w.to),
        windows[1].map_or(0.0, |w| w.to),
    ];
    problems.extend(check_major(&m, reach, &profile.major, width));
    for (strain, r) in [("major", fit.rms[1]), ("minor", fit.rms[0])] {
        if r > MAX_RMS {
            problems.push(Problem::Residual { strain, rms: r });
        }
    }
    fit.limit = match (fit.minor.and_then(|f| f.at(0.0)), m.at(0.0)) {
        (Some(e2), Some(e1)) => Some([e2, e1]),
        _ => None,
    };
    SectionResult {
        profile,
        fit: Some(fit),
        problems,
    }
}

/// The minor-strain fit: the inverse parabola when every point has one sign and at least
/// [`MINOR_INVERSE_MIN`] in magnitude, else an ordinary parabola (ours).
fn fit_minor(u: &[f64], minor: &[f64]) -> Option<MinorFit> {
    let one_sign = minor.iter().all(|&v| v >= MINOR_INVERSE_MIN)
        || minor.iter().all(|&v| v <= -MINOR_INVERSE_MIN);
    if one_sign {
        if let Some(p) = profile::fit_inverse_parabola(u, minor) {
            return Some(MinorFit::Inverse(p));
        }
    }
    profile::fit_parabola(u, minor).map(MinorFit::Parabola)
}

/// The checks of the major-strain fit: a bell (a maximum, no pole between the windows' outer
/// ends `reach`, not above every measured strain) whose apex lies within half a window of the
/// crack (ours: the standard asks for a plausible, symmetric profile; these limits are ours).
pub fn check_major(
    m: &InverseParabola,
    reach: [f64; 2],
    measured: &[f64],
    width: f64,
) -> Vec<Problem> {
    let mut v = Vec::new();
    let pole = (0..=100).any(|k| {
        let u = reach[0] + (reach[1] - reach[0]) * k as f64 / 100.0;
        m.a * u * u + m.b * u + m.c <= 0.0
    });
    if m.a <= 0.0 {
        v.push(Problem::Curvature {
            what: "the fitted major strain has no maximum: it does not fall away from the crack"
                .into(),
        });
    } else if pole {
        v.push(Problem::Curvature {
            what: "the fitted major strain has a pole between the windows".into(),
        });
    } else {
        let top = measured.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        if let Some(limit) = m.at(0.0) {
            if limit > top {
                v.push(Problem::Curvature {
                    what: format!(
                        "the fitted limit ε1 = {:.2} % lies above every measured major strain \
                         (highest {:.2} %)",
                        100.0 * limit,
                        100.0 * top
                    ),
                });
            }
        }
        if let Some(apex) = m.apex() {
            if apex.abs() > width / 2.0 {
                v.push(Problem::Asymmetric { apex, width });
            }
        }
    }
    v
}

/// The limit pairs of one geometry over its sections and specimens.
#[derive(Debug, Clone, PartialEq)]
pub struct GeometryStats {
    /// The geometry's label.
    pub geometry: String,
    /// Sections read.
    pub sections: usize,
    /// Specimens read.
    pub specimens: usize,
    /// Sections that passed every check.
    pub valid: usize,
    /// Valid sections used for the mean (outliers left out).
    pub used: usize,
    /// Mean limit pair `[minor, major]`, true strain.
    pub mean: [f64; 2],
    /// Sample standard deviation `[minor, major]`, true strain (0 for one section).
    pub sd: [f64; 2],
    /// Valid sections left out as outliers, with their limit pairs.
    pub outliers: Vec<(SectionKey, [f64; 2])>,
    /// Specimens with fewer than three valid sections.
    pub thin_specimens: Vec<String>,
}

/// An outlier lies more than this many robust standard deviations (1.4826 × the median absolute
/// deviation; the factor makes it consistent for a normal distribution, e.g. Rousseeuw & Croux
/// 1993) from the geometry's median major strain (ours)...
pub const OUTLIER_MADS: f64 = 3.5;
/// ... and more than this far, true strain (ours: 1 pp, within which the sections agree as well
/// as the measurement allows).
pub const OUTLIER_MIN: f64 = 0.01;

/// The valid sections left out as outliers: `values` major strains; returns their indices.
/// Needs four values or more (ours).
pub fn outliers(values: &[f64]) -> Vec<usize> {
    if values.len() < 4 {
        return Vec::new();
    }
    let median = |v: &mut Vec<f64>| {
        v.sort_by(f64::total_cmp);
        let n = v.len();
        if n % 2 == 1 {
            v[n / 2]
        } else {
            0.5 * (v[n / 2 - 1] + v[n / 2])
        }
    };
    let med = median(&mut values.to_vec());
    let mad = median(&mut values.iter().map(|v| (v - med).abs()).collect());
    let s = 1.4826 * mad;
    (0..values.len())
        .filter(|&i| {
            let d = (values[i] - med).abs();
            d > OUTLIER_MIN && d > OUTLIER_MADS * s
        })
        .collect()
}

/// Mean and sample standard deviation (`n − 1`; 0 for one value).
pub fn mean_sd(v: &[f64]) -> (f64, f64) {
    let n = v.len() as f64;
    let mean = v.iter().sum::<f64>() / n;
    if v.len() < 2 {
        return (mean, 0.0);
    }
    let var = v.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0);
    (mean, var.sqrt())
}

/// Per geometry, in the order first met: counts, mean and scatter of the valid sections'
/// limit pairs, outliers named and left out. Geometries without a valid section are kept
/// (counts only, `used = 0`).
pub fn geometry_stats(results: &[SectionResult]) -> Vec<GeometryStats> {
    let mut order: Vec<String> = Vec::new();
    for r in results {
        if !order.contains(&r.profile.key.geometry) {
            order.push(r.profile.key.geometry.clone());
        }
    }
    order
        .into_iter()
        .map(|g| {
            let mine: Vec<&SectionResult> = results
                .iter()
                .filter(|r| r.profile.key.geometry == g)
                .collect();
            let mut specimens: Vec<&str> = Vec::new();
            for r in &mine {
                if !specimens.contains(&r.profile.key.specimen.as_str()) {
                    specimens.push(&r.profile.key.specimen);
                }
            }
            let valid: Vec<(&SectionKey, [f64; 2])> = mine
                .iter()
                .filter_map(|r| r.limit().map(|l| (&r.profile.key, l)))
                .collect();
            let out = outliers(&valid.iter().map(|v| v.1[1]).collect::<Vec<_>>());
            let kept: Vec<[f64; 2]> = (0..valid.len())
                .filter(|i| !out.contains(i))
                .map(|i| valid[i].1)
                .collect();
            let (mut mean, mut sd) = ([f64::NAN; 2], [f64::NAN; 2]);
            if !kept.is_empty() {
                for k in 0..2 {
                    let (m, s) = mean_sd(&kept.iter().map(|p| p[k]).collect::<Vec<_>>());
                    mean[k] = m;
                    sd[k] = s;
                }
            }
            let thin_specimens = specimens
                .iter()
                .filter(|s| valid.iter().filter(|v| v.0.specimen == **s).count() < 3)
                .map(|s| s.to_string())
                .collect();
            GeometryStats {
                sections: mine.len(),
                specimens: specimens.len(),
                valid: valid.len(),
                used: kept.len(),
                mean,
                sd,
                outliers: out
                    .iter()
                    .map(|&i| (valid[i].0.clone(), valid[i].1))
                    .collect(),
                thin_specimens,
                geometry: g,
            }
        })
        .collect()
}

/// A geometry is near plane strain when its mean strain ratio ε2/ε1 lies within ±0.1 (ours).
pub const PLANE_STRAIN_RATIO: f64 = 0.1;

/// Warnings about the series as evidence for a curve: fewer than five geometries with a valid
/// section, no geometry near plane strain (the curve's lowest point, FLC0, then rests on
/// neighbours), and geometries with fewer than three specimens or specimens with fewer than
/// three valid sections (three sections on each of at least three specimens is the usual
/// evidence, common practice).
pub fn series_warnings(stats: &[GeometryStats]) -> Vec<String> {
    let mut w = Vec::new();
    let used: Vec<&GeometryStats> = stats.iter().filter(|g| g.used > 0).collect();
    if used.len() < 5 {
        w.push(format!(
            "only {} geometr{} with a valid section: a curve needs at least five, from uniaxial \
             to equibiaxial (common practice)",
            used.len(),
            if used.len() == 1 { "y" } else { "ies" }
        ));
    }
    if !used
        .iter()
        .any(|g| (g.mean[0] / g.mean[1]).abs() <= PLANE_STRAIN_RATIO)
    {
        w.push(format!(
            "no geometry near plane strain (|ε2/ε1| ≤ {PLANE_STRAIN_RATIO}): the curve's \
             lowest point (FLC0) is not measured"
        ));
    }
    for g in stats {
        if g.used == 0 {
            w.push(format!(
                "geometry {}: no valid section, left out of the curve",
                g.geometry
            ));
            continue;
        }
        if g.specimens < 3 {
            w.push(format!(
                "geometry {}: {} specimen{}, fewer than the usual three (common practice)",
                g.geometry,
                g.specimens,
                if g.specimens == 1 { "" } else { "s" }
            ));
        }
        if !g.thin_specimens.is_empty() {
            w.push(format!(
                "geometry {}: fewer than three valid sections on specimen{} {}",
                g.geometry,
                if g.thin_specimens.len() == 1 { "" } else { "s" },
                g.thin_specimens.join(", ")
            ));
        }
        for (k, l) in &g.outliers {
            w.push(format!(
                "geometry {}: specimen {}, section {} is an outlier (ε1 = {:.2} %, ε2 = {:.2} \
                 %), left out of the mean",
                g.geometry,
                k.specimen,
                k.section,
                100.0 * l[1],
                100.0 * l[0]
            ));
        }
    }
    w
}

/// A curve's points and their scatter, percent: `(points, scatter)`.
pub type CurvePoints = (Vec<[f64; 2]>, Vec<[f64; 2]>);

/// The curve's points `[minor, major]` and their scatter `[sd minor, sd major]`, percent true
/// strain, sorted by minor strain, from the geometries with a valid section. Two geometries
/// whose mean minor strains are within 0.001 % are refused (a curve's minor strain must
/// increase).
pub fn curve_points(stats: &[GeometryStats]) -> Result<CurvePoints, String> {
    let mut v: Vec<&GeometryStats> = stats.iter().filter(|g| g.used > 0).collect();
    if v.len() < 2 {
        return Err(format!(
            "{} geometr{} with a valid section: a curve needs at least two",
            v.len(),
            if v.len() == 1 { "y" } else { "ies" }
        ));
    }
    v.sort_by(|a, b| a.mean[0].total_cmp(&b.mean[0]));
    for w in v.windows(2) {
        if (w[1].mean[0] - w[0].mean[0]).abs() < 1e-5 {
            return Err(format!(
                "geometries {} and {} have the same mean minor strain ({:.3} %): a curve's minor \
                 strain must increase",
                w[0].geometry,
                w[1].geometry,
                100.0 * w[0].mean[0]
            ));
        }
    }
    let pts = v
        .iter()
        .map(|g| [100.0 * g.mean[0], 100.0 * g.mean[1]])
        .collect();
    let sd = v
        .iter()
        .map(|g| [100.0 * g.sd[0], 100.0 * g.sd[1]])
        .collect();
    Ok((pts, sd))
}

/// The words every laboratory curve from sections carries in its `source`.
pub const LAB_CURVE_WORDS: &str = "laboratory curve from test-section strain profiles, \
position-dependent method after ISO 12004-2 as neckline implements it (crack from the gap or \
the maximum; inner window limits from the filtered second derivative of the major strain; \
window width 10 mm (1 + e2/e1); inverse parabola fitted by least squares in both windows, \
valued at the crack)";

/// The first comment lines of a laboratory curve from sections.
pub const LAB_HEADER: &str =
    "A laboratory curve from test-section strain profiles (position-dependent method after\n\
# ISO 12004-2, as neckline implements it): mean limit strains per specimen geometry.";

/// What the curve's `source` records besides the method.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct LabWords {
    /// The sections file's name.
    pub file: String,
    /// Its SHA-256, lower-case hex.
    pub sha256: String,
    /// The laboratory (`--lab`).
    pub lab: Option<String>,
    /// The material (`--material`).
    pub material: Option<String>,
    /// The lot (`--lot`).
    pub lot: Option<String>,
}

/// The curve file of a series: the mean limit pairs in true strain, the scatter per point, and a
/// `source` naming the method, the file and its SHA-256, the geometries and counts and the lab
/// words.
pub fn lab_curve(
    name: &str,
    stats: &[GeometryStats],
    words: &LabWords,
) -> Result<crate::limit::writer::GeneratedCurve, String> {
    let (points_pct, scatter) = curve_points(stats)?;
    let per: Vec<String> = stats
        .iter()
        .map(|g| {
            format!(
                "{} ({} specimens, {} of {} sections valid, {} used)",
                g.geometry, g.specimens, g.valid, g.sections, g.used
            )
        })
        .collect();
    let mut source = format!(
        "{LAB_CURVE_WORDS}. Data: {} (SHA-256 {}); geometries: {}. Points: the mean limit pair \
         of each geometry's valid sections (outliers left out); scatter: one sample standard \
         deviation",
        words.file,
        words.sha256,
        per.join("; ")
    );
    for (what, v) in [
        ("lab", &words.lab),
        ("material", &words.material),
        ("lot", &words.lot),
    ] {
        if let Some(v) = v {
            source.push_str(&format!("; {what}: {v}"));
        }
    }
    source.push_str(&format!(
        "; true strain; generated by neckline {}",
        crate::limit::writer::TOOL_VERSION
    ));
    let mut extra = vec!["scatter = [".to_string()];
    for s in &scatter {
        extra.push(format!("  [{:.4}, {:.4}],", s[0], s[1]));
    }
    extra.push("]".into());
    let mut notes = vec![
        "Per geometry (true strain, %): mean and sample standard deviation of the valid sections."
            .to_string(),
        format!(
            "{:>12} {:>9} {:>9} {:>9} {:>9} {:>6} {:>6}",
            "geometry", "minor", "sd", "major", "sd", "valid", "used"
        ),
    ];
    let mut sorted: Vec<&GeometryStats> = stats.iter().filter(|g| g.used > 0).collect();
    sorted.sort_by(|a, b| a.mean[0].total_cmp(&b.mean[0]));
    for g in sorted {
        notes.push(format!(
            "{:>12} {:>9.2} {:>9.2} {:>9.2} {:>9.2} {:>6} {:>6}",
            g.geometry,
            100.0 * g.mean[0],
            100.0 * g.sd[0],
            100.0 * g.mean[1],
            100.0 * g.sd[1],
            g.valid,
            g.used
        ));
    }
    let material = match (&words.material, &words.lot) {
        (Some(m), Some(l)) => Some(format!("{m}, {l}")),
        (m, l) => m.clone().or_else(|| l.clone()),
    };
    Ok(crate::limit::writer::GeneratedCurve {
        name: name.to_string(),
        source,
        material,
        thickness_mm: None,
        measure: crate::strain::StrainMeasure::True,
        points_pct,
        notes,
        extra,
    })
}
