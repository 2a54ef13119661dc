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
use super::tail::{
    Prob, at_least, at_most, ln_at_least_unchecked, ln_at_most_unchecked, lower_tail_and_pmf, pmf,
    upper_tail_and_pmf,
};
use crate::Real;
use crate::error::{Error, Param, check_open_unit};
use crate::math::normal_upper_quantile_rough_ln;
use crate::search::{bisect, bracket};

/// Brackets narrower than this are finished by the recurrence walk.
const WALK_WIDTH: i64 = 64;

/// Whether the linear recurrence walk may finish the search: probabilities
/// near α well inside the normal range, and α at most 1/2. Above 1/2 the
/// tails being summed are near 1, where a linear sum resolves nothing finer
/// than ε while 1 − α may be that small (f32 at α = 0.99999994 accepted a
/// count 1 whose tail is 1 − 2e-12); the search then compares logarithms,
/// whose near-1 side comes from `ln_1p` of the small complement.
fn walkable<F: Real>(alpha: F, ln_alpha: F) -> bool {
    alpha <= F::HALF && ln_alpha > F::MIN_POSITIVE.ln() + F::of(60.0)
}

/// Whether a walk may start from this tail: within e^40 of α, so that it and
/// the pmf terms added to it are normal numbers.
fn near<F: Real>(tail: F, alpha: F) -> bool {
    tail >= alpha * F::of(4.248_354_255_291_589e-18) // e^-40
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
fn guess<F: Real>(mean: F, alpha: F, ln_alpha: F, upper: bool) -> (u32, u32) {
    let ln_small = if alpha <= F::HALF {
        ln_alpha
    } else {
        (-alpha).ln_1p()
    };
    let z = normal_upper_quantile_rough_ln(ln_small);
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
/// // μ = 10, α = 1e-6 → 29 (computed: mpmath at 40 digits).
/// let t = alarm_threshold(10.0_f64, 1e-6).unwrap();
/// assert_eq!(t.counts, 29);
/// assert!(t.tail.p <= 1e-6);
/// ```
pub fn alarm_threshold<F: Real>(mean: F, alpha: F) -> Result<CountThreshold<F>, Error> {
    let mean = check_mean(mean)?;
    let alpha = check_open_unit(alpha, Param::Alpha)?;
    let ln_alpha = alpha.ln();
    let (g, stride) = guess(mean, alpha, ln_alpha, true);
    let start = g.saturating_add(1);
    let walk = walkable(alpha, ln_alpha);
    if walk {
        // Usually the start is accepted and within a few counts of the answer.
        let (tail, p) = start_upper(mean, start)?;
        if tail <= alpha && near(tail, alpha) {
            // Count 0 is always rejected (P(N ≥ 0) = 1), so a walk to 1 is complete.
            let floor = (i64::from(start) - WALK_WIDTH - 1).max(0);
            let w = walk_down(mean, alpha, start, tail, p, floor);
            if w.crossed || floor == 0 {
                return Ok(w.found);
            }
        }
    }
    let mut accept = |n| Ok::<bool, Error>(ln_at_least_unchecked(mean, n)? <= ln_alpha);
    let b = bracket(1, u32::MAX, start, stride, &mut accept)?;
    let b = bisect(b, if walk { WALK_WIDTH } else { 1 }, &mut accept)?;
    // P(N ≥ u32::MAX) ≤ α for every admitted mean, so hi is in range.
    if b.hi > i64::from(u32::MAX) {
        return Err(Error::NoConvergence);
    }
    let hi = b.hi as u32;
    if walk && b.hi - b.lo > 1 {
        let (tail, p) = start_upper(mean, hi)?;
        if near(tail, alpha) {
            // lo is rejected, so the walk ends at the answer either way.
            return Ok(walk_down(mean, alpha, hi, tail, p, b.lo).found);
        }
    }
    let b = bisect(b, 1, &mut accept)?;
    let hi = b.hi as u32;
    Ok(CountThreshold {
        counts: hi,
        tail: at_least(mean, hi)?,
    })
}

/// P(N ≥ n) and p(n) in linear form for a walk's start.
fn start_upper<F: Real>(mean: F, n: u32) -> Result<(F, F), Error> {
    match upper_tail_and_pmf(mean, n) {
        Some(v) => Ok(v),
        None => Ok((at_least(mean, n)?.p, pmf(mean, n)?.p)),
    }
}

/// P(N ≤ k) and p(k) in linear form for a walk's start.
fn start_lower<F: Real>(mean: F, k: u32) -> Result<(F, F), Error> {
    match lower_tail_and_pmf(mean, k) {
        Some(v) => Ok(v),
        None => Ok((at_most(mean, k)?.p, pmf(mean, k)?.p)),
    }
}

/// A walk's end: the last accepted count with its tail, and whether the next
/// step was seen to be rejected (false: the walk hit its bound first).
struct WalkEnd<F> {
    found: CountThreshold<F>,
    crossed: bool,
}

fn end<F: Real>(n: u32, tail: F, crossed: bool) -> WalkEnd<F> {
    WalkEnd {
        found: CountThreshold {
            counts: n,
            tail: Prob {
                p: tail,
                ln_p: tail.ln(),
            },
        },
        crossed,
    }
}

/// From an accepted `hi` (P(N ≥ hi) = `tail` ≤ α) steps down while
/// P(N ≥ n - 1) ≤ α, but not below `floor + 1`.
fn walk_down<F: Real>(mean: F, alpha: F, hi: u32, mut tail: F, mut p: F, floor: i64) -> WalkEnd<F> {
    let mut n = hi;
    while i64::from(n) - 1 > floor {
        p = p * F::of_u32(n) / mean;
        let wider = tail + p;
        if wider > alpha {
            return end(n, tail, true);
        }
        tail = wider;
        n -= 1;
    }
    end(n, tail, false)
}

/// From an accepted `lo` (P(N ≤ lo) = `tail` ≤ α) steps up while
/// P(N ≤ n + 1) ≤ α, but not above `ceiling - 1`.
fn walk_up<F: Real>(mean: F, alpha: F, lo: u32, mut tail: F, mut p: F, ceiling: i64) -> WalkEnd<F> {
    let mut n = lo;
    while i64::from(n) + 1 < ceiling {
        p = p * mean / F::of_u32(n + 1);
        let wider = tail + p;
        if wider > alpha {
            return end(n, tail, true);
        }
        tail = wider;
        n += 1;
    }
    end(n, tail, false)
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
    // No fault threshold at all when P(N = 0) = e^{-μ} > α.
    if -mean > ln_alpha {
        return Ok(None);
    }
    let (g, stride) = guess(mean, alpha, ln_alpha, false);
    let walk = walkable(alpha, ln_alpha);
    if walk {
        let (tail, p) = start_lower(mean, g)?;
        if tail <= alpha && near(tail, alpha) {
            let w = walk_up(mean, alpha, g, tail, p, i64::from(g) + WALK_WIDTH + 1);
            if w.crossed {
                return Ok(Some(w.found));
            }
        }
    }
    // First n whose lower tail exceeds α; the threshold is the count before it.
    let mut accept = |n| Ok::<bool, Error>(ln_at_most_unchecked(mean, n)? > ln_alpha);
    let b = bracket(0, u32::MAX, g, stride, &mut accept)?;
    let b = bisect(b, if walk { WALK_WIDTH } else { 1 }, &mut accept)?;
    if b.hi > i64::from(u32::MAX) {
        return Err(Error::NoConvergence);
    }
    if walk && b.hi - b.lo > 1 && b.lo >= 0 {
        let lo = b.lo as u32;
        let (tail, p) = start_lower(mean, lo)?;
        if near(tail, alpha) {
            // hi is accepted (its tail is over α), so the walk ends at the answer.
            return Ok(Some(walk_up(mean, alpha, lo, tail, p, b.hi).found));
        }
    }
    let b = bisect(b, 1, &mut accept)?;
    match (b.hi as u32).checked_sub(1) {
        None => Ok(None),
        Some(n) => Ok(Some(CountThreshold {
            counts: n,
            tail: at_most(mean, n)?,
        })),
    }
}
