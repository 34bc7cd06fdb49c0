//! The inputs of a sampled sweep from the command line (`--sample PATH=DISTRIBUTION`,
//! `--samples`, `--seed`, `--design`) and from a JSON file (`--sample-file`):
//!
//! ```text
//! {"design": "lhs", "samples": 200, "seed": 7,
//!  "inputs": [{"path": "pack.conductivity", "distribution": "lognormal(8e-3 m/s, 0.7)"},
//!             {"path": "drive.stroke", "distribution": "triangular(0.3 m, 0.6 m, 0.9 m)"}]}
//! ```
//! "design", "samples" and "seed" may be left to the command line, which overrides the
//! file; the file's inputs come before those of `--sample`. Every error names the
//! offending input or field.

use super::design::Design;
use super::dist::parse;
use super::plan::Plan;
use super::spec::SpecError;
use serde::Deserialize;
use serde_json::Value;

/// The JSON sample file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct SampleFile {
    design: Option<String>,
    samples: Option<usize>,
    seed: Option<u64>,
    #[serde(default)]
    inputs: Vec<Input>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Input {
    path: String,
    distribution: String,
}

/// What the command line says of a sampled sweep.
#[derive(Debug, Default)]
pub struct SampleArgs<'a> {
    /// `--sample PATH=DISTRIBUTION`, in order.
    pub sample: &'a [String],
    /// The text of `--sample-file` and its name for messages.
    pub file: Option<(&'a str, String)>,
    /// `--samples`.
    pub samples: Option<usize>,
    /// `--seed`.
    pub seed: Option<u64>,
    /// `--design`.
    pub design: Option<&'a str>,
}

/// The plan of a sampled sweep.
pub fn sampled_plan(base: Value, a: &SampleArgs<'_>) -> Result<Plan, SpecError> {
    let mut inputs = Vec::new();
    let mut from_file = SampleFile {
        design: None,
        samples: None,
        seed: None,
        inputs: Vec::new(),
    };
    if let Some((name, text)) = &a.file {
        from_file = serde_json::from_str(text)
            .map_err(|e| SpecError(format!("--sample-file {name}: {e}")))?;
        for (k, i) in from_file.inputs.iter().enumerate() {
            let d = parse(&i.distribution)
                .map_err(|e| SpecError(format!("{name}: inputs.{k} ({}): {e}", i.path)))?;
            inputs.push((i.path.trim().to_owned(), d));
        }
    }
    for arg in a.sample {
        let (path, dist) = arg.split_once('=').ok_or_else(|| {
            SpecError(format!(
                "--sample {arg}: expected PATH=DISTRIBUTION, e.g. drive.stroke=uniform(0.3 m, 0.9 m)"
            ))
        })?;
        let d = parse(dist).map_err(|e| SpecError(format!("--sample {}: {e}", path.trim())))?;
        inputs.push((path.trim().to_owned(), d));
    }
    let design_text = a.design.map(str::to_owned).or(from_file.design);
    let design = match design_text.as_deref() {
        None => Design::Lhs,
        Some(t) => Design::parse(t)
            .ok_or_else(|| SpecError(format!("--design {t}: expected lhs or random")))?,
    };
    let samples = a.samples.or(from_file.samples).ok_or_else(|| {
        SpecError(
            "--samples: a sampled sweep needs the number of scenarios, e.g. --samples 200".into(),
        )
    })?;
    let seed = a.seed.or(from_file.seed).ok_or_else(|| {
        SpecError(
            "--seed: a sampled sweep needs a seed (any whole number), so that it can be \
             repeated and sharded, e.g. --seed 1"
                .into(),
        )
    })?;
    Plan::sampled(base, inputs, design, samples, seed)
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn file_and_command_line_combine_and_errors_name_the_input() {
        let file = r#"{"samples": 5, "seed": 3,
            "inputs": [{"path": "pack.porosity", "distribution": "uniform(0.25, 0.35)"}]}"#;
        let extra = ["drive.stroke=normal(0.5 m, 0.1 m, min=0.1 m)".to_owned()];
        let a = SampleArgs {
            sample: &extra,
            file: Some(("mc.json", file.to_owned())),
            seed: Some(9),
            ..Default::default()
        };
        let p = sampled_plan(json!({}), &a).unwrap();
        let s = p.sampling.as_ref().unwrap();
        assert_eq!((s.samples, s.seed, s.design), (5, 9, Design::Lhs));
        assert_eq!(p.variables[0].path, "pack.porosity");
        assert_eq!(p.variables[1].path, "drive.stroke");

        let err = |a: &SampleArgs<'_>| sampled_plan(json!({}), a).unwrap_err().0;
        let bad = ["drive.stroke=normal(0.5 m, -1 m)".to_owned()];
        let a = SampleArgs {
            sample: &bad,
            samples: Some(3),
            seed: Some(1),
            ..Default::default()
        };
        assert!(err(&a).starts_with("--sample drive.stroke: normal(MEAN, SD) needs SD > 0"));
        let ok = ["drive.stroke=uniform(1, 2)".to_owned()];
        let a = SampleArgs {
            sample: &ok,
            samples: Some(3),
            ..Default::default()
        };
        assert!(err(&a).starts_with("--seed:"));
        let a = SampleArgs {
            sample: &ok,
            seed: Some(3),
            ..Default::default()
        };
        assert!(err(&a).starts_with("--samples:"));
        let a = SampleArgs {
            sample: &ok,
            samples: Some(3),
            seed: Some(3),
            design: Some("sobol"),
            ..Default::default()
        };
        assert!(err(&a).contains("expected lhs or random"));
        let a = SampleArgs {
            file: Some((
                "mc.json",
                r#"{"inputs": [{"path": "x", "distribution": "beta(1, 2)"}]}"#.to_owned(),
            )),
            samples: Some(3),
            seed: Some(3),
            ..Default::default()
        };
        assert!(err(&a).starts_with("mc.json: inputs.0 (x): unknown distribution"));
        let a = SampleArgs {
            file: Some(("mc.json", r#"{"sample": 3}"#.to_owned())),
            ..Default::default()
        };
        assert!(err(&a).contains("unknown field `sample`"));
    }
}
