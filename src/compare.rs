//! Tryout against tryout: two `points.csv` results joined by location id.
//!
//! After a die rework the same grid locations are measured again; what the tooling review wants
//! to see is, per location, how the margin to the limit curve moved and which locations changed
//! zone. Both files are results written by `check`, so the comparison is of judged values only.

use crate::assess::Zone;
use crate::error::{Error, Location, Result};
use crate::measure::{open_input, parse_number, Dialect};
use std::collections::HashMap;
use std::path::Path;

/// The values of one location that a comparison uses.
#[derive(Debug, Clone, PartialEq)]
pub struct ResultRow {
    /// Location id.
    pub id: String,
    /// Engineering major strain, percent.
    pub major_pct: f64,
    /// Engineering minor strain, percent.
    pub minor_pct: f64,
    /// Vertical margin to the curve, percentage points (`None` when uncovered).
    pub margin_pct: Option<f64>,
    /// The zone.
    pub zone: Zone,
}

/// One location found in both results.
#[derive(Debug, Clone, PartialEq)]
pub struct Change {
    /// The earlier result.
    pub before: ResultRow,
    /// The later result.
    pub after: ResultRow,
}

impl Change {
    /// Change of margin, percentage points (positive = safer now); `None` if either is uncovered.
    pub fn margin_change(&self) -> Option<f64> {
        Some(self.after.margin_pct? - self.before.margin_pct?)
    }
    /// Change of engineering major strain, percentage points.
    pub fn major_change(&self) -> f64 {
        self.after.major_pct - self.before.major_pct
    }
}

/// Two results joined by id.
#[derive(Debug, Clone, PartialEq)]
pub struct Comparison {
    /// Locations in both, in the order of the later file.
    pub changes: Vec<Change>,
    /// Ids only in the earlier result.
    pub only_before: Vec<String>,
    /// Ids only in the later result.
    pub only_after: Vec<String>,
}

const NEEDED: [&str; 5] = ["id", "major_eng_pct", "minor_eng_pct", "margin_pct", "zone"];

/// Read the columns a comparison needs from a `points.csv` written by `check`.
pub fn read_results(path: &Path) -> Result<Vec<ResultRow>> {
    let loc = Location::file(path);
    let mut rdr = csv::Reader::from_reader(open_input(path)?);
    let header = rdr
        .headers()
        .map_err(|e| Error::input(loc.clone(), e.to_string()))?
        .clone();
    let mut idx = [0usize; 5];
    for (k, name) in NEEDED.iter().enumerate() {
        idx[k] = header.iter().position(|h| h == *name).ok_or_else(|| {
            Error::input(
                loc.clone().at_line(1),
                format!("missing column `{name}`: expected a points.csv written by `check`"),
            )
        })?;
    }
    let mut rows = Vec::new();
    let mut seen = std::collections::HashSet::new();
    for rec in rdr.records() {
        let rec = rec.map_err(|e| Error::input(loc.clone(), e.to_string()))?;
        let line = rec.position().map_or(0, |p| p.line());
        let at = |k: usize| {
            loc.clone()
                .at_line(line)
                .at_column(idx[k] as u64 + 1, NEEDED[k])
        };
        let field = |k: usize| rec.get(idx[k]).unwrap_or("");
        let num =
            |k: usize| parse_number(field(k), Dialect::Comma).map_err(|m| Error::input(at(k), m));
        let margin_pct = match field(3) {
            "" => None,
            _ => Some(num(3)?),
        };
        let id = field(0).to_string();
        if !seen.insert(id.clone()) {
            return Err(Error::input(
                at(0),
                format!("duplicate id `{id}`: a location can be compared only once"),
            ));
        }
        rows.push(ResultRow {
            id,
            major_pct: num(1)?,
            minor_pct: num(2)?,
            margin_pct,
            zone: field(4)
                .parse()
                .map_err(|m: String| Error::input(at(4), m))?,
        });
    }
    Ok(rows)
}

/// Join two results by id.
pub fn compare(before: Vec<ResultRow>, after: Vec<ResultRow>) -> Comparison {
    let mut by_id: HashMap<String, ResultRow> =
        before.into_iter().map(|r| (r.id.clone(), r)).collect();
    let mut changes = Vec::new();
    let mut only_after = Vec::new();
    for a in after {
        match by_id.remove(&a.id) {
            Some(b) => changes.push(Change {
                before: b,
                after: a,
            }),
            None => only_after.push(a.id),
        }
    }
    let mut only_before: Vec<String> = by_id.into_keys().collect();
    only_before.sort();
    Comparison {
        changes,
        only_before,
        only_after,
    }
}

impl Comparison {
    /// How many locations went from zone `from` to zone `to`.
    pub fn transitions(&self, from: Zone, to: Zone) -> usize {
        self.changes
            .iter()
            .filter(|c| c.before.zone == from && c.after.zone == to)
            .count()
    }

    /// Locations that are failed or marginal now and were in a better zone before.
    pub fn newly_at_risk(&self) -> Vec<&Change> {
        let at_risk = |z: Zone| matches!(z, Zone::Failed | Zone::Marginal);
        self.changes
            .iter()
            .filter(|c| at_risk(c.after.zone) && c.after.zone < c.before.zone)
            .collect()
    }

    /// The `n` locations whose margin fell the most, largest loss first.
    pub fn largest_losses(&self, n: usize) -> Vec<&Change> {
        let mut v: Vec<&Change> = self
            .changes
            .iter()
            .filter(|c| c.margin_change().is_some_and(|d| d < 0.0))
            .collect();
        v.sort_by(|a, b| {
            a.margin_change()
                .unwrap_or(0.0)
                .total_cmp(&b.margin_change().unwrap_or(0.0))
        });
        v.truncate(n);
        v
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn row(id: &str, margin: Option<f64>, zone: Zone) -> ResultRow {
        ResultRow {
            id: id.into(),
            major_pct: 20.0,
            minor_pct: 0.0,
            margin_pct: margin,
            zone,
        }
    }

    #[test]
    fn joins_by_id_and_lists_the_rest() {
        let before = vec![
            row("A", Some(-2.0), Zone::Failed),
            row("B", Some(15.0), Zone::Safe),
            row("C", None, Zone::Uncovered),
        ];
        let after = vec![
            row("B", Some(8.0), Zone::Marginal),
            row("A", Some(5.0), Zone::Marginal),
            row("D", Some(20.0), Zone::Safe),
        ];
        let c = compare(before, after);
        assert_eq!(c.changes.len(), 2);
        assert_eq!(c.only_before, vec!["C".to_string()]);
        assert_eq!(c.only_after, vec!["D".to_string()]);
        assert_eq!(c.transitions(Zone::Failed, Zone::Marginal), 1);
        assert_eq!(c.newly_at_risk().len(), 1);
        assert_eq!(c.newly_at_risk()[0].after.id, "B");
        let loss = c.largest_losses(5);
        assert_eq!(loss.len(), 1);
        assert!((loss[0].margin_change().unwrap() + 7.0).abs() < 1e-12);
    }
}
