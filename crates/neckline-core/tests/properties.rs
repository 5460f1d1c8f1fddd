//! Property tests of the kinematics, the curve interpolation and the judgement.

use approx::assert_relative_eq;
use neckline_core::assess::{judge, Settings, Zone};
use neckline_core::kinematics::StrainState;
use neckline_core::limit::LimitCurve;
use neckline_core::strain::{EngStrain, Stretch, TrueStrain};
use proptest::prelude::*;
use std::path::Path;

fn stretch() -> impl Strategy<Value = f64> {
    0.5f64..2.0
}

fn demo_curve() -> LimitCurve {
    LimitCurve::load(
        &Path::new(env!("CARGO_MANIFEST_DIR")).join("../../limits/demo-tabulated-invented.toml"),
    )
    .unwrap()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    // Plastic incompressibility (volume constancy, any plasticity text): λ1 λ2 λ3 = 1, so
    // ε3 = −(ε1 + ε2) and t = t0 / (λ1 λ2).
    #[test]
    fn incompressibility(a in stretch(), b in stretch(), t0 in 0.3f64..4.0) {
        let s = StrainState::from_stretches(Stretch::new(a).unwrap(), Stretch::new(b).unwrap());
        let e = s.true_strain;
        assert_relative_eq!(s.thickness_strain.value(), -(e.major.value() + e.minor.value()), epsilon = 1e-12);
        assert_relative_eq!(s.thickness(t0), t0 / (a * b), max_relative = 1e-12);
        assert_relative_eq!(s.stretch.major.value() * s.stretch.minor.value() * s.thickness(t0) / t0, 1.0, max_relative = 1e-12);
    }

    // Principal values are ordered whatever order the axes come in, and every measure keeps
    // the order (each is an increasing function of λ).
    #[test]
    fn major_not_below_minor_after_ordering(a in stretch(), b in stretch()) {
        let s = StrainState::from_stretches(Stretch::new(a).unwrap(), Stretch::new(b).unwrap());
        let t = StrainState::from_stretches(Stretch::new(b).unwrap(), Stretch::new(a).unwrap());
        prop_assert_eq!(s, t);
        prop_assert!(s.eng.major >= s.eng.minor);
        prop_assert!(s.true_strain.major >= s.true_strain.minor);
        prop_assert!(s.green.major >= s.green.minor);
        prop_assert!(s.almansi.major >= s.almansi.minor);
    }

    // The measures agree with each other: e = exp(ε) − 1, E = ((1+e)² − 1)/2 = e + e²/2,
    // a = E / λ² (definitions; any continuum mechanics text).
    #[test]
    fn measures_are_consistent(a in stretch()) {
        let l = Stretch::new(a).unwrap();
        let e = EngStrain::from(l).value();
        let t = TrueStrain::from(l);
        assert_relative_eq!(t.to_eng().value(), e, epsilon = 1e-12);
        assert_relative_eq!(EngStrain(e).to_true().unwrap().value(), t.value(), epsilon = 1e-12);
        let green = neckline_core::strain::GreenStrain::from(l).value();
        assert_relative_eq!(green, e + e * e / 2.0, epsilon = 1e-12);
        let almansi = neckline_core::strain::AlmansiStrain::from(l).value();
        assert_relative_eq!(almansi, green / (a * a), epsilon = 1e-12);
    }

    // Linear interpolation stays between the two neighbouring points, and is monotone on each
    // segment.
    #[test]
    fn interpolation_is_monotone_between_points(x1 in -0.35f64..0.30, dx in 0.0f64..0.05) {
        let c = demo_curve();
        let x2 = (x1 + dx).min(0.30);
        let (y1, y2) = (c.major_at(x1).unwrap(), c.major_at(x2).unwrap());
        let i = c.points.partition_point(|p| p[0] < x1).max(1);
        let (lo, hi) = (c.points[i - 1][1].min(c.points[i][1]), c.points[i - 1][1].max(c.points[i][1]));
        prop_assert!(y1 >= lo - 1e-12 && y1 <= hi + 1e-12);
        if x2 <= c.points[i][0] {
            let slope = c.points[i][1] - c.points[i - 1][1];
            prop_assert!((y2 - y1) * slope >= -1e-12);
        }
    }

    // The sign of the vertical margin agrees with the zone.
    #[test]
    fn margin_sign_agrees_with_zone(a in 0.8f64..1.8, b in 0.55f64..1.4, band in 0.0f64..20.0) {
        let c = demo_curve();
        let settings = Settings { margin_pct: band, ..Settings::default() };
        let s = StrainState::from_stretches(Stretch::new(a).unwrap(), Stretch::new(b).unwrap());
        let j = judge(&s, &c, &settings);
        match (j.zone, j.margin_pct) {
            (Zone::Uncovered, m) => prop_assert!(m.is_none()),
            (Zone::Failed, Some(m)) => prop_assert!(m <= 0.0),
            (Zone::Marginal, Some(m)) => prop_assert!(m > 0.0 && m < band),
            (_, Some(m)) => prop_assert!(m >= band),
            // Outside the curve's minor range there is no margin; a straight path that has
            // already crossed the curve there is failed by its limit use (reason `crossed`).
            (Zone::Failed, None) => prop_assert!(
                j.reason == neckline_core::assess::Reason::Crossed
                    && j.limit_use_pct.is_some_and(|u| u >= 100.0),
                "failed without a margin: {:?} {:?}", j.reason, j.limit_use_pct
            ),
            (z, None) => prop_assert!(false, "zone {z} without a margin"),
        }
        if let (Some(u), Some(_)) = (j.limit_use_pct, j.margin_pct) {
            // On or above the curve along the path ⇔ limit use ≥ 100 %, up to the bend that a
            // straight engineering segment takes in true strain (sampled in 16 pieces).
            if j.margin_pct.unwrap() < -0.5 { prop_assert!(u > 99.0, "use {u}"); }
            if j.margin_pct.unwrap() > 0.5 { prop_assert!(u < 101.0, "use {u}"); }
        }
    }

    // Limit use is proportional to the distance along a straight path: scaling the true
    // strains by k scales the limit use by k.
    #[test]
    fn limit_use_scales_along_the_path(e1 in 0.05f64..0.3, beta in -0.5f64..1.0, k in 0.2f64..1.5) {
        let c = demo_curve();
        let state = |f: f64| StrainState::from_stretches(TrueStrain(f * e1).stretch(), TrueStrain(f * beta * e1).stretch());
        if let (Some(u1), Some(uk)) = (c.limit_use_pct(&state(1.0)), c.limit_use_pct(&state(k))) {
            assert_relative_eq!(uk, k * u1, max_relative = 1e-9);
        }
    }

    // The fast ray search agrees with a brute-force check of every segment of the curve in
    // true strain (an independent method written here).
    #[test]
    fn limit_use_matches_brute_force(e1 in 0.01f64..0.6, beta in -0.9f64..1.0) {
        let c = LimitCurve::load(&Path::new(env!("CARGO_MANIFEST_DIR")).join("../../limits/steel-0.80mm-n0.20-keeler-brazier.toml")).unwrap();
        let st = StrainState::from_stretches(TrueStrain(e1).stretch(), TrueStrain(beta * e1).stretch());
        let d = [st.true_strain.minor.value(), st.true_strain.major.value()];
        let poly = c.true_polyline(16);
        let brute = poly.windows(2).filter_map(|w| {
            let (p, q) = (w[0], w[1]);
            // Solve s·d = p + u (q − p) by Cramer's rule.
            let (a, b, c2, d2) = (d[0], p[0] - q[0], d[1], p[1] - q[1]);
            let det = a * d2 - b * c2;
            if det.abs() < 1e-15 { return None; }
            let s = (p[0] * d2 - b * p[1]) / det;
            let u = (a * p[1] - c2 * p[0]) / det;
            (s > 0.0 && (0.0..=1.0).contains(&u)).then_some(100.0 / s)
        }).fold(None, |m: Option<f64>, v| Some(m.map_or(v, |m| m.max(v))));
        match (c.limit_use_pct(&st), brute) {
            (Some(a), Some(b)) => assert_relative_eq!(a, b, max_relative = 1e-9),
            (a, b) => prop_assert_eq!(a.is_some(), b.is_some(), "fast {:?} brute {:?}", a, b),
        }
    }
}

/// Judge a one-row measurement CSV read through neckline's own reader: (zone, margin).
fn judge_csv(text: &str) -> (Zone, Option<f64>) {
    use neckline_core::measure::{read_measurements_from, ColumnMap};
    use neckline_core::point::{state_of, Context};
    use neckline_core::units::Lengths;
    let file = Path::new("p.csv");
    let set = read_measurements_from(text.as_bytes(), file, &ColumnMap::default()).unwrap();
    let lengths = Lengths {
        unit: Default::default(),
        d0: Some(2.5),
        t0: None,
    };
    let ctx = Context {
        curve: demo_curve(),
        settings: Settings::default(),
        lengths,
        strain_input: false,
        true_input: false,
    };
    let m = set.points.into_iter().next().expect("the row is read");
    let p = ctx.judge(state_of(m, file, &lengths).unwrap());
    (p.zone(), p.judgement.margin_pct)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(128))]

    // The same location given as ellipse axes, as engineering percent and as true percent
    // (e = d/d0 − 1, ε = ln(d/d0): the strain definitions) is judged alike: the same zone, the
    // same margin to the rounding of the percent written (6 decimals).
    #[test]
    fn axes_and_strain_columns_judge_alike(a in 0.7f64..1.8, b in 0.7f64..1.8) {
        let (l1, l2) = if a >= b { (a, b) } else { (b, a) };
        let (d1, d2) = (2.5 * l1, 2.5 * l2);
        let axes = judge_csv(&format!("id,major,minor\nP,{d1:.9},{d2:.9}\n"));
        let (e1, e2) = (100.0 * (d1 / 2.5 - 1.0), 100.0 * (d2 / 2.5 - 1.0));
        let eng = judge_csv(&format!("id,major_eng_pct,minor_eng_pct\nP,{e1:.6},{e2:.6}\n"));
        let (t1, t2) = (100.0 * (d1 / 2.5).ln(), 100.0 * (d2 / 2.5).ln());
        let tru = judge_csv(&format!("id,major_true_pct,minor_true_pct\nP,{t1:.6},{t2:.6}\n"));
        for other in [eng, tru] {
            match (axes.1, other.1) {
                (Some(x), Some(y)) => {
                    prop_assert!((x - y).abs() < 1e-4, "{x} vs {y}");
                    // Zones agree unless the margin sits within rounding of a zone edge.
                    if x.abs() > 1e-3 && (x - 10.0).abs() > 1e-3 {
                        prop_assert_eq!(axes.0, other.0);
                    }
                }
                (x, y) => prop_assert!(x.is_none() && y.is_none(), "{x:?} vs {y:?}"),
            }
        }
    }
}
