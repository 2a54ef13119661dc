//! Poisson tails in integer arithmetic: ln P(a, μ) and ln Q(a, μ) for an
//! integer shape a ≥ 1 and a mean μ in UQ32.32, as Q64 logarithms.
//!
//! The same regions as the float tier ([`crate::math`]): Temme's expansion
//! (five terms c₀…c₄, twenty powers of η) for a ≥ 25 and |η| ≤ 1; elsewhere
//! positive-term sums started at Loader's pmf, P = p(a; μ) Σⱼ Πᵢ μ/(a+i) or,
//! since a is an integer, the finite sum Q = p(a-1; μ) Σⱼ Πᵢ (a-1-i)/μ.

use super::erfcx::erfcx_62;
use super::q64::{self, LN_SQRT_2PI, ONE, ONE_62, TWO_PI_62, isqrt, ln};
use crate::math::loader::STIRLERR_HALVES;
use crate::math::temme_table::COEFFS;

/// Temme terms and η powers used here.
const TERMS: usize = 5;
const DEGREE: usize = 20;
/// Shape from which Temme's expansion is used (as in the float tier).
const TEMME_MIN_SHAPE: u64 = 25;

const fn to_q62(v: f64) -> i128 {
    (v * 4_611_686_018_427_387_904.0) as i128
}
const fn to_q64(v: f64) -> i128 {
    (v * 18_446_744_073_709_551_616.0) as i128
}

/// The Temme coefficients in Q62, converted from the generated table at compile time.
const TEMME_62: [[i128; DEGREE]; TERMS] = {
    let mut out = [[0i128; DEGREE]; TERMS];
    let mut k = 0;
    while k < TERMS {
        let mut j = 0;
        while j < DEGREE {
            out[k][j] = to_q62(COEFFS[k][j]);
            j += 1;
        }
        k += 1;
    }
    out
};

/// stirlerr(n) for n = 1..=15 in Q64, converted at compile time.
const STIRLERR_64: [i128; 15] = {
    let mut out = [0i128; 15];
    let mut n = 0;
    while n < 15 {
        out[n] = to_q64(STIRLERR_HALVES[2 * n + 1]);
        n += 1;
    }
    out
};

/// The smaller tail's logarithm, and which tail it is.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Tails {
    ln_small: i128,
    small_is_upper: bool,
}

impl Tails {
    /// ln P(a, μ) in Q64.
    pub(crate) fn ln_lower(&self) -> i128 {
        if self.small_is_upper {
            ln_one_minus(self.ln_small)
        } else {
            self.ln_small
        }
    }
    /// ln Q(a, μ) in Q64.
    pub(crate) fn ln_upper(&self) -> i128 {
        if self.small_is_upper {
            self.ln_small
        } else {
            ln_one_minus(self.ln_small)
        }
    }
}

/// ln(1 - e^l) for l < 0, in Q64.
fn ln_one_minus(l: i128) -> i128 {
    let small = q64::exp(l).min(ONE_62 as u128);
    ln((ONE_62 as u128) - small, 62)
}

/// stirlerr(n) in Q64 for n ≥ 1 (table to 15, then the asymptotic series).
fn stirlerr(n: u64) -> i128 {
    if n <= 15 {
        return STIRLERR_64[(n as usize).saturating_sub(1)];
    }
    let r = ONE / n as i128;
    let r2 = (r * r) >> 64;
    // 1/(12n) - 1/(360n³) + 1/(1260n⁵) - 1/(1680n⁷) + 1/(1188n⁹)
    let mut p = r;
    let mut s = p / 12;
    p = (p * r2) >> 64;
    s -= p / 360;
    p = (p * r2) >> 64;
    s += p / 1260;
    p = (p * r2) >> 64;
    s -= p / 1680;
    p = (p * r2) >> 64;
    s + p / 1188
}

/// Loader's bd0(a, μ) = a ln(a/μ) + μ - a in Q64 (μ in UQ32.32, > 0).
fn bd0(a: u64, mu: u64) -> i128 {
    let a32 = (a as i128) << 32;
    let m = mu as i128;
    let d = a32 - m;
    let s = a32 + m;
    if 10 * d.abs() < s {
        let v = (d << 62) / s; // Q62, |v| < 0.1
        let v2 = (v * v) >> 62;
        let sum = (d * v) >> 30; // Q32·Q62 → Q64
        let two_a = 2 * a as i128;
        // Odd powers of |v|, the sign of v applied to the sum.
        let mut p = v.abs();
        let mut odd: i128 = 0;
        let mut j: i128 = 1;
        loop {
            p = (p * v2) >> 62;
            if p == 0 {
                break;
            }
            j += 2;
            // p < 2^62 fits an i64, so the division is a 64-bit one.
            odd += (two_a * i128::from(p as i64 / j as i64)) << 2;
        }
        if v < 0 { sum - odd } else { sum + odd }
    } else {
        let l = ln(a32 as u128, 32) - ln(m as u128, 32);
        a as i128 * l + (m << 32) - ((a as i128) << 64)
    }
}

/// ln p(k; μ) in Q64.
fn ln_pmf(k: u64, mu: u64) -> i128 {
    if k == 0 {
        return -((mu as i128) << 32);
    }
    -stirlerr(k) - bd0(k, mu) - LN_SQRT_2PI - ln(k as u128, 0) / 2
}

/// P(a, μ) = p(a; μ) Σⱼ Πᵢ₌₁..ⱼ μ/(a+i), for μ < a + 1.
fn lower_series(a: u64, mu: u64) -> i128 {
    let mut term: u128 = 1 << 60;
    let mut sum = term;
    let mut den = a as u128;
    while term != 0 {
        den += 1;
        term = term * mu as u128 / (den << 32);
        sum += term;
    }
    ln_pmf(a, mu) + ln(sum, 60)
}

/// Q(a, μ) = P(N ≤ a-1) = p(a-1; μ) Σⱼ Πᵢ₌₀..ⱼ₋₁ (a-1-i)/μ, for μ > a - 1.
fn upper_sum(a: u64, mu: u64) -> i128 {
    let k = a - 1;
    let mut term: u128 = 1 << 60;
    let mut sum = term;
    let mut i = 0u64;
    while i < k && term != 0 {
        term = term * (((k - i) as u128) << 32) / mu as u128;
        sum += term;
        i += 1;
    }
    ln_pmf(k, mu) + ln(sum, 60)
}

/// Temme: small tail = e^{-bd0} (½ erfcx(y) ± R), y = √bd0, R = Σ c_k(η) a^{-k} / √(2πa).
fn temme(a: u64, mu: u64, dev: i128) -> Tails {
    let upper_small = (mu as i128) > ((a as i128) << 32);
    let eta2 = (2 * dev / a as i128).max(0); // Q64, ≤ 1
    let mut eta = isqrt((eta2 as u128) << 60) as i128; // Q62
    if !upper_small {
        eta = -eta;
    }
    let mut sum: i128 = 0;
    // a^{-k} by multiplying with 1/a in Q64 (one division in all).
    let inv_a = ONE / a as i128;
    let mut scale = ONE;
    for coeffs in TEMME_62.iter() {
        let mut ck: i128 = 0;
        for c in coeffs.iter().rev() {
            ck = ((ck * eta) >> 62) + c;
        }
        sum += (ck * (scale >> 32)) >> 32;
        scale = (scale * inv_a) >> 64;
    }
    let root_2pi_a_40 = isqrt(((TWO_PI_62 * a as i128) as u128) << 18) as i128; // Q40
    let r = (sum << 40) / root_2pi_a_40; // Q62
    let y = isqrt(dev.max(0) as u128); // Q32
    let half = erfcx_62(y) / 2;
    let bracket = if upper_small { half + r } else { half - r };
    Tails {
        ln_small: -dev + ln(bracket.max(1) as u128, 62),
        small_is_upper: upper_small,
    }
}

/// Both tails at integer shape a ≥ 1 and mean μ > 0 (UQ32.32).
pub(crate) fn tails(a: u64, mu: u64) -> Tails {
    if a >= TEMME_MIN_SHAPE {
        let dev = bd0(a, mu);
        if 2 * dev <= (a as i128) << 64 {
            return temme(a, mu, dev);
        }
        if (mu as i128) < ((a as i128) << 32) {
            return Tails {
                ln_small: lower_series(a, mu),
                small_is_upper: false,
            };
        }
        return Tails {
            ln_small: upper_sum(a, mu),
            small_is_upper: true,
        };
    }
    if (mu as i128) < ((a as i128 + 1) << 32) {
        Tails {
            ln_small: lower_series(a, mu),
            small_is_upper: false,
        }
    } else {
        Tails {
            ln_small: upper_sum(a, mu),
            small_is_upper: true,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn q64_to_f64(v: i128) -> f64 {
        v as f64 / 18_446_744_073_709_551_616.0
    }

    #[test]
    fn stirlerr_matches_float_tier() {
        for n in [1u64, 2, 7, 15, 16, 17, 100, 12345, 4_000_000_000] {
            let want = crate::math::loader::stirlerr(n as f64);
            assert!((q64_to_f64(stirlerr(n)) - want).abs() < 1e-17, "n = {n}");
        }
    }

    #[test]
    fn bd0_matches_float_tier() {
        for &(a, mu) in &[
            (10u64, 9.5_f64),
            (100, 3.25),
            (1_000_000, 1_000_500.0),
            (5, 1e-9),
            (25, 80.0),
        ] {
            let raw = (mu * 4_294_967_296.0) as u64;
            let m = raw as f64 / 4_294_967_296.0;
            let want = crate::math::loader::bd0(a as f64, m);
            let got = q64_to_f64(bd0(a, raw));
            assert!(
                (got - want).abs() < 1e-12 * want.max(1.0),
                "bd0({a}, {mu}) = {got}, want {want}"
            );
        }
    }

    #[test]
    fn tails_match_float_tier() {
        for &(a, mu) in &[
            (1u64, 0.5_f64),
            (5, 1.0),
            (30, 10.0),
            (24, 24.5),
            (25, 25.0),
            (150, 100.0),
            (10500, 1e4),
            (10_015_811, 1e7),
            (11, 1000.0),
            (3, 1e-6),
            (1000, 10.0),
            (60, 200.0),
        ] {
            let raw = (mu * 4_294_967_296.0) as u64;
            let m = raw as f64 / 4_294_967_296.0;
            let t = tails(a, raw);
            let want_p = crate::math::ln_gamma_p(a as f64, m).unwrap();
            let want_q = crate::math::ln_gamma_q(a as f64, m).unwrap();
            let (gp, gq) = (q64_to_f64(t.ln_lower()), q64_to_f64(t.ln_upper()));
            assert!(
                (gp - want_p).abs() < 1e-9 * want_p.abs().max(1.0),
                "ln P({a}, {mu}) = {gp}, want {want_p}"
            );
            assert!(
                (gq - want_q).abs() < 1e-9 * want_q.abs().max(1.0),
                "ln Q({a}, {mu}) = {gq}, want {want_q}"
            );
        }
    }
}
