//! Loader's saddle-point pieces: the Stirling-series error `stirlerr` and the
//! deviance `bd0`, which give Poisson probabilities and the incomplete-gamma
//! prefactor without the cancellation of `k ln μ - μ - ln k!`.
//!
//! Method: C. Loader (2000), "Fast and Accurate Computation of Binomial
//! Probabilities" (the form used by R's `dpois`).

use super::double_word::Dw;
use crate::Real;

/// stirlerr(a) at a = i/2 for i = 1..=30, from `tests/reference/gen_stirling.py` (mpmath, 40 digits).
#[allow(clippy::excessive_precision)]
pub(crate) const STIRLERR_HALVES: [f64; 30] = [
    1.53426409720027357e-01,
    8.10614667953272611e-02,
    5.48141210519176511e-02,
    4.13406959554092970e-02,
    3.31628735199362909e-02,
    2.76779256849983384e-02,
    2.37461636562974962e-02,
    2.07906721037650934e-02,
    1.84884505326731868e-02,
    1.66446911898211931e-02,
    1.51349732219173781e-02,
    1.38761288230707484e-02,
    1.28104652429202274e-02,
    1.18967099458917695e-02,
    1.11045597582069173e-02,
    1.04112652619720962e-02,
    9.79941612615880392e-03,
    9.25546218271273285e-03,
    8.76870013413938616e-03,
    8.33056343336287079e-03,
    7.93411456431401992e-03,
    7.57367548795184059e-03,
    7.24455430132038298e-03,
    6.94284010720952992e-03,
    6.66524703270768206e-03,
    6.40899418800420714e-03,
    6.17171226303945761e-03,
    5.95137011275884750e-03,
    5.74621651301011546e-03,
    5.55473355196280105e-03,
];

/// ln sqrt(2π).
pub(crate) const LN_SQRT_2PI: f64 = 0.918_938_533_204_672_8;

/// `stirlerr(a) = ln Γ(a+1) - [(a + 1/2) ln a - a + ln √(2π)]` for a > 0.
///
/// Table (a ≤ 15, a a multiple of 1/2), the asymptotic series
/// 1/(12a) - 1/(360a³) + 1/(1260a⁵) - 1/(1680a⁷) + 1/(1188a⁹) (a > 15),
/// or the definition through ln Γ (other a ≤ 15).
pub(crate) fn stirlerr<F: Real>(a: F) -> F {
    if a > F::of(15.0) {
        let r = F::ONE / a;
        let r2 = r * r;
        let s = F::of(1.0 / 12.0)
            - r2 * (F::of(1.0 / 360.0)
                - r2 * (F::of(1.0 / 1260.0)
                    - r2 * (F::of(1.0 / 1680.0) - r2 * F::of(1.0 / 1188.0))));
        return s * r;
    }
    let twice = a + a;
    let idx = twice.floor();
    if idx == twice && idx >= F::ONE {
        let i = idx.to_u32_saturating() as usize;
        if let Some(v) = STIRLERR_HALVES.get(i.wrapping_sub(1)) {
            return F::of(*v);
        }
    }
    (a + F::ONE).ln_gamma_abs() - ((a + F::HALF) * a.ln() - a + F::of(LN_SQRT_2PI))
}

/// Loader's deviance `bd0(a, x) = a ln(a/x) + x - a ≥ 0`, for a > 0, x > 0.
///
/// Where |a - x| < 0.6 (a + x) it is summed as
/// `(a-x) v + 2a Σ_{j≥1} v^(2j+1)/(2j+1)` with `v = (a-x)/(a+x)`, so no
/// digits are lost to cancellation; the difference `a - x` is formed first.
/// (Loader switches at 0.1; the series converges like v², so 0.6 costs at
/// most about 35 terms in f64 and keeps f32 accurate across the whole Temme
/// region, 0.3 ≤ x/a ≤ 2.36, where the direct form loses a digit.)
pub(crate) fn bd0<F: Real>(a: F, x: F) -> F {
    bd0_dw(a, x).value()
}

/// [`bd0`] as a double word; for types with `COMPENSATED_DEVIANCE` (f32) the
/// series is summed in double-word arithmetic, so the result carries about
/// twice the type's precision (an f32 exponent near 60 to about 1e-9).
pub(crate) fn bd0_dw<F: Real>(a: F, x: F) -> Dw<F> {
    if !(a + x).is_finite() && a.is_finite() && x.is_finite() {
        // bd0 is homogeneous of degree 1: halve both (exactly) so the sum
        // a + x and the series' 2a stay finite, and double the result.
        let h = bd0_dw(a * F::HALF, x * F::HALF);
        return Dw {
            hi: h.hi * F::TWO,
            lo: h.lo * F::TWO,
        };
    }
    let d = a - x;
    if d.abs() < F::of(0.6) * (a + x) {
        if F::COMPENSATED_DEVIANCE {
            return bd0_series_dw(a, x);
        }
        let v = d / (a + x);
        let v2 = v * v;
        let mut s = d * v;
        let mut ej = (a + a) * v;
        let mut j = F::ONE;
        // |v| < 0.6: each term is at least 2.7x smaller than the previous one.
        for _ in 0..80 {
            ej *= v2;
            j += F::TWO;
            let next = s + ej / j;
            if next == s {
                break;
            }
            s = next;
        }
        Dw::of(s)
    } else {
        // ln(a/x) from the ratio where it is a normal number (one rounding);
        // from the difference of logarithms where the ratio would overflow or
        // underflow (x subnormal, a huge), which only costs digits there.
        let r = a / x;
        let ln_ratio = if r.is_finite() && r >= F::MIN_POSITIVE {
            r.ln()
        } else {
            a.ln() - x.ln()
        };
        Dw::of(a * ln_ratio + x - a)
    }
}

/// The series of [`bd0`] in double-word arithmetic.
fn bd0_series_dw<F: Real>(a: F, x: F) -> Dw<F> {
    let d = Dw::two_sum(a, -x);
    let s = Dw::two_sum(a, x);
    let v = d.div(s);
    let v2 = v.mul(v);
    let mut sum = d.mul(v);
    let mut ej = Dw::of(a + a).mul(v);
    let mut j = F::ONE;
    for _ in 0..80 {
        ej = ej.mul(v2);
        j += F::TWO;
        let term = ej.div(Dw::of(j));
        let next = sum.add(term);
        if term.hi.abs() <= next.hi.abs() * F::EPSILON * F::EPSILON {
            return next;
        }
        sum = next;
    }
    sum
}

/// `ln(x^a e^{-x} / Γ(a+1))` for a > 0, x > 0, as `-stirlerr(a) - bd0(a, x) - ln √(2πa)`.
pub(crate) fn ln_prefactor<F: Real>(a: F, x: F) -> F {
    -stirlerr(a) - bd0(a, x) - F::of(LN_SQRT_2PI) - F::HALF * a.ln()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stirlerr_branches_agree_near_switch() {
        // Series at 15.5 vs. definition through lgamma at 15.25 and 15.75 bracket it.
        let s = stirlerr(15.5_f64);
        let lo = stirlerr(15.75_f64);
        let hi = stirlerr(15.25_f64);
        assert!(lo < s && s < hi);
        // 1/(12 a) leading term; common practice, no source.
        assert!((stirlerr(1000.0_f64) - (1.0 / 12000.0 - 1.0 / 360e9)).abs() < 1e-17);
    }

    #[test]
    fn stirlerr_table_matches_definition() {
        for i in 1..=30 {
            let a = i as f64 / 2.0;
            let def = libm::lgamma(a + 1.0) - ((a + 0.5) * libm::log(a) - a + LN_SQRT_2PI);
            assert!((stirlerr(a) - def).abs() < 1e-14, "a = {a}");
        }
    }

    #[test]
    fn bd0_is_nonnegative_and_zero_at_equality() {
        assert_eq!(bd0(10.0_f64, 10.0), 0.0);
        assert!(bd0(10.0_f64, 10.5) > 0.0);
        assert!(bd0(1e7_f64, 1e7 + 1.0) > 0.0);
        // Series and direct forms agree where both are accurate.
        let a = 10.9_f64;
        let x = 3.1_f64;
        let direct = a * libm::log(a / x) + x - a;
        assert!((bd0(a, x) - direct).abs() < 1e-14);
    }
}
