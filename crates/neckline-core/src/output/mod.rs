//! Writing results: every writer takes the one [`Analysis`](crate::analysis::Analysis) and
//! writes into any `Write`; the command line stages the files and moves them in as one set, and
//! never over a file that was read as input ([`guard_inputs`]).

pub mod decimal_comma;
#[cfg(any(test, feature = "fixture"))]
pub mod fixture;
pub mod points_csv;
pub mod record;
pub mod summary_json;

use crate::error::{Error, Result};
use std::fs;
use std::path::{Path, PathBuf};

/// `n` and the noun, singular for one: "1 location", "3 locations".
pub fn count_of(n: usize, noun: &str) -> String {
    if n == 1 {
        format!("1 {noun}")
    } else {
        format!("{n} {noun}s")
    }
}

/// Lines of the rows not measured named in the one line that reports them.
pub const NOT_MEASURED_LINES: usize = 8;

/// The one line that reports the rows not measured (`593 points not measured (lines 14, 15,
/// 22, ...)`), or `None` when every row was measured.
pub fn not_measured_line(a: &crate::analysis::Analysis) -> Option<String> {
    let n = &a.summary.not_measured;
    if n.total == 0 {
        return None;
    }
    let lines: Vec<String> = n
        .items
        .iter()
        .take(NOT_MEASURED_LINES)
        .map(u64::to_string)
        .collect();
    let more = if n.total > lines.len() { ", ..." } else { "" };
    Some(format!(
        "{} not measured (line{} {}{more}): empty readings or flagged not valid, left out \
         (neither judged nor rejected)",
        count_of(n.total, "point"),
        if n.total == 1 { "" } else { "s" },
        lines.join(", ")
    ))
}

/// How an input path is named to people: `-` is standard input.
pub fn input_name(path: &Path) -> String {
    if path.as_os_str() == "-" {
        "standard input".into()
    } else {
        path.display().to_string()
    }
}

/// Refuse `target` if it is one of `inputs` (compared after resolving links and `..`).
pub fn guard_inputs(target: &Path, inputs: &[PathBuf]) -> Result<()> {
    let Ok(t) = fs::canonicalize(target) else {
        return Ok(()); // does not exist yet: cannot be an input
    };
    for input in inputs {
        if fs::canonicalize(input).is_ok_and(|i| i == t) {
            return Err(Error::Usage(format!(
                "refusing to write {}: it is an input file of this run; choose another output path (--out, --points)",
                target.display()
            )));
        }
    }
    Ok(())
}

/// Append `v` with `decimals` fixed decimals (at most 9) to `buf`: the same text as
/// `format!("{v:.decimals$}")` (but for a last digit in rare near-ties) and several times
/// faster, through integer formatting.
/// Falls back to `format!` for values too large for that.
pub fn push_fixed(buf: &mut String, v: f64, decimals: usize) {
    let mut b = [0u8; 32];
    match fixed(&mut b, v, decimals) {
        Some(text) => buf.push_str(std::str::from_utf8(text).unwrap_or("")),
        None => {
            use std::fmt::Write as _;
            let _ = write!(buf, "{v:.decimals$}");
        }
    }
}

/// [`push_fixed`] onto bytes (the points table is built as bytes).
pub fn push_fixed_bytes(buf: &mut Vec<u8>, v: f64, decimals: usize) {
    let mut b = [0u8; 32];
    match fixed(&mut b, v, decimals) {
        Some(text) => buf.extend_from_slice(text),
        None => buf.extend_from_slice(format!("{v:.decimals$}").as_bytes()),
    }
}

/// `v` with `decimals` fixed decimals as ASCII at the end of `out`; `None` when it does not fit
/// in an `i64` at that scale (or `decimals > 9`). The digits are written right to left from the
/// rounded integer `round(v · 10^decimals)`, the decimal point put in on the way.
fn fixed(out: &mut [u8; 32], v: f64, decimals: usize) -> Option<&[u8]> {
    const SCALE: [f64; 10] = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9];
    // 2^52: from here on every double is an integer.
    const TWO_52: f64 = 4_503_599_627_370_496.0;
    let scaled = v * *SCALE.get(decimals)?;
    let magnitude = scaled.abs();
    if magnitude.is_nan() || magnitude >= 9.0e15 {
        return None;
    }
    // Round half to even without a call into libm: below 2^52, adding 2^52 leaves no bits for
    // a fraction, so the sum is rounded to an integer by the IEEE 754 default rounding (to
    // nearest, ties to even) and subtracting 2^52 again is exact: the same as
    // `f64::round_ties_even` (checked against it in the tests).
    let rounded = if magnitude < TWO_52 {
        (magnitude + TWO_52) - TWO_52
    } else {
        magnitude
    };
    const PAIRS: [u8; 200] = {
        let mut t = [0u8; 200];
        let mut k = 0;
        while k < 100 {
            t[2 * k] = b'0' + (k / 10) as u8;
            t[2 * k + 1] = b'0' + (k % 10) as u8;
            k += 1;
        }
        t
    };
    let mut n = rounded as u64;
    let negative = scaled < 0.0 && n != 0;
    let mut i = out.len();
    let mut left = decimals;
    // Two digits a step, then the last odd one; the point goes in after `decimals` digits.
    while left >= 2 {
        let d = (n % 100) as usize * 2;
        out[i - 2..i].copy_from_slice(&PAIRS[d..d + 2]);
        i -= 2;
        n /= 100;
        left -= 2;
    }
    if left == 1 {
        i -= 1;
        out[i] = b'0' + (n % 10) as u8;
        n /= 10;
    }
    if decimals > 0 {
        i -= 1;
        out[i] = b'.';
    }
    while n >= 100 {
        let d = (n % 100) as usize * 2;
        out[i - 2..i].copy_from_slice(&PAIRS[d..d + 2]);
        i -= 2;
        n /= 100;
    }
    if n >= 10 {
        let d = n as usize * 2;
        out[i - 2..i].copy_from_slice(&PAIRS[d..d + 2]);
        i -= 2;
    } else {
        i -= 1;
        out[i] = b'0' + n as u8;
    }
    if negative {
        i -= 1;
        out[i] = b'-';
    }
    Some(&out[i..])
}

/// A finding beside the zone counts: a sentence, and the ids it lists (shown indented under
/// it in the terminal, as a list in the report).
#[derive(Debug, Clone, PartialEq)]
pub struct Note {
    /// The sentence.
    pub text: String,
    /// The ids listed under it (the first ones).
    pub ids: Vec<String>,
    /// Whether there are more than `ids`.
    pub more: bool,
}

/// Ids listed under a note at most.
pub const NOTE_IDS: usize = 24;

/// Findings beside the zone counts, for people (the terminal and the report show the same
/// text): borderline locations when a reading error is set, the thickness cross-checks.
pub fn notes(a: &crate::analysis::Analysis) -> Vec<Note> {
    let mut out = Vec::new();
    let count = crate::output::count_of;
    if let Some(dd) = a.settings.reading_error {
        let (ids, total) = a.borderline();
        let shown: Vec<String> = ids.iter().take(NOTE_IDS).cloned().collect();
        let unit = if a.strain_input {
            "pp of strain".to_string()
        } else {
            a.lengths.unit.to_string()
        };
        out.push(Note {
            text: format!(
                "Borderline (zone could change within a reading error of {dd} {unit}): {}{}",
                count(total, "location"),
                if shown.is_empty() { "" } else { ":" }
            ),
            more: total > shown.len(),
            ids: shown,
        });
    }
    let plain = |text: String| Note {
        text,
        ids: Vec::new(),
        more: false,
    };
    if let Some(tc) = a.thickness_check() {
        out.push(plain(format!(
            "Thickness cross-check: {} measured; largest difference {:+.1} % \
             (measured vs from strains) at {}",
            count(tc.measured, "location"),
            tc.largest_diff,
            tc.id
        )));
    }
    let sm = &a.summary;
    if sm.paths > 0 {
        let ids: Vec<String> = sm.hidden.items.iter().take(NOTE_IDS).cloned().collect();
        out.push(Note {
            text: format!(
                "Path criterion (polar effective plastic strain): {} judged along their stages \
                 ({}); hidden by the strain curve (safe or marginal on it, at risk along the \
                 path): {}{}",
                count(sm.paths, "location"),
                a.stages.join(" → "),
                count(sm.hidden.total, "location"),
                if ids.is_empty() { "" } else { ":" }
            ),
            more: sm.hidden.total > ids.len(),
            ids,
        });
        if sm.turned.total > 0 {
            let ids: Vec<String> = sm.turned.items.iter().take(NOTE_IDS).cloned().collect();
            out.push(Note {
                text: format!(
                    "Major axis turned by more than {} degrees between stages at {} (the path \
                     criterion assumes fixed axes):",
                    crate::path::TURN_LIMIT_DEG,
                    count(sm.turned.total, "location"),
                ),
                more: sm.turned.total > ids.len(),
                ids,
            });
        }
    }
    let ob = &a.summary.observed;
    if ob.observed() > 0 {
        let row = |c: crate::condition::Condition| {
            let cells: Vec<String> = crate::assess::Zone::ALL
                .iter()
                .filter(|z| ob.count(c, **z) > 0)
                .map(|z| format!("{} {}", ob.count(c, *z), z.name()))
                .collect();
            let cells = if cells.is_empty() {
                "-".to_string()
            } else {
                cells.join(", ")
            };
            format!("{}: {cells}", c.name())
        };
        let rows: Vec<String> = crate::condition::Condition::ALL
            .iter()
            .map(|c| row(*c))
            .collect();
        out.push(plain(format!(
            "Observed on the part against judged ({} marked): {}; the curve is conservative at \
             {} (observed safe, judged failed) and not conservative at {}",
            count(ob.observed(), "location"),
            rows.join("; "),
            count(ob.conservative, "location"),
            count(ob.non_conservative_total, "location"),
        )));
    }
    if let Some(tc) = &a.summary.thinning {
        out.push(plain(format!(
            "Thinning cross-check: {} measured; largest difference {:+.1} pp \
             (measured vs from strains) at {}",
            count(tc.measured, "location"),
            tc.largest_diff,
            tc.id
        )));
    }
    out
}

/// The warning that goes under the verdict when locations observed necked or split on the part
/// were judged to pass: the curve is not conservative for this part.
pub fn curve_warning(a: &crate::analysis::Analysis) -> Option<String> {
    let ob = &a.summary.observed;
    (ob.non_conservative_total > 0).then(|| {
        let ids: Vec<&str> = ob
            .non_conservative
            .iter()
            .take(12)
            .map(String::as_str)
            .collect();
        format!(
            "Warning: the limit curve is not conservative for this part: {} observed necked or \
             split judged to pass: {}{}",
            crate::output::count_of(ob.non_conservative_total, "location"),
            ids.join(", "),
            if ob.non_conservative_total > ids.len() {
                ", ..."
            } else {
                ""
            }
        )
    })
}

/// A zone edge: its value, and whether a value on it belongs below (`margin ≤ 0` is failed)
/// or above (`margin ≥ band` is beyond the band).
pub type Edge = (f64, bool);

/// Which side of `edge` a value is on, round-off ([`crate::assess::ROUND_OFF_PP`]) counted
/// as on the edge, as the zone rules count it.
fn below(v: f64, (e, on_is_below): Edge) -> bool {
    if on_is_below {
        v <= e + crate::assess::ROUND_OFF_PP
    } else {
        v < e - crate::assess::ROUND_OFF_PP
    }
}

/// `v` printed with at least `decimals` decimals and never on the wrong side of any of
/// `edges`: more decimals near an edge (up to 4), and at 4 decimals rounded away from the
/// edge when plain rounding would land across it. "-0.0" is printed "0.0".
pub fn fmt_against(v: f64, edges: &[Edge], decimals: usize) -> String {
    let keeps = |t: &str| {
        t.parse::<f64>()
            .is_ok_and(|p| edges.iter().all(|e| below(p, *e) == below(v, *e)))
    };
    let clean = |t: String| {
        if t.starts_with('-') && t[1..].chars().all(|c| c == '0' || c == '.') {
            t[1..].to_string()
        } else {
            t
        }
    };
    for d in decimals..=4 {
        let t = clean(format!("{v:.d$}"));
        if keeps(&t) {
            return t;
        }
    }
    // Within 0.00005 of an edge: the last digit moves away from the edge, to v's side.
    let near = edges
        .iter()
        .map(|e| e.0)
        .min_by(|a, b| (v - a).abs().total_cmp(&(v - b).abs()))
        .unwrap_or(0.0);
    let scaled = v * 1e4;
    let r = if v > near {
        scaled.ceil()
    } else {
        scaled.floor()
    };
    clean(format!("{:.4}", r / 1e4))
}

/// A margin, pp, that never reads across 0 (the curve) or the band edge: 1 decimal unless
/// that would put it on the wrong side.
pub fn fmt_margin(m: f64, band: f64) -> String {
    fmt_against(m, &[(0.0, true), (band, false)], 1)
}

/// [`fmt_margin`] of an optional margin, empty when absent.
pub fn fmt_margin_opt(m: Option<f64>, band: f64) -> String {
    m.map_or_else(String::new, |m| fmt_margin(m, band))
}

/// A setting without trailing zeros: 25 -> "25", 12.5 -> "12.5".
pub fn fmt_setting(v: f64) -> String {
    let t = format!("{v:.3}");
    t.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// A length to the resolution of its unit (4 decimals of a millimetre, 0.1 µm; 5 of an inch,
/// 0.01 thou: the same resolution as points.csv), trailing zeros dropped.
pub fn fmt_length(v: f64, unit: crate::units::LengthUnit) -> String {
    let d = match unit {
        crate::units::LengthUnit::Mm => 4,
        crate::units::LengthUnit::In => 5,
    };
    let t = format!("{v:.d$}");
    t.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// Why a location is in its zone, in words with the numbers that decided it:
/// "thinning 27.7 % (max 25)", "margin 4.2 pp < band 10", "thicker 3.3 % (from 2)".
pub fn reason_text(p: &crate::point::PointResult, st: &crate::assess::Settings) -> String {
    let text = strain_reason_text(p, st);
    // Where both criteria judge and the strain curve's zone ranks worse, the path's differing
    // finding is shown beside it.
    match &p.path {
        Some(pj)
            if p.judgement.reason != crate::assess::Reason::Path
                && pj.judges()
                && pj.zone != p.zone() =>
        {
            match pj.use_pct {
                Some(u) => format!(
                    "{text}; path {} {} %",
                    pj.zone,
                    fmt_against(u, &[(100.0, false)], 1)
                ),
                None => format!("{text}; path {}", pj.zone),
            }
        }
        _ => text,
    }
}

fn strain_reason_text(p: &crate::point::PointResult, st: &crate::assess::Settings) -> String {
    use crate::assess::Reason;
    let j = &p.judgement;
    let band = st.margin_pct;
    let margin = || fmt_margin_opt(j.margin_pct, band);
    match j.reason {
        Reason::Curve => format!("margin {} pp, over curve", margin()),
        Reason::Thinning => {
            let max = st.max_thinning_pct.unwrap_or(0.0);
            format!(
                "thinning {} % (max {})",
                fmt_against(p.strain.thinning * 100.0, &[(max, false)], 1),
                fmt_setting(max)
            )
        }
        Reason::Band => format!("margin {} pp < band {}", margin(), fmt_setting(band)),
        Reason::Thickening => format!(
            "thicker {} % (from {})",
            fmt_against(
                crate::assess::thickening_pct(&p.strain),
                &[(st.thickening_pct, false)],
                1
            ),
            fmt_setting(st.thickening_pct)
        ),
        Reason::LowStretch => format!(
            "major {} % (below {})",
            fmt_against(
                p.strain.eng.major.percent(),
                &[(st.low_stretch_pct, false)],
                1
            ),
            fmt_setting(st.low_stretch_pct)
        ),
        Reason::NoCurve => format!(
            "minor {} % off the curve",
            fmt_against(p.strain.eng.minor.percent(), &[], 1)
        ),
        Reason::Crossed => format!(
            "crossed the curve: {} % of limit (minor {} % off the curve)",
            fmt_against(j.limit_use_pct.unwrap_or(f64::NAN), &[(100.0, false)], 1),
            fmt_against(p.strain.eng.minor.percent(), &[], 1)
        ),
        Reason::Path => match &p.path {
            Some(pj) if pj.use_pct.is_none() => match pj.notes.is_empty() {
                true => format!("no path limit; curve: {} pp {}", margin(), pj.strain_zone),
                false => format!(
                    "no path limit: {}; curve: {} pp {}",
                    pj.notes.join("; "),
                    margin(),
                    pj.strain_zone
                ),
            },
            Some(pj) => format!(
                "path {} % of limit; curve: {} pp {}",
                fmt_against(pj.use_pct.unwrap_or(f64::NAN), &[(100.0, false)], 1),
                margin(),
                pj.strain_zone
            ),
            None => "along its path".into(),
        },
        Reason::None => format!("margin {} pp", margin()),
    }
}

/// Format an optional number with `decimals`, empty when absent.
pub fn fmt_opt(v: Option<f64>, decimals: usize) -> String {
    v.map_or_else(String::new, |v| format!("{v:.decimals$}"))
}

#[cfg(test)]
mod tests {
    use super::{fmt_against, fmt_margin, push_fixed};

    // Printed margins never read across the zone edges (0 = the curve, 10 = the band edge):
    // at 0 ± 0.04 and 10 ± 0.04, and closer still; the zone rules are those of assess.rs.
    #[test]
    fn margins_never_contradict_their_zone() {
        let side = |v: f64| {
            if v <= 0.0 {
                0
            } else if v < 10.0 {
                1
            } else {
                2
            }
        };
        for m in [
            0.04, -0.04, 9.96, 10.04, 0.004, -0.004, 9.996, 10.0004, 0.00004, 9.99996, 0.05, 9.95,
            10.0, 0.0, 3.25, -12.5,
        ] {
            let t = fmt_margin(m, 10.0);
            let shown: f64 = t.parse().unwrap();
            assert_eq!(side(shown), side(m), "{m} printed {t}");
        }
        assert_eq!(fmt_margin(0.04, 10.0), "0.04");
        assert_eq!(fmt_margin(9.96, 10.0), "9.96");
        assert_eq!(fmt_margin(10.04, 10.0), "10.0");
        assert_eq!(fmt_margin(-0.04, 10.0), "0.0"); // failed: on the curve at this precision
        assert_eq!(fmt_margin(0.00004, 10.0), "0.0001");
        assert_eq!(fmt_margin(9.99996, 10.0), "9.9999");
        assert_eq!(fmt_margin(3.25, 10.0), "3.2"); // round half to even, away from edges
        assert_eq!(fmt_against(24.96, &[(25.0, false)], 1), "24.96");
    }

    proptest::proptest! {
        // Against the standard library's formatting (the reference): the same number to one
        // unit in the last place (they may round a near-tie differently), never "-0".
        #[test]
        fn fixed_agrees_with_std_formatting(v in -1.0e6f64..1.0e6, d in 0usize..7) {
            let mut b = String::new();
            push_fixed(&mut b, v, d);
            let expected = format!("{v:.d$}");
            let (x, y): (f64, f64) = (b.parse().unwrap(), expected.parse().unwrap());
            proptest::prop_assert!((x - y).abs() <= 1.01 * 10f64.powi(-(d as i32)), "{b} vs {expected}");
        }
    }

    #[test]
    fn rounds_half_to_even_like_the_standard_library() {
        // Reference: `f64::round_ties_even` (IEEE 754 roundTiesToEven). Multiples of 1/2, 1/8
        // and 1/16 are exact ties at 0, 2 and 3 decimals, where the two roundings differ most.
        for k in -20_000i32..20_000 {
            let k = f64::from(k);
            for (v, d) in [(k / 2.0, 0), (k / 8.0, 2), (k / 16.0, 3), (k * 0.001_37, 3)] {
                let mut b = String::new();
                push_fixed(&mut b, v, d);
                let digits: i64 = b.replace('.', "").parse().unwrap();
                let expected = (v * 10f64.powi(d as i32)).round_ties_even() as i64;
                assert_eq!(digits, expected, "{v} at {d} decimals: {b}");
            }
        }
    }

    #[test]
    fn bytes_and_text_agree() {
        let mut bytes = b"x,".to_vec();
        let mut text = String::from("x,");
        for v in [
            0.0,
            -0.0004,
            1.5,
            -12.345_678,
            1e20,
            f64::NAN,
            9.99e15,
            123_456.789,
        ] {
            super::push_fixed_bytes(&mut bytes, v, 3);
            push_fixed(&mut text, v, 3);
            bytes.push(b',');
            text.push(',');
        }
        assert_eq!(String::from_utf8(bytes).unwrap(), text);
    }

    #[test]
    fn no_negative_zero() {
        for v in [-0.0004, -0.0, -1e-12] {
            let mut b = String::new();
            push_fixed(&mut b, v, 3);
            assert_eq!(b, "0.000");
        }
    }

    proptest::proptest! {
        #[test]
        fn one_point_at_most(v in -1.0e6f64..1.0e6, d in 0usize..7) {
            let mut b = String::new();
            push_fixed(&mut b, v, d);
            proptest::prop_assert_eq!(b.matches('.').count(), usize::from(d > 0));
        }
    }

    #[test]
    fn fixed_matches_std_formatting() {
        for v in [
            0.0, 1.5, -0.25, 30.0004, -4.0816, 123456.789, 0.0004, -0.0004, 1e20,
        ] {
            for d in [0, 1, 3, 4] {
                let mut b = String::new();
                push_fixed(&mut b, v, d);
                let expected = format!("{v:.d$}");
                // The same text, except that a negative value rounding to zero is written
                // without std's minus sign ("0.000" where std writes "-0.000").
                let rounds_to_zero = expected
                    .trim_start_matches('-')
                    .trim_matches(['0', '.'])
                    .is_empty();
                if rounds_to_zero {
                    assert_eq!(b, expected.trim_start_matches('-'), "{v} {d}");
                } else {
                    assert_eq!(b, expected, "{v} {d}");
                }
            }
        }
    }
}
