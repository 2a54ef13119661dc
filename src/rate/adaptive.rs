//! Adaptive averaging: long at a steady rate, restarted by a significant step.

use super::{BinWindow, RateReading, check_tick_s};
use crate::error::{Error, Param};
use crate::fixed::{
    FixedAlpha, FixedMean, MAX_MEAN_RAW as MAX_MEAN_Q32, alarm_threshold, fault_threshold,
};
use crate::math::Real;
use crate::ticks::Ticks;

/// Most bins `trim` drops in one call (bounds the work of a tick).
const MAX_TRIM_PER_TICK: u32 = 4;

/// Settings of an [`AdaptiveRate`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct AdaptiveConfig {
    target_counts: u32,
    min_ticks: u32,
    probe_ticks: u32,
}

impl AdaptiveConfig {
    /// * `target_counts`: the averaging stops growing once it holds this many
    ///   counts, so the relative standard uncertainty settles at
    ///   `1/√target_counts` (e.g. 400 for 5%) wherever the ring is long enough;
    /// * `min_ticks`: the averaging never gets shorter than this (at least
    ///   `4 · probe_ticks`, which keeps a basis for the step test);
    /// * `probe_ticks`: the newest stretch that the step test compares with
    ///   the rest of the average; a real step shows within about this time.
    pub const fn new(target_counts: u32, min_ticks: u32, probe_ticks: u32) -> Result<Self, Error> {
        if target_counts == 0 {
            return Err(Error::OutOfRange(Param::TargetCounts));
        }
        if probe_ticks == 0 || min_ticks < probe_ticks.saturating_mul(4) {
            return Err(Error::OutOfRange(Param::Ticks));
        }
        Ok(AdaptiveConfig {
            target_counts,
            min_ticks,
            probe_ticks,
        })
    }
}

/// What the step test saw on the last call.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum StepSeen {
    /// No significant step (or no step limits yet).
    None,
    /// The probe held significantly more counts than the average predicts: restarted.
    Up,
    /// The probe held significantly fewer counts than the average predicts: restarted.
    Down,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
struct StepLimits {
    basis_q32: u64,
    above: u32,
    below: Option<u32>,
}

/// A rate whose averaging length adapts: it grows while the rate is steady
/// until it holds `target_counts` (constant relative precision, bounded by
/// the ring of `N` ticks and by `min_ticks`), and it restarts from the newest
/// `probe_ticks` when their count is significantly off the average.
///
/// The step test is exact Poisson: with μ the counts the rest of the average
/// predicts for the probe, a step is an up-step when the probe holds at least
/// the alarm threshold of μ at α, a down-step when it holds at most the fault
/// threshold. The thresholds come from the integer tier on the cold path:
/// call [`AdaptiveRate::refresh`] when [`AdaptiveRate::needs_refresh`] says so
/// (after a restart, or when the prediction moved by more than an eighth).
/// Until then no step is tested, and the average keeps growing.
/// At a steady rate the probe fails the test at each tick with probability at
/// most 2α, which only shortens the average; budget α like any alarm.
///
/// Cost per tick: O(1) integer work (amortized: the trimming of the oldest
/// bins is at most one per added bin). Memory: see [the module table](super).
///
/// ```
/// use countward::fixed::FixedAlpha;
/// use countward::rate::{AdaptiveConfig, AdaptiveRate, StepSeen};
/// use countward::Ticks;
/// let config = AdaptiveConfig::new(400, 8, 2).unwrap();
/// let mut r = AdaptiveRate::<600>::new(config);
/// let alpha = FixedAlpha::one_in(100_000).unwrap();
/// for t in 0..300 {
///     r.add(Ticks(t), 2 + (t % 3)); // a steady 3 counts per tick
///     if r.needs_refresh() {
///         r.refresh(alpha).unwrap();
///     }
/// }
/// assert_eq!(r.averaging_ticks(), 133); // the shortest stretch holding 400 counts
/// let mut seen = StepSeen::None;
/// for t in 300..303 {
///     seen = r.add(Ticks(t), 30); // a tenfold step
///     if seen != StepSeen::None { break; }
/// }
/// assert_eq!(seen, StepSeen::Up);
/// assert_eq!(r.averaging_ticks(), 2); // restarted from the probe
/// ```
#[derive(Debug, Clone)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct AdaptiveRate<const N: usize> {
    window: BinWindow<N>,
    config: AdaptiveConfig,
    len: u32,
    segment_sum: u64,
    probe_sum: u64,
    limits: Option<StepLimits>,
    restarts: u32,
}

impl<const N: usize> AdaptiveRate<N> {
    /// An empty estimator. The ring of `N` ticks bounds the longest average.
    pub const fn new(config: AdaptiveConfig) -> Self {
        AdaptiveRate {
            window: BinWindow::new(),
            config,
            len: 0,
            segment_sum: 0,
            probe_sum: 0,
            limits: None,
            restarts: 0,
        }
    }

    /// Adds the `counts` of tick `now` (ticks that passed without a call
    /// count as zero counts; a late tick's counts go to the newest tick) and
    /// runs the step test.
    pub fn add(&mut self, now: Ticks, counts: u32) -> StepSeen {
        let newest = match self.window.newest() {
            None => {
                self.window.add(now, counts);
                self.len = 1;
                self.segment_sum = self.window.sum();
                self.probe_sum = self.window.sum();
                return StepSeen::None;
            }
            Some(t) => t,
        };
        let d = now.offset_from(newest);
        if d <= 0 {
            let before = self.window.sum();
            self.window.add(newest, counts);
            let added = self.window.sum() - before;
            self.segment_sum += added;
            self.probe_sum += added;
        } else {
            let empty = ((d - 1) as u32).min(N as u32);
            for i in 0..empty {
                self.push(newest.plus(i + 1), 0);
            }
            self.push(now, counts);
        }
        self.step_test()
    }

    fn push(&mut self, tick: Ticks, counts: u32) {
        let probe = self.config.probe_ticks as usize;
        if self.window.filled_ticks() as usize >= probe {
            self.probe_sum -= u64::from(self.window.bin_ago(probe - 1));
        }
        if self.len as usize == N {
            self.segment_sum -= u64::from(self.window.bin_ago(N - 1));
            self.len -= 1;
        }
        // The new bin starts empty, so all of `counts` lands in it.
        self.window.add(tick, counts);
        self.len += 1;
        self.segment_sum += u64::from(counts);
        self.probe_sum += u64::from(counts);
        self.trim();
    }

    /// Drops the oldest bins while the rest still hold the target count; at
    /// most [`MAX_TRIM_PER_TICK`] bins per call, so a tick's work is bounded
    /// (after a burst the average stays longer than needed for a few ticks:
    /// more counts, never fewer, behind the reading).
    fn trim(&mut self) {
        let floor = self.config.min_ticks;
        for _ in 0..MAX_TRIM_PER_TICK {
            if self.len <= floor {
                break;
            }
            let oldest = u64::from(self.window.bin_ago(self.len as usize - 1));
            if self.segment_sum - oldest < u64::from(self.config.target_counts) {
                break;
            }
            self.segment_sum -= oldest;
            self.len -= 1;
        }
    }

    fn step_test(&mut self) -> StepSeen {
        let Some(limits) = self.limits else {
            return StepSeen::None;
        };
        if self.window.filled_ticks() < self.config.probe_ticks {
            return StepSeen::None;
        }
        let seen = if self.probe_sum >= u64::from(limits.above) {
            StepSeen::Up
        } else if limits.below.is_some_and(|b| self.probe_sum <= u64::from(b)) {
            StepSeen::Down
        } else {
            return StepSeen::None;
        };
        self.len = self.config.probe_ticks.min(self.window.filled_ticks());
        self.segment_sum = self.probe_sum;
        self.limits = None;
        self.restarts = self.restarts.saturating_add(1);
        seen
    }

    /// The counts the rest of the average predicts for the probe, UQ32.32;
    /// `None` while the average is not longer than the probe.
    fn predicted_probe_q32(&self) -> Option<Result<FixedMean, Error>> {
        let probe = self.config.probe_ticks;
        if self.len <= probe {
            return None;
        }
        let basis = (self.segment_sum - self.probe_sum).saturating_mul(u64::from(probe));
        Some(FixedMean::from_ratio(basis, u64::from(self.len - probe)))
    }

    /// Whether the step limits should be recomputed (cold path): there are
    /// none yet and the average now has a basis, or the prediction has moved
    /// by more than an eighth (plus half a count) since they were computed.
    ///
    /// Cost: compares by cross-multiplication (no division: a 128-bit
    /// division is a bit-by-bit software loop of ~3000 instructions on a
    /// Cortex-M0, and this runs every tick).
    pub fn needs_refresh(&self) -> bool {
        let probe = self.config.probe_ticks;
        if self.len <= probe {
            return false;
        }
        // The prediction is basis/den counts; in UQ32.32: basis·2^32/den.
        let basis = (self.segment_sum - self.probe_sum).saturating_mul(u64::from(probe));
        let den = u64::from(self.len - probe);
        // Usually everything fits 64 bits (one 64-bit multiply per product
        // on the M0); the 128-bit form is the fallback for huge counts.
        if let Some(l) = self.limits
            && basis < 1 << 32
            && let (Some(then), Some(tol)) = (
                l.basis_q32.checked_mul(den),
                (l.basis_q32 / 8 + (1u64 << 31)).checked_mul(den),
            )
        {
            return (basis << 32).abs_diff(then) > tol;
        }
        let (basis, den) = (u128::from(basis), u128::from(den));
        let scaled = basis << 32; // prediction · den, UQ32.32
        match self.limits {
            // Plannable (as `refresh` will find): at most the largest mean.
            None => scaled <= u128::from(MAX_MEAN_Q32) * den,
            Some(l) => {
                let tolerance = u128::from(l.basis_q32 / 8 + (1u64 << 31));
                let then = u128::from(l.basis_q32) * den;
                scaled.abs_diff(then) > tolerance * den
            }
        }
    }

    /// Recomputes the step limits at false-step probability `alpha` per
    /// tick and direction, with the integer tier (no floating point; cost of
    /// two threshold searches). Returns whether limits are now in force.
    pub fn refresh(&mut self, alpha: FixedAlpha) -> Result<bool, Error> {
        let Some(mean) = self.predicted_probe_q32() else {
            self.limits = None;
            return Ok(false);
        };
        let mean = mean?;
        let above = alarm_threshold(mean, alpha)?.counts;
        let below = fault_threshold(mean, alpha)?.map(|t| t.counts);
        self.limits = Some(StepLimits {
            basis_q32: mean.raw(),
            above,
            below,
        });
        Ok(true)
    }

    /// Ticks in the current average.
    pub const fn averaging_ticks(&self) -> u32 {
        self.len
    }

    /// Counts in the current average.
    pub const fn averaging_counts(&self) -> u64 {
        self.segment_sum
    }

    /// Restarts since creation (saturating).
    pub const fn restarts(&self) -> u32 {
        self.restarts
    }

    /// The rate over the current average for a tick of `tick_s` seconds;
    /// `None` before the first tick.
    pub fn reading<F: Real>(&self, tick_s: F) -> Result<Option<RateReading<F>>, Error> {
        let tick_s = check_tick_s(tick_s)?;
        if self.len == 0 {
            return Ok(None);
        }
        let seconds = F::of_u32(self.len) * tick_s;
        Ok(Some(RateReading::of_counts(self.segment_sum, seconds)))
    }
}
