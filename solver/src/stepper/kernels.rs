//! The stage's loops over all cells that run at every step of a linear model, each written
//! once as a portable kernel and compiled a second time with AVX enabled, chosen at run
//! time (as `crate::faces::flows` and `stepper/residual.rs` are). The kernels keep their
//! sums in [`LANES`] independent lanes combined in a fixed order and use no fused
//! multiply-add, so the AVX build does the same correctly rounded operations in the same
//! order on each lane: the same bits on every processor.

use super::LANES;

/// Runs `$kernel(args…)` compiled with AVX when the processor has it, else the portable
/// build. `$avx` is the name of the AVX wrapper defined by [`avx_twin`].
macro_rules! dispatch {
    ($kernel:ident, $avx:ident, $($arg:expr),*) => {{
        #[cfg(target_arch = "x86_64")]
        if std::arch::is_x86_feature_detected!("avx") {
            // SAFETY: the processor has just been found to support AVX.
            return unsafe { $avx($($arg),*) };
        }
        $kernel($($arg),*)
    }};
}

/// Defines `$avx`, the AVX build of the `#[inline(always)]` kernel `$kernel`.
macro_rules! avx_twin {
    ($avx:ident, $kernel:ident, ($($arg:ident: $ty:ty),*) -> $ret:ty) => {
        /// The kernel of the same name compiled with AVX enabled.
        ///
        /// # Safety
        /// The processor must support AVX.
        #[cfg(target_arch = "x86_64")]
        #[target_feature(enable = "avx")]
        unsafe fn $avx($($arg: $ty),*) -> $ret {
            $kernel($($arg),*)
        }
    };
}

/// The lanes of a sum added in order, ((l₀ + l₁) + l₂) + l₃, inlined (the AVX builds kept
/// `iter().sum()` as a call).
#[inline(always)]
fn sum_lanes(l: [f64; LANES]) -> f64 {
    ((l[0] + l[1]) + l[2]) + l[3]
}

/// The end of a θ-stage from its θ-point heads, h_new = y/θ − (1−θ)/θ h, written to `out`,
/// with the sums of the stage's balance: [Σ S Δh, Σ S Δh (h_new + h), Σ S Δh², Σ |S Δh|]
/// (Δh = h_new − h). All slices have one length.
///
/// With `HALF` (θ = ½, `inv_theta` = 2 and `carry` = 1, which it ignores) h_new = (y + y) − h,
/// the same bits as 2y − 1·h (doubling and the product by 1 are exact), and Σ S Δh² is
/// not formed (returned as 0): the numerical dissipation it scales, (θ − ½) Σ S Δh², is 0.
pub(super) fn extrapolate<const HALF: bool>(
    out: &mut [f64],
    y: &[f64],
    h: &[f64],
    s: &[f64],
    inv_theta: f64,
    carry: f64,
) -> [f64; 4] {
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx") {
        // SAFETY: the processor has just been found to support AVX.
        return unsafe { extrapolate_avx::<HALF>(out, y, h, s, inv_theta, carry) };
    }
    extrapolate_kernel::<HALF>(out, y, h, s, inv_theta, carry)
}

/// [`extrapolate_kernel`] in AVX instructions: each of the four lanes of a vector does
/// the scalar kernel's lane's operations in the same order.
///
/// # Safety
/// The processor must support AVX.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx")]
unsafe fn extrapolate_avx<const HALF: bool>(
    out: &mut [f64],
    y: &[f64],
    h: &[f64],
    s: &[f64],
    inv_theta: f64,
    carry: f64,
) -> [f64; 4] {
    use std::arch::x86_64::*;
    let m = out.len();
    assert!(y.len() == m && h.len() == m && s.len() == m);
    let full = m / LANES * LANES;
    let (inv, car, sign) = (
        _mm256_set1_pd(inv_theta),
        _mm256_set1_pd(carry),
        _mm256_set1_pd(-0.0),
    );
    let mut acc = [_mm256_setzero_pd(); 4];
    for k in (0..full).step_by(LANES) {
        // SAFETY: k + 4 ≤ m, the length of every slice (asserted above).
        unsafe {
            let yk = _mm256_loadu_pd(y.as_ptr().add(k));
            let hk = _mm256_loadu_pd(h.as_ptr().add(k));
            let sk = _mm256_loadu_pd(s.as_ptr().add(k));
            let hn = if HALF {
                _mm256_sub_pd(_mm256_add_pd(yk, yk), hk)
            } else {
                _mm256_sub_pd(_mm256_mul_pd(yk, inv), _mm256_mul_pd(car, hk))
            };
            let sdh = _mm256_mul_pd(sk, _mm256_sub_pd(hn, hk));
            acc[0] = _mm256_add_pd(acc[0], sdh);
            acc[1] = _mm256_add_pd(acc[1], _mm256_mul_pd(sdh, _mm256_add_pd(hn, hk)));
            if !HALF {
                acc[2] = _mm256_add_pd(acc[2], _mm256_mul_pd(sdh, _mm256_sub_pd(hn, hk)));
            }
            acc[3] = _mm256_add_pd(acc[3], _mm256_andnot_pd(sign, sdh));
            _mm256_storeu_pd(out.as_mut_ptr().add(k), hn);
        }
    }
    let mut lanes = [[0.0f64; LANES]; 4];
    for (l, a) in lanes.iter_mut().zip(acc) {
        // SAFETY: a 4-lane store into a 4-element array.
        unsafe { _mm256_storeu_pd(l.as_mut_ptr(), a) };
    }
    for (((o, &y), &h), &s) in out[full..]
        .iter_mut()
        .zip(&y[full..])
        .zip(&h[full..])
        .zip(&s[full..])
    {
        *o = extrapolate_row::<HALF>(0, y, h, s, inv_theta, carry, &mut lanes);
    }
    lanes.map(sum_lanes)
}

/// One row of [`extrapolate_kernel`]: h_new, its terms added to lane `lane` of the sums.
#[inline(always)]
fn extrapolate_row<const HALF: bool>(
    lane: usize,
    y: f64,
    h: f64,
    s: f64,
    inv_theta: f64,
    carry: f64,
    acc: &mut [[f64; LANES]; 4],
) -> f64 {
    let h_new = if HALF {
        (y + y) - h
    } else {
        y * inv_theta - carry * h
    };
    let sdh = s * (h_new - h);
    acc[0][lane] += sdh;
    acc[1][lane] += sdh * (h_new + h);
    if !HALF {
        acc[2][lane] += sdh * (h_new - h);
    }
    acc[3][lane] += sdh.abs();
    h_new
}

#[inline(always)]
fn extrapolate_kernel<const HALF: bool>(
    out: &mut [f64],
    y: &[f64],
    h: &[f64],
    s: &[f64],
    inv_theta: f64,
    carry: f64,
) -> [f64; 4] {
    let m = out.len();
    assert!(y.len() == m && h.len() == m && s.len() == m);
    let mut acc = [[0.0f64; LANES]; 4];
    let (out4, y4, h4, s4) = (
        out.chunks_exact_mut(LANES),
        y.chunks_exact(LANES),
        h.chunks_exact(LANES),
        s.chunks_exact(LANES),
    );
    let (y1, h1, s1) = (y4.remainder(), h4.remainder(), s4.remainder());
    let full = m - y1.len();
    for (((o, y), h), s) in out4.zip(y4).zip(h4).zip(s4) {
        for l in 0..LANES {
            o[l] = extrapolate_row::<HALF>(l, y[l], h[l], s[l], inv_theta, carry, &mut acc);
        }
    }
    for (((o, &y), &h), &s) in out[full..].iter_mut().zip(y1).zip(h1).zip(s1) {
        *o = extrapolate_row::<HALF>(0, y, h, s, inv_theta, carry, &mut acc);
    }
    acc.map(sum_lanes)
}

/// Σ_f c_f (a_f − b_f)², the power of a run of linear faces of conductances `c` between
/// heads `a` (inner) and `b` (outer), plus `extra` (a last face's power, added to the
/// first lane before the lanes are summed), m⁴/s, for each of `K` head profiles
/// `heads[k] = (a, b)` with `extras[k]`, in one pass over the faces (each conductance loaded
/// once). Each profile's sum has the same operations in the same order as a pass of its
/// own, so the same bits. All slices have one length.
pub(super) fn linear_powers<const K: usize>(
    c: &[f64],
    heads: [(&[f64], &[f64]); K],
    extras: [Option<f64>; K],
) -> [f64; K] {
    dispatch!(linear_powers_kernel, linear_powers_avx, c, heads, extras)
}

/// [`linear_powers_kernel`] in AVX instructions: each group's lanes in one vector, lane by
/// lane the same operations in the same order.
///
/// # Safety
/// The processor must support AVX.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx")]
unsafe fn linear_powers_avx<const K: usize>(
    c: &[f64],
    heads: [(&[f64], &[f64]); K],
    extras: [Option<f64>; K],
) -> [f64; K] {
    use std::arch::x86_64::*;
    const W: usize = GROUPS * LANES;
    let m = c.len();
    for (a, b) in heads {
        assert!(a.len() == m && b.len() == m);
    }
    let blocks = m / W * W;
    let whole = blocks + (m - blocks) / LANES * LANES;
    // SAFETY (every load below): o + LANES ≤ whole ≤ m, the length of every slice.
    let term = |ck: __m256d, (a, b): (&[f64], &[f64]), o: usize| unsafe {
        let d = _mm256_sub_pd(
            _mm256_loadu_pd(a.as_ptr().add(o)),
            _mm256_loadu_pd(b.as_ptr().add(o)),
        );
        _mm256_mul_pd(_mm256_mul_pd(ck, d), d)
    };
    // SAFETY: as for `term`.
    let load_c = |o: usize| unsafe { _mm256_loadu_pd(c.as_ptr().add(o)) };
    let mut acc = [[_mm256_setzero_pd(); GROUPS]; K];
    for k in (0..blocks).step_by(W) {
        for g in 0..GROUPS {
            let ck = load_c(k + g * LANES);
            for (acc, &h) in acc.iter_mut().zip(&heads) {
                acc[g] = _mm256_add_pd(acc[g], term(ck, h, k + g * LANES));
            }
        }
    }
    for o in (blocks..whole).step_by(LANES) {
        let ck = load_c(o);
        for (acc, &h) in acc.iter_mut().zip(&heads) {
            acc[0] = _mm256_add_pd(acc[0], term(ck, h, o));
        }
    }
    let mut out = [0.0; K];
    let tail = whole < m;
    for ((out, mut acc), ((a, b), extra)) in
        out.iter_mut().zip(acc).zip(heads.into_iter().zip(extras))
    {
        if tail {
            // The last faces go to lane 0 of group 0 before the groups are combined.
            let mut first = [0.0f64; LANES];
            // SAFETY: a 4-lane store into a 4-element array.
            unsafe { _mm256_storeu_pd(first.as_mut_ptr(), acc[0]) };
            for ((&c, &a), &b) in c[whole..].iter().zip(&a[whole..]).zip(&b[whole..]) {
                first[0] += c * (a - b) * (a - b);
            }
            // SAFETY: a 4-lane load from a 4-element array.
            acc[0] = unsafe { _mm256_loadu_pd(first.as_ptr()) };
        }
        // The groups combined lane by lane as `combine_power` does, in vectors.
        let groups = _mm256_add_pd(_mm256_add_pd(acc[0], acc[1]), _mm256_add_pd(acc[2], acc[3]));
        let mut lanes = [0.0f64; LANES];
        // SAFETY: a 4-lane store into a 4-element array.
        unsafe { _mm256_storeu_pd(lanes.as_mut_ptr(), groups) };
        if let Some(e) = extra {
            lanes[0] += e;
        }
        *out = sum_lanes(lanes);
    }
    out
}

/// The lanes of [`linear_powers_kernel`]'s groups combined: pairwise across the groups,
/// `extra` to lane 0, then the lanes in order.
#[inline(always)]
fn combine_power(acc: &[[f64; LANES]; GROUPS], extra: Option<f64>) -> f64 {
    let mut lanes = [0.0f64; LANES];
    for l in 0..LANES {
        lanes[l] = (acc[0][l] + acc[1][l]) + (acc[2][l] + acc[3][l]);
    }
    if let Some(e) = extra {
        lanes[0] += e;
    }
    sum_lanes(lanes)
}

/// Independent sums of [`linear_powers_kernel`]: [`LANES`] lanes in each of `GROUPS`
/// groups, so consecutive faces add to different accumulators and no sum waits for the
/// previous face's.
const GROUPS: usize = 4;

#[inline(always)]
fn linear_powers_kernel<const K: usize>(
    c: &[f64],
    heads: [(&[f64], &[f64]); K],
    extras: [Option<f64>; K],
) -> [f64; K] {
    const W: usize = GROUPS * LANES;
    let m = c.len();
    let mut out = [0.0; K];
    for ((out, (a, b)), extra) in out.iter_mut().zip(heads).zip(extras) {
        assert!(a.len() == m && b.len() == m);
        let mut acc = [[0.0f64; LANES]; GROUPS];
        // Faces by blocks of GROUPS × LANES, face k of a block to lane k % LANES of group
        // k / LANES; then the whole lanes left to group 0; the last faces to lane 0 of
        // group 0.
        let (cw, aw, bw) = (c.chunks_exact(W), a.chunks_exact(W), b.chunks_exact(W));
        let (cr, ar, br) = (cw.remainder(), aw.remainder(), bw.remainder());
        for ((c, a), b) in cw.zip(aw).zip(bw) {
            for (g, acc) in acc.iter_mut().enumerate() {
                for (l, s) in acc.iter_mut().enumerate() {
                    let k = g * LANES + l;
                    *s += c[k] * (a[k] - b[k]) * (a[k] - b[k]);
                }
            }
        }
        let (cl, al, bl) = (
            cr.chunks_exact(LANES),
            ar.chunks_exact(LANES),
            br.chunks_exact(LANES),
        );
        let (c1, a1, b1) = (cl.remainder(), al.remainder(), bl.remainder());
        for ((c, a), b) in cl.zip(al).zip(bl) {
            for l in 0..LANES {
                acc[0][l] += c[l] * (a[l] - b[l]) * (a[l] - b[l]);
            }
        }
        for ((&c, &a), &b) in c1.iter().zip(a1).zip(b1) {
            acc[0][0] += c * (a - b) * (a - b);
        }
        *out = combine_power(&acc, extra);
    }
    out
}

/// Slopes dh/dt of cells with linear faces: for j ≥ 1, `out[j]` = (Q_{j−1} − Q_j)/S_j with
/// Q_f = c_f (h_f − h_{f+1}) (the outer face c_{n−1} h_{n−1} when `outer_open`, else no
/// flow), 0 where S_j = 0; `out[0]` is left alone. The inflow of cell 1 is `q_in` (the
/// screen face's or the column's flow). `h`, `s`, `out` have length n, `c` at least n.
pub(super) fn linear_slopes(
    h: &[f64],
    c: &[f64],
    s: &[f64],
    q_in: f64,
    outer_open: bool,
    out: &mut [f64],
) {
    dispatch!(
        linear_slopes_kernel,
        linear_slopes_avx,
        h,
        c,
        s,
        q_in,
        outer_open,
        out
    )
}

avx_twin!(linear_slopes_avx, linear_slopes_kernel,
    (h: &[f64], c: &[f64], s: &[f64], q_in: f64, outer_open: bool, out: &mut [f64]) -> ());

#[inline(always)]
fn linear_slopes_kernel(
    h: &[f64],
    c: &[f64],
    s: &[f64],
    q_in: f64,
    outer_open: bool,
    out: &mut [f64],
) {
    let n = h.len();
    assert!(n >= 2 && s.len() == n && out.len() == n && c.len() >= n);
    let last = n - 1;
    let slope = |q_in: f64, q_out: f64, s: f64| if s > 0.0 { (q_in - q_out) / s } else { 0.0 };
    // Cell 1 takes the given inflow; cells 2..last the flow of the face before them.
    let q = |f: usize| c[f] * (h[f] - h[f + 1]);
    let q_last = if outer_open { c[last] * h[last] } else { 0.0 };
    if last == 1 {
        out[1] = slope(q_in, q_last, s[1]);
        return;
    }
    out[1] = slope(q_in, q(1), s[1]);
    let (cells, hl, hm, hr, cl, cr, sm) = (
        &mut out[2..last],
        &h[1..last - 1],
        &h[2..last],
        &h[3..=last],
        &c[1..last - 1],
        &c[2..last],
        &s[2..last],
    );
    for ((((((o, &a), &b), &d), &g0), &g1), &s) in cells
        .iter_mut()
        .zip(hl)
        .zip(hm)
        .zip(hr)
        .zip(cl)
        .zip(cr)
        .zip(sm)
    {
        *o = slope(g0 * (a - b), g1 * (b - d), s);
    }
    out[last] = slope(q(last - 1), q_last, s[last]);
}

/// The error norm's scan: over j, with e = |`est[j]`| and den = `atol` + `rtol` max(|`w[j]`|,
/// |`v[j]`|), the worst value starts at 0 and becomes e/den at every j where e is NaN or
/// e > worst × den; returns (worst, its j, or `usize::MAX` if none). Exactly the row-by-row scan: rows
/// are screened [`LANES`] at a time against the worst so far, and a group with any candidate
/// is scanned row by row. A row that fails the screen cannot update later in its group
/// either (the worst only grows, and worst × den with it).
pub(super) fn error_scan(est: &[f64], w: &[f64], v: &[f64], atol: f64, rtol: f64) -> (f64, usize) {
    dispatch!(error_scan_kernel, error_scan_avx, est, w, v, atol, rtol)
}

avx_twin!(error_scan_avx, error_scan_kernel,
    (est: &[f64], w: &[f64], v: &[f64], atol: f64, rtol: f64) -> (f64, usize));

#[inline(always)]
fn error_scan_kernel(est: &[f64], w: &[f64], v: &[f64], atol: f64, rtol: f64) -> (f64, usize) {
    let m = est.len();
    assert!(w.len() == m && v.len() == m);
    let (mut worst, mut index) = (0.0f64, usize::MAX);
    let row = |j: usize, worst: &mut f64, index: &mut usize| {
        let (e, den) = (est[j].abs(), atol + rtol * w[j].abs().max(v[j].abs()));
        // A NaN estimate must not pass as small; divide only for a new worst.
        if e.is_nan() || e > *worst * den {
            *worst = e / den;
            *index = j;
        }
    };
    let full = m / LANES * LANES;
    for k in (0..full).step_by(LANES) {
        let (e4, w4, v4) = (&est[k..k + LANES], &w[k..k + LANES], &v[k..k + LANES]);
        let mut pass = true;
        for l in 0..LANES {
            let den = atol + rtol * w4[l].abs().max(v4[l].abs());
            // False for a NaN estimate.
            pass &= e4[l].abs() <= worst * den;
        }
        if !pass {
            for j in k..k + LANES {
                row(j, &mut worst, &mut index);
            }
        }
    }
    for j in full..m {
        row(j, &mut worst, &mut index);
    }
    (worst, index)
}

/// True when every entry is finite: 0 × x is ±0 for a finite x and NaN otherwise, and a sum
/// of zeros stays 0 in any order (a branch-free test that vectorises).
pub(super) fn all_finite(v: &[f64]) -> bool {
    v.iter().fold(0.0, |a, &x| a + 0.0 * x) == 0.0
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Seeded values over many decades, both signs.
    fn values(seed: &mut u64, m: usize, scale: f64) -> Vec<f64> {
        (0..m)
            .map(|_| {
                *seed ^= *seed << 13;
                *seed ^= *seed >> 7;
                *seed ^= *seed << 17;
                let u = (*seed >> 11) as f64 / (1u64 << 53) as f64;
                let v = (*seed >> 3 & 0xffff) as f64 / 65536.0;
                (u - 0.5) * scale * 10f64.powf(6.0 * v - 3.0)
            })
            .collect()
    }

    #[test]
    fn every_build_gives_the_portable_bits() {
        // The run-time chosen build against the portable kernel on lengths that leave every
        // remainder. On a processor without AVX both are the portable loop.
        let mut seed = 0x51_7cc1_b727_220a_u64;
        for m in [2usize, 3, 5, 8, 17, 21, 35, 299, 300] {
            let (y, h) = (values(&mut seed, m, 1.0), values(&mut seed, m, 1.0));
            let mut s: Vec<f64> = values(&mut seed, m, 1e-3).iter().map(|x| x.abs()).collect();
            s[m / 2] = 0.0;
            let c: Vec<f64> = values(&mut seed, m, 1e-2).iter().map(|x| x.abs()).collect();
            let (mut o1, mut o2) = (vec![0.0; m], vec![0.0; m]);
            let a = extrapolate::<false>(&mut o1, &y, &h, &s, 2.0, 1.0);
            let b = extrapolate_kernel::<false>(&mut o2, &y, &h, &s, 2.0, 1.0);
            assert_eq!(a.map(f64::to_bits), b.map(f64::to_bits), "m = {m}");
            assert_eq!(o1, o2);
            // θ = ½'s form: the same bits, but for the sum it does not form.
            let (mut o3, mut o4) = (vec![0.0; m], vec![0.0; m]);
            let c3 = extrapolate::<true>(&mut o3, &y, &h, &s, 2.0, 1.0);
            let c4 = extrapolate_kernel::<true>(&mut o4, &y, &h, &s, 2.0, 1.0);
            let general = [a[0], a[1], 0.0, a[3]];
            assert_eq!(c3.map(f64::to_bits), general.map(f64::to_bits), "m = {m}");
            assert_eq!(c4.map(f64::to_bits), general.map(f64::to_bits), "m = {m}");
            assert_eq!(
                o3.iter().map(|v| v.to_bits()).collect::<Vec<_>>(),
                o1.iter().map(|v| v.to_bits()).collect::<Vec<_>>()
            );
            assert_eq!(o4, o1);
            let (u, w) = (values(&mut seed, m, 1.0), values(&mut seed, m, 1.0));
            for extra in [None, Some(3e-4)] {
                let (p1, p2) = (
                    linear_powers(&c, [(&y, &h)], [extra])[0],
                    linear_powers_kernel(&c, [(&y, &h)], [extra])[0],
                );
                assert_eq!(p1.to_bits(), p2.to_bits());
                // Two profiles in one pass: each the bits of its own pass.
                let q = linear_powers(&c, [(&u, &w)], [Some(1e-5)])[0];
                let both = linear_powers(&c, [(&y, &h), (&u, &w)], [extra, Some(1e-5)]);
                let portable = linear_powers_kernel(&c, [(&y, &h), (&u, &w)], [extra, Some(1e-5)]);
                assert_eq!(
                    both.map(f64::to_bits),
                    [p1.to_bits(), q.to_bits()],
                    "m = {m}"
                );
                assert_eq!(both.map(f64::to_bits), portable.map(f64::to_bits));
            }
            for open in [false, true] {
                let (mut f1, mut f2) = (vec![0.0; m], vec![0.0; m]);
                linear_slopes(&y, &c, &s, 1e-3, open, &mut f1);
                linear_slopes_kernel(&y, &c, &s, 1e-3, open, &mut f2);
                assert_eq!(f1, f2);
            }
        }
    }

    #[test]
    fn error_scan_is_the_row_by_row_scan() {
        // The screened scan against the plain one on estimates over many decades, with a
        // NaN, an infinity, ties and zeros, every remainder length; value bits and index.
        let mut seed = 0x6a09_e667_f3bc_c908_u64;
        for m in [0usize, 1, 3, 4, 7, 64, 299, 300] {
            for case in 0..6 {
                let mut est = values(&mut seed, m, 1e-3);
                let (w, v) = (values(&mut seed, m, 1.0), values(&mut seed, m, 1.0));
                if m > 2 {
                    match case {
                        1 => est[m / 2] = f64::NAN,
                        2 => est[m - 1] = f64::INFINITY,
                        3 => est.iter_mut().for_each(|e| *e = 1e-6),
                        4 => est.iter_mut().for_each(|e| *e = 0.0),
                        _ => {}
                    }
                }
                let (mut worst, mut index) = (0.0f64, usize::MAX);
                for j in 0..m {
                    let (e, den) = (est[j].abs(), 1e-5 + 1e-4 * w[j].abs().max(v[j].abs()));
                    if e.is_nan() || e > worst * den {
                        worst = e / den;
                        index = j;
                    }
                }
                let (a, i) = error_scan(&est, &w, &v, 1e-5, 1e-4);
                assert_eq!(
                    (a.to_bits(), i),
                    (worst.to_bits(), index),
                    "m {m} case {case}"
                );
                let (b, k) = error_scan_kernel(&est, &w, &v, 1e-5, 1e-4);
                assert_eq!((b.to_bits(), k), (worst.to_bits(), index));
            }
        }
    }

    #[test]
    fn kernels_match_their_definitions() {
        // Against the formulas written row by row (sums to round-off of their terms).
        let mut seed = 0x2545_f491_4f6c_dd1d_u64;
        let m = 37;
        let (y, h) = (values(&mut seed, m, 1.0), values(&mut seed, m, 1.0));
        let c: Vec<f64> = values(&mut seed, m, 1e-2).iter().map(|x| x.abs()).collect();
        let mut s: Vec<f64> = values(&mut seed, m, 1e-3).iter().map(|x| x.abs()).collect();
        s[5] = 0.0;
        let (theta, mut out) = (0.5, vec![0.0; m]);
        let sums = extrapolate::<false>(&mut out, &y, &h, &s, 1.0 / theta, (1.0 - theta) / theta);
        let mut want = [0.0; 4];
        let mut size = [0.0; 4];
        for j in 0..m {
            let hn = y[j] / theta - (1.0 - theta) / theta * h[j];
            assert!((out[j] - hn).abs() <= 4.0 * f64::EPSILON * (hn.abs() + h[j].abs()));
            let sdh = s[j] * (hn - h[j]);
            for (k, t) in [sdh, sdh * (hn + h[j]), sdh * (hn - h[j]), sdh.abs()]
                .into_iter()
                .enumerate()
            {
                want[k] += t;
                size[k] += t.abs();
            }
        }
        for k in 0..4 {
            assert!((sums[k] - want[k]).abs() <= 1e-13 * size[k], "sum {k}");
        }
        let p: f64 = (0..m).map(|f| c[f] * (y[f] - h[f]).powi(2)).sum();
        let power = |extra| linear_powers(&c, [(&y, &h)], [extra])[0];
        assert!((power(None) - p).abs() <= 1e-13 * p);
        assert!((power(Some(0.5 * p)) - 1.5 * p).abs() <= 1e-13 * p);
        // Slopes: the storage balance of each cell, an open and a closed outer face.
        for open in [false, true] {
            let mut f = vec![7.0; m];
            linear_slopes(&y, &c, &s, 2e-3, open, &mut f);
            assert_eq!(f[0], 7.0);
            for j in 1..m {
                let q_in = if j == 1 {
                    2e-3
                } else {
                    c[j - 1] * (y[j - 1] - y[j])
                };
                let q_out = if j + 1 < m {
                    c[j] * (y[j] - y[j + 1])
                } else if open {
                    c[j] * y[j]
                } else {
                    0.0
                };
                let want = if s[j] > 0.0 {
                    (q_in - q_out) / s[j]
                } else {
                    0.0
                };
                assert_eq!(f[j], want, "j = {j}, open {open}");
            }
        }
        assert!(all_finite(&y));
        for bad in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            let mut v = y.clone();
            v[11] = bad;
            assert!(!all_finite(&v));
        }
    }
}
