//! `boreflux calibrate`: a development log (`record`), free case parameters (`free`), the
//! model on the log's schedule (`schedule`), the fit and its uncertainty (`fit`, with the
//! numerics in `boreflux_solver::calibrate`), its text and JSON (`text`) and the
//! calibrated case file (`written`).
//! docs/calibration.md describes the method and the file format.

pub mod fit;
pub mod free;
pub mod record;
pub mod schedule;
pub mod steps;
pub mod text;
pub mod written;
