//! Count thresholds: the alarm threshold (smallest n with P(N ≥ n) ≤ α) and
//! the fault threshold (largest n with P(N ≤ n) ≤ α).
//!
//! Method: a start from the two-term Cornish–Fisher expansion of the Poisson
//! quantile (the start used by R's `qpois`), galloping from it to a bracket,
//! integer bisection on the log tail down to a bracket of at most 64 counts,
//! then a walk across the bracket by the stable recurrences
//! P(N ≥ n-1) = P(N ≥ n) + p(n-1), p(n-1) = p(n)·n/μ (and the mirror image for
//! the lower tail), which needs no further tail evaluation. The number of tail
//! evaluations is O(log μ) and in practice 2–4 (the start is within a few
//! counts for large μ); each is O(1). Where α is so small that linear
//! probabilities would leave the normal float range, the search bisects to
//! the end in log space instead.

use super::check_mean;
use super::tail::{Prob, at_least, at_most, ln_at_least_unchecked, ln_at_most_unchecked, pmf};
use crate::Real;
use crate::error::{Error, Param, check_open_unit};
use crate::math::normal_upper_quantile_rough;
use crate::search::{Bracket, bisect, bracket};

/// Brackets narrower than this are finished by the recurrence walk.
const WALK_WIDTH: i64 = 64;

/// Whether linear probabilities near α stay well inside the normal range.
fn walkable<F: Real>(ln_alpha: F) -> bool {
    ln_alpha > F::MIN_POSITIVE.ln() + F::of(60.0)
}

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
    let small = if alpha <= F::HALF {
        alpha
    } else {
        F::ONE - alpha
    };
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
    let mut accept = |n| Ok::<bool, Error>(ln_at_least_unchecked(mean, n)? <= ln_alpha);
    let b = bracket(1, u32::MAX, g.saturating_add(1), stride, &mut accept)?;
    let walk = walkable(ln_alpha);
    let b = bisect(b, if walk { WALK_WIDTH } else { 1 }, &mut accept)?;
    // P(N ≥ u32::MAX) ≤ α for every admitted mean, so hi is in range.
    if b.hi > i64::from(u32::MAX) {
        return Err(Error::NoConvergence);
    }
    let n = if b.hi - b.lo > 1 {
        walk_down(mean, alpha, b)?
    } else {
        b.hi as u32
    };
    Ok(CountThreshold {
        counts: n,
        tail: at_least(mean, n)?,
    })
}

/// From an accepted `hi` (P(N ≥ hi) ≤ α), steps down while P(N ≥ n - 1) ≤ α.
fn walk_down<F: Real>(mean: F, alpha: F, b: Bracket) -> Result<u32, Error> {
    let mut n = b.hi as u32;
    let mut tail = at_least(mean, n)?.p;
    let mut p = pmf(mean, n)?.p;
    while i64::from(n) - 1 > b.lo {
        p = p * F::of_u32(n) / mean;
        let wider = tail + p;
        if wider > alpha {
            break;
        }
        tail = wider;
        n -= 1;
    }
    Ok(n)
}

/// From a rejected `lo` (P(N ≤ lo) ≤ α), steps up while P(N ≤ n + 1) ≤ α.
fn walk_up<F: Real>(mean: F, alpha: F, b: Bracket) -> Result<u32, Error> {
    let mut n = b.lo as u32;
    let mut tail = at_most(mean, n)?.p;
    let mut p = pmf(mean, n)?.p;
    while i64::from(n) + 1 < b.hi {
        p = p * mean / F::of_u32(n + 1);
        let wider = tail + p;
        if wider > alpha {
            break;
        }
        tail = wider;
        n += 1;
    }
    Ok(n)
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
    let mut accept = |n| Ok::<bool, Error>(ln_at_most_unchecked(mean, n)? > ln_alpha);
    let b = bracket(0, u32::MAX, g, stride, &mut accept)?;
    let walk = walkable(ln_alpha);
    let b = bisect(b, if walk { WALK_WIDTH } else { 1 }, &mut accept)?;
    if b.hi > i64::from(u32::MAX) {
        return Err(Error::NoConvergence);
    }
    let n = if b.hi - b.lo > 1 && b.lo >= 0 {
        walk_up(mean, alpha, b)?
    } else {
        let b = bisect(b, 1, &mut accept)?;
        match (b.hi as u32).checked_sub(1) {
            None => return Ok(None),
            Some(n) => n,
        }
    };
    Ok(Some(CountThreshold {
        counts: n,
        tail: at_most(mean, n)?,
    }))
}
