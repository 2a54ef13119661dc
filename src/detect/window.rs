//! Excess and low counts in a sliding window, against a learned background.

use super::level::{Classification, Level, LevelThresholds, ThresholdPlan};
use crate::error::{Error, Param};
use crate::fixed::{FixedMean, MAX_MEAN_RAW as MAX_MEAN_Q32};
use crate::rate::{BinWindow, SmoothedRate};
use crate::ticks::Ticks;

/// A sliding window of `N` ticks whose count is classified against
/// thresholds planned for the background, which the detector learns itself.
///
/// * Per tick ([`WindowDetector::tick`]): the counts go into the window; once
///   the window is full and thresholds are in force, its count is classified
///   ([`Classification`]: warning/alarm raise and hold, low-count raise and
///   hold). Integer only, O(1).
/// * Background: a [`SmoothedRate`] of counts per tick with a long time
///   constant, fed only outside excess and low-count episodes (from a set
///   threshold reached until the count is back below the clearing
///   threshold) and while learning is enabled, so it is frozen during an
///   excess (a source does not teach itself as background) and during a
///   low-count fault (a dead tube does not teach zero). It starts settled at
///   the background given to [`WindowDetector::new`] (from calibration),
///   and never goes below the floor given there.
/// * Cold path: when [`WindowDetector::needs_refresh`] (no thresholds yet,
///   or the background per window moved by more than 1/16 plus half a count
///   since they were planned), call [`WindowDetector::refresh`] with a
///   [`ThresholdPlan`] (integer tier), or plan in `f64` yourself and call
///   [`WindowDetector::set_thresholds`].
///
/// Until the window is full or while no thresholds are in force, `tick`
/// returns [`Classification::QUIET`] and [`WindowDetector::is_armed`] is false.
///
/// Memory: `4 N + 88` bytes on 32-bit targets. Per tick on a Cortex-M0, the
/// whole firmware chain (this detector, the alarm machine, a saturation guard,
/// a CUSUM and an adaptive rate) takes about 850 instructions on average
/// (`tests/firmware`, measured under QEMU).
///
/// ```
/// use countward::detect::{Level, ThresholdPlan, WindowDetector};
/// use countward::fixed::{FixedAlpha, FixedMean};
/// use countward::Ticks;
/// let plan = ThresholdPlan::new(
///     FixedAlpha::one_in(10_000).unwrap(),
///     FixedAlpha::one_in(1_000_000).unwrap(),
///     FixedAlpha::one_in(100).unwrap(),
///     FixedAlpha::one_in(1_000_000).unwrap(),
/// )
/// .unwrap();
/// // 1 s ticks, a 10 s window, background 5 cps learned with weight 2^-10.
/// let five = FixedMean::from_counts(5).unwrap();
/// let mut d = WindowDetector::<10>::new(five, FixedMean::from_counts(1).unwrap(), 10).unwrap();
/// for t in 0..10 {
///     d.tick(Ticks(t), 5);
/// }
/// assert!(d.needs_refresh());
/// d.refresh(&plan).unwrap();
/// assert_eq!(d.tick(Ticks(10), 5).raise, Level::Normal);
/// // A source adds 40 cps for a few seconds:
/// let mut top = Level::Normal;
/// for t in 11..15 {
///     top = top.max(d.tick(Ticks(t), 45).raise);
/// }
/// assert_eq!(top, Level::Alarm);
/// ```
#[derive(Debug, Clone)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct WindowDetector<const N: usize> {
    window: BinWindow<N>,
    background: SmoothedRate,
    floor_q32: u64,
    thresholds: Option<LevelThresholds>,
    basis_q32: u64,
    learning: bool,
    in_episode: bool,
}

impl<const N: usize> WindowDetector<N> {
    /// A detector whose background starts at `background_per_tick` counts
    /// per tick, never drops below `floor_per_tick`, and is learned with
    /// weight `2^-shift` per tick (time constant ≈ 2^shift ticks).
    pub fn new(
        background_per_tick: FixedMean,
        floor_per_tick: FixedMean,
        shift: u8,
    ) -> Result<Self, Error> {
        if floor_per_tick > background_per_tick {
            return Err(Error::OutOfRange(Param::Mean));
        }
        Ok(WindowDetector {
            window: BinWindow::new(),
            background: SmoothedRate::settled_at(shift, background_per_tick.raw())?,
            floor_q32: floor_per_tick.raw(),
            thresholds: None,
            basis_q32: 0,
            learning: true,
            in_episode: false,
        })
    }

    /// Feeds the counts of tick `now` and classifies the window.
    pub fn tick(&mut self, now: Ticks, counts: u32) -> Classification {
        self.window.add(now, counts);
        let c = match self.thresholds {
            Some(t) if self.window.is_full() => t.classify(self.window.sum_u32()),
            _ => Classification::QUIET,
        };
        // An excess episode runs from a set threshold reached until the count
        // falls below the clearing threshold (likewise for low counts); only
        // ticks outside episodes teach the background. Excluding just the
        // hysteresis band would bias the background low.
        let raised = c.raise > Level::Normal || c.low_raise;
        self.in_episode = raised || (self.in_episode && !c.is_quiet());
        if self.learning && !self.in_episode {
            self.background.update(counts);
        }
        c
    }

    /// Enables or disables background learning (e.g. disable while the alarm
    /// state machine holds an alarm or a fault that the window no longer shows).
    pub fn set_learning(&mut self, on: bool) {
        self.learning = on;
    }

    /// The background mean per window (`N` ticks), never below the floor.
    pub fn background_per_window(&self) -> Result<FixedMean, Error> {
        let per_tick = self.background.mean_per_tick_q32().max(self.floor_q32);
        let raw = u128::from(per_tick) * N as u128;
        FixedMean::from_raw(u64::try_from(raw).map_err(|_| Error::OutOfRange(Param::Mean))?)
    }

    /// Whether thresholds should be (re)planned: none yet, the background
    /// per window moved by more than 1/16 plus half a count since, or the
    /// background has left the range a plan can represent (then
    /// [`WindowDetector::refresh`] says so with an error, and the detector
    /// must be reported as unable to arm: it never answers "no need" for
    /// thresholds it cannot have).
    pub fn needs_refresh(&self) -> bool {
        let Some(_) = self.thresholds else {
            return true;
        };
        // Background per window in UQ32.32, by a 64-bit multiply where it
        // fits (always, for plannable means); beyond that it cannot be
        // planned, and `refresh` will say so.
        let per_tick = self.background.mean_per_tick_q32().max(self.floor_q32);
        match per_tick.checked_mul(N as u64) {
            Some(now) if now <= MAX_MEAN_Q32 => {
                now.abs_diff(self.basis_q32) > self.basis_q32 / 16 + (1u64 << 31)
            }
            _ => true,
        }
    }

    /// Plans thresholds for the current background with the integer tier.
    ///
    /// Errors (thresholds in force are kept): [`Param::Mean`] when the
    /// learned background per window exceeds [`crate::poisson::MAX_MEAN`],
    /// and the errors of [`ThresholdPlan::thresholds`]. A detector without
    /// thresholds whose refresh fails cannot arm; the caller must raise a
    /// fault for it rather than wait.
    pub fn refresh(&mut self, plan: &ThresholdPlan) -> Result<LevelThresholds, Error> {
        let mean = self.background_per_window()?;
        let t = plan.thresholds(mean)?;
        self.set_thresholds(t, mean);
        Ok(t)
    }

    /// Installs thresholds planned elsewhere (e.g. in `f64`) for a
    /// background of `basis` counts per window.
    pub fn set_thresholds(&mut self, thresholds: LevelThresholds, basis: FixedMean) {
        self.thresholds = Some(thresholds);
        self.basis_q32 = basis.raw();
    }

    /// The thresholds in force.
    pub const fn thresholds(&self) -> Option<LevelThresholds> {
        self.thresholds
    }

    /// Whether the window is full and thresholds are in force.
    pub const fn is_armed(&self) -> bool {
        self.thresholds.is_some() && self.window.is_full()
    }

    /// The window of counts.
    pub const fn window(&self) -> &BinWindow<N> {
        &self.window
    }

    /// The background learner.
    pub const fn background(&self) -> &SmoothedRate {
        &self.background
    }
}
