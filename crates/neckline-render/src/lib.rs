//! # neckline-render
//!
//! Every picture and page neckline draws for people, from the one result of the core crate:
//! the forming-limit diagram ([`fld`]), the part map ([`map`]), the strain-path diagram
//! ([`peps`]), the printable report ([`report`], on the layout of [`page`]), the terminal
//! summary ([`terminal`]), the comparison of tryouts ([`compare`]), the press-shop curve's
//! picture ([`parts`]), the laboratory curve from test sections ([`sections`]) and the
//! interactive review page ([`review`]).
//!
//! Layers, each using only those below it: [`plot`] (fonts, palette, markers, encoders), then
//! [`chart`] (the one chart style: frame, title, legend, footer, label placement), then the
//! pictures, then the pages ([`page`], [`report`], [`compare::page`], [`review`]).
//!
//! Caution: an aid to judgement. The user's own forming-limit data, local codes and licensed
//! engineering practice govern.
#![warn(missing_docs)]
#![deny(clippy::float_cmp)]
#![allow(clippy::result_large_err)]

pub mod chart;
pub mod compare;
pub mod fld;
pub mod map;
pub mod page;
pub mod parts;
pub mod peps;
pub mod plot;
pub mod report;
pub mod review;
pub mod sections;
pub mod terminal;
pub mod workbook;
