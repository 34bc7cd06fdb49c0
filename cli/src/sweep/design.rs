//! The sample matrix of a sampled sweep: N rows (scenarios) by one column per input, each
//! entry a probability u in (0, 1) that the input's quantile function turns into a value.
//! The matrix is a pure function of (design, N, seed, number of inputs): every shard
//! draws the whole matrix (microseconds for N ≤ 100 000) and runs its own rows, so a shard
//! holds exactly the rows an unsharded run would.
//!
//! Generator: PCG-XSL-RR 128/64 (M. E. O'Neill, "PCG: A family of simple fast
//! space-efficient statistically good algorithms for random number generation",
//! HMC-CS-2014-0905, 2014), as `rand_pcg::Pcg64` of the pinned rand_pcg 0.9.0. Column j
//! uses its own stream: `Pcg64::new(seed, j)` (state = seed, stream = j as 128-bit
//! integers), so adding an input does not change the columns before it.
//!
//! * A uniform draw is u = (⌊x / 2¹¹⌋ + ½) · 2⁻⁵³ for the next 64-bit output x: one of
//!   2⁵³ equally likely midpoints, never 0 or 1.
//! * `random`: `u[i][j]` is the i-th draw of column j's stream.
//! * `lhs` (Latin hypercube; M. D. McKay, R. J. Beckman, W. J. Conover, Technometrics
//!   21(2), 239–245, 1979): column j first draws N jitters v_i, then a permutation π of
//!   0…N−1 by Fisher–Yates (Knuth, TAOCP vol. 2, §3.4.2, algorithm P) from the same
//!   stream; `u[i][j]` = (π(i) + v_i)/N, so each of the N strata [k/N, (k+1)/N) holds
//!   exactly one row. A whole number below n is drawn by rejection from the 64-bit
//!   output (no modulo bias).

use rand_core::RngCore;
use rand_pcg::Pcg64;

/// How the sample is drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Design {
    /// Independent uniform draws.
    Random,
    /// Latin hypercube.
    Lhs,
}

impl Design {
    /// Parses `random` or `lhs`.
    pub fn parse(text: &str) -> Option<Design> {
        match text.trim() {
            "random" => Some(Design::Random),
            "lhs" => Some(Design::Lhs),
            _ => None,
        }
    }

    /// The design's name as the command line and the table write it.
    pub fn name(self) -> &'static str {
        match self {
            Design::Random => "random",
            Design::Lhs => "lhs",
        }
    }
}

/// A uniform draw in (0, 1): the midpoint of one of 2⁵³ equal cells.
fn unit(rng: &mut Pcg64) -> f64 {
    ((rng.next_u64() >> 11) as f64 + 0.5) * (1.0 / (1u64 << 53) as f64)
}

/// A whole number in 0..n (n ≥ 1), without bias: outputs in the incomplete last block of
/// n are rejected.
fn below(rng: &mut Pcg64, n: u64) -> u64 {
    // 2^64 mod n, computed without overflow.
    let rem = (u64::MAX % n + 1) % n;
    loop {
        let x = rng.next_u64();
        if rem == 0 || x < u64::MAX - rem + 1 {
            return x % n;
        }
    }
}

/// Column `j` of the matrix: N probabilities.
pub fn column(design: Design, n: usize, seed: u64, j: usize) -> Vec<f64> {
    let mut rng = Pcg64::new(u128::from(seed), j as u128);
    let draws: Vec<f64> = (0..n).map(|_| unit(&mut rng)).collect();
    match design {
        Design::Random => draws,
        Design::Lhs => {
            let mut perm: Vec<usize> = (0..n).collect();
            for i in (1..n).rev() {
                let k = below(&mut rng, i as u64 + 1) as usize;
                perm.swap(i, k);
            }
            draws
                .iter()
                .zip(&perm)
                .map(|(v, &p)| (p as f64 + v) / n as f64)
                .collect()
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_stratum_of_every_column_holds_one_sample() {
        // The defining property of a Latin hypercube (McKay, Beckman & Conover 1979, §2).
        for n in [1, 2, 7, 100, 1000] {
            for j in 0..4 {
                let c = column(Design::Lhs, n, 20261204, j);
                let mut seen = vec![0; n];
                for u in &c {
                    assert!(0.0 < *u && *u < 1.0);
                    seen[(u * n as f64).floor() as usize] += 1;
                }
                assert!(seen.iter().all(|&k| k == 1), "n = {n}, column {j}");
            }
        }
    }

    #[test]
    fn a_random_column_is_not_stratified() {
        // Twenty independent uniforms in twenty strata all distinct has probability
        // 20!/20^20 ≈ 2.3e-8 (counting, no source); this seed must not hit it.
        let c = column(Design::Random, 20, 7, 0);
        let mut strata: Vec<usize> = c.iter().map(|u| (u * 20.0) as usize).collect();
        strata.sort_unstable();
        strata.dedup();
        assert!(strata.len() < 20);
    }

    #[test]
    fn the_matrix_is_a_function_of_its_arguments() {
        assert_eq!(column(Design::Lhs, 50, 3, 1), column(Design::Lhs, 50, 3, 1));
        assert_ne!(column(Design::Lhs, 50, 3, 1), column(Design::Lhs, 50, 4, 1));
        assert_ne!(column(Design::Lhs, 50, 3, 1), column(Design::Lhs, 50, 3, 2));
        // The draws themselves are checked against numpy's PCG64 in reference_checks.rs.
    }

    #[test]
    fn bounded_draws_are_in_range_and_cover_it() {
        let mut rng = Pcg64::new(5, 0);
        let mut seen = [0usize; 3];
        for _ in 0..3000 {
            seen[below(&mut rng, 3) as usize] += 1;
        }
        // Each count is Binomial(3000, 1/3): mean 1000, sd 25.8; 6 sd is 155.
        assert!(seen.iter().all(|&k| (845..=1155).contains(&k)), "{seen:?}");
    }
}
