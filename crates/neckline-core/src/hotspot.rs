//! Hot spots: the failed (and the marginal) places of a part, each a connected region of
//! neighbouring at-risk locations or map cells, with its worst location and its area.
//!
//! Two locations (or cells) are neighbours when they lie within `reach` of each other: 1.5
//! times the grid's spacing, so that the eight neighbours of a square grid (the diagonal ones
//! at √2 ≈ 1.41 spacings) join and the next ring (2 spacings) does not. Regions are the
//! connected components of that neighbourhood (union-find; Tarjan 1975, "Efficiency of a good
//! but not linear set union algorithm", J. ACM 22).

use crate::analysis::Analysis;
use crate::assess::Zone;
use crate::point::PointResult;
use crate::summary::map_margin;
use rustc_hash::FxHashMap;

/// Neighbours lie within this many grid spacings.
pub const REACH_SPACINGS: f64 = 1.5;

/// One connected region of at-risk locations.
#[derive(Debug, Clone, PartialEq)]
pub struct HotSpot {
    /// Failed (a region of failed locations) or marginal (of marginal ones).
    pub zone: Zone,
    /// At-risk locations in the region (for a large file: locations in its cells).
    pub locations: usize,
    /// Its area in the length unit squared: each location stands for one grid spacing
    /// squared, each cell for its own area.
    pub area: f64,
    /// The worst location of the region, when one is kept (among the kept locations and the
    /// worst list).
    pub worst: Option<PointResult>,
    /// The region's worst margin, pp.
    pub margin: Option<f64>,
}

/// The connected components of `pts` where two points within `reach` are neighbours, each a
/// list of indices in ascending order, in the order of their first index.
pub fn connected(pts: &[(f64, f64)], reach: f64) -> Vec<Vec<usize>> {
    let mut parent: Vec<usize> = (0..pts.len()).collect();
    fn root(p: &mut [usize], mut i: usize) -> usize {
        while p[i] != i {
            p[i] = p[p[i]];
            i = p[i];
        }
        i
    }
    if reach > 0.0 && reach.is_finite() {
        let key = |(x, y): (f64, f64)| ((x / reach).floor() as i64, (y / reach).floor() as i64);
        let mut grid: FxHashMap<(i64, i64), Vec<usize>> = FxHashMap::default();
        for (i, p) in pts.iter().enumerate() {
            grid.entry(key(*p)).or_default().push(i);
        }
        for (i, p) in pts.iter().enumerate() {
            let (kx, ky) = key(*p);
            for dx in -1..=1 {
                for dy in -1..=1 {
                    let Some(others) = grid.get(&(kx + dx, ky + dy)) else {
                        continue;
                    };
                    for &j in others {
                        let q = pts[j];
                        if j > i && (p.0 - q.0).hypot(p.1 - q.1) <= reach {
                            let (a, b) = (root(&mut parent, i), root(&mut parent, j));
                            if a != b {
                                parent[a.max(b)] = a.min(b);
                            }
                        }
                    }
                }
            }
        }
    }
    let mut groups: FxHashMap<usize, Vec<usize>> = FxHashMap::default();
    for i in 0..pts.len() {
        let r = root(&mut parent, i);
        groups.entry(r).or_default().push(i);
    }
    let mut v: Vec<Vec<usize>> = groups.into_values().collect();
    v.sort_by_key(|g| g[0]);
    v
}

/// The median distance from each point to its nearest other point: the grid's spacing
/// (`None` for fewer than two distinct points).
pub fn spacing(pts: &[(f64, f64)]) -> Option<f64> {
    let mut d: Vec<f64> = pts
        .iter()
        .enumerate()
        .filter_map(|(i, p)| {
            pts.iter()
                .enumerate()
                .filter(|(j, _)| *j != i)
                .map(|(_, q)| (p.0 - q.0).hypot(p.1 - q.1))
                .filter(|d| *d > 0.0)
                .min_by(f64::total_cmp)
        })
        .collect();
    if d.is_empty() {
        return None;
    }
    d.sort_by(f64::total_cmp);
    Some(d[d.len() / 2])
}

fn worse(a: &PointResult, b: &PointResult) -> bool {
    let m = |p: &PointResult| map_margin(p).unwrap_or(f64::INFINITY);
    m(a) < m(b)
}

/// The hot spots of an analysis, failed regions first, then marginal ones, each largest first.
///
/// A file whose every location is kept is grouped location by location at 1.5 grid spacings;
/// a larger one cell by cell of its map binned to `cells` across the longer side of the
/// measured extent, its worst location found among the kept at-risk locations.
pub fn hot_spots(a: &Analysis, cells: usize) -> Vec<HotSpot> {
    let span = a
        .summary
        .map_extent
        .map_or(0.0, |e| (e[2] - e[0]).max(e[3] - e[1]));
    let plane = a.summary.view.plane;
    let points = a.points();
    let mut out = Vec::new();
    if a.summary.complete {
        let placed: Vec<(usize, (f64, f64))> = points
            .iter()
            .enumerate()
            .filter_map(|(i, p)| Some((i, plane.coords(p)?)))
            .collect();
        let all: Vec<(f64, f64)> = placed.iter().map(|(_, xy)| *xy).collect();
        let Some(step) = spacing(&all) else {
            return out;
        };
        for zone in [Zone::Failed, Zone::Marginal] {
            let mine: Vec<(usize, (f64, f64))> = placed
                .iter()
                .filter(|(i, _)| points[*i].zone() == zone)
                .copied()
                .collect();
            let xy: Vec<(f64, f64)> = mine.iter().map(|(_, p)| *p).collect();
            for g in connected(&xy, REACH_SPACINGS * step) {
                let members: Vec<usize> = g.iter().map(|k| mine[*k].0).collect();
                let worst = members.iter().copied().reduce(|w, i| {
                    if worse(&points[i], &points[w]) {
                        i
                    } else {
                        w
                    }
                });
                out.push(HotSpot {
                    zone,
                    locations: members.len(),
                    area: members.len() as f64 * step * step,
                    worst: worst.map(|w| points[w].clone()),
                    margin: worst.and_then(|w| map_margin(&points[w])),
                });
            }
        }
    } else {
        let mut bins = a.summary.map.clone();
        bins.flush();
        bins.coarsen_to(span, cells);
        let size = bins.size();
        for zone in [Zone::Failed, Zone::Marginal] {
            let mine: Vec<((i64, i64), &crate::summary::MapCell)> = bins
                .cells()
                .iter()
                .filter(|(_, c)| c.zone == zone)
                .map(|(k, c)| (*k, c))
                .collect();
            let mut mine = mine;
            mine.sort_by_key(|(k, _)| *k);
            let centres: Vec<(f64, f64)> =
                mine.iter().map(|(k, _)| (k.0 as f64, k.1 as f64)).collect();
            for g in connected(&centres, REACH_SPACINGS) {
                let keys: std::collections::HashSet<(i64, i64)> =
                    g.iter().map(|k| mine[*k].0).collect();
                // A large file keeps its first at-risk locations and its worst ones: the region's
                // worst is found among both.
                let worst = points
                    .iter()
                    .chain(a.summary.worst.iter())
                    .filter(|p| p.zone() == zone)
                    .filter(|p| {
                        plane
                            .coords(p)
                            .is_some_and(|(x, y)| keys.contains(&bins.key(x, y)))
                    })
                    .reduce(|w, p| if worse(p, w) { p } else { w })
                    .cloned();
                let margin = g
                    .iter()
                    .filter_map(|k| mine[*k].1.margin)
                    .map(f64::from)
                    .reduce(f64::min);
                out.push(HotSpot {
                    zone,
                    locations: g.iter().map(|k| mine[*k].1.n as usize).sum(),
                    area: g.len() as f64 * size * size,
                    worst,
                    margin,
                });
            }
        }
    }
    out.sort_by(|x, y| {
        x.zone
            .cmp(&y.zone)
            .then(y.area.total_cmp(&x.area))
            .then(x.margin.unwrap_or(0.0).total_cmp(&y.margin.unwrap_or(0.0)))
    });
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    // A square grid of spacing 10: the eight neighbours (at 10 and 14.1) join within 15, the
    // next ring (20) does not (common practice for circle grids: neighbours share an edge or a
    // corner).
    #[test]
    fn grid_neighbours_join_and_gaps_separate() {
        let mut pts = Vec::new();
        for (x, y) in [(0, 0), (1, 1), (2, 2), (5, 5), (5, 6), (9, 0)] {
            pts.push((f64::from(x) * 10.0, f64::from(y) * 10.0));
        }
        let g = connected(&pts, 15.0);
        assert_eq!(g, vec![vec![0, 1, 2], vec![3, 4], vec![5]]);
        assert_eq!(spacing(&pts), Some(10.0 * 2f64.sqrt()));
        assert_eq!(connected(&pts, 0.0).len(), 6);
        assert_eq!(spacing(&[(1.0, 1.0)]), None);
    }

    #[test]
    fn fixture_regions_are_ranked_failed_first_and_carry_their_worst() {
        let a = crate::output::fixture::analysis(true);
        let spots = hot_spots(&a, 120);
        assert!(!spots.is_empty());
        let failed = spots.iter().filter(|s| s.zone == Zone::Failed).count();
        assert!(spots[..failed].iter().all(|s| s.zone == Zone::Failed));
        let n: usize = spots
            .iter()
            .filter(|s| s.zone == Zone::Failed)
            .map(|s| s.locations)
            .sum();
        assert_eq!(n, a.count(Zone::Failed));
        for s in &spots {
            let w = s.worst.as_ref().unwrap();
            assert_eq!(w.zone(), s.zone);
        }
    }
}
