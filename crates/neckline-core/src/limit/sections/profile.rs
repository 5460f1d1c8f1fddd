//! The steps of the position-dependent evaluation of one section, as small pure functions.
//!
//! Positions `x` are in mm along the section line, strains true strain as fractions. Where a
//! step follows ISO 12004-2 (2008, clause 7.2 and its annex on the position-dependent method)
//! its doc comment says so; the clause numbers and the window-width formula are quoted from
//! memory (the standard's text was not at hand to verify them), and every choice of ours is
//! marked "ours".

/// Where the crack is, and how it was found.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CrackBy {
    /// The middle of the widest run of points without strains (where the crack opened).
    Gap,
    /// The middle of a spacing more than [`GAP_SPACINGS`] times the usual one.
    Spacing,
    /// The maximum of the major strain (no gap).
    Maximum,
}

impl CrackBy {
    /// Words for outputs.
    pub fn words(self) -> &'static str {
        match self {
            CrackBy::Gap => "middle of the gap of missing points",
            CrackBy::Spacing => "middle of the widest spacing",
            CrackBy::Maximum => "maximum of the major strain",
        }
    }
}

/// A spacing this many times the median spacing is read as the crack's gap when no point is
/// marked missing (ours).
pub const GAP_SPACINGS: f64 = 2.5;

/// The crack position along a section: the middle of the widest run of missing points
/// (`gaps`, positions whose strains are empty) when there is one, else the middle of a spacing
/// wider than [`GAP_SPACINGS`] median spacings, else the position of the maximum major strain.
/// ISO 12004-2 (from memory): the crack is where the points are missing, or the maximum of the
/// major strain when the last image before fracture shows no gap. The spacing rule is ours.
///
/// `points` are `(x, major)` sorted by `x`; `gaps` the positions of the missing points, sorted.
pub fn crack_position(points: &[(f64, f64)], gaps: &[f64]) -> Option<(f64, CrackBy)> {
    if let Some((lo, hi)) = widest_gap_run(points, gaps) {
        // The crack lies between the last measured point before the run and the first after.
        let before = points.iter().rev().find(|p| p.0 < lo).map_or(lo, |p| p.0);
        let after = points.iter().find(|p| p.0 > hi).map_or(hi, |p| p.0);
        return Some((0.5 * (before + after), CrackBy::Gap));
    }
    if points.len() >= 3 {
        let mut steps: Vec<f64> = points.windows(2).map(|w| w[1].0 - w[0].0).collect();
        let widest = steps
            .iter()
            .enumerate()
            .max_by(|a, b| a.1.total_cmp(b.1))
            .map(|(i, s)| (i, *s));
        steps.sort_by(f64::total_cmp);
        let median = steps[steps.len() / 2];
        if let Some((i, s)) = widest {
            if median > 0.0 && s > GAP_SPACINGS * median {
                return Some((0.5 * (points[i].0 + points[i + 1].0), CrackBy::Spacing));
            }
        }
    }
    points
        .iter()
        .max_by(|a, b| a.1.total_cmp(&b.1))
        .map(|p| (p.0, CrackBy::Maximum))
}

/// The widest run of consecutive missing points (no measured point between them), as its first
/// and last position.
fn widest_gap_run(points: &[(f64, f64)], gaps: &[f64]) -> Option<(f64, f64)> {
    let mut best: Option<(f64, f64, usize)> = None;
    let mut run: Option<(f64, f64, usize)> = None;
    for &g in gaps {
        run = match run {
            Some((lo, hi, n)) if !points.iter().any(|p| p.0 > hi && p.0 < g) => {
                Some((lo, g, n + 1))
            }
            _ => Some((g, g, 1)),
        };
        if let Some(r) = run {
            if best.is_none_or(|b| r.2 > b.2) {
                best = Some(r);
            }
        }
    }
    best.map(|(lo, hi, _)| (lo, hi))
}

/// The width of each fit window, mm: `w = 10 mm × (1 + ε2/ε1)`, after ISO 12004-2 (the
/// formula from memory, not verified against the standard's text), with the strain ratio
/// `ratio = ε2/ε1` clamped to −0.7 ≤ β ≤ 1, so that 3 mm ≤ w ≤ 20 mm (the clamp is ours: a
/// window narrower than 3 mm holds too few points at usual spacings).
///
/// Uniaxial tension (β = −½) gives 5 mm, plane strain 10 mm, equibiaxial 20 mm.
pub fn window_width(ratio: f64) -> f64 {
    let r = if ratio.is_finite() { ratio } else { 0.0 };
    10.0 * (1.0 + r.clamp(-0.7, 1.0))
}

/// The strain ratio β = ε2/ε1 that sets the window width: the mean minor over the mean major
/// strain of the (up to) three measured points nearest the crack on each side (ours: the
/// standard takes the ratio near the crack; which points exactly is our choice).
pub fn crack_ratio(points: &[(f64, f64, f64)], crack: f64) -> f64 {
    let mut near: Vec<&(f64, f64, f64)> = points.iter().collect();
    near.sort_by(|a, b| (a.0 - crack).abs().total_cmp(&(b.0 - crack).abs()));
    let left: Vec<_> = near.iter().filter(|p| p.0 < crack).take(3).collect();
    let right: Vec<_> = near.iter().filter(|p| p.0 >= crack).take(3).collect();
    let all: Vec<_> = left.into_iter().chain(right).collect();
    let n = all.len() as f64;
    let major: f64 = all.iter().map(|p| p.1).sum::<f64>() / n;
    let minor: f64 = all.iter().map(|p| p.2).sum::<f64>() / n;
    if major > 0.0 {
        minor / major
    } else {
        0.0
    }
}

/// The second derivative of `y(x)` at each inner point of a non-uniformly spaced series, by the
/// three-point divided difference
/// `y'' ≈ 2 [(y₊ − y)/(x₊ − x) − (y − y₋)/(x − x₋)] / (x₊ − x₋)` (any numerical-analysis text,
/// e.g. Burden & Faires, *Numerical Analysis*, on divided differences); `None` at the ends.
pub fn second_derivative(x: &[f64], y: &[f64]) -> Vec<Option<f64>> {
    (0..x.len())
        .map(|i| {
            if i == 0 || i + 1 >= x.len() {
                return None;
            }
            let (h0, h1) = (x[i] - x[i - 1], x[i + 1] - x[i]);
            if h0 <= 0.0 || h1 <= 0.0 {
                return None;
            }
            Some(2.0 * ((y[i + 1] - y[i]) / h1 - (y[i] - y[i - 1]) / h0) / (h0 + h1))
        })
        .collect()
}

/// The second derivative filtered by a three-point moving mean (ISO 12004-2 filters the second
/// derivative before looking for its maximum, from memory; the three-point mean is ours).
pub fn filtered(d2: &[Option<f64>]) -> Vec<Option<f64>> {
    (0..d2.len())
        .map(|i| {
            if i == 0 || i + 1 >= d2.len() {
                return None;
            }
            Some((d2[i - 1]? + d2[i]? + d2[i + 1]?) / 3.0)
        })
        .collect()
}

/// One side of the crack, its points ordered outwards from the crack.
#[derive(Debug, Clone, PartialEq)]
pub struct Side {
    /// Distance from the crack of each point, mm, increasing.
    pub d: Vec<f64>,
    /// Major strain of each point.
    pub major: Vec<f64>,
}

/// Where a fit window lies on one side: distances from the crack, mm.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Window {
    /// Distance of the maximum of the filtered second derivative (the neck's foot).
    pub inner_limit: f64,
    /// Distance of the window's first point.
    pub from: f64,
    /// Distance of the window's outer end: `from + w`.
    pub to: f64,
    /// Points in the window.
    pub points: usize,
}

/// Why no window could be placed on a side.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum NoWindow {
    /// The side holds fewer than five points: the crack is at or near the section's end.
    TooShort,
    /// The window runs past the side's last point by more than one spacing (`to` is where it
    /// would end, `last` the farthest point).
    PastTheEnd {
        /// Where the window would end, mm from the crack.
        to: f64,
        /// The farthest point, mm from the crack.
        last: f64,
    },
}

/// The fit window on one side. The inner limit is the maximum of the filtered second derivative
/// of the major strain within `w` of the crack: the foot of the localised neck, where the
/// profile bends up most (ISO 12004-2, from memory). The window starts two points further out
/// (ours: one for the difference stencil and one for the filter, which spread the neck's
/// curvature over that many points) and ends `w` beyond its first point.
pub fn window(side: &Side, w: f64) -> Result<Window, NoWindow> {
    let n = side.d.len();
    if n < 5 {
        return Err(NoWindow::TooShort);
    }
    let f = filtered(&second_derivative(&side.d, &side.major));
    let k = (0..n)
        .filter(|&i| side.d[i] <= w)
        .filter_map(|i| f[i].map(|v| (i, v)))
        .max_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(i, _)| i)
        .ok_or(NoWindow::TooShort)?;
    let start = k + 2;
    if start >= n {
        return Err(NoWindow::TooShort);
    }
    let from = side.d[start];
    let to = from + w;
    let last = side.d[n - 1];
    let spacing = median_spacing(&side.d);
    if to > last + spacing {
        return Err(NoWindow::PastTheEnd { to, last });
    }
    let points = side.d[start..].iter().filter(|&&d| d <= to + 1e-9).count();
    Ok(Window {
        inner_limit: side.d[k],
        from,
        to,
        points,
    })
}

/// The median spacing of positions sorted increasing (0 for fewer than two).
pub fn median_spacing(d: &[f64]) -> f64 {
    let mut s: Vec<f64> = d.windows(2).map(|w| w[1] - w[0]).collect();
    if s.is_empty() {
        return 0.0;
    }
    s.sort_by(f64::total_cmp);
    s[s.len() / 2]
}

/// The inverse second-order parabola `y(u) = 1 / (a u² + b u + c)`, `u` the position relative
/// to the crack, mm (ISO 12004-2: the profile beside the neck is fitted with it, from memory).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct InverseParabola {
    /// Coefficient of u², 1/mm².
    pub a: f64,
    /// Coefficient of u, 1/mm.
    pub b: f64,
    /// Constant: `1/c` is the value at the crack.
    pub c: f64,
}

impl InverseParabola {
    /// The value at `u`; `None` where the denominator is zero.
    pub fn at(&self, u: f64) -> Option<f64> {
        let q = self.a * u * u + self.b * u + self.c;
        (q.abs() > 1e-12).then(|| 1.0 / q)
    }

    /// Where the parabola `a u² + b u + c` has its extremum, `−b / 2a` (the profile's apex).
    pub fn apex(&self) -> Option<f64> {
        (self.a.abs() > 1e-15).then(|| -self.b / (2.0 * self.a))
    }
}

/// Least-squares fit of `1 / (a u² + b u + c)` to `(u, y)`: first the linear least squares of
/// `1/y` weighted by `y⁴` (to first order the same as least squares in `y`, since
/// `δ(1/y) = −δy/y²`), then Gauss-Newton steps on the residuals in `y` themselves (ours: the
/// standard asks for a least-squares fit, the method of solving it is ours). `None` for fewer
/// than three points, a zero strain, or a singular system.
pub fn fit_inverse_parabola(u: &[f64], y: &[f64]) -> Option<InverseParabola> {
    if u.len() < 3 || y.iter().any(|v| v.abs() < 1e-9) {
        return None;
    }
    let rows: Vec<([f64; 3], f64, f64)> = u
        .iter()
        .zip(y)
        .map(|(&u, &y)| ([u * u, u, 1.0], 1.0 / y, y.powi(4)))
        .collect();
    let p = weighted_lsq(&rows)?;
    let mut f = InverseParabola {
        a: p[0],
        b: p[1],
        c: p[2],
    };
    for _ in 0..20 {
        // y = 1/q, dy/dp = −[u², u, 1] / q².
        let mut rows = Vec::with_capacity(u.len());
        for (&u, &y) in u.iter().zip(y) {
            let q = f.a * u * u + f.b * u + f.c;
            if q.abs() < 1e-12 {
                return Some(f);
            }
            let g = -1.0 / (q * q);
            rows.push(([g * u * u, g * u, g], y - 1.0 / q, 1.0));
        }
        let Some(step) = weighted_lsq(&rows) else {
            break;
        };
        f.a += step[0];
        f.b += step[1];
        f.c += step[2];
        if step[2].abs() <= 1e-12 * f.c.abs() {
            break;
        }
    }
    Some(f)
}

/// Least-squares fit of the ordinary parabola `y = a u² + b u + c`, as `[a, b, c]` (used for a
/// minor strain that is near zero or changes sign, where its reciprocal has no meaning: ours).
pub fn fit_parabola(u: &[f64], y: &[f64]) -> Option<[f64; 3]> {
    if u.len() < 3 {
        return None;
    }
    let rows: Vec<([f64; 3], f64, f64)> = u
        .iter()
        .zip(y)
        .map(|(&u, &y)| ([u * u, u, 1.0], y, 1.0))
        .collect();
    weighted_lsq(&rows)
}

/// Weighted linear least squares for three unknowns: rows `(basis, target, weight)`, solved by
/// the normal equations (Gaussian elimination with partial pivoting).
fn weighted_lsq(rows: &[([f64; 3], f64, f64)]) -> Option<[f64; 3]> {
    let mut m = [[0.0f64; 4]; 3];
    for (g, t, w) in rows {
        for i in 0..3 {
            for j in 0..3 {
                m[i][j] += w * g[i] * g[j];
            }
            m[i][3] += w * g[i] * t;
        }
    }
    let scale = m
        .iter()
        .map(|r| r[0].abs().max(r[1].abs()).max(r[2].abs()))
        .fold(0.0, f64::max);
    #[allow(clippy::needless_range_loop)] // Gaussian elimination reads clearest by index
    for col in 0..3 {
        let piv = (col..3).max_by(|&a, &b| m[a][col].abs().total_cmp(&m[b][col].abs()))?;
        if m[piv][col].abs() <= 1e-14 * scale.max(1e-300) {
            return None;
        }
        m.swap(col, piv);
        for r in 0..3 {
            if r != col {
                let f = m[r][col] / m[col][col];
                for c in col..4 {
                    m[r][c] -= f * m[col][c];
                }
            }
        }
    }
    let x = [m[0][3] / m[0][0], m[1][3] / m[1][1], m[2][3] / m[2][2]];
    x.iter().all(|v| v.is_finite()).then_some(x)
}

/// The root-mean-square of `residuals` (0 for none).
pub fn rms(residuals: impl Iterator<Item = f64>) -> f64 {
    let (s, n) = residuals.fold((0.0, 0usize), |(s, n), r| (s + r * r, n + 1));
    if n == 0 {
        0.0
    } else {
        (s / n as f64).sqrt()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    // w = 10 mm (1 + ε2/ε1) (ISO 12004-2, from memory): 5, 10 and 20 mm for uniaxial, plane
    // strain and equibiaxial; the clamp (ours) holds it within 3 to 20 mm.
    #[test]
    fn window_width_follows_the_strain_ratio() {
        assert_abs_diff_eq!(window_width(-0.5), 5.0, epsilon = 1e-12);
        assert_abs_diff_eq!(window_width(0.0), 10.0, epsilon = 1e-12);
        assert_abs_diff_eq!(window_width(1.0), 20.0, epsilon = 1e-12);
        assert_abs_diff_eq!(window_width(-0.9), 3.0, epsilon = 1e-12);
        assert_abs_diff_eq!(window_width(1.4), 20.0, epsilon = 1e-12);
    }

    // The divided difference is exact for a parabola (any numerical-analysis text): y = 3x²
    // has y'' = 6 at every inner point, however unevenly spaced.
    #[test]
    fn second_derivative_is_exact_for_a_parabola() {
        let x = [0.0, 0.4, 1.1, 1.5, 2.6];
        let y: Vec<f64> = x.iter().map(|v| 3.0 * v * v).collect();
        let d2 = second_derivative(&x, &y);
        assert!(d2[0].is_none() && d2[4].is_none());
        for v in &d2[1..4] {
            assert_abs_diff_eq!(v.unwrap(), 6.0, epsilon = 1e-9);
        }
    }

    // Points on 1/(a u² + b u + c) give back a, b and c (the model is exact, so least squares
    // must reproduce it), and the value at the crack is 1/c.
    #[test]
    fn inverse_parabola_fit_recovers_its_coefficients() {
        let (a, b, c) = (0.02, 0.01, 3.0);
        let u: Vec<f64> = (0..20).map(|i| -9.0 + i as f64 * 0.9).collect();
        let y: Vec<f64> = u.iter().map(|u| 1.0 / (a * u * u + b * u + c)).collect();
        let f = fit_inverse_parabola(&u, &y).unwrap();
        assert_abs_diff_eq!(f.a, a, epsilon = 1e-9);
        assert_abs_diff_eq!(f.b, b, epsilon = 1e-9);
        assert_abs_diff_eq!(f.at(0.0).unwrap(), 1.0 / c, epsilon = 1e-12);
        assert_abs_diff_eq!(f.apex().unwrap(), -b / (2.0 * a), epsilon = 1e-6);
        let p = fit_parabola(
            &u,
            &u.iter().map(|u| 2.0 * u * u - u + 0.5).collect::<Vec<_>>(),
        )
        .unwrap();
        assert_abs_diff_eq!(p[0], 2.0, epsilon = 1e-9);
        assert_abs_diff_eq!(p[2], 0.5, epsilon = 1e-9);
    }

    // The crack: the middle between the measured points around the widest run of missing
    // points; without one, a spacing 2.5 times the usual; else the maximum.
    #[test]
    fn crack_from_gap_spacing_or_maximum() {
        let pts: Vec<(f64, f64)> = [0.0, 1.0, 2.0, 5.0, 6.0, 7.0]
            .iter()
            .map(|&x| (x, 0.3 - 0.01 * (x - 2.0f64).abs()))
            .collect();
        let (x, by) = crack_position(&pts, &[3.0, 4.0]).unwrap();
        assert_abs_diff_eq!(x, 3.5, epsilon = 1e-12);
        assert_eq!(by, CrackBy::Gap);
        let (x, by) = crack_position(&pts, &[]).unwrap();
        assert_abs_diff_eq!(x, 3.5, epsilon = 1e-12);
        assert_eq!(by, CrackBy::Spacing);
        let even: Vec<(f64, f64)> = (0..8)
            .map(|i| (i as f64, -((i as f64 - 5.0).powi(2))))
            .collect();
        let (x, by) = crack_position(&even, &[]).unwrap();
        assert_abs_diff_eq!(x, 5.0, epsilon = 1e-12);
        assert_eq!(by, CrackBy::Maximum);
    }
}
