//! Silence (gap) probabilities and thresholds for a Poisson event stream of
//! known rate: the probability of no event, or of fewer than k events, in a
//! time t, and the shortest silence that is improbable at level α.
//!
//! For a rate λ and time t, the number of events is Poisson with mean λt, so
//! P(no event in t) = e^{-λt} and P(fewer than k events in t) = Q(k, λt), the
//! chance that the k-th event (an Erlang(k, λ) time) comes later than t.

use crate::Real;
use crate::error::{Error, Param, check_open_unit, check_range};
use crate::math::{gamma_q_inv, tails};
use crate::poisson::Prob;

fn check_rate<F: Real>(rate_cps: F) -> Result<F, Error> {
    check_range(rate_cps, F::ZERO, F::MAX, Param::RateCps)?;
    if rate_cps == F::ZERO {
        return Err(Error::OutOfRange(Param::RateCps));
    }
    Ok(rate_cps)
}

/// P(fewer than `events` events in `seconds`) at `rate_cps`; `events = 1`
/// gives the probability of complete silence, e^{-λt}.
///
/// Domain: rate > 0, seconds ≥ 0, both finite; `events = 0` gives 0.
/// Accuracy as [`crate::poisson::at_most`].
///
/// ```
/// use countward::gap::silence_probability;
/// // One event a minute, ten minutes of silence: e^{-10}.
/// let p = silence_probability(1.0_f64 / 60.0, 600.0, 1).unwrap();
/// assert!((p.p / (-10.0_f64).exp() - 1.0).abs() < 1e-13);
/// ```
pub fn silence_probability<F: Real>(
    rate_cps: F,
    seconds: F,
    events: u32,
) -> Result<Prob<F>, Error> {
    let rate = check_rate(rate_cps)?;
    let t = check_range(seconds, F::ZERO, F::MAX, Param::Seconds)?;
    if events == 0 {
        return Ok(Prob {
            p: F::ZERO,
            ln_p: -F::INFINITY,
        });
    }
    let mean = rate * t;
    if !mean.is_finite() {
        return Err(Error::OutOfRange(Param::Seconds));
    }
    if events == 1 {
        return Ok(Prob {
            p: (-mean).exp(),
            ln_p: -mean,
        });
    }
    let g = tails(F::of_u32(events), mean)?;
    Ok(Prob {
        p: g.upper(),
        ln_p: g.ln_upper(),
    })
}

/// The silence threshold: the shortest time t (seconds) with
/// P(fewer than `events` events in t) ≤ α at `rate_cps`.
///
/// A watcher that raises "too quiet" when the `events`-th event since the last
/// reset has not arrived after t is wrong with probability α per attempt.
/// t = Q⁻¹(k, α)/λ; for k = 1 exactly -ln α/λ.
///
/// Domain: rate > 0 finite, 0 < α < 1, events ≥ 1; a rate so low that the
/// time overflows the type is out of range. Accuracy: relative 1e-12 (f64),
/// 1e-5 (f32).
///
/// ```
/// use countward::gap::silence_threshold_s;
/// // One event a minute, α = 1e-6: 828.9306 s (exponential law; computed).
/// let t = silence_threshold_s(1.0_f64 / 60.0, 1e-6, 1).unwrap();
/// assert!((t - 828.9306).abs() < 1e-3);
/// // Waiting for the 3rd event: λt* = 19.129168 (gamma quantile, same source).
/// let t3 = silence_threshold_s(1.0_f64, 1e-6, 3).unwrap();
/// assert!((t3 - 19.129168).abs() < 1e-6);
/// ```
pub fn silence_threshold_s<F: Real>(rate_cps: F, alpha: F, events: u32) -> Result<F, Error> {
    let rate = check_rate(rate_cps)?;
    let alpha = check_open_unit(alpha, Param::Alpha)?;
    if events == 0 {
        return Err(Error::OutOfRange(Param::Events));
    }
    let x = gamma_q_inv(F::of_u32(events), alpha)?;
    let t = x / rate;
    // A rate so low that the answer overflows the type is an input error, not ∞.
    if !t.is_finite() {
        return Err(Error::OutOfRange(Param::RateCps));
    }
    Ok(t)
}
