//! Tables, CSV and chart for `coldpass fit` (being built).
