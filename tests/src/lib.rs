//! Verification set: runs the solver on analytic reference cases.
