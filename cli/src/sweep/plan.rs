//! The scenarios of a sweep, and the share of one shard. A grid sweep (`--vary`) is the
//! Cartesian product of the values, numbered in odometer order (the last `--vary` changes
//! fastest); a sampled sweep (`--sample`) has N scenarios, scenario i taking row i of the
//! sample matrix ([`super::design`]) through each input's quantile function.

use super::design::{column, Design};
use super::dist::Distribution;
use super::spec::{label, parse_path, quantity, set_path, SpecError, Variable, MAX_VALUES};
use serde_json::Value;

/// A sweep: the base case and the variables.
#[derive(Debug, Clone)]
pub struct Plan {
    /// The case file as read (JSON, user units).
    pub base: Value,
    /// The varied inputs, in the order given; for a sampled sweep `values[i]` is
    /// scenario i's value.
    pub variables: Vec<Variable>,
    /// How the sample was drawn; None for a grid sweep.
    pub sampling: Option<Sampling>,
}

/// What defines a sampled sweep besides the base case.
#[derive(Debug, Clone, PartialEq)]
pub struct Sampling {
    /// Random or Latin hypercube.
    pub design: Design,
    /// Number of scenarios.
    pub samples: usize,
    /// The generator's seed.
    pub seed: u64,
    /// Each input's distribution, in the order of [`Plan::variables`].
    pub distributions: Vec<Distribution>,
}

impl Sampling {
    /// Design, sample count and seed as JSON, stored with the table.
    pub fn definition(&self) -> Value {
        serde_json::json!({
            "design": self.design.name(),
            "samples": self.samples,
            "seed": self.seed,
        })
    }
}

/// `--shard K/N`: this process runs scenarios whose index i has i mod N = K − 1.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    /// K, from 1.
    pub k: usize,
    /// N.
    pub n: usize,
}

impl Shard {
    /// All scenarios in one shard.
    pub const WHOLE: Shard = Shard { k: 1, n: 1 };

    /// Parses `K/N` with 1 ≤ K ≤ N.
    pub fn parse(text: &str) -> Result<Shard, SpecError> {
        let err = || {
            SpecError(format!(
                "--shard {text}: expected K/N with 1 ≤ K ≤ N, e.g. 2/8"
            ))
        };
        let (k, n) = text.split_once('/').ok_or_else(err)?;
        let (k, n): (usize, usize) = (
            k.trim().parse().map_err(|_| err())?,
            n.trim().parse().map_err(|_| err())?,
        );
        if k == 0 || k > n {
            return Err(err());
        }
        Ok(Shard { k, n })
    }

    /// True when scenario `i` belongs to this shard.
    pub fn holds(self, i: usize) -> bool {
        i % self.n == self.k - 1
    }
}

impl std::fmt::Display for Shard {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}/{}", self.k, self.n)
    }
}

impl Plan {
    /// A plan; refuses a path given twice and more than [`MAX_VALUES`] scenarios.
    pub fn new(base: Value, variables: Vec<Variable>) -> Result<Plan, SpecError> {
        if variables.is_empty() {
            return Err(SpecError("give at least one --vary PATH=VALUES".into()));
        }
        for (i, v) in variables.iter().enumerate() {
            if variables[..i].iter().any(|w| w.path == v.path) {
                return Err(SpecError(format!(
                    "--vary {}: the path is given twice",
                    v.path
                )));
            }
        }
        let plan = Plan {
            base,
            variables,
            sampling: None,
        };
        if plan.count().is_none_or(|c| c > MAX_VALUES) {
            return Err(SpecError(format!(
                "the --vary values make more than {MAX_VALUES} scenarios; split the sweep"
            )));
        }
        Ok(plan)
    }

    /// A sampled sweep: `inputs` (path, distribution) drawn `samples` times by `design`
    /// from `seed`. Refuses a path given twice and more than [`MAX_VALUES`] samples.
    pub fn sampled(
        base: Value,
        inputs: Vec<(String, Distribution)>,
        design: Design,
        samples: usize,
        seed: u64,
    ) -> Result<Plan, SpecError> {
        if inputs.is_empty() {
            return Err(SpecError(
                "give at least one --sample PATH=DISTRIBUTION".into(),
            ));
        }
        if !(1..=MAX_VALUES).contains(&samples) {
            return Err(SpecError(format!(
                "--samples: 1 to {MAX_VALUES} scenarios, got {samples}"
            )));
        }
        let mut variables = Vec::new();
        let mut distributions = Vec::new();
        for (j, (path, dist)) in inputs.into_iter().enumerate() {
            if variables.iter().any(|v: &Variable| v.path == path) {
                return Err(SpecError(format!(
                    "--sample {path}: the path is given twice"
                )));
            }
            let segments =
                parse_path(&path).map_err(|e| SpecError(format!("--sample {path}: {e}")))?;
            let values = column(design, samples, seed, j)
                .into_iter()
                .map(|u| quantity(dist.quantile(u), &dist.unit))
                .collect();
            variables.push(Variable {
                path,
                segments,
                values,
            });
            distributions.push(dist);
        }
        Ok(Plan {
            base,
            variables,
            sampling: Some(Sampling {
                design,
                samples,
                seed,
                distributions,
            }),
        })
    }

    /// Number of scenarios (None on overflow).
    pub fn count(&self) -> Option<usize> {
        if let Some(s) = &self.sampling {
            return Some(s.samples);
        }
        self.variables
            .iter()
            .try_fold(1usize, |acc, v| acc.checked_mul(v.values.len()))
    }

    /// The value index of each variable in scenario `i` (odometer order; row i of a
    /// sample).
    pub fn choice(&self, mut i: usize) -> Vec<usize> {
        if self.sampling.is_some() {
            return vec![i; self.variables.len()];
        }
        let mut out = vec![0; self.variables.len()];
        for (slot, v) in out.iter_mut().zip(&self.variables).rev() {
            *slot = i % v.values.len();
            i /= v.values.len();
        }
        out
    }

    /// The case file of scenario `i`.
    pub fn scenario(&self, i: usize) -> Result<Value, SpecError> {
        let mut case = self.base.clone();
        for (v, &c) in self.variables.iter().zip(&self.choice(i)) {
            set_path(&mut case, &v.segments, v.values[c].clone())
                .map_err(|e| SpecError(format!("--vary {}: {e}", v.path)))?;
        }
        Ok(case)
    }

    /// The values of scenario `i` as text, one per variable.
    pub fn labels(&self, i: usize) -> Vec<String> {
        self.variables
            .iter()
            .zip(self.choice(i))
            .map(|(v, c)| label(&v.values[c]))
            .collect()
    }

    /// The variables as JSON (path and values), stored with every table so shards can be
    /// checked to come from one sweep.
    /// A sampled sweep stores each path with its distribution instead (the values are a
    /// function of it and of [`Sampling::definition`]).
    pub fn definition(&self) -> Value {
        if let Some(s) = &self.sampling {
            return Value::Array(
                self.variables
                    .iter()
                    .zip(&s.distributions)
                    .map(|(v, d)| serde_json::json!({"path": v.path, "distribution": d.text}))
                    .collect(),
            );
        }
        Value::Array(
            self.variables
                .iter()
                .map(|v| serde_json::json!({"path": v.path, "values": v.values}))
                .collect(),
        )
    }
}

#[cfg(test)]
mod tests {
    use super::super::spec::parse_vary;
    use super::*;
    use serde_json::json;

    fn plan() -> Plan {
        Plan::new(
            json!({"drive": {"stroke": 1, "strokes_per_minute": 10}}),
            vec![
                parse_vary("drive.stroke=0.3m,0.6m").unwrap(),
                parse_vary("drive.strokes_per_minute=10,20,30").unwrap(),
            ],
        )
        .unwrap()
    }

    #[test]
    fn scenarios_count_like_an_odometer() {
        let p = plan();
        assert_eq!(p.count(), Some(6));
        assert_eq!(p.choice(0), [0, 0]);
        assert_eq!(p.choice(2), [0, 2]);
        assert_eq!(p.choice(4), [1, 1]);
        assert_eq!(p.labels(5), ["0.6m", "30"]);
        assert_eq!(
            p.scenario(4).unwrap(),
            json!({"drive": {"stroke": "0.6m", "strokes_per_minute": 20}})
        );
    }

    #[test]
    fn shards_split_the_scenarios_without_overlap() {
        let shards: Vec<Shard> = (1..=4).map(|k| Shard { k, n: 4 }).collect();
        for i in 0..23 {
            assert_eq!(shards.iter().filter(|s| s.holds(i)).count(), 1, "{i}");
        }
        assert_eq!(Shard::parse("2/8").unwrap(), Shard { k: 2, n: 8 });
        for bad in ["0/3", "4/3", "3", "a/b", "1/0"] {
            assert!(Shard::parse(bad).is_err(), "{bad}");
        }
    }

    #[test]
    fn a_sampled_plan_takes_row_i_of_every_column() {
        use super::super::dist::parse;
        let inputs = vec![
            (
                "drive.stroke".to_owned(),
                parse("uniform(0.3 m, 0.9 m)").unwrap(),
            ),
            (
                "drive.strokes_per_minute".to_owned(),
                parse("triangular(10, 20, 40)").unwrap(),
            ),
        ];
        let p = Plan::sampled(json!({"drive": {}}), inputs, Design::Lhs, 8, 11).unwrap();
        assert_eq!(p.count(), Some(8));
        assert_eq!(p.choice(5), [5, 5]);
        let u = column(Design::Lhs, 8, 11, 0);
        let case = p.scenario(5).unwrap();
        let stroke = case["drive"]["stroke"].as_str().unwrap();
        let x: f64 = stroke.strip_suffix(" m").unwrap().parse().unwrap();
        assert_eq!(x, 0.3 + u[5] * (0.9 - 0.3));
        assert!(case["drive"]["strokes_per_minute"].is_number());
        assert_eq!(
            p.definition()[1],
            json!({"path": "drive.strokes_per_minute", "distribution": "triangular(10, 20, 40)"})
        );
        let twice = vec![
            ("a".to_owned(), parse("uniform(1, 2)").unwrap()),
            ("a".to_owned(), parse("uniform(1, 2)").unwrap()),
        ];
        assert!(Plan::sampled(json!({}), twice, Design::Lhs, 8, 1).is_err());
        let one = vec![("a".to_owned(), parse("uniform(1, 2)").unwrap())];
        assert!(Plan::sampled(json!({}), one, Design::Random, 0, 1).is_err());
    }

    #[test]
    fn a_path_twice_or_no_variable_is_refused() {
        let v = parse_vary("drive.stroke=1,2").unwrap();
        assert!(Plan::new(json!({}), vec![v.clone(), v]).is_err());
        assert!(Plan::new(json!({}), vec![]).is_err());
    }
}
