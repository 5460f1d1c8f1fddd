//! One Marciniak-Kuczynski run: a bulk region on a straight strain path and a groove at one initial
//! angle, stepped until the groove localises.
//!
//! Frame: x along the bulk's major strain, which is the rolling direction (the material axes are
//! the principal axes of the straight path, so the bulk carries no shear). The groove's normal is
//! at `ψ` to x; it turns with the bulk as a material line's normal does:
//! `tan ψ = tan ψ0 · exp(ε1 − ε2)` (Marciniak & Kuczynski 1967; Hutchinson & Neale 1978).
//!
//! In the groove frame (n normal to the groove, t along it) each step solves, for the bulk's major
//! strain increment `a` and the groove's increments `dε_nn`, `dγ_nt` (the groove's effective strain
//! increment `h` is prescribed, so a localising groove needs ever smaller bulk steps):
//!
//! - compatibility: `dε_tt(groove) = dε_tt(bulk)`;
//! - equilibrium of the normal and the shear force per unit length across the groove:
//!   `σ_nn(groove) t(groove) = σ_nn(bulk) t(bulk)`, `σ_nt(groove) t(groove) = σ_nt(bulk) t(bulk)`,
//!   with `t(groove)/t(bulk) = f0 exp(ε3(groove) − ε3(bulk))`;
//! - the prescribed groove increment: `dε̄(groove) = h`.
//!
//! Both regions follow rate-independent flow theory with Hill 1948 and Swift hardening
//! `σ̄ = K (ε0 + ε̄)ⁿ`; stresses are taken at the end of the step (backward Euler). K cancels from
//! every equation, so the limit does not depend on it. Newton's method with the exact Jacobian
//! solves each step; a step that does not converge is an error, never a point on the curve.

use super::hill48::{mat_vec, Hill48, Mat3};

/// The bulk's straight path: strain ratio ρ = dε2/dε1 along the material axes.
#[derive(Debug, Clone, Copy)]
pub struct Bulk {
    /// Strain ratio ρ = dε2/dε1.
    pub rho: f64,
    /// Stress ratio α = σ2/σ1 that drives ρ under Hill 1948.
    pub alpha: f64,
    /// σ1/σ̄ of the bulk.
    pub s1: f64,
    /// dε̄/dε1 of the bulk.
    pub k: f64,
}

impl Bulk {
    /// The bulk path of ratio `rho` for yield function `y`. From the flow rule
    /// `ρ = (−H + (F + H)α) / ((G + H) − Hα)`, so `α = (ρ(G + H) + H) / ((F + H) + ρH)`.
    pub fn new(y: &Hill48, rho: f64) -> Self {
        let alpha = (rho * (y.g + y.h) + y.h) / ((y.f + y.h) + rho * y.h);
        let s1 = 1.0 / y.effective_stress([1.0, alpha, 0.0]);
        let k = y.effective_strain([1.0, rho, 0.0]);
        Bulk { rho, alpha, s1, k }
    }
}

/// The material of a run, with K left out (it cancels).
#[derive(Debug, Clone, Copy)]
pub struct Model {
    /// Yield function.
    pub yield_fn: Hill48,
    /// Hardening exponent n.
    pub n: f64,
    /// Swift pre-strain ε0.
    pub eps0: f64,
    /// Initial groove-to-bulk thickness ratio f0.
    pub f0: f64,
}

/// Numerical settings of one run.
#[derive(Debug, Clone, Copy)]
pub struct RunSettings {
    /// Groove effective strain increment per step.
    pub step: f64,
    /// Localisation when groove/bulk effective strain increment reaches this ratio.
    pub ratio: f64,
    /// Stop (without localising) once the bulk major strain passes this value.
    pub bound: f64,
    /// Newton tolerance on the unknowns, relative to `step`.
    pub tol: f64,
    /// Newton iterations allowed per step.
    pub max_iter: usize,
}

/// How a run ended.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum RunEnd {
    /// The groove localised with the bulk at major true strain `major`; the groove normal was then
    /// at `psi` radians to the major direction; `steps` steps were taken.
    Localised {
        /// Bulk major true strain at localisation.
        major: f64,
        /// Groove normal angle at localisation, radians.
        psi: f64,
        /// Steps taken.
        steps: usize,
    },
    /// The bulk passed `bound` before the groove localised.
    Beyond,
}

/// Newton failed on a step.
#[derive(Debug, Clone, PartialEq)]
pub struct NoConvergence {
    /// Step number (1-based).
    pub step: usize,
    /// Bulk major strain at the start of the step.
    pub major: f64,
    /// Largest residual at the last iteration; `None` when the run used up its step budget.
    pub residual: Option<f64>,
}

/// Groove-frame matrices of one step (they depend only on the groove angle).
struct Frame {
    /// Quadratic form of dε̄² on groove increments `(dε_nn, dε_tt, dγ_nt)`.
    q: Mat3,
    /// Groove stress `(σ_nn, σ_nt)/σ̄` per groove increment: rows of `S P⁻¹ T`.
    m: [[f64; 3]; 2],
    /// Bulk `dε_tt / dε1`.
    m_tt: f64,
    /// Bulk `σ_nn/σ̄` and `σ_nt/σ̄`.
    a_nn: f64,
    a_nt: f64,
}

impl Frame {
    fn new(y_inv: &Mat3, bulk: &Bulk, psi: f64) -> Self {
        let (s, c) = psi.sin_cos();
        let (cc, ss, sc) = (c * c, s * s, s * c);
        // Groove strain (nn, tt, γnt) -> material (xx, yy, γxy): tensor rotation.
        let t = [[cc, ss, -sc], [ss, cc, sc], [2.0 * sc, -2.0 * sc, cc - ss]];
        // Material stress (xx, yy, xy) -> groove (nn, nt).
        let st = [[cc, ss, 2.0 * sc], [-sc, sc, cc - ss]];
        let pt = mul(y_inv, &t);
        let mut q = [[0.0; 3]; 3];
        for (i, row) in q.iter_mut().enumerate() {
            for (j, v) in row.iter_mut().enumerate() {
                *v = (0..3).map(|r| t[r][i] * pt[r][j]).sum();
            }
        }
        let m = [0, 1].map(|i| [0, 1, 2].map(|j| (0..3).map(|r| st[i][r] * pt[r][j]).sum()));
        Frame {
            q,
            m,
            m_tt: ss + bulk.rho * cc,
            a_nn: bulk.s1 * (cc + bulk.alpha * ss),
            a_nt: bulk.s1 * (bulk.alpha - 1.0) * sc,
        }
    }
}

fn mul(a: &Mat3, b: &Mat3) -> Mat3 {
    [0, 1, 2].map(|i| [0, 1, 2].map(|j| (0..3).map(|r| a[i][r] * b[r][j]).sum()))
}

/// Accumulated state of a run.
#[derive(Debug, Clone, Copy)]
struct State {
    /// Bulk major true strain ε1.
    major: f64,
    /// Bulk effective strain.
    bulk_eff: f64,
    /// Groove effective strain.
    groove_eff: f64,
    /// ε3(groove) − ε3(bulk), accumulated (negative as the groove thins faster).
    d3: f64,
}

/// Residual and Jacobian of one step at unknowns `x = (a, dε_nn, dγ_nt)`.
fn residual(
    md: &Model,
    bulk: &Bulk,
    fr: &Frame,
    st: &State,
    h: f64,
    x: [f64; 3],
) -> ([f64; 3], Mat3) {
    let [a, e, g] = x;
    let v = [e, a * fr.m_tt, g];
    let qv = mat_vec(&fr.q, v);
    let h2 = h * h;
    let r1 = (v[0] * qv[0] + v[1] * qv[1] + v[2] * qv[2]) / h2 - 1.0;
    let dthin = 1.0 + bulk.rho - fr.m_tt;
    let fac = md.f0 * (st.d3 - e + a * dthin).exp();
    let sb = (md.eps0 + st.groove_eff + h).powf(md.n);
    let ea = md.eps0 + st.bulk_eff + a * bulk.k;
    let sa = ea.powf(md.n) / sb;
    let dsa = md.n * sa * bulk.k / ea;
    let mut r = [r1, 0.0, 0.0];
    let mut j = [
        [
            2.0 * qv[1] * fr.m_tt / h2,
            2.0 * qv[0] / h2,
            2.0 * qv[2] / h2,
        ],
        [0.0; 3],
        [0.0; 3],
    ];
    for (row, (mrow, an)) in [(fr.m[0], fr.a_nn), (fr.m[1], fr.a_nt)].iter().enumerate() {
        let mv = mrow[0] * v[0] + mrow[1] * v[1] + mrow[2] * v[2];
        r[row + 1] = fac * mv / h - sa * an;
        j[row + 1] = [
            (fac * dthin * mv + fac * mrow[1] * fr.m_tt) / h - dsa * an,
            fac * (mrow[0] - mv) / h,
            fac * mrow[2] / h,
        ];
    }
    (r, j)
}

/// Solve `J dx = −r` by Cramer's rule; `None` if `J` is singular.
fn solve3(j: &Mat3, r: [f64; 3]) -> Option<[f64; 3]> {
    let det = |m: &Mat3| {
        m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1])
            - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0])
            + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
    };
    let d = det(j);
    if !d.is_finite() || d.abs() < 1e-300 {
        return None;
    }
    let col = |c: usize| {
        let mut m = *j;
        for (i, row) in m.iter_mut().enumerate() {
            row[c] = -r[i];
        }
        det(&m) / d
    };
    Some([col(0), col(1), col(2)])
}

/// Newton iterations for one step from guess `x`.
fn newton(
    md: &Model,
    bulk: &Bulk,
    fr: &Frame,
    st: &State,
    rs: &RunSettings,
    h: f64,
    mut x: [f64; 3],
) -> Result<[f64; 3], f64> {
    let mut worst = f64::INFINITY;
    for _ in 0..rs.max_iter {
        let (r, j) = residual(md, bulk, fr, st, h, x);
        worst = r.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        let Some(dx) = solve3(&j, r) else {
            return Err(worst);
        };
        let a_new = x[0] + dx[0];
        x = [
            if a_new > 0.0 { a_new } else { 0.5 * x[0] },
            x[1] + dx[1],
            x[2] + dx[2],
        ];
        let change = dx.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        if !change.is_finite() {
            return Err(worst);
        }
        if change <= rs.tol * h && a_new > 0.0 {
            return Ok(x);
        }
    }
    Err(worst)
}

/// Groove normal angle after the bulk reached major strain `major` on ratio `rho`, from `psi0`:
/// the normal to a material line turns as `tan ψ = tan ψ0 exp((1 − ρ) ε1)`.
pub fn groove_angle(psi0: f64, rho: f64, major: f64) -> f64 {
    psi0.sin().atan2(psi0.cos() * (-(1.0 - rho) * major).exp())
}

/// Step one groove at initial normal angle `psi0` (radians) until it localises or the bulk passes
/// `rs.bound`.
///
/// Near localisation the bulk's increment falls to zero at a finite groove strain (the groove's
/// load capacity peaks), so a full step may have no solution with the bulk still loading: the step
/// is then halved (down to 1/1024 of `rs.step`) and grows back after each success. The ratio test
/// is applied to the step actually taken.
pub fn run(md: &Model, bulk: &Bulk, psi0: f64, rs: &RunSettings) -> Result<RunEnd, NoConvergence> {
    let y_inv = md.yield_fn.p_inv();
    let h_min = rs.step / 1024.0;
    let mut h = rs.step;
    let mut st = State {
        major: 0.0,
        bulk_eff: 0.0,
        groove_eff: 0.0,
        d3: 0.0, // f0 itself enters the thickness ratio in `residual`
    };
    let (s0, c0) = psi0.sin_cos();
    let a0 = h / bulk.k;
    // The first guess: the groove strains like the bulk.
    let mut x = [
        a0,
        a0 * (c0 * c0 + bulk.rho * s0 * s0),
        a0 * 2.0 * (bulk.rho - 1.0) * s0 * c0,
    ];
    // Enough steps for the groove to reach several times the bound.
    let max_steps = ((4.0 * rs.bound.max(0.1) * (1.0 + bulk.k)) / h).ceil() as usize + 10;
    let mut step = 0;
    // The state before the last accepted step: a step with no solution may mean that the step
    // before it overshot the peak of the groove's load capacity, so both are redone smaller.
    let mut back: Option<(State, [f64; 3])> = None;
    while step < 4 * max_steps {
        step += 1;
        let fr = Frame::new(&y_inv, bulk, groove_angle(psi0, bulk.rho, st.major));
        let sol = match newton(md, bulk, &fr, &st, rs, h, x) {
            Ok(sol) => sol,
            Err(residual) if h <= h_min => {
                return Err(NoConvergence {
                    step,
                    major: st.major,
                    residual: Some(residual),
                })
            }
            Err(_) => {
                if let Some((prev, prev_x)) = back.take() {
                    st = prev;
                    x = prev_x;
                }
                h *= 0.5;
                x = x.map(|v| 0.5 * v);
                continue;
            }
        };
        back = Some((st, x));
        let [a, e, _] = sol;
        st.major += a;
        st.bulk_eff += a * bulk.k;
        st.groove_eff += h;
        st.d3 += -e + a * (1.0 + bulk.rho - fr.m_tt);
        if h >= rs.ratio * a * bulk.k {
            return Ok(RunEnd::Localised {
                major: st.major,
                psi: groove_angle(psi0, bulk.rho, st.major),
                steps: step,
            });
        }
        if st.major > rs.bound {
            return Ok(RunEnd::Beyond);
        }
        let grow = (2.0 * h).min(rs.step) / h;
        if grow > 1.0 {
            back = None; // the saved guess belongs to the smaller step
        }
        h *= grow;
        x = sol.map(|v| v * grow);
    }
    Err(NoConvergence {
        step,
        major: st.major,
        residual: None,
    })
}
