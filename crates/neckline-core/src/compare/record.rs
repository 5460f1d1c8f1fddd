//! The comparison as a record: who signs it, its number and revision, when it was generated and
//! the SHA-256 of every input, and the lists a tooling review signs off: every location still
//! at risk in the later tryout, and the locations the pictures label.

use super::{at_risk, Comparison, Track};
use crate::digest::HashingReader;
use crate::job::Job;
use crate::run_time::RunTime;
use std::io::{self, BufReader};
use std::path::{Path, PathBuf};

/// One input of the comparison and the SHA-256 of its bytes.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct InputDigest {
    /// What it is: `points T1`, `summary T1`, `job`.
    pub role: String,
    /// The path as given.
    pub path: PathBuf,
    /// Lower-case hexadecimal SHA-256.
    pub sha256: String,
}

/// The SHA-256 of a file, read as a stream (FIPS 180-4, through the `sha2` crate).
pub fn digest_of(role: String, path: &Path) -> io::Result<InputDigest> {
    let f = std::fs::File::open(path)?;
    let mut r = HashingReader::new(BufReader::with_capacity(1 << 16, f));
    io::copy(&mut r, &mut io::sink())?;
    Ok(InputDigest {
        role,
        path: path.to_path_buf(),
        sha256: r.hex(),
    })
}

/// What makes compare.html a record.
#[derive(Debug, Clone, PartialEq)]
pub struct Record {
    /// Report number: the job's, else one made from the inputs' digests.
    pub report_id: String,
    /// Revision: the job's, else "—".
    pub revision: String,
    /// Names of the sign-off block (blank where not given).
    pub prepared_by: Option<String>,
    /// Who checks it.
    pub checked_by: Option<String>,
    /// Who approves it.
    pub approved_by: Option<String>,
    /// When it was generated.
    pub generated: RunTime,
    /// Every input and its SHA-256.
    pub inputs: Vec<InputDigest>,
}

impl Record {
    /// The record of a comparison of `inputs` (the points.csv files as given; the summary.json
    /// beside each is recorded when it is there), with the sign-off names and number of `job`.
    /// Without a number in the job, the report is numbered `CMP-` and the first 12 hex digits of
    /// the SHA-256 of the inputs' digests: the same inputs give the same number.
    pub fn new(
        inputs: &[PathBuf],
        labels: &[String],
        job: Option<(&Job, &Path)>,
    ) -> io::Result<Self> {
        Self::with_digests(inputs, &[], labels, job)
    }

    /// As [`Record::new`], with the SHA-256 of some inputs already known (`known[k]` that of
    /// `inputs[k]`, when `Some`), so that a large file is not read again.
    pub fn with_digests(
        inputs: &[PathBuf],
        known: &[Option<String>],
        labels: &[String],
        job: Option<(&Job, &Path)>,
    ) -> io::Result<Self> {
        let mut digests = Vec::new();
        for (k, p) in inputs.iter().enumerate() {
            let label = labels
                .get(k)
                .cloned()
                .unwrap_or_else(|| format!("{}", k + 1));
            let role = format!("points {label}");
            match known.get(k).cloned().flatten() {
                Some(sha256) => digests.push(InputDigest {
                    role,
                    path: p.clone(),
                    sha256,
                }),
                None => digests.push(digest_of(role, p)?),
            }
            let summary = p.with_file_name("summary.json");
            if summary.is_file() {
                digests.push(digest_of(format!("summary {label}"), &summary)?);
            }
        }
        if let Some((_, path)) = job {
            digests.push(digest_of("job".into(), path)?);
        }
        let all: String = digests.iter().map(|d| d.sha256.as_str()).collect();
        let made = format!("CMP-{}", &crate::digest::sha256_hex(all.as_bytes())[..12]);
        let j = job.map(|(j, _)| j.clone()).unwrap_or_default();
        Ok(Record {
            report_id: j.report_id.unwrap_or(made),
            revision: j.revision.unwrap_or_else(|| "—".into()),
            prepared_by: j.prepared_by,
            checked_by: j.checked_by,
            approved_by: j.approved_by,
            generated: RunTime::now(),
            inputs: digests,
        })
    }
}

impl Comparison {
    /// Every location failed or marginal in the last tryout, whatever it was before (new,
    /// unchanged or improved, or measured only there): failed first, then by margin, smallest
    /// first.
    pub fn still_at_risk(&self) -> Vec<&Track> {
        let mut v: Vec<&Track> = self
            .tracks
            .iter()
            .filter(|t| t.after().is_some_and(|r| at_risk(r.zone)))
            .collect();
        v.sort_by(|a, b| {
            let (ra, rb) = (a.after(), b.after());
            let z = |r: Option<&super::ResultRow>| r.map(|r| r.zone);
            let m = |r: Option<&super::ResultRow>| {
                r.and_then(|r| r.margin_pct).unwrap_or(f64::INFINITY)
            };
            z(ra).cmp(&z(rb)).then(m(ra).total_cmp(&m(rb)))
        });
        if !self.complete {
            v.truncate(crate::capped::LIST_CAP);
        }
        v
    }

    /// The locations the pictures label: the `n` largest losses and the `n` largest gains,
    /// every location newly failed or marginal (or failed or marginal and measured only in the
    /// last tryout) and every location that left the failed zone; each once, in that order.
    pub fn labelled(&self, n: usize) -> Vec<&Track> {
        let mut v: Vec<&Track> = Vec::new();
        let lists = [
            self.losses().into_iter().take(n).collect::<Vec<_>>(),
            self.gains().into_iter().take(n).collect(),
            self.newly_at_risk(),
            self.at_risk_only_after(true),
            self.both()
                .filter(|t| {
                    matches!(t.zones(), Some((crate::assess::Zone::Failed, a)) if a != crate::assess::Zone::Failed)
                })
                .take(if self.complete { usize::MAX } else { crate::capped::LIST_CAP })
                .collect(),
        ];
        for t in lists.into_iter().flatten() {
            if !v.iter().any(|u| std::ptr::eq(*u, t)) {
                v.push(t);
            }
        }
        v
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::assess::Zone;
    use crate::compare::{compare, Matching, ResultRow, Tryout};

    fn row(id: &str, margin: f64, zone: Zone) -> ResultRow {
        ResultRow {
            id: id.into(),
            major_pct: 40.0 - margin,
            minor_pct: 0.0,
            margin_pct: Some(margin),
            limit_pct: Some(40.0),
            zone,
            x: None,
            y: None,
        }
    }

    fn tryout(label: &str, rows: Vec<ResultRow>) -> Tryout {
        Tryout {
            path: PathBuf::from(format!("{label}/points.csv")),
            label: label.into(),
            rows,
            summary: None,
            stats: Default::default(),
        }
    }

    // Zone rules of common practice: failed at or above the curve, marginal inside the band.
    fn pair() -> Comparison {
        use Zone::*;
        let t1 = tryout(
            "T1",
            vec![
                row("A", -5.0, Failed),  // failed, now marginal: improved, still at risk
                row("B", 5.0, Marginal), // unchanged marginal
                row("C", 20.0, Safe),    // newly marginal
                row("D", 8.0, Marginal), // fixed
                row("E", 30.0, Safe),    // safe throughout
            ],
        );
        let t2 = tryout(
            "T2",
            vec![
                row("A", 3.0, Marginal),
                row("B", 5.2, Marginal),
                row("C", 6.0, Marginal),
                row("D", 15.0, Safe),
                row("E", 30.0, Safe),
                row("F", -1.0, Failed), // measured only now
            ],
        );
        compare(vec![t1, t2], Matching::Id, 1.0).unwrap()
    }

    #[test]
    fn still_at_risk_lists_every_failed_or_marginal_location_of_the_later_tryout() {
        let c = pair();
        let ids: Vec<String> = c.still_at_risk().iter().map(|t| t.name()).collect();
        assert_eq!(ids, ["F", "A", "B", "C"]);
    }

    #[test]
    fn labels_go_to_gains_losses_and_the_newly_at_risk() {
        let c = pair();
        let ids: Vec<String> = c.labelled(1).iter().map(|t| t.name()).collect();
        // largest loss C (−14), largest gain A (+8), newly at risk C (again), only now F.
        assert_eq!(ids, ["C", "A", "F"]);
    }

    // FIPS 180-4 / NIST example: SHA-256("abc").
    #[test]
    fn record_hashes_each_input_and_numbers_itself() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("points.csv");
        std::fs::write(&p, "abc").unwrap();
        let r = Record::new(std::slice::from_ref(&p), &["T1".into()], None).unwrap();
        assert_eq!(
            r.inputs[0].sha256,
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
        assert_eq!(r.inputs[0].role, "points T1");
        assert!(r.report_id.starts_with("CMP-") && r.report_id.len() == 16);
        assert_eq!(r.revision, "—");
        let again = Record::new(&[p], &["T1".into()], None).unwrap();
        assert_eq!(again.report_id, r.report_id);
    }
}
