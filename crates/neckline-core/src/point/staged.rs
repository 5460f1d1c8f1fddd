//! A file measured after several forming stages (a `stage` column): every location judged at
//! its last stage by the strain curve and along its path by the path criterion
//! ([`crate::path::judge_path`]).

use super::{state_of, Context, PointResult, StateInput};
use crate::assess::Reason;
use crate::error::{Error, Location, Result};
use crate::measure::{MeasurementReader, RejectedRow};
use crate::path::{combined_zone, judge_path_noisy};
use std::collections::HashMap;

/// The locations of a multi-stage file, each judged at its last stage by the strain curve and
/// along its path, in the order their ids first appear; with the rows that were rejected and
/// the stage names in order.
pub struct Staged {
    /// The judged locations.
    pub points: Vec<PointResult>,
    /// Rejected rows, in file order.
    pub rejected: Vec<RejectedRow>,
    /// The stages, in order.
    pub stages: Vec<String>,
    /// Lines of the rows not measured (neither judged nor rejected).
    pub not_measured: crate::capped::Capped<u64>,
}

/// Read every row of a file with a `stage` column (held in memory: a location's stages may be
/// anywhere in the file), then judge each location. The stage order is `order` (the job
/// file's `stages`; a stage not in it is an error naming the row) or the order of first
/// appearance. A location with one stage is judged by the strain curve alone.
pub fn judge_staged<B: std::io::BufRead>(
    rows: MeasurementReader<B>,
    ctx: &Context,
    order: Option<&[String]>,
) -> Result<Staged> {
    let file = rows.header.file.clone();
    let stage_col = rows.header.columns.index("stage");
    let mut stages: Vec<String> = order.map(<[String]>::to_vec).unwrap_or_default();
    let mut ids: Vec<String> = Vec::new();
    let mut by_id: HashMap<String, Vec<(usize, StateInput)>> = HashMap::new();
    let mut out = Staged {
        points: Vec::new(),
        rejected: Vec::new(),
        stages: Vec::new(),
        not_measured: Default::default(),
    };
    let unmeasured = rows.header.unmeasured.clone();
    for row in rows {
        let m = match row? {
            Ok(m) => m,
            Err(r) => {
                out.rejected.push(r);
                continue;
            }
        };
        let name = m.stage.clone().unwrap_or_default();
        let k = match stages.iter().position(|s| *s == name) {
            Some(k) => k,
            None if order.is_some() => {
                let mut loc = Location::file(&file).at_line(m.line);
                if let Some(c) = stage_col {
                    loc = loc.at_column(c as u64 + 1, "stage");
                }
                return Err(Error::input(
                    loc,
                    format!(
                        "stage `{name}` is not in the job file's stages ({})",
                        stages.join(", ")
                    ),
                ));
            }
            None => {
                stages.push(name);
                stages.len() - 1
            }
        };
        match state_of(m, &file, &ctx.lengths) {
            Err(r) => out.rejected.push(r),
            Ok(s) => {
                let list = by_id.entry(s.input.id.clone()).or_default();
                if list.is_empty() {
                    ids.push(s.input.id.clone());
                }
                list.push((k, s));
            }
        }
    }
    let staged = stages.len() >= 2;
    for id in ids {
        let list = by_id.remove(&id).unwrap_or_default();
        out.points.extend(judge_location(list, ctx, staged));
    }
    out.stages = stages;
    out.not_measured = unmeasured.lock().map(|l| l.clone()).unwrap_or_default();
    Ok(out)
}

/// Judge one location from its rows `(stage index, state)`: at its last stage by the strain
/// curve and, when the file has several stages (`staged`), along its path.
pub(crate) fn judge_location(
    mut list: Vec<(usize, StateInput)>,
    ctx: &Context,
    staged: bool,
) -> Option<PointResult> {
    list.sort_by_key(|(k, _)| *k);
    let path: Vec<[f64; 2]> = list
        .iter()
        .map(|(_, s)| {
            let t = s.strain.true_strain;
            [t.minor.value(), t.major.value()]
        })
        .collect();
    let axes: Vec<Option<f64>> = list.iter().map(|(_, s)| s.input.angle_deg).collect();
    let errors: Option<Vec<[f64; 2]>> = list
        .iter()
        .map(|(_, s)| ctx.true_strain_errors(s.d0, &s.strain))
        .collect();
    let (_, last) = list.pop()?;
    let mut p = ctx.judge(last);
    if staged {
        let j = judge_path_noisy(
            &path,
            &ctx.curve,
            ctx.settings.margin_pct,
            p.zone(),
            &axes,
            errors.as_deref(),
        );
        // One rule for the two criteria: a bent path's zone wins when it ranks worse
        // (failed, uncovered, marginal, thickening, low-stretch, safe).
        if let Some(zone) = combined_zone(p.judgement.zone, &j) {
            p.judgement.zone = zone;
            p.judgement.reason = Reason::Path;
            p.judgement.borderline = j.borderline;
        }
        p.path = Some(Box::new(j));
    }
    Some(p)
}
