//! P(N ≥ k), P(N ≤ k) and the pmf, each with its natural logarithm.

use super::check_mean;
use crate::math::loader::{LN_SQRT_2PI, bd0_dw, stirlerr};
use crate::math::{pmf_by_product, tails};
use crate::{Error, Real};

/// A probability together with its natural logarithm.
///
/// `ln_p` stays meaningful where `p` underflows to 0 (down to about -1e300);
/// `ln_p` is -∞ exactly when the probability is exactly 0.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Prob<F> {
    /// The probability.
    pub p: F,
    /// Its natural logarithm.
    pub ln_p: F,
}

impl<F: Real> Prob<F> {
    fn certain() -> Self {
        Prob {
            p: F::ONE,
            ln_p: F::ZERO,
        }
    }
    fn impossible() -> Self {
        Prob {
            p: F::ZERO,
            ln_p: -F::INFINITY,
        }
    }
}

/// P(N ≥ k) for a Poisson count N with mean `mean`.
///
/// Domain: 0 ≤ mean ≤ [`super::MAX_MEAN`], any k. Method: P(k, μ) from
/// [`crate::math::gamma_p`] (Temme's expansion near the mean, series and
/// continued fraction elsewhere). Accuracy (f64, checked against mpmath at
/// 40 digits for means 1e-9 to 1e8): relative 1e-12 where the probability
/// is ≥ 1e-300; below it `ln_p` within 1e-10 absolute (or 4ε relative when
/// |ln_p| > 1e5). f32: relative 1e-5 where ≥ 1e-30, for means up to 1e7 and
/// k < 2^24. Cost: O(1) in μ and k.
///
/// ```
/// use countward::poisson::at_least;
/// // P(N ≥ 5 | μ = 1) = 0.0036598468273437123 (computed: mpmath at 40 digits).
/// let t = at_least(1.0_f64, 5).unwrap();
/// assert!((t.p / 0.0036598468273437123 - 1.0).abs() < 1e-12);
/// // Far below the float range, the logarithm remains:
/// // ln P(N ≥ 1000 | μ = 10) = -3619.53304535075 (mpmath, same source).
/// let far = at_least(10.0_f64, 1000).unwrap();
/// assert_eq!(far.p, 0.0);
/// assert!((far.ln_p + 3619.53304535075).abs() < 1e-9);
/// ```
pub fn at_least<F: Real>(mean: F, k: u32) -> Result<Prob<F>, Error> {
    let mean = check_mean(mean)?;
    if k == 0 {
        return Ok(Prob::certain());
    }
    if mean == F::ZERO {
        return Ok(Prob::impossible());
    }
    if k == 1 {
        // P(N ≥ 1) = 1 − e^{−μ}, exactly rounded by expm1.
        let p = -(-mean).exp_m1();
        let ln_p = if p >= F::MIN_POSITIVE {
            p.ln()
        } else {
            mean.ln()
        };
        return Ok(Prob { p, ln_p });
    }
    let t = tails(F::of_u32(k), mean)?;
    Ok(Prob {
        p: t.lower(),
        ln_p: t.ln_lower(),
    })
}

/// P(N ≤ k) for a Poisson count N with mean `mean`.
///
/// Domain, accuracy and cost as [`at_least`] (here Q(k + 1, μ)).
///
/// ```
/// use countward::poisson::at_most;
/// // ln P(N ≤ 10 | μ = 1000) = -946.0168196296328 (computed: mpmath at 40 digits).
/// let t = at_most(1000.0_f64, 10).unwrap();
/// assert!((t.ln_p + 946.0168196296328).abs() < 1e-9);
/// ```
pub fn at_most<F: Real>(mean: F, k: u32) -> Result<Prob<F>, Error> {
    let mean = check_mean(mean)?;
    if mean == F::ZERO {
        return Ok(Prob::certain());
    }
    let t = tails(F::of_u32(k) + F::ONE, mean)?;
    Ok(Prob {
        p: t.upper(),
        ln_p: t.ln_upper(),
    })
}

/// P(N = k), the Poisson probability mass function.
///
/// Method: Loader's saddle-point form `-stirlerr(k) - bd0(k, μ) - ln √(2πk)`,
/// so large means lose no digits. Accuracy: relative 1e-13 (f64), 1e-5 (f32)
/// for means to 1e8; `ln_p` absolute 1e-10. Cost: O(1).
///
/// ```
/// use countward::poisson::pmf;
/// // ln p(10005000; 1e7) = -10.228028023268207 (computed: mpmath at 40 digits).
/// let t = pmf(1e7_f64, 10_005_000).unwrap();
/// assert!((t.ln_p + 10.228028023268207).abs() < 1e-10);
/// ```
pub fn pmf<F: Real>(mean: F, k: u32) -> Result<Prob<F>, Error> {
    let mean = check_mean(mean)?;
    if mean == F::ZERO {
        return Ok(if k == 0 {
            Prob::certain()
        } else {
            Prob::impossible()
        });
    }
    if k == 0 {
        return Ok(Prob {
            p: (-mean).exp(),
            ln_p: -mean,
        });
    }
    Ok(pmf_positive(mean, k))
}

/// p(k; μ) for k ≥ 1, μ > 0.
pub(crate) fn pmf_positive<F: Real>(mean: F, k: u32) -> Prob<F> {
    if let Some((p, ln_p)) = pmf_by_product(k, mean) {
        return Prob { p, ln_p };
    }
    let kf = F::of_u32(k);
    let dev = bd0_dw(kf, mean);
    let rest = stirlerr(kf) + F::of(LN_SQRT_2PI) + F::HALF * kf.ln();
    let ln_p = -dev.hi - (dev.lo + rest);
    // The linear value from the exactly known hi part of the deviance, so it
    // does not inherit the rounding of ln_p.
    let p = if F::COMPENSATED_DEVIANCE {
        (-dev.hi).exp() * (-(dev.lo + rest)).exp()
    } else {
        ln_p.exp()
    };
    // Far out, the two factors are 0 and ∞ (f32, k near u32::MAX): their
    // product is NaN, the probability plainly 0.
    let p = if p.is_finite() { p } else { ln_p.exp() };
    Prob { p, ln_p }
}

/// p(k; μ) alone for k ≥ 1, μ > 0 (one exponential, a square root instead of a logarithm).
pub(crate) fn pmf_linear<F: Real>(mean: F, k: u32) -> F {
    if F::COMPENSATED_DEVIANCE {
        return pmf_positive(mean, k).p;
    }
    let kf = F::of_u32(k);
    let e = stirlerr(kf) + bd0_dw(kf, mean).value() + F::of(LN_SQRT_2PI);
    (-e).exp() / kf.sqrt()
}

/// For a walk's start: P(N ≥ n) and p(n) in linear form, for μ < n, by the
/// series P(N ≥ n) = p(n) Σⱼ Πᵢ₌₁..ⱼ μ/(n+i) (positive terms, ratio < 1).
/// `None` where p(n) is not a normal number or 2μ ≥ n (slow convergence:
/// the search then uses the O(1) tail routines instead).
pub(crate) fn upper_tail_and_pmf<F: Real>(mean: F, n: u32) -> Option<(F, F)> {
    let nf = F::of_u32(n);
    if n == 0 || mean.is_nan() || mean + mean >= nf {
        return None;
    }
    let p = pmf_linear(mean, n);
    if p.is_nan() || p < F::MIN_POSITIVE {
        return None;
    }
    let mut term = F::ONE;
    let mut sum = F::ONE;
    let mut den = nf;
    for _ in 0..4096 {
        den += F::ONE;
        term *= mean / den;
        sum += term;
        if term <= sum * F::EPSILON * F::HALF {
            return Some((p * sum, p));
        }
    }
    None
}

/// For a walk's start: P(N ≤ k) and p(k) in linear form, for k + 1 < μ, by the
/// finite sum P(N ≤ k) = p(k) Σⱼ Πᵢ₌₀..ⱼ₋₁ (k-i)/μ (positive terms, ratio
/// below 1/2); `None` where 2k ≥ μ or p(k) is not a normal number.
pub(crate) fn lower_tail_and_pmf<F: Real>(mean: F, k: u32) -> Option<(F, F)> {
    let kf = F::of_u32(k);
    if mean.is_nan() || kf + kf >= mean {
        return None;
    }
    let p = if k == 0 {
        (-mean).exp()
    } else {
        pmf_linear(mean, k)
    };
    if p.is_nan() || p < F::MIN_POSITIVE {
        return None;
    }
    let mut term = F::ONE;
    let mut sum = F::ONE;
    let mut i = kf;
    for _ in 0..4096 {
        if i < F::ONE {
            return Some((p * sum, p));
        }
        term *= i / mean;
        sum += term;
        i -= F::ONE;
        if term <= sum * F::EPSILON * F::HALF {
            return Some((p * sum, p));
        }
    }
    None
}

/// ln P(N ≥ k) alone (no exponential taken), for searches; mean validated by the caller.
pub(crate) fn ln_at_least_unchecked<F: Real>(mean: F, k: u32) -> Result<F, Error> {
    if k == 0 {
        return Ok(F::ZERO);
    }
    if mean == F::ZERO {
        return Ok(-F::INFINITY);
    }
    Ok(tails(F::of_u32(k), mean)?.ln_lower())
}

/// ln P(N ≤ k) alone, for searches; mean validated by the caller.
pub(crate) fn ln_at_most_unchecked<F: Real>(mean: F, k: u32) -> Result<F, Error> {
    if mean == F::ZERO {
        return Ok(F::ZERO);
    }
    Ok(tails(F::of_u32(k) + F::ONE, mean)?.ln_upper())
}
