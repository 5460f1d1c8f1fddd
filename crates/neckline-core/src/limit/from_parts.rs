//! A press-shop forming-limit curve from circles read on necked or split parts.
//!
//! The circles across and beside a neck are marked `safe`, `necked` or `split` (see
//! [`crate::condition`]). The press-shop curve is the boundary between the safe circles and the
//! necked-or-split ones (a necked or split circle counts as at or above the limit); ISO 12004-1
//! describes such curves (from memory). It holds for one material lot, thickness and process.
//!
//! # Method: penalised logistic likelihood
//!
//! The curve is piecewise linear in true strain, `ε1 = f(ε2) = Σ θk φk(ε2)` with hat functions
//! `φk` at knots `xk` spread over the observed minor strain: the two ends of the observed range
//! and every multiple of the knot spacing `h` between them (so that one knot sits at plane
//! strain, where a forming-limit curve has its lowest point and its bend; a multiple closer than
//! `h/4` to an end is left out). A circle at `(ε2, ε1)` has the signed distance
//! `d = ε1 − f(ε2)` (vertical, in true major strain: how a press shop reads a margin), and
//! is taken as necked-or-split with probability `σ(d/s)`, `σ(t) = 1/(1 + e^−t)`: the logistic
//! model of a boundary blurred by reading scatter and by part-to-part variation over a width of
//! about `s`. The knot values minimise
//!
//! `J(θ; s) = Σi ln(1 + exp(−yi di/s)) + λ Σk Δk²`,
//!
//! `yi = +1` necked or split, `−1` safe; `Δk` the change of slope of `f` at interior knot `k`
//! (a smoothness penalty that only bends the curve where the data ask for it and carries it
//! straight over knots without evidence). For fixed `s`, `J` is convex in `θ` (a sum of
//! softplus functions of affine maps plus a positive semi-definite quadratic), so Newton's method
//! with a backtracking line search ([`minimise`]) finds its one minimum (Nocedal & Wright 2006,
//! *Numerical Optimization*, ch. 3). The scale `s` is found by profiling: `J` is minimised on a
//! geometric grid of `s` (ratio 1.1) from 20 % down to a floor `s_min`, the smallest scatter a
//! reading can resolve; the best `s` is kept. Where safe and necked circles are cleanly apart,
//! `J` keeps falling as `s` shrinks and `s` stops at the floor: the curve then runs through the
//! gap, away from both sides, as a soft-margin separator would.
//!
//! Why this rather than a maximum-margin linear programme: it uses every circle, not only those
//! nearest the boundary, so one misread circle moves the curve by a bounded amount; it gives the
//! boundary's width `s` as a number the user can read (a circle `s` above the curve is e ≈ 2.7
//! times as likely necked as safe); and it needs only a small dense Newton solve, no LP solver.
//!
//! # Balance and the written curve
//!
//! Each kind of circle carries half the total weight ([`class_weights`]), so the 50 % line does
//! not move with the share of safe circles. The curve written is a lower bound: the
//! [`CONSERVATIVE_LEVEL`] necking line less [`CONFIDENCE_Z`] standard errors of the 50 % line
//! (sandwich covariance), marked `supported` where both kinds of circle bracket it
//! ([`supported_range`]); [`study`] is the recovery study behind these choices.
//!
//! # Evidence
//!
//! A fit is refused with fewer than [`MIN_EACH`] safe and [`MIN_EACH`] necked-or-split circles,
//! or when fewer than [`MIN_RANGES`] ranges of minor strain (the spans `[k·h, (k+1)·h)` between
//! knots at multiples of the spacing) hold both a safe and a necked-or-split circle.
//!
//! # Overlap
//!
//! Each circle belongs to its nearest knot. Per knot the report gives the counts, the circles on
//! the wrong side of the fitted curve (safe on or above it, necked or split below it), and the
//! band where the two kinds mix: from the lowest necked-or-split circle to the highest safe one,
//! measured from the curve and placed at the knot. When the highest safe circle is below the
//! lowest necked one they do not mix, and the band is the gap in which the curve could lie.

use crate::condition::Condition;
use nalgebra::{DMatrix, DVector};
use rayon::prelude::*;

/// Circles per task when the objective is summed on every core (fixed, so that the sums come
/// out the same on any number of cores).
const CIRCLES_PER_TASK: usize = 8192;

/// At least this many safe circles, and as many necked-or-split ones, are needed for a fit.
pub const MIN_EACH: usize = 10;
/// At least this many ranges of minor strain must hold both a safe and a necked-or-split circle.
pub const MIN_RANGES: usize = 3;
/// Largest logistic scale tried, true strain.
pub const SCALE_MAX: f64 = 0.2;
/// Ratio of neighbouring scales in the profile over `s`.
pub const SCALE_RATIO: f64 = 1.1;
/// The necking probability of the written (conservative) line: 5 %. A circle on it is necked
/// one time in twenty by the fitted model; the figure follows the lower 5 % fractile that
/// lower-bound design values are commonly set at (common practice).
pub const CONSERVATIVE_LEVEL: f64 = 0.05;
/// One-sided 95 % point of the standard normal distribution, 1.645 (normal table): the
/// confidence allowance below the 5 % line is this many standard errors of the 50 % line.
pub const CONFIDENCE_Z: f64 = 1.645;
/// Half-width of the band about the 50 % line in which a circle counts as near the boundary:
/// 5 % true major strain, about three times the ±1-2 % reading error of a tape (from memory):
/// farther away, a circle's kind says nothing about where the boundary lies.
pub const NEAR_BAND: f64 = 0.05;
/// Fewest circles of each kind near the boundary before the fit is flagged: 20. The written
/// line is the 5 % line, a 1-in-20 fractile: with fewer than 20 circles of a kind near the
/// boundary, not even one of them is expected beyond that line, so the level rests on the
/// model's shape rather than on circles.
pub const NEAR_MIN: usize = 20;
/// Two circles count as at about the same minor strain within 1 % true strain (twice the 0.5 %
/// an optical reading resolves, from memory).
pub const CONTRA_MINOR: f64 = 0.01;
/// A safe circle more than 5 % true major strain above a necked-or-split one at about the same
/// minor strain contradicts it: two readings with the ±1.5 % scatter of a tape differ by more
/// than 5 % less than one time in a hundred (5/(1.5·√2) = 2.4 standard deviations, normal
/// table), so such a pair is a mislabel or a misread, not noise.
pub const CONTRA_MAJOR: f64 = 0.05;
/// Share of circles in contradictory pairs above which the fit warns: 5 %.
pub const CONTRA_SHARE: f64 = 0.05;

/// One circle read on a part: its true strains and the condition marked.
#[derive(Debug, Clone, PartialEq)]
pub struct PartCircle {
    /// Location label.
    pub id: String,
    /// True minor strain ε2.
    pub minor: f64,
    /// True major strain ε1.
    pub major: f64,
    /// What the part showed there.
    pub condition: Condition,
}

/// The settings of a fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FitSettings {
    /// Knot spacing `h`, true minor strain (also the width of an evidence range).
    pub knot_spacing: f64,
    /// Weight `λ` of the squared changes of slope at the knots.
    pub smoothing: f64,
    /// Smallest logistic scale `s`, true strain: the finest scatter a reading resolves.
    pub scale_min: f64,
    /// Weight the two kinds of circle to equal totals ([`class_weights`]); `false` weights
    /// every circle 1, the earlier fit whose line moves with the mix (kept for the study).
    pub balanced: bool,
}

impl Default for FitSettings {
    /// `h` = 5 % (minor strain ranges of a tryout are a few tens of percent, so 5-10 knots);
    /// `λ` = 0.1 (a bend of 1.5 in slope, a Keeler-Brazier-like corner at plane strain, costs as
    /// much as 0.2 of one circle's log-likelihood: the corner stays where the data put it);
    /// `s_min` = 0.5 % (an optical reading is good to about ±0.5-1 % strain, from memory).
    fn default() -> Self {
        FitSettings {
            knot_spacing: 0.05,
            smoothing: 0.1,
            scale_min: 0.005,
            balanced: true,
        }
    }
}

impl FitSettings {
    /// Check the ranges: `0.005 ≤ h ≤ 0.5`, `0 < λ ≤ 1000`, `0.0005 ≤ s_min ≤ 0.1` (true strain).
    pub fn validate(&self) -> Result<(), String> {
        if !(0.005..=0.5).contains(&self.knot_spacing) {
            return Err(format!(
                "knot spacing {} % is outside 0.5 ..= 50 % true minor strain",
                100.0 * self.knot_spacing
            ));
        }
        if !(self.smoothing > 0.0 && self.smoothing <= 1000.0) {
            return Err(format!(
                "smoothing {} is outside 0 < λ <= 1000",
                self.smoothing
            ));
        }
        if !(0.0005..=0.1).contains(&self.scale_min) {
            return Err(format!(
                "smallest scatter {} % is outside 0.05 ..= 10 % true strain",
                100.0 * self.scale_min
            ));
        }
        Ok(())
    }
}

/// How many circles of each condition.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Counts {
    /// Marked safe.
    pub safe: usize,
    /// Marked necked.
    pub necked: usize,
    /// Marked split.
    pub split: usize,
}

impl Counts {
    /// Count the circles.
    pub fn of(circles: &[PartCircle]) -> Self {
        let mut c = Counts::default();
        for p in circles {
            match p.condition {
                Condition::Safe => c.safe += 1,
                Condition::Necked => c.necked += 1,
                Condition::Split => c.split += 1,
            }
        }
        c
    }

    /// Necked and split together.
    pub fn failed(&self) -> usize {
        self.necked + self.split
    }
}

/// The ranges of minor strain `[k·h, (k+1)·h)` that hold both a safe and a necked-or-split
/// circle, as `(from, to)`, increasing.
pub fn evidence_ranges(circles: &[PartCircle], h: f64) -> Vec<(f64, f64)> {
    use std::collections::BTreeMap;
    let mut bins: BTreeMap<i64, (bool, bool)> = BTreeMap::new();
    for p in circles {
        let e = bins.entry((p.minor / h).floor() as i64).or_default();
        if p.condition.failed() {
            e.1 = true;
        } else {
            e.0 = true;
        }
    }
    bins.into_iter()
        .filter(|(_, (s, f))| *s && *f)
        .map(|(k, _)| (k as f64 * h, (k + 1) as f64 * h))
        .collect()
}

/// Refuse too little evidence, saying what is missing.
pub fn check_evidence(circles: &[PartCircle], h: f64) -> Result<Vec<(f64, f64)>, String> {
    let c = Counts::of(circles);
    let ranges = evidence_ranges(circles, h);
    let mut missing = Vec::new();
    if c.safe < MIN_EACH {
        missing.push(format!(
            "{} safe circle{} (at least {MIN_EACH} needed)",
            c.safe,
            plural(c.safe)
        ));
    }
    if c.failed() < MIN_EACH {
        missing.push(format!(
            "{} necked-or-split circle{} (at least {MIN_EACH} needed)",
            c.failed(),
            plural(c.failed())
        ));
    }
    if ranges.len() < MIN_RANGES {
        let listed: Vec<String> = ranges
            .iter()
            .map(|(a, b)| format!("{:.1} to {:.1} %", 100.0 * a, 100.0 * b))
            .collect();
        missing.push(format!(
            "both safe and necked-or-split circles on only {} range{} of minor strain{} (at \
             least {MIN_RANGES} ranges {:.1} % wide in true minor strain needed: read circles \
             across and beside necks at more strain paths)",
            ranges.len(),
            plural(ranges.len()),
            if listed.is_empty() {
                String::new()
            } else {
                format!(" ({})", listed.join(", "))
            },
            100.0 * h
        ));
    }
    if missing.is_empty() {
        Ok(ranges)
    } else {
        Err(format!(
            "too little evidence for a press-shop curve: {}",
            missing.join("; ")
        ))
    }
}

/// The class weights `(safe, necked-or-split)`: `N/(2 Ns)` and `N/(2 Nf)`, so that each kind
/// carries half of the total weight `N` whatever the mix. Unweighted, the likelihood's boundary
/// moves towards the rarer kind as the mix changes (the intercept of a logistic model carries
/// the log of the prior odds; King & Zeng 2001, *Logistic regression in rare events data*,
/// Political Analysis 9); with equal class totals the prior odds are 1 and the 50 % line
/// stays where the two kinds meet.
pub fn class_weights(c: &Counts) -> (f64, f64) {
    let n = (c.safe + c.failed()) as f64;
    let half = |k: usize| if k == 0 { 0.0 } else { n / (2.0 * k as f64) };
    (half(c.safe), half(c.failed()))
}

/// The vertical distance from the 50 % line to the line of necking probability `p` of a
/// logistic boundary of scale `s`: `s · ln(p / (1 − p))` (negative below 1/2).
pub fn level_offset(p: f64, s: f64) -> f64 {
    s * (p / (1.0 - p)).ln()
}

/// Circles of each kind within [`NEAR_BAND`] of the 50 % line: `(safe, necked-or-split)`.
pub fn near_counts(circles: &[PartCircle], knots: &[f64], majors: &[f64]) -> (usize, usize) {
    let mut n = (0, 0);
    for p in circles {
        if (p.major - eval(knots, majors, p.minor)).abs() <= NEAR_BAND {
            if p.condition.failed() {
                n.1 += 1;
            } else {
                n.0 += 1;
            }
        }
    }
    n
}

/// Contradictory labels: every pair of a necked-or-split circle and a safe circle within
/// [`CONTRA_MINOR`] of it in minor strain that lies more than [`CONTRA_MAJOR`] above it, as
/// `(necked-or-split id, safe id)`, in the order of the necked-or-split circles' minor strain.
pub fn contradictions(circles: &[PartCircle]) -> Vec<(String, String)> {
    let mut safe: Vec<&PartCircle> = circles.iter().filter(|p| !p.condition.failed()).collect();
    safe.sort_by(|a, b| a.minor.total_cmp(&b.minor));
    let mut failed: Vec<&PartCircle> = circles.iter().filter(|p| p.condition.failed()).collect();
    failed.sort_by(|a, b| a.minor.total_cmp(&b.minor));
    let mut out = Vec::new();
    for f in failed {
        let from = safe.partition_point(|p| p.minor < f.minor - CONTRA_MINOR);
        for p in safe[from..]
            .iter()
            .take_while(|p| p.minor <= f.minor + CONTRA_MINOR)
        {
            if p.major - f.major > CONTRA_MAJOR {
                out.push((f.id.clone(), p.id.clone()));
            }
        }
    }
    out
}

/// The ids of the circles in `pairs`, each once, in order of first appearance.
pub fn contradicted_ids(pairs: &[(String, String)]) -> Vec<String> {
    let mut seen = std::collections::BTreeSet::new();
    let mut ids = Vec::new();
    for (a, b) in pairs {
        for id in [a, b] {
            if seen.insert(id.as_str()) {
                ids.push(id.clone());
            }
        }
    }
    ids
}

/// The supported part of the curve, true minor strain: from the first to the last knot whose
/// nearest circles hold both kinds; `None` when no knot does.
pub fn supported_range(overlap: &[KnotReport]) -> Option<(f64, f64)> {
    let mut both = overlap.iter().filter(|r| r.band != Band::OneSided);
    let first = both.next()?.minor;
    let last = both.next_back().map_or(first, |r| r.minor);
    Some((first, last))
}

fn plural(n: usize) -> &'static str {
    if n == 1 {
        ""
    } else {
        "s"
    }
}

/// Knots over `[lo, hi]`: both ends and every multiple of `h` between them that is at least
/// `h/4` from an end. At least two knots when `hi > lo`.
pub fn knots(lo: f64, hi: f64, h: f64) -> Vec<f64> {
    let mut v = vec![lo];
    let first = (lo / h).ceil() as i64;
    let last = (hi / h).floor() as i64;
    for k in first..=last {
        let x = k as f64 * h;
        if x - lo >= h / 4.0 && hi - x >= h / 4.0 {
            v.push(x);
        }
    }
    v.push(hi);
    v
}

/// The piece of the hat basis at `x`: `f(x) = (1 − w) θi + w θ(i+1)`, as `(i, w)`.
fn piece(knots: &[f64], x: f64) -> (usize, f64) {
    let n = knots.len();
    let i = knots.partition_point(|k| *k <= x).clamp(1, n - 1) - 1;
    let w = (x - knots[i]) / (knots[i + 1] - knots[i]);
    (i, w.clamp(0.0, 1.0))
}

/// The piecewise-linear curve through `(knots, values)` at `x` (clamped to the ends).
pub fn eval(knots: &[f64], values: &[f64], x: f64) -> f64 {
    let (i, w) = piece(knots, x);
    (1.0 - w) * values[i] + w * values[i + 1]
}

/// `ln(1 + e^t)` without overflow.
fn softplus(t: f64) -> f64 {
    if t > 0.0 {
        t + (-t).exp().ln_1p()
    } else {
        t.exp().ln_1p()
    }
}

/// `1/(1 + e^−t)` without overflow.
fn sigmoid(t: f64) -> f64 {
    if t >= 0.0 {
        1.0 / (1.0 + (-t).exp())
    } else {
        let e = t.exp();
        e / (1.0 + e)
    }
}

/// The rows of the slope-change operator: `Δk = (θk+1 − θk)/(xk+1 − xk) − (θk − θk−1)/(xk − xk−1)`.
fn slope_changes(knots: &[f64]) -> DMatrix<f64> {
    let n = knots.len();
    let mut d = DMatrix::zeros(n.saturating_sub(2), n);
    for k in 1..n.saturating_sub(1) {
        let (a, b) = (knots[k] - knots[k - 1], knots[k + 1] - knots[k]);
        d[(k - 1, k - 1)] = 1.0 / a;
        d[(k - 1, k)] = -1.0 / a - 1.0 / b;
        d[(k - 1, k + 1)] = 1.0 / b;
    }
    d
}

/// One part of the circles' sums: value, gradient, and the Hessian's diagonal and first
/// off-diagonal.
type Sums = (f64, Vec<f64>, Vec<f64>, Vec<f64>);

/// The fitting problem for one set of circles and knots.
struct Problem {
    /// Per circle: basis piece, true major strain, label ±1, class weight.
    rows: Vec<(usize, f64, f64, f64, f64)>,
    n: usize,
    /// `λ DᵀD`.
    penalty: DMatrix<f64>,
}

impl Problem {
    fn new(circles: &[PartCircle], knots: &[f64], smoothing: f64, balanced: bool) -> Self {
        let (safe_w, failed_w) = if balanced {
            class_weights(&Counts::of(circles))
        } else {
            (1.0, 1.0)
        };
        let rows = circles
            .iter()
            .map(|p| {
                let (i, w) = piece(knots, p.minor);
                let (y, c) = if p.condition.failed() {
                    (1.0, failed_w)
                } else {
                    (-1.0, safe_w)
                };
                (i, w, p.major, y, c)
            })
            .collect();
        let d = slope_changes(knots);
        Problem {
            rows,
            n: knots.len(),
            penalty: d.transpose() * d * smoothing,
        }
    }

    /// `J(θ; s)`, its gradient and Hessian. The circles' terms are summed on every core, each
    /// part into the two bands of the Hessian they touch (a circle's basis has two neighbouring
    /// knots), then added to the penalty's.
    fn value_gradient_hessian(
        &self,
        theta: &DVector<f64>,
        s: f64,
    ) -> (f64, DVector<f64>, DMatrix<f64>) {
        let n = self.n;
        // Fixed parts summed in order: the same sums whatever the number of cores.
        let parts: Vec<Sums> = self
            .rows
            .par_chunks(CIRCLES_PER_TASK)
            .map(|rows| {
                let (mut j, mut g, mut diag, mut off) =
                    (0.0, vec![0.0; n], vec![0.0; n], vec![0.0; n]);
                for &(i, w, major, y, c) in rows {
                    let f = (1.0 - w) * theta[i] + w * theta[i + 1];
                    let z = y * (major - f) / s;
                    j += c * softplus(-z);
                    // dJ/dθ = c σ(−z) · y/s · φ;  d²J/dθ² = c σ(z)σ(−z)/s² · φφᵀ.
                    let gi = c * sigmoid(-z) * y / s;
                    let hi = c * sigmoid(z) * sigmoid(-z) / (s * s);
                    g[i] += gi * (1.0 - w);
                    g[i + 1] += gi * w;
                    diag[i] += hi * (1.0 - w) * (1.0 - w);
                    diag[i + 1] += hi * w * w;
                    off[i] += hi * (1.0 - w) * w;
                }
                (j, g, diag, off)
            })
            .collect();
        let (mut jc, mut gc, mut diag, mut off) = (0.0, vec![0.0; n], vec![0.0; n], vec![0.0; n]);
        for (j, g, d, o) in parts {
            jc += j;
            for k in 0..n {
                gc[k] += g[k];
                diag[k] += d[k];
                off[k] += o[k];
            }
        }
        let pt = &self.penalty * theta;
        let j = theta.dot(&pt) + jc;
        let g = pt * 2.0 + DVector::from_vec(gc);
        let mut h = &self.penalty * 2.0;
        for a in 0..n {
            h[(a, a)] += diag[a];
            if a + 1 < n {
                h[(a, a + 1)] += off[a];
                h[(a + 1, a)] += off[a];
            }
        }
        (j, g, h)
    }

    /// The sandwich covariance of the knot values at a minimum, `H⁻¹ G H⁻¹`: `H` the Hessian
    /// of `J` (penalty included), `G = Σ ci² gi giᵀ` the outer products of the circles' score
    /// terms. With weights the plain inverse Hessian understates the spread; the sandwich form
    /// holds for a weighted likelihood (White 1982, *Maximum likelihood estimation of
    /// misspecified models*, Econometrica 50). `None` when `H` is singular.
    fn covariance(&self, theta: &DVector<f64>, s: f64) -> Option<DMatrix<f64>> {
        let (_, _, h) = self.value_gradient_hessian(theta, s);
        let mut g = DMatrix::zeros(self.n, self.n);
        for &(i, w, major, y, c) in &self.rows {
            let f = (1.0 - w) * theta[i] + w * theta[i + 1];
            let z = y * (major - f) / s;
            let gi = c * sigmoid(-z) * y / s;
            let phi = [(i, 1.0 - w), (i + 1, w)];
            for &(a, pa) in &phi {
                for &(b, pb) in &phi {
                    g[(a, b)] += gi * gi * pa * pb;
                }
            }
        }
        let hinv = h.cholesky()?.inverse();
        Some(&hinv * g * &hinv)
    }

    /// `J(θ; s)` alone (for the line search).
    fn value(&self, theta: &DVector<f64>, s: f64) -> f64 {
        let parts: Vec<f64> = self
            .rows
            .par_chunks(CIRCLES_PER_TASK)
            .map(|rows| {
                let mut j = 0.0;
                for &(i, w, major, y, c) in rows {
                    let f = (1.0 - w) * theta[i] + w * theta[i + 1];
                    j += c * softplus(-y * (major - f) / s);
                }
                j
            })
            .collect();
        let jc: f64 = parts.iter().sum();
        theta.dot(&(&self.penalty * theta)) + jc
    }
}

/// What [`minimise`] found.
#[derive(Debug, Clone, PartialEq)]
pub struct Minimum {
    /// The minimiser.
    pub x: DVector<f64>,
    /// The value there.
    pub value: f64,
    /// Newton steps taken.
    pub iterations: usize,
    /// Whether the Newton decrement fell below the tolerance.
    pub converged: bool,
}

/// Minimise a smooth convex function by Newton's method with a backtracking (Armijo) line search
/// (Nocedal & Wright 2006, *Numerical Optimization*, algorithms 3.1 and 3.2 with the Newton
/// direction). `vgh(x)` returns the value, gradient and Hessian; `value(x)` the value alone. A
/// Hessian that is not positive definite is shifted by `μI` (μ growing tenfold from 1e-10 of its
/// largest diagonal entry) until its Cholesky factor exists. Stops when the Newton decrement
/// `−gᵀδ` is below `tol · max(1, |f|)` (relative to the value, so that a sum over many terms
/// stops at the same relative precision as a small one) or after `max_iter` steps.
pub fn minimise(
    vgh: impl Fn(&DVector<f64>) -> (f64, DVector<f64>, DMatrix<f64>),
    value: impl Fn(&DVector<f64>) -> f64,
    x0: DVector<f64>,
    tol: f64,
    max_iter: usize,
) -> Minimum {
    let mut x = x0;
    for it in 0..max_iter {
        let (f, g, h) = vgh(&x);
        let step = newton_step(&h, &g);
        let decrement = -g.dot(&step);
        // A NaN decrement (a broken function) also stops here.
        if decrement.is_nan() || decrement <= tol * f.abs().max(1.0) {
            return Minimum {
                x,
                value: f,
                iterations: it,
                converged: !decrement.is_nan(),
            };
        }
        let mut t = 1.0;
        let mut moved = false;
        while t > 1e-12 {
            let trial = &x + &step * t;
            let ft = value(&trial);
            if ft <= f - 1e-4 * t * decrement {
                x = trial;
                moved = true;
                break;
            }
            t *= 0.5;
        }
        if !moved {
            return Minimum {
                value: f,
                x,
                iterations: it,
                converged: false,
            };
        }
    }
    let value_at = value(&x);
    Minimum {
        x,
        value: value_at,
        iterations: max_iter,
        converged: false,
    }
}

/// The Newton direction `−H⁻¹g`, shifting `H` by `μI` until it is positive definite.
fn newton_step(h: &DMatrix<f64>, g: &DVector<f64>) -> DVector<f64> {
    let scale = h.diagonal().amax().max(1e-300);
    let mut mu = 0.0;
    loop {
        let shifted = h + DMatrix::identity(h.nrows(), h.ncols()) * mu;
        if let Some(c) = shifted.cholesky() {
            return -c.solve(g);
        }
        mu = if mu > 0.0 { mu * 10.0 } else { 1e-10 * scale };
        if mu > 1e10 * scale {
            return -g.clone();
        }
    }
}

/// The band at one knot where safe and necked-or-split circles meet.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Band {
    /// They mix between these true major strains (lowest necked-or-split, highest safe).
    Mix(f64, f64),
    /// They do not mix: the gap between the highest safe and the lowest necked-or-split circle.
    Gap(f64, f64),
    /// Only one kind of circle, or none, near this knot.
    OneSided,
}

/// What the circles nearest one knot say.
#[derive(Debug, Clone, PartialEq)]
pub struct KnotReport {
    /// Knot minor strain, true.
    pub minor: f64,
    /// Fitted major strain there, true.
    pub major: f64,
    /// Circles nearest this knot, per condition.
    pub counts: Counts,
    /// Safe circles on or above the fitted curve.
    pub safe_above: usize,
    /// Necked or split circles below it.
    pub failed_below: usize,
    /// Where the two kinds meet.
    pub band: Band,
}

impl KnotReport {
    /// Circles on the wrong side of the fitted curve.
    pub fn wrong_side(&self) -> usize {
        self.safe_above + self.failed_below
    }
}

/// A fitted press-shop curve.
#[derive(Debug, Clone, PartialEq)]
pub struct PartsFit {
    /// Knot minor strains, true, increasing.
    pub knots: Vec<f64>,
    /// The 50 % line (the fitted boundary) at the knots, true major strain.
    pub majors: Vec<f64>,
    /// The conservative line at the knots, true major strain: the line of necking probability
    /// [`PartsFit::level`] less a one-sided 95 % allowance for the fit's own uncertainty,
    /// `majors + s · ln(level/(1 − level)) − z · se` ([`CONFIDENCE_Z`]). This is the curve
    /// written.
    pub conservative: Vec<f64>,
    /// Necking probability of the conservative line.
    pub level: f64,
    /// Standard error of the 50 % line at each knot, true strain (sandwich covariance).
    pub standard_error: Vec<f64>,
    /// True minor strain range where both kinds of circle lie (see [`supported_range`]).
    pub supported: Option<(f64, f64)>,
    /// Circles within [`NEAR_BAND`] of the 50 % line: `(safe, necked-or-split)`.
    pub near: (usize, usize),
    /// Contradictory pairs `(necked-or-split id, safe id)` (see [`contradictions`]).
    pub contradictions: Vec<(String, String)>,
    /// The fitted logistic scale `s`, true strain.
    pub scale: f64,
    /// Whether `s` stopped at the floor (the two kinds do not overlap enough to measure it).
    pub scale_at_floor: bool,
    /// The minimised objective.
    pub objective: f64,
    /// Circles per condition.
    pub counts: Counts,
    /// The ranges of minor strain with both kinds of circle.
    pub evidence: Vec<(f64, f64)>,
    /// Per knot: counts, wrong side, band.
    pub overlap: Vec<KnotReport>,
    /// The settings used.
    pub settings: FitSettings,
}

impl PartsFit {
    /// Circles on the wrong side of the fitted curve, in all.
    pub fn wrong_side(&self) -> usize {
        self.overlap.iter().map(KnotReport::wrong_side).sum()
    }

    /// The 50 % line's true major strain at true minor strain `x` (clamped to the knots).
    pub fn major_at(&self, x: f64) -> f64 {
        eval(&self.knots, &self.majors, x)
    }

    /// The conservative line's true major strain at true minor strain `x` (clamped).
    pub fn conservative_at(&self, x: f64) -> f64 {
        eval(&self.knots, &self.conservative, x)
    }

    /// The conservative line `[minor, major]` in percent true strain: the curve file's points.
    pub fn points_pct(&self) -> Vec<[f64; 2]> {
        pct(&self.knots, &self.conservative)
    }

    /// The 50 % line `[minor, major]` in percent true strain (information in the curve file).
    pub fn median_pct(&self) -> Vec<[f64; 2]> {
        pct(&self.knots, &self.majors)
    }

    /// Share of the circles that are in contradictory pairs.
    pub fn contradicted_share(&self) -> f64 {
        let n = self.counts.safe + self.counts.failed();
        contradicted_ids(&self.contradictions).len() as f64 / n.max(1) as f64
    }

    /// What the user should be told about the evidence: too few circles of a kind near the
    /// boundary, contradictory labels above [`CONTRA_SHARE`] (with ids), unsupported ends.
    pub fn flags(&self) -> Vec<String> {
        let mut v = Vec::new();
        let (ns, nf) = self.near;
        if ns < NEAR_MIN || nf < NEAR_MIN {
            v.push(format!(
                "few circles near the boundary: {ns} safe and {nf} necked-or-split within {} % \
                 true major strain of the 50 % line (at least {NEAR_MIN} of each wanted: the \
                 written line is the {} % necking line, and with fewer than {NEAR_MIN} circles \
                 of a kind not one of them is expected beyond it); read more circles across and \
                 beside necks",
                100.0 * NEAR_BAND,
                100.0 * self.level
            ));
        }
        let share = self.contradicted_share();
        if share > CONTRA_SHARE {
            let ids = contradicted_ids(&self.contradictions);
            const SHOWN: usize = 12;
            let mut listed: Vec<String> = self
                .contradictions
                .iter()
                .take(SHOWN)
                .map(|(f, s)| format!("{f} below {s}"))
                .collect();
            if self.contradictions.len() > SHOWN {
                listed.push(format!(
                    "and {} more pairs",
                    self.contradictions.len() - SHOWN
                ));
            }
            v.push(format!(
                "contradictory labels: {} of {} circles ({:.1} %, more than {} %) are in pairs \
                 where a necked or split circle lies more than {} % true major strain below a \
                 safe one within {} % minor strain: {}; check their marks and readings",
                ids.len(),
                self.counts.safe + self.counts.failed(),
                100.0 * share,
                100.0 * CONTRA_SHARE,
                100.0 * CONTRA_MAJOR,
                100.0 * CONTRA_MINOR,
                listed.join(", ")
            ));
        }
        let (lo, hi) = (self.knots[0], self.knots[self.knots.len() - 1]);
        match self.supported {
            Some((a, b)) if a > lo || b < hi => v.push(format!(
                "only one kind of circle near the curve's ends: supported from {:.2} to {:.2} % \
                 true minor strain of {:.2} to {:.2} % (the file's `supported`; check warns for \
                 locations judged beyond it)",
                100.0 * a,
                100.0 * b,
                100.0 * lo,
                100.0 * hi
            )),
            _ => {}
        }
        v
    }
}

fn pct(knots: &[f64], majors: &[f64]) -> Vec<[f64; 2]> {
    knots
        .iter()
        .zip(majors)
        .map(|(x, y)| [100.0 * x, 100.0 * y])
        .collect()
}

/// Fit the press-shop curve to the circles, or say why the evidence is too little.
pub fn fit(circles: &[PartCircle], settings: &FitSettings) -> Result<PartsFit, String> {
    settings.validate()?;
    let h = settings.knot_spacing;
    let evidence = check_evidence(circles, h)?;
    let (lo, hi) = circles
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| {
            (a.min(p.minor), b.max(p.minor))
        });
    let knots = knots(lo, hi, h);
    let problem = Problem::new(circles, &knots, settings.smoothing, settings.balanced);
    let mean = |failed: bool| {
        let v: Vec<f64> = circles
            .iter()
            .filter(|p| p.condition.failed() == failed)
            .map(|p| p.major)
            .collect();
        v.iter().sum::<f64>() / v.len() as f64
    };
    let mut theta = DVector::from_element(problem.n, 0.5 * (mean(true) + mean(false)));
    let mut best: Option<(f64, f64, DVector<f64>)> = None;
    let mut s = SCALE_MAX;
    // From wide to narrow, each solve starting from the last: the wide problems are the best
    // conditioned, and each narrower one starts near its answer.
    while s >= settings.scale_min * (1.0 - 1e-9) {
        let m = minimise(
            |t| problem.value_gradient_hessian(t, s),
            |t| problem.value(t, s),
            theta.clone(),
            1e-12,
            200,
        );
        theta = m.x.clone();
        if best.as_ref().is_none_or(|b| m.value < b.0) {
            best = Some((m.value, s, m.x));
        }
        s /= SCALE_RATIO;
    }
    let (objective, scale, theta) = best.ok_or("no scale was tried")?;
    let majors: Vec<f64> = theta.iter().copied().collect();
    let overlap = overlap(circles, &knots, &majors);
    let shift = level_offset(CONSERVATIVE_LEVEL, scale);
    let se: Vec<f64> = problem.covariance(&theta, scale).map_or_else(
        || vec![0.0; majors.len()],
        |c| c.diagonal().iter().map(|v| v.max(0.0).sqrt()).collect(),
    );
    Ok(PartsFit {
        conservative: majors
            .iter()
            .zip(&se)
            .map(|(m, e)| m + shift - CONFIDENCE_Z * e)
            .collect(),
        standard_error: se,
        level: CONSERVATIVE_LEVEL,
        supported: supported_range(&overlap),
        near: near_counts(circles, &knots, &majors),
        contradictions: contradictions(circles),
        scale_at_floor: scale < settings.scale_min * SCALE_RATIO,
        knots,
        majors,
        scale,
        objective,
        counts: Counts::of(circles),
        evidence,
        overlap,
        settings: *settings,
    })
}

/// The per-knot report: each circle belongs to its nearest knot.
pub fn overlap(circles: &[PartCircle], knots: &[f64], majors: &[f64]) -> Vec<KnotReport> {
    let mut out: Vec<(KnotReport, f64, f64)> = knots
        .iter()
        .zip(majors)
        .map(|(&minor, &major)| {
            let r = KnotReport {
                minor,
                major,
                counts: Counts::default(),
                safe_above: 0,
                failed_below: 0,
                band: Band::OneSided,
            };
            (r, f64::NEG_INFINITY, f64::INFINITY)
        })
        .collect();
    for p in circles {
        let k = nearest(knots, p.minor);
        let d = p.major - eval(knots, majors, p.minor);
        let (r, highest_safe, lowest_failed) = &mut out[k];
        match p.condition {
            Condition::Safe => r.counts.safe += 1,
            Condition::Necked => r.counts.necked += 1,
            Condition::Split => r.counts.split += 1,
        }
        if p.condition.failed() {
            *lowest_failed = lowest_failed.min(d);
            r.failed_below += usize::from(d < 0.0);
        } else {
            *highest_safe = highest_safe.max(d);
            r.safe_above += usize::from(d >= 0.0);
        }
    }
    out.into_iter()
        .map(|(mut r, hs, lf)| {
            r.band = if r.counts.safe == 0 || r.counts.failed() == 0 {
                Band::OneSided
            } else if hs > lf {
                Band::Mix(r.major + lf, r.major + hs)
            } else {
                Band::Gap(r.major + hs, r.major + lf)
            };
            r
        })
        .collect()
}

fn nearest(knots: &[f64], x: f64) -> usize {
    let (i, w) = piece(knots, x);
    if w > 0.5 {
        i + 1
    } else {
        i
    }
}

pub mod study;
#[cfg(test)]
mod tests;
