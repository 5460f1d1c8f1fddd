//! # neckline (the command line)
//!
//! A thin layer over [`neckline_core`] (physics, readers, judgement) and [`neckline_render`]
//! (pictures and pages): clap definitions in [`cli`] and [`args`], one short file per command in
//! [`commands`].
//!
//! Caution: an aid to judgement. The user's own forming-limit data, local codes and licensed
//! engineering practice govern.
#![warn(missing_docs)]
#![deny(clippy::float_cmp)]
#![allow(clippy::result_large_err)]

pub mod args;
pub mod cli;
pub mod commands;
pub mod interrupt;
pub mod output_set;
