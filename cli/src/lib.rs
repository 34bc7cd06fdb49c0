//! boreflux command-line library: case files, output writers, reports and commands. The
//! binary (`main.rs`) only parses arguments and dispatches here.

pub mod args;
pub mod calibrate;
pub mod case;
pub mod commands;
pub mod cost;
pub mod output;
pub mod read_error;
pub mod report;
pub mod sigfig;
pub mod steptest;
pub mod summary;
pub mod sweep;
pub mod units;
