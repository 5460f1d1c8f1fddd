//! # neckline-core
//!
//! The physics, the readers and the judgement of neckline, with no plotting, HTML or command
//! line. The modules follow the data:
//!
//! measurements ([`measure`], [`grid`], [`fit`]) → strains ([`strain`], [`kinematics`]) → limit
//! curve ([`limit`]) → judgement ([`assess`], [`path`], [`observed`]) → one result
//! ([`analysis`], folded into a bounded [`summary`] by the streaming pass [`stream`]) → machine
//! outputs ([`output`]: points.csv, summary.json) and tryout comparison ([`compare`]).
//!
//! Caution: an aid to judgement. The user's own forming-limit data, local codes and licensed
//! engineering practice govern.
#![warn(missing_docs)]
#![deny(clippy::float_cmp)]
// A rejected row carries its full location for the message; it is the rare path.
#![allow(clippy::result_large_err)]

pub mod analysis;
pub mod assess;
pub mod compare;
pub mod digest;
pub mod error;
pub mod fit;
pub mod grid;
pub mod job;
pub mod kinematics;
pub mod limit;
pub mod measure;
pub mod observed;
pub mod output;
pub mod path;
pub mod strain;
pub mod stream;
pub mod summary;
pub mod table;
pub mod units;

pub use analysis::{Analysis, CAUTION};
pub use error::{Error, Result};
