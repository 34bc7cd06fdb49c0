//! Reads a development log: CSV with units in the header, one row per reading.
//!
//! ```text
//! # comment lines start with #
//! time_min,activity,rate_L/s,drawdown_m,turbidity_NTU,sand_mg/L
//! 0,pump,12,0
//! 10,pump,12,1.84
//! 60,develop,,2.01
//! 150,rest,,
//! 180,end,,0.35
//! ```
//!
//! A row's activity (`pump`, `develop`, `rest`) and rate hold from its time until the next
//! row's; the drawdown is read at the row's time (blank: no reading). The last row ends the
//! log (its activity is `end`). `rate` is needed on `pump` rows only. Units are those of
//! the case file (`crate::units`); a bare name is SI. `turbidity_NTU` and `sand_<mg/L|ppm>`
//! are optional and kept for the report only: they are not fitted. Errors name the line.

use crate::units::{parse_quantity, Quantity};
use serde_json::Value;

/// What the well was doing from a row's time to the next.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Activity {
    /// Pumping at the logged rate.
    Pump,
    /// The case's development device at work.
    Develop,
    /// Nothing: the well recovers.
    Rest,
    /// The end of the log (last row only).
    End,
}

impl Activity {
    /// The word in the file.
    pub fn word(self) -> &'static str {
        match self {
            Activity::Pump => "pump",
            Activity::Develop => "develop",
            Activity::Rest => "rest",
            Activity::End => "end",
        }
    }
}

/// One row, SI.
#[derive(Debug, Clone, PartialEq)]
pub struct Row {
    /// File line.
    pub line: usize,
    /// Time from the start of the log, s.
    pub time_s: f64,
    /// Activity from this row on.
    pub activity: Activity,
    /// Pumping rate, m³/s (positive = withdrawal; 0 when not pumping).
    pub rate_m3_s: f64,
    /// Drawdown reading, m (positive = level below static).
    pub drawdown_m: Option<f64>,
    /// Turbidity, NTU.
    pub turbidity_ntu: Option<f64>,
    /// Sand content, kg/m³.
    pub sand_kg_m3: Option<f64>,
}

/// A development log.
#[derive(Debug, Clone, PartialEq)]
pub struct DevelopmentLog {
    /// Rows, time increasing.
    pub rows: Vec<Row>,
}

impl DevelopmentLog {
    /// Times and values of the drawdown readings.
    pub fn readings(&self) -> Vec<(f64, f64)> {
        self.rows
            .iter()
            .filter_map(|r| r.drawdown_m.map(|s| (r.time_s, s)))
            .collect()
    }

    /// Length of the log, s.
    pub fn duration_s(&self) -> f64 {
        self.rows.last().map_or(0.0, |r| r.time_s)
    }
}

#[derive(Clone, Copy, PartialEq)]
enum Kind {
    Time,
    Activity,
    Rate,
    Drawdown,
    Turbidity,
    Sand,
}

const NAMES: [(&str, Kind); 6] = [
    ("time", Kind::Time),
    ("activity", Kind::Activity),
    ("rate", Kind::Rate),
    ("drawdown", Kind::Drawdown),
    ("turbidity", Kind::Turbidity),
    ("sand", Kind::Sand),
];

fn column(line: usize, cell: &str) -> Result<(Kind, f64), String> {
    let (name, unit) = match cell.split_once('_') {
        Some((n, u)) => (n, Some(u)),
        None => (cell, None),
    };
    let Some(&(_, kind)) = NAMES.iter().find(|(n, _)| *n == name) else {
        return Err(format!(
            "line {line}: unknown column \"{cell}\"; expected time_<unit>, activity, rate_<unit>, \
             drawdown_<unit> and optionally turbidity_NTU and sand_<mg/L|ppm>"
        ));
    };
    let factor = match (kind, unit) {
        (Kind::Activity, None) | (_, None) => 1.0,
        (Kind::Activity, Some(_)) => {
            return Err(format!(
                "line {line}: column \"{cell}\": activity takes no unit"
            ))
        }
        (Kind::Turbidity, Some("NTU")) => 1.0,
        (Kind::Turbidity, Some(u)) => {
            return Err(format!(
                "line {line}: column \"{cell}\": turbidity is in NTU, got \"{u}\""
            ))
        }
        // mg/L = g/m³ = 1e-3 kg/m³; ppm by mass in water ≈ mg/L (ρ ≈ 1000 kg/m³).
        (Kind::Sand, Some("mg/L" | "ppm")) => 1e-3,
        (Kind::Sand, Some("kg/m3")) => 1.0,
        (Kind::Sand, Some(u)) => {
            return Err(format!(
                "line {line}: column \"{cell}\": sand content is in mg/L, ppm or kg/m3, got \"{u}\""
            ))
        }
        (k, Some(u)) => {
            let q = match k {
                Kind::Time => Quantity::Time,
                Kind::Rate => Quantity::FlowRate,
                _ => Quantity::Length,
            };
            parse_quantity(&Value::String(format!("1 {u}")), q)
                .map_err(|e| format!("line {line}: column \"{cell}\": {e}"))?
        }
    };
    Ok((kind, factor))
}

/// Parses a development log.
pub fn parse(text: &str) -> Result<DevelopmentLog, String> {
    let mut lines = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim_start_matches('\u{feff}').trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
    let (hline, header) = lines
        .next()
        .ok_or("no header line: the file is empty or only comments")?;
    let cols: Vec<(Kind, f64)> = header
        .split(',')
        .map(|c| column(hline, c.trim()))
        .collect::<Result<_, _>>()?;
    for (k, name) in [
        (Kind::Time, "time"),
        (Kind::Activity, "activity"),
        (Kind::Drawdown, "drawdown"),
    ] {
        match cols.iter().filter(|(c, _)| *c == k).count() {
            0 => return Err(format!("line {hline}: no {name} column")),
            1 => {}
            _ => return Err(format!("line {hline}: two {name} columns")),
        }
    }
    let mut rows: Vec<Row> = Vec::new();
    for (line, l) in lines {
        let cells: Vec<&str> = l.split(',').map(str::trim).collect();
        if cells.len() != cols.len() {
            return Err(format!(
                "line {line}: {} field(s), the header has {}",
                cells.len(),
                cols.len()
            ));
        }
        let mut row = Row {
            line,
            time_s: f64::NAN,
            activity: Activity::End,
            rate_m3_s: f64::NAN,
            drawdown_m: None,
            turbidity_ntu: None,
            sand_kg_m3: None,
        };
        for ((kind, factor), cell) in cols.iter().zip(&cells) {
            if *kind == Kind::Activity {
                row.activity = match cell.to_ascii_lowercase().as_str() {
                    "pump" => Activity::Pump,
                    "develop" => Activity::Develop,
                    "rest" => Activity::Rest,
                    "end" => Activity::End,
                    _ => {
                        return Err(format!(
                            "line {line}: activity \"{cell}\" is not pump, develop, rest or end"
                        ))
                    }
                };
                continue;
            }
            if cell.is_empty() {
                continue;
            }
            let v: f64 = cell
                .parse()
                .ok()
                .filter(|v: &f64| v.is_finite())
                .ok_or_else(|| format!("line {line}: \"{cell}\" is not a finite number"))?;
            let v = v * factor;
            match kind {
                Kind::Time => row.time_s = v,
                Kind::Rate => row.rate_m3_s = v,
                Kind::Drawdown => row.drawdown_m = Some(v),
                Kind::Turbidity => row.turbidity_ntu = Some(v),
                Kind::Sand => row.sand_kg_m3 = Some(v),
                Kind::Activity => {}
            }
        }
        if row.time_s.is_nan() {
            return Err(format!("line {line}: no time"));
        }
        match rows.last() {
            None if row.time_s != 0.0 => {
                return Err(format!(
                "line {line}: the log starts at time 0 (the well at rest, at the static level), \
                     got {} s",
                row.time_s
            ))
            }
            Some(prev) if row.time_s <= prev.time_s => {
                return Err(format!(
                    "line {line}: time {} s does not increase (line {} has {} s)",
                    row.time_s, prev.line, prev.time_s
                ))
            }
            _ => {}
        }
        if row.activity == Activity::Pump {
            if row.rate_m3_s.is_nan() || row.rate_m3_s <= 0.0 {
                return Err(format!("line {line}: a pump row needs a rate above zero"));
            }
        } else {
            row.rate_m3_s = 0.0;
        }
        rows.push(row);
    }
    let Some(last) = rows.last() else {
        return Err(format!("no data rows after the header on line {hline}"));
    };
    if rows.len() < 2 {
        return Err(format!("line {}: a log needs at least two rows", last.line));
    }
    if last.activity != Activity::End {
        return Err(format!(
            "line {}: the last row ends the log; its activity must be end",
            last.line
        ));
    }
    if let Some(r) = rows[..rows.len() - 1]
        .iter()
        .find(|r| r.activity == Activity::End)
    {
        return Err(format!("line {}: end is only for the last row", r.line));
    }
    let log = DevelopmentLog { rows };
    if log.readings().is_empty() {
        return Err("the log has no drawdown readings".into());
    }
    Ok(log)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn units_of_the_header_are_applied_and_blanks_are_no_reading() {
        let t = "# invented\ntime_min,activity,rate_L/s,drawdown_ft,sand_mg/L\n\
                 0,pump,12,0,\n10,pump,12,3.28084,40\n20,develop,,,\n30,end,,1,\n";
        let log = parse(t).unwrap();
        assert_eq!(log.rows.len(), 4);
        assert_eq!(log.rows[1].time_s, 600.0);
        assert!((log.rows[1].rate_m3_s - 0.012).abs() < 1e-15);
        // 1 ft = 0.3048 m exactly (international foot).
        assert!((log.rows[1].drawdown_m.unwrap() - 3.28084 * 0.3048).abs() < 1e-12);
        assert_eq!(log.rows[2].drawdown_m, None);
        assert_eq!(log.rows[2].rate_m3_s, 0.0);
        assert!((log.rows[1].sand_kg_m3.unwrap() - 0.04).abs() < 1e-15);
        assert_eq!(log.readings().len(), 3);
    }

    #[test]
    fn errors_name_the_line() {
        let h = "time_min,activity,rate_L/s,drawdown_m\n";
        let e = |body: &str| parse(&format!("{h}{body}")).unwrap_err();
        assert!(e("5,pump,1,0\n10,end,,1\n").contains("line 2: the log starts at time 0"));
        assert!(e("0,pump,1,0\n0,end,,1\n").contains("line 3: time 0 s does not increase"));
        assert!(e("0,pump,,0\n10,end,,1\n").contains("line 2: a pump row needs a rate"));
        assert!(e("0,surge,1,0\n10,end,,1\n").contains("line 2: activity \"surge\""));
        assert!(e("0,pump,1,0\n10,rest,,1\n").contains("line 3: the last row ends the log"));
        assert!(e("0,pump,1,x\n10,end,,1\n").contains("line 2: \"x\" is not a finite number"));
        assert!(parse("time_min,activity,rate_L/s\n")
            .unwrap_err()
            .contains("no drawdown column"));
    }
}
