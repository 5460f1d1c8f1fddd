//! Recovery of known limit strains from synthetic section profiles, and one case for each
//! validity check.
//!
//! The synthetic profile beside the neck is the inverse parabola the method assumes
//! (ISO 12004-2, from memory): `ε1(u) = 1 / (a u² + b u + 1/E1)`, apex `E1` at the crack, and
//! `ε2(u) = β ε1(u)`; a sharp neck (a tent `A (1 − |u|/h)`, h = 1.5 mm, added to the major
//! strain only) rises above it, points within 0.6 mm of the crack are missing (the crack
//! opened), spacing 0.5 mm (a usual facet step, common practice), noise Gaussian with a standard
//! deviation of 0.2 percentage points (a usual optical-system strain noise, common practice).
//! The true limit pair is `[β E1, E1]`.

use super::*;

/// A deterministic normal deviate stream (xorshift64* and Box-Muller; Marsaglia 2003, Box &
/// Muller 1958).
struct Noise(u64);

impl Noise {
    fn uniform(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        let v = self.0.wrapping_mul(0x2545_F491_4F6C_DD1D);
        ((v >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }
    fn normal(&mut self) -> f64 {
        let (u1, u2) = (self.uniform(), self.uniform());
        (-2.0 * u1.ln()).sqrt() * (std::f64::consts::TAU * u2).cos()
    }
}

/// The synthetic section: true major `e1` at the crack, ratio `beta`, crack at `crack` mm on a
/// 60 mm line, apex offset `apex` mm, noise `sigma` (true strain), seed `seed`.
struct Synth {
    e1: f64,
    beta: f64,
    crack: f64,
    apex: f64,
    sigma: f64,
    seed: u64,
    /// A strain added to u² (a profile that does not fall away: the curvature case).
    rise: f64,
}

impl Synth {
    fn new(e1: f64, beta: f64) -> Self {
        Synth {
            e1,
            beta,
            crack: 30.2,
            apex: 0.0,
            sigma: 0.0,
            seed: 1,
            rise: 0.0,
        }
    }

    fn profile(&self) -> SectionProfile {
        // The bell falls to 70 % of its apex 10 mm away (a broad bell, common practice).
        let a = (1.0 / (0.7 * self.e1) - 1.0 / self.e1) / 100.0;
        let b = -2.0 * a * self.apex;
        let mut noise = Noise(0x9E37_79B9_7F4A_7C15 ^ self.seed.wrapping_mul(0x1234_5678_9ABC));
        let mut p = SectionProfile {
            key: SectionKey {
                geometry: "g".into(),
                specimen: "s".into(),
                section: "1".into(),
            },
            x: Vec::new(),
            major: Vec::new(),
            minor: Vec::new(),
            gaps: Vec::new(),
            line: 2,
        };
        for i in 0..=120 {
            let x = i as f64 * 0.5;
            let u = x - self.crack;
            if u.abs() < 0.6 {
                p.gaps.push(x);
                continue;
            }
            let base = 1.0 / (a * u * u + b * u + 1.0 / self.e1) + self.rise * u * u;
            let neck = 0.10 * (1.0 - u.abs() / 1.5).max(0.0);
            p.x.push(x);
            p.major.push(base + neck + self.sigma * noise.normal());
            p.minor.push(self.beta * base + self.sigma * noise.normal());
        }
        p
    }
}

/// Uniaxial, plane-strain and biaxial limit pairs (true strain): a mild steel's curve shape,
/// invented values.
const CASES: [(f64, f64, &str); 3] = [
    (0.42, -0.48, "uniaxial"),
    (0.30, 0.0, "plane strain"),
    (0.34, 0.80, "biaxial"),
];

// Noise-free profiles give the limit pair back within 0.01 pp (the outside-neck profile is the
// fitted model exactly, so least squares must reproduce it).
#[test]
fn noise_free_profiles_give_back_the_limit_within_a_hundredth_of_a_point() {
    for (e1, beta, what) in CASES {
        let r = evaluate(Synth::new(e1, beta).profile());
        assert!(r.problems.is_empty(), "{what}: {:?}", r.problems);
        let l = r.limit().unwrap();
        let err = [100.0 * (l[0] - beta * e1), 100.0 * (l[1] - e1)];
        assert!(
            err[0].abs() < 0.01 && err[1].abs() < 0.01,
            "{what}: {err:?} pp"
        );
        eprintln!("{what}: noise-free error {err:?} pp (minor, major)");
        let w = r.fit.unwrap().width;
        // w = 10 mm (1 + β) (ISO 12004-2, from memory), β read near the crack.
        assert!((w - 10.0 * (1.0 + beta)).abs() < 1.0, "{what}: w = {w}");
    }
}

// With noise of 0.2 pp on every point, each of twenty sections per ratio gives the limit pair
// within 0.5 pp true strain.
#[test]
fn noisy_profiles_give_back_the_limit_within_half_a_point() {
    for (e1, beta, what) in CASES {
        let mut worst = [0.0f64; 2];
        for seed in 0..20 {
            let mut s = Synth::new(e1, beta);
            s.sigma = 0.002;
            s.seed = seed;
            s.crack = 30.2 + 0.13 * seed as f64;
            let r = evaluate(s.profile());
            assert!(
                r.problems.is_empty(),
                "{what}, seed {seed}: {:?}",
                r.problems
            );
            let l = r.limit().unwrap();
            worst[0] = worst[0].max((100.0 * (l[0] - beta * e1)).abs());
            worst[1] = worst[1].max((100.0 * (l[1] - e1)).abs());
        }
        assert!(
            worst[0] < 0.5 && worst[1] < 0.5,
            "{what}: worst {worst:?} pp"
        );
        eprintln!("{what}: worst error over 20 noisy sections {worst:?} pp (minor, major)");
    }
}

fn has(r: &SectionResult, f: impl Fn(&Problem) -> bool) -> bool {
    r.problems.iter().any(f)
}

// A crack 4 mm from the section's start leaves no room for the left window.
#[test]
fn a_crack_near_the_end_is_off_the_section() {
    let mut s = Synth::new(0.30, 0.0);
    s.crack = 4.1;
    let r = evaluate(s.profile());
    assert!(
        has(&r, |p| matches!(
            p,
            Problem::CrackOffSection {
                flank: Flank::Left,
                ..
            }
        )),
        "{:?}",
        r.problems
    );
    assert!(r.limit().is_none());
    assert!(r.problems[0]
        .to_string()
        .starts_with("crack off the section"));
}

// Points removed from 2.8 to 9 mm left of the crack leave the left window nearly empty.
#[test]
fn a_window_with_too_few_points_is_named() {
    let mut p = Synth::new(0.42, -0.48).profile();
    let keep: Vec<usize> = (0..p.x.len())
        .filter(|&i| !(21.2..=27.4).contains(&p.x[i]))
        .collect();
    p.x = keep.iter().map(|&i| p.x[i]).collect();
    p.major = keep.iter().map(|&i| p.major[i]).collect();
    p.minor = keep.iter().map(|&i| p.minor[i]).collect();
    let r = evaluate(p);
    assert!(
        has(&r, |p| matches!(
            p,
            Problem::TooFewPoints {
                flank: Flank::Left,
                ..
            }
        )),
        "{:?}",
        r.problems
    );
    assert!(r
        .problems
        .iter()
        .any(|p| p.to_string().starts_with("too few points in a window")));
}

// Noise of 3 pp (ten times a usual one) makes the residual implausible.
#[test]
fn a_large_residual_is_implausible() {
    let mut s = Synth::new(0.30, 0.0);
    s.sigma = 0.03;
    let r = evaluate(s.profile());
    assert!(
        has(&r, |p| matches!(p, Problem::Residual { .. })),
        "{:?}",
        r.problems
    );
}

// A profile that rises away from the crack (u² added) has no maximum: not a bell.
#[test]
fn a_profile_without_a_maximum_is_implausible() {
    let mut s = Synth::new(0.30, 0.0);
    s.rise = 0.0008;
    let r = evaluate(s.profile());
    assert!(
        has(&r, |p| matches!(p, Problem::Curvature { .. })),
        "{:?}",
        r.problems
    );
}

// A bell whose apex lies 4 mm beside the crack, with a 10 mm window, is asymmetric.
#[test]
fn a_bell_beside_the_crack_is_asymmetric() {
    let mut s = Synth::new(0.30, 0.0);
    s.apex = 6.0;
    let r = evaluate(s.profile());
    assert!(
        has(&r, |p| matches!(p, Problem::Asymmetric { .. })),
        "{:?}",
        r.problems
    );
}

// Too few measured points: nothing is evaluated.
#[test]
fn a_short_section_is_refused() {
    let mut p = Synth::new(0.30, 0.0).profile();
    p.x.truncate(6);
    p.major.truncate(6);
    p.minor.truncate(6);
    let r = evaluate(p);
    assert_eq!(r.problems, vec![Problem::FewPoints { found: 6 }]);
}

// Median and MAD (Rousseeuw & Croux 1993): one value 3 pp off eight that agree within 0.2 pp is
// an outlier; none is among values that agree.
#[test]
fn outliers_by_the_median_absolute_deviation() {
    let v = [0.30, 0.301, 0.299, 0.302, 0.298, 0.300, 0.301, 0.299, 0.33];
    assert_eq!(outliers(&v), vec![8]);
    assert!(outliers(&v[..8]).is_empty());
    let (m, s) = mean_sd(&[1.0, 2.0, 3.0]);
    assert!((m - 2.0).abs() < 1e-12 && (s - 1.0).abs() < 1e-12);
}

fn result(geometry: &str, specimen: &str, section: &str, limit: [f64; 2]) -> SectionResult {
    let mut p = Synth::new(limit[1], limit[0] / limit[1]).profile();
    p.key = SectionKey {
        geometry: geometry.into(),
        specimen: specimen.into(),
        section: section.into(),
    };
    evaluate(p)
}

// The series: fewer than five geometries and no geometry near plane strain are warned about;
// the curve's points come sorted by minor strain with the scatter beside them, and the curve
// reads back through the parser `check` uses.
#[test]
fn series_statistics_warnings_and_curve() {
    let mut rs = Vec::new();
    for sp in ["1", "2", "3"] {
        for sec in ["a", "b", "c"] {
            rs.push(result("120", sp, sec, [0.20, 0.32]));
            rs.push(result("20", sp, sec, [-0.18, 0.40]));
        }
    }
    let stats = geometry_stats(&rs);
    assert_eq!(stats.len(), 2);
    assert_eq!(
        (stats[0].sections, stats[0].specimens, stats[0].used),
        (9, 3, 9)
    );
    let w = series_warnings(&stats);
    assert!(
        w.iter().any(|s| s.starts_with("only 2 geometries")),
        "{w:?}"
    );
    assert!(
        w.iter()
            .any(|s| s.starts_with("no geometry near plane strain")),
        "{w:?}"
    );
    let words = LabWords {
        file: "s.csv".into(),
        sha256: "ab".repeat(32),
        lab: Some("test lab (invented)".into()),
        material: Some("DX54 (invented)".into()),
        lot: Some("L1".into()),
    };
    let g = lab_curve("lab", &stats, &words).unwrap();
    assert!(g.points_pct[0][0] < 0.0 && g.points_pct[1][0] > 0.0);
    let (text, c) = g
        .render_checked_with(std::path::Path::new("lab.toml"), LAB_HEADER)
        .unwrap();
    assert!(text.contains("scatter = ["), "{text}");
    assert!(c.source.contains("test lab (invented)") && c.source.contains(&"ab".repeat(32)));
    let sc = c.scatter.as_ref().unwrap();
    assert_eq!(sc.len(), 2);
    assert!(sc.iter().all(|s| s[1] < 1e-4), "{sc:?}");
}
