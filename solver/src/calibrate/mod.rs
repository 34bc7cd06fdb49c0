//! Fitting a model to field records, pure (no I/O): the free parameters and their scales
//! (`param`), Levenberg–Marquardt (`lm`), the finite-difference Jacobian evaluated on
//! scoped threads (`jacobian`), the uncertainty of the fit (`stats`: Jacobian intervals,
//! correlation, identifiability) and what a fitted value may be called (`verdict`: not
//! converged, at or near a bound, weakly constrained). What is compared with what (the
//! records, the model on the record's schedule) is the caller's: the fit sees only a
//! residual function of the transformed parameters. docs/calibration.md states the method.

pub mod jacobian;
pub mod lm;
pub mod param;
pub mod profile;
pub mod stats;
pub mod verdict;

pub use jacobian::forward_jacobian;
pub use lm::{minimize, LmOptions, LmOutcome, Termination};
pub use param::{FreeParameter, Scale};
pub use profile::{profile_interval, Setup, Side};
pub use stats::{uncertainty, Identifiability, Uncertainty};
pub use verdict::{assess, Bound, Label, Verdict};
