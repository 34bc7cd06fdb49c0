//! Logarithmically graded finite-volume grid on radius, and the zones it resolves.
//!
//! ```text
//!  well   screen          pack              cake   invaded        formation
//!   ●──────┃r_s ─┬───┬───┬───┬───┃r_b ─┬───┬───┬───┃r_d ─┬────┬──────┬─────────┃R
//!  h[0]          h1  h2  ...         (face            ...            h[N]
//!                                    resistance)
//! ```
//! Faces inside a zone with inner radius a, outer radius c and m cells are geometric,
//! `r_{j+1/2} = a (c/a)^{j/m}`; the node of a cell is the geometric mean of its faces, the
//! middle of the cell in ln r (docs/physics.md §1.2). Every zone boundary and the cake radius
//! lie on faces. Unknown 0 is the in-well head; unknowns 1..=N are the cells.

use crate::model::{GridSpec, Model};

/// The zones whose energy is accounted separately.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Zone {
    /// Screen entrance (interface at r_s).
    Screen = 0,
    /// Filter pack r_s … r_b.
    Pack = 1,
    /// Wall cake (interface at r_b).
    Cake = 2,
    /// Invaded zone r_b … r_d.
    Invaded = 3,
    /// Formation r_d … R.
    Formation = 4,
}

/// Number of [`Zone`]s.
pub const ZONE_COUNT: usize = 5;

impl Zone {
    /// All zones, in index order.
    pub const ALL: [Zone; ZONE_COUNT] = [
        Zone::Screen,
        Zone::Pack,
        Zone::Cake,
        Zone::Invaded,
        Zone::Formation,
    ];

    /// Lower-case name used in output paths (`/series/power/<name>`).
    pub const fn name(self) -> &'static str {
        match self {
            Zone::Screen => "screen",
            Zone::Pack => "pack",
            Zone::Cake => "cake",
            Zone::Invaded => "invaded",
            Zone::Formation => "formation",
        }
    }
}

// The resolution defaults below are numerical choices (assumption), held to account by the
// verification groups run on the default grid (docs/verification.md, e.g. `theis` at 30
// cells per decade within 5e-3 of Theis 1935).

/// Minimum cells across the filter-pack annulus.
pub const MIN_PACK_CELLS: usize = 16;
/// Minimum cells across the invaded zone.
pub const MIN_INVADED_CELLS: usize = 8;
/// Minimum cells in the formation.
pub const MIN_FORMATION_CELLS: usize = 20;
/// Default resolution of the formation, cells per decade of radius (docs/physics.md §10 asks
/// for 20 or more).
pub const DEFAULT_CELLS_PER_DECADE: f64 = 30.0;
/// Default resolution of the pack and invaded zone, cells per decade of radius.
pub const DEFAULT_NEAR_CELLS_PER_DECADE: f64 = 60.0;

/// The radial grid.
#[derive(Debug, Clone, PartialEq)]
pub struct Grid {
    /// Face radii r_{1/2} = r_s … r_{N+1/2} = R, m (N + 1 values).
    pub r_face: Vec<f64>,
    /// Node radii (geometric mean of the two faces), m (N values).
    pub r_center: Vec<f64>,
    /// Zone of each cell (N values).
    pub zone: Vec<Zone>,
    /// Index into `r_face` of the borehole wall r_b.
    pub borehole_face: usize,
    /// Index into `r_face` of the outer edge of the invaded zone r_d (= `borehole_face`
    /// without an invaded zone).
    pub invaded_face: usize,
}

/// Multiple of √(D t) beyond the invaded zone at which the outer radius lies when a net
/// volume is pumped or injected for a time t (the run's, or a virtual test's): there the
/// Theis argument u = R²S/(4Tt) ≥ 8²/4 = 16 and W(16) ≈ 7e−9, so the far boundary takes no
/// measurable part (docs/physics.md §8b, §25.1; W from `scipy.special.exp1(16)`).
pub const REACH_FACTOR: f64 = 8.0;

/// Automatic outer radius R, m.
///
/// Rule: R is the larger of
/// - r_d + 20 δ, with δ = sqrt(2D/ω) the penetration depth of the slowest periodic forcing
///   in the formation (D = K/Ss); the oscillation amplitude there has fallen to about
///   exp(−20) ≈ 2e−9 of its value at the borehole (docs/physics.md §10);
/// - r_d + 8 sqrt(D t_end) when the drive sends a net volume (non-periodic, or periodic with
///   a mean): the Theis argument at R is then u = R²S/(4Tt) ≥ 16, W(16) ≈ 7e−9;
/// - 10 r_d.
pub fn auto_outer_radius(model: &Model) -> f64 {
    let r_d = model.invaded_outer_radius_m();
    let d = model.formation.medium.diffusivity_m2_s();
    let mut r = 10.0 * r_d;
    if let Some(p) = model.drive.slowest_period_s() {
        let delta = (d * p / std::f64::consts::PI).sqrt();
        r = r.max(r_d + 20.0 * delta);
    }
    if !model.drive.is_zero_mean_periodic() {
        r = r.max(r_d + REACH_FACTOR * (d * model.duration_s).sqrt());
    }
    r
}

fn cells_for(ratio: f64, per_decade: f64, min: usize) -> usize {
    ((per_decade * ratio.log10()).ceil() as usize).max(min)
}

/// Number of cells [`Grid::build`] would make, computed in floating point so that absurd
/// settings (1e300 cells per decade, an enormous outer radius) give a large or non-finite
/// number instead of an allocation; `Model::validate` caps it before any grid is built.
pub fn planned_cells(model: &Model) -> f64 {
    let rs = model.well.screen_radius_m;
    let rb = model.borehole_radius_m();
    let rd = model.invaded_outer_radius_m();
    let rr = Grid::outer_radius(model);
    let zone = |ratio: f64, pd: f64, min: usize| (pd * ratio.log10()).ceil().max(min as f64);
    let inv = if model.invaded.is_some() { 1.0 } else { 0.0 };
    let (near, far) = match model.numerics.grid {
        GridSpec::Auto => (DEFAULT_NEAR_CELLS_PER_DECADE, DEFAULT_CELLS_PER_DECADE),
        GridSpec::PerDecade(pd) => (pd, pd),
        GridSpec::Total(n) => {
            let min =
                (MIN_PACK_CELLS + MIN_FORMATION_CELLS) as f64 + inv * MIN_INVADED_CELLS as f64;
            return (n as f64).max(min) + 1.0;
        }
    };
    zone(rb / rs, near, MIN_PACK_CELLS)
        + inv * zone(rd / rb, near, MIN_INVADED_CELLS)
        + zone(rr / rd, far, MIN_FORMATION_CELLS)
}

impl Grid {
    /// Outer radius the model will use, m.
    pub fn outer_radius(model: &Model) -> f64 {
        model
            .formation
            .outer_radius_m
            .unwrap_or_else(|| auto_outer_radius(model))
    }

    /// Builds the grid of a validated model.
    pub fn build(model: &Model) -> Grid {
        let rs = model.well.screen_radius_m;
        let rb = model.borehole_radius_m();
        let rd = model.invaded_outer_radius_m();
        let rr = Self::outer_radius(model);
        let has_invaded = model.invaded.is_some();
        let (m_pack, m_inv, m_form) = match model.numerics.grid {
            GridSpec::Auto => (
                cells_for(rb / rs, DEFAULT_NEAR_CELLS_PER_DECADE, MIN_PACK_CELLS),
                cells_for(rd / rb, DEFAULT_NEAR_CELLS_PER_DECADE, MIN_INVADED_CELLS),
                cells_for(rr / rd, DEFAULT_CELLS_PER_DECADE, MIN_FORMATION_CELLS),
            ),
            GridSpec::PerDecade(pd) => (
                cells_for(rb / rs, pd, MIN_PACK_CELLS),
                cells_for(rd / rb, pd, MIN_INVADED_CELLS),
                cells_for(rr / rd, pd, MIN_FORMATION_CELLS),
            ),
            GridSpec::Total(n) => {
                let total_log = (rr / rs).ln();
                let share = |a: f64, c: f64| (n as f64 * (c / a).ln() / total_log).round() as usize;
                let mp = share(rs, rb).max(MIN_PACK_CELLS);
                let mi = if has_invaded {
                    share(rb, rd).max(MIN_INVADED_CELLS)
                } else {
                    0
                };
                let mf = n.saturating_sub(mp + mi).max(MIN_FORMATION_CELLS);
                (mp, mi, mf)
            }
        };
        let m_inv = if has_invaded { m_inv } else { 0 };
        let n = m_pack + m_inv + m_form;
        let mut r_face = Vec::with_capacity(n + 1);
        let mut zone = Vec::with_capacity(n);
        r_face.push(rs);
        let mut add_zone = |a: f64, c: f64, m: usize, z: Zone, r_face: &mut Vec<f64>| {
            for j in 1..=m {
                let r = if j == m {
                    c
                } else {
                    a * (c / a).powf(j as f64 / m as f64)
                };
                r_face.push(r);
                zone.push(z);
            }
        };
        add_zone(rs, rb, m_pack, Zone::Pack, &mut r_face);
        let borehole_face = r_face.len() - 1;
        if has_invaded {
            add_zone(rb, rd, m_inv, Zone::Invaded, &mut r_face);
        }
        let invaded_face = r_face.len() - 1;
        add_zone(rd, rr, m_form, Zone::Formation, &mut r_face);
        let r_center = r_face.windows(2).map(|w| (w[0] * w[1]).sqrt()).collect();
        Grid {
            r_face,
            r_center,
            zone,
            borehole_face,
            invaded_face,
        }
    }

    /// Number of cells N.
    pub fn cells(&self) -> usize {
        self.r_center.len()
    }

    /// Outer radius R, m.
    pub fn outer_radius_m(&self) -> f64 {
        *self.r_face.last().expect("grid has faces")
    }

    /// Linear interpolation in ln r of cell values `h` (length N) at radius r, m.
    /// Inside the first and last half cells the nearest node value is returned.
    pub fn interpolate(&self, h: &[f64], r: f64) -> f64 {
        let rc = &self.r_center;
        if r <= rc[0] {
            return h[0];
        }
        let i = rc.partition_point(|&x| x <= r);
        if i >= rc.len() {
            return h[rc.len() - 1];
        }
        let w = (r / rc[i - 1]).ln() / (rc[i] / rc[i - 1]).ln();
        h[i - 1] + w * (h[i] - h[i - 1])
    }
}
