//! # neckline-core
//!
//! The physics, the readers and the judgement of neckline, with no plotting, HTML or command
//! line. The modules follow the data:
//!
//! measurements ([`measure`], [`grid`], [`fit`]) → strains ([`strain`], [`kinematics`]) → limit
//! curve ([`limit`]) → judgement ([`assess`], [`path`]) → one judged location ([`point`]) →
//! a bounded [`summary`] with the [`observed`] tally → the whole run ([`analysis`]), folded by
//! the streaming pass [`stream`] → machine outputs ([`output`]: points.csv, summary.json) and
//! tryout comparison ([`compare`]).
//!
//! The modules form layers: each uses only those below it. Bottom to top: [`units`],
//! [`strain`], [`error`], [`digest`], [`capped`], [`condition`] → [`kinematics`] → [`limit`] →
//! [`measure`] → [`assess`] → [`path`], [`grid`] → [`point`] → [`observed`], [`summary`] →
//! [`part_outline`] → [`job`], [`analysis`] → [`stream`], [`output`] → [`compare`]; [`fit`] beside [`grid`].
//!
//! Caution: an aid to judgement. The user's own forming-limit data, local codes and licensed
//! engineering practice govern.
#![warn(missing_docs)]
#![deny(clippy::float_cmp)]
// A rejected row carries its full location for the message; it is the rare path.
#![allow(clippy::result_large_err)]

pub mod analysis;
pub mod assess;
pub mod capped;
pub mod chunk;
pub mod compare;
pub mod condition;
pub mod digest;
pub mod error;
pub mod fit;
pub mod grid;
pub mod hotspot;
pub mod job;
pub mod kinematics;
pub mod limit;
pub mod measure;
pub mod observed;
pub mod output;
pub mod part_outline;
pub mod path;
pub mod point;
pub mod pool;
pub mod run_time;
pub mod sheet_cells;
pub mod strain;
pub mod stream;
pub mod summary;
pub mod table;
pub mod text;
pub mod units;
pub mod workbook;

pub use analysis::Analysis;
pub use error::{Error, Result};

/// The caution carried by every output.
pub const CAUTION: &str = "Caution: neckline is an aid to judgement. The user's own forming-limit \
data, local codes and licensed engineering practice govern every decision on parts and tools.";
