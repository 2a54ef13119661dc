//! Inverses of P(a, x) and Q(a, x) in x.
//!
//! Method: a starting value from the Wilson–Hilferty cube-root normal
//! approximation (Wilson & Hilferty 1931; normal quantile by Abramowitz &
//! Stegun 26.2.23), or from the leading terms of P ≈ x^a/Γ(a+1) and
//! Q ≈ x^{a-1}e^{-x}/Γ(a) in the far tails, then Newton's method on the
//! logarithm of the *smaller* tail (so the equation stays well conditioned
//! down to 1e-300 and below), safeguarded by a bracket and bisection.

use super::bracket_split;
use super::igamma::{check_shape_arg, tails};
use super::loader::ln_prefactor;
use crate::Real;
use crate::error::{Error, Param};

/// Newton/bisection step bound.
const MAX_STEPS: u32 = 200;

/// Upper-tail standard normal quantile z with P(Z > z) = p, 0 < p ≤ 1/2,
/// from ln p; Abramowitz & Stegun 26.2.23 (|error| < 4.5e-4; coefficients
/// from memory of the handbook). A starting value only: the Newton
/// iteration does not depend on its accuracy.
pub(crate) fn normal_upper_quantile_rough_ln<F: Real>(ln_p: F) -> F {
    let t = (-F::TWO * ln_p).sqrt();
    let num = F::of(2.515517) + t * (F::of(0.802853) + t * F::of(0.010328));
    let den = F::ONE + t * (F::of(1.432788) + t * (F::of(0.189269) + t * F::of(0.001308)));
    t - num / den
}

/// The x with P(a, x) = p (when `lower`) or Q(a, x) = p, for 0 < p < 1.
fn invert<F: Real>(a: F, p: F, lower: bool) -> Result<F, Error> {
    check_shape_arg(a, F::ZERO)?;
    crate::error::check_open_unit(p, Param::Probability)?;
    // Exact for a = 1: P(1, x) = 1 - e^{-x}.
    if a == F::ONE {
        return Ok(if lower { -(-p).ln_1p() } else { -p.ln() });
    }
    // Solve on the smaller side: target tail t = min(p, 1-p) of side `upper_side`.
    let (upper_side, target) = if p <= F::HALF {
        (!lower, p)
    } else {
        (lower, F::ONE - p)
    };
    let ln_target = if p <= F::HALF {
        target.ln()
    } else {
        (-p).ln_1p()
    };

    // The root lies below the smallest positive float: answer 0. On the
    // lower side P(a, tiny) has already reached the target; on the upper
    // side Q(a, tiny) is already down to it (tiny shapes, Q ≈ −a ln x).
    let tiny = F::MIN_POSITIVE * F::EPSILON;
    let at_tiny = tails(a, tiny)?;
    let below_range = if upper_side {
        at_tiny.ln_upper() <= ln_target
    } else {
        at_tiny.ln_lower() >= ln_target
    };
    if below_range {
        return Ok(F::ZERO);
    }
    let mut x = start(a, ln_target, upper_side);
    if x.is_nan() || x < tiny {
        x = tiny;
    }
    let mut lo = F::ZERO;
    let mut hi = F::INFINITY;
    for _ in 0..MAX_STEPS {
        check_shape_arg(a, x)?;
        let t = tails(a, x)?;
        let ln_t = if upper_side {
            t.ln_upper()
        } else {
            t.ln_lower()
        };
        let g = ln_t - ln_target;
        if g == F::ZERO {
            return Ok(x);
        }
        // Tail increasing in x (lower side) or decreasing (upper side).
        let too_far = if upper_side { g < F::ZERO } else { g > F::ZERO };
        if too_far {
            hi = x;
        } else {
            lo = x;
        }
        // d ln T / d ln x = ±a D(a, x) / T (D the prefactor x^a e^{-x}/Γ(a+1)).
        let slope_ln_x = (a.ln() + ln_prefactor(a, x) - ln_t).exp();
        let slope_ln_x = if upper_side { -slope_ln_x } else { slope_ln_x };
        // Newton on x first (quadratic, exact to 4ε relative at the end);
        // where its step leaves the bracket, Newton on ln x (the lower tail
        // is a power of x near 0, so this reaches tiny roots in a step or
        // two); failing both, bisection (geometric while the bracket spans
        // orders of magnitude).
        let newton = x - g * x / slope_ln_x;
        if newton.is_finite() && (newton - x).abs() <= F::of(4.0) * F::EPSILON * x {
            return Ok(newton);
        }
        let log_newton = (x.ln() - g / slope_ln_x).exp();
        let inside = |v: F| v > lo && v < hi && v.is_finite();
        x = if inside(newton) {
            newton
        } else if inside(log_newton) {
            log_newton
        } else if !hi.is_finite() {
            // Grow toward the root; a root past the largest float (shapes
            // near the top of the range) is refused, never returned as ∞.
            if x >= F::MAX * F::HALF {
                if x == F::MAX {
                    return Err(Error::OutOfRange(Param::Probability));
                }
                F::MAX
            } else {
                x + x + F::ONE
            }
        } else {
            // From the smallest positive float up while nothing below is known.
            bracket_split(if lo > tiny { lo } else { tiny }, hi)
        };
        if hi.is_finite() && hi - lo <= F::of(4.0) * F::EPSILON * hi {
            return Ok(x);
        }
    }
    Err(Error::NoConvergence)
}

/// Starting value for the root of (upper_side ? Q : P)(a, x) = t, t ≤ 1/2.
fn start<F: Real>(a: F, ln_t: F, upper_side: bool) -> F {
    let z = normal_upper_quantile_rough_ln(ln_t);
    let z = if upper_side { z } else { -z };
    let nine_a = F::of(9.0) * a;
    let c = F::ONE - F::ONE / nine_a + z / nine_a.sqrt();
    let wh = a * c * c * c;
    if !upper_side {
        // Far lower tail: P ≈ x^a / Γ(a+1).
        let small = ((ln_t + (a + F::ONE).ln_gamma_abs()) / a).exp();
        if wh.is_nan() || wh <= F::ZERO || small < wh * F::HALF {
            return small;
        }
        return wh;
    }
    if wh > F::ZERO {
        wh
    } else {
        // Upper tail with a tiny shape: Q ≈ e^{-x}.
        -ln_t
    }
}

/// The x with P(a, x) = p: the p-quantile of the unit-rate Gamma(a) law.
///
/// Domain: a > 0 finite, 0 < p < 1. Accuracy: the root of the library's own
/// P to within 4ε relative (so within the accuracy of [`super::gamma_p`]
/// divided by the elasticity `|d ln P/d ln x|` there, which is about `a` for
/// tiny shapes); 0 where the root lies below the smallest positive float
/// (e.g. a = 1e-3, p = 0.1: x ≈ 1e-1000). Cost: typically 3–6 evaluations of P.
///
/// ```
/// use countward::math::gamma_p_inv;
/// // 0.5·χ²₀.₀₂₅(20) = 4.795389 (Garwood lower 95% limit for 10 counts; computed: mpmath).
/// let x = gamma_p_inv(10.0_f64, 0.025).unwrap();
/// assert!((x - 4.795389).abs() < 1e-6);
/// ```
pub fn gamma_p_inv<F: Real>(a: F, p: F) -> Result<F, Error> {
    invert(a, p, true)
}

/// The x with Q(a, x) = q.
///
/// Domain, accuracy and cost as [`gamma_p_inv`].
///
/// ```
/// use countward::math::gamma_q_inv;
/// // Q(1, x) = e^{-x}: the one-sided 95% upper limit for zero counts is -ln 0.05.
/// let x = gamma_q_inv(1.0_f64, 0.05).unwrap();
/// assert!((x - 2.995732273553991).abs() < 1e-14);
/// ```
pub fn gamma_q_inv<F: Real>(a: F, q: F) -> Result<F, Error> {
    invert(a, q, false)
}
