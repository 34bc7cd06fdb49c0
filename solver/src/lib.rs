//! boreflux-solver: transient radial flow through screen, filter pack, wall cake,
//! invaded zone and formation under a cyclic development drive.
#![deny(missing_docs)]
