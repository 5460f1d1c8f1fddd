//! Writing results: every writer takes the one [`Analysis`](crate::analysis::Analysis).
//! Files are written atomically (a temporary file in the same folder, then a rename), and never
//! over a file that was read as input.

#[cfg(test)]
pub mod fixture;
pub mod fld;
pub mod map;
pub mod plot;
pub mod points_csv;
pub mod report;
pub mod summary_json;
pub mod terminal;

use crate::error::{Error, Result};
use std::fs::{self, File};
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

/// Refuse `target` if it is one of `inputs` (compared after resolving links and `..`).
pub fn guard_inputs(target: &Path, inputs: &[PathBuf]) -> Result<()> {
    let Ok(t) = fs::canonicalize(target) else {
        return Ok(()); // does not exist yet: cannot be an input
    };
    for input in inputs {
        if fs::canonicalize(input).is_ok_and(|i| i == t) {
            return Err(Error::Usage(format!(
                "refusing to write {}: it is an input file of this run; choose another --out",
                target.display()
            )));
        }
    }
    Ok(())
}

/// Write `path` atomically: `fill` writes into a temporary file beside it, which is renamed over
/// `path` only when `fill` succeeded. On failure the temporary file is removed.
pub fn write_atomic(
    path: &Path,
    inputs: &[PathBuf],
    fill: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
) -> Result<()> {
    guard_inputs(path, inputs)?;
    let name = path
        .file_name()
        .map_or_else(|| "out".into(), |n| n.to_string_lossy().into_owned());
    let tmp = path.with_file_name(format!(".{name}.{}.tmp", std::process::id()));
    let result = (|| {
        let mut w = BufWriter::new(File::create(&tmp)?);
        fill(&mut w)?;
        w.into_inner().map_err(|e| e.into_error())?.sync_all()?;
        fs::rename(&tmp, path)
    })();
    if let Err(e) = result {
        let _ = fs::remove_file(&tmp);
        return Err(Error::io(path, e));
    }
    Ok(())
}

/// Format an optional number with `decimals`, empty when absent.
pub fn fmt_opt(v: Option<f64>, decimals: usize) -> String {
    v.map_or_else(String::new, |v| format!("{v:.decimals$}"))
}
