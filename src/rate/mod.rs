//! Streaming rate estimators in fixed memory.
//!
//! Every estimator here takes counts (or event instants) and ticks as
//! integers and updates in O(1) integer work per tick or per event; only the
//! readout ([`RateReading`]) uses floating point, in the caller's choice of
//! `f32` or `f64`.
//!
//! | estimator | memory | suited to |
//! |---|---|---|
//! | [`BinWindow`] | `4 N + 24` bytes | alarms on the counts in the last `N` ticks |
//! | [`SmoothedRate`] | 16 bytes | a steady display, the digital RC ratemeter |
//! | [`AdaptiveRate`] | `4 N + 88` bytes | a display that is smooth at background and follows steps within seconds |
//! | [`TimeToCount`] | `4 N + 8` bytes | very low rates: time taken by the last `N - 1` gaps |
//!
//! (Sizes on 32-bit targets for even `N`, asserted at compile time by the
//! Cortex-M0 check binary `tests/firmware/src/bin/chain.rs`.)

mod adaptive;
mod count_time;
mod smoothed;
mod window;

pub use adaptive::{AdaptiveConfig, AdaptiveRate, StepSeen};
pub use count_time::TimeToCount;
pub use smoothed::{MAX_SHIFT, SmoothedRate};
pub use window::BinWindow;

use crate::error::{Error, Param, check_open_unit, check_range};
use crate::math::Real;
use crate::poisson::exact_limits;

/// A rate estimate with its uncertainty, as read out of an estimator.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct RateReading<F> {
    /// The estimated rate, counts per second.
    pub rate_cps: F,
    /// Its standard uncertainty (one standard deviation), counts per second.
    pub std_uncertainty_cps: F,
    /// The counts the estimate rests on (for a smoothed rate, the equivalent
    /// number of counts of a plain count with the same variance).
    pub counts: u64,
    /// The counting time the estimate rests on, in seconds.
    pub seconds: F,
}

impl<F: Real> RateReading<F> {
    /// A reading of `counts` over `seconds`: rate `counts/seconds`, standard
    /// uncertainty `√counts / seconds` (Poisson).
    pub(crate) fn of_counts(counts: u64, seconds: F) -> Self {
        let c = F::of_u64(counts);
        RateReading {
            rate_cps: c / seconds,
            std_uncertainty_cps: c.sqrt() / seconds,
            counts,
            seconds,
        }
    }

    /// Relative standard uncertainty (`None` when the rate is zero).
    pub fn relative_uncertainty(&self) -> Option<F> {
        if self.rate_cps > F::ZERO {
            Some(self.std_uncertainty_cps / self.rate_cps)
        } else {
            None
        }
    }

    /// Exact (Garwood) two-sided interval on the rate at confidence `level`,
    /// from [`RateReading::counts`] over [`RateReading::seconds`], in counts
    /// per second. For a smoothed rate the counts are equivalent counts, so
    /// the interval is approximate.
    ///
    /// ```
    /// use countward::rate::BinWindow;
    /// use countward::Ticks;
    /// let mut w = BinWindow::<10>::new();
    /// for t in 0..10 {
    ///     w.add(Ticks(t), 1);
    /// }
    /// let r = w.reading(1.0_f64).unwrap().unwrap();
    /// let (lo, hi) = r.interval_cps(0.95).unwrap();
    /// // Garwood 95% limits for 10 counts: 4.795 and 18.39 (over 10 s).
    /// assert!((lo - 0.4795389).abs() < 1e-6 && (hi - 1.839036).abs() < 1e-6);
    /// ```
    pub fn interval_cps(&self, level: F) -> Result<(F, F), Error> {
        check_open_unit(level, Param::Level)?;
        let counts = u32::try_from(self.counts).map_err(|_| Error::OutOfRange(Param::Events))?;
        let limits = exact_limits(counts, level)?;
        Ok((limits.lower / self.seconds, limits.upper / self.seconds))
    }
}

/// Checks a tick period in seconds: finite and positive.
/// Validates a tick length: 1 ns to 1e9 s (about 32 years). Outside, a rate
/// per second would overflow or underflow for counts a u32 can hold, and a
/// reading would be ∞ or 0 instead of an error.
pub(crate) fn check_tick_s<F: Real>(tick_s: F) -> Result<F, Error> {
    check_range(tick_s, F::of(1e-9), F::of(1e9), Param::Seconds)
}
