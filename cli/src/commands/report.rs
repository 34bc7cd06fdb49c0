//! `boreflux report`: an HTML page from result files. The output is checked like every
//! command's (see [`super::outputs`]): never one of the inputs, never over an existing file
//! without `--force`. An input that is not a readable boreflux result (text, empty,
//! truncated, foreign or crafted HDF5) is bad input (exit 2), as in `merge`.

use super::outputs::{check_output, refuse_inputs};
use super::Failure;
use crate::args::ReportArgs;
use crate::report::ReportError;
use anyhow::anyhow;

/// Runs the command.
pub fn report(a: &ReportArgs) -> Result<(), Failure> {
    if let Some(missing) = a.inputs.iter().find(|p| !p.is_file()) {
        return Err(Failure::Input(anyhow!(
            "cannot read result file {}: {}",
            missing.display(),
            if missing.exists() {
                "not a regular file"
            } else {
                "no such file"
            }
        )));
    }
    // A sweep writes its table twice; the report reads the HDF5 one.
    if let Some(csv) = a
        .inputs
        .iter()
        .find(|p| p.extension().is_some_and(|e| e.eq_ignore_ascii_case("csv")))
    {
        let h5 = csv.with_extension("h5");
        return Err(Failure::Input(anyhow!(
            "{}: the report reads HDF5 result files, not CSV tables{}",
            csv.display(),
            if h5.is_file() {
                format!("; give {} (the same table in HDF5)", h5.display())
            } else {
                String::new()
            }
        )));
    }
    refuse_inputs(&[(&a.output, "-o/--output")], &a.inputs).map_err(Failure::Input)?;
    check_output(&a.output, "-o/--output", a.force).map_err(Failure::Input)?;
    crate::report::write_titled_report(&a.inputs, &a.output, a.title.as_deref()).map_err(|e| {
        match &e {
            ReportError::Write { .. } => Failure::Runtime(anyhow!("{e}")),
            ReportError::Input { source, .. } => Failure::with_code(source.exit_code(), e),
            ReportError::NoInputs
            | ReportError::SweepMixed { .. }
            | ReportError::SweepFirstDiffers { .. }
            | ReportError::SweepSampled { .. } => Failure::Input(anyhow!("{e}")),
        }
    })?;
    eprintln!("report written to {}", a.output.display());
    Ok(())
}
