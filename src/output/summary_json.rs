//! `summary.json`: counts, per-zone ids, the worst locations, verdict, curve, settings, rejected
//! rows, caution.

use crate::analysis::{Analysis, CAUTION};
use crate::summary::Capped;
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
    let point = |p: &crate::analysis::PointResult| {
        json!({ "id": p.input.id, "margin_pct": p.judgement.margin_pct,
                "limit_use_pct": p.judgement.limit_use_pct, "zone": p.zone().name(),
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
    json!({
        "tool": { "name": "neckline", "version": env!("CARGO_PKG_VERSION") },
        "input": a.input.display().to_string(),
        "input_kind": if a.strain_input { "strains" } else { "axes" },
        "job": a.job,
        "points": a.total(),
        "rejected_rows": a.rejected_total(),
        "rejected": rejected,
        "zones": zones,
        "zone_ids": zone_ids,
        "worst": worst,
        "worst_list": worst_list,
        "verdict": a.verdict().name(),
        "limit": { "name": a.curve.name, "source": a.curve.source,
                   "material": a.curve.material, "strain": a.curve.measure.name() },
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
            let table: Map<String, Value> = crate::observed::Condition::ALL
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

/// Write the summary, pretty-printed.
pub fn write_summary(a: &Analysis, out: &mut dyn Write) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, &summary(a))?;
    writeln!(out)
}
