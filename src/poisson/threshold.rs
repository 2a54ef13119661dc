//! Count thresholds: the alarm threshold (smallest n with P(N ≥ n) ≤ α) and
//! the fault threshold (largest n with P(N ≤ n) ≤ α).
//!
//! Method: a start from the two-term Cornish–Fisher expansion of the Poisson
//! quantile (Abramowitz & Stegun 26.2.49-style; the rule used for R's
//! `qpois` start), galloping from it to a bracket, then integer bisection on
//! the log tail. The number of tail evaluations grows like log μ (about 6–20
//! for μ from 1e-9 to 1e8), each of O(1) cost.

use super::check_mean;
use super::tail::{Prob, at_least, at_most};
use crate::error::{Error, Param, check_open_unit};
use crate::math::normal_upper_quantile_rough;
use crate::search::first_accepted;
use crate::Real;

/// A count threshold with the tail probability it achieves.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CountThreshold<F> {
    /// The threshold count n.
    pub counts: u32,
    /// The tail at n: P(N ≥ n) for an alarm threshold, P(N ≤ n) for a fault
    /// threshold (the achieved false-alarm probability per check, ≤ α).
    pub tail: Prob<F>,
}

/// Start value and first stride for the search: the Cornish–Fisher quantile
/// μ + √μ (z + (z² - 1)/(6√μ)) with z the normal quantile for α (sign chosen
/// by the side), and a stride of 2 + √μ/1000 counts.
fn guess<F: Real>(mean: F, alpha: F, upper: bool) -> (u32, u32) {
    let small = if alpha <= F::HALF { alpha } else { F::ONE - alpha };
    let z = normal_upper_quantile_rough(small);
    let z = if (alpha <= F::HALF) == upper { z } else { -z };
    let s = mean.sqrt();
    let q = mean + s * z + (z * z - F::ONE) / F::of(6.0) + F::HALF;
    let q = if q > F::ZERO { q } else { F::ZERO };
    let stride = F::TWO + s / F::of(1000.0);
    (q.floor().to_u32_saturating(), stride.to_u32_saturating())
}

/// The alarm threshold: the smallest n ≥ 1 with P(N ≥ n) ≤ α for a Poisson
/// count N with mean `mean` (alarm when the count reaches n).
///
/// Domain: 0 ≤ mean ≤ [`super::MAX_MEAN`], 0 < α < 1. The result is exact
/// (f64) except where α lies within 1e-9 relative of a tail value P(N ≥ n),
/// where rounding may decide either way; f32: exact except within 1e-3
/// (then off by at most one), for means up to 1e7. Non-decreasing in the mean
/// and non-increasing in α. Cost: about 6–20 tail evaluations of O(1) each.
///
/// ```
/// use countward::poisson::alarm_threshold;
/// // μ = 10, α = 1e-6 → 29 (mpmath; reference/methods §1.4).
/// let t = alarm_threshold(10.0_f64, 1e-6).unwrap();
/// assert_eq!(t.counts, 29);
/// assert!(t.tail.p <= 1e-6);
/// ```
pub fn alarm_threshold<F: Real>(mean: F, alpha: F) -> Result<CountThreshold<F>, Error> {
    let mean = check_mean(mean)?;
    let alpha = check_open_unit(alpha, Param::Alpha)?;
    let ln_alpha = alpha.ln();
    let (g, stride) = guess(mean, alpha, true);
    let n = first_accepted(1, u32::MAX, g.saturating_add(1), stride, |n| {
        Ok::<bool, Error>(at_least(mean, n)?.ln_p <= ln_alpha)
    })?
    // P(N ≥ u32::MAX) ≤ α for every admitted mean; a None is a defect.
    .ok_or(Error::NoConvergence)?;
    Ok(CountThreshold { counts: n, tail: at_least(mean, n)? })
}

/// The fault threshold: the largest n with P(N ≤ n) ≤ α (fault when the
/// count is at most n), or `None` when even P(N = 0) = e^{-μ} exceeds α, so
/// that no count is improbable enough.
///
/// Domain, accuracy and cost as [`alarm_threshold`]; non-decreasing in the
/// mean and in α.
///
/// ```
/// use countward::poisson::fault_threshold;
/// // A dead-detector check with 1000 counts expected per interval:
/// let t = fault_threshold(1000.0_f64, 1e-4).unwrap().unwrap();
/// assert!(t.tail.p <= 1e-4);
/// assert!(countward::poisson::at_most(1000.0_f64, t.counts + 1).unwrap().p > 1e-4);
/// // A mean of 3 can never give a fault at α = 1e-3: P(N = 0) = 0.0498.
/// assert!(fault_threshold(3.0_f64, 1e-3).unwrap().is_none());
/// ```
pub fn fault_threshold<F: Real>(mean: F, alpha: F) -> Result<Option<CountThreshold<F>>, Error> {
    let mean = check_mean(mean)?;
    let alpha = check_open_unit(alpha, Param::Alpha)?;
    let ln_alpha = alpha.ln();
    let (g, stride) = guess(mean, alpha, false);
    // First n whose lower tail exceeds α; the threshold is the count before it.
    let first_over = first_accepted(0, u32::MAX, g, stride, |n| {
        Ok::<bool, Error>(at_most(mean, n)?.ln_p > ln_alpha)
    })?
    .ok_or(Error::NoConvergence)?;
    match first_over.checked_sub(1) {
        None => Ok(None),
        Some(n) => Ok(Some(CountThreshold { counts: n, tail: at_most(mean, n)? })),
    }
}
