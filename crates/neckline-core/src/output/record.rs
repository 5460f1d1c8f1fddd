//! What makes an output a record a reviewer can sign: when it was generated (UTC and the local
//! offset), input paths as a reader finds them, what kind of limit curve judged the part, and
//! every reason that puts a location in its zone as a short code with a legend.

use crate::assess::{thickening_pct, Reason, Settings, Zone, ROUND_OFF_PP};
use crate::limit::LimitCurve;
use crate::point::PointResult;
use std::path::{Component, Path, PathBuf};

/// The instant an output was generated: seconds since 1970-01-01T00:00:00Z and the offset of
/// the machine's local time from UTC at that instant, when known.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct RunTime {
    /// Seconds since the Unix epoch, UTC.
    pub utc_secs: u64,
    /// Local time minus UTC, seconds (`None` when the local zone could not be read).
    pub offset_secs: Option<i32>,
}

impl RunTime {
    /// Now, with the local offset read from the time-zone database.
    pub fn now() -> Self {
        let utc_secs = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.as_secs());
        RunTime {
            utc_secs,
            offset_secs: local_offset(utc_secs),
        }
    }

    /// UTC as ISO 8601: `2026-11-30T14:05:09Z`.
    pub fn utc(&self) -> String {
        super::summary_json::iso8601(self.utc_secs)
    }

    /// Local time as ISO 8601 with its offset (`2026-11-30T15:05:09+01:00`), when known.
    pub fn local(&self) -> Option<String> {
        let off = self.offset_secs?;
        let local = self.utc_secs.checked_add_signed(i64::from(off))?;
        let iso = super::summary_json::iso8601(local);
        Some(format!("{}{}", &iso[..iso.len() - 1], offset_text(off)))
    }

    /// "2026-11-30T14:05:09Z, local UTC+01:00", or ", local offset not known".
    pub fn text(&self) -> String {
        match self.offset_secs {
            Some(off) => format!("{}, local UTC{}", self.utc(), offset_text(off)),
            None => format!("{}, local offset not known", self.utc()),
        }
    }
}

/// An offset from UTC as `+hh:mm` / `-hh:mm` (ISO 8601).
pub fn offset_text(secs: i32) -> String {
    let sign = if secs < 0 { '-' } else { '+' };
    let m = secs.unsigned_abs() / 60;
    format!("{sign}{:02}:{:02}", m / 60, m % 60)
}

/// The local offset at `utc_secs` from the zone named by `TZ` (a zone name or a path, as the
/// C library reads it) or else `/etc/localtime`; `None` when neither can be read.
fn local_offset(utc_secs: u64) -> Option<i32> {
    let path = match std::env::var("TZ") {
        Ok(tz) if tz.is_empty() || tz == "UTC" || tz == "UTC0" || tz == "GMT" => return Some(0),
        Ok(tz) => {
            let name = tz.trim_start_matches(':');
            if name.starts_with('/') {
                PathBuf::from(name)
            } else {
                Path::new("/usr/share/zoneinfo").join(name)
            }
        }
        Err(_) => PathBuf::from("/etc/localtime"),
    };
    let bytes = std::fs::read(path).ok()?;
    tzif_offset(&bytes, i64::try_from(utc_secs).ok()?)
}

/// The UTC offset in force at `at` (seconds since the epoch) in a TZif file (RFC 8536: the
/// "TZif" header with six counts, then transition times, their type indices and the local
/// time types of six bytes each: offset i32, is-DST, name index). Version 2 and later files
/// carry a second block with 64-bit times, which is read when present. The last transition at
/// or before `at` decides; before the first, or with none, the first type does. The footer's
/// rule for times after the last transition is not read: its last type is taken.
pub fn tzif_offset(b: &[u8], at: i64) -> Option<i32> {
    let counts = |h: &[u8]| -> Option<[usize; 6]> {
        if h.get(..4)? != b"TZif" {
            return None;
        }
        let mut c = [0usize; 6];
        for (k, v) in c.iter_mut().enumerate() {
            let s = 20 + 4 * k;
            *v = u32::from_be_bytes(h.get(s..s + 4)?.try_into().ok()?) as usize;
        }
        Some(c)
    };
    let block_len = |c: [usize; 6], t: usize| {
        let [isut, isstd, leap, time, typ, chr] = c;
        time * t + time + typ * 6 + chr + leap * (t + 4) + isstd + isut
    };
    let c1 = counts(b)?;
    let version = *b.get(4)?;
    let (data, c, t) = if version >= b'2' {
        let second = 44 + block_len(c1, 4);
        let h2 = b.get(second..)?;
        (h2.get(44..)?, counts(h2)?, 8)
    } else {
        (b.get(44..)?, c1, 4)
    };
    let [_, _, _, time, typ, _] = c;
    if typ == 0 {
        return None;
    }
    let when = |k: usize| -> Option<i64> {
        let s = data.get(k * t..(k + 1) * t)?;
        Some(if t == 8 {
            i64::from_be_bytes(s.try_into().ok()?)
        } else {
            i64::from(i32::from_be_bytes(s.try_into().ok()?))
        })
    };
    let mut idx = 0usize;
    for k in 0..time {
        if when(k)? <= at {
            idx = usize::from(*data.get(time * t + k)?);
        } else {
            break;
        }
    }
    let s = time * t + time + idx * 6;
    Some(i32::from_be_bytes(data.get(s..s + 4)?.try_into().ok()?))
}

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

    // RFC 8536 §3: a version 1 TZif file: magic "TZif", version 0, 15 unused bytes, then
    // isutcnt, isstdcnt, leapcnt, timecnt, typecnt, charcnt (big-endian u32); transition times
    // (i32), their type indices (u8), the types (i32 offset, u8 isdst, u8 name index), names.
    fn tzif_v1(times: &[i32], idx: &[u8], types: &[i32]) -> Vec<u8> {
        let mut b = b"TZif".to_vec();
        b.push(0);
        b.extend([0u8; 15]);
        for n in [0, 0, 0, times.len(), types.len(), 4] {
            b.extend((n as u32).to_be_bytes());
        }
        for t in times {
            b.extend(t.to_be_bytes());
        }
        b.extend(idx);
        for o in types {
            b.extend(o.to_be_bytes());
            b.extend([0u8, 0u8]);
        }
        b.extend(b"XYZ\0");
        b
    }

    #[test]
    fn tzif_offsets_follow_transitions() {
        // A zone at UTC+1 that moves to UTC+2 at t = 1000 s and back at t = 2000 s.
        let b = tzif_v1(&[1000, 2000], &[1, 0], &[3600, 7200]);
        assert_eq!(tzif_offset(&b, 10), Some(3600));
        assert_eq!(tzif_offset(&b, 1500), Some(7200));
        assert_eq!(tzif_offset(&b, 5000), Some(3600));
        assert_eq!(tzif_offset(b"not a zone file", 0), None);
        // UTC as the C library's zone database writes it: no transitions, one type of 0.
        assert_eq!(tzif_offset(&tzif_v1(&[], &[], &[0]), 0), Some(0));
    }

    // ISO 8601 writes offsets as ±hh:mm; India is UTC+05:30, Newfoundland UTC−03:30 (from
    // memory).
    #[test]
    fn offsets_and_local_times_read_as_iso_8601() {
        assert_eq!(offset_text(19_800), "+05:30");
        assert_eq!(offset_text(-12_600), "-03:30");
        let t = RunTime {
            utc_secs: 951_782_400,
            offset_secs: Some(3600),
        };
        assert_eq!(t.utc(), "2000-02-29T00:00:00Z");
        assert_eq!(t.local().unwrap(), "2000-02-29T01:00:00+01:00");
        assert_eq!(t.text(), "2000-02-29T00:00:00Z, local UTC+01:00");
        let unknown = RunTime {
            offset_secs: None,
            ..t
        };
        assert!(unknown.text().ends_with("local offset not known"));
    }

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
