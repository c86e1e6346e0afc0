//! Report formats.
pub mod fit;
