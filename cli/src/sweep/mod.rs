//! Sweeps: many variants of one case, run in parallel, tabulated one row per scenario.
//! [`spec`] parses `--vary`, [`plan`] numbers the scenarios and shards them, [`exec`]
//! checks and runs them in parallel, [`table`] writes and reads the result table. The
//! command itself (arguments, progress, printing) is `commands::sweep`. A sampled sweep
//! (`--sample`) draws its scenarios instead: [`dist`] parses each input's distribution,
//! [`design`] draws the matrix of probabilities (random or Latin hypercube, seeded),
//! [`normal`] is the normal quantile they pass through; [`stats`] holds the percentile and
//! interval the sweep report uses.

pub mod design;
pub mod dist;
pub mod exec;
pub mod normal;
pub mod plan;
pub mod sampled;
pub mod series;
pub mod spec;
pub mod stats;
pub mod table;

#[cfg(test)]
mod reference_checks;
