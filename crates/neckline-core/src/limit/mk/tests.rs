//! Checks of the M-K solver against closed forms and known trends, each with its source.

use super::*;
use crate::limit::necking::hill_major;

fn material(n: f64, r: f64, f0: f64) -> MkMaterial {
    MkMaterial {
        n,
        k: 500.0,
        eps0: 0.0,
        r0: r,
        r45: r,
        r90: r,
        f0,
    }
}

/// Solve `x^n e^(−x) = f0 nⁿ e^(−n)` for x < n by bisection (the classic closed form for a groove
/// across a plane-strain path; Marciniak & Kuczynski 1967).
fn closed_form_plane_strain(n: f64, f0: f64) -> f64 {
    let g = |x: f64| n * x.ln() - x - (f0.ln() + n * n.ln() - n);
    let (mut lo, mut hi) = (1e-9, n);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if g(mid) < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

// The closed form itself reproduces the check values of the project field notes (section 5):
// n = 0.2, f0 = 0.99 -> 0.1431; f0 = 0.98 -> 0.1230.
#[test]
fn closed_form_check_values() {
    assert!((closed_form_plane_strain(0.2, 0.99) - 0.1431).abs() < 5e-5);
    assert!((closed_form_plane_strain(0.2, 0.98) - 0.1230).abs() < 5e-5);
}

// Plane strain, groove across the major strain (ψ0 = 0), rate-independent, any r: the bulk limit
// solves ε_aⁿ e^(−ε_a) = f0 nⁿ e^(−n) (Marciniak & Kuczynski 1967; classic closed form, from memory).
// The solver stops at a finite groove/bulk ratio, a little before the closed form's peak load.
#[test]
fn plane_strain_groove_matches_closed_form() {
    let s = MkSettings::default();
    for (n, r, f0) in [
        (0.2, 1.0, 0.99),
        (0.2, 1.0, 0.98),
        (0.2, 2.0, 0.99),
        (0.3, 0.6, 0.97),
    ] {
        let (major, _) = limit_at_angle(&material(n, r, f0), &s, 0.0, 0.0, 2.0)
            .unwrap()
            .unwrap();
        let exact = closed_form_plane_strain(n, f0);
        assert!(
            (major - exact).abs() < 1e-3,
            "n {n} r {r} f0 {f0}: M-K {major:.5} vs closed form {exact:.5}"
        );
    }
}

// As f0 -> 1 the left side tends to Hill 1952 (ε1 = n/(1 + β)) and the groove at localisation to
// the zero-extension direction, whose normal is at atan √(−β) to the major strain (Hill 1952;
// Hutchinson & Neale 1978 show this limit for the imperfection-free M-K model).
#[test]
fn vanishing_imperfection_tends_to_hill_on_the_left() {
    let s = MkSettings::default();
    for beta in [-0.5, -0.3, -0.1] {
        let hill = hill_major(0.2, beta);
        let zero_ext = f64::sqrt(-beta).atan().to_degrees();
        let gaps: Vec<(f64, f64)> = [0.99, 0.999, 0.9999]
            .iter()
            .map(|&f0| {
                let p = path_limit(&material(0.2, 1.0, f0), &s, beta).unwrap();
                assert!(p.major < hill, "M-K above the imperfection-free limit");
                (hill - p.major, (zero_ext - p.psi_deg).abs())
            })
            .collect();
        assert!(gaps[0].0 > gaps[1].0 && gaps[1].0 > gaps[2].0, "{gaps:?}");
        assert!(gaps[2].0 < 0.06 * hill, "beta {beta}: {gaps:?}");
        assert!(
            gaps[0].1 > gaps[2].1 && gaps[2].1 < 1.0,
            "beta {beta}: {gaps:?}"
        );
    }
}

// Limits rise with n and with f0 on every path (Marciniak & Kuczynski 1967; Hutchinson & Neale
// 1978, figures of limit strain against n and against the imperfection).
#[test]
fn limits_rise_with_n_and_f0() {
    let s = MkSettings::default();
    for beta in [-0.5, 0.0, 0.5, 1.0] {
        let at = |n, f0| path_limit(&material(n, 1.5, f0), &s, beta).unwrap().major;
        assert!(at(0.25, 0.99) > at(0.15, 0.99), "n, beta {beta}");
        assert!(at(0.2, 0.995) > at(0.2, 0.98), "f0, beta {beta}");
    }
}

// With Hill 1948 a higher normal anisotropy r lowers the M-K equibiaxial limit (a known trait of
// the quadratic yield function, e.g. Graf & Hosford 1990; project field notes section 5).
#[test]
fn higher_r_lowers_the_equibiaxial_limit() {
    let s = MkSettings::default();
    let eq: Vec<f64> = [0.5, 1.0, 2.0]
        .iter()
        .map(|&r| path_limit(&material(0.2, r, 0.99), &s, 1.0).unwrap().major)
        .collect();
    assert!(eq[0] > eq[1] && eq[1] > eq[2], "{eq:?}");
}

// The curve covers the 31 paths in order with minor strain increasing; its lowest point lies at or
// a little right of plane strain, as M-K curves do (Hutchinson & Neale 1978, from memory); the
// best groove is across the major strain (ψ0 = 0) on the right side of an isotropic-in-plane sheet.
#[test]
fn full_curve_shape() {
    let c = curve(&material(0.22, 1.8, 0.99), &MkSettings::default()).unwrap();
    assert_eq!(c.len(), 31);
    assert!(c.windows(2).all(|w| w[1].minor() > w[0].minor()));
    let low = c.iter().min_by(|a, b| a.major.total_cmp(&b.major)).unwrap();
    assert!(
        (0.0..=0.2).contains(&low.beta),
        "lowest at beta {}",
        low.beta
    );
    assert!(c
        .iter()
        .filter(|p| p.beta > 0.0)
        .all(|p| p.psi0_deg.abs() < 1e-9));
}

#[test]
fn settings_out_of_range_name_the_range() {
    let mut m = material(0.2, 1.0, 0.99);
    m.f0 = 1.0;
    let e = m.validate().unwrap_err().to_string();
    assert!(e.contains("f0") && e.contains("0.9 ..= 0.9999"), "{e}");
    let s = MkSettings {
        psi_fine_deg: 2.0,
        ..MkSettings::default()
    };
    assert!(s.validate().unwrap_err().to_string().contains("psi fine"));
}

// A step that Newton cannot solve is an error naming the step, never a point on the curve
// (one iteration allowed per step cannot meet the tolerance).
#[test]
fn non_convergence_is_an_error() {
    let md = groove::Model {
        yield_fn: hill48::Hill48::von_mises(),
        n: 0.2,
        eps0: 0.0,
        f0: 0.99,
    };
    let rs = groove::RunSettings {
        step: 0.002,
        ratio: 10.0,
        bound: 2.0,
        tol: 1e-9,
        max_iter: 1,
    };
    let e = groove::run(&md, &groove::Bulk::new(&md.yield_fn, 0.0), 0.0, &rs).unwrap_err();
    assert_eq!(e.step, 11, "{e:?}"); // ten halvings of the step, then the error
    assert!(e.residual.is_some_and(|r| r > 0.0));
    let msg = MkError::NoConvergence {
        beta: 0.0,
        psi0_deg: 0.0,
        detail: e,
    }
    .to_string();
    assert!(
        msg.contains("did not converge") && msg.contains("no curve written"),
        "{msg}"
    );
}

/// An independent M-K integration for a groove across the major strain (ψ = 0, von Mises), as
/// Marciniak & Kuczynski 1967 set it up: the bulk major strain is stepped by `d`, and the groove's
/// major strain increment is found by bisection on the force balance, with von Mises written in
/// principal stresses (α = (2ρ+1)/(ρ+2), σ̄/σ1 = √(1 − α + α²), dε̄ = (2/√3)√(d1² + d1 d2 + d2²)).
fn bulk_controlled_reference(n: f64, f0: f64, beta: f64, d: f64) -> f64 {
    let eff = |d1: f64, d2: f64| 2.0 / 3f64.sqrt() * (d1 * d1 + d1 * d2 + d2 * d2).sqrt();
    let s1_per_eff = |rho: f64| {
        let a = (2.0 * rho + 1.0) / (rho + 2.0);
        1.0 / (1.0 - a + a * a).sqrt()
    };
    let (mut e1a, mut ea, mut eb, mut t3a, mut t3b) = (0.0, 0.0, 0.0, 0.0, f0.ln());
    loop {
        let d2 = beta * d;
        let bulk_force = (ea + eff(d, d2)).powf(n) * s1_per_eff(beta) * (t3a - d - d2).exp();
        let gap = |x: f64| {
            let groove = (eb + eff(x, d2)).powf(n) * s1_per_eff(d2 / x) * (t3b - x - d2).exp();
            groove - bulk_force
        };
        // The first x at which the groove carries the bulk's force, scanning up from the bulk's own
        // increment; none before 10x the bulk's effective increment means localisation.
        let mut lo = d;
        let mut hi = None;
        while lo < 12.0 * d {
            let next = lo + 0.01 * d;
            if gap(next) >= 0.0 {
                hi = Some(next);
                break;
            }
            lo = next;
        }
        let Some(mut hi) = hi else { return e1a + d };
        for _ in 0..60 {
            let mid = 0.5 * (lo + hi);
            if gap(mid) >= 0.0 {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        let (db, dab) = (eff(hi, d2), eff(d, d2));
        e1a += d;
        ea += dab;
        eb += db;
        t3a -= d + d2;
        t3b -= hi + d2;
        if db >= 10.0 * dab {
            return e1a;
        }
    }
}

// The groove solver against the independent bulk-controlled integration above, on the right side
// where a groove across the major strain governs an isotropic sheet.
#[test]
fn right_side_matches_an_independent_integration() {
    let s = MkSettings {
        step: 0.0005,
        ..MkSettings::default()
    };
    for beta in [0.0, 0.5, 1.0] {
        let (mk, _) = limit_at_angle(&material(0.2, 1.0, 0.99), &s, beta, 0.0, 2.0)
            .unwrap()
            .unwrap();
        let reference = bulk_controlled_reference(0.2, 0.99, beta, 2e-4);
        assert!(
            (mk - reference).abs() < 1e-3,
            "beta {beta}: groove solver {mk:.5}, reference {reference:.5}"
        );
    }
}
