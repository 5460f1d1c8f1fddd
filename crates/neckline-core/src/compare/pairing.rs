//! Pairing locations of two tryouts by position when their ids differ (a re-gridded part, an
//! optical re-measure): one to one, closest pairs first, never farther apart than `within`.
//!
//! Greedy closest-first: every pair within reach is a candidate; candidates are taken in order of
//! distance, each skipped when either end is already used. Candidates are found through a grid
//! of cells `within` wide, so that each location looks at its own cell and the eight around it
//! (a spatial grid, common practice; the cells sorted and found by binary search) instead of at
//! every location of the other tryout.

/// One pair: indices into the two lists and their distance.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Pair {
    /// Index in the earlier list.
    pub before: usize,
    /// Index in the later list.
    pub after: usize,
    /// Euclidean distance of the two positions.
    pub distance: f64,
}

/// The cell of `p` in a grid of cells `size` wide: (column, row).
pub(super) fn cell(p: (f64, f64), size: f64) -> (i64, i64) {
    ((p.0 / size).floor() as i64, (p.1 / size).floor() as i64)
}

/// Pair `before` with `after` (positions; `None` = no position, never paired). `within` must
/// be positive and finite. Pairs come back closest first.
pub fn pair(before: &[Option<(f64, f64)>], after: &[Option<(f64, f64)>], within: f64) -> Vec<Pair> {
    // The grid: every later location's cell and index, sorted by cell (24 bytes a location,
    // no table of lists); a cell's locations are found by binary search.
    let mut grid: Vec<((i64, i64), u32)> = after
        .iter()
        .enumerate()
        .filter_map(|(j, p)| Some((cell((*p)?, within), j as u32)))
        .collect();
    grid.sort_unstable();
    let mut candidates = Vec::new();
    for (i, p) in before.iter().enumerate() {
        let Some(p) = *p else { continue };
        let (cx, cy) = cell(p, within);
        for dx in -1..=1 {
            for dy in -1..=1 {
                let c = (cx + dx, cy + dy);
                let start = grid.partition_point(|(k, _)| *k < c);
                for &(_, j) in grid[start..].iter().take_while(|(k, _)| *k == c) {
                    let j = j as usize;
                    let q = after[j].unwrap_or(p);
                    let distance = (q.0 - p.0).hypot(q.1 - p.1);
                    if distance <= within {
                        candidates.push(Pair {
                            before: i,
                            after: j,
                            distance,
                        });
                    }
                }
            }
        }
    }
    drop(grid);
    candidates.sort_by(|a, b| {
        a.distance
            .total_cmp(&b.distance)
            .then(a.before.cmp(&b.before))
            .then(a.after.cmp(&b.after))
    });
    let (mut used_b, mut used_a) = (vec![false; before.len()], vec![false; after.len()]);
    let mut out = Vec::new();
    for c in candidates {
        if !used_b[c.before] && !used_a[c.after] {
            used_b[c.before] = true;
            used_a[c.after] = true;
            out.push(c);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nearer_candidate_wins_and_nothing_beyond_reach() {
        // One earlier location at the origin; later ones at 3 and 1 (both within 5) and at 6.
        let before = [Some((0.0, 0.0))];
        let after = [Some((3.0, 0.0)), Some((0.0, 1.0)), Some((6.0, 0.0))];
        let p = pair(&before, &after, 5.0);
        assert_eq!(p.len(), 1);
        assert_eq!(p[0].after, 1);
        assert!((p[0].distance - 1.0).abs() < 1e-12);
        // Beyond reach: nothing.
        assert!(pair(&[Some((0.0, 0.0))], &[Some((6.0, 0.0))], 5.0).is_empty());
    }

    #[test]
    fn one_to_one_closest_first() {
        // a0 at 0 and a1 at 4; b0 at 1 is nearest to a0 (1) and b1 at 2.5 is 1.5 from a1 and
        // 2.5 from a0. Closest first: (a0, b0) at 1, then (a1, b1) at 1.5. Nothing is used twice.
        let before = [Some((0.0, 0.0)), Some((4.0, 0.0))];
        let after = [Some((1.0, 0.0)), Some((2.5, 0.0))];
        let p = pair(&before, &after, 3.0);
        let got: Vec<(usize, usize)> = p.iter().map(|c| (c.before, c.after)).collect();
        assert_eq!(got, [(0, 0), (1, 1)]);
        // A location without a position is never paired.
        assert!(pair(&[None], &[Some((0.0, 0.0))], 1.0).is_empty());
    }

    #[test]
    fn matches_brute_force_on_a_grid() {
        // Independent check: a brute-force greedy over all pairs gives the same pairs.
        let before: Vec<Option<(f64, f64)>> = (0..40)
            .map(|k| Some(((k % 8) as f64 * 7.3, (k / 8) as f64 * 5.1)))
            .collect();
        let after: Vec<Option<(f64, f64)>> = (0..40)
            .map(|k| {
                let j = (k * 17) % 40;
                let s = ((k * 37) % 11) as f64 / 11.0 - 0.5;
                Some((
                    (j % 8) as f64 * 7.3 + 2.0 * s,
                    (j / 8) as f64 * 5.1 - 1.5 * s,
                ))
            })
            .collect();
        let fast = pair(&before, &after, 4.0);
        let mut all = Vec::new();
        for (i, p) in before.iter().enumerate() {
            for (j, q) in after.iter().enumerate() {
                let (p, q) = (p.unwrap(), q.unwrap());
                let d = (q.0 - p.0).hypot(q.1 - p.1);
                if d <= 4.0 {
                    all.push((d, i, j));
                }
            }
        }
        all.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)).then(a.2.cmp(&b.2)));
        let (mut ub, mut ua, mut slow) = (vec![false; 40], vec![false; 40], Vec::new());
        for (_, i, j) in all {
            if !ub[i] && !ua[j] {
                ub[i] = true;
                ua[j] = true;
                slow.push((i, j));
            }
        }
        let fast: Vec<(usize, usize)> = fast.iter().map(|c| (c.before, c.after)).collect();
        assert_eq!(fast, slow);
    }
}
