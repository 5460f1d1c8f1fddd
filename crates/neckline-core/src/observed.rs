//! What the part itself showed at a location, and what that says about the curve.
//!
//! On a part that necked or split, the circles across and beside the neck are marked by what the
//! eye and the finger find (common practice; ISO 12004-1 describes press-shop forming-limit
//! diagrams from such parts, from memory):
//! - `safe`: no neck;
//! - `necked`: a visible or felt neck through the circle;
//! - `split`: a crack through it.
//!
//! Held against the judgement of a curve, a circle marked necked or split that the curve calls
//! safe, marginal, thickening or low-stretch shows the curve is **not conservative** for this
//! part; a circle marked safe that the curve calls failed shows it is **conservative** there.
//! [`ObservedTally`] folds locations in one at a time (and merges with another tally), so it
//! fits a streaming data path as well as a whole file.

use crate::assess::Zone;
use crate::capped::LIST_CAP;
pub use crate::condition::Condition;

/// Whether a judged zone, held against an observed necked or split circle, shows the curve not
/// conservative: the curve passed (safe, marginal, thickening, low-stretch) what the part failed.
/// `uncovered` is no judgement, so it is neither.
pub fn passes(zone: Zone) -> bool {
    matches!(
        zone,
        Zone::Safe | Zone::Marginal | Zone::Thickening | Zone::LowStretch
    )
}

/// Observed conditions against judged zones, folded in location by location.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct ObservedTally {
    /// `table[c][z]`: locations observed in condition `Condition::ALL[c]` and judged in zone
    /// `Zone::ALL[z]`.
    pub table: [[usize; 6]; 3],
    /// Ids observed necked or split but judged safe, marginal, thickening or low-stretch: where
    /// the curve is not conservative for this part. In the order they were added; the first
    /// [`LIST_CAP`] of them.
    pub non_conservative: Vec<String>,
    /// How many locations are not conservative in all.
    pub non_conservative_total: usize,
    /// Locations observed safe but judged failed: where the curve is conservative.
    pub conservative: usize,
    /// Locations with no observed condition.
    pub not_observed: usize,
}

impl ObservedTally {
    /// Fold in one judged location.
    pub fn add(&mut self, id: &str, zone: Zone, condition: Option<Condition>) {
        let Some(c) = condition else {
            self.not_observed += 1;
            return;
        };
        let z = Zone::ALL.iter().position(|&x| x == zone).unwrap_or(0);
        self.table[c.index()][z] += 1;
        if c.failed() && passes(zone) {
            self.non_conservative_total += 1;
            if self.non_conservative.len() < LIST_CAP {
                self.non_conservative.push(id.to_string());
            }
        } else if c == Condition::Safe && zone == Zone::Failed {
            self.conservative += 1;
        }
    }

    /// Merge a tally of other locations (a later chunk of the same file, another file) into this.
    pub fn merge(&mut self, other: ObservedTally) {
        for (row, o) in self.table.iter_mut().zip(other.table) {
            for (x, y) in row.iter_mut().zip(o) {
                *x += y;
            }
        }
        self.non_conservative_total += other.non_conservative_total;
        let room = LIST_CAP.saturating_sub(self.non_conservative.len());
        self.non_conservative
            .extend(other.non_conservative.into_iter().take(room));
        self.conservative += other.conservative;
        self.not_observed += other.not_observed;
    }

    /// Locations with an observed condition.
    pub fn observed(&self) -> usize {
        self.table.iter().flatten().sum()
    }

    /// How many locations were observed in `condition` and judged in `zone`.
    pub fn count(&self, condition: Condition, zone: Zone) -> usize {
        let z = Zone::ALL.iter().position(|&x| x == zone).unwrap_or(0);
        self.table[condition.index()][z]
    }

    /// Whether the curve passed a location the part failed.
    pub fn is_non_conservative(&self) -> bool {
        !self.non_conservative.is_empty()
    }
}

/// The observed-against-judged table of a set of locations: `(id, judged zone, observed
/// condition)`, in file order.
pub fn observed_against_judged<'a>(
    locations: impl IntoIterator<Item = (&'a str, Zone, Option<Condition>)>,
) -> ObservedTally {
    let mut t = ObservedTally::default();
    for (id, zone, c) in locations {
        t.add(id, zone, c);
    }
    t
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::assess::{judge, Settings};
    use crate::kinematics::StrainState;
    use crate::limit::LimitCurve;
    use std::path::Path;

    /// A flat curve at `level` percent engineering major strain from -20 % to +20 % minor.
    fn flat_curve(level: f64) -> LimitCurve {
        let text = format!(
            "name = \"flat\"\nsource = \"test\"\nstrain = \"engineering\"\npoints = [[-20, {level}], [20, {level}]]\n"
        );
        LimitCurve::parse(&text, Path::new("flat.toml")).unwrap()
    }

    /// Invented circles (d0 = 2.5 mm) near plane strain with the condition a part showed.
    fn circles() -> Vec<(&'static str, StrainState, Condition)> {
        let c = |d1: f64| StrainState::from_circle(2.5, d1, 2.5).unwrap();
        vec![
            ("N1", c(3.40), Condition::Necked), // 36 % engineering major strain
            ("S1", c(3.45), Condition::Split),  // 38 %
            ("K1", c(3.00), Condition::Safe),   // 20 %
            ("K2", c(3.30), Condition::Safe),   // 32 %
        ]
    }

    fn tally_against(curve: &LimitCurve) -> ObservedTally {
        let s = Settings::default();
        let judged: Vec<_> = circles()
            .into_iter()
            .map(|(id, st, c)| (id, judge(&st, curve, &s).zone, Some(c)))
            .collect();
        observed_against_judged(judged)
    }

    // Against a curve too high for this part (60 %: every circle is safe or marginal by the
    // zone rules of assess.rs), the necked and the split circle are listed as non-conservative.
    // Against a low curve (25 %), both are judged failed: none listed, and the 32 % safe circle
    // judged failed is counted conservative. The zone rules are the project's (common practice,
    // 10-point band); the strains are e = d1/d0 - 1 (any continuum mechanics text).
    #[test]
    fn necked_circles_judged_safe_against_a_high_curve_are_listed_and_none_against_a_low_one() {
        let high = tally_against(&flat_curve(60.0));
        assert_eq!(high.non_conservative, vec!["N1", "S1"]);
        assert_eq!(high.conservative, 0);
        assert_eq!(high.count(Condition::Necked, Zone::Safe), 1);
        assert_eq!(high.count(Condition::Split, Zone::Safe), 1);
        assert_eq!(high.observed(), 4);

        let low = tally_against(&flat_curve(25.0));
        assert!(low.non_conservative.is_empty(), "{low:?}");
        assert!(!low.is_non_conservative());
        assert_eq!(low.count(Condition::Necked, Zone::Failed), 1);
        assert_eq!(low.count(Condition::Split, Zone::Failed), 1);
        assert_eq!(low.count(Condition::Safe, Zone::Failed), 1);
        assert_eq!(low.conservative, 1);
    }

    // Every passing zone makes an observed neck non-conservative; failed and uncovered do not.
    #[test]
    fn which_zones_count_as_passing_a_neck() {
        let t = observed_against_judged(
            Zone::ALL
                .iter()
                .map(|&z| (z.name(), z, Some(Condition::Necked))),
        );
        assert_eq!(
            t.non_conservative,
            vec!["marginal", "thickening", "low-stretch", "safe"]
        );
        let t = observed_against_judged([("a", Zone::Safe, None), ("b", Zone::Failed, None)]);
        assert_eq!((t.not_observed, t.observed()), (2, 0));
    }

    // Folding in two halves and merging gives the tally of one pass over everything.
    #[test]
    fn merge_equals_one_pass() {
        let rows: Vec<(&str, Zone, Option<Condition>)> = vec![
            ("a", Zone::Safe, Some(Condition::Split)),
            ("b", Zone::Failed, Some(Condition::Safe)),
            ("c", Zone::Marginal, None),
            ("d", Zone::Marginal, Some(Condition::Necked)),
            ("e", Zone::Failed, Some(Condition::Necked)),
        ];
        let whole = observed_against_judged(rows.clone());
        let mut first = observed_against_judged(rows[..2].to_vec());
        first.merge(observed_against_judged(rows[2..].to_vec()));
        assert_eq!(first, whole);
        assert_eq!(whole.non_conservative, vec!["a", "d"]);
    }
}
