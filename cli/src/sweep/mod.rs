//! Sweeps: many variants of one case, run in parallel, tabulated one row per scenario.
//! [`spec`] parses `--vary`, [`plan`] numbers the scenarios and shards them, [`exec`]
//! checks and runs them in parallel, [`table`] writes and reads the result table. The
//! command itself (arguments, progress, printing) is `commands::sweep`.

pub mod exec;
pub mod plan;
pub mod spec;
pub mod table;
