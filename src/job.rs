//! The job file: who measured what, on which part and tryout, and the settings of the judgement.
//!
//! A flat TOML file; every key is optional. Paths (`limit`) are relative to the job file.
//! ```toml
//! part = "Rear floor pan, LH"      # shown on every output
//! die = "D-2207"
//! tryout = "T2"
//! material = "DC04 class, 0.80 mm"
//! lot = "Coil 4417-B"
//! date = "2026-11-20"
//! measured_by = "Night shift metrology"
//! company = "Example Pressworks (invented)"
//! limit = "../limits/steel-0.8mm-kb.toml"
//! unit = "mm"         # or "in"
//! d0 = 2.5            # initial circle diameter, in `unit`
//! t0 = 0.8            # initial sheet thickness, in `unit`
//! margin = 10         # safety band, percentage points of engineering major strain
//! low_stretch = 2     # under-stretch threshold, percent engineering major strain
//! max_thinning = 25   # percent; leave out to not check
//! reading_error = 0.02 # one axis, in `unit` (pp of strain for strain files); flags borderline
//! [columns]           # the file's own headers, mapped onto neckline's names
//! major_true_pct = "Major strain (%)"
//! ```

use crate::error::{Error, Result};
use crate::units::LengthUnit;
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};

/// Contents of a job file.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Job {
    /// Part name and number.
    pub part: Option<String>,
    /// Die or tool identification.
    pub die: Option<String>,
    /// Tryout label (T1, T2, ...).
    pub tryout: Option<String>,
    /// Material grade and thickness.
    pub material: Option<String>,
    /// Material lot or coil.
    pub lot: Option<String>,
    /// Date of measurement.
    pub date: Option<String>,
    /// Who measured.
    pub measured_by: Option<String>,
    /// Company or plant.
    pub company: Option<String>,
    /// Limit curve file, relative to the job file.
    pub limit: Option<PathBuf>,
    /// Length unit of d0, t0 and the measurement file.
    pub unit: Option<LengthUnit>,
    /// Initial circle diameter.
    pub d0: Option<f64>,
    /// Initial sheet thickness.
    pub t0: Option<f64>,
    /// Safety band, percentage points.
    pub margin: Option<f64>,
    /// Under-stretch threshold, percent.
    pub low_stretch: Option<f64>,
    /// Maximum thinning, percent.
    pub max_thinning: Option<f64>,
    /// Reading error of one axis, in `unit` (percentage points of strain for a file that
    /// gives strains).
    pub reading_error: Option<f64>,
    /// The file's own headers mapped onto neckline's column names (`[columns]` table:
    /// `major_true_pct = "Major strain (%)"`).
    #[serde(default, skip_serializing_if = "std::collections::BTreeMap::is_empty")]
    pub columns: std::collections::BTreeMap<String, String>,
}

impl Job {
    /// Load a job file; a relative `limit` path is resolved against the job file's folder.
    pub fn load(path: &Path) -> Result<Self> {
        let text = std::fs::read_to_string(path).map_err(|e| Error::io(path, e))?;
        let mut job: Job =
            toml::from_str(&text).map_err(|e| crate::error::toml_error(path, &text, &e))?;
        for name in job.columns.keys() {
            crate::measure::check_name(name).map_err(|e| {
                Error::input(
                    crate::error::Location::file(path),
                    format!("[columns]: {e}"),
                )
            })?;
        }
        if let Some(limit) = job.limit.take() {
            let base = path.parent().unwrap_or(Path::new(""));
            job.limit = Some(if limit.is_absolute() {
                limit
            } else {
                base.join(limit)
            });
        }
        Ok(job)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn unknown_key_names_line() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(&p, "part = \"x\"\nmargn = 5\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(e.contains("job.toml:2:1") && e.contains("margn"), "{e}");
    }

    #[test]
    fn type_errors_read_as_words() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(&p, "d0 = \"2.5\"\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(
            e.contains("job.toml:1:6") && e.contains("expected a number"),
            "{e}"
        );
        std::fs::write(&p, "date = 2026-11-24\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(e.contains("expected text in quotes"), "{e}");
    }

    #[test]
    fn unknown_unit_is_refused() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("job.toml");
        std::fs::write(&p, "unit = \"cm\"\n").unwrap();
        let e = Job::load(&p).unwrap_err().to_string();
        assert!(e.contains("job.toml:1") && e.contains("cm"), "{e}");
    }
}
