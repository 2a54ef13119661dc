//! The uncertainty of a dead-time-corrected rate.

use super::model::{DeadTime, ModelKind};
use crate::error::{Error, Param, check_range};
use crate::math::Real;

/// A corrected (true) rate with its standard uncertainty and the two
/// contributions to it.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CorrectedRate<F> {
    /// The true rate on the physical (low) branch, counts per second.
    pub true_cps: F,
    /// Combined standard uncertainty, counts per second.
    pub std_uncertainty_cps: F,
    /// The part due to counting statistics.
    pub from_counts_cps: F,
    /// The part due to the uncertainty of τ.
    pub from_dead_time_cps: F,
    /// As [`super::Correction::saturated`].
    pub saturated: bool,
}

impl<F: Real> DeadTime<F> {
    /// Corrects a measured rate obtained over `counting_s` seconds and
    /// propagates the uncertainties (first order, combined in quadrature):
    ///
    /// * counting: the recorded counts `M = m t` are sub-Poisson behind a
    ///   dead time; `Var(M) ≈ m t (1 − mτ)²` non-paralyzable and
    ///   `m t (1 − 2nτ e^{−nτ})` paralyzable (Müller 1973; checked by
    ///   simulation in `tests/deadtime.rs`), `m t` (Poisson, an upper
    ///   bound) for the hybrid; then `σ_n = gain · (n/m) · σ_m`. For the
    ///   non-paralyzable model this gives `σ_n/n = 1/√M`.
    /// * dead time: `σ_n = |∂n/∂τ| σ_τ` with `∂n/∂τ = −(∂ ln m/∂τ)/(∂ ln m/∂n)`.
    ///
    /// ```
    /// use countward::deadtime::DeadTime;
    /// // Non-paralyzable: relative SD of the corrected rate is 1/√M (computed).
    /// let np = DeadTime::non_paralyzable(100e-6_f64).unwrap();
    /// let c = np.correct_with_uncertainty(3000.0, 10.0, 0.0).unwrap();
    /// assert!((c.from_counts_cps / c.true_cps - 1.0 / 30_000f64.sqrt()).abs() < 1e-12);
    /// ```
    pub fn correct_with_uncertainty(
        &self,
        measured_cps: F,
        counting_s: F,
        dead_time_sd_s: F,
    ) -> Result<CorrectedRate<F>, Error> {
        let t = check_range(counting_s, F::MIN_POSITIVE, F::MAX, Param::Seconds)?;
        let sd_tau = check_range(dead_time_sd_s, F::ZERO, F::of(1e3), Param::DeadTime)?;
        let c = self.correct(measured_cps)?;
        let (m, n) = (measured_cps, c.true_cps);
        let tau = self.tau_s();
        let var_m = match self.kind() {
            ModelKind::NonParalyzable => m * (F::ONE - m * tau) * (F::ONE - m * tau) / t,
            ModelKind::Paralyzable => m * (F::ONE - F::TWO * n * tau * (-n * tau).exp()) / t,
            ModelKind::Hybrid => m / t,
        };
        let var_m = if var_m > F::ZERO { var_m } else { F::ZERO };
        let from_counts = if m > F::ZERO {
            c.gain * (n / m) * var_m.sqrt()
        } else {
            F::ZERO
        };
        // ∂n/∂τ = −(∂ ln m/∂τ) / (∂ ln m/∂n), with ∂ ln m/∂n = slope/n.
        let dn_dtau = if n > F::ZERO {
            -self.log_tau_slope(n) * n * c.gain
        } else {
            F::ZERO
        };
        let from_tau = (dn_dtau * sd_tau).abs();
        if m > F::ZERO && !(from_counts.is_finite() && from_tau.is_finite()) {
            return Err(Error::OutOfRange(Param::RateCps));
        }
        Ok(CorrectedRate {
            true_cps: n,
            std_uncertainty_cps: (from_counts * from_counts + from_tau * from_tau).sqrt(),
            from_counts_cps: from_counts,
            from_dead_time_cps: from_tau,
            saturated: c.saturated,
        })
    }
}
