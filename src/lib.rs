//! coldpass: planning the cold drawing of round wire and bar.
//!
//! The pure computation core: flow-stress laws ([`flow`]), the mechanics of
//! one pass through a conical die ([`pass`]), sizes and gauges ([`size`]).
//! Nothing here prints, reads files or exits; every routine validates its
//! inputs and returns a typed error that names the parameter, its value and
//! what is allowed.

pub mod design;
pub mod evaluation;
pub mod fit;
pub mod flow;
pub mod machine;
pub mod param;
pub mod pass;
pub mod quad;
pub mod risk;
pub mod schedule;
pub mod size;

pub use flow::{Beyond, FlowError, FlowLaw, FlowLawSpec, StrainAt};
pub use param::ParamError;
pub use pass::{
    analyse_pass, optimum_semi_angle, Die, DrawPass, DrawStresses, Method, OptimumAngle, PassError,
    PassMechanics, Settings,
};
pub use quad::{Integral, QuadratureError};
