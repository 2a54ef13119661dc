//! Upcrossings of a sliding-window count (exact, for Poisson bins).

use crate::error::{Error, Param, check_open_unit, check_range};
use crate::math::Real;
use crate::poisson::{alarm_threshold, at_least, at_most, pmf};

/// Validates a per-tick mean (0 to 1e8) and a window of at least one bin.
fn check_window<F: Real>(mean_per_tick: F, bins: u32) -> Result<F, Error> {
    if bins == 0 {
        return Err(Error::OutOfRange(Param::Ticks));
    }
    check_range(mean_per_tick, F::ZERO, F::of(1e8), Param::Mean)
}

/// Expected upcrossings per tick of level `threshold` by the count of a
/// sliding window of `bins` ticks, for Poisson counts of mean
/// `mean_per_tick` per tick.
///
/// Method (exact): consecutive window counts share `bins − 1` bins. With
/// `A` their sum (Poisson, mean `(bins − 1)μ`), `X_out` the bin that leaves
/// and `X_in` the bin that enters (independent, mean μ),
/// `P(upcrossing) = Σ_a P(A = a) P(X_out ≤ k − 1 − a) P(X_in ≥ k − a)`,
/// summed in logarithms over the terms that matter (the sum is unimodal; it
/// stops at a relative contribution below 1e-18). This is the rate of
/// alarm *starts* of a detector that checks every tick; the rate of raw
/// threshold exceedances (per-check α) is larger, because exceedances come
/// in clusters.
///
/// Cost: three tail evaluations per term, for the terms up to the peak and
/// its decay (tens to a few hundred at practical settings; at most
/// `threshold`); host or cold path.
///
/// ```
/// use countward::plan::sliding_upcrossings_per_tick;
/// // A one-bin "window" is a tumbling test: P(X_prev < k) P(X ≥ k).
/// let r = sliding_upcrossings_per_tick(2.0_f64, 1, 8).unwrap();
/// let p = countward::poisson::at_least(2.0_f64, 8).unwrap().p;
/// assert!((r - (1.0 - p) * p).abs() < 1e-15);
/// ```
pub fn sliding_upcrossings_per_tick<F: Real>(
    mean_per_tick: F,
    bins: u32,
    threshold: u32,
) -> Result<F, Error> {
    let mu = check_window(mean_per_tick, bins)?;
    if threshold == 0 || mu == F::ZERO {
        return Ok(F::ZERO);
    }
    let shared = mu * F::of_u32(bins - 1);
    let k = threshold;
    // Term for j = k − a ≥ 1 entering counts needed.
    let ln_term = |j: u32| -> Result<F, Error> {
        let a = k - j;
        let ln_a = if bins == 1 {
            if a == 0 { F::ZERO } else { -F::INFINITY }
        } else {
            pmf(shared, a)?.ln_p
        };
        Ok(ln_a + at_most(mu, j - 1)?.ln_p + at_least(mu, j)?.ln_p)
    };
    let mut max_ln = -F::INFINITY;
    let mut sum = F::ZERO; // Σ exp(ln_term − max_ln)
    let cutoff = F::of(-41.4465); // ln 1e-18
    let mut j = 1;
    loop {
        let t = ln_term(j)?;
        if t > max_ln {
            if max_ln > -F::INFINITY {
                sum *= (max_ln - t).exp();
            } else {
                sum = F::ZERO;
            }
            max_ln = t;
        }
        if t > -F::INFINITY {
            sum += (t - max_ln).exp();
        }
        let decreasing_past_peak = max_ln > -F::INFINITY && t < max_ln + cutoff;
        if j == k || (decreasing_past_peak && j > 1) {
            break;
        }
        j += 1;
    }
    if max_ln == -F::INFINITY {
        return Ok(F::ZERO);
    }
    Ok(sum * max_ln.exp())
}

/// The smallest window threshold above the window mean whose upcrossing
/// rate is at most `max_per_tick` (e.g. one per day at 1 s ticks: `1/86400`).
///
/// An alarm threshold is a count *above* the background: levels below the
/// window mean are crossed rarely too (the count seldom dips under them), so
/// the search is confined to `k > bins · mean_per_tick`, where the upcrossing
/// rate falls as `k` rises. It starts from the per-check alarm threshold at
/// α = `max_per_tick` (whose upcrossing rate is below its exceedance
/// probability, so it qualifies) and bisects between it and the mean; the
/// answer's rate is checked against the target before it is returned.
///
/// ```
/// use countward::plan::{sliding_threshold, sliding_upcrossings_per_tick};
/// // 0.5 cps background, 1 s ticks, a 10 s window, at most one alarm start per day:
/// let k = sliding_threshold(0.5_f64, 10, 1.0 / 86_400.0).unwrap();
/// assert!(sliding_upcrossings_per_tick(0.5_f64, 10, k).unwrap() <= 1.0 / 86_400.0);
/// assert!(sliding_upcrossings_per_tick(0.5_f64, 10, k - 1).unwrap() > 1.0 / 86_400.0);
/// // A window mean of 1000 counts: the threshold lies above it.
/// let k = sliding_threshold(100.0_f64, 10, 1.0 / 86_400.0).unwrap();
/// assert!(k > 1000);
/// ```
pub fn sliding_threshold<F: Real>(
    mean_per_tick: F,
    bins: u32,
    max_per_tick: F,
) -> Result<u32, Error> {
    let mu = check_window(mean_per_tick, bins)?;
    let target = check_open_unit(max_per_tick, Param::Alpha)?;
    let window_mean = mu * F::of_u32(bins);
    let hi = alarm_threshold(window_mean, target)?.counts;
    // The largest count not above the mean, excluded from the search (a mean
    // beyond u32 has been refused by `alarm_threshold` already; the check
    // keeps the conversion exact whatever that bound becomes).
    let floor_mean = window_mean.floor();
    if floor_mean >= F::of_u32(u32::MAX) {
        return Err(Error::OutOfRange(Param::Mean));
    }
    let mut lo = floor_mean.to_u32_saturating();
    let mut hi = hi.max(lo + 1);
    // Invariant: rate(hi) <= target; every k in (floor(mean), lo] misses it.
    while hi - lo > 1 {
        let mid = lo + (hi - lo) / 2;
        if sliding_upcrossings_per_tick(mu, bins, mid)? <= target {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    if sliding_upcrossings_per_tick(mu, bins, hi)? > target {
        return Err(Error::NoConvergence);
    }
    Ok(hi)
}
