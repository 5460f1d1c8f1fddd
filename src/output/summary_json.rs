//! `summary.json`: counts, worst location, verdict, curve, settings, rejected rows, caution.

use crate::analysis::{Analysis, CAUTION};
use serde_json::{json, Map, Value};
use std::io::{self, Write};

/// The summary as a JSON value.
pub fn summary(a: &Analysis) -> Value {
    let zones: Map<String, Value> = a
        .counts()
        .into_iter()
        .map(|(z, n)| (z.name().to_string(), json!(n)))
        .collect();
    let worst = a.worst(1).first().map(|p| {
        json!({ "id": p.input.id, "margin_pct": p.judgement.margin_pct,
                "limit_use_pct": p.judgement.limit_use_pct, "zone": p.zone().name() })
    });
    let rejected: Vec<Value> = a
        .rejected
        .iter()
        .map(|r| {
            json!({ "file": r.location.file.display().to_string(), "line": r.location.line, "column": r.location.column_name,
                         "id": r.id, "reason": r.reason })
        })
        .collect();
    json!({
        "tool": { "name": "neckline", "version": env!("CARGO_PKG_VERSION") },
        "input": a.input.display().to_string(),
        "job": a.job,
        "points": a.points.len(),
        "rejected_rows": rejected.len(),
        "rejected": rejected,
        "zones": zones,
        "worst": worst,
        "verdict": a.verdict().name(),
        "limit": { "name": a.curve.name, "source": a.curve.source,
                   "material": a.curve.material, "strain": a.curve.measure.name() },
        "settings": a.settings,
        "lengths": { "unit": a.lengths.unit.name(), "d0": a.lengths.d0, "t0": a.lengths.t0 },
        "borderline": a.settings.reading_error.map(|dd| json!({
            "reading_error": dd,
            "count": a.borderline().len(),
            "ids": a.borderline().iter().map(|p| p.input.id.as_str()).collect::<Vec<_>>(),
        })),
        "thickness_check": a.thickness_check().map(|t| json!({
            "measured": t.measured,
            "largest_diff_pct": t.largest_diff_pct,
            "id": t.largest.input.id,
        })),
        "warnings": a.warnings,
        "caution": CAUTION,
    })
}

/// Write the summary, pretty-printed.
pub fn write_summary(a: &Analysis, out: &mut dyn Write) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, &summary(a))?;
    writeln!(out)
}
