//! Case files: parsing, units, validation and conversion to the solver model.
//!
//! A case file (JSON, see docs/formats.md "Case file") is read in two steps: serde reads it into
//! the raw structs of `raw` (user units kept as written, unknown keys rejected with a
//! hint), then `convert` turns those into a checked [`boreflux_solver::Model`] in SI,
//! filling every default and recording what it derived. Errors name the key path:
//!
//! ```text
//! pack.porosity: must be between 0 and 1, got 1.3
//! pack.porosty: unknown key `porosty`; did you mean `porosity`?
//! line 4 column 7: invalid JSON: expected `,` or `}`
//! ```

pub mod assessment;
mod checks;
mod convert;
mod drives;
mod error;
mod grains;
mod hints;
mod numerics;
mod output;
pub use output::Storage;
mod quantity;
pub(crate) use quantity::KINDS as QUANTITY_KINDS;
mod raw;
mod scenarios;
mod schema;
mod strict;
mod structured;
mod zones;

pub use error::CaseError;
pub use scenarios::{scenario_companions, scenarios};
pub use schema::schema;
pub use strict::{read_case_json, read_json};

use crate::read_error::TextReadError;
use std::path::Path;

/// Inputs of the screen and casing collapse check, from the optional `well` keys.
#[derive(Debug, Clone, PartialEq)]
pub struct SafetyInputs {
    /// Manufacturer's collapse rating `well.collapse_rating`, Pa.
    pub collapse_rating_pa: Option<f64>,
    /// `well.material`, lower case: "pvc", "steel", "stainless" or another name.
    pub material: Option<String>,
    /// `well.dimension_ratio`: outside diameter / wall thickness.
    pub dimension_ratio: Option<f64>,
    /// `well.screen_collapse_rating`, Pa.
    pub screen_collapse_rating_pa: Option<f64>,
    /// `well.slot_derating`, in (0, 1].
    pub slot_derating: Option<f64>,
    /// `well.yield_strength`, Pa.
    pub yield_strength_pa: Option<f64>,
    /// `well.youngs_modulus`, Pa.
    pub youngs_modulus_pa: Option<f64>,
    /// `well.poisson_ratio`.
    pub poisson_ratio: Option<f64>,
    /// `well.safety_factor` (default 2).
    pub safety_factor: f64,
    /// `formation.specific_gravity` of the grains [2.65].
    pub formation_specific_gravity: f64,
}

/// A case file read, converted and checked.
#[derive(Debug, Clone, PartialEq)]
pub struct LoadedCase {
    /// The checked model, SI.
    pub model: boreflux_solver::Model,
    /// `title` ["" when not given].
    pub title: String,
    /// `description` ["" when not given].
    pub description: String,
    /// The resolved case in SI with every default filled: a loadable case file, stored as
    /// the HDF5 root attribute `case_json`.
    pub resolved: serde_json::Value,
    /// Collapse-check inputs.
    pub safety: SafetyInputs,
    /// Report every n-th step (`numerics.output_every`, at least 1).
    pub output_every: u64,
    /// What the result file keeps (`output`, "auto" resolved).
    pub storage: Storage,
    /// The virtual tests of the `assessment` section, defaults filled.
    pub assessment: boreflux_solver::assess::TestPlan,
    /// Derivations the user should see in `check` (which estimate, which default).
    pub notes: Vec<String>,
    /// Doubts about the inputs that do not stop the run.
    pub warnings: Vec<String>,
}

/// Notes and warnings gathered while converting.
#[derive(Debug, Default)]
pub(crate) struct Log {
    notes: Vec<String>,
    warnings: Vec<String>,
}

impl Log {
    fn note(&mut self, s: impl Into<String>) {
        self.notes.push(s.into());
    }

    fn warn(&mut self, s: impl Into<String>) {
        self.warnings.push(s.into());
    }

    fn append(&mut self, other: Log) {
        self.notes.extend(other.notes);
        self.warnings.extend(other.warnings);
    }
}

/// Largest case file read, bytes (inline table points included).
pub const MAX_CASE_BYTES: u64 = 200_000_000;

/// Reads a regular file of at most `max` bytes as UTF-8 text. FIFOs, devices and folders
/// are refused (they could block or never end); the error never quotes the file's content.
pub fn read_limited(path: &Path, max: u64, what: &'static str) -> Result<String, TextReadError> {
    use std::io::Read;
    let shown = || path.display().to_string();
    let io = |source| TextReadError::Io {
        what,
        path: shown(),
        source,
    };
    let meta = std::fs::metadata(path).map_err(io)?;
    if !meta.is_file() {
        return Err(TextReadError::NotRegular {
            what,
            path: shown(),
        });
    }
    if meta.len() > max {
        return Err(TextReadError::TooLarge {
            what,
            path: shown(),
            size: meta.len(),
            max,
        });
    }
    let file = std::fs::File::open(path).map_err(io)?;
    let mut bytes = Vec::new();
    file.take(max + 1).read_to_end(&mut bytes).map_err(io)?;
    if bytes.len() as u64 > max {
        return Err(TextReadError::Grew {
            what,
            path: shown(),
            max,
        });
    }
    String::from_utf8(bytes).map_err(|e| TextReadError::NotUtf8 {
        what,
        path: shown(),
        offset: e.utf8_error().valid_up_to(),
    })
}

/// Reads, converts and checks the case file at `path`; drive files are found beside it.
pub fn load_case(path: &Path) -> Result<LoadedCase, CaseError> {
    let text = read_limited(path, MAX_CASE_BYTES, "case file")
        .map_err(|e| CaseError::new("", e.to_string()))?;
    let base = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    parse_case(&text, base)
}

/// Converts and checks case-file text; `base_dir` resolves relative drive files.
pub fn parse_case(text: &str, base_dir: &Path) -> Result<LoadedCase, CaseError> {
    let value = read_case_json(text)?;
    let raw: raw::RawCase = serde_path_to_error::deserialize(structured::ValueDeserializer(value))
        .map_err(|e| CaseError::structure(e, ""))?;
    convert::convert(raw, base_dir)
}
