//! Speed of the Marciniak-Kuczynski curve, against baselines in the same run, and the
//! convergence study (limit vs groove strain step) that justifies the default step.
//!
//! Run: `cargo bench --bench mk`. One thread; every timing is the median of several runs.

use neckline_core::limit::keeler_brazier::KeelerBrazier;
use neckline_core::limit::mk::{self, MkMaterial, MkSettings};
use neckline_core::limit::necking::strain_ratios;
use std::hint::black_box;
use std::time::{Duration, Instant};

/// Median wall time of `runs` calls of `f`.
fn median_time<T>(runs: usize, mut f: impl FnMut() -> T) -> Duration {
    let mut times: Vec<Duration> = (0..runs)
        .map(|_| {
            let t = Instant::now();
            black_box(f());
            t.elapsed()
        })
        .collect();
    times.sort();
    times[runs / 2]
}

/// Closed-form plane-strain M-K limit: solve x^n e^(-x) = f0 n^n e^(-n) by bisection.
fn closed_form(n: f64, f0: f64) -> f64 {
    let g = |x: f64| n * x.ln() - x - (f0.ln() + n * n.ln() - n);
    let (mut lo, mut hi) = (1e-9, n);
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if g(mid) < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

fn materials() -> Vec<(&'static str, MkMaterial)> {
    let m = |n, r0, r45, r90, f0| MkMaterial {
        n,
        k: 500.0,
        eps0: 0.0,
        r0,
        r45,
        r90,
        f0,
    };
    vec![
        ("isotropic n 0.20 f0 0.99", m(0.20, 1.0, 1.0, 1.0, 0.99)),
        (
            "drawing steel (invented) n 0.22 r 1.8/1.3/2.2 f0 0.99",
            m(0.22, 1.8, 1.3, 2.2, 0.99),
        ),
        (
            "aluminium-like (invented) n 0.28 r 0.7/0.5/0.6 f0 0.995",
            m(0.28, 0.7, 0.5, 0.6, 0.995),
        ),
        (
            "high n (invented) n 0.40 r 1/1/1 f0 0.998",
            m(0.40, 1.0, 1.0, 1.0, 0.998),
        ),
    ]
}

fn ms(d: Duration) -> f64 {
    d.as_secs_f64() * 1e3
}

fn speed() {
    let s = MkSettings::default();
    println!(
        "== speed (default settings: step {}, {} paths, groove angle coarse {} deg, fine {} deg)",
        s.step, s.paths, s.psi_coarse_deg, s.psi_fine_deg
    );
    let base_cf = median_time(201, || {
        (0..1000)
            .map(|i| closed_form(0.2, 0.99 - 1e-6 * i as f64))
            .sum::<f64>()
    }) / 1000;
    let base_kb = median_time(201, || KeelerBrazier::new(0.2, 0.8).points_pct());
    let one_run = median_time(21, || {
        mk::limit_at_angle(&materials()[0].1, &s, 0.0, 0.0, 2.0)
    });
    println!(
        "baseline: closed-form plane-strain solve      {:>10.2} us",
        base_cf.as_secs_f64() * 1e6
    );
    println!(
        "baseline: Keeler-Brazier curve (22 points)     {:>10.2} us",
        base_kb.as_secs_f64() * 1e6
    );
    println!(
        "baseline: one M-K groove run (beta 0, psi0 0)  {:>10.3} ms",
        ms(one_run)
    );
    for (name, m) in materials() {
        let curve = mk::curve(&m, &s).expect("curve");
        let runs: usize = curve.iter().map(|p| p.runs).sum();
        let t = median_time(7, || mk::curve(&m, &s).expect("curve"));
        println!(
            "M-K curve, {name}: {:.1} ms per curve (median of 7), {:.2} ms per strain ratio, \
             {runs} groove runs; {:.0}x one groove run, {:.0}x the Keeler-Brazier curve",
            ms(t),
            ms(t) / s.paths as f64,
            t.as_secs_f64() / one_run.as_secs_f64(),
            t.as_secs_f64() / base_kb.as_secs_f64()
        );
    }
    let m = materials()[1].1;
    print!("per strain ratio, drawing steel (ms):");
    for beta in [-0.5, -0.25, 0.0, 0.5, 1.0] {
        let t = median_time(7, || mk::path_limit(&m, &s, beta).expect("path"));
        print!("  beta {beta}: {:.2}", ms(t));
    }
    println!();
}

/// Halve the step until no limit of any path changes by more than `tol`.
fn convergence() {
    let tol = 0.002;
    println!("\n== convergence: limit major true strain vs groove effective strain step");
    println!("(all 31 paths; 'max change' is the largest change of any path's limit from the previous step)");
    for (name, m) in materials() {
        println!("-- {name}");
        let show = [-0.5, -0.25, 0.0, 0.25, 0.5, 1.0];
        print!("{:>9}", "step");
        for b in show {
            print!(" {:>9}", format!("b {b}"));
        }
        println!(" {:>11} {:>9}", "max change", "ms/curve");
        let mut prev: Option<Vec<f64>> = None;
        let mut step = 0.016;
        let mut passes = 0;
        while step >= 0.00025 {
            let s = MkSettings {
                step,
                ..MkSettings::default()
            };
            let t = Instant::now();
            let c = mk::curve(&m, &s).expect("curve");
            let el = t.elapsed();
            let majors: Vec<f64> = c.iter().map(|p| p.major).collect();
            print!("{step:>9.5}");
            for b in show {
                let i = strain_ratios(31)
                    .iter()
                    .position(|x| (x - b).abs() < 1e-9)
                    .unwrap();
                print!(" {:>9.4}", majors[i]);
            }
            let change = prev.as_ref().map(|p| {
                p.iter()
                    .zip(&majors)
                    .map(|(a, b)| (a - b).abs())
                    .fold(0.0, f64::max)
            });
            match change {
                Some(c) => print!(" {c:>11.4}"),
                None => print!(" {:>11}", "-"),
            }
            println!(" {:>9.1}", ms(el));
            if change.is_some_and(|c| c <= tol) {
                passes += 1;
                if passes == 2 {
                    break;
                }
            }
            prev = Some(majors);
            step /= 2.0;
        }
    }
    println!("default step {} (a row whose max change is <= {tol} means halving the step above it changed no limit by more than {tol})",
        MkSettings::default().step);
}

fn main() {
    speed();
    convergence();
}
