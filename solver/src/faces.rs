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
//! Half cell of conductivity K and Forchheimer β between radii r₁ < r₂ (docs/physics.md §1.2,
//! §4.3; exact for steady radial flow, Thiem 1906):
//! ```text
//! R_lin = ln(r₂/r₁) / (2π b K)      R_nl = β (1/r₁ − 1/r₂) / (2π b)²
//! ```
//! Wall cake (docs/physics.md §2.1): `R_lin = δ_c / (2π r_b b K_c)`. Screen (§3): linear loss
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
            quadratic_law(self.r_lin, self.r_nl, dh)
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

/// Head drops, flows and derivatives of the faces between consecutive nodes, branch-free
/// so the loop vectorises: face k joins `heads[k]` and `heads[k + 1]`, Δh_k is their
/// difference and Q, dQ/dΔh follow [`quadratic_law`] (which reduces to Δh/R_lin and 1/R_lin
/// when R_nl = 0). `r_lin`, `r_nl`, `dh`, `q`, `g` have one length, one less than `heads`.
///
/// On x86-64 processors with AVX the same code is compiled for 4-wide vectors and chosen
/// at run time. It has no fused multiply-add, and square root, division, product and sum
/// are correctly rounded at any vector width, so both versions give the same bits.
pub fn flows(
    heads: &[f64],
    r_lin: &[f64],
    r_nl: &[f64],
    dh: &mut [f64],
    q: &mut [f64],
    g: &mut [f64],
) {
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx") {
        // SAFETY: the processor has just been found to support AVX.
        unsafe { flows_avx(heads, r_lin, r_nl, dh, q, g) };
        return;
    }
    flows_kernel(heads, r_lin, r_nl, dh, q, g);
}

/// [`flows`] compiled with AVX enabled.
///
/// # Safety
/// The processor must support AVX.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx")]
unsafe fn flows_avx(
    heads: &[f64],
    r_lin: &[f64],
    r_nl: &[f64],
    dh: &mut [f64],
    q: &mut [f64],
    g: &mut [f64],
) {
    flows_kernel(heads, r_lin, r_nl, dh, q, g);
}

/// The loop of [`flows`], inlined into each instruction-set version.
#[inline(always)]
fn flows_kernel(
    heads: &[f64],
    r_lin: &[f64],
    r_nl: &[f64],
    dh: &mut [f64],
    q: &mut [f64],
    g: &mut [f64],
) {
    let m = dh.len();
    assert!(heads.len() == m + 1 && r_lin.len() == m && r_nl.len() == m);
    assert!(q.len() == m && g.len() == m);
    for ((((((d, &a), &b), &rl), &rn), qo), go) in dh
        .iter_mut()
        .zip(&heads[..m])
        .zip(&heads[1..])
        .zip(r_lin)
        .zip(r_nl)
        .zip(q.iter_mut())
        .zip(g.iter_mut())
    {
        *d = a - b;
        (*qo, *go) = quadratic_law(rl, rn, *d);
    }
}

/// Flow and dQ/dΔh of Δh = R_lin Q + R_nl Q|Q|. With S = sqrt(R_lin² + 4 R_nl |Δh|):
/// Q = sign(Δh) 2|Δh|/(R_lin + S), the root without cancellation, and dΔh/dQ =
/// R_lin + 2 R_nl |Q| = S. One division serves both: 1/(S (R_lin + S)).
#[inline(always)]
pub fn quadratic_law(rl: f64, rn: f64, d: f64) -> (f64, f64) {
    let a = d.abs();
    let root = (rl * rl + 4.0 * rn * a).sqrt();
    let sum = rl + root;
    let inv = 1.0 / (root * sum);
    ((2.0 * a * root * inv).copysign(d), sum * inv)
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
        let heads = [0.1, 0.8, 0.5];
        let (rl, rn): (Vec<f64>, Vec<f64>) = faces.iter().map(|f| (f.r_lin(), f.r_nl())).unzip();
        let (mut dh, mut q, mut g) = ([0.0; 2], [0.0; 2], [0.0; 2]);
        flows(&heads, &rl, &rn, &mut dh, &mut q, &mut g);
        assert_eq!(dh, [0.1 - 0.8, 0.8 - 0.5]);
        // The nonlinear face shares the batched arithmetic; the linear one uses its
        // conductance directly, a few ulps from R_lin's reciprocal by the quadratic route.
        assert_eq!(faces[0].flow(dh[0]), (q[0], g[0]));
        let (qq, gg) = faces[1].flow(dh[1]);
        assert!((q[1] - qq).abs() <= 1e-15 * qq.abs() && (g[1] - gg).abs() <= 1e-15 * gg);
    }

    #[test]
    fn every_instruction_set_gives_the_same_bits() {
        // The run-time chosen version of `flows` against the portable loop, on heads and
        // resistances spread over many decades (both signs, zero drop, linear faces). On a
        // processor without AVX both are the portable loop.
        let mut seed = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = || {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed >> 11) as f64 / (1u64 << 53) as f64
        };
        let n = 1001;
        let mut heads: Vec<f64> = vec![0.0; n + 1];
        for k in 1..=n {
            heads[k] = heads[k - 1] + (next() - 0.5) * 10f64.powf(8.0 * next() - 6.0);
        }
        heads[8] = heads[7];
        let rl: Vec<f64> = (0..n).map(|_| 10f64.powf(12.0 * next() - 4.0)).collect();
        let rn: Vec<f64> = (0..n)
            .map(|k| {
                if k % 5 == 0 {
                    0.0
                } else {
                    10f64.powf(10.0 * next())
                }
            })
            .collect();
        let mut out = [(); 2].map(|_| [vec![0.0; n], vec![0.0; n], vec![0.0; n]]);
        let [[dh1, q1, g1], [dh2, q2, g2]] = &mut out;
        flows(&heads, &rl, &rn, dh1, q1, g1);
        flows_kernel(&heads, &rl, &rn, dh2, q2, g2);
        assert_eq!(dh1, dh2);
        for k in 0..n {
            assert_eq!(q1[k].to_bits(), q2[k].to_bits(), "q at {k}");
            assert_eq!(g1[k].to_bits(), g2[k].to_bits(), "g at {k}");
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
