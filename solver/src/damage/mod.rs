//! Damage removal: the laws by which development changes the well's slow state
//! (docs/physics.md §13, §13a, §13b, §9c–§9e).
//!
//! - [`liftoff`]: cake patches fail when the inward pressure difference across the cake
//!   exceeds their strength (log-normal strengths; coverage follows the peak so far);
//! - the optional shear erosion of what remains is in [`crate::cake`];
//! - [`fines`]: entrainment and deposition of mud fines in the invaded zone, carried by the
//!   radial flow, and the zone's conductivity as fines leave;
//! - [`sand`]: pack and slot retention criteria and a critical velocity of formation grains
//!   at the wall (indicators for sand production).
//!
//! Every function here is pure; [`crate::slow::SlowState`] holds the state and calls them
//! once per accepted step.

pub mod fines;
pub mod liftoff;
pub mod sand;
