//! Designing a schedule from a start size, a finish size and the limits (being built).
