//! The design summary for `coldpass design` (being built).
