//! Alarm levels and the count thresholds that classify a window.

use crate::error::{Error, Param};
use crate::fixed::{FixedAlpha, FixedMean, alarm_threshold, fault_threshold};

/// How far a measurement is above background, in increasing order.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Level {
    /// Explained by background.
    #[default]
    Normal,
    /// Above the warning threshold.
    Warning,
    /// Above the alarm threshold.
    Alarm,
}

/// The level as a person reads it: `normal`, `warning`, `alarm`.
impl core::fmt::Display for Level {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        f.write_str(match self {
            Level::Normal => "normal",
            Level::Warning => "warning",
            Level::Alarm => "alarm",
        })
    }
}

/// The classification of one window count against [`LevelThresholds`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Classification {
    /// The highest level whose *set* threshold the count reaches.
    pub raise: Level,
    /// The highest level whose *clearing* threshold the count still reaches
    /// (never below `raise`): a level stays active while `hold` is at or above it.
    pub hold: Level,
    /// The count is at or below the low-count threshold (dead detector?).
    pub low_raise: bool,
    /// The count is still at or below the low-count clearing threshold.
    pub low_hold: bool,
}

impl Classification {
    /// Nothing above or below background.
    pub const QUIET: Classification = Classification {
        raise: Level::Normal,
        hold: Level::Normal,
        low_raise: false,
        low_hold: false,
    };

    /// Whether the count is plain background (no level held, no low count held).
    pub const fn is_quiet(&self) -> bool {
        matches!(self.hold, Level::Normal) && !self.low_hold
    }
}

/// Count thresholds for one window at one background, with hysteresis.
///
/// A count `n` raises [`Level::Warning`] at `n ≥ warn_set`, holds it while
/// `n ≥ warn_clear`; likewise for [`Level::Alarm`]. Low counts raise at
/// `n ≤ low_set` and hold while `n ≤ low_clear`. Invariants (checked by
/// [`LevelThresholds::new`]): `warn_clear ≤ warn_set ≤ alarm_set`,
/// `warn_clear ≤ alarm_clear ≤ alarm_set`, `low_set ≤ low_clear < warn_clear`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LevelThresholds {
    warn_set: u32,
    warn_clear: u32,
    alarm_set: u32,
    alarm_clear: u32,
    low: Option<(u32, u32)>,
}

impl LevelThresholds {
    /// Validated thresholds; `low` is `(low_set, low_clear)` or `None` when
    /// the background is too low for a low-count test.
    pub const fn new(
        warn_set: u32,
        warn_clear: u32,
        alarm_set: u32,
        alarm_clear: u32,
        low: Option<(u32, u32)>,
    ) -> Result<Self, Error> {
        let ordered = warn_clear <= warn_set
            && warn_set <= alarm_set
            && warn_clear <= alarm_clear
            && alarm_clear <= alarm_set
            && warn_clear >= 1;
        let low_ok = match low {
            None => true,
            Some((set, clear)) => set <= clear && clear < warn_clear,
        };
        if !ordered || !low_ok {
            return Err(Error::OutOfRange(Param::Threshold));
        }
        Ok(LevelThresholds {
            warn_set,
            warn_clear,
            alarm_set,
            alarm_clear,
            low,
        })
    }

    /// Classifies a window count: two to six integer compares.
    pub const fn classify(&self, counts: u32) -> Classification {
        let raise = if counts >= self.alarm_set {
            Level::Alarm
        } else if counts >= self.warn_set {
            Level::Warning
        } else {
            Level::Normal
        };
        let hold = if counts >= self.alarm_clear {
            Level::Alarm
        } else if counts >= self.warn_clear {
            Level::Warning
        } else {
            Level::Normal
        };
        let (low_raise, low_hold) = match self.low {
            Some((set, clear)) => (counts <= set, counts <= clear),
            None => (false, false),
        };
        Classification {
            raise,
            hold,
            low_raise,
            low_hold,
        }
    }

    /// The warning set threshold.
    pub const fn warn_set(&self) -> u32 {
        self.warn_set
    }
    /// The warning clearing threshold.
    pub const fn warn_clear(&self) -> u32 {
        self.warn_clear
    }
    /// The alarm set threshold.
    pub const fn alarm_set(&self) -> u32 {
        self.alarm_set
    }
    /// The alarm clearing threshold.
    pub const fn alarm_clear(&self) -> u32 {
        self.alarm_clear
    }
    /// The low-count `(set, clear)` thresholds, if any.
    pub const fn low(&self) -> Option<(u32, u32)> {
        self.low
    }
}

/// False-alarm probabilities per check from which [`LevelThresholds`] are
/// planned for a given background, with the integer tier (no float).
///
/// * warning set: alarm threshold of the window mean at `warn`;
/// * alarm set: alarm threshold at `alarm`; an alarm clears down to a warning
///   below the warning set threshold;
/// * warning clear: alarm threshold at `clear` (the hysteresis band);
/// * low set: fault threshold at `low`; low clear: fault threshold at `clear`.
///
/// Requires `alarm ≤ warn < clear` and `low < clear`. The probabilities are
/// per check of a sliding window; see [`crate::plan`] for the alarm rate per
/// hour that a per-tick check of a sliding window implies.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ThresholdPlan {
    warn: FixedAlpha,
    alarm: FixedAlpha,
    clear: FixedAlpha,
    low: FixedAlpha,
}

impl ThresholdPlan {
    /// A validated plan.
    pub const fn new(
        warn: FixedAlpha,
        alarm: FixedAlpha,
        clear: FixedAlpha,
        low: FixedAlpha,
    ) -> Result<Self, Error> {
        if alarm.ln_raw() > warn.ln_raw()
            || warn.ln_raw() >= clear.ln_raw()
            || low.ln_raw() >= clear.ln_raw()
        {
            return Err(Error::OutOfRange(Param::Alpha));
        }
        Ok(ThresholdPlan {
            warn,
            alarm,
            clear,
            low,
        })
    }

    /// The thresholds for a window whose background mean is `mean` counts.
    ///
    /// ```
    /// use countward::detect::{Level, ThresholdPlan};
    /// use countward::fixed::{FixedAlpha, FixedMean};
    /// let plan = ThresholdPlan::new(
    ///     FixedAlpha::one_in(100_000).unwrap(),
    ///     FixedAlpha::one_in(10_000_000).unwrap(),
    ///     FixedAlpha::one_in(100).unwrap(),
    ///     FixedAlpha::one_in(100_000).unwrap(),
    /// )
    /// .unwrap();
    /// let t = plan.thresholds(FixedMean::from_counts(100).unwrap()).unwrap();
    /// // f64 tier: alarm threshold of mean 100 at 1e-7 is 158 counts.
    /// assert_eq!(t.alarm_set(), countward::poisson::alarm_threshold(100.0_f64, 1e-7).unwrap().counts);
    /// assert_eq!(t.classify(160).raise, Level::Alarm);
    /// assert!(t.classify(50).low_raise);
    /// ```
    pub fn thresholds(&self, mean: FixedMean) -> Result<LevelThresholds, Error> {
        let warn_set = alarm_threshold(mean, self.warn)?.counts;
        let alarm_set = alarm_threshold(mean, self.alarm)?.counts;
        let warn_clear = alarm_threshold(mean, self.clear)?.counts;
        let low_set = fault_threshold(mean, self.low)?.map(|t| t.counts);
        let low_clear = fault_threshold(mean, self.clear)?.map(|t| t.counts);
        let low = match (low_set, low_clear) {
            (Some(s), Some(c)) => Some((s, c.min(warn_clear - 1))),
            _ => None,
        };
        LevelThresholds::new(warn_set, warn_clear, alarm_set, warn_set, low)
    }
}
