//! Fold-back of a paralyzable counter: a fault, not a low reading.

use crate::error::{Error, Param, check_range};
use crate::math::Real;

/// Guards against the fold-back of a paralyzable (extending dead time)
/// counter: its measured rate `m = n e^{−nτ}` peaks at `1/(eτ)` when the true
/// rate is `n = 1/τ` and *falls* as the field rises further, so a very high
/// field can read like background.
///
/// * Enters saturation when the window count reaches `enter_counts`, a
///   fraction of the most a window can hold (`window_s/(eτ)`), or when the
///   caller's auxiliary overload signal (tube current, a second detector with
///   a shorter dead time, a live-time monitor) says `Some(true)`.
/// * Stays saturated, whatever the counts do afterwards, until the auxiliary
///   signal says `Some(false)` with the count below `enter_counts`, or a
///   person releases it ([`SaturationGuard::release`]). A count that falls
///   after saturation cannot tell "the field went away" from "the field rose
///   further"; that is why the guard never releases itself on counts alone.
/// * A field that rises past `1/τ` between two checks can fold back before
///   any window reaches the peak; counts alone cannot see that, so an
///   instrument that must not under-read needs the auxiliary signal
///   (common practice, no source).
///
/// ```
/// use countward::detect::SaturationGuard;
/// // 100 µs dead time, 1 s window: at most 1/(e·1e-4) = 3678.8 counts; enter at 80%.
/// let mut g = SaturationGuard::for_dead_time(1e-4_f64, 1.0, 0.8).unwrap();
/// assert_eq!(g.enter_counts(), 2944);
/// assert!(!g.update(1200, None));
/// assert!(g.update(3100, None)); // near the peak
/// assert!(g.update(40, None)); // folded back: still a fault, not "40 cps"
/// assert!(!g.update(40, Some(false))); // the auxiliary signal clears it
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SaturationGuard {
    enter_counts: u32,
    saturated: bool,
}

impl SaturationGuard {
    /// Enters at window counts of at least `enter_counts` (≥ 1).
    pub const fn with_enter_counts(enter_counts: u32) -> Result<Self, Error> {
        if enter_counts == 0 {
            return Err(Error::OutOfRange(Param::Threshold));
        }
        Ok(SaturationGuard {
            enter_counts,
            saturated: false,
        })
    }

    /// Enters at `fraction` (in (0, 1]) of the paralyzable maximum
    /// `window_s/(e · dead_time_s)` counts per window, rounded up.
    pub fn for_dead_time<F: Real>(dead_time_s: F, window_s: F, fraction: F) -> Result<Self, Error> {
        let tau = check_range(dead_time_s, F::MIN_POSITIVE, F::MAX, Param::DeadTime)?;
        let w = check_range(window_s, F::MIN_POSITIVE, F::MAX, Param::Seconds)?;
        let f = check_range(fraction, F::MIN_POSITIVE, F::ONE, Param::Fraction)?;
        let peak = w / (F::ONE.exp() * tau);
        let enter = f * peak;
        if !enter.is_finite() || enter >= F::of_u32(u32::MAX) {
            return Err(Error::OutOfRange(Param::DeadTime));
        }
        let floor = enter.floor();
        let counts = floor.to_u32_saturating() + u32::from(enter > floor);
        Self::with_enter_counts(counts.max(1))
    }

    /// The window count at which saturation is entered.
    pub const fn enter_counts(&self) -> u32 {
        self.enter_counts
    }

    /// Updates with the latest window count and the auxiliary overload
    /// signal (`None` if the instrument has none); returns whether saturated.
    pub fn update(&mut self, window_counts: u32, overload: Option<bool>) -> bool {
        if window_counts >= self.enter_counts || overload == Some(true) {
            self.saturated = true;
        } else if overload == Some(false) {
            self.saturated = false;
        }
        self.saturated
    }

    /// Releases saturation after a person has checked the field by other
    /// means; refused (returns `false`, stays saturated) while the window
    /// count is still at or above `enter_counts`.
    pub fn release(&mut self, window_counts: u32) -> bool {
        if window_counts >= self.enter_counts {
            return false;
        }
        self.saturated = false;
        true
    }

    /// Whether saturated.
    pub const fn is_saturated(&self) -> bool {
        self.saturated
    }
}
