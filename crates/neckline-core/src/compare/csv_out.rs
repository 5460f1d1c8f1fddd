//! `compare.csv`: one row for every location of any input. With two inputs the per-tryout
//! columns end in `_before` and `_after`; with more, in `_t1`, `_t2`, ... in input order.

use super::{Comparison, Matching, ResultRow, Track};
use crate::output::fmt_opt;
use std::io::{self, Write};

/// Column suffix of each tryout.
pub fn suffixes(n: usize) -> Vec<String> {
    if n == 2 {
        vec!["before".into(), "after".into()]
    } else {
        (1..=n).map(|k| format!("t{k}")).collect()
    }
}

/// The header row.
pub fn header(c: &Comparison) -> Vec<String> {
    header_of(c.tryouts.len(), c.matching)
}

/// The header row of `n` tryouts paired by `matching`.
pub fn header_of(n: usize, matching: Matching) -> Vec<String> {
    let sfx = suffixes(n);
    let mut h = vec!["id".to_string(), "status".to_string()];
    if matches!(matching, Matching::Xy { .. }) {
        h.extend(sfx.iter().map(|s| format!("id_{s}")));
        if sfx.len() == 2 {
            h.push("distance".into());
        } else {
            h.extend(sfx[1..].iter().map(|s| format!("distance_{s}")));
        }
    }
    for q in ["zone", "major_eng_pct", "margin_pct"] {
        h.extend(sfx.iter().map(|s| format!("{q}_{s}")));
    }
    h.extend(
        ["margin_change_pct", "major_change_pct", "change", "x", "y"]
            .iter()
            .map(|s| s.to_string()),
    );
    h
}

/// The latest measurement of a location.
pub fn latest(t: &Track) -> &ResultRow {
    t.at.iter()
        .rev()
        .flatten()
        .next()
        .expect("a track holds at least one location")
}

fn record(c: &Comparison, t: &Track) -> Vec<String> {
    record_of(c.matching, c.tolerance, t)
}

/// The row of one track.
pub fn record_of(matching: Matching, tolerance: f64, t: &Track) -> Vec<String> {
    let last = latest(t);
    let mut r = vec![last.id.clone(), t.status().name().to_string()];
    if matches!(matching, Matching::Xy { .. }) {
        r.extend(
            t.at.iter()
                .map(|a| a.as_ref().map_or_else(String::new, |a| a.id.clone())),
        );
        r.extend(t.step[1..].iter().map(|d| fmt_opt(*d, 3)));
    }
    r.extend(
        t.at.iter()
            .map(|a| a.as_ref().map_or_else(String::new, |a| a.zone.to_string())),
    );
    r.extend(
        t.at.iter()
            .map(|a| fmt_opt(a.as_ref().map(|a| a.major_pct), 3)),
    );
    r.extend(
        t.at.iter()
            .map(|a| fmt_opt(a.as_ref().and_then(|a| a.margin_pct), 3)),
    );
    r.push(fmt_opt(t.margin_change(), 3));
    r.push(fmt_opt(t.major_change(), 3));
    r.push(
        t.change(tolerance)
            .map_or_else(String::new, |ch| ch.name().to_string()),
    );
    r.push(fmt_opt(last.x, 3));
    r.push(fmt_opt(last.y, 3));
    r
}

/// Append the row of one track to `out` as CSV text (with its line end), the numbers written
/// through [`crate::output::push_fixed_bytes`]: the text of [`write_csv`]'s rows. A row with
/// a text field that needs quoting goes through the `csv` writer.
pub fn push_record(matching: Matching, tolerance: f64, t: &Track, out: &mut Vec<u8>) {
    let plain = |s: &str| !s.bytes().any(|b| matches!(b, b',' | b'"' | b'\n' | b'\r'));
    let last = latest(t);
    let xy = matches!(matching, Matching::Xy { .. });
    if !plain(&last.id) || (xy && t.at.iter().flatten().any(|a| !plain(&a.id))) {
        let mut w = csv::WriterBuilder::new().from_writer(&mut *out);
        let _ = w.write_record(record_of(matching, tolerance, t));
        let _ = w.flush();
        return;
    }
    let num = |out: &mut Vec<u8>, v: Option<f64>| {
        if let Some(v) = v {
            crate::output::push_fixed_bytes(out, v, 3);
        }
    };
    out.extend_from_slice(last.id.as_bytes());
    out.push(b',');
    out.extend_from_slice(t.status().name().as_bytes());
    if xy {
        for a in &t.at {
            out.push(b',');
            if let Some(a) = a {
                out.extend_from_slice(a.id.as_bytes());
            }
        }
        for d in &t.step[1..] {
            out.push(b',');
            num(out, *d);
        }
    }
    for a in &t.at {
        out.push(b',');
        if let Some(a) = a {
            out.extend_from_slice(a.zone.name().as_bytes());
        }
    }
    for a in &t.at {
        out.push(b',');
        num(out, a.as_ref().map(|a| a.major_pct));
    }
    for a in &t.at {
        out.push(b',');
        num(out, a.as_ref().and_then(|a| a.margin_pct));
    }
    out.push(b',');
    num(out, t.margin_change());
    out.push(b',');
    num(out, t.major_change());
    out.push(b',');
    if let Some(ch) = t.change(tolerance) {
        out.extend_from_slice(ch.name().as_bytes());
    }
    out.push(b',');
    num(out, last.x);
    out.push(b',');
    num(out, last.y);
    out.push(b'\n');
}

/// Write compare.csv.
pub fn write_csv(c: &Comparison, out: &mut dyn Write) -> io::Result<()> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record(header(c))?;
    for t in &c.tracks {
        w.write_record(record(c, t))?;
    }
    w.flush()
}
