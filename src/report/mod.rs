//! Output formats. One file per format; each turns results into text and
//! never writes files or computes physics.

pub mod bom;
pub mod csv;
pub mod spice;
pub mod svg;
pub mod table;
pub mod text;
pub mod verify_table;
