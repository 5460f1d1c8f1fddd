//! One analysis: a whole file's locations judged (see [`crate::point`]) and summarised. The
//! [`Analysis`] is the one result that every output (JSON, terminal, plots, report) is written
//! from, so they never disagree; points.csv is written row by row from the same judged
//! locations as they stream past (the streaming pass, a layer up, folds them into the summary).

use crate::assess::{Settings, Zone};
use crate::job::Job;
use crate::limit::LimitCurve;
use crate::measure::RejectedRow;
use crate::summary::{Summary, ThicknessCheck, View};
use std::path::PathBuf;

pub use crate::point::{state_of, strain_of, Context, PointResult, StateInput};
pub use crate::units::Lengths;
pub use crate::CAUTION;

/// A whole analysed file: its settings and the summary of its judged locations.
#[derive(Debug, Clone)]
pub struct Analysis {
    /// The measurement file.
    pub input: PathBuf,
    /// Job description.
    pub job: Job,
    /// The lengths used.
    pub lengths: Lengths,
    /// The curve judged against.
    pub curve: LimitCurve,
    /// The settings used.
    pub settings: Settings,
    /// Whether the file gave strains rather than axes.
    pub strain_input: bool,
    /// The judged locations, summarised.
    pub summary: Summary,
    /// The forming stages in order, for a file whose locations were measured after several.
    pub stages: Vec<String>,
    /// Things the user should know (clamps, ignored columns).
    pub warnings: Vec<String>,
    /// The input files and their SHA-256, where the command recorded them.
    pub files: Vec<crate::digest::FileDigest>,
    /// When the analysis was made: the generation time of every output written from it.
    pub generated: crate::run_time::RunTime,
    /// The part's outline on the map: the job's `outline` file when set before
    /// [`Analysis::finish`], else traced there from the summary's map cells.
    pub outline: Option<crate::part_outline::PartOutline>,
}

/// The overall verdict of an analysis.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Verdict {
    /// At least one failed location.
    Fail,
    /// No failure, at least one marginal location.
    Marginal,
    /// No failure or marginal location, but some locations could not be judged (outside the
    /// curve's range, or rows rejected).
    Incomplete,
    /// Every location judged and none failed or marginal.
    Pass,
}

impl Verdict {
    /// Name as written in files.
    pub fn name(self) -> &'static str {
        match self {
            Verdict::Fail => "fail",
            Verdict::Marginal => "marginal",
            Verdict::Incomplete => "incomplete",
            Verdict::Pass => "pass",
        }
    }
}

/// A warning when the curve was made for a sheet more than 10 % thicker or thinner than t0:
/// forming limits rise with thickness (Keeler-Brazier: +14.13 t), so a curve for other sheet
/// judges the part wrongly.
fn thickness_mismatch(curve: &LimitCurve, lengths: &Lengths) -> Option<String> {
    let curve_t = curve.thickness_mm?;
    let t0 = crate::units::Length::new(lengths.t0?, lengths.unit).mm();
    ((curve_t - t0).abs() > 0.1 * t0).then(|| {
        format!(
            "the limit curve is for {curve_t} mm sheet, but t0 is {t0:.3} mm: \
             use a curve for this thickness"
        )
    })
}

impl Analysis {
    /// An analysis with nothing judged yet: fold locations into `summary`.
    pub fn new(input: PathBuf, job: Job, ctx: Context, view: View, notes: &[String]) -> Self {
        let mut warnings = ctx.curve.warnings.clone();
        warnings.extend(thickness_mismatch(&ctx.curve, &ctx.lengths));
        warnings.extend(notes.iter().cloned());
        let mut summary = Summary::new(view);
        summary.supported = ctx.curve.supported_true();
        Analysis {
            input,
            job,
            lengths: ctx.lengths,
            curve: ctx.curve,
            settings: ctx.settings,
            strain_input: ctx.strain_input,
            summary,
            stages: Vec::new(),
            warnings,
            files: Vec::new(),
            generated: crate::run_time::RunTime::now(),
            outline: None,
        }
    }

    /// Judge `states` (with `rejected` rows) into a new analysis, in memory: for inputs that
    /// are not streamed (grid nodes, tests).
    pub fn of_states(
        input: PathBuf,
        job: Job,
        ctx: Context,
        view: View,
        states: impl IntoIterator<Item = StateInput>,
        rejected: Vec<RejectedRow>,
        notes: &[String],
    ) -> (Self, Vec<PointResult>) {
        let mut a = Analysis::new(input, job, ctx.clone(), view, notes);
        let mut all = Vec::new();
        for s in states {
            let p = ctx.judge(s);
            all.push(p.clone());
            a.summary.fold(p);
        }
        for r in rejected {
            a.summary.rejected.push(r);
        }
        a.finish();
        (a, all)
    }

    /// Add the warnings that need the whole file (strain columns that disagree).
    /// Trace the part's outline unless one was read from a file.
    pub fn finish(&mut self) {
        self.summary.flush();
        if self.outline.is_none() {
            let map = &self.summary.map;
            let cells = map.cells().keys().copied();
            self.outline = crate::part_outline::trace(cells, map.size(), self.summary.map_extent);
        }
        if let (Some((lo, hi)), u) = (self.summary.supported, &self.summary.unsupported) {
            if u.total > 0 {
                self.warnings.push(format!(
                    "{} location{} judged on an unsupported part of the curve (outside {:.2} to \
                     {:.2} % true minor strain, where the circles it was fitted to were of one \
                     kind only): {}{}",
                    u.total,
                    if u.total == 1 { " was" } else { "s were" },
                    100.0 * lo,
                    100.0 * hi,
                    u.items
                        .iter()
                        .take(10)
                        .cloned()
                        .collect::<Vec<_>>()
                        .join(", "),
                    if u.total > 10 { ", ..." } else { "" }
                ));
            }
        }
        let d = &self.summary.disagree;
        if d.total > 0 {
            self.warnings.push(format!(
                "engineering and true strain disagree beyond rounding (0.01 pp) in {} row{}, \
                 first at {}: true strain was used",
                d.total,
                if d.total == 1 { "" } else { "s" },
                d.items.first().map_or("", String::as_str)
            ));
        }
    }

    /// Locations judged.
    pub fn total(&self) -> usize {
        self.summary.total
    }

    /// Locations kept for drawing: all of them when the file is small (see
    /// [`Summary::complete`]).
    pub fn points(&self) -> &[PointResult] {
        &self.summary.kept
    }

    /// Rejected rows (the first ones; [`Analysis::rejected_total`] counts them all).
    pub fn rejected(&self) -> &[RejectedRow] {
        &self.summary.rejected.items
    }

    /// How many rows were rejected.
    pub fn rejected_total(&self) -> usize {
        self.summary.rejected.total
    }

    /// Measured against computed thickness; `None` when no location has both.
    pub fn thickness_check(&self) -> Option<&ThicknessCheck> {
        self.summary.thickness.as_ref()
    }

    /// Number of points in each zone, worst zone first.
    pub fn counts(&self) -> Vec<(Zone, usize)> {
        Zone::ALL
            .into_iter()
            .map(|z| (z, self.summary.count(z)))
            .collect()
    }

    /// Number of points in `zone`.
    pub fn count(&self, zone: Zone) -> usize {
        self.summary.count(zone)
    }

    /// Ids of the locations whose zone could change within the reading error, in file order
    /// (the first ones), and how many there are.
    pub fn borderline(&self) -> (&[String], usize) {
        (
            &self.summary.borderline.items,
            self.summary.borderline.total,
        )
    }

    /// The `n` worst judged points (at most [`crate::summary::WORST_KEPT`]): failed before
    /// marginal before the rest, then smallest vertical margin first.
    pub fn worst(&self, n: usize) -> Vec<&PointResult> {
        self.summary.worst.iter().take(n).collect()
    }

    /// The overall verdict.
    pub fn verdict(&self) -> Verdict {
        if self.count(Zone::Failed) > 0 {
            Verdict::Fail
        } else if self.count(Zone::Marginal) > 0 {
            Verdict::Marginal
        } else if self.count(Zone::Uncovered) > 0 || self.rejected_total() > 0 {
            Verdict::Incomplete
        } else {
            Verdict::Pass
        }
    }

    /// Whether `--fail-on zone` should make the run exit 1: any point in `zone` or a worse one
    /// (failed is worse than marginal). Uncovered points and rejected rows always count: they
    /// cannot be shown safe.
    pub fn trips(&self, zone: Zone) -> bool {
        self.rejected_total() > 0
            || self.count(Zone::Uncovered) > 0
            || Zone::ALL
                .into_iter()
                .filter(|z| *z <= zone)
                .any(|z| self.count(z) > 0)
    }
}
