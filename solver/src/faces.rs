//! Flow laws of the faces between unknowns: resistances in series.
//!
//! Each face is a chain of up to three segments in series (half cell, interface, half
//! cell), each with a linear resistance R_lin (s/m²) and a quadratic one R_nl (s²/m⁵):
//!
//! ```text
//! Δh = Σ_seg (R_lin Q + R_nl Q|Q|)                      head drop across the face, m
//! Q  = sign(Δh) · 2|Δh| / (R_lin + sqrt(R_lin² + 4 R_nl |Δh|))   (stable root)
//! dQ/dΔh = 1 / (R_lin + 2 R_nl |Q|)
//! ```
//! Half cell of conductivity K and Forchheimer β between radii r₁ < r₂ (PHYSICS.md §1.2,
//! §4.3; exact for steady radial flow, Thiem 1906):
//! ```text
//! R_lin = ln(r₂/r₁) / (2π b K)      R_nl = β (1/r₁ − 1/r₂) / (2π b)²
//! ```
//! Wall cake (PHYSICS.md §2.1): `R_lin = δ_c / (2π r_b b K_c)`. Screen (§3): linear loss
//! `c_s/(2π r_s b)`, orifice loss `R_nl = 1 / (2g (2π r_s L A_o C_d)²)`.

use crate::grid::Zone;

/// One element of a path.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Segment {
    /// Zone whose dissipation this segment carries.
    pub zone: Zone,
    /// Linear resistance, s/m².
    pub r_lin: f64,
    /// Quadratic resistance, s²/m⁵.
    pub r_nl: f64,
}

const EMPTY: Segment = Segment {
    zone: Zone::Pack,
    r_lin: 0.0,
    r_nl: 0.0,
};

/// The flow law of one face: a chain of up to three segments in series.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Face {
    segs: [Segment; 3],
    len: usize,
    r_lin: f64,
    r_nl: f64,
    /// 1/R_lin, the conductance at Δh = 0.
    c_lin: f64,
}

impl Face {
    /// A face through the given segments (one to three, in series).
    pub fn new(segments: &[Segment]) -> Face {
        assert!(
            !segments.is_empty() && segments.len() <= 3,
            "a face has 1 to 3 segments"
        );
        let mut segs = [EMPTY; 3];
        segs[..segments.len()].copy_from_slice(segments);
        let r_lin: f64 = segments.iter().map(|s| s.r_lin).sum();
        Face {
            segs,
            len: segments.len(),
            r_lin,
            r_nl: segments.iter().map(|s| s.r_nl).sum(),
            c_lin: 1.0 / r_lin,
        }
    }

    /// Segments of the face, inner to outer.
    pub fn segments(&self) -> &[Segment] {
        &self.segs[..self.len]
    }

    /// True when Q is proportional to Δh.
    pub fn is_linear(&self) -> bool {
        self.r_nl == 0.0
    }

    /// Conductance dQ/dΔh at Δh = 0, m²/s.
    pub fn conductance(&self) -> f64 {
        self.c_lin
    }

    /// Flow Q (m³/s, positive from the inner to the outer unknown) for a head drop
    /// Δh = h_inner − h_outer (m), and dQ/dΔh (m²/s).
    #[inline]
    pub fn flow(&self, dh: f64) -> (f64, f64) {
        if self.r_nl == 0.0 {
            (self.c_lin * dh, self.c_lin)
        } else {
            // With S = sqrt(R_lin² + 4 R_nl |Δh|): Q = 2|Δh|/(R_lin + S) and
            // dΔh/dQ = R_lin + 2 R_nl |Q| = S.
            let a = dh.abs();
            let root = (self.r_lin * self.r_lin + 4.0 * self.r_nl * a).sqrt();
            let q = 2.0 * a / (self.r_lin + root);
            (q.copysign(dh), 1.0 / root)
        }
    }

    /// Total linear resistance R_lin, s/m².
    pub fn r_lin(&self) -> f64 {
        self.r_lin
    }

    /// Total quadratic resistance R_nl, s²/m⁵.
    pub fn r_nl(&self) -> f64 {
        self.r_nl
    }

    /// Head drop across one segment at flow q, m.
    #[inline]
    pub fn segment_drop(seg: &Segment, q: f64) -> f64 {
        seg.r_lin * q + seg.r_nl * q * q.abs()
    }

    /// Adds the power dissipated in each segment at head drop Δh to `power` (indexed by
    /// [`Zone`]), in m⁴/s (multiply by ρg for watts). Returns the total, Q·Δh.
    pub fn add_dissipation(&self, dh: f64, power: &mut [f64; crate::grid::ZONE_COUNT]) -> f64 {
        let (q, _) = self.flow(dh);
        let mut total = 0.0;
        for s in self.segments() {
            let w = q * Self::segment_drop(s, q);
            power[s.zone as usize] += w;
            total += w;
        }
        total
    }
}

/// Flows and derivatives of many faces at once, branch-free so the loop vectorises:
/// with S = sqrt(R_lin² + 4 R_nl |Δh|), Q = sign(Δh) 2|Δh|/(R_lin + S) and dQ/dΔh = 1/S
/// (which reduce to Δh/R_lin and 1/R_lin when R_nl = 0). All slices have one length.
pub fn flows(dh: &[f64], r_lin: &[f64], r_nl: &[f64], q: &mut [f64], g: &mut [f64]) {
    for ((((&d, &rl), &rn), qo), go) in dh
        .iter()
        .zip(r_lin)
        .zip(r_nl)
        .zip(q.iter_mut())
        .zip(g.iter_mut())
    {
        let a = d.abs();
        let root = (rl * rl + 4.0 * rn * a).sqrt();
        *qo = (2.0 * a / (rl + root)).copysign(d);
        *go = 1.0 / root;
    }
}

/// Half-cell segment of zone `zone` between radii r1 < r2 (b: layer thickness, m).
pub fn half_cell(zone: Zone, r1: f64, r2: f64, b: f64, k: f64, beta: f64) -> Segment {
    let two_pi_b = 2.0 * std::f64::consts::PI * b;
    Segment {
        zone,
        r_lin: (r2 / r1).ln() / (two_pi_b * k),
        r_nl: beta * (1.0 / r1 - 1.0 / r2) / (two_pi_b * two_pi_b),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn flow_inverts_the_quadratic_law() {
        // Δh = R_lin Q + R_nl Q|Q| with made-up resistances; check the stable root.
        let f = Face::new(&[Segment {
            zone: Zone::Pack,
            r_lin: 2.0,
            r_nl: 300.0,
        }]);
        for &q in &[-0.3, -1e-6, 0.0, 1e-4, 0.05] {
            let dh = 2.0 * q + 300.0 * q * f64::abs(q);
            let (qq, g) = f.flow(dh);
            assert!((qq - q).abs() <= 1e-14 * (1.0 + q.abs()), "{qq} vs {q}");
            // Derivative against a central difference (error ~ step² ~ 1e-10 relative).
            let e = 1e-6 * (1e-3 + dh.abs());
            let fd = (f.flow(dh + e).0 - f.flow(dh - e).0) / (2.0 * e);
            assert!((g - fd).abs() <= 1e-6 * g, "{g} vs {fd}");
        }
    }

    #[test]
    fn batched_flows_match_single_faces() {
        let faces = [
            Face::new(&[Segment {
                zone: Zone::Pack,
                r_lin: 2.0,
                r_nl: 300.0,
            }]),
            Face::new(&[Segment {
                zone: Zone::Formation,
                r_lin: 5.0,
                r_nl: 0.0,
            }]),
        ];
        let dh = [-0.7, 0.3];
        let (rl, rn): (Vec<f64>, Vec<f64>) = faces.iter().map(|f| (f.r_lin(), f.r_nl())).unzip();
        let (mut q, mut g) = ([0.0; 2], [0.0; 2]);
        flows(&dh, &rl, &rn, &mut q, &mut g);
        for k in 0..2 {
            let (qq, gg) = faces[k].flow(dh[k]);
            assert!((q[k] - qq).abs() <= 1e-15 * qq.abs() && (g[k] - gg).abs() <= 1e-15 * gg);
        }
    }

    #[test]
    fn dissipation_splits_q_dh_by_segment() {
        let f = Face::new(&[
            Segment {
                zone: Zone::Pack,
                r_lin: 1.0,
                r_nl: 10.0,
            },
            Segment {
                zone: Zone::Cake,
                r_lin: 50.0,
                r_nl: 0.0,
            },
            Segment {
                zone: Zone::Formation,
                r_lin: 3.0,
                r_nl: 0.0,
            },
        ]);
        let mut p = [0.0; 5];
        let dh = -0.8;
        let total = f.add_dissipation(dh, &mut p);
        let (q, _) = f.flow(dh);
        assert!((total - q * dh).abs() <= 1e-14 * total.abs());
        // Linear segments in series share Q, so their powers are in the ratio of R_lin.
        assert!((p[Zone::Cake as usize] / p[Zone::Formation as usize] - 50.0 / 3.0).abs() < 1e-12);
    }
}
