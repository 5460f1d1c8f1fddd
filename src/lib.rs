//! # neckline
//!
//! Sheet-metal forming-limit analysis from circle grids. The modules follow the data:
//!
//! measurements ([`measure`]) → strains ([`strain`], [`kinematics`]) → limit curve ([`limit`])
//! → judgement ([`assess`]) → one result ([`analysis`]) → outputs ([`output`]).
//!
//! Caution: an aid to judgement. The user's own forming-limit data, local codes and licensed
//! engineering practice govern.
#![warn(missing_docs)]
#![deny(clippy::float_cmp)]
// A rejected row carries its full location for the message; it is the rare path.
#![allow(clippy::result_large_err)]

pub mod analysis;
pub mod assess;
pub mod cli;
pub mod commands;
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
pub mod units;

pub use analysis::{Analysis, CAUTION};
pub use error::{Error, Result};
