//! `neckline limit`: forming-limit curves from material data (Keeler-Brazier, analytic necking
//! limits, Marciniak-Kuczynski) or from circles read on necked and split parts (`from-parts`),
//! written as the curve TOML `check` reads, and `limit compare`.
//!
//! - [`models`]: the three material models, arguments to [`GeneratedCurve`];
//! - [`from_parts`]: the parts file read and hashed, the fit, the curve's source record;
//! - [`from_sections`]: the laboratory curve from test-section strain profiles;
//! - [`curves_compare`]: `limit compare`, two curves side by side;
//! - [`emit`]: what every curve command shares: `--out`, `--plot`, the checked write.
//!
//! [`GeneratedCurve`]: neckline_core::limit::writer::GeneratedCurve

pub mod curves_compare;
pub mod emit;
pub mod from_parts;
pub mod from_sections;
pub mod models;

pub use curves_compare::CurvesCompareArgs;
pub use emit::{CurveOutArgs, PictureFormat};
pub use from_parts::FromPartsArgs;
pub use from_sections::FromSectionsArgs;
pub use models::{KeelerBrazierArgs, MkArgs, NeckingArgs};

use super::Outcome;
use clap::{Args, Subcommand};
use neckline_core::error::Result;

/// Arguments of `limit`.
#[derive(Debug, Clone, Args)]
pub struct LimitArgs {
    /// Which curve to build, or `compare`.
    #[command(subcommand)]
    pub model: LimitCommand,
}

/// The `limit` subcommands.
#[derive(Debug, Clone, Subcommand)]
pub enum LimitCommand {
    /// Empirical steel curve from n and thickness (Keeler-Brazier; steels only), engineering strain.
    KeelerBrazier(KeelerBrazierArgs),
    /// Analytic necking limits of a power-law material (Hill 1952 left; Swift 1952 or
    /// Storen-Rice 1975 right), true strain.
    Necking(NeckingArgs),
    /// Marciniak-Kuczynski prediction (Hill 1948 with r0, r45, r90; Swift hardening), true strain.
    Mk(MkArgs),
    /// Press-shop curve from circles read on necked or split parts (a `condition` column: safe,
    /// necked, split), true strain.
    FromParts(FromPartsArgs),
    /// Laboratory curve from test-section strain profiles (position-dependent method after
    /// ISO 12004-2), true strain.
    FromSections(FromSectionsArgs),
    /// Print two curves' engineering major strain and their difference at a set of minor strains.
    Compare(CurvesCompareArgs),
}

/// Run `limit`.
pub fn run(args: &LimitArgs) -> Result<Outcome> {
    match &args.model {
        LimitCommand::KeelerBrazier(a) => models::emit(&models::keeler_brazier_curve(a)?, &a.out),
        LimitCommand::Necking(a) => models::emit(&models::necking_curve(a)?, &a.out),
        LimitCommand::Mk(a) => models::emit(&models::mk_curve(a)?, &a.out),
        LimitCommand::FromParts(a) => from_parts::run(a),
        LimitCommand::FromSections(a) => from_sections::run(a),
        LimitCommand::Compare(a) => curves_compare::run(a),
    }
}
