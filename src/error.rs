//! The one error type of the crate: which input was bad, and how.

use core::fmt;

/// The input a failed call rejected.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum Param {
    /// A Poisson mean (expected counts).
    Mean,
    /// A false-alarm (or tail) probability α.
    Alpha,
    /// A confidence level.
    Level,
    /// An event rate in counts per second.
    RateCps,
    /// A duration in seconds.
    Seconds,
    /// The shape parameter `a` of the incomplete gamma function.
    Shape,
    /// The argument `x` of a special function.
    X,
    /// A probability given to an inverse function.
    Probability,
    /// A number of events (must be at least 1).
    Events,
    /// A tick period or a duration in ticks.
    Ticks,
    /// A smoothing shift (weight 2^-shift).
    Shift,
    /// A count threshold, or a set of thresholds that must be ordered.
    Threshold,
    /// A dead time in seconds.
    DeadTime,
    /// A fraction that must lie in (0, 1].
    Fraction,
    /// A target number of counts.
    TargetCounts,
    /// Input data (a series of measurements or time stamps).
    Data,
    /// The lattice scale of an integer design (sub-units per count or per
    /// nat): too coarse when a rounded term would lose its meaning.
    Scale,
}

impl Param {
    /// The name used in messages.
    pub const fn name(self) -> &'static str {
        match self {
            Param::Mean => "mean",
            Param::Alpha => "alpha",
            Param::Level => "level",
            Param::RateCps => "rate_cps",
            Param::Seconds => "seconds",
            Param::Shape => "shape a",
            Param::X => "x",
            Param::Probability => "probability",
            Param::Events => "events",
            Param::Ticks => "ticks",
            Param::Shift => "shift",
            Param::Threshold => "threshold",
            Param::DeadTime => "dead_time_s",
            Param::Fraction => "fraction",
            Param::TargetCounts => "target_counts",
            Param::Data => "data",
            Param::Scale => "scale",
        }
    }
}

/// Why a call failed. Every variant names the input at fault.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum Error {
    /// The input is NaN or infinite.
    NotFinite(Param),
    /// The input is a finite number outside the documented domain of the call.
    OutOfRange(Param),
    /// An iteration did not reach its tolerance within its bound. This is a
    /// defect in the library (the documented domain should always converge);
    /// the call reports it rather than return a partial result.
    NoConvergence,
    /// The data are valid but cannot determine the named quantity (too few
    /// counts or points, or an effect too small to show above the noise).
    NotDetermined(Param),
}

impl Error {
    /// The input at fault, if any.
    pub const fn param(self) -> Option<Param> {
        match self {
            Error::NotFinite(p) | Error::OutOfRange(p) | Error::NotDetermined(p) => Some(p),
            Error::NoConvergence => None,
        }
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Error::NotFinite(p) => write!(f, "{} is not a finite number", p.name()),
            Error::OutOfRange(p) => write!(f, "{} is outside its allowed range", p.name()),
            Error::NoConvergence => f.write_str("iteration did not converge (please report)"),
            Error::NotDetermined(p) => write!(f, "the data cannot determine {}", p.name()),
        }
    }
}

impl core::error::Error for Error {}

/// Checks that `v` is finite and `lo <= v <= hi`.
pub(crate) fn check_range<F: crate::Real>(v: F, lo: F, hi: F, p: Param) -> Result<F, Error> {
    if !v.is_finite() {
        return Err(Error::NotFinite(p));
    }
    if v < lo || v > hi {
        return Err(Error::OutOfRange(p));
    }
    Ok(v)
}

/// Checks that `v` is a probability strictly between 0 and 1.
pub(crate) fn check_open_unit<F: crate::Real>(v: F, p: Param) -> Result<F, Error> {
    if !v.is_finite() {
        return Err(Error::NotFinite(p));
    }
    if v <= F::ZERO || v >= F::ONE {
        return Err(Error::OutOfRange(p));
    }
    Ok(v)
}
