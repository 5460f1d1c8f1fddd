//! What the outputs need of a whole file, in bounded memory: the [`Summary`] that judged
//! locations are folded into one at a time, and that merges with the summary of the next part
//! of the file. Counts, the worst locations, capped lists, and binned densities for the pictures;
//! every location itself only while the file is small ([`KEEP_ALL`]).
//!
//! Folding every location of a file in order, and folding its parts separately then merging
//! them in order, give the same summary (a test checks it): this is what lets parts of a file be
//! judged on several threads.

use crate::assess::Zone;
use crate::measure::RejectedRow;
use crate::point::PointResult;
use crate::strain::StrainMeasure;
use std::sync::Arc;

mod bins;
mod spread;
pub use bins::{map_margin, Bins, Cell, MapCell, ZoneCounts};
pub use spread::{Rank, Worst, SPREAD_CELLS, SPREAD_CELL_PCT, SPREAD_PER_CELL};

/// Up to this many locations, every one is kept and drawn as a marker.
pub const KEEP_ALL: usize = 5_000;
/// Beyond [`KEEP_ALL`], failed and marginal locations kept as markers (the rest are drawn as
/// a density).
pub const AT_RISK_KEPT: usize = 2_000;
/// The worst locations kept, worst first.
pub const WORST_KEPT: usize = 100;
pub use crate::capped::{Capped, LIST_CAP};

/// The plane of the part map.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum MapPlane {
    /// x across, y up (a part whose main face lies in x-y).
    #[default]
    Xy,
    /// x across, z up.
    Xz,
    /// y across, z up.
    Yz,
}

impl MapPlane {
    /// The two coordinates of `p` in this plane, when it has them.
    pub fn coords(self, p: &PointResult) -> Option<(f64, f64)> {
        let m = &p.input;
        let z = m.z.or_else(|| p.grid.as_ref().and_then(|g| g.z));
        match self {
            MapPlane::Xy => Some((m.x?, m.y?)),
            MapPlane::Xz => Some((m.x?, z?)),
            MapPlane::Yz => Some((m.y?, z?)),
        }
    }

    /// The axis names.
    pub fn axes(self) -> (&'static str, &'static str) {
        match self {
            MapPlane::Xy => ("x", "y"),
            MapPlane::Xz => ("x", "z"),
            MapPlane::Yz => ("y", "z"),
        }
    }
}

/// How the pictures will show the locations: decided before the pass, so that densities are
/// binned in the right coordinates.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct View {
    /// Strain measure of the diagram's axes.
    pub measure: StrainMeasure,
    /// Plane of the part map.
    pub plane: MapPlane,
}

/// The measured-against-computed thickness check over a file.
#[derive(Debug, Clone, PartialEq)]
pub struct ThicknessCheck {
    /// Locations with a measured value (and a computed one).
    pub measured: usize,
    /// The location whose measured value differs most from the computed one.
    pub id: String,
    /// That difference: percent of the computed thickness, or percentage points of thinning.
    pub largest_diff: f64,
}

impl ThicknessCheck {
    fn fold(this: &mut Option<Self>, id: &str, diff: Option<f64>) {
        let Some(d) = diff else { return };
        match this {
            None => {
                *this = Some(ThicknessCheck {
                    measured: 1,
                    id: id.to_string(),
                    largest_diff: d,
                })
            }
            Some(t) => {
                t.measured += 1;
                if d.abs() > t.largest_diff.abs() {
                    t.id = id.to_string();
                    t.largest_diff = d;
                }
            }
        }
    }

    fn merge(this: &mut Option<Self>, other: Option<Self>) {
        match (this.as_mut(), other) {
            (_, None) => {}
            (None, o) => *this = o,
            (Some(t), Some(o)) => {
                t.measured += o.measured;
                if o.largest_diff.abs() > t.largest_diff.abs() {
                    t.id = o.id;
                    t.largest_diff = o.largest_diff;
                }
            }
        }
    }
}

/// The rank of a location in the worst list: failed before marginal before the rest (a
/// location failed by thinning can keep a positive margin); within a zone, each by the measure
/// that put it there: locations whose multi-stage path decided their zone first, highest path
/// use first, then the rest by margin to the strain curve, smallest first.
fn worst_key(p: &PointResult) -> (u8, f64) {
    let rank = match p.zone() {
        Zone::Failed => 0,
        Zone::Marginal => 2,
        _ => 4,
    };
    let by_path = p.judgement.reason == crate::assess::Reason::Path;
    match p.path.as_ref().and_then(|j| j.use_pct) {
        Some(u) if by_path => (rank, -u),
        _ => (rank + 1, p.judgement.margin_pct.unwrap_or(f64::INFINITY)),
    }
}

fn at_risk(p: &PointResult) -> bool {
    matches!(p.zone(), Zone::Failed | Zone::Marginal)
}

/// Min and max of a running extent `[x0, y0, x1, y1]`.
fn widen(e: &mut Option<[f64; 4]>, x: f64, y: f64) {
    if !(x.is_finite() && y.is_finite()) {
        return;
    }
    let v = e.get_or_insert([x, y, x, y]);
    *v = [v[0].min(x), v[1].min(y), v[2].max(x), v[3].max(y)];
}

fn widen_by(e: &mut Option<[f64; 4]>, o: Option<[f64; 4]>) {
    if let Some(o) = o {
        widen(e, o[0], o[1]);
        widen(e, o[2], o[3]);
    }
}

/// The cell sizes and keeping mode of a summary, for the summaries of the parts that follow it
/// (any template gives the right merged summary; a recent one saves work).
#[derive(Debug, Clone, PartialEq)]
pub struct Template {
    view: View,
    supported: Option<(f64, f64)>,
    density_level: u32,
    map_level: u32,
    spread_level: u32,
    complete: bool,
    room: Room,
    spread_bars: Option<Arc<spread::Bars>>,
}

/// How much of what a merge keeps is still open in the summary a part will be merged into: a
/// part keeps no more than that, so that it copies no location the merge would drop.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Room {
    /// At-risk locations still to be kept (past [`KEEP_ALL`]).
    kept: usize,
    /// Observed necked or split locations still to be kept.
    observed: usize,
    /// The worst list's last key once the list is full: a later location must rank before it.
    worst_bar: Option<(u8, f64)>,
}

impl Default for Room {
    fn default() -> Self {
        Room {
            kept: AT_RISK_KEPT,
            observed: AT_RISK_KEPT,
            worst_bar: None,
        }
    }
}

impl Template {
    /// An empty summary to fold the next part of the file into.
    pub fn part(&self) -> Summary {
        let mut s = Summary::new(self.view);
        s.supported = self.supported;
        s.density.level = self.density_level;
        s.map.level = self.map_level;
        s.spread.level = self.spread_level;
        s.room = self.room;
        s.spread_bars = self.spread_bars.clone();
        // Past the size where every location is kept, the parts keep only what a merge keeps.
        s.complete = self.complete;
        s
    }
}

/// Everything the outputs need of a file's judged locations, in bounded memory.
#[derive(Debug, Clone)]
pub struct Summary {
    /// The coordinates densities are binned in.
    pub view: View,
    /// Locations judged.
    pub total: usize,
    /// Locations per zone, in [`Zone::ALL`] order.
    pub counts: [usize; 6],
    /// Every location while [`Summary::complete`], else the first [`AT_RISK_KEPT`] failed or
    /// marginal ones; in file order.
    pub kept: Vec<PointResult>,
    /// Whether `kept` holds every location.
    pub complete: bool,
    /// The worst locations, worst first (at most [`WORST_KEPT`]).
    pub worst: Vec<PointResult>,
    /// Ids per zone, in [`Zone::ALL`] order.
    pub zone_ids: [Capped<String>; 6],
    /// Rejected rows.
    pub rejected: Capped<RejectedRow>,
    /// Lines of the rows not measured (empty readings, or flagged not valid): neither judged
    /// nor rejected.
    pub not_measured: Capped<u64>,
    /// Ids of locations whose zone could change within the reading error.
    pub borderline: Capped<String>,
    /// Measured against computed thickness (percent of the computed one).
    pub thickness: Option<ThicknessCheck>,
    /// Measured against computed thinning (percentage points).
    pub thinning: Option<ThicknessCheck>,
    /// Smallest and largest d0 used (axes only).
    pub d0_range: Option<(f64, f64)>,
    /// Diagram extent of the locations, axis coordinates `[x0, y0, x1, y1]`.
    pub extent: Option<[f64; 4]>,
    /// Smallest and largest margin, pp.
    pub margins: Option<(f64, f64)>,
    /// Locations per zone binned on the diagram (axis coordinates, percent).
    pub density: Bins<ZoneCounts>,
    /// Locations binned on the part map's plane.
    pub map: Bins<MapCell>,
    /// Map extent of the placed locations.
    pub map_extent: Option<[f64; 4]>,
    /// Locations with coordinates in the map's plane.
    pub placed: usize,
    /// Rows whose engineering and true strains disagree beyond rounding, first id.
    pub disagree: Capped<String>,
    /// Whether any location came from grid nodes, and any from a 3-D grid.
    pub grid: (bool, bool),
    /// Locations judged along a multi-stage path.
    pub paths: usize,
    /// Locations the strain curve calls safe or marginal and the path criterion at risk or failed.
    pub hidden: Capped<String>,
    /// Locations whose major axis turned between stages beyond the assumption's limit.
    pub turned: Capped<String>,
    /// Observed conditions (marked on the part) against the judged zones.
    pub observed: crate::observed::ObservedTally,
    /// Locations observed necked or split, kept for drawing (the first [`AT_RISK_KEPT`]).
    pub observed_failed: Vec<PointResult>,
    /// The curve's supported true minor strain range, when it states one (a press-shop curve).
    pub supported: Option<(f64, f64)>,
    /// Failed and marginal locations spread over the diagram: per cell of a coarse grid over
    /// (minor, major) strain in the view's measure, the worst few (see [`Summary::markers`]).
    pub spread: Bins<Worst>,
    /// Locations judged on the curve outside its supported range.
    pub unsupported: Capped<String>,
    /// What this summary may still keep (less than the defaults in a part of a file).
    room: Room,
    /// The spread sample's bars of the summary this part will be merged into.
    spread_bars: Option<Arc<spread::Bars>>,
}

impl Summary {
    /// An empty summary binned for `view`.
    pub fn new(view: View) -> Self {
        Summary {
            view,
            total: 0,
            counts: [0; 6],
            kept: Vec::new(),
            complete: true,
            worst: Vec::new(),
            zone_ids: Default::default(),
            rejected: Capped::default(),
            not_measured: Capped::default(),
            borderline: Capped::default(),
            thickness: None,
            thinning: None,
            d0_range: None,
            extent: None,
            margins: None,
            density: Bins::new(0.25, 40_000),
            map: Bins::new(0.01, 40_000),
            map_extent: None,
            placed: 0,
            disagree: Capped::default(),
            grid: (false, false),
            paths: 0,
            hidden: Capped::default(),
            turned: Capped::default(),
            observed: Default::default(),
            observed_failed: Vec::new(),
            supported: None,
            spread: spread::new_spread(),
            unsupported: Capped::default(),
            room: Room::default(),
            spread_bars: None,
        }
    }

    /// An empty summary for the locations that follow `self`'s, binned at its cell sizes.
    pub fn next_part(&self) -> Self {
        self.template().part()
    }

    /// What a summary of the locations that follow needs to know of this one.
    pub fn template(&self) -> Template {
        Template {
            view: self.view,
            supported: self.supported,
            density_level: self.density.level,
            map_level: self.map.level,
            spread_level: self.spread.level,
            complete: self.complete,
            room: Room {
                kept: if self.complete {
                    AT_RISK_KEPT
                } else {
                    AT_RISK_KEPT.saturating_sub(self.kept.len())
                },
                observed: AT_RISK_KEPT.saturating_sub(self.observed_failed.len()),
                worst_bar: (self.worst.len() == WORST_KEPT)
                    .then(|| worst_key(&self.worst[WORST_KEPT - 1])),
            },
            spread_bars: spread::Bars::of(&self.spread),
        }
    }

    /// Fold one judged location in (locations come in file order). See [`Summary::merge`] for
    /// an example of both.
    pub fn fold(&mut self, p: PointResult) {
        self.fold_ref(&p);
    }

    /// [`Summary::fold`] by reference: the location is copied only where it is kept.
    pub fn fold_ref(&mut self, p: &PointResult) {
        self.count_in(p);
        if p.input.condition.is_some_and(|c| c.failed())
            && self.observed_failed.len() < self.room.observed
        {
            self.observed_failed.push(p.clone());
        }
        self.keep(p);
    }

    fn count_in(&mut self, p: &PointResult) {
        let z = p.zone() as usize;
        self.total += 1;
        self.counts[z] += 1;
        self.zone_ids[z].push_with(|| p.input.id.clone());
        if p.judgement.borderline {
            self.borderline.push_with(|| p.input.id.clone());
        }
        ThicknessCheck::fold(&mut self.thickness, &p.input.id, p.thickness_diff_pct());
        ThicknessCheck::fold(&mut self.thinning, &p.input.id, p.thinning_diff_pp());
        if let Some(d0) = p.d0 {
            let r = self.d0_range.get_or_insert((d0, d0));
            *r = (r.0.min(d0), r.1.max(d0));
        }
        if let Some(m) = p.judgement.margin_pct {
            let r = self.margins.get_or_insert((m, m));
            *r = (r.0.min(m), r.1.max(m));
        }
        let (x, y) = point_xy(p, self.view.measure);
        widen(&mut self.extent, x, y);
        self.density.add(x, y, |c| c.0[z] += 1);
        if let Some((u, v)) = self.view.plane.coords(p) {
            self.placed += 1;
            widen(&mut self.map_extent, u, v);
            let cell = MapCell::of(p);
            self.map.add(u, v, |c| c.absorb(cell));
        }
        if let Some(g) = &p.grid {
            self.grid.0 = true;
            self.grid.1 |= g.normal.is_some();
        }
        self.observed.add(&p.input.id, p.zone(), p.input.condition);
        if let Some(j) = &p.path {
            self.paths += 1;
            if j.hidden() {
                self.hidden.push_with(|| p.input.id.clone());
            }
            if j.turned {
                self.turned.push_with(|| p.input.id.clone());
            }
        }
        if let (Some((lo, hi)), Some(_)) = (self.supported, p.judgement.limit_major) {
            let minor = p.strain.true_strain.minor.value();
            if minor < lo || minor > hi {
                self.unsupported.push_with(|| p.input.id.clone());
            }
        }
        if p.judgement.margin_pct.is_some() || p.zone() == Zone::Failed {
            self.offer_worst(p);
        }
        if at_risk(p) {
            let k = worst_key(p);
            let bars = self.spread_bars.as_ref();
            if !bars.is_some_and(|b| b.shut_out(&self.spread, x, y, k)) {
                self.spread
                    .add_in_table(x, y, |c| c.offer((k.0, k.1, p.input.line, &p.input.id), p));
            }
        }
    }

    fn offer_worst(&mut self, p: &PointResult) {
        let k = worst_key(p);
        let ranks_before =
            |bar: (u8, f64)| k.0 < bar.0 || (k.0 == bar.0 && k.1.total_cmp(&bar.1).is_lt());
        if self.room.worst_bar.is_some_and(|bar| !ranks_before(bar)) {
            return;
        }
        if self.worst.len() == WORST_KEPT {
            let last = worst_key(&self.worst[WORST_KEPT - 1]);
            if k.0 > last.0 || (k.0 == last.0 && k.1.total_cmp(&last.1).is_ge()) {
                return;
            }
        }
        let before = |q: &PointResult| {
            let kq = worst_key(q);
            kq.0 < k.0 || (kq.0 == k.0 && kq.1.total_cmp(&k.1).is_le())
        };
        let at = self.worst.partition_point(before);
        if at < WORST_KEPT {
            self.worst.insert(at, p.clone());
            self.worst.truncate(WORST_KEPT);
        }
    }

    fn keep(&mut self, p: &PointResult) {
        if self.complete && self.kept.len() < KEEP_ALL {
            self.kept.push(p.clone());
            return;
        }
        if self.complete {
            self.complete = false;
            self.kept.retain(at_risk);
            self.kept.truncate(AT_RISK_KEPT);
        }
        if at_risk(p) && self.kept.len() < self.room.kept {
            self.kept.push(p.clone());
        }
    }

    /// Merge the summary of the locations that follow this one's in the file.
    ///
    /// Folding a file's locations in one pass, or folding its parts apart and merging them in
    /// order, gives the same summary. Three invented circles (d0 = 2.5 mm, plane strain) against
    /// the 0.80 mm Keeler-Brazier curve, FLC0 = (23.3 + 14.13 × 0.8) × 0.20 / 0.21 = 32.96 %
    /// (Keeler & Brazier 1977), with the 10-point band (common practice): 36 % is failed, 30 %
    /// marginal, 10 % safe.
    ///
    /// ```
    /// use neckline_core::assess::{Settings, Zone};
    /// use neckline_core::limit::LimitCurve;
    /// use neckline_core::measure::Measurement;
    /// use neckline_core::point::{state_of, Context};
    /// use neckline_core::summary::{Summary, View};
    /// use neckline_core::units::Lengths;
    /// use std::path::Path;
    ///
    /// let curve = LimitCurve::parse(
    ///     "name = \"kb\"\nsource = \"Keeler & Brazier 1977\"\nstrain = \"engineering\"\n\
    ///      [keeler_brazier]\nn = 0.20\nthickness_mm = 0.8\n",
    ///     Path::new("kb.toml"),
    /// )?;
    /// let lengths = Lengths { unit: Default::default(), d0: Some(2.5), t0: None };
    /// let ctx = Context { curve, settings: Settings::default(), lengths, strain_input: false, true_input: false };
    /// let judged: Vec<_> = [("A", 3.40), ("B", 3.25), ("C", 2.75)]
    ///     .into_iter()
    ///     .enumerate()
    ///     .map(|(i, (id, d1))| {
    ///         let m = Measurement::axes(id, i as u64 + 2, d1, 2.5, None);
    ///         ctx.judge(state_of(m, Path::new("part.csv"), &lengths).unwrap())
    ///     })
    ///     .collect();
    ///
    /// let mut whole = Summary::new(View::default());
    /// for p in judged.clone() {
    ///     whole.fold(p);
    /// }
    /// let mut first = Summary::new(View::default());
    /// first.fold(judged[0].clone());
    /// let mut rest = first.next_part();
    /// for p in judged[1..].iter().cloned() {
    ///     rest.fold(p);
    /// }
    /// first.merge(rest);
    ///
    /// for s in [&whole, &first] {
    ///     assert_eq!(s.total, 3);
    ///     assert_eq!(s.zone_ids[Zone::Failed as usize].items, ["A"]);
    ///     assert_eq!(s.zone_ids[Zone::Marginal as usize].items, ["B"]);
    ///     assert_eq!(s.count(Zone::Safe), 1);
    ///     assert_eq!(s.worst[0].input.id, "A"); // failed first
    /// }
    /// # Ok::<(), neckline_core::Error>(())
    /// ```
    pub fn merge(&mut self, o: Summary) {
        let total = self.total + o.total;
        if self.complete && o.complete && total <= KEEP_ALL {
            self.kept.extend(o.kept);
        } else {
            self.kept.retain(at_risk);
            self.kept.extend(o.kept.into_iter().filter(at_risk));
            self.kept.truncate(AT_RISK_KEPT);
            self.complete = false;
        }
        self.total = total;
        for (a, b) in self.counts.iter_mut().zip(o.counts) {
            *a += b;
        }
        for p in &o.worst {
            self.offer_worst(p);
        }
        for (a, b) in self.zone_ids.iter_mut().zip(o.zone_ids) {
            a.merge(b);
        }
        self.rejected.merge(o.rejected);
        self.not_measured.merge(o.not_measured);
        self.borderline.merge(o.borderline);
        ThicknessCheck::merge(&mut self.thickness, o.thickness);
        ThicknessCheck::merge(&mut self.thinning, o.thinning);
        if let Some((lo, hi)) = o.d0_range {
            let r = self.d0_range.get_or_insert((lo, hi));
            *r = (r.0.min(lo), r.1.max(hi));
        }
        if let Some((lo, hi)) = o.margins {
            let r = self.margins.get_or_insert((lo, hi));
            *r = (r.0.min(lo), r.1.max(hi));
        }
        widen_by(&mut self.extent, o.extent);
        widen_by(&mut self.map_extent, o.map_extent);
        self.density.merge(o.density);
        self.map.merge(o.map);
        self.placed += o.placed;
        self.disagree.merge(o.disagree);
        self.grid = (self.grid.0 || o.grid.0, self.grid.1 || o.grid.1);
        self.paths += o.paths;
        self.hidden.merge(o.hidden);
        self.turned.merge(o.turned);
        self.unsupported.merge(o.unsupported);
        self.spread.merge(o.spread);
        self.observed.merge(o.observed);
        let room = AT_RISK_KEPT.saturating_sub(self.observed_failed.len());
        self.observed_failed
            .extend(o.observed_failed.into_iter().take(room));
    }

    /// Put every pending cell into its table (after folding, before drawing).
    pub fn flush(&mut self) {
        self.density.flush();
        self.map.flush();
        self.spread.flush();
    }

    /// The locations the diagram marks: every kept one while [`Summary::complete`]; past that,
    /// the worst list and the spread sample (failed and marginal locations from every region of
    /// the diagram where there are any, not the first in file order), each once, worst first.
    /// Read after [`Summary::flush`].
    pub fn markers(&self) -> Vec<&PointResult> {
        if self.complete {
            return self.kept.iter().collect();
        }
        let mut seen = std::collections::HashSet::new();
        let worst = self.worst.iter().filter(|p| at_risk(p));
        let sample = spread::sample(&self.spread).into_iter().map(|(_, p)| &**p);
        worst
            .chain(sample)
            .filter(|p| seen.insert((p.input.line, p.input.id.as_str())))
            .collect()
    }

    /// Number of locations in `zone`.
    pub fn count(&self, zone: Zone) -> usize {
        self.counts[zone as usize]
    }
}

/// A location's position on the diagram.
pub fn point_xy(p: &PointResult, measure: StrainMeasure) -> (f64, f64) {
    let s = &p.strain;
    match measure {
        StrainMeasure::Engineering => (s.eng.minor.percent(), s.eng.major.percent()),
        StrainMeasure::True => (s.true_strain.minor.percent(), s.true_strain.major.percent()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::assess::Settings;
    use crate::limit::LimitCurve;
    use crate::measure::Measurement;
    use crate::point::{state_of, Context};
    use crate::units::Lengths;
    use std::path::Path;

    /// `n` judged locations (invented), spread over every zone, some with positions.
    fn points(n: usize) -> Vec<PointResult> {
        let curve = LimitCurve::parse(
            "name = \"t\"\nsource = \"test\"\nstrain = \"engineering\"\npoints = [[-30, 50], [0, 30], [30, 45]]\n",
            Path::new("c.toml"),
        )
        .unwrap();
        let lengths = Lengths {
            unit: Default::default(),
            d0: Some(2.5),
            t0: Some(0.8),
        };
        let ctx = Context {
            curve,
            settings: Settings::default(),
            lengths,
            strain_input: false,
            true_input: false,
        };
        let mut state = 11u64;
        let mut next = || {
            state = state
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (state >> 11) as f64 / (1u64 << 53) as f64
        };
        (0..n)
            .map(|i| {
                let minor = 2.5 * (0.6 + 0.8 * next());
                let major = minor.max(2.5 * (0.95 + 0.5 * next()));
                let mut m = Measurement::axes(&format!("P{i}"), i as u64 + 2, major, minor, None);
                if i % 3 != 0 {
                    m.x = Some((i % 97) as f64 * 3.7);
                    m.y = Some((i / 97) as f64 * 2.9);
                }
                ctx.judge(state_of(m, Path::new("t.csv"), &lengths).unwrap())
            })
            .collect()
    }

    fn fold_all(ps: &[PointResult]) -> Summary {
        let mut s = Summary::new(View::default());
        for p in ps {
            fold_with_unmeasured(&mut s, p);
        }
        s
    }

    /// Fold `p`, and count a row not measured before every fifth location (at the line before
    /// it), so that the count and its first lines merge in file order too.
    fn fold_with_unmeasured(s: &mut Summary, p: &PointResult) {
        if p.input.line.is_multiple_of(5) {
            s.not_measured.push(p.input.line - 1);
        }
        s.fold(p.clone());
    }

    /// Everything a summary holds, in a form that compares: maps as sorted lists.
    fn shape(s: &Summary) -> String {
        let mut s = s.clone();
        s.flush();
        let s = &s;
        let mut d: Vec<_> = s.density.cells().iter().map(|(k, c)| (*k, c.0)).collect();
        d.sort();
        let mut m: Vec<_> = s
            .map
            .cells()
            .iter()
            .map(|(k, c)| (*k, c.n, c.margin.map(f32::to_bits), c.zone))
            .collect();
        m.sort();
        let ids = |v: &[PointResult]| v.iter().map(|p| p.input.id.clone()).collect::<Vec<_>>();
        format!(
            "{} {:?} {} {:?} {:?} {:?} {:?} {:?} {:?} {} {:?} {:?} {} {} {:?}",
            s.total,
            s.counts,
            s.complete,
            ids(&s.kept),
            ids(&s.worst),
            s.zone_ids
                .iter()
                .map(|c| (&c.items, c.total))
                .collect::<Vec<_>>(),
            s.margins,
            s.extent,
            s.map_extent,
            s.placed,
            d,
            m,
            s.density.size(),
            s.map.size(),
            (&s.not_measured.items, s.not_measured.total)
        )
    }

    // Folding every location in order and merging parts folded separately give one summary:
    // what lets the stream judge parts of a file on several threads.
    #[test]
    fn merging_parts_equals_folding_everything() {
        for n in [10, KEEP_ALL - 3, KEEP_ALL + 7, 3 * KEEP_ALL] {
            let ps = points(n);
            let whole = shape(&fold_all(&ps));
            for parts in [2, 3, 7] {
                let size = n.div_ceil(parts);
                let mut merged = Summary::new(View::default());
                for chunk in ps.chunks(size) {
                    let mut part = merged.next_part();
                    for p in chunk {
                        fold_with_unmeasured(&mut part, p);
                    }
                    merged.merge(part);
                }
                assert_eq!(shape(&merged), whole, "{n} locations in {parts} parts");
                // Every fifth line counted, the first LIST_CAP kept in file order.
                let unmeasured = &merged.not_measured;
                assert_eq!(unmeasured.total, (n + 1) / 5, "{n}");
                assert_eq!(unmeasured.items.len(), unmeasured.total.min(LIST_CAP));
                assert!(unmeasured.items.windows(2).all(|w| w[0] < w[1]));
            }
        }
    }

    #[test]
    fn large_files_keep_only_the_at_risk_and_the_worst_in_order() {
        let ps = points(3 * KEEP_ALL);
        let mut s = fold_all(&ps);
        s.flush();
        assert!(!s.complete);
        assert!(s.kept.iter().all(at_risk));
        assert!(s.kept.len() <= AT_RISK_KEPT);
        assert_eq!(s.worst.len(), WORST_KEPT);
        // The worst list is the brute-force sort of every location, cut.
        let mut all: Vec<&PointResult> = ps
            .iter()
            .filter(|p| p.judgement.margin_pct.is_some())
            .collect();
        all.sort_by(|a, b| {
            worst_key(a)
                .0
                .cmp(&worst_key(b).0)
                .then(worst_key(a).1.total_cmp(&worst_key(b).1))
        });
        let want: Vec<&str> = all
            .iter()
            .take(WORST_KEPT)
            .map(|p| p.input.id.as_str())
            .collect();
        let got: Vec<&str> = s.worst.iter().map(|p| p.input.id.as_str()).collect();
        assert_eq!(got, want);
        assert_eq!(s.counts.iter().sum::<usize>(), ps.len());
        let cells: u32 = s
            .density
            .cells
            .values()
            .map(|c| c.0.iter().sum::<u32>())
            .sum();
        assert_eq!(cells as usize, ps.len(), "every location is in the density");
    }

    // Past KEEP_ALL, the diagram marks failures from the whole spread, not the first rows:
    // 20 000 invented locations, the first 4 000 failed at minor 0-4 %, then failures from minor
    // -17 % to +10 % among safe ones; curve (-30, 50), (0, 30), (30, 45) as in `points`.
    #[test]
    fn markers_spread_over_the_diagram_whatever_the_parts() {
        let curve = LimitCurve::parse(
            "name = \"t\"\nsource = \"test\"\nstrain = \"engineering\"\npoints = [[-30, 50], [0, 30], [30, 45]]\n",
            Path::new("c.toml"),
        )
        .unwrap();
        let lengths = Lengths {
            unit: Default::default(),
            d0: Some(2.5),
            t0: None,
        };
        let ctx = Context {
            curve,
            settings: Settings::default(),
            lengths,
            strain_input: false,
            true_input: false,
        };
        let ps: Vec<PointResult> = (0..20_000usize)
            .map(|i| {
                let (minor, major) = if i < 4_000 {
                    (0.04 * (i % 400) as f64 / 400.0, 0.55)
                } else if i % 5 == 0 {
                    (-0.17 + 0.27 * (i % 997) as f64 / 996.0, 0.60)
                } else {
                    (-0.05 + 0.10 * (i % 89) as f64 / 88.0, 0.10)
                };
                let m = Measurement::axes(
                    &format!("P{i}"),
                    i as u64 + 2,
                    2.5 * (1.0 + major),
                    2.5 * (1.0 + minor),
                    None,
                );
                ctx.judge(state_of(m, Path::new("t.csv"), &lengths).unwrap())
            })
            .collect();
        let minor = |p: &PointResult| p.strain.eng.minor.percent();
        let ids = |s: &Summary| {
            s.markers()
                .iter()
                .map(|p| p.input.id.clone())
                .collect::<Vec<_>>()
        };
        // The spread sample alone (the same whatever the order parts are merged in).
        let sampled = |s: &Summary| {
            spread::sample(&s.spread)
                .iter()
                .map(|(_, p)| p.input.id.clone())
                .collect::<Vec<_>>()
        };
        let mut whole = fold_all(&ps);
        whole.flush();
        assert!(!whole.complete);
        // The file-order list is all at 0-4 %, which is what the diagram must not show alone.
        assert!(whole.kept.iter().all(|p| (0.0..4.01).contains(&minor(p))));
        let failed: Vec<f64> = whole
            .markers()
            .iter()
            .filter(|p| p.zone() == Zone::Failed)
            .map(|p| minor(p))
            .collect();
        let lo = failed.iter().copied().fold(f64::INFINITY, f64::min);
        let hi = failed.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        assert!(lo < -15.0 && hi > 8.0, "failed markers from {lo} to {hi}");
        // Every 2-point band of minor strain from -17 % to +10 % holds a failed marker.
        for k in 0..13 {
            let band = -17.0 + 2.0 * f64::from(k);
            assert!(
                failed.iter().any(|m| (band..band + 2.0).contains(m)),
                "no failed marker at minor {band} %"
            );
        }
        assert!(whole.markers().len() <= AT_RISK_KEPT);
        for parts in [2, 3, 7] {
            let mut merged = Summary::new(View::default());
            for chunk in ps.chunks(ps.len().div_ceil(parts)) {
                let mut part = merged.next_part();
                for p in chunk {
                    part.fold(p.clone());
                }
                merged.merge(part);
            }
            merged.flush();
            assert_eq!(ids(&merged), ids(&whole), "{parts} parts");
            // Parts merged last first: a later part's lines come before the summary's, so a
            // tie of keys with a cell's bar must not shut a location out.
            let mut backwards = Summary::new(View::default());
            for chunk in ps.chunks(ps.len().div_ceil(parts)).rev() {
                let mut part = backwards.next_part();
                for p in chunk {
                    part.fold(p.clone());
                }
                backwards.merge(part);
            }
            backwards.flush();
            assert_eq!(
                sampled(&backwards),
                sampled(&whole),
                "{parts} parts, last first"
            );
        }
        // The bars of full cells keep a later part small: the same failures again, each 1 pp
        // less far past the curve and on a later line, rank after every location the cells
        // hold, so a part told the bars copies them only into cells not yet full; one told
        // nothing copies up to SPREAD_PER_CELL a cell. Merged, both give the same sample.
        let again: Vec<PointResult> = ps
            .iter()
            .filter(|p| p.zone() == Zone::Failed)
            .map(|p| {
                let mut q = p.clone();
                q.input.line += 100_000;
                q.input.id = format!("again-{}", p.input.id);
                q.judgement.margin_pct = p.judgement.margin_pct.map(|m| m + 1.0);
                q
            })
            .collect();
        let (mut informed, mut blind) = (whole.next_part(), whole.next_part());
        blind.spread_bars = None;
        for p in &again {
            informed.fold(p.clone());
            blind.fold(p.clone());
        }
        informed.flush();
        blind.flush();
        let held = |s: &Summary| s.spread.cells().values().map(|w| w.0.len()).sum::<usize>();
        // Only cells the summary has not filled take any of them.
        let open_room: usize = whole
            .spread
            .cells()
            .values()
            .map(|w| SPREAD_PER_CELL - w.0.len())
            .sum();
        assert!(held(&informed) <= open_room, "{}", held(&informed));
        assert!(
            held(&blind) > 10 * held(&informed).max(1),
            "{}",
            held(&blind)
        );
        let (mut a, mut b) = (whole.clone(), whole.clone());
        a.merge(informed);
        b.merge(blind);
        a.flush();
        b.flush();
        assert_eq!(sampled(&a), sampled(&b));
    }

    #[test]
    fn bins_coarsen_and_merge_whatever_their_size() {
        let mut a: Bins<ZoneCounts> = Bins::new(1.0, 4);
        for i in 0..20 {
            a.add(i as f64, 0.5, |c| c.0[0] += 1);
        }
        a.flush();
        assert!(a.cells().len() <= 4 && a.size() >= 4.0);
        let mut b: Bins<ZoneCounts> = Bins::new(1.0, 1000);
        b.add(3.5, 0.5, |c| c.0[1] += 1);
        a.merge(b);
        let total: u32 = a.cells().values().map(|c| c.0.iter().sum::<u32>()).sum();
        assert_eq!(total, 21);
        // Negative coordinates floor the same way at every size.
        let mut n: Bins<ZoneCounts> = Bins::new(1.0, 100);
        n.add(-0.5, -0.5, |c| c.0[0] += 1);
        n.flush();
        assert_eq!(n.cells().keys().next(), Some(&(-1, -1)));
        n.coarsen();
        assert_eq!(n.cells().keys().next(), Some(&(-1, -1)));
        assert_eq!(n.corner((-1, -1)), (-2.0, -2.0));
    }
}
