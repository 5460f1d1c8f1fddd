//! `summary.json`: counts, per-zone ids (capped, with the total), the worst locations, verdict,
//! curve (with its points in its own measure), settings, rejected rows, the SHA-256 of every
//! input file, the neckline version, the run time (UTC, ISO 8601) and the caution: a filed
//! summary proves what it judged.

use crate::analysis::Analysis;
use crate::summary::Capped;
use crate::CAUTION;
use serde_json::{json, Map, Value};
use std::io::{self, Write};

/// How many worst locations summary.json lists.
pub const WORST_LISTED: usize = 20;

fn capped_ids(c: &Capped<String>) -> Value {
    json!({ "count": c.total, "ids": c.items, "complete": c.items.len() == c.total })
}

/// The summary as a JSON value.
pub fn summary(a: &Analysis) -> Value {
    let zones: Map<String, Value> = a
        .counts()
        .into_iter()
        .map(|(z, n)| (z.name().to_string(), json!(n)))
        .collect();
    let zone_ids: Map<String, Value> = crate::assess::Zone::ALL
        .iter()
        .zip(&a.summary.zone_ids)
        .map(|(z, c)| (z.name().to_string(), capped_ids(c)))
        .collect();
    let point = |p: &crate::point::PointResult| {
        json!({ "id": p.input.id, "margin_pct": p.judgement.margin_pct,
                "limit_use_pct": p.judgement.limit_use_pct, "zone": p.zone().name(),
                "reason": p.judgement.reason.name(),
                "major_eng_pct": p.strain.eng.major.percent(),
                "minor_eng_pct": p.strain.eng.minor.percent(),
                "thinning_pct": p.strain.thinning * 100.0 })
    };
    let worst = a.worst(1).first().map(|p| point(p));
    let worst_list: Vec<Value> = a.worst(WORST_LISTED).into_iter().map(point).collect();
    let rejected: Vec<Value> = a
        .rejected()
        .iter()
        .map(|r| {
            json!({ "file": r.location.file.display().to_string(), "line": r.location.line,
                    "column": r.location.column, "column_name": r.location.column_name,
                    "id": r.id, "reason": r.reason })
        })
        .collect();
    let (b_ids, b_total) = a.borderline();
    // The first lines of the rows not measured listed in summary.json.
    const LIST_CAP_LINES: usize = 100;
    let files: Vec<Value> = a
        .files
        .iter()
        .map(
            |f| json!({ "role": f.role, "path": f.path.display().to_string(), "sha256": f.sha256 }),
        )
        .collect();
    let curve_points: Vec<[f64; 2]> = a
        .curve
        .points
        .iter()
        .map(|p| [p[0] * 100.0, p[1] * 100.0])
        .collect();
    json!({
        "tool": { "name": "neckline", "version": env!("CARGO_PKG_VERSION") },
        "run_time_utc": a.generated.utc(),
        "files": files,
        "input": a.input.display().to_string(),
        "input_kind": if a.strain_input { "strains" } else { "axes" },
        "job": a.job,
        "points": a.total(),
        "rejected_rows": a.rejected_total(),
        "rejected": rejected,
        "not_measured": { "count": a.summary.not_measured.total,
                          "first_lines": a.summary.not_measured.items.iter().take(LIST_CAP_LINES).collect::<Vec<_>>() },
        "zones": zones,
        "zone_ids": zone_ids,
        "worst": worst,
        "worst_list": worst_list,
        "verdict": a.verdict().name(),
        "limit": { "name": a.curve.name, "source": a.curve.source,
                   "material": a.curve.material, "strain": a.curve.measure.name(),
                   "points_pct": curve_points },
        "settings": a.settings,
        "lengths": { "unit": a.lengths.unit.name(), "d0": a.lengths.d0, "t0": a.lengths.t0 },
        "borderline": a.settings.reading_error.map(|dd| json!({
            "reading_error": dd,
            "reading_error_unit": if a.strain_input { "pp".to_string() } else { a.lengths.unit.name().to_string() },
            "count": b_total,
            "ids": b_ids,
        })),
        "thickness_check": a.thickness_check().map(|t| json!({
            "measured": t.measured,
            "largest_diff_pct": t.largest_diff,
            "id": t.id,
        })),
        "thinning_check": a.summary.thinning.as_ref().map(|t| json!({
            "measured": t.measured,
            "largest_diff_pp": t.largest_diff,
            "id": t.id,
        })),
        "paths": (a.summary.paths > 0).then(|| json!({
            "criterion": "polar effective plastic strain (Stoughton & Yoon 2012)",
            "count": a.summary.paths,
            "hidden_by_strain_curve": capped_ids(&a.summary.hidden),
            "axes_turned": capped_ids(&a.summary.turned),
        })),
        "observed": (a.summary.observed.observed() > 0).then(|| {
            let ob = &a.summary.observed;
            let table: Map<String, Value> = crate::condition::Condition::ALL
                .iter()
                .map(|c| {
                    let row: Map<String, Value> = crate::assess::Zone::ALL
                        .iter()
                        .map(|z| (z.name().to_string(), json!(ob.count(*c, *z))))
                        .collect();
                    (c.name().to_string(), Value::Object(row))
                })
                .collect();
            json!({
                "marked": ob.observed(),
                "against_judged": table,
                "conservative": ob.conservative,
                "non_conservative": { "count": ob.non_conservative_total, "ids": ob.non_conservative },
                "curve_conservative": ob.non_conservative_total == 0,
            })
        }),
        "warnings": a.warnings,
        "caution": CAUTION,
    })
}

pub use crate::run_time::{iso8601, utc_now};

/// Write the summary, pretty-printed.
pub fn write_summary(a: &Analysis, out: &mut dyn Write) -> io::Result<()> {
    write_summary_with(a, None, out)
}

/// The points table a summary.json goes with: its file name and the SHA-256 of its bytes.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PointsFile {
    /// The file name (no folder), e.g. `points.csv`.
    pub name: String,
    /// SHA-256 of the file's bytes as written, lowercase hex.
    pub sha256: String,
}

/// [`write_summary`], recording the points table written by the same run in `points_file`
/// (`null` when the run wrote none, or sent it to standard output).
pub fn write_summary_with(
    a: &Analysis,
    points: Option<&PointsFile>,
    out: &mut dyn Write,
) -> io::Result<()> {
    let mut v = summary(a);
    v["points_file"] = points.map_or(
        Value::Null,
        |p| json!({ "name": p.name, "sha256": p.sha256 }),
    );
    serde_json::to_writer_pretty(&mut *out, &v)?;
    writeln!(out)
}

/// The points table a summary.json's text records (`None` for a summary without one, as an
/// earlier version's, or text that is not such a summary).
pub fn recorded_points(summary_text: &str) -> Option<PointsFile> {
    let v: Value = serde_json::from_str(summary_text).ok()?;
    let p = &v["points_file"];
    Some(PointsFile {
        name: p["name"].as_str()?.to_string(),
        sha256: p["sha256"].as_str()?.to_string(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_points_table_is_recorded_and_read_back() {
        let a = crate::output::fixture::analysis(true);
        // SHA-256 of "abc": FIPS 180-2, appendix B.1.
        let p = PointsFile {
            name: "points.csv".into(),
            sha256: "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad".into(),
        };
        let mut text = Vec::new();
        write_summary_with(&a, Some(&p), &mut text).unwrap();
        let text = String::from_utf8(text).unwrap();
        assert_eq!(recorded_points(&text), Some(p));
        let mut none = Vec::new();
        write_summary(&a, &mut none).unwrap();
        let none = String::from_utf8(none).unwrap();
        assert!(none.contains("\"points_file\": null"));
        assert_eq!(recorded_points(&none), None);
        assert_eq!(recorded_points("not json"), None);
    }

    #[test]
    fn worst_list_carries_reasons_and_curve_its_points() {
        let a = crate::output::fixture::analysis(true);
        let v = summary(&a);
        let reasons: Vec<&str> = v["worst_list"]
            .as_array()
            .unwrap()
            .iter()
            .map(|p| p["reason"].as_str().unwrap())
            .collect();
        assert_eq!(&reasons[..3], &["curve", "curve", "thinning"]);
        assert_eq!(v["limit"]["points_pct"][0], json!([-40.0, 70.0]));
        assert_eq!(v["zone_ids"]["failed"]["count"], json!(3));
    }
}
