//! The run's observer: streams every reported step into the HDF5 layout of docs/formats.md (and
//! optionally a CSV file) while the solver runs, so memory stays flat in run length.

use super::csv::{Column, CsvWriter};
use super::h5::{H5Writer, MatrixHandle, SeriesHandle};
use super::OutputError;
use boreflux_solver::grid::{Zone, ZONE_COUNT};
use boreflux_solver::{CycleView, StepObserver, StepView};
use std::path::Path;

/// Values per chunk of the time series.
const CHUNK: usize = 4096;

/// Name, unit and description of each per-step series, in CSV column order.
const SERIES: [(&str, &str, &str); 16] = [
    ("time", "s", "time at the end of the step"),
    (
        "well_head",
        "m",
        "in-well head relative to the static level",
    ),
    (
        "screen_outer_head",
        "m",
        "head on the pack side of the screen",
    ),
    (
        "screen_flow",
        "m3/s",
        "flow through the screen, positive outward",
    ),
    (
        "face_flux",
        "m/s",
        "Darcy flux at the borehole wall r_b, positive outward",
    ),
    (
        "face_pore_velocity",
        "m/s",
        "pore velocity at the borehole wall (flux / pack porosity)",
    ),
    (
        "face_gradient",
        "1",
        "head gradient -dh/dr on the formation side of the wall",
    ),
    (
        "shear_proxy",
        "Pa",
        "pore-scale shear proxy rho g i R_h on the pack side of the wall",
    ),
    ("cake_thickness", "m", "wall-cake thickness"),
    ("cake_coverage", "1", "fraction of the wall covered by cake"),
    (
        "skin",
        "1",
        "total skin referred to the formation (Hawkins)",
    ),
    (
        "cake_pressure",
        "Pa",
        "inward pressure difference across the wall cake (0 for outward flow)",
    ),
    (
        "fines_removed",
        "kg",
        "mud fines carried from the invaded zone across the wall so far",
    ),
    (
        "mass_residual",
        "1",
        "relative volume-balance residual of the step",
    ),
    (
        "energy_residual",
        "1",
        "relative energy-balance residual of the step",
    ),
    ("newton_iterations", "1", "Newton iterations of the step"),
];

fn values(s: &StepView<'_>) -> [f64; 16] {
    [
        s.time_s,
        s.well_head_m,
        s.screen_outer_head_m,
        s.screen_flow_m3_s,
        s.face_flux_m_s,
        s.face_pore_velocity_m_s,
        s.face_gradient,
        s.shear_proxy_pa,
        s.cake_thickness_m,
        s.cake_coverage,
        s.skin,
        s.cake_pressure_pa,
        s.fines_removed_kg,
        s.mass_residual,
        s.energy_residual,
        s.newton_iterations as f64,
    ]
}

/// Cycle datasets: name, unit, description.
const CYCLES: [(&str, &str, &str); 7] = [
    ("start_time", "s", "start of the cycle"),
    ("end_time", "s", "end of the cycle"),
    (
        "peak_outward_flux",
        "m/s",
        "largest outward face flux in the cycle",
    ),
    (
        "peak_inward_flux",
        "m/s",
        "largest inward face flux in the cycle (magnitude)",
    ),
    (
        "rms_face_flux",
        "m/s",
        "root-mean-square face flux over the cycle",
    ),
    ("peak_shear", "Pa", "largest shear proxy in the cycle"),
    ("cake_removed", "m", "cake thickness removed in the cycle"),
];

/// Writes the run into an HDF5 file (and CSV).
pub struct ResultSink {
    writer: H5Writer,
    series: Vec<SeriesHandle>,
    power: Vec<SeriesHandle>,
    work: Vec<SeriesHandle>,
    cycle_index: SeriesHandle<u64>,
    cycles: Vec<SeriesHandle>,
    cycle_work: Vec<SeriesHandle>,
    snap_time: SeriesHandle,
    snap_head: MatrixHandle,
    snapshot_every: u64,
    csv: Option<CsvWriter>,
    row: Vec<f64>,
    /// First write error; the run stops at it.
    pub error: Option<OutputError>,
}

impl ResultSink {
    /// Creates the file (at a temporary path) and its datasets. `cells` is the grid size.
    pub fn create(
        path: &Path,
        csv: Option<&Path>,
        cells: usize,
        snapshot_every: u64,
    ) -> Result<Self, OutputError> {
        let mut w = H5Writer::create(path)?;
        let mut series = Vec::new();
        for (name, unit, desc) in SERIES {
            series.push(w.growable_series(&format!("/series/{name}"), unit, desc, CHUNK)?);
        }
        let mut power = Vec::new();
        let mut work = Vec::new();
        for z in Zone::ALL {
            let n = z.name();
            power.push(w.growable_series(
                &format!("/series/power/{n}"),
                "W",
                &format!("power dissipated in the {n}"),
                CHUNK,
            )?);
            work.push(w.growable_series(
                &format!("/series/work/{n}"),
                "J",
                &format!("cumulative work dissipated in the {n}"),
                CHUNK,
            )?);
        }
        let cycle_index =
            w.growable_series_of::<u64>("/cycles/index", "1", "cycle number from 0", 256)?;
        let mut cycles = Vec::new();
        for (name, unit, desc) in CYCLES {
            cycles.push(w.growable_series(&format!("/cycles/{name}"), unit, desc, 256)?);
        }
        let mut cycle_work = Vec::new();
        for z in Zone::ALL {
            let n = z.name();
            cycle_work.push(w.growable_series(
                &format!("/cycles/work_{n}"),
                "J",
                &format!("work dissipated in the {n} during the cycle"),
                256,
            )?);
        }
        let snap_time =
            w.growable_series("/snapshots/time", "s", "times of the head profiles", 256)?;
        let snap_head = w.growable_matrix(
            "/snapshots/head",
            cells,
            "m",
            "cell heads (time x cell), inner to outer",
        )?;
        let csv = match csv {
            Some(p) => {
                let mut cols: Vec<Column<'_>> = SERIES
                    .iter()
                    .map(|(n, u, _)| Column { name: n, unit: u })
                    .collect();
                let names: Vec<(String, String)> = Zone::ALL
                    .iter()
                    .flat_map(|z| {
                        [
                            (format!("power_{}", z.name()), "W".to_string()),
                            (format!("work_{}", z.name()), "J".to_string()),
                        ]
                    })
                    .collect();
                cols.extend(names.iter().map(|(n, u)| Column { name: n, unit: u }));
                Some(CsvWriter::create(p, &cols)?)
            }
            None => None,
        };
        Ok(ResultSink {
            writer: w,
            series,
            power,
            work,
            cycle_index,
            cycles,
            cycle_work,
            snap_time,
            snap_head,
            snapshot_every: snapshot_every.max(1),
            csv,
            row: Vec::with_capacity(SERIES.len() + 2 * ZONE_COUNT),
            error: None,
        })
    }

    /// The writer, for the grid, attributes and the summary.
    pub fn writer(&mut self) -> &mut H5Writer {
        &mut self.writer
    }

    fn write_step(&mut self, s: &StepView<'_>) -> Result<(), OutputError> {
        let v = values(s);
        for (h, x) in self.series.iter_mut().zip(v) {
            h.append(&[x])?;
        }
        for k in 0..ZONE_COUNT {
            self.power[k].append(&[s.power_w[k]])?;
            self.work[k].append(&[s.work_j[k]])?;
        }
        if s.step % self.snapshot_every == 0 || s.step == 1 {
            self.snap_time.append(&[s.time_s])?;
            self.snap_head.append_row(s.heads)?;
        }
        if let Some(csv) = self.csv.as_mut() {
            self.row.clear();
            self.row.extend_from_slice(&v);
            for k in 0..ZONE_COUNT {
                self.row.push(s.power_w[k]);
                self.row.push(s.work_j[k]);
            }
            csv.write_row(&self.row)?;
        }
        Ok(())
    }

    fn write_cycle(&mut self, c: &CycleView) -> Result<(), OutputError> {
        self.cycle_index.append(&[c.index])?;
        let v = [
            c.start_s,
            c.end_s,
            c.peak_outward_flux_m_s,
            c.peak_inward_flux_m_s,
            c.rms_face_flux_m_s,
            c.peak_shear_pa,
            c.cake_removed_m,
        ];
        for (h, x) in self.cycles.iter_mut().zip(v) {
            h.append(&[x])?;
        }
        for (h, w) in self.cycle_work.iter_mut().zip(c.work_j) {
            h.append(&[w])?;
        }
        Ok(())
    }

    /// Flushes and renames both files into place.
    pub fn finish(self) -> Result<(), OutputError> {
        if let Some(csv) = self.csv {
            csv.finish()?;
        }
        self.writer.finish()?;
        Ok(())
    }
}

impl StepObserver for ResultSink {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        if self.error.is_some() {
            return false;
        }
        if let Err(e) = self.write_step(s) {
            self.error = Some(e);
            return false;
        }
        true
    }

    fn on_cycle(&mut self, c: &CycleView) {
        if self.error.is_none() {
            if let Err(e) = self.write_cycle(c) {
                self.error = Some(e);
            }
        }
    }
}
