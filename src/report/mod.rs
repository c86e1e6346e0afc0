//! Report formats.
