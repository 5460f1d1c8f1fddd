//! `compare` beyond the size where lists and markers are capped: the real binary on two
//! invented results of 30 000 locations each, made in the test with known changes, so that
//! every count and every change is computed here independently of neckline.

mod common;
use common::{read_json, read_rows, run_in, write};
use std::collections::BTreeMap;
use std::path::Path;

const N: usize = 30_000;
/// Every 1000th location loses this much margin, pp.
const LOSS: f64 = 12.5;
/// Every 1000th location, offset by 500, gains this much, pp.
const GAIN: f64 = 3.25;
/// The safety band of the invented results, pp.
const BAND: f64 = 10.0;
/// Left out of the later result.
const GONE: usize = 777;

/// Zone by margin as `check` judges it against a curve with a safety band (common practice:
/// failed at or above the curve, marginal inside the band).
fn zone(margin: f64) -> &'static str {
    if margin <= 0.0 {
        "failed"
    } else if margin < BAND {
        "marginal"
    } else {
        "safe"
    }
}

fn margin_before(i: usize) -> f64 {
    5.0 + (i % 40) as f64
}

fn margin_after(i: usize) -> f64 {
    let m = margin_before(i);
    match i % 1000 {
        0 => m - LOSS,
        500 => m + GAIN,
        _ => m,
    }
}

fn row(id: &str, i: usize, margin: f64) -> String {
    // Limit 40 % at every minor strain: major = limit − margin.
    let minor = (i % 21) as f64 - 10.0;
    let (x, y) = ((i % 200) as f64 * 2.0, (i / 200) as f64 * 2.0);
    format!(
        "{id},{:.3},{minor:.3},{margin:.3},40.000,{},{x:.3},{y:.3}\n",
        40.0 - margin,
        zone(margin)
    )
}

const HEADER: &str = "id,major_eng_pct,minor_eng_pct,margin_pct,limit_major_eng_pct,zone,x,y\n";

/// The two results: the later one in the row order `perm` gives, without GONE, with one new
/// failed location last.
fn write_pair(dir: &Path, later: &str, perm: impl Fn(usize) -> usize) {
    let mut a = String::from(HEADER);
    for i in 0..N {
        a.push_str(&row(&format!("P{i}"), i, margin_before(i)));
    }
    write(dir, "t1/points.csv", a);
    let mut b = String::from(HEADER);
    for k in 0..N {
        let i = perm(k);
        if i != GONE {
            b.push_str(&row(&format!("P{i}"), i, margin_after(i)));
        }
    }
    b.push_str(&row("NEW1", 3, -2.0));
    write(dir, &format!("{later}/points.csv"), b);
}

#[test]
fn a_large_comparison_counts_every_change_and_keeps_its_outputs_small() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    // 7919 is prime and does not divide N: k -> 7919 k mod N is a permutation.
    write_pair(d, "t2", |k| k * 7919 % N);
    let r = run_in(
        d,
        &["compare", "t1/points.csv", "t2/points.csv", "--out", "pack"],
    );
    assert_eq!(r.code, 0, "{r}");

    // What the test expects, from its own arithmetic.
    let (mut losses, mut gains, mut newly_failed, mut still) = (0, 0, 0, 0);
    for i in (0..N).filter(|&i| i != GONE) {
        let d = margin_after(i) - margin_before(i);
        losses += usize::from(d < -1.0);
        gains += usize::from(d > 1.0);
        newly_failed +=
            usize::from(zone(margin_after(i)) == "failed" && zone(margin_before(i)) != "failed");
        still += usize::from(zone(margin_after(i)) != "safe");
    }
    still += 1; // NEW1, failed and measured only in the later result.
    assert_eq!((losses, gains), (30, 30));

    let j = read_json(&r.path("pack/compare.json"));
    let c = &j["counts"];
    assert_eq!(c["both"], N - 1);
    assert_eq!(c["only_before"], 1);
    assert_eq!(c["only_after"], 1);
    assert_eq!(c["losses"], losses);
    assert_eq!(c["gains"], gains);
    assert_eq!(c["worsened"], losses);
    assert_eq!(c["improved"], gains);
    assert_eq!(c["unchanged"], N - 1 - losses - gains);
    assert_eq!(c["newly_failed"], newly_failed);
    assert_eq!(c["still_at_risk"], still);
    assert_eq!(c["at_risk_only_after"], 1);
    assert_eq!(j["list_cap"], 1000);
    assert_eq!(j["losses"].as_array().unwrap().len(), losses);
    assert_eq!(j["only_before"], serde_json::json!([format!("P{GONE}")]));
    assert_eq!(j["only_after"], serde_json::json!(["NEW1"]));
    // Largest loss first; every loss is the same here, so the first in the first file's order.
    assert_eq!(j["losses"][0]["id"], "P0");

    // Every location's change in compare.csv, against the test's own.
    let rows = read_rows(&r.path("pack/compare.csv"));
    assert_eq!(rows.len(), N + 1);
    let by_id: BTreeMap<&str, &common::Row> = rows.iter().map(|r| (r["id"].as_str(), r)).collect();
    for i in (0..N).filter(|&i| i != GONE) {
        let row = by_id[format!("P{i}").as_str()];
        let want = margin_after(i) - margin_before(i);
        let got: f64 = row["margin_change_pct"].parse().unwrap();
        assert!((got - want).abs() < 1e-9, "P{i}: {got} != {want}");
        assert_eq!(row["status"], "both");
    }
    assert_eq!(by_id[format!("P{GONE}").as_str()]["status"], "only_before");
    assert_eq!(by_id["NEW1"]["status"], "only_after");
    // Rows in the first file's order, then those of the later file only.
    assert_eq!(rows[0]["id"], "P0");
    assert_eq!(rows[N - 1]["id"], format!("P{}", N - 1));
    assert_eq!(rows[N]["id"], "NEW1");

    // The outputs people read stay small.
    let size = |f: &str| {
        std::fs::metadata(r.path(&format!("pack/{f}")))
            .unwrap()
            .len()
    };
    assert!(size("compare.html") < 5_000_000, "{}", size("compare.html"));
    assert!(
        size("compare-fld.svg") < 2_000_000,
        "{}",
        size("compare-fld.svg")
    );
    assert!(
        size("compare-map.svg") < 2_000_000,
        "{}",
        size("compare-map.svg")
    );
    // The still-at-risk section counts every one and lists the first 1000.
    let html = std::fs::read_to_string(r.path("pack/compare.html")).unwrap();
    assert!(html.contains(&format!("({still})")), "still at risk count");
    assert!(html.contains(&format!("{} more are in compare.csv", still - 1000)));

    // Paired by position (the same places in both files), the same changes are found: NEW1
    // sits on P3's place but comes later in the file, so the tie goes to P3 (closest first,
    // then in file order).
    let xy = run_in(
        d,
        &[
            "compare",
            "t1/points.csv",
            "t2/points.csv",
            "--match",
            "xy",
            "--within",
            "0.5",
            "--out",
            "packxy",
        ],
    );
    assert_eq!(xy.code, 0, "{xy}");
    let jx = read_json(&xy.path("packxy/compare.json"));
    assert_eq!(jx["counts"]["both"], N - 1);
    assert_eq!(jx["counts"]["only_before"], 1);
    assert_eq!(jx["counts"]["only_after"], 1);
    assert_eq!(jx["counts"]["losses"], losses);
    assert_eq!(jx["counts"]["gains"], gains);
    assert_eq!(jx["counts"]["newly_failed"], newly_failed);

    // Pairing by id does not depend on the later file's row order.
    write_pair(d, "t2b", |k| N - 1 - k);
    let again = run_in(
        d,
        &[
            "compare",
            "t1/points.csv",
            "t2b/points.csv",
            "--out",
            "pack2",
        ],
    );
    assert_eq!(again.code, 0, "{again}");
    assert_eq!(
        std::fs::read(again.path("pack2/compare.csv")).unwrap(),
        std::fs::read(r.path("pack/compare.csv")).unwrap()
    );
}
