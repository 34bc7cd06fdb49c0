//! The one error type of case loading: a field path and a message.
//!
//! Displayed as `field: message` (`pack.porosity: must be between 0 and 1, got 1.3`). The
//! field is empty for errors that concern no single key (a file that cannot be read, JSON
//! syntax); the message then carries the location (`line 4 column 7: …`).

use super::hints::suggestion;
use super::structured::StructError;
use boreflux_solver::SolverError;
use std::fmt;

/// A case file that cannot be turned into a model.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CaseError {
    /// Case-file path of the offending key (`pack.porosity`, `drive.frequency`), or empty.
    pub field: String,
    /// What is wrong, naming the bad value.
    pub message: String,
}

impl fmt::Display for CaseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.field.is_empty() {
            f.write_str(&self.message)
        } else {
            write!(f, "{}: {}", self.field, self.message)
        }
    }
}

impl std::error::Error for CaseError {}

impl CaseError {
    /// An error about `field`.
    pub fn new(field: impl Into<String>, message: impl Into<String>) -> Self {
        CaseError {
            field: field.into(),
            message: message.into(),
        }
    }

    /// A JSON syntax error, located by line and column.
    pub fn syntax(err: &serde_json::Error) -> Self {
        let text = err.to_string();
        let suffix = format!(" at line {} column {}", err.line(), err.column());
        let what = text.strip_suffix(&suffix).unwrap_or(&text);
        CaseError::new(
            "",
            format!(
                "line {} column {}: invalid JSON: {what}",
                err.line(),
                err.column()
            ),
        )
    }

    /// A structural error (unknown key, missing key, wrong type) found while reading the
    /// JSON into the case structs. `prefix` is the path of the value that was read (empty
    /// for the whole case). The hint is computed from the error's data (the word written
    /// and the names accepted), not from a message text.
    pub fn structure(err: serde_path_to_error::Error<StructError>, prefix: &str) -> Self {
        let path = err.path().to_string();
        let join = |a: &str, b: &str| match (a, b) {
            ("", b) | (".", b) => b.to_owned(),
            (a, "") | (a, ".") => a.to_owned(),
            (a, b) => format!("{a}.{b}"),
        };
        let at = join(prefix, &path);
        match err.into_inner() {
            StructError::UnknownField { field, expected } => CaseError::new(
                at,
                format!("unknown key `{field}`; {}", suggestion(&field, expected)),
            ),
            StructError::MissingField(key) => {
                CaseError::new(join(&at, key), "required key is missing")
            }
            StructError::UnknownVariant { variant, expected } => CaseError::new(
                at,
                format!(
                    "unknown value \"{variant}\"; {}",
                    suggestion(&variant, expected)
                ),
            ),
            StructError::Other(message) => CaseError::new(at, plain_types(&message)),
        }
    }
}

/// A type mismatch reported by serde, with Rust's type names put in words: "expected f64"
/// becomes "expected a plain number (this key takes no unit)", "expected u32" "expected a
/// whole number", and so on; other messages are kept as they are.
fn plain_types(message: &str) -> String {
    const WORDS: [(&str, &str); 9] = [
        ("f64", "a plain number (this key takes no unit)"),
        ("f32", "a plain number (this key takes no unit)"),
        ("u8", "a whole number"),
        ("u16", "a whole number"),
        ("u32", "a whole number"),
        ("u64", "a whole number"),
        ("usize", "a whole number"),
        ("i64", "a whole number"),
        ("a boolean", "true or false"),
    ];
    let mut out = message.to_owned();
    for (rust, words) in WORDS {
        for end in ["", "."] {
            let from = format!("expected {rust}{end}");
            if out.ends_with(&from) {
                out = format!("{}expected {words}{end}", &out[..out.len() - from.len()]);
            }
        }
    }
    out
}

/// Solver field names that differ from the case-file key the user wrote.
fn case_field(solver_field: &str) -> (String, Option<String>) {
    match solver_field {
        "fluid.density" | "fluid.viscosity" => ("fluid.temperature".to_owned(), None),
        "numerics.cells_per_decade" => ("numerics.cells.per_decade".to_owned(), None),
        f => match f.strip_prefix("drive.file row ") {
            Some(row) => ("drive.file".to_owned(), Some(format!("row {row}: "))),
            None => (f.to_owned(), None),
        },
    }
}

impl From<SolverError> for CaseError {
    fn from(e: SolverError) -> Self {
        match e {
            SolverError::InvalidInput { field, reason } => {
                let (field, prefix) = case_field(&field);
                CaseError::new(field, format!("{}{reason}", prefix.unwrap_or_default()))
            }
            other => CaseError::new("", other.to_string()),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn type_names_are_put_in_words() {
        // serde's messages for a quantity where a plain number is wanted, a fraction where
        // a count is, and a string where a flag is.
        assert_eq!(
            plain_types("invalid type: string \"0.5 Hz\", expected f64"),
            "invalid type: string \"0.5 Hz\", expected a plain number (this key takes no unit)"
        );
        assert_eq!(
            plain_types("invalid type: floating point `10.5`, expected u32"),
            "invalid type: floating point `10.5`, expected a whole number"
        );
        assert_eq!(
            plain_types("invalid type: string \"yes\", expected a boolean"),
            "invalid type: string \"yes\", expected true or false"
        );
        assert_eq!(plain_types("something else"), "something else");
    }

    #[test]
    fn display_works() {
        assert_eq!(
            CaseError::new("pack.porosity", "bad").to_string(),
            "pack.porosity: bad"
        );
        assert_eq!(CaseError::new("", "cannot read").to_string(), "cannot read");
    }

    #[test]
    fn solver_errors_keep_their_field() {
        let e: CaseError = SolverError::invalid("pack.porosity", "must be …, got 1.3").into();
        assert_eq!(e.field, "pack.porosity");
        let e: CaseError = SolverError::invalid("drive.file row 3", "got NaN").into();
        assert_eq!(e.to_string(), "drive.file: row 3: got NaN");
    }
}
