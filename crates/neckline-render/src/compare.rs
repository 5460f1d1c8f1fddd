//! The comparison of tryouts for people: the diagram with arrows ([`fld`]), the map of margin
//! change ([`map`]), the printable page ([`page`]) and the terminal summary ([`terminal`]).

pub mod fld;
pub mod map;
pub mod page;
pub mod record;
pub mod terminal;
