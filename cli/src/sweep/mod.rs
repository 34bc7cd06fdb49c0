//! Sweeps: many variants of one case, run in parallel, tabulated one row per scenario.
//! [`spec`] parses `--vary`, [`plan`] numbers the scenarios and shards them, [`table`]
//! writes and reads the result table. The command itself is `commands::sweep`.

pub mod plan;
pub mod spec;
pub mod table;
