//! What every curve-building `limit` command shares: `--out`, `--name`, `--material` and
//! `--plot`, and the write itself: the curve read back before it is written, the picture, the
//! curve file (or standard output) and a summary for people.

use crate::commands::Outcome;
use crate::output_set::OutputSet;
use clap::Args;
use neckline_core::error::{Error, Result};
use neckline_core::limit::writer::GeneratedCurve;
use neckline_core::limit::LimitCurve;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Where and under which name a generated curve goes. The help texts are those of the material
/// models; `from-parts` words its own (see `FromPartsArgs`).
#[derive(Debug, Clone, Args)]
pub struct CurveOutArgs {
    /// Write the curve to this file (atomically) and print the file's name, the curve's
    /// plane-strain limit and the caution [default: the curve to standard output, the caution
    /// to standard error].
    #[arg(long, value_name = "FILE.toml")]
    pub out: Option<PathBuf>,
    /// Curve name shown on outputs [default: built from the model and its parameters].
    #[arg(long, value_name = "NAME")]
    pub name: Option<String>,
    /// Material grade and lot, recorded in the file.
    #[arg(long, value_name = "TEXT")]
    pub material: Option<String>,
    /// Also draw the curve alone on a forming-limit diagram, in the curve's strain measure:
    /// FILE.svg or FILE.png.
    #[arg(long, value_name = "FILE.svg|FILE.png")]
    pub plot: Option<PathBuf>,
}

impl CurveOutArgs {
    /// The picture format `--plot` asks for (`None` without `--plot`); an unknown extension is
    /// refused, so that a command can check it before any work.
    pub fn plot_format(&self) -> Result<Option<PictureFormat>> {
        self.plot.as_deref().map(PictureFormat::of).transpose()
    }

    /// Before the work: check `--plot`'s format, make the folders of `--out` and `--plot`, and
    /// lock them and check that they can be written (see [`OutputSet::begin`]).
    pub fn begin(&self, inputs: &[PathBuf]) -> Result<OutputSet> {
        self.plot_format()?;
        let targets: Vec<&Path> = self
            .out
            .iter()
            .chain(&self.plot)
            .map(|p| p.as_path())
            .collect();
        OutputSet::begin(&targets, None, inputs)
    }
}

/// The format of a picture file, from its name.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PictureFormat {
    /// Scalable vector graphics (`.svg`).
    Svg,
    /// Portable network graphics (`.png`).
    Png,
}

impl PictureFormat {
    /// The format of `path` from its extension (either case); anything but `.svg` and `.png`
    /// is a usage error naming `--plot`.
    pub fn of(path: &Path) -> Result<Self> {
        match path
            .extension()
            .and_then(|e| e.to_str())
            .map(str::to_ascii_lowercase)
            .as_deref()
        {
            Some("svg") => Ok(PictureFormat::Svg),
            Some("png") => Ok(PictureFormat::Png),
            _ => Err(Error::Usage(format!(
                "--plot {}: the file name must end in .svg or .png",
                path.display()
            ))),
        }
    }

    /// The picture's bytes: `svg` or `png` is called, whichever this format is.
    pub fn render(
        self,
        svg: impl FnOnce() -> std::io::Result<String>,
        png: impl FnOnce() -> std::io::Result<Vec<u8>>,
    ) -> std::io::Result<Vec<u8>> {
        match self {
            PictureFormat::Svg => svg().map(String::into_bytes),
            PictureFormat::Png => png(),
        }
    }
}

/// How one command writes its curve: the file's header line, the files it read (never written
/// over), its picture and its summary.
pub struct CurveWrite<'a, P, S>
where
    P: FnOnce(&LimitCurve, PictureFormat) -> std::io::Result<Vec<u8>>,
    S: FnOnce(&LimitCurve, Option<&Path>) -> String,
{
    /// The comment line that opens the curve file.
    pub header: &'a str,
    /// The files read; no output may be one of them.
    pub inputs: &'a [PathBuf],
    /// The `--plot` picture of the curve as read back.
    pub picture: P,
    /// The summary, given the file written, or `None` when the curve went to standard output
    /// (the summary then goes to standard error).
    pub summary: S,
    /// Where the files are staged, from [`CurveOutArgs::begin`].
    pub set: OutputSet,
}

/// Check the curve by reading it back, draw `--plot` if asked, then write the curve to `--out`
/// (atomically; the summary to standard output) or to standard output (the summary to
/// standard error).
pub fn emit_curve<P, S>(
    curve: &GeneratedCurve,
    out: &CurveOutArgs,
    how: CurveWrite<'_, P, S>,
) -> Result<Outcome>
where
    P: FnOnce(&LimitCurve, PictureFormat) -> std::io::Result<Vec<u8>>,
    S: FnOnce(&LimitCurve, Option<&Path>) -> String,
{
    let format = out.plot_format()?;
    let mut set = how.set;
    set.add_inputs(how.inputs)?;
    let shown = out.out.clone().unwrap_or_else(|| PathBuf::from("<stdout>"));
    let (text, parsed) = curve.render_checked_with(&shown, how.header)?;
    if let (Some(path), Some(format)) = (&out.plot, format) {
        let bytes = (how.picture)(&parsed, format).map_err(|e| Error::io(path, e))?;
        set.write(path, &bytes)?;
    }
    if let Some(path) = &out.out {
        set.write(path, text.as_bytes())?;
    }
    set.commit()?;
    if let Some(path) = &out.plot {
        eprintln!("Drew {}", path.display());
    }
    match &out.out {
        None => {
            let mut o = std::io::stdout().lock();
            o.write_all(text.as_bytes())
                .map_err(|e| Error::io(Path::new("<stdout>"), e))?;
            eprint!("{}", (how.summary)(&parsed, None));
        }
        Some(path) => print!("{}", (how.summary)(&parsed, Some(path))),
    }
    Ok(Outcome::Done)
}
