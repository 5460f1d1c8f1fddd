//! What makes an output a record a reviewer can sign: when it was generated (UTC and the local
//! offset), input paths as a reader finds them, what kind of limit curve judged the part, and
//! every reason that puts a location in its zone as a short code with a legend.

use crate::assess::{thickening_pct, Reason, Settings, Zone, ROUND_OFF_PP};
use crate::limit::LimitCurve;
use crate::point::PointResult;
use std::path::{Component, Path, PathBuf};

pub use crate::run_time::{offset_text, tzif_offset, RunTime};

/// `path` with `.` dropped and each `name/..` removed, without touching the file system:
/// `rear-floor-pan/../../limits/c.toml` reads `../limits/c.toml`. A leading `..` stays.
pub fn normalise(path: &Path) -> PathBuf {
    let mut out: Vec<Component> = Vec::new();
    for c in path.components() {
        match c {
            Component::CurDir => {}
            Component::ParentDir => match out.last() {
                Some(Component::Normal(_)) => {
                    out.pop();
                }
                Some(Component::RootDir | Component::Prefix(_)) => {}
                _ => out.push(c),
            },
            c => out.push(c),
        }
    }
    if out.is_empty() {
        return PathBuf::from(".");
    }
    out.iter().collect()
}

/// What kind of evidence a limit curve is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CurveKind {
    /// Predicted from material data (Keeler-Brazier, analytic necking, Marciniak-Kuczynski):
    /// the weakest evidence.
    Estimate,
    /// Fitted to circles read on necked or split production parts.
    Shop,
    /// A tabulated curve as given (a laboratory or supplier curve, by its source).
    Tabulated,
}

impl CurveKind {
    /// The kind of `curve`, from its source words: the models neckline writes and the
    /// Keeler-Brazier formula are estimates; a press-shop curve says so; anything else is a
    /// tabulated curve whose source is the user's.
    pub fn of(curve: &LimitCurve) -> Self {
        let s = curve.source.to_lowercase();
        if s.contains(&crate::limit::writer::SHOP_CURVE_WORDS.to_lowercase())
            || s.contains("press-shop curve")
        {
            CurveKind::Shop
        } else if [
            "keeler",
            "marciniak",
            "hill 1952",
            "storen-rice",
            "swift",
            "necking limits",
        ]
        .iter()
        .any(|w| s.contains(w))
        {
            CurveKind::Estimate
        } else {
            CurveKind::Tabulated
        }
    }

    /// The kind in words.
    pub fn words(self) -> &'static str {
        match self {
            CurveKind::Estimate => "an estimate from material data",
            CurveKind::Shop => "a press-shop curve from parts",
            CurveKind::Tabulated => {
                "a tabulated curve (laboratory or supplier, as its source states)"
            }
        }
    }

    /// The warning an estimated curve carries where the verdict is.
    pub fn warning(self) -> Option<&'static str> {
        (self == CurveKind::Estimate).then_some(
            "an estimated curve is the weakest evidence: the verdict holds only as far as the \
             estimate does; judge again against the material's tested curve",
        )
    }
}

/// Every reason that applies to a location, in the order of the rules (not only the one that
/// decided its zone): over the curve, thinned past the maximum, crossed, off the curve, inside
/// the band, at risk along its path, thickening, low stretch. `[None]` when none applies.
pub fn reasons(p: &PointResult, st: &Settings) -> Vec<Reason> {
    let j = &p.judgement;
    let mut v = Vec::new();
    if j.margin_pct.is_some_and(|m| m <= ROUND_OFF_PP) {
        v.push(Reason::Curve);
    }
    if st
        .max_thinning_pct
        .is_some_and(|m| p.strain.thinning * 100.0 >= m - ROUND_OFF_PP)
    {
        v.push(Reason::Thinning);
    }
    if matches!(j.reason, Reason::Crossed | Reason::NoCurve) {
        v.push(j.reason);
    }
    if j.margin_pct
        .is_some_and(|m| m > ROUND_OFF_PP && m < st.margin_pct - ROUND_OFF_PP)
    {
        v.push(Reason::Band);
    }
    if p.path
        .as_ref()
        .is_some_and(|pj| pj.judges() && matches!(pj.zone, Zone::Failed | Zone::Marginal))
    {
        v.push(Reason::Path);
    }
    let thicker = thickening_pct(&p.strain);
    if thicker >= st.thickening_pct.max(0.0) - ROUND_OFF_PP && thicker > ROUND_OFF_PP {
        v.push(Reason::Thickening);
    }
    if p.strain.eng.major.percent() < st.low_stretch_pct - ROUND_OFF_PP {
        v.push(Reason::LowStretch);
    }
    if v.is_empty() {
        v.push(Reason::None);
    }
    v
}

/// A reason's short code in tables.
pub fn code(r: Reason) -> &'static str {
    match r {
        Reason::Curve => "C",
        Reason::Thinning => "T",
        Reason::Crossed => "X",
        Reason::NoCurve => "O",
        Reason::Band => "B",
        Reason::Path => "P",
        Reason::Thickening => "K",
        Reason::LowStretch => "L",
        Reason::None => "–",
    }
}

/// The codes of every reason that applies, joined: `C T` for a location over the curve and
/// thinned past the maximum.
pub fn codes(p: &PointResult, st: &Settings) -> String {
    reasons(p, st)
        .into_iter()
        .map(code)
        .collect::<Vec<_>>()
        .join(" ")
}

/// The legend of the codes, with the settings' numbers.
pub fn legend(st: &Settings) -> Vec<(&'static str, String)> {
    let set = super::fmt_setting;
    Reason::ALL
        .iter()
        .filter(|r| **r != Reason::Thinning || st.max_thinning_pct.is_some())
        .map(|r| {
            let words = match r {
                Reason::Curve => "on or above the limit curve (margin ≤ 0)".to_string(),
                Reason::Thinning => format!(
                    "thinned to the maximum or more ({} %)",
                    set(st.max_thinning_pct.unwrap_or(0.0))
                ),
                Reason::Crossed => {
                    "off the curve's range, past 100 % of the limit along its straight path"
                        .to_string()
                }
                Reason::NoCurve => "minor strain off the curve's range: not judged".to_string(),
                Reason::Band => format!("inside the {} pp safety band", set(st.margin_pct)),
                Reason::Path => "failed or marginal along its multi-stage path".to_string(),
                Reason::Thickening => {
                    format!("thicker than t0 by {} % or more", set(st.thickening_pct))
                }
                Reason::LowStretch => {
                    format!("major strain below {} %", set(st.low_stretch_pct))
                }
                Reason::None => "no rule applies".to_string(),
            };
            (code(*r), words)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    // POSIX path resolution (IEEE Std 1003.1, 4.13): `a/..` names the folder that holds `a`.
    // The lexical form is what a reader sees; symbolic links are not followed.
    #[test]
    fn paths_lose_dot_and_dot_dot() {
        let n = |s: &str| normalise(Path::new(s)).display().to_string();
        assert_eq!(
            n("demo-parts/rear-floor-pan/../../limits/c.toml"),
            "limits/c.toml"
        );
        assert_eq!(n("rear-floor-pan/../../limits/c.toml"), "../limits/c.toml");
        assert_eq!(n("./a/./b"), "a/b");
        assert_eq!(n("/x/../../y"), "/y");
        assert_eq!(n("a/.."), ".");
    }

    // The fixture's zone rules (common practice): M3 is thinned to 31.6 % past the 25 % maximum
    // and 6 pp under the curve, inside the 10 pp band: both apply, thinning decided the zone.
    #[test]
    fn every_reason_that_applies_is_listed() {
        let a = crate::output::fixture::analysis(true);
        let of = |id: &str| {
            let p = a.points().iter().find(|p| p.input.id == id).unwrap();
            reasons(p, &a.settings)
        };
        assert_eq!(of("M3"), [Reason::Thinning, Reason::Band]);
        assert_eq!(of("F2"), [Reason::Curve]);
        assert_eq!(of("M1"), [Reason::Band]);
        let p = a.points().iter().find(|p| p.input.id == "M3").unwrap();
        assert_eq!(codes(p, &a.settings), "T B");
        assert!(legend(&a.settings)
            .iter()
            .any(|(c, w)| *c == "T" && w.contains("25 %")));
    }

    #[test]
    fn curve_kinds_from_their_sources() {
        let c = |source: &str| {
            LimitCurve::parse(
                &format!(
                    "name = \"c\"\nsource = \"{source}\"\nstrain = \"engineering\"\npoints = [[-20, 50], [0, 30], [20, 40]]\n"
                ),
                Path::new("c.toml"),
            )
            .unwrap()
        };
        assert_eq!(
            CurveKind::of(&c("Keeler-Brazier empirical FLC")),
            CurveKind::Estimate
        );
        assert_eq!(
            CurveKind::of(&c("Marciniak-Kuczynski, Hill 1948")),
            CurveKind::Estimate
        );
        assert_eq!(
            CurveKind::of(&c(crate::limit::writer::SHOP_CURVE_WORDS)),
            CurveKind::Shop
        );
        assert_eq!(
            CurveKind::of(&c("Lab report 17, ISO 12004-2")),
            CurveKind::Tabulated
        );
        assert!(CurveKind::Estimate.warning().is_some());
        assert!(CurveKind::Tabulated.warning().is_none());
    }
}
