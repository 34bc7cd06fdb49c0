//! Seeded random numbers for the synthetic step tests (tests only).

/// SplitMix64 generator (Steele, Lea and Flood 2014, "Fast splittable pseudorandom number
/// generators", OOPSLA; constants from memory — verify) with Box–Muller normals.
pub struct Rng(u64);

impl Rng {
    pub fn new(seed: u64) -> Self {
        Self(seed)
    }

    fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Uniform in (0, 1).
    fn uniform(&mut self) -> f64 {
        ((self.next_u64() >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }

    /// Standard normal (Box–Muller, one of the pair).
    pub fn normal(&mut self) -> f64 {
        let (u1, u2) = (self.uniform(), self.uniform());
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    }
}

/// Sanity of the generator: mean and variance of 20 000 normals within 4 standard errors
/// of 0 and 1 (common practice, no source).
#[test]
fn steptest_rng_normal_moments() {
    let mut r = Rng::new(1);
    let n = 20_000;
    let x: Vec<f64> = (0..n).map(|_| r.normal()).collect();
    let m = x.iter().sum::<f64>() / n as f64;
    let v = x.iter().map(|a| (a - m).powi(2)).sum::<f64>() / (n - 1) as f64;
    assert!(m.abs() < 4.0 / (n as f64).sqrt(), "mean {m}");
    assert!((v - 1.0).abs() < 4.0 * (2.0 / n as f64).sqrt(), "var {v}");
}
