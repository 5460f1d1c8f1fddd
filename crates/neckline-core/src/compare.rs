//! Tryout against tryout: `points.csv` results of `check`, location by location.
//!
//! After a die rework the same grid locations are measured again; what the tooling review wants
//! to see is, per location, how the margin to the limit curve moved and which locations changed
//! zone. Every input is a result written by `check`, so the comparison is of judged values only.
//!
//! Locations are followed through the tryouts as [`Track`]s, joined by id or, for a re-gridded
//! part, by nearest position ([`pairing`]). The lists (newly at risk, fixed, losses, gains) and
//! the `change` column compare the last two tryouts.

pub mod csv_out;
pub mod json_out;
pub mod pairing;
pub mod read;
pub mod record;
pub mod runs;
pub mod sweep;
pub mod tally;

pub use read::{read_results, read_tryout, RecordedSummary, ResultRow, Tryout, TryoutStats};
pub use runs::{compare_files, compare_files_digested};
use tally::{change_index, status_index, zone_index, Counts, Density, Tally};

use crate::assess::Zone;
use crate::capped::LIST_CAP;
use crate::error::{Error, Result};
use std::collections::HashMap;

/// How locations of one tryout are paired with those of the next.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Matching {
    /// By location id.
    Id,
    /// By nearest `x, y`, at most `within` apart (in the files' length unit), one to one.
    Xy {
        /// Largest distance of a pair.
        within: f64,
    },
}

/// Where a location was measured, seen from the last two tryouts.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Status {
    /// In both of the last two tryouts.
    Both,
    /// In the second-to-last tryout, not in the last.
    OnlyBefore,
    /// In the last tryout, not in the one before.
    OnlyAfter,
    /// Only in tryouts before the last two (three or more inputs).
    OnlyEarlier,
}

impl Status {
    /// Name as written in compare.csv.
    pub fn name(self) -> &'static str {
        match self {
            Status::Both => "both",
            Status::OnlyBefore => "only_before",
            Status::OnlyAfter => "only_after",
            Status::OnlyEarlier => "only_earlier",
        }
    }
}

/// How a location moved between the last two tryouts.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Change {
    /// More margin (or, with no margin, less major strain) by more than the tolerance.
    Improved,
    /// Less margin (or more major strain) by more than the tolerance.
    Worsened,
    /// Within the tolerance.
    Unchanged,
}

impl Change {
    /// Name as written in compare.csv.
    pub fn name(self) -> &'static str {
        match self {
            Change::Improved => "improved",
            Change::Worsened => "worsened",
            Change::Unchanged => "unchanged",
        }
    }
}

/// Slack for values read back from 3-decimal text: a change equal to the tolerance to within
/// this is "unchanged", not a change.
const EDGE: f64 = 1e-9;

/// Classify a change between two tryouts. The margin change (percentage points, positive =
/// safer now) decides; where a margin is missing, the change of engineering major strain does
/// (more strain = worse). A change must exceed `tolerance` to count.
pub fn classify(margin_change: Option<f64>, major_change: f64, tolerance: f64) -> Change {
    let safer = margin_change.unwrap_or(-major_change);
    if safer > tolerance + EDGE {
        Change::Improved
    } else if safer < -tolerance - EDGE {
        Change::Worsened
    } else {
        Change::Unchanged
    }
}

/// Failed or marginal: the zones that stop a release.
pub fn at_risk(z: Zone) -> bool {
    matches!(z, Zone::Failed | Zone::Marginal)
}

/// One location followed through the tryouts.
#[derive(Debug, Clone, PartialEq)]
pub struct Track {
    /// The location in each tryout, in input order (`None` where it was not measured).
    pub at: Vec<Option<ResultRow>>,
    /// When paired by position: distance from the location in the previous tryout (index k is
    /// between tryouts k − 1 and k).
    pub step: Vec<Option<f64>>,
}

impl Track {
    fn last_two(&self) -> (Option<&ResultRow>, Option<&ResultRow>) {
        let n = self.at.len();
        (self.at[n - 2].as_ref(), self.at[n - 1].as_ref())
    }

    /// The location in the second-to-last tryout.
    pub fn before(&self) -> Option<&ResultRow> {
        self.last_two().0
    }

    /// The location in the last tryout.
    pub fn after(&self) -> Option<&ResultRow> {
        self.last_two().1
    }

    /// Where it was measured, seen from the last two tryouts.
    pub fn status(&self) -> Status {
        match self.last_two() {
            (Some(_), Some(_)) => Status::Both,
            (Some(_), None) => Status::OnlyBefore,
            (None, Some(_)) => Status::OnlyAfter,
            (None, None) => Status::OnlyEarlier,
        }
    }

    /// The id shown for the location: the latest one; when paired by position and the ids
    /// differ, `before → after`.
    pub fn name(&self) -> String {
        let mut ids: Vec<&str> = Vec::new();
        for r in self.at.iter().flatten() {
            if ids.last() != Some(&r.id.as_str()) {
                ids.push(&r.id);
            }
        }
        match ids.as_slice() {
            [] => String::new(),
            [one] => one.to_string(),
            many => many.join(" → "),
        }
    }

    /// Margin change between the last two tryouts, percentage points (positive = safer now).
    pub fn margin_change(&self) -> Option<f64> {
        let (b, a) = self.last_two();
        Some(a?.margin_pct? - b?.margin_pct?)
    }

    /// Change of engineering major strain between the last two tryouts, percentage points.
    pub fn major_change(&self) -> Option<f64> {
        let (b, a) = self.last_two();
        Some(a?.major_pct - b?.major_pct)
    }

    /// How it moved between the last two tryouts; `None` unless measured in both.
    pub fn change(&self, tolerance: f64) -> Option<Change> {
        Some(classify(
            self.margin_change(),
            self.major_change()?,
            tolerance,
        ))
    }

    /// Zones in the last two tryouts, when measured in both.
    pub fn zones(&self) -> Option<(Zone, Zone)> {
        let (b, a) = self.last_two();
        Some((b?.zone, a?.zone))
    }
}

/// Several results, each location followed through them.
#[derive(Debug, Clone, PartialEq)]
pub struct Comparison {
    /// The inputs, in order (at least two).
    pub tryouts: Vec<Tryout>,
    /// Every location of any input, once, while there are at most
    /// [`crate::summary::KEEP_ALL`]; beyond, those the capped lists keep (see [`tally`]). In
    /// order of first appearance.
    pub tracks: Vec<Track>,
    /// Numbers of locations, of all of them.
    pub counts: Counts,
    /// Whether `tracks` holds every location.
    pub complete: bool,
    /// Densities for the pictures, when `tracks` does not hold every location.
    pub density: Option<Density>,
    /// How locations were paired.
    pub matching: Matching,
    /// Smallest change that counts, percentage points.
    pub tolerance: f64,
    /// Differences of basis between the inputs, for people.
    pub warnings: Vec<String>,
}

/// Follow every location through `tryouts` (at least two) by id or by position, and refuse
/// when two neighbouring tryouts share no location.
pub fn compare(mut tryouts: Vec<Tryout>, matching: Matching, tolerance: f64) -> Result<Comparison> {
    read::unique_labels(&mut tryouts);
    if tryouts.len() < 2 {
        return Err(Error::Usage("compare needs at least two results".into()));
    }
    let tracks = match matching {
        Matching::Id => tracks_by_id(&tryouts),
        Matching::Xy { within } => tracks_by_position(&tryouts, within),
    };
    for t in &mut tryouts {
        t.stats = TryoutStats::of(&t.rows);
        t.rows = Vec::new();
    }
    let mut tally = Tally::new(tryouts.len(), tolerance, Some(density_for(&tryouts)));
    for (k, t) in tracks.iter().enumerate() {
        tally.fold(t, k as u64);
    }
    finish(tryouts, tally, matching, tolerance)
}

/// The density grids over the extents of every input's locations.
pub fn density_for(tryouts: &[Tryout]) -> Density {
    let join =
        |a: Option<((f64, f64), (f64, f64))>, b: Option<((f64, f64), (f64, f64))>| match (a, b) {
            (Some(a), Some(b)) => Some((
                (a.0 .0.min(b.0 .0), a.0 .1.max(b.0 .1)),
                (a.1 .0.min(b.1 .0), a.1 .1.max(b.1 .1)),
            )),
            (a, b) => a.or(b),
        };
    let strains = tryouts.iter().map(|t| t.stats.strains).fold(None, join);
    let places = tryouts.iter().map(|t| t.stats.places).fold(None, join);
    Density::new(strains.unwrap_or(((0.0, 1.0), (0.0, 1.0))), places)
}

/// The comparison from a tally of every track: refused when two neighbouring tryouts share
/// no location.
pub fn finish(
    tryouts: Vec<Tryout>,
    tally: Tally,
    matching: Matching,
    tolerance: f64,
) -> Result<Comparison> {
    for k in 1..tryouts.len() {
        if tally.counts.shared[k] == 0 {
            return Err(Error::Usage(no_shared_message(&tryouts, k, matching)));
        }
    }
    let complete = tally.complete();
    let (counts, tracks, density) = tally.finish();
    let warnings = read::basis_warnings(&tryouts, matching);
    Ok(Comparison {
        tryouts,
        tracks,
        counts,
        complete,
        density,
        matching,
        tolerance,
        warnings,
    })
}

fn no_shared_message(tryouts: &[Tryout], k: usize, matching: Matching) -> String {
    let (a, b) = (&tryouts[k - 1], &tryouts[k]);
    let how = match matching {
        Matching::Id => "share no location id (a re-gridded part? pair by position with \
                         --match xy --within LENGTH)"
            .to_string(),
        Matching::Xy { within } => format!(
            "have no two locations within {within} of each other (are x, y in the same unit \
             and frame? a larger --within?)"
        ),
    };
    format!(
        "{} and {} {how}: nothing to compare",
        a.path.display(),
        b.path.display()
    )
}

fn empty_track(n: usize) -> Track {
    Track {
        at: vec![None; n],
        step: vec![None; n],
    }
}

/// Tracks joined by id, in order of first appearance.
fn tracks_by_id(tryouts: &[Tryout]) -> Vec<Track> {
    let n = tryouts.len();
    let mut index: HashMap<&str, usize> = HashMap::new();
    let mut tracks: Vec<Track> = Vec::new();
    for (k, t) in tryouts.iter().enumerate() {
        for r in &t.rows {
            let i = *index.entry(r.id.as_str()).or_insert_with(|| {
                tracks.push(empty_track(n));
                tracks.len() - 1
            });
            tracks[i].at[k] = Some(r.clone());
        }
    }
    tracks
}

/// Tracks joined by nearest position, each tryout paired with the one before it.
fn tracks_by_position(tryouts: &[Tryout], within: f64) -> Vec<Track> {
    let n = tryouts.len();
    let mut tracks: Vec<Track> = Vec::new();
    // Track index of each row of the previous tryout.
    let mut prev: Vec<usize> = Vec::new();
    for (k, t) in tryouts.iter().enumerate() {
        let mut current = vec![usize::MAX; t.rows.len()];
        if k > 0 {
            let before: Vec<Option<(f64, f64)>> =
                tryouts[k - 1].rows.iter().map(ResultRow::xy).collect();
            let after: Vec<Option<(f64, f64)>> = t.rows.iter().map(ResultRow::xy).collect();
            for p in pairing::pair(&before, &after, within) {
                let i = prev[p.before];
                tracks[i].at[k] = Some(t.rows[p.after].clone());
                tracks[i].step[k] = Some(p.distance);
                current[p.after] = i;
            }
        }
        for (j, r) in t.rows.iter().enumerate() {
            if current[j] == usize::MAX {
                let mut tr = empty_track(n);
                tr.at[k] = Some(r.clone());
                tracks.push(tr);
                current[j] = tracks.len() - 1;
            }
        }
        prev = current;
    }
    tracks
}

impl Comparison {
    /// Label of the second-to-last and last tryouts.
    pub fn labels(&self) -> (&str, &str) {
        let n = self.tryouts.len();
        (&self.tryouts[n - 2].label, &self.tryouts[n - 1].label)
    }

    /// Locations measured in both of the last two tryouts.
    pub fn both(&self) -> impl Iterator<Item = &Track> {
        self.tracks.iter().filter(|t| t.status() == Status::Both)
    }

    /// Locations with the given status (the first [`LIST_CAP`] when not complete).
    pub fn with_status(&self, s: Status) -> Vec<&Track> {
        self.capped(self.tracks.iter().filter(|t| t.status() == s).collect())
    }

    /// The first [`LIST_CAP`] of a list when the comparison does not hold every location (each
    /// list's first [`LIST_CAP`] are among the tracks kept; more may be, for other lists).
    fn capped<'a>(&self, mut v: Vec<&'a Track>) -> Vec<&'a Track> {
        if !self.complete {
            v.truncate(LIST_CAP);
        }
        v
    }

    /// How many locations have the given status (of all, not only those kept).
    pub fn status_count(&self, s: Status) -> usize {
        self.counts.status[status_index(s)]
    }

    /// How many locations went from zone `from` to zone `to` (last two tryouts).
    pub fn transitions(&self, from: Zone, to: Zone) -> usize {
        self.counts.transitions[zone_index(from)][zone_index(to)]
    }

    /// How many locations changed each way.
    pub fn change_count(&self, c: Change) -> usize {
        self.counts.change[change_index(c)]
    }

    /// Locations failed now that were not failed before.
    pub fn newly_failed(&self) -> Vec<&Track> {
        self.capped(
            self.both()
                .filter(|t| matches!(t.zones(), Some((b, Zone::Failed)) if b != Zone::Failed))
                .collect(),
        )
    }

    /// Locations failed or marginal now and in a better zone before, worst first.
    pub fn newly_at_risk(&self) -> Vec<&Track> {
        let mut v: Vec<&Track> = self
            .both()
            .filter(|t| matches!(t.zones(), Some((b, a)) if at_risk(a) && a < b))
            .collect();
        v.sort_by_key(|t| t.after().map(|r| r.zone));
        self.capped(v)
    }

    /// Locations failed or marginal before and neither now.
    pub fn fixed(&self) -> Vec<&Track> {
        self.capped(
            self.both()
                .filter(|t| matches!(t.zones(), Some((b, a)) if at_risk(b) && !at_risk(a)))
                .collect(),
        )
    }

    /// Locations measured only in the last tryout and failed (or, with `marginal`, failed or
    /// marginal) there: nothing shows they were better before.
    pub fn at_risk_only_after(&self, marginal: bool) -> Vec<&Track> {
        self.capped(
            self.tracks
                .iter()
                .filter(|t| t.status() == Status::OnlyAfter)
                .filter(|t| {
                    t.after()
                        .is_some_and(|r| r.zone == Zone::Failed || (marginal && at_risk(r.zone)))
                })
                .collect(),
        )
    }

    /// How many locations are measured only in the last tryout and failed (or, with
    /// `marginal`, failed or marginal) there.
    pub fn at_risk_only_after_count(&self, marginal: bool) -> usize {
        if marginal {
            self.counts.at_risk_only_after
        } else {
            self.counts.failed_only_after
        }
    }

    fn by_margin_change(&self, sign: f64) -> Vec<&Track> {
        let mut v: Vec<&Track> = self
            .both()
            .filter(|t| {
                t.margin_change().is_some_and(|d| d * sign > 0.0)
                    && t.change(self.tolerance) != Some(Change::Unchanged)
            })
            .collect();
        let key = |t: &&Track| t.margin_change().unwrap_or(0.0) * sign;
        v.sort_by(|a, b| key(b).total_cmp(&key(a)));
        self.capped(v)
    }

    /// Locations whose margin fell by more than the tolerance, largest loss first.
    pub fn losses(&self) -> Vec<&Track> {
        self.by_margin_change(-1.0)
    }

    /// Locations whose margin grew by more than the tolerance, largest gain first.
    pub fn gains(&self) -> Vec<&Track> {
        self.by_margin_change(1.0)
    }

    /// Zone counts of tryout `k`.
    pub fn zone_counts(&self, k: usize) -> Vec<(Zone, usize)> {
        Zone::ALL
            .iter()
            .zip(self.tryouts[k].stats.zones)
            .map(|(z, n)| (*z, n))
            .collect()
    }

    /// The verdict of tryout `k`: from its summary.json, else from its zones.
    pub fn verdict(&self, k: usize) -> String {
        if let Some(v) = self.tryouts[k]
            .summary
            .as_ref()
            .and_then(|s| s.verdict.clone())
        {
            return v;
        }
        let n = |z: Zone| self.tryouts[k].stats.zones[zone_index(z)] > 0;
        let v = if n(Zone::Failed) {
            "fail"
        } else if n(Zone::Marginal) {
            "marginal"
        } else if n(Zone::Uncovered) {
            "incomplete"
        } else {
            "pass"
        };
        v.into()
    }
}

/// `n` followed by `word`, with an `s` unless `n` is 1: "1 location", "2 locations".
pub fn count(n: usize, word: &str) -> String {
    if n == 1 {
        format!("1 {word}")
    } else {
        format!("{n} {word}s")
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::path::PathBuf;

    pub(crate) fn row(id: &str, margin: Option<f64>, zone: Zone) -> ResultRow {
        ResultRow {
            id: id.into(),
            major_pct: 20.0,
            minor_pct: 0.0,
            margin_pct: margin,
            limit_pct: None,
            zone,
            x: None,
            y: None,
        }
    }

    pub(crate) fn tryout(label: &str, rows: Vec<ResultRow>) -> Tryout {
        Tryout {
            path: PathBuf::from(format!("{label}.csv")),
            label: label.into(),
            rows,
            summary: None,
            stats: TryoutStats::default(),
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
            row("D", Some(-1.0), Zone::Failed),
        ];
        let c = compare(
            vec![tryout("T1", before), tryout("T2", after)],
            Matching::Id,
            1.0,
        )
        .unwrap();
        assert_eq!(c.tracks.len(), 4);
        let ids = |v: Vec<&Track>| v.iter().map(|t| t.name()).collect::<Vec<_>>();
        assert_eq!(ids(c.with_status(Status::OnlyBefore)), ["C"]);
        assert_eq!(ids(c.with_status(Status::OnlyAfter)), ["D"]);
        assert_eq!(c.transitions(Zone::Failed, Zone::Marginal), 1);
        assert_eq!(ids(c.newly_at_risk()), ["B"]);
        assert!(c.newly_failed().is_empty());
        assert_eq!(ids(c.at_risk_only_after(false)), ["D"]);
        // A: −2 → 5 is a gain of 7; B: 15 → 8 a loss of 7.
        assert_eq!(ids(c.losses()), ["B"]);
        assert_eq!(ids(c.gains()), ["A"]);
        assert!((c.losses()[0].margin_change().unwrap() + 7.0).abs() < 1e-12);
        assert_eq!(c.change_count(Change::Improved), 1);
    }

    #[test]
    fn no_shared_id_is_refused() {
        let c = compare(
            vec![
                tryout("T1", vec![row("A", Some(1.0), Zone::Marginal)]),
                tryout("T2", vec![row("B", Some(1.0), Zone::Marginal)]),
            ],
            Matching::Id,
            1.0,
        );
        let e = c.unwrap_err().to_string();
        assert!(e.contains("share no location id"), "{e}");
    }

    #[test]
    fn three_tryouts_follow_each_location() {
        let c = compare(
            vec![
                tryout("T1", vec![row("A", Some(-3.0), Zone::Failed)]),
                tryout("T2", vec![row("A", Some(2.0), Zone::Marginal)]),
                tryout(
                    "T3",
                    vec![
                        row("A", Some(12.0), Zone::Safe),
                        row("B", Some(11.0), Zone::Safe),
                    ],
                ),
            ],
            Matching::Id,
            1.0,
        )
        .unwrap();
        let a = &c.tracks[0];
        assert!(a.at.iter().all(Option::is_some));
        // The lists compare the last two: T2 marginal -> T3 safe is fixed.
        assert_eq!(c.fixed().len(), 1);
        assert_eq!(c.tracks[1].status(), Status::OnlyAfter);
    }

    #[test]
    fn classification_at_the_tolerance_edges() {
        // A change must exceed the tolerance to count (the documented rule); values read back
        // from 3-decimal text differ from the edge by rounding only.
        let t = 1.0;
        assert_eq!(classify(Some(1.0), 0.0, t), Change::Unchanged);
        assert_eq!(classify(Some(11.123 - 10.123), 0.0, t), Change::Unchanged);
        assert_eq!(classify(Some(1.001), 0.0, t), Change::Improved);
        assert_eq!(classify(Some(-1.0), 0.0, t), Change::Unchanged);
        assert_eq!(classify(Some(-1.001), 0.0, t), Change::Worsened);
        // No margin: more major strain is worse.
        assert_eq!(classify(None, 1.5, t), Change::Worsened);
        assert_eq!(classify(None, -1.5, t), Change::Improved);
        assert_eq!(classify(None, 1.0, t), Change::Unchanged);
        // The margin decides even when the strain moved the other way.
        assert_eq!(classify(Some(2.0), 3.0, t), Change::Improved);
    }

    #[test]
    fn plural_only_for_more_or_none() {
        assert_eq!(count(1, "location"), "1 location");
        assert_eq!(count(0, "location"), "0 locations");
        assert_eq!(count(2, "location"), "2 locations");
    }
}
