//! boreflux command-line entry point.
fn main() {}
