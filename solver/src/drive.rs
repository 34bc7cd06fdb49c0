//! Drives: what the development device does to the well, as a function of time.
//!
//! A drive either prescribes the in-well head (`Control::Head`) or adds a volume rate to
//! the well's water column (`Control::Flow`), which then moves under well-bore storage.
//! Sign convention: positive flow is outward, from the well into the formation, so a
//! pumping (withdrawal) rate enters as a negative device flow.

use crate::devices::{DeviceAt, JetPulse, PumpBackwash, SurgeAt, SurgeBlock, Swab, VapourState};
use crate::error::SolverError;
use std::f64::consts::PI;

/// How the drive acts on the well node.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Control {
    /// The in-well head is prescribed.
    Head,
    /// A volume rate is added to the well's water column, which has storage.
    Flow,
}

/// Sinusoidal in-well head `h_w = offset + A(t)·sin(2πft)`, from rest.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SineHead {
    /// Amplitude A, m.
    pub amplitude_m: f64,
    /// Frequency f, Hz.
    pub frequency_hz: f64,
    /// Mean offset, m.
    pub offset_m: f64,
    /// The amplitude grows linearly from 0 over this many cycles (0 = full from the start).
    pub ramp_cycles: f64,
}

/// What a table drive prescribes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TableQuantity {
    /// In-well head, m.
    Head,
    /// Pumping rate, m³/s, positive = withdrawal.
    PumpingRate,
}

/// Piecewise-linear time series; a repeated time gives a jump.
#[derive(Debug, Clone, PartialEq)]
pub struct TableDrive {
    /// Times, s, non-decreasing, starting at 0.
    pub times_s: Vec<f64>,
    /// Values at those times (head in m, or pumping rate in m³/s).
    pub values: Vec<f64>,
    /// What the values are.
    pub quantity: TableQuantity,
    /// Repeat the table with period equal to its last time.
    pub repeat: bool,
}

/// A development or test drive.
// A pump curve given by points is kept inline in `PumpBackwash` (see `PumpLaw`).
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, PartialEq)]
pub enum Drive {
    /// Sinusoidal in-well head.
    SineHead(SineHead),
    /// Constant pumping rate from t = 0, m³/s, positive = withdrawal; the well level moves
    /// under well-bore storage.
    ConstantRate {
        /// Pumping rate, m³/s, positive = withdrawal.
        pumping_rate_m3_s: f64,
    },
    /// Instantaneous change of the well level at t = 0, then recovery with no pumping.
    Slug {
        /// In-well head at t = 0, m.
        initial_head_m: f64,
    },
    /// Tabulated head or pumping rate.
    Table(TableDrive),
    /// Surge block working in the casing.
    SurgeBlock(SurgeBlock),
    /// Swab lifting water out of the well.
    Swab(Swab),
    /// Pump-and-backwash surging.
    PumpBackwash(PumpBackwash),
    /// Rotating jet, as head pulses.
    JetPulse(JetPulse),
    /// Stages run back to back, state carried over.
    Schedule(Vec<Stage>),
}

/// One stage of a schedule.
#[derive(Debug, Clone, PartialEq)]
pub struct Stage {
    /// What drives the well in this stage (not itself a schedule).
    pub drive: Drive,
    /// Length of the stage, s.
    pub duration_s: f64,
    /// Start of the stage, s: the sum of the durations before it, added in order (checked
    /// by `validate`; [`stages`] fills it). Kept so the stage at a time is found by binary
    /// search, not by summing durations at every call.
    pub start_s: f64,
}

/// Stages from (drive, duration) pairs, with their start times.
pub fn stages(list: Vec<(Drive, f64)>) -> Vec<Stage> {
    let mut start = 0.0;
    list.into_iter()
        .map(|(drive, duration_s)| {
            let s = Stage {
                drive,
                duration_s,
                start_s: start,
            };
            start += duration_s;
            s
        })
        .collect()
}

/// Index of the stage active at time t: the last whose start is at or before t (the first
/// stage before 0, the last after the end). O(log n).
fn stage_index(stages: &[Stage], t: f64) -> usize {
    stages.partition_point(|s| s.start_s <= t).saturating_sub(1)
}

/// Volume rates a device adds to the well node, m³/s (positive outward), and the derivative
/// of their sum with respect to the in-well head, m²/s.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct DeviceFlow {
    /// Rate imposed by the device: displacement, pumping, lifting, backflow.
    pub displacement_m3_s: f64,
    /// Flow that depends on the in-well head: leakage (clearance, valves) and the vapour
    /// gap under a sealed tool (`vapour_m3_s`, included here).
    pub bypass_m3_s: f64,
    /// Rate at which a vapour gap opens (positive) or closes under a sealed tool, m³/s.
    pub vapour_m3_s: f64,
    /// Shift between the well node's head and the in-well level that is not water (the
    /// jet's area-weighted excess head, S_w de/dt), m³/s; included in `displacement_m3_s`.
    pub offset_m3_s: f64,
    /// d(displacement + bypass)/dH.
    pub d_dh_m2_s: f64,
}

impl DeviceFlow {
    /// Total flow added to the well node, m³/s.
    pub fn total(&self) -> f64 {
        self.displacement_m3_s + self.bypass_m3_s
    }
}

impl TableDrive {
    fn local_time(&self, t: f64) -> f64 {
        let last = *self.times_s.last().unwrap_or(&0.0);
        if self.repeat && last > 0.0 && t > last {
            let k = (t / last).floor();
            let tl = t - k * last;
            // At an exact multiple the end of the previous period applies.
            if tl == 0.0 {
                last
            } else {
                tl
            }
        } else {
            t
        }
    }

    /// Value at time t: linear between points, held constant after the last point.
    /// At a repeated time (a jump) the later value applies from that time on.
    pub fn value_at(&self, t: f64) -> f64 {
        let tl = self.local_time(t);
        let ts = &self.times_s;
        let vs = &self.values;
        if tl <= ts[0] {
            return vs[0];
        }
        // First index with ts[i] > tl.
        let i = ts.partition_point(|&x| x <= tl);
        if i >= ts.len() {
            return vs[vs.len() - 1];
        }
        let (t0, t1) = (ts[i - 1], ts[i]);
        let (v0, v1) = (vs[i - 1], vs[i]);
        v0 + (v1 - v0) * (tl - t0) / (t1 - t0)
    }

    /// Next breakpoint strictly after t, and whether the value jumps there.
    fn next_event(&self, t: f64) -> Option<(f64, bool)> {
        let last = *self.times_s.last()?;
        let (base, tl) = if self.repeat && last > 0.0 {
            let k = (t / last).floor();
            (k * last, t - k * last)
        } else {
            (0.0, t)
        };
        let tol = 1e-12 * last.max(1.0);
        let n = self.times_s.len();
        // At the end of a repeating table the value wraps to the first row.
        let wrap_jump = self.repeat && self.values[0] != self.values[n - 1];
        // First row after tl + tol, by binary search (times are non-decreasing).
        let i = self.times_s.partition_point(|&ti| ti <= tl + tol);
        (i < n).then(|| {
            let ti = self.times_s[i];
            let jump = if i + 1 < n {
                self.times_s[i + 1] == ti
            } else {
                wrap_jump
            };
            (base + ti, jump)
        })
    }
}

impl Drive {
    /// The stage active at time t and the time since it began (a drive that is not a
    /// schedule is its own single stage).
    fn stage_at(&self, t: f64) -> (&Drive, f64) {
        match self {
            Drive::Schedule(stages) => {
                // A stage holds [start, start + duration): at its end time the next begins.
                let s = &stages[stage_index(stages, t)];
                (&s.drive, t - s.start_s)
            }
            d => (d, t),
        }
    }

    /// Whether the drive prescribes head or adds flow at time t.
    pub fn control_at(&self, t: f64) -> Control {
        match self.stage_at(t).0 {
            Drive::SineHead(_) => Control::Head,
            Drive::Table(t) => match t.quantity {
                TableQuantity::Head => Control::Head,
                TableQuantity::PumpingRate => Control::Flow,
            },
            Drive::ConstantRate { .. }
            | Drive::Slug { .. }
            | Drive::SurgeBlock(_)
            | Drive::Swab(_)
            | Drive::PumpBackwash(_)
            | Drive::JetPulse(_) => Control::Flow,
            // `stage_at` never returns a schedule: stages are not schedules (validated).
            Drive::Schedule(_) => Control::Flow,
        }
    }

    /// Prescribed in-well head at time t, m (head-controlled drives; 0 otherwise).
    pub fn head_m(&self, t: f64) -> f64 {
        let (d, t) = self.stage_at(t);
        match d {
            Drive::SineHead(s) => {
                let period = 1.0 / s.frequency_hz;
                let ramp = if s.ramp_cycles > 0.0 {
                    (t / (s.ramp_cycles * period)).min(1.0)
                } else {
                    1.0
                };
                s.offset_m + ramp * s.amplitude_m * (2.0 * PI * s.frequency_hz * t).sin()
            }
            Drive::Table(tab) => match tab.quantity {
                TableQuantity::Head => tab.value_at(t),
                TableQuantity::PumpingRate => 0.0,
            },
            Drive::ConstantRate { .. }
            | Drive::Slug { .. }
            | Drive::SurgeBlock(_)
            | Drive::Swab(_)
            | Drive::PumpBackwash(_)
            | Drive::JetPulse(_)
            | Drive::Schedule(_) => 0.0,
        }
    }

    /// Volume rates the device adds to the well's water column at time t with in-well head
    /// `h_well_m` (flow-controlled drives), with the vapour gap `vapour` under a sealed tool.
    pub fn device_flow(&self, t: f64, h_well_m: f64, vapour: VapourState) -> DeviceFlow {
        self.device_at(t, vapour).flow(h_well_m)
    }

    /// The device at time t with the vapour gap `vapour`: what depends on time alone
    /// computed once, to be evaluated at many in-well heads ([`DeviceAt::flow`]).
    pub fn device_at(&self, t: f64, vapour: VapourState) -> DeviceAt<'_> {
        let (d, t) = self.stage_at(t);
        let displacement = |q: f64| {
            DeviceAt::Fixed(DeviceFlow {
                displacement_m3_s: q,
                ..DeviceFlow::default()
            })
        };
        match d {
            Drive::ConstantRate { pumping_rate_m3_s } => displacement(-pumping_rate_m3_s),
            Drive::Table(tab) => match tab.quantity {
                TableQuantity::PumpingRate => displacement(-tab.value_at(t)),
                TableQuantity::Head => DeviceAt::Fixed(DeviceFlow::default()),
            },
            Drive::SurgeBlock(b) => DeviceAt::Surge(SurgeAt::new(b, t, vapour)),
            Drive::Swab(s) => DeviceAt::swab(s, t, vapour),
            Drive::JetPulse(j) => {
                let (q, offset) = j.flows(t);
                DeviceAt::Fixed(DeviceFlow {
                    displacement_m3_s: q + offset,
                    offset_m3_s: offset,
                    ..DeviceFlow::default()
                })
            }
            Drive::PumpBackwash(p) => DeviceAt::Pump { pump: p, t },
            // Head-controlled, or recovering with no device: nothing added. A schedule
            // never reaches here (`stage_at` returns its stage).
            Drive::SineHead(_) | Drive::Slug { .. } | Drive::Schedule(_) => {
                DeviceAt::Fixed(DeviceFlow::default())
            }
        }
    }

    /// Storage of the well node at time t, m²: none below a surge block or below rising
    /// swab cups (sealed water, see [`SurgeBlock`], [`Swab`]), otherwise the well's own
    /// (`well_storage_m2`).
    pub fn well_storage_m2(&self, t: f64, well_storage_m2: f64) -> f64 {
        match self.stage_at(t) {
            (Drive::SurgeBlock(_), _) => 0.0,
            (Drive::Swab(s), tl) => {
                if s.lifting(tl) {
                    0.0
                } else {
                    well_storage_m2
                }
            }
            (
                Drive::SineHead(_)
                | Drive::ConstantRate { .. }
                | Drive::Slug { .. }
                | Drive::Table(_)
                | Drive::PumpBackwash(_)
                | Drive::JetPulse(_)
                | Drive::Schedule(_),
                _,
            ) => well_storage_m2,
        }
    }

    /// Depth below the static level of the top of the water column that moves with the
    /// screen flow at time t, m: the surge block, the rising swab cups (the water below a
    /// sealing tool), or 0 for a free surface (taken at the static level: the column's
    /// length is not changed by the well's own drawdown, docs/physics.md §24).
    pub fn column_top_depth_m(&self, t: f64) -> f64 {
        match self.stage_at(t) {
            (Drive::SurgeBlock(b), _) => b.depth_m,
            (Drive::Swab(s), tl) => s.cup_depth_m(tl).unwrap_or(0.0),
            _ => 0.0,
        }
    }

    /// Deepest tool of the drive below the static level, m: a surge block's depth, a swab's
    /// submergence, a pump's intake depth (0 when none is given). The screen lies at least
    /// this deep unless the tool works inside it; the case file uses it as the default
    /// length of the water column above the screen.
    pub fn deepest_tool_m(&self) -> f64 {
        match self {
            Drive::SurgeBlock(b) => b.depth_m,
            Drive::Swab(s) => s.submergence_m,
            Drive::PumpBackwash(p) if p.intake_depth_m.is_finite() => p.intake_depth_m,
            Drive::Schedule(stages) => stages
                .iter()
                .map(|s| s.drive.deepest_tool_m())
                .fold(0.0, f64::max),
            _ => 0.0,
        }
    }

    /// The surge block working at time t, if any.
    pub fn surge_block_at(&self, t: f64) -> Option<&SurgeBlock> {
        match self.stage_at(t).0 {
            Drive::SurgeBlock(b) => Some(b),
            _ => None,
        }
    }

    /// Vapour bound of the in-well head at time t, m: the lowest head a sealed tool can
    /// pull (−∞ when no tool seals the well).
    pub fn vapour_bound_m(&self, t: f64) -> f64 {
        match self.stage_at(t) {
            (Drive::SurgeBlock(b), _) => b.min_head_m(),
            (Drive::Swab(s), tl) => s.min_head_m(tl),
            (
                Drive::SineHead(_)
                | Drive::ConstantRate { .. }
                | Drive::Slug { .. }
                | Drive::Table(_)
                | Drive::PumpBackwash(_)
                | Drive::JetPulse(_)
                | Drive::Schedule(_),
                _,
            ) => f64::NEG_INFINITY,
        }
    }

    /// True when the in-well head H at time t is within the vapour margin of the vapour
    /// bound of a sealed tool (never without one).
    pub fn near_vapour(&self, t: f64, h: f64) -> bool {
        h < self.vapour_bound_m(t) + crate::devices::VAPOUR_MARGIN_M
    }

    /// True when a pump-and-backwash stage is active at time t and the in-well head H is in
    /// the band above its intake where it breaks suction.
    pub fn pump_suction_broken(&self, t: f64, h: f64) -> bool {
        match self.stage_at(t).0 {
            Drive::PumpBackwash(p) => p.suction_broken(h),
            _ => false,
        }
    }

    /// True when the in-well head H at time t is at a device's limit: within the margin of
    /// the vapour bound under a sealed tool, or in the band above a pump's intake where it
    /// breaks suction.
    pub fn at_limit(&self, t: f64, h: f64) -> bool {
        match self.stage_at(t) {
            (Drive::PumpBackwash(p), tl) => p.is_on(tl) && p.suction_broken(h),
            (Drive::SurgeBlock(b), _) => {
                h < b.min_head_m() + crate::devices::VAPOUR_MARGIN_M
                    || h > b.max_head_m() - crate::devices::VAPOUR_MARGIN_M
            }
            (
                Drive::SineHead(_)
                | Drive::ConstantRate { .. }
                | Drive::Slug { .. }
                | Drive::Table(_)
                | Drive::Swab(_)
                | Drive::JetPulse(_)
                | Drive::Schedule(_),
                _,
            ) => h < self.vapour_bound_m(t) + crate::devices::VAPOUR_MARGIN_M,
        }
    }

    /// True when the device flow depends on the in-well head (then every step iterates).
    pub fn is_head_dependent(&self) -> bool {
        match self {
            Drive::SurgeBlock(_) | Drive::Swab(_) => true,
            Drive::PumpBackwash(p) => p.is_head_dependent(),
            Drive::Schedule(stages) => stages.iter().any(|s| s.drive.is_head_dependent()),
            Drive::SineHead(_)
            | Drive::ConstantRate { .. }
            | Drive::Slug { .. }
            | Drive::Table(_)
            | Drive::JetPulse(_) => false,
        }
    }

    /// In-well head at t = 0, m.
    pub fn initial_well_head_m(&self) -> f64 {
        match self.stage_at(0.0).0 {
            Drive::Slug { initial_head_m } => *initial_head_m,
            Drive::JetPulse(j) => j.offset_m(0.0),
            Drive::SineHead(_)
            | Drive::ConstantRate { .. }
            | Drive::Table(_)
            | Drive::SurgeBlock(_)
            | Drive::Swab(_)
            | Drive::PumpBackwash(_)
            | Drive::Schedule(_) => self.head_m(0.0),
        }
    }

    /// Period of a periodic drive, s (a schedule is periodic when all its stages share one).
    pub fn period_s(&self) -> Option<f64> {
        match self {
            Drive::SineHead(s) => Some(1.0 / s.frequency_hz),
            Drive::Table(t) => {
                if t.repeat {
                    t.times_s.last().copied()
                } else {
                    None
                }
            }
            Drive::SurgeBlock(b) => Some(1.0 / b.frequency_hz),
            Drive::Swab(s) => Some(s.period_s()),
            Drive::PumpBackwash(p) => Some(p.period_s()),
            Drive::JetPulse(j) => Some(j.period_s()),
            Drive::Schedule(stages) => {
                let p = stages[0].drive.period_s()?;
                stages
                    .iter()
                    .all(|s| {
                        s.drive.period_s() == Some(p)
                            && (s.duration_s / p - (s.duration_s / p).round()).abs() < 1e-9
                    })
                    .then_some(p)
            }
            Drive::ConstantRate { .. } | Drive::Slug { .. } => None,
        }
    }

    /// Period of the stage active at time t, s; `None` once a swab or pump-and-backwash
    /// drive has done its strokes (the well then recovers with geometric steps).
    pub fn period_at(&self, t: f64) -> Option<f64> {
        let (d, tl) = self.stage_at(t);
        let done = |n: u32, p: f64| n > 0 && tl >= n as f64 * p;
        match d {
            Drive::Swab(s) if done(s.strokes, s.period_s()) => None,
            Drive::PumpBackwash(p) if done(p.cycles, p.period_s()) => None,
            d => d.period_s(),
        }
    }

    /// Time from which a drive that is not a schedule repeats exactly from cycle to cycle
    /// (the end of its start-up ramp), s; `None` for a schedule or a drive without a period.
    /// A run may jump over whole cycles only after it (docs/time-stepping.md §Multiscale
    /// stepping).
    pub fn repeats_from_s(&self) -> Option<f64> {
        let ramp = |cycles: f64, p: f64| cycles.max(0.0) * p;
        match self {
            Drive::SineHead(s) => Some(ramp(s.ramp_cycles, 1.0 / s.frequency_hz)),
            Drive::SurgeBlock(b) => Some(ramp(b.ramp_cycles, 1.0 / b.frequency_hz)),
            Drive::Swab(s) => Some(ramp(s.ramp_cycles, s.period_s())),
            Drive::PumpBackwash(p) => Some(ramp(p.ramp_cycles, p.period_s())),
            Drive::JetPulse(j) => Some(ramp(j.ramp_cycles, j.period_s())),
            Drive::Table(t) if t.repeat => Some(0.0),
            Drive::Table(_)
            | Drive::Schedule(_)
            | Drive::ConstantRate { .. }
            | Drive::Slug { .. } => None,
        }
    }

    /// The drives that act in turn: the stages' drives of a schedule, else the drive itself.
    pub fn stage_drives(&self) -> impl Iterator<Item = &Drive> {
        let (own, stages): (Option<&Drive>, &[Stage]) = match self {
            Drive::Schedule(stages) => (None, stages),
            d => (Some(d), &[]),
        };
        own.into_iter().chain(stages.iter().map(|s| &s.drive))
    }

    /// Slowest period among the stages, s (for the automatic outer radius).
    pub fn slowest_period_s(&self) -> Option<f64> {
        self.stage_drives()
            .filter_map(Drive::period_s)
            .reduce(f64::max)
    }

    /// Index of the schedule stage active at time t and the number of stages (a drive that
    /// is not a schedule is stage 0 of 1).
    pub fn stage_index_at(&self, t: f64) -> (usize, usize) {
        match self {
            Drive::Schedule(stages) => (stage_index(stages, t), stages.len()),
            Drive::SineHead(_)
            | Drive::ConstantRate { .. }
            | Drive::Slug { .. }
            | Drive::Table(_)
            | Drive::SurgeBlock(_)
            | Drive::Swab(_)
            | Drive::PumpBackwash(_)
            | Drive::JetPulse(_) => (0, 1),
        }
    }

    /// True when the drive oscillates about zero, so it sends no net volume into the
    /// formation over a cycle (for the automatic outer radius).
    pub fn is_zero_mean_periodic(&self) -> bool {
        match self {
            Drive::SineHead(s) => s.offset_m == 0.0,
            Drive::SurgeBlock(_) => true,
            Drive::Schedule(stages) => stages.iter().all(|s| s.drive.is_zero_mean_periodic()),
            // A table may average zero, but that is not checked: treated as net flow.
            Drive::ConstantRate { .. }
            | Drive::Slug { .. }
            | Drive::Table(_)
            | Drive::Swab(_)
            | Drive::PumpBackwash(_)
            | Drive::JetPulse(_) => false,
        }
    }

    /// Next time strictly after t at which the drive has a breakpoint the stepper must land
    /// on, and whether the forcing jumps there (which restarts the backward-Euler steps).
    pub fn next_event_s(&self, t: f64) -> Option<(f64, bool)> {
        match self {
            Drive::Table(tab) => tab.next_event(t),
            Drive::SineHead(s) => {
                if s.ramp_cycles > 0.0 {
                    let end = s.ramp_cycles / s.frequency_hz;
                    (end > t).then_some((end, false))
                } else {
                    None
                }
            }
            Drive::Swab(s) => s.events(t),
            Drive::PumpBackwash(p) => p.events(t),
            Drive::JetPulse(j) => j.events(t),
            Drive::Schedule(stages) => {
                // The first stage whose end lies beyond t (binary search from the stage at
                // t; the one after it when t is within round-off of that stage's end).
                let mut k = stage_index(stages, t);
                loop {
                    let s = stages.get(k)?;
                    let (start, end) = (s.start_s, s.start_s + s.duration_s);
                    if t < end - 1e-12 * end.max(1.0) {
                        let inner = s
                            .drive
                            .next_event_s(t - start)
                            .map(|(te, j)| (te + start, j));
                        return Some(match inner {
                            Some((te, j)) if te < end => (te, j),
                            _ => (end, true),
                        });
                    }
                    k += 1;
                }
            }
            // Smooth forcing with no breakpoints.
            Drive::ConstantRate { .. } | Drive::Slug { .. } | Drive::SurgeBlock(_) => None,
        }
    }

    /// Checks the drive's parameters; errors name the case-file path.
    pub fn validate(&self) -> Result<(), SolverError> {
        let finite = |field: &str, v: f64| {
            if v.is_finite() {
                Ok(())
            } else {
                Err(SolverError::invalid(
                    field,
                    format!("must be a finite number, got {v}"),
                ))
            }
        };
        match self {
            Drive::SineHead(s) => {
                finite("drive.amplitude", s.amplitude_m)?;
                finite("drive.offset", s.offset_m)?;
                if !(s.frequency_hz.is_finite() && s.frequency_hz > 0.0) {
                    return Err(SolverError::invalid(
                        "drive.frequency",
                        format!("must be positive, got {} Hz", s.frequency_hz),
                    ));
                }
                if !(s.ramp_cycles.is_finite() && s.ramp_cycles >= 0.0) {
                    return Err(SolverError::invalid(
                        "drive.ramp_cycles",
                        format!("must be zero or positive, got {}", s.ramp_cycles),
                    ));
                }
            }
            Drive::ConstantRate { pumping_rate_m3_s } => {
                finite("drive.pumping_rate", *pumping_rate_m3_s)?
            }
            Drive::Slug { initial_head_m } => finite("drive.initial_head", *initial_head_m)?,
            Drive::SurgeBlock(b) => b.validate()?,
            Drive::Swab(s) => s.validate()?,
            Drive::PumpBackwash(p) => p.validate()?,
            Drive::JetPulse(j) => j.validate()?,
            Drive::Schedule(stages) => {
                if stages.is_empty() {
                    return Err(SolverError::invalid(
                        "drive.stages",
                        "needs at least one stage",
                    ));
                }
                let mut start = 0.0;
                for (k, s) in stages.iter().enumerate() {
                    if s.start_s != start {
                        return Err(SolverError::invalid(
                            format!("drive.stages[{k}]"),
                            format!(
                                "starts at {} s, not at the end of the stages before it ({start} s); \
                                 build stages with drive::stages",
                                s.start_s
                            ),
                        ));
                    }
                    start += s.duration_s;
                    if matches!(s.drive, Drive::Schedule(_)) {
                        return Err(SolverError::invalid(
                            format!("drive.stages[{k}]"),
                            "a stage cannot itself be a schedule",
                        ));
                    }
                    if !(s.duration_s.is_finite() && s.duration_s > 0.0) {
                        return Err(SolverError::invalid(
                            format!("drive.stages[{k}].duration"),
                            format!("must be positive, got {}", s.duration_s),
                        ));
                    }
                    s.drive.validate().map_err(|e| match e {
                        SolverError::InvalidInput { field, reason } => SolverError::InvalidInput {
                            field: field.replacen("drive", &format!("drive.stages[{k}]"), 1),
                            reason,
                        },
                        other => other,
                    })?;
                }
            }
            Drive::Table(t) => {
                if t.times_s.len() < 2 || t.times_s.len() != t.values.len() {
                    return Err(SolverError::invalid(
                        "drive.file",
                        format!(
                            "needs at least two rows of time and value, got {} times and {} values",
                            t.times_s.len(),
                            t.values.len()
                        ),
                    ));
                }
                if t.times_s[0] != 0.0 {
                    return Err(SolverError::invalid(
                        "drive.file",
                        format!("the first time must be 0 s, got {} s", t.times_s[0]),
                    ));
                }
                for (i, w) in t.times_s.windows(2).enumerate() {
                    if w[1].partial_cmp(&w[0]).is_none_or(|o| o.is_lt())
                        || (i + 2 < t.times_s.len() && w[1] == w[0] && t.times_s[i + 2] == w[1])
                    {
                        return Err(SolverError::invalid(
                            "drive.file",
                            format!("times must be non-decreasing (a time may repeat once for a jump); row {} has {} s after {} s", i + 2, w[1], w[0]),
                        ));
                    }
                }
                for (i, v) in t.values.iter().enumerate() {
                    finite(&format!("drive.file row {}", i + 1), *v)?;
                }
                if *t.times_s.last().unwrap() <= 0.0 {
                    return Err(SolverError::invalid(
                        "drive.file",
                        "the table must span a positive time",
                    ));
                }
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn table(repeat: bool) -> TableDrive {
        TableDrive {
            times_s: vec![0.0, 10.0, 10.0, 20.0],
            values: vec![1.0, 1.0, -1.0, -1.0],
            quantity: TableQuantity::Head,
            repeat,
        }
    }

    #[test]
    fn table_value_at_works() {
        let t = table(false);
        assert_eq!(t.value_at(5.0), 1.0);
        assert_eq!(t.value_at(10.0), -1.0);
        assert_eq!(t.value_at(25.0), -1.0);
        let r = table(true);
        assert_eq!(r.value_at(25.0), 1.0);
        assert_eq!(r.value_at(35.0), -1.0);
    }

    #[test]
    fn table_events_work() {
        let d = Drive::Table(table(true));
        assert_eq!(d.next_event_s(0.0), Some((10.0, true)));
        assert_eq!(d.next_event_s(10.0), Some((20.0, true)));
        assert_eq!(d.next_event_s(20.0), Some((30.0, true)));
    }

    /// The lookups before binary search, kept as the reference: the first stage whose
    /// end lies beyond t, and the first table row after t.
    fn stage_by_scan(st: &[Stage], t: f64) -> usize {
        let mut start = 0.0;
        for (k, s) in st.iter().enumerate() {
            if t < start + s.duration_s || k + 1 == st.len() {
                return k;
            }
            start += s.duration_s;
        }
        unreachable!()
    }

    #[test]
    fn binary_search_lookups_agree_with_a_scan() {
        // Uneven stage lengths and table rows with jumps; times on, near and between
        // breakpoints (a small built-in xorshift generator, no source needed).
        let mut x = 0x9e37_79b9_7f4a_7c15u64;
        let mut rnd = || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            (x >> 11) as f64 / (1u64 << 53) as f64
        };
        let list: Vec<(Drive, f64)> = (0..200)
            .map(|i| {
                (
                    Drive::Slug {
                        initial_head_m: i as f64,
                    },
                    0.1 + 3.0 * rnd(),
                )
            })
            .collect();
        let st = stages(list);
        let end = st.last().map(|s| s.start_s + s.duration_s).unwrap();
        let mut probes: Vec<f64> = st
            .iter()
            .flat_map(|s| [s.start_s, s.start_s + 1e-13])
            .collect();
        probes.extend((0..2000).map(|_| 1.1 * end * rnd() - 0.05 * end));
        for &t in &probes {
            assert_eq!(stage_index(&st, t), stage_by_scan(&st, t), "t = {t}");
        }
        let d = Drive::Schedule(st.clone());
        d.validate().unwrap();
        let mut times = vec![0.0];
        for i in 1..300 {
            let last = *times.last().unwrap();
            times.push(last + 0.5 + rnd());
            if i % 7 == 0 {
                times.push(*times.last().unwrap());
            }
        }
        let values: Vec<f64> = times.iter().map(|_| rnd()).collect();
        for repeat in [false, true] {
            let tab = TableDrive {
                times_s: times.clone(),
                values: values.clone(),
                quantity: TableQuantity::Head,
                repeat,
            };
            let last = *times.last().unwrap();
            for &t in times.iter().chain(&probes) {
                let (base, tl) = if repeat {
                    let k = (t / last).floor();
                    (k * last, t - k * last)
                } else {
                    (0.0, t)
                };
                let tol = 1e-12 * last.max(1.0);
                let n = times.len();
                let want = times.iter().position(|&ti| ti > tl + tol).map(|i| {
                    let jump = if i + 1 < n {
                        times[i + 1] == times[i]
                    } else {
                        repeat && values[0] != values[n - 1]
                    };
                    (base + times[i], jump)
                });
                assert_eq!(tab.next_event(t), want, "t = {t}, repeat {repeat}");
            }
        }
    }

    #[test]
    fn a_stage_built_by_hand_must_start_where_the_last_ended() {
        let mut st = stages(vec![
            (
                Drive::Slug {
                    initial_head_m: 1.0,
                },
                5.0,
            ),
            (
                Drive::Slug {
                    initial_head_m: 2.0,
                },
                5.0,
            ),
        ]);
        st[1].start_s = 4.0;
        let e = Drive::Schedule(st).validate().unwrap_err().to_string();
        assert!(e.starts_with("drive.stages[1]: starts at 4 s"), "{e}");
    }

    #[test]
    fn sine_ramp_works() {
        let d = Drive::SineHead(SineHead {
            amplitude_m: 2.0,
            frequency_hz: 0.5,
            offset_m: 0.0,
            ramp_cycles: 2.0,
        });
        // Quarter period at t = 0.5 s, ramp at 0.5/4 of full.
        assert!((d.head_m(0.5) - 2.0 * 0.125).abs() < 1e-12);
        assert!((d.head_m(4.5) - 2.0).abs() < 1e-12);
        assert_eq!(d.next_event_s(0.0), Some((4.0, false)));
    }

    #[test]
    fn validate_captures_errors() {
        let d = Drive::SineHead(SineHead {
            amplitude_m: 1.0,
            frequency_hz: 0.0,
            offset_m: 0.0,
            ramp_cycles: 0.0,
        });
        assert_eq!(
            d.validate().unwrap_err().to_string(),
            "drive.frequency: must be positive, got 0 Hz"
        );
    }
}
