//! The cell residuals of the θ-point system, the inner loop of every Newton iteration:
//! `R_j = Q_{j−1} − Q_j − S_j (y_j − h_j)/(θΔt)` with the largest |R_j| and the largest flow
//! term of a row and the sum of the residuals (the cells' volume balance), in one pass. On x86-64 processors with AVX it runs 4 rows at a time
//! (chosen at run time); the compiler's own vectorisation of this loop with its two maxima
//! is poor. Both versions do the same correctly rounded operations in the same order on
//! each row, so they give the same bits.

/// The larger of two numbers, written so that loops over it vectorise (no NaN handling:
/// the iterates are finite, and a NaN is caught by the step's own check).
#[inline(always)]
pub(super) fn max(a: f64, b: f64) -> f64 {
    if b > a {
        b
    } else {
        a
    }
}

/// Largest magnitude in a slice (0 for an empty one).
pub(super) fn max_abs(v: &[f64]) -> f64 {
    v.iter().fold(0.0, |a, &b| max(a, b.abs()))
}

/// The cell residuals' summary: largest |R|, largest flow term of a row, and Σ R.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Residuals {
    /// Largest |R_j|, m³/s.
    pub worst: f64,
    /// Largest |S_j (y_j − h_j)/(θΔt)| + |Q_in| + |Q_out| of a row, m³/s.
    pub scale: f64,
    /// Σ R_j: the volume balance of all the cells together (the face flows between them
    /// cancel), m³/s.
    pub sum: f64,
}

/// Writes the cell residuals into `rhs` and returns their summary, choosing the AVX
/// version when the processor has it.
pub(super) fn residual_avx_or_rows(
    y: &[f64],
    h: &[f64],
    s: &[f64],
    q_in: &[f64],
    q_out: &[f64],
    inv_tdt: f64,
    rhs: &mut [f64],
) -> Residuals {
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx") {
        // SAFETY: AVX was just detected.
        return unsafe { residual_avx(y, h, s, q_in, q_out, inv_tdt, rhs) };
    }
    residual_rows(y, h, s, q_in, q_out, inv_tdt, rhs)
}

/// Number of rows handled together (lanes of the sums and maxima).
const LANES: usize = 4;

/// Combines the lanes and the tail in one fixed order, shared by both versions.
fn combine(
    worst: [f64; LANES],
    scale: [f64; LANES],
    sum: [f64; LANES],
    tail: Residuals,
) -> Residuals {
    let fold = |l: &[f64; LANES], first: f64| l.iter().fold(first, |a, &b| max(a, b));
    Residuals {
        worst: fold(&worst, tail.worst),
        scale: fold(&scale, tail.scale),
        sum: ((sum[0] + sum[1]) + (sum[2] + sum[3])) + tail.sum,
    }
}

/// One cell row: its residual R and its flow term |S (y − h)/(θΔt)| + |Q_in| + |Q_out|, in
/// the operation order the AVX version keeps on each lane.
#[inline(always)]
fn row(y: f64, h: f64, s: f64, q_in: f64, q_out: f64, inv_tdt: f64) -> (f64, f64) {
    let acc = s * inv_tdt * (y - h);
    (q_in - q_out - acc, acc.abs() + q_in.abs() + q_out.abs())
}

/// One row at a time, for the rows after the last whole group of [`LANES`].
fn tail_rows(
    y: &[f64],
    h: &[f64],
    s: &[f64],
    q_in: &[f64],
    q_out: &[f64],
    inv_tdt: f64,
    rhs: &mut [f64],
) -> Residuals {
    let mut out = Residuals {
        worst: 0.0,
        scale: 0.0,
        sum: 0.0,
    };
    for (((((r, &y), &h), &s), &qi), &qo) in
        rhs.iter_mut().zip(y).zip(h).zip(s).zip(q_in).zip(q_out)
    {
        let (res, terms) = row(y, h, s, qi, qo, inv_tdt);
        *r = res;
        out.worst = max(out.worst, res.abs());
        out.scale = max(out.scale, terms);
        out.sum += res;
    }
    out
}

/// [`residual_rows`] with 4-wide AVX instructions: the same operations in the same order
/// on each lane, so the same bits.
///
/// # Safety
/// The processor must support AVX.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx")]
unsafe fn residual_avx(
    y: &[f64],
    h: &[f64],
    s: &[f64],
    q_in: &[f64],
    q_out: &[f64],
    inv_tdt: f64,
    rhs: &mut [f64],
) -> Residuals {
    use std::arch::x86_64::*;
    let m = rhs.len();
    assert!(y.len() == m && h.len() == m && s.len() == m && q_in.len() == m && q_out.len() == m);
    let full = m / LANES * LANES;
    let sign = _mm256_set1_pd(-0.0);
    let inv = _mm256_set1_pd(inv_tdt);
    let (mut worst, mut scale, mut sum) = (
        _mm256_setzero_pd(),
        _mm256_setzero_pd(),
        _mm256_setzero_pd(),
    );
    for k in (0..full).step_by(LANES) {
        // SAFETY: k + 4 ≤ m = the length of every slice (asserted above).
        unsafe {
            let yk = _mm256_loadu_pd(y.as_ptr().add(k));
            let hk = _mm256_loadu_pd(h.as_ptr().add(k));
            let sk = _mm256_loadu_pd(s.as_ptr().add(k));
            let qi = _mm256_loadu_pd(q_in.as_ptr().add(k));
            let qo = _mm256_loadu_pd(q_out.as_ptr().add(k));
            let acc = _mm256_mul_pd(_mm256_mul_pd(sk, inv), _mm256_sub_pd(yk, hk));
            let r = _mm256_sub_pd(_mm256_sub_pd(qi, qo), acc);
            _mm256_storeu_pd(rhs.as_mut_ptr().add(k), r);
            // max(a, b) of the scalar code is (b > a ? b : a), which is MAXPD(b, a).
            worst = _mm256_max_pd(_mm256_andnot_pd(sign, r), worst);
            let terms = _mm256_add_pd(
                _mm256_add_pd(_mm256_andnot_pd(sign, acc), _mm256_andnot_pd(sign, qi)),
                _mm256_andnot_pd(sign, qo),
            );
            scale = _mm256_max_pd(terms, scale);
            sum = _mm256_add_pd(sum, r);
        }
    }
    let mut lanes = [[0.0f64; LANES]; 3];
    // SAFETY: three 4-lane stores into 4-element arrays.
    unsafe {
        _mm256_storeu_pd(lanes[0].as_mut_ptr(), worst);
        _mm256_storeu_pd(lanes[1].as_mut_ptr(), scale);
        _mm256_storeu_pd(lanes[2].as_mut_ptr(), sum);
    }
    let tail = tail_rows(
        &y[full..],
        &h[full..],
        &s[full..],
        &q_in[full..],
        &q_out[full..],
        inv_tdt,
        &mut rhs[full..],
    );
    combine(lanes[0], lanes[1], lanes[2], tail)
}

/// Writes the cell residuals R = Q_in − Q_out − S (y − h)/(θΔt) into `rhs` and returns
/// their summary; the portable version, in groups of [`LANES`] rows like the AVX one.
pub(super) fn residual_rows(
    y: &[f64],
    h: &[f64],
    s: &[f64],
    q_in: &[f64],
    q_out: &[f64],
    inv_tdt: f64,
    rhs: &mut [f64],
) -> Residuals {
    let m = rhs.len();
    let full = m / LANES * LANES;
    let (mut worst, mut scale, mut sum) = ([0.0; LANES], [0.0; LANES], [0.0; LANES]);
    for k in (0..full).step_by(LANES) {
        for l in 0..LANES {
            let j = k + l;
            let (r, terms) = row(y[j], h[j], s[j], q_in[j], q_out[j], inv_tdt);
            rhs[j] = r;
            worst[l] = max(worst[l], r.abs());
            scale[l] = max(scale[l], terms);
            sum[l] += r;
        }
    }
    let tail = tail_rows(
        &y[full..],
        &h[full..],
        &s[full..],
        &q_in[full..],
        &q_out[full..],
        inv_tdt,
        &mut rhs[full..],
    );
    combine(worst, scale, sum, tail)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_chosen_version_gives_the_portable_bits() {
        // Rows of both signs over many decades, a length that leaves a remainder. On a
        // processor without AVX both calls are the portable loop.
        let mut seed = 0x9e37_79b9_7f4a_7c15_u64;
        let mut next = || {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed >> 11) as f64 / (1u64 << 53) as f64
        };
        let m = 303;
        let mut v = |scale: f64| -> Vec<f64> {
            (0..m)
                .map(|_| (next() - 0.5) * scale * 10f64.powf(6.0 * next() - 3.0))
                .collect()
        };
        let (y, h, q_in, q_out) = (v(1.0), v(1.0), v(1e-3), v(1e-3));
        let s: Vec<f64> = (0..m).map(|k| 1e-4 * (1.0 + k as f64)).collect();
        let (mut r1, mut r2) = (vec![0.0; m], vec![0.0; m]);
        let a = residual_avx_or_rows(&y, &h, &s, &q_in, &q_out, 37.5, &mut r1);
        let b = residual_rows(&y, &h, &s, &q_in, &q_out, 37.5, &mut r2);
        assert_eq!(a.worst.to_bits(), b.worst.to_bits());
        assert_eq!(a.scale.to_bits(), b.scale.to_bits());
        assert_eq!(a.sum.to_bits(), b.sum.to_bits());
        for k in 0..m {
            assert_eq!(r1[k].to_bits(), r2[k].to_bits(), "row {k}");
        }
        // The maxima are those of the rows, and the sum theirs (to round-off of m terms).
        let worst = r2.iter().fold(0.0f64, |a, r| a.max(r.abs()));
        assert_eq!(b.worst, worst);
        let sum: f64 = r2.iter().sum();
        let size: f64 = r2.iter().map(|r| r.abs()).sum();
        assert!((b.sum - sum).abs() <= 1e-15 * m as f64 * size);
    }
}
