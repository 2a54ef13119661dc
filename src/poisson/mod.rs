//! Poisson counts: tail probabilities, count thresholds and exact limits on a mean.
//!
//! N is a Poisson count with mean μ (expected counts = rate × time).
//! P(N ≥ k) = P(k, μ) and P(N ≤ k) = Q(k + 1, μ) in terms of the
//! regularized incomplete gamma functions of [`crate::math`] (DLMF 8.4.10).

mod limits;
mod tail;
mod threshold;

pub use limits::{MeanLimits, exact_limits, exact_upper_limit};
pub use tail::{Prob, at_least, at_most, pmf};
pub use threshold::{CountThreshold, alarm_threshold, fault_threshold};

use crate::Real;
use crate::error::{Error, Param, check_range};

/// Largest mean accepted (so every threshold fits in a `u32`). Accuracy is
/// verified up to 1e8 in f64 and 1e7 in f32 (see each function).
pub const MAX_MEAN: f64 = 2.0e9;

/// Validates a mean: finite, 0 ≤ μ ≤ [`MAX_MEAN`].
pub(crate) fn check_mean<F: Real>(mean: F) -> Result<F, Error> {
    check_range(mean, F::ZERO, F::of(MAX_MEAN), Param::Mean)
}
