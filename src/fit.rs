//! Fitting flow-stress laws to tensile-test data (being built).
