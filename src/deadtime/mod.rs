//! Dead time: models, the correction of measured rates (on the host and in
//! integer-only firmware), and the bench methods that measure τ.
//!
//! A counter is dead for τ after each recorded event (tens to hundreds of
//! microseconds for a Geiger-Mueller tube; common practice, no source) and
//! under-reads at high rates. Notation: true rate `n`, measured rate `m`.
//!
//! | model | forward | inverse |
//! |---|---|---|
//! | non-paralyzable | `m = n/(1 + nτ)` | `n = m/(1 − mτ)`, needs `mτ < 1` |
//! | paralyzable | `m = n e^{−nτ}` | `n = −W₀(−mτ)/τ` (physical) or `−W₋₁(−mτ)/τ` (fold-back), needs `mτ ≤ 1/e` |
//! | hybrid (Lee & Gardner 2000) | `m = n e^{−nfτ}/(1 + n(1 − f)τ)` | Newton on each side of the peak |
//!
//! (Knoll, "Radiation Detection and Measurement", 4th ed. 2010, ch. 4 for
//! the first two; Lee & Gardner, Appl. Radiat. Isot. 53:731 (2000) and the
//! paralysis-factor form of Patil & Usman, Nucl. Technol. (2009) for the
//! hybrid.) Which branch is physical cannot be told from one reading; the
//! inverse returns the low branch as the physical one under the stated
//! assumption that the counter was followed continuously from low rates,
//! returns the other branch too, and flags readings where the correction is
//! ill-conditioned ([`Correction::saturated`]). For a firmware guard against
//! fold-back see [`crate::detect::SaturationGuard`].
//!
//! Bench methods ([`two_source`], [`fit_decay`], [`fit_intervals`]) work on
//! slices and return τ with its standard uncertainty, or
//! [`crate::Error::NotDetermined`] when the data cannot show the dead time.

// Negated comparisons such as `!(det > 0)` are deliberate here: they are
// true for NaN as well, so a NaN from bad data fails the check instead of
// passing it.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

mod bench;
mod model;
mod table;
mod uncertainty;

pub use bench::{
    DecayFit, DecayPoint, IntervalFit, TwoSource, fit_decay, fit_intervals, two_source,
};
pub use model::{Correction, DeadTime, ModelKind, SATURATION_GAIN};
pub use table::CorrectionTable;
pub use uncertainty::CorrectedRate;
