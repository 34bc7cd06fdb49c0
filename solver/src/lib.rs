//! boreflux-solver: transient radial flow through screen, filter pack, wall cake,
//! invaded zone and formation under a cyclic development drive.
#![deny(missing_docs)]

pub mod media;
pub mod safety;
pub mod skin;
pub mod water;
