//! `compare.json`: the counts and lists of a comparison, for scripts.

use super::{Change, Comparison, Matching, Status, Track};
use crate::assess::Zone;
use crate::CAUTION;
use serde_json::{json, Map, Value};
use std::io::{self, Write};

fn entry(c: &Comparison, t: &Track) -> Value {
    let (b, a) = (t.before(), t.after());
    json!({
        "id": t.name(),
        "zone_before": b.map(|r| r.zone.name()),
        "zone_after": a.map(|r| r.zone.name()),
        "margin_pct_before": b.and_then(|r| r.margin_pct),
        "margin_pct_after": a.and_then(|r| r.margin_pct),
        "margin_change_pct": t.margin_change(),
        "major_change_pct": t.major_change(),
        "change": t.change(c.tolerance).map(Change::name),
    })
}

fn list(c: &Comparison, v: Vec<&Track>) -> Value {
    Value::Array(v.into_iter().map(|t| entry(c, t)).collect())
}

fn ids(v: Vec<&Track>) -> Value {
    json!(v.iter().map(|t| t.name()).collect::<Vec<_>>())
}

fn zones(counts: Vec<(Zone, usize)>) -> Value {
    let m: Map<String, Value> = counts
        .into_iter()
        .map(|(z, n)| (z.name().to_string(), json!(n)))
        .collect();
    Value::Object(m)
}

/// The comparison as a JSON value.
pub fn summary(c: &Comparison) -> Value {
    let tryouts: Vec<Value> = c
        .tryouts
        .iter()
        .enumerate()
        .map(|(k, t)| {
            let s = t.summary.clone().unwrap_or_default();
            json!({
                "label": t.label, "file": t.path.display().to_string(),
                "part": s.part, "die": s.die, "date": s.date, "curve": s.curve,
                "safety_band_pct": s.band, "verdict": c.verdict(k),
                "locations": t.stats.locations, "zones": zones(c.zone_counts(k)),
            })
        })
        .collect();
    let mut transitions = Map::new();
    for from in Zone::ALL {
        let row: Map<String, Value> = Zone::ALL
            .iter()
            .map(|to| (to.name().to_string(), json!(c.transitions(from, *to))))
            .collect();
        transitions.insert(from.name().to_string(), Value::Object(row));
    }
    let (before, after) = c.labels();
    let matching = match c.matching {
        Matching::Id => json!({ "by": "id" }),
        Matching::Xy { within } => json!({ "by": "xy", "within": within }),
    };
    let mut v = json!({
        "tool": { "name": "neckline", "version": env!("CARGO_PKG_VERSION") },
        "tryouts": tryouts,
        "compared": { "before": before, "after": after },
        "matching": matching,
        "tolerance_pct": c.tolerance,
        "counts": {
            "both": c.status_count(Status::Both),
            "only_before": c.status_count(Status::OnlyBefore),
            "only_after": c.status_count(Status::OnlyAfter),
            "only_earlier": c.status_count(Status::OnlyEarlier),
            "improved": c.change_count(Change::Improved),
            "worsened": c.change_count(Change::Worsened),
            "unchanged": c.change_count(Change::Unchanged),
            "newly_failed": c.counts.newly_failed,
            "newly_at_risk": c.counts.newly_at_risk,
            "fixed": c.counts.fixed,
        },
        "transitions": transitions,
        "newly_failed": list(c, c.newly_failed()),
        "newly_at_risk": list(c, c.newly_at_risk()),
        "fixed": list(c, c.fixed()),
        "losses": list(c, c.losses()),
        "gains": list(c, c.gains()),
        "only_before": ids(c.with_status(Status::OnlyBefore)),
        "only_after": ids(c.with_status(Status::OnlyAfter)),
        "only_earlier": ids(c.with_status(Status::OnlyEarlier)),
        "at_risk_only_after": list(c, c.at_risk_only_after(true)),
        "warnings": c.warnings,
        "caution": CAUTION,
    });
    if !c.complete {
        capped_keys(c, &mut v);
    }
    v
}

/// Beyond [`crate::summary::KEEP_ALL`] locations each list holds its first
/// [`crate::capped::LIST_CAP`]: `list_cap` says so, and `counts` gains the length of every
/// list (those above hold lists' lengths already).
fn capped_keys(c: &Comparison, v: &mut Value) {
    let n = &c.counts;
    if let Some(m) = v.as_object_mut() {
        m.insert("list_cap".into(), json!(crate::capped::LIST_CAP));
    }
    if let Some(m) = v["counts"].as_object_mut() {
        for (k, n) in [
            ("losses", n.losses),
            ("gains", n.gains),
            ("at_risk_only_after", n.at_risk_only_after),
            ("still_at_risk", n.still_at_risk),
            ("left_failed", n.left_failed),
        ] {
            m.insert(k.into(), json!(n));
        }
    }
}

/// Write compare.json, pretty-printed.
pub fn write_json(c: &Comparison, out: &mut dyn Write) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, &summary(c))?;
    writeln!(out)
}
