//! boreflux-solver: transient radial flow through screen, filter pack, wall cake,
//! invaded zone and formation under a cyclic development drive.
//!
//! Data flow: a checked [`Model`] (SI units) → [`grid::Grid`] and
//! [`system::Discretization`] → [`stepper::Stepper`] (θ-scheme, Newton for nonlinear
//! losses) driven by [`run::run`], which streams [`diagnostics::StepView`]s to a
//! [`diagnostics::StepObserver`] and returns a [`run::RunSummary`]. Nothing here reads or
//! writes files. Sign convention: positive flow is outward (well → formation); heads are
//! relative to the static level, m.
#![deny(missing_docs)]

pub mod assess;
pub mod cake;
pub mod calibrate;
pub mod cost;
pub mod damage;
pub mod devices;
pub mod diagnostics;
pub mod drive;
pub mod error;
pub mod faces;
#[doc(hidden)]
pub mod fixtures;
pub mod grid;
pub mod harmonic;
pub mod limits;
pub mod media;
pub mod model;
pub mod periodic;
pub mod run;
pub mod safety;
pub mod skin;
pub mod slow;
pub mod stepper;
pub mod steptest;
pub mod system;
pub mod tridiag;
pub mod water;

pub use diagnostics::{
    CycleView, EventKind, EventSet, JumpBound, JumpView, StepObserver, StepValues, StepView,
};
pub use drive::Drive;
pub use error::SolverError;
pub use model::Model;
pub use run::{run, Reporting, RunSummary};
