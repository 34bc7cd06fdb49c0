//! Fourier coefficients of a periodic prescribed well head, for the harmonic method.
//!
//! Convention (real h of period P, ω = 2π/P):
//!
//! ```text
//! h(t) = Re Σ_{k=0}^{K} Ĥ_k e^{i k ω t}                                         m
//! Ĥ_0 = (1/P) ∫_0^P h dt            (the mean, real)
//! Ĥ_k = (2/P) ∫_0^P h e^{−i k ω t} dt   (k ≥ 1)
//! ```
//! Sine head `h = h₀ + A sin ωt = h₀ + Re{−iA e^{iωt}}`: Ĥ_0 = h₀, Ĥ_1 = −iA, nothing else.
//!
//! Repeated head table: linear between rows, a repeated time is a jump, and the period is
//! the last time. Each segment [t₀, t₁] (values v₀ → v₁) is integrated exactly about its
//! midpoint t_m = (t₀+t₁)/2, half-length d = (t₁−t₀)/2, v_m = (v₀+v₁)/2, x = ω_k d:
//!
//! ```text
//! ∫_{t₀}^{t₁} v(t) e^{−iω_k t} dt = e^{−iω_k t_m} [ 2 d v_m sinc x − i (v₁ − v₀) ω_k d² f(x) ]
//! sinc x = sin x / x,   f(x) = (sin x − x cos x)/x³ = Σ_{n≥1} (−1)^{n+1} 2n x^{2n−2}/(2n+1)!
//! ```
//! (derived: substitute t = t_m + τ and integrate the constant and the τ term over
//! [−d, d]). The series is used for |x| < ½, where the closed form of f cancels; eight
//! terms leave a relative error below 1e-17 there. Jumps, including the wrap from the last
//! row to the first, are zero-length segments and add nothing.

use super::complex::Complex;
use super::HarmonicError;
use crate::drive::{Drive, TableDrive, TableQuantity};

/// Period (s) and coefficients Ĥ_0 … Ĥ_K of the drive's well head (module doc), m.
/// A sine head has one harmonic whatever `harmonics` asks; a table has `harmonics`.
pub(super) fn head_coefficients(
    drive: &Drive,
    harmonics: usize,
) -> Result<(f64, Vec<Complex>), HarmonicError> {
    match drive {
        Drive::SineHead(s) => {
            if s.ramp_cycles != 0.0 {
                return Err(HarmonicError::Ramp {
                    ramp_cycles: s.ramp_cycles,
                });
            }
            let coefficients = vec![Complex::real(s.offset_m), Complex::new(0.0, -s.amplitude_m)];
            Ok((1.0 / s.frequency_hz, coefficients))
        }
        Drive::Table(t) if t.quantity == TableQuantity::Head && t.repeat => {
            let period = *t.times_s.last().expect("a validated table has rows");
            Ok((period, table_coefficients(t, period, harmonics)))
        }
        other => Err(HarmonicError::NotPeriodicHead {
            drive: drive_name(other),
        }),
    }
}

/// What a drive is, for the refusal message.
fn drive_name(drive: &Drive) -> &'static str {
    match drive {
        Drive::SineHead(_) => "a sine head",
        Drive::ConstantRate { .. } => "a constant pumping rate",
        Drive::Slug { .. } => "a slug",
        Drive::Table(t) if t.quantity == TableQuantity::PumpingRate => "a pumping-rate table",
        Drive::Table(_) => "a head table that does not repeat",
        Drive::SurgeBlock(_) => "a surge block (flow-controlled)",
        Drive::Swab(_) => "a swab (flow-controlled)",
        Drive::PumpBackwash(_) => "pump-and-backwash (flow-controlled)",
        Drive::JetPulse(_) => "jet pulses (not supported by the harmonic method)",
        Drive::Schedule(_) => "a schedule of stages",
    }
}

/// Ĥ_0 … Ĥ_K of a repeated piecewise-linear table of period `period` (module doc).
fn table_coefficients(t: &TableDrive, period: f64, harmonics: usize) -> Vec<Complex> {
    let omega = 2.0 * std::f64::consts::PI / period;
    let mut out = vec![Complex::ZERO; harmonics + 1];
    for (w, v) in t.times_s.windows(2).zip(t.values.windows(2)) {
        let (t0, t1, v0, v1) = (w[0], w[1], v[0], v[1]);
        if t1 <= t0 {
            continue; // a jump
        }
        let (tm, d, vm) = (0.5 * (t0 + t1), 0.5 * (t1 - t0), 0.5 * (v0 + v1));
        out[0].re += 2.0 * d * vm;
        for (k, c) in out.iter_mut().enumerate().skip(1) {
            let wk = k as f64 * omega;
            let x = wk * d;
            let inner = Complex::new(2.0 * d * vm * sinc(x), -(v1 - v0) * wk * d * d * f(x));
            *c += Complex::cis(-wk * tm) * inner;
        }
    }
    out[0] = out[0] * (1.0 / period);
    for c in &mut out[1..] {
        *c = *c * (2.0 / period);
    }
    out
}

/// sin x / x (1 at x = 0).
fn sinc(x: f64) -> f64 {
    if x == 0.0 {
        1.0
    } else {
        x.sin() / x
    }
}

/// (sin x − x cos x)/x³, by its series for |x| < ½ (module doc).
fn f(x: f64) -> f64 {
    if x.abs() < 0.5 {
        // term_{n+1} = −term_n x² / (2n (2n + 3)), term_1 = 1/3.
        let x2 = x * x;
        let (mut term, mut sum) = (1.0 / 3.0, 1.0 / 3.0);
        for n in 1..8 {
            let n2 = 2.0 * n as f64;
            term *= -x2 / (n2 * (n2 + 3.0));
            sum += term;
        }
        sum
    } else {
        (x.sin() - x * x.cos()) / (x * x * x)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drive::SineHead;
    use std::f64::consts::PI;

    fn table(times: &[f64], values: &[f64]) -> Drive {
        Drive::Table(TableDrive {
            times_s: times.to_vec(),
            values: values.to_vec(),
            quantity: TableQuantity::Head,
            repeat: true,
        })
    }

    #[test]
    fn f_series_meets_the_closed_form() {
        // At |x| = ½ both forms are accurate (the closed form loses ~3ε/x² ≈ 1e-15).
        for x in [0.5f64, -0.5, 0.49999999] {
            let closed = (x.sin() - x * x.cos()) / (x * x * x);
            let x2 = x * x;
            let series = 1.0 / 3.0 - x2 / 30.0 + x2 * x2 / 840.0 - x2 * x2 * x2 / 45360.0
                + x2 * x2 * x2 * x2 / 3991680.0;
            assert!((f(x) - closed).abs() <= 1e-14, "{x}");
            // Five terms of the series (derived in the module doc) leave ~x¹⁰/2e8 ≈ 5e-12.
            assert!((f(x) - series).abs() <= 1e-11, "{x}");
        }
        assert_eq!(f(0.0), 1.0 / 3.0);
    }

    #[test]
    fn sine_head_coefficients_work() {
        let d = Drive::SineHead(SineHead {
            amplitude_m: 1.5,
            frequency_hz: 0.25,
            offset_m: -0.2,
            ramp_cycles: 0.0,
        });
        let (p, c) = head_coefficients(&d, 5).unwrap();
        assert_eq!(p, 4.0);
        assert_eq!(c, vec![Complex::real(-0.2), Complex::new(0.0, -1.5)]);
    }

    #[test]
    fn square_wave_coefficients_work() {
        // +1 then −1 for half a period each: h = Σ_{k odd} 4/(πk) sin kωt, so
        // Ĥ_k = −4i/(πk) for odd k and 0 for even k (Fourier series of a square wave,
        // standard result, from memory). The segment integrals are exact: round-off only.
        let d = table(&[0.0, 5.0, 5.0, 10.0], &[1.0, 1.0, -1.0, -1.0]);
        let (p, c) = head_coefficients(&d, 9).unwrap();
        assert_eq!(p, 10.0);
        assert!(c[0].abs() <= 1e-15);
        for (k, ck) in c.iter().enumerate().skip(1) {
            let want = if k % 2 == 1 {
                Complex::new(0.0, -4.0 / (PI * k as f64))
            } else {
                Complex::ZERO
            };
            assert!((*ck - want).abs() <= 1e-14, "k = {k}: {ck:?} vs {want:?}");
        }
    }

    #[test]
    fn table_coefficients_match_quadrature_of_the_table() {
        // An uneven table with a jump inside and a jump at the wrap (last value ≠ first),
        // against the midpoint rule on the drive's own value_at with m = 400 000 cells.
        // Every breakpoint is a cell edge, so the rule sees only smooth pieces: its error is
        // (2/P)·P·h²·max|g''|/24 with g = v e^{−iω_k t}, |g''| ≤ ω_12² 1.4 + 2 ω_12 1.7 ≈ 370
        // (ω_12 = 15.1 rad/s), i.e. below 5e-9 for h = P/m, plus summation round-off
        // ~ m ε ≈ 1e-10 (error bound of the midpoint rule; common practice, no source).
        let d = table(
            &[0.0, 0.7, 2.0, 2.0, 3.1, 5.0],
            &[0.2, 1.4, -0.3, 0.9, 0.5, -0.8],
        );
        let Drive::Table(tab) = &d else {
            unreachable!()
        };
        let (p, c) = head_coefficients(&d, 12).unwrap();
        let m = 400_000;
        let h = p / m as f64;
        let mut want = vec![Complex::ZERO; 13];
        for i in 0..m {
            let t = (i as f64 + 0.5) * h;
            let v = tab.value_at(t);
            want[0].re += v * h / p;
            for (k, w) in want.iter_mut().enumerate().skip(1) {
                *w += Complex::cis(-2.0 * PI * k as f64 * t / p) * (2.0 * v * h / p);
            }
        }
        for k in 0..=12 {
            assert!(
                (c[k] - want[k]).abs() <= 1e-8,
                "k = {k}: {:?} vs {:?}",
                c[k],
                want[k]
            );
        }
    }

    #[test]
    fn head_coefficients_captures_errors() {
        let ramp = Drive::SineHead(SineHead {
            amplitude_m: 1.0,
            frequency_hz: 1.0,
            offset_m: 0.0,
            ramp_cycles: 2.0,
        });
        assert_eq!(
            head_coefficients(&ramp, 1).unwrap_err().to_string(),
            "the harmonic method computes the periodic steady state directly, with no start-up: \
             a sine head with a ramp (2 cycles) is refused; set the ramp to 0 cycles"
        );
        let once = Drive::Table(TableDrive {
            times_s: vec![0.0, 1.0],
            values: vec![0.0, 1.0],
            quantity: TableQuantity::Head,
            repeat: false,
        });
        assert_eq!(
            head_coefficients(&once, 1).unwrap_err().to_string(),
            "the harmonic method needs a periodic prescribed well head (a sine head, or a head \
             table that repeats); the drive is a head table that does not repeat"
        );
        let rate = Drive::ConstantRate {
            pumping_rate_m3_s: 0.01,
        };
        assert!(head_coefficients(&rate, 1)
            .unwrap_err()
            .to_string()
            .ends_with("the drive is a constant pumping rate"));
    }
}
