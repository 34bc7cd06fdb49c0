//! The linear path's solve with kept factors: both chains of the two-ended elimination in the
//! two lanes of one vector (lane 0 the top chain, lane 1 the bottom chain), four rows of each
//! chain per link of the dependency chain (docs/numerics.md, "Tridiagonal solvers").
//!
//! For a chain z_k = d_k − ℓ_k z_{k−1} (rows in the order the sweep visits them), a block of
//! four rows starting at k with Z = z_{k−1} is
//!
//! ```text
//! a_0 = d_k,  a_j = d_{k+j} − ℓ_{k+j} a_{j−1}          (j = 1…3, off the chain)
//! z_{k+j} = a_j − μ_j Z,   μ_0 = ℓ_k,  μ_j = −ℓ_{k+j} μ_{j−1}
//! ```
//!
//! so the chain waits for one multiply and one subtraction per four rows; the μ_j are formed
//! once with the factors. It is the one-row recurrence regrouped, applying the same
//! multipliers over at most four rows: an error in Z grows as in the one-row sweep, also where
//! |ℓ| > 1 (at the pack's outer edge, where the conductance drops; tested in `tridiag.rs`).
//! The rows left over (fewer than four)
//! take the one-row recurrence. The same recurrence, with the substitution's multipliers,
//! gives the substitution. Both lanes do the same correctly rounded operations (no fused
//! multiply-add) in the same order as the portable build: the same bits on every processor.
//!
//! The substitution visits the rows the forward sweep visited, in pairs of the same rows
//! (row p − 1 − k with row p + 1 + k), in the reverse order. The forward sweep keeps its z as
//! the vector lanes hold them, one aligned pair a visit, and writes none to `x`; the
//! substitution reads them back, again without rearranging lanes. Only the rows that
//! `x` carries in, from the caller's one-row sweeps, are read from `x`. This removes half of
//! the sweeps' lane shuffles (the forward sweep's four a block on the way out, the
//! substitution's four on the way in), and the sweeps are bound by the vector units: `run`
//! on the 60 M cell-step case went from a median of 130–132 to 124–125 ms (three rounds of
//! 16 interleaved runs). The bits are those of the scalar blocked recurrence, as before.

/// Two lanes: the top chain's value and the bottom chain's.
#[derive(Clone, Copy)]
pub(super) struct P2(
    #[cfg(target_arch = "x86_64")] std::arch::x86_64::__m128d,
    #[cfg(not(target_arch = "x86_64"))] [f64; 2],
);

// SSE2 is part of the x86_64 baseline: every intrinsic below is available on every x86_64
// processor, so the `unsafe` blocks only state what the compiler already knows.
#[cfg(target_arch = "x86_64")]
impl P2 {
    #[inline(always)]
    fn new(top: f64, bottom: f64) -> P2 {
        use std::arch::x86_64::*;
        // SAFETY: SSE2 (x86_64 baseline).
        P2(unsafe { _mm_set_pd(bottom, top) })
    }
    #[inline(always)]
    fn lanes(self) -> [f64; 2] {
        let mut out = [0.0; 2];
        // SAFETY: a two-lane store into a two-element array; SSE2.
        unsafe { std::arch::x86_64::_mm_storeu_pd(out.as_mut_ptr(), self.0) };
        out
    }
    #[inline(always)]
    fn load(v: &[f64; 2]) -> P2 {
        // SAFETY: a two-lane load from a two-element array; SSE2.
        P2(unsafe { std::arch::x86_64::_mm_loadu_pd(v.as_ptr()) })
    }
    #[inline(always)]
    fn kept(v: &Kept) -> P2 {
        // SAFETY: an aligned two-lane load from a 16-byte aligned pair; SSE2.
        P2(unsafe { std::arch::x86_64::_mm_load_pd(v.0.as_ptr()) })
    }
    #[inline(always)]
    fn store(self, v: &mut [f64; 2]) {
        // SAFETY: a two-lane store into a two-element array; SSE2.
        unsafe { std::arch::x86_64::_mm_storeu_pd(v.as_mut_ptr(), self.0) }
    }
    #[inline(always)]
    fn keep(self, v: &mut Kept) {
        // SAFETY: an aligned two-lane store into a 16-byte aligned pair; SSE2.
        unsafe { std::arch::x86_64::_mm_store_pd(v.0.as_mut_ptr(), self.0) }
    }
    #[inline(always)]
    fn mul(self, o: P2) -> P2 {
        // SAFETY: SSE2.
        P2(unsafe { std::arch::x86_64::_mm_mul_pd(self.0, o.0) })
    }
    #[inline(always)]
    fn sub(self, o: P2) -> P2 {
        // SAFETY: SSE2.
        P2(unsafe { std::arch::x86_64::_mm_sub_pd(self.0, o.0) })
    }
    /// [self₀, o₁].
    #[inline(always)]
    fn first_second(self, o: P2) -> P2 {
        // SAFETY: SSE2.
        P2(unsafe { std::arch::x86_64::_mm_shuffle_pd::<0b10>(self.0, o.0) })
    }
    /// [self₁, o₀].
    #[inline(always)]
    fn second_first(self, o: P2) -> P2 {
        // SAFETY: SSE2.
        P2(unsafe { std::arch::x86_64::_mm_shuffle_pd::<0b01>(self.0, o.0) })
    }
    /// [self₀, o₀].
    #[inline(always)]
    fn firsts(self, o: P2) -> P2 {
        // SAFETY: SSE2.
        P2(unsafe { std::arch::x86_64::_mm_unpacklo_pd(self.0, o.0) })
    }
    /// [self₁, o₁].
    #[inline(always)]
    fn seconds(self, o: P2) -> P2 {
        // SAFETY: SSE2.
        P2(unsafe { std::arch::x86_64::_mm_unpackhi_pd(self.0, o.0) })
    }
}

#[cfg(not(target_arch = "x86_64"))]
impl P2 {
    #[inline(always)]
    fn new(top: f64, bottom: f64) -> P2 {
        P2([top, bottom])
    }
    #[inline(always)]
    fn lanes(self) -> [f64; 2] {
        self.0
    }
    #[inline(always)]
    fn load(v: &[f64; 2]) -> P2 {
        P2(*v)
    }
    #[inline(always)]
    fn kept(v: &Kept) -> P2 {
        P2(v.0)
    }
    #[inline(always)]
    fn store(self, v: &mut [f64; 2]) {
        *v = self.0;
    }
    #[inline(always)]
    fn keep(self, v: &mut Kept) {
        v.0 = self.0;
    }
    #[inline(always)]
    fn mul(self, o: P2) -> P2 {
        P2([self.0[0] * o.0[0], self.0[1] * o.0[1]])
    }
    #[inline(always)]
    fn sub(self, o: P2) -> P2 {
        P2([self.0[0] - o.0[0], self.0[1] - o.0[1]])
    }
    #[inline(always)]
    fn first_second(self, o: P2) -> P2 {
        P2([self.0[0], o.0[1]])
    }
    #[inline(always)]
    fn second_first(self, o: P2) -> P2 {
        P2([self.0[1], o.0[0]])
    }
    #[inline(always)]
    fn firsts(self, o: P2) -> P2 {
        P2([self.0[0], o.0[0]])
    }
    #[inline(always)]
    fn seconds(self, o: P2) -> P2 {
        P2([self.0[1], o.0[1]])
    }
}

/// Two lanes kept in memory, aligned for the vector loads.
#[derive(Debug, Clone, Copy, Default)]
#[repr(C, align(16))]
struct Kept([f64; 2]);

/// Rows per link of the chains.
const BLOCK: usize = 4;

/// A block's four two-lane multipliers.
#[inline(always)]
fn quad(v: &[Kept]) -> [P2; 4] {
    [
        P2::kept(&v[0]),
        P2::kept(&v[1]),
        P2::kept(&v[2]),
        P2::kept(&v[3]),
    ]
}

/// One block of the substitution: from the z of its four visits `c` (both chains), the
/// multipliers and the values `v` before it, the x of its rows, written to the top chain's
/// rows `xt` (descending: the block's first visit last in memory) and the bottom chain's
/// `xb`; returns the last x of both chains.
#[inline(always)]
fn substitute_block(
    c: [P2; 4],
    l: [P2; 4],
    mu: [P2; 4],
    v: P2,
    xt: &mut [f64],
    xb: &mut [f64],
) -> P2 {
    let a0 = c[0];
    let a1 = c[1].sub(l[1].mul(a0));
    let a2 = c[2].sub(l[2].mul(a1));
    let a3 = c[3].sub(l[3].mul(a2));
    let v0 = a0.sub(mu[0].mul(v));
    let v1 = a1.sub(mu[1].mul(v));
    let v2 = a2.sub(mu[2].mul(v));
    let v3 = a3.sub(mu[3].mul(v));
    v1.firsts(v0).store(two_mut(xt, 2));
    v3.firsts(v2).store(two_mut(xt, 0));
    v0.seconds(v1).store(two_mut(xb, 0));
    v2.seconds(v3).store(two_mut(xb, 2));
    v3
}

/// Two adjacent values of a slice, as a two-element array.
#[inline(always)]
fn two(v: &[f64], at: usize) -> &[f64; 2] {
    v[at..at + 2].try_into().expect("two values")
}

#[inline(always)]
fn two_mut(v: &mut [f64], at: usize) -> &mut [f64; 2] {
    (&mut v[at..at + 2]).try_into().expect("two values")
}

/// The multipliers of one sweep laid out for the two lanes, in the order the sweep visits the
/// rows: entry k holds the top chain's k-th row and the bottom chain's.
#[derive(Debug, Clone, Default)]
struct Lanes {
    /// ℓ (one row's multiplier).
    near: Vec<Kept>,
    /// μ (the block's multiplier of the value before it); ℓ for the rows left over.
    block: Vec<Kept>,
    /// The gain of the right-hand side (forward sweep only).
    gain: Vec<Kept>,
}

impl Lanes {
    fn with_size(n: usize) -> Lanes {
        let half = n / 2 + 1;
        Lanes {
            near: vec![Kept::default(); half],
            block: vec![Kept::default(); half],
            gain: vec![Kept::default(); half],
        }
    }

    /// Fills the first `len` entries from the rows' multipliers (`row(k)` = [top row, bottom
    /// row] of the k-th visit), and forms the block multipliers.
    fn fill(
        &mut self,
        len: usize,
        near: &[f64],
        gain: Option<&[f64]>,
        row: impl Fn(usize) -> [usize; 2],
    ) {
        let full = len / BLOCK * BLOCK;
        for k in 0..len {
            let [t, b] = row(k);
            self.near[k] = Kept([near[t], near[b]]);
            if let Some(g) = gain {
                self.gain[k] = Kept([g[t], g[b]]);
            }
            self.block[k] = if k >= full || k % BLOCK == 0 {
                self.near[k]
            } else {
                let (l, m) = (self.near[k].0, self.block[k - 1].0);
                Kept([-l[0] * m[0], -l[1] * m[1]])
            };
        }
    }
}

/// The kept layout of [`super::Factored::solve_scaled`]: the rows each chain takes in the
/// two-lane sweeps, and their multipliers.
#[derive(Debug, Clone, Default)]
pub(super) struct Chains {
    /// First row of the right-hand side built from the source.
    from: usize,
    /// Rows of each chain in the forward sweep's two-lane part (p − from).
    forward_len: usize,
    /// Rows of each chain in the substitution's two-lane part (p).
    back_len: usize,
    forward: Lanes,
    back: Lanes,
    /// The forward sweep's z of both chains, visit by visit, as the vector lanes hold them:
    /// the substitution, which visits the same pairs of rows in the reverse order, reads them
    /// here without rearranging lanes (and the forward sweep writes no z to `x`).
    pairs: Vec<Kept>,
}

impl Chains {
    pub(super) fn with_size(n: usize) -> Chains {
        Chains {
            from: 0,
            forward_len: 0,
            back_len: 0,
            forward: Lanes::with_size(n),
            back: Lanes::with_size(n),
            pairs: vec![Kept::default(); n / 2 + 1],
        }
    }

    /// No layout: the system is so small that the right-hand side is formed and solved by
    /// the one-row sweeps (`from` past the meeting row).
    pub(super) fn set_formed(&mut self, from: usize) {
        self.from = from;
        self.forward_len = 0;
        self.back_len = 0;
    }

    pub(super) fn from(&self) -> usize {
        self.from
    }

    /// Lays out the factors of an n-row system with meeting row p for a right-hand side built
    /// from row `from` on (`from` ≤ p): `near` and `far` the forward and substitution
    /// multipliers, `gain` the right-hand side's gain over the pivot.
    pub(super) fn lay_out(
        &mut self,
        p: usize,
        from: usize,
        near: &[f64],
        far: &[f64],
        gain: &[f64],
    ) {
        let m = p - from;
        self.from = from;
        self.forward_len = m;
        self.back_len = p;
        // Forward: the top chain from row `from` down, the bottom chain from row p + m up.
        self.forward
            .fill(m, near, Some(gain), |k| [from + k, p + m - k]);
        // Substitution: outwards from the meeting row.
        self.back.fill(p, far, None, |k| [p - 1 - k, p + 1 + k]);
    }

    /// The forward sweep's two-lane part: the top chain's rows `from`…p − 1 and the bottom
    /// chain's rows p + m…p + 1 (m = p − from), with d = gain × `src` and z_top, z_bottom the
    /// values before them; the z go to the pairs kept for [`Chains::substitute`], not to `x`.
    /// Returns the last z of each chain.
    pub(super) fn forward(&mut self, src: &[f64], p: usize, z: [f64; 2]) -> [f64; 2] {
        #[cfg(target_arch = "x86_64")]
        if std::arch::is_x86_feature_detected!("avx") {
            // SAFETY: the processor has just been found to support AVX.
            return unsafe { self.forward_avx(src, p, z) };
        }
        self.forward_kernel(src, p, z)
    }

    /// [`Chains::forward_kernel`] compiled with AVX enabled: the same two-lane operations in
    /// the three-operand (VEX) encoding, which needs no register copies and takes unaligned
    /// memory operands, so fewer instructions; the same bits.
    ///
    /// # Safety
    /// The processor must support AVX.
    #[cfg(target_arch = "x86_64")]
    #[target_feature(enable = "avx")]
    unsafe fn forward_avx(&mut self, src: &[f64], p: usize, z: [f64; 2]) -> [f64; 2] {
        self.forward_kernel(src, p, z)
    }

    #[inline(always)]
    fn forward_kernel(&mut self, src: &[f64], p: usize, z: [f64; 2]) -> [f64; 2] {
        let (from, m) = (self.from, self.forward_len);
        let lanes = &self.forward;
        let (near, block, gain) = (&lanes.near[..m], &lanes.block[..m], &lanes.gain[..m]);
        let pairs = &mut self.pairs[..m];
        let mut z = P2::new(z[0], z[1]);
        let full = m / BLOCK * BLOCK;
        // Top rows from…from + full − 1 ascending, bottom rows p + m…p + m − full + 1
        // descending (the bottom chunks taken from the end, each ascending in memory).
        let top = src[from..from + full].chunks_exact(BLOCK);
        let bottom = src[p + 1 + m - full..p + 1 + m].rchunks_exact(BLOCK);
        let coef = gain[..full]
            .chunks_exact(BLOCK)
            .zip(near[..full].chunks_exact(BLOCK))
            .zip(block[..full].chunks_exact(BLOCK));
        let out = pairs[..full].chunks_exact_mut(BLOCK);
        for (((st, sb), ((g, l), mu)), zs) in top.zip(bottom).zip(coef).zip(out) {
            let (t01, t23) = (P2::load(two(st, 0)), P2::load(two(st, 2)));
            let (b10, b32) = (P2::load(two(sb, 2)), P2::load(two(sb, 0)));
            let c = [
                t01.first_second(b10),
                t01.second_first(b10),
                t23.first_second(b32),
                t23.second_first(b32),
            ];
            let (g, l, mu) = (quad(g), quad(l), quad(mu));
            let a0 = g[0].mul(c[0]);
            let a1 = g[1].mul(c[1]).sub(l[1].mul(a0));
            let a2 = g[2].mul(c[2]).sub(l[2].mul(a1));
            let a3 = g[3].mul(c[3]).sub(l[3].mul(a2));
            let z0 = a0.sub(mu[0].mul(z));
            let z1 = a1.sub(mu[1].mul(z));
            let z2 = a2.sub(mu[2].mul(z));
            z = a3.sub(mu[3].mul(z));
            z0.keep(&mut zs[0]);
            z1.keep(&mut zs[1]);
            z2.keep(&mut zs[2]);
            z.keep(&mut zs[3]);
        }
        for k in full..m {
            let (top, bottom) = (from + k, p + m - k);
            let d = P2::kept(&gain[k]).mul(P2::new(src[top], src[bottom]));
            z = d.sub(P2::kept(&near[k]).mul(z));
            z.keep(&mut pairs[k]);
        }
        z.lanes()
    }

    /// The substitution's two-lane part: x_p given, the top chain's rows p − 1…0 and the
    /// bottom chain's rows p + 1…2p, in place over the z they hold. Returns the last x of
    /// the bottom chain.
    pub(super) fn substitute(&self, x: &mut [f64], p: usize) -> f64 {
        #[cfg(target_arch = "x86_64")]
        if std::arch::is_x86_feature_detected!("avx") {
            // SAFETY: the processor has just been found to support AVX.
            return unsafe { self.substitute_avx(x, p) };
        }
        self.substitute_kernel(x, p)
    }

    /// [`Chains::substitute_kernel`] compiled with AVX enabled (as [`Chains::forward_avx`]).
    ///
    /// # Safety
    /// The processor must support AVX.
    #[cfg(target_arch = "x86_64")]
    #[target_feature(enable = "avx")]
    unsafe fn substitute_avx(&self, x: &mut [f64], p: usize) -> f64 {
        self.substitute_kernel(x, p)
    }

    #[inline(always)]
    fn substitute_kernel(&self, x: &mut [f64], p: usize) -> f64 {
        let len = self.back_len;
        let lanes = &self.back;
        let (near, block) = (&lanes.near[..len], &lanes.block[..len]);
        // The forward sweep's z of visit k of the substitution: pair m − 1 − k while k < m,
        // else the rows the caller swept one at a time, in `x`.
        let m = self.forward_len;
        let pairs = &self.pairs[..m];
        let mut v = P2::new(x[p], x[p]);
        let full = len / BLOCK * BLOCK;
        let kept_blocks = m.min(full) / BLOCK;
        let split = kept_blocks * BLOCK;
        let (x_top, x_bottom) = x.split_at_mut(p);
        // Top rows p − 1…p − full descending (chunks from the end, each ascending in
        // memory), bottom rows p + 1…p + full ascending; the first `split` visits' z in the
        // pairs (pairs m − 1 − k down to m − 4 − k for the block from visit k), the rest's
        // in `x`.
        let (top_rest, top_kept) = x_top[p - full..].split_at_mut(full - split);
        let (bottom_kept, bottom_rest) = x_bottom[1..1 + full].split_at_mut(split);
        let kept = top_kept
            .rchunks_exact_mut(BLOCK)
            .zip(bottom_kept.chunks_exact_mut(BLOCK))
            .zip(near[..split].chunks_exact(BLOCK))
            .zip(block[..split].chunks_exact(BLOCK))
            .zip(pairs[m - split..].rchunks_exact(BLOCK));
        for ((((xt, xb), l), mu), w) in kept {
            let c = [
                P2::kept(&w[3]),
                P2::kept(&w[2]),
                P2::kept(&w[1]),
                P2::kept(&w[0]),
            ];
            v = substitute_block(c, quad(l), quad(mu), v, xt, xb);
        }
        let rest = top_rest
            .rchunks_exact_mut(BLOCK)
            .zip(bottom_rest.chunks_exact_mut(BLOCK))
            .zip(near[split..full].chunks_exact(BLOCK))
            .zip(block[split..full].chunks_exact(BLOCK));
        for (b, (((xt, xb), l), mu)) in rest.enumerate() {
            let k = split + b * BLOCK;
            let (t10, t32) = (P2::load(two(xt, 2)), P2::load(two(xt, 0)));
            let (b01, b23) = (P2::load(two(xb, 0)), P2::load(two(xb, 2)));
            let mut c = [
                t10.second_first(b01),
                t10.first_second(b01),
                t32.second_first(b23),
                t32.first_second(b23),
            ];
            for (j, c) in c.iter_mut().enumerate() {
                if k + j < m {
                    *c = P2::kept(&pairs[m - 1 - k - j]);
                }
            }
            v = substitute_block(c, quad(l), quad(mu), v, xt, xb);
        }
        for (k, l) in near.iter().enumerate().skip(full) {
            let (top, bottom) = (p - 1 - k, p + 1 + k);
            let c = if k < m {
                P2::kept(&pairs[m - 1 - k])
            } else {
                P2::new(x[top], x[bottom])
            };
            v = c.sub(P2::kept(l).mul(v));
            let [xt, xb] = v.lanes();
            x[top] = xt;
            x[bottom] = xb;
        }
        v.lanes()[1]
    }
}
