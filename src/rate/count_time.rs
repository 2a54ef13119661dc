//! Time to count: the rate from the time the last events took.

use super::{RateReading, check_tick_s};
use crate::error::{Error, Param, check_open_unit};
use crate::math::{Real, gamma_p_inv};
use crate::ticks::Ticks;

/// The instants of the last `N` events in a ring; the rate follows from the
/// time spanned by their `n = N − 1` gaps (fewer until the ring fills).
///
/// For a Poisson stream the span `T` of `n` gaps is Gamma(n, λ), so
/// * `(n − 1)/T` is the unbiased estimator of λ (the plain `n/T` is biased
///   high by `n/(n − 1)`: 11% at n = 10);
/// * its standard deviation is `λ/√(n − 2)` (relative `1/√(n − 2)`), for n ≥ 3;
/// * the exact interval at level L is `[P⁻¹(n, (1−L)/2), P⁻¹(n, (1+L)/2)] / T`
///   with P⁻¹ the inverse regularized incomplete gamma function.
///
/// This is the estimator for very low rates (a few counts per minute),
/// where a window of fixed length holds too few counts; its precision is
/// constant, its response time is the time of `N − 1` gaps. Time stamps
/// have the resolution of one tick; a span of 0 ticks (all events in one
/// tick) reads as 1 tick. Readings need `n ≥ 3`, otherwise `None`.
///
/// Cost: O(1) per event. Memory: `4 N + 8` bytes on 32-bit targets.
///
/// ```
/// use countward::rate::TimeToCount;
/// use countward::Ticks;
/// let mut t = TimeToCount::<11>::new();
/// for i in 0..11 {
///     t.record(Ticks(i * 6)); // one event every 6 ticks
/// }
/// // 10 gaps in 60 ticks of 1 s: unbiased estimate 9/60 cps, relative SD 1/sqrt(8).
/// let r = t.reading(1.0_f64).unwrap().unwrap();
/// assert!((r.rate_cps - 0.15).abs() < 1e-12);
/// assert!((r.relative_uncertainty().unwrap() - 0.35355339).abs() < 1e-8);
/// ```
#[derive(Debug, Clone)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct TimeToCount<const N: usize> {
    stamps: [Ticks; N],
    head: usize,
    len: usize,
}

impl<const N: usize> Default for TimeToCount<N> {
    fn default() -> Self {
        Self::new()
    }
}

impl<const N: usize> TimeToCount<N> {
    const CAPACITY_OK: () = assert!(
        N >= 4 && N <= (1 << 24),
        "TimeToCount needs 4..=2^24 stamps"
    );

    /// An empty ring.
    pub const fn new() -> Self {
        let () = Self::CAPACITY_OK;
        TimeToCount {
            stamps: [Ticks(0); N],
            head: 0,
            len: 0,
        }
    }

    /// Records an event at tick `now`.
    pub fn record(&mut self, now: Ticks) {
        if self.len > 0 {
            self.head = if self.head + 1 == N { 0 } else { self.head + 1 };
        }
        self.stamps[self.head] = now;
        self.len = (self.len + 1).min(N);
    }

    /// Gaps between the stored events (`stored events − 1`, at most `N − 1`).
    pub const fn gaps(&self) -> u32 {
        self.len.saturating_sub(1) as u32
    }

    /// Ticks spanned by the stored gaps (at least 1 once there is a gap).
    pub fn span_ticks(&self) -> u32 {
        if self.len < 2 {
            return 0;
        }
        let oldest = (self.head + N + 1 - self.len) % N;
        self.stamps[self.head].since(self.stamps[oldest]).max(1)
    }

    /// The newest event (`None` before the first).
    pub const fn newest(&self) -> Option<Ticks> {
        if self.len == 0 {
            None
        } else {
            Some(self.stamps[self.head])
        }
    }

    /// Unbiased rate `(n − 1)/T` and its standard uncertainty `rate/√(n − 2)`
    /// for a tick of `tick_s` seconds; `None` with fewer than 3 gaps.
    /// [`RateReading::counts`] is `n − 1` and the interval of
    /// [`RateReading::interval_cps`] is then Garwood's for a fixed time; for
    /// the exact preset-count interval use [`TimeToCount::interval_cps`].
    pub fn reading<F: Real>(&self, tick_s: F) -> Result<Option<RateReading<F>>, Error> {
        let tick_s = check_tick_s(tick_s)?;
        let n = self.gaps();
        if n < 3 {
            return Ok(None);
        }
        let seconds = F::of_u32(self.span_ticks()) * tick_s;
        let rate = F::of_u32(n - 1) / seconds;
        Ok(Some(RateReading {
            rate_cps: rate,
            std_uncertainty_cps: rate / F::of_u32(n - 2).sqrt(),
            counts: u64::from(n - 1),
            seconds,
        }))
    }

    /// The exact two-sided interval on the rate at `level` from the span of
    /// the stored gaps (Gamma(n, λ) pivot); `None` with fewer than 3 gaps.
    pub fn interval_cps<F: Real>(&self, tick_s: F, level: F) -> Result<Option<(F, F)>, Error> {
        let tick_s = check_tick_s(tick_s)?;
        check_open_unit(level, Param::Level)?;
        let n = self.gaps();
        if n < 3 {
            return Ok(None);
        }
        let seconds = F::of_u32(self.span_ticks()) * tick_s;
        let tail = (F::ONE - level) * F::HALF;
        let a = F::of_u32(n);
        let lo = gamma_p_inv(a, tail)?;
        let hi = gamma_p_inv(a, F::ONE - tail)?;
        Ok(Some((lo / seconds, hi / seconds)))
    }
}
