//! Decisions on count streams, integer-only per tick.
//!
//! Each detector compares integers (counts, scaled sums) with integer
//! thresholds that the cold path computes and hands over. The floating
//! point or integer-tier work of choosing those thresholds happens in
//! constructors and `refresh` calls, never in `tick`/`update`/`event`.
//!
//! | detector | decides | per-call work |
//! |---|---|---|
//! | [`WindowDetector`] | excess counts (warning, alarm) and low counts in a sliding window, against a background it learns | O(1) |
//! | [`SaturationGuard`] | fold-back of a paralyzable counter in a very high field | O(1) |
//! | [`PoissonCusum`] | a sustained rate change (Page 1954; Lucas 1985) | O(1) |
//! | [`Sprt`] | rate increase against background (Wald 1945), restarted after each decision | O(1) |
//! | [`SilenceWatcher`], [`SilenceFleet`] | a silence too long for the rate learned from the device | O(1) per event |

mod cusum;
mod level;
mod saturation;
mod silence;
mod sprt;
mod window;

pub use cusum::{CusumConfig, CusumDirection, PoissonCusum};
pub use level::{Classification, Level, LevelThresholds, ThresholdPlan};
pub use saturation::SaturationGuard;
pub use silence::{
    DeviceSlot, MAX_DELAY_TICKS, SilenceFleet, SilencePlan, SilenceState, SilenceWatcher,
};
pub use sprt::{Sprt, SprtConfig, SprtDecision};
pub use window::WindowDetector;
