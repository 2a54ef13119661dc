//! Poisson CUSUM (Page 1954; Lucas 1985) in scaled integers.

use crate::error::{Error, Param, check_range};
use crate::math::Real;

/// Which change a [`PoissonCusum`] looks for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum CusumDirection {
    /// A rate increase: `S ← max(0, S + x − k)`.
    Increase,
    /// A rate decrease (detector failure, gain loss): `S ← max(0, S + k − x)`.
    Decrease,
}

/// The settings of a [`PoissonCusum`], on a lattice of `1/scale` counts.
///
/// Lucas (1985) chooses the reference value `k = (μ1 − μ0)/(ln μ1 − ln μ0)`
/// for an in-control mean μ0 and a mean μ1 to detect (counts per tick), and a
/// decision interval `h`; the scheme signals when `S ≥ h` (the convention of
/// the published ARL tables). With integer `k·scale` and `h·scale` the
/// statistic lives on a lattice and the Brook–Evans (1972) Markov chain gives
/// its exact average run lengths; see [`crate::plan`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CusumConfig {
    scale: u32,
    reference: u32,
    decision: u32,
    head_start: u32,
    direction: CusumDirection,
}

impl CusumConfig {
    /// From scaled integers: `reference = k · scale`, `decision = h · scale`,
    /// `head_start` (e.g. `decision / 2`, the fast initial response of Lucas
    /// & Crosier 1982; 0 for none) below `decision`.
    pub const fn new(
        scale: u32,
        reference: u32,
        decision: u32,
        head_start: u32,
        direction: CusumDirection,
    ) -> Result<Self, Error> {
        if scale == 0 || scale > (1 << 16) {
            return Err(Error::OutOfRange(Param::Scale));
        }
        if decision == 0 || head_start >= decision {
            return Err(Error::OutOfRange(Param::Threshold));
        }
        Ok(CusumConfig {
            scale,
            reference,
            decision,
            head_start,
            direction,
        })
    }

    /// Lucas's design for detecting a change from `mean0` to `mean1` counts
    /// per tick (`mean1 > mean0` for an increase, `<` for a decrease) with
    /// decision interval `decision_counts`, rounded to a lattice of
    /// `1/scale` counts; `fast_start` sets the head start to `h/2`.
    ///
    /// ```
    /// use countward::detect::{CusumConfig, CusumDirection};
    /// // Lucas's reference value for means 4 and 8: 4/ln 2 = 5.770780.
    /// let c = CusumConfig::for_means(4.0_f64, 8.0, 8.0, 1000, false).unwrap();
    /// assert_eq!(c.direction(), CusumDirection::Increase);
    /// assert!((c.reference_counts::<f64>() - 5.770780).abs() < 5e-4);
    /// ```
    pub fn for_means<F: Real>(
        mean0: F,
        mean1: F,
        decision_counts: F,
        scale: u32,
        fast_start: bool,
    ) -> Result<Self, Error> {
        let big = F::of(1e6);
        let m0 = check_range(mean0, F::MIN_POSITIVE, big, Param::Mean)?;
        let m1 = check_range(mean1, F::MIN_POSITIVE, big, Param::Mean)?;
        let h = check_range(decision_counts, F::MIN_POSITIVE, big, Param::Threshold)?;
        if m0 == m1 {
            return Err(Error::OutOfRange(Param::Mean));
        }
        let k = logarithmic_mean(m0, m1);
        let s = F::of_u32(scale);
        let reference = (k * s + F::HALF).floor();
        // A reference of 0 on the lattice is no CUSUM: an increase scheme
        // would only ever grow, a decrease scheme never leave 0.
        if reference.is_nan() || reference < F::ONE {
            return Err(Error::OutOfRange(Param::Scale));
        }
        let decision = (h * s + F::HALF).floor();
        if reference * F::of_u32(4) >= F::of_u32(u32::MAX) || decision >= F::of_u32(u32::MAX) {
            return Err(Error::OutOfRange(Param::Threshold));
        }
        let decision = decision.to_u32_saturating().max(1);
        let head_start = if fast_start { decision / 2 } else { 0 };
        let direction = if m1 > m0 {
            CusumDirection::Increase
        } else {
            CusumDirection::Decrease
        };
        Self::new(
            scale,
            reference.to_u32_saturating(),
            decision,
            head_start,
            direction,
        )
    }

    /// The lattice scale (sub-counts per count).
    pub const fn scale(&self) -> u32 {
        self.scale
    }
    /// The reference value `k · scale`.
    pub const fn reference(&self) -> u32 {
        self.reference
    }
    /// The decision interval `h · scale`.
    pub const fn decision(&self) -> u32 {
        self.decision
    }
    /// The head start (the value after a start or a signal).
    pub const fn head_start(&self) -> u32 {
        self.head_start
    }
    /// The direction of change.
    pub const fn direction(&self) -> CusumDirection {
        self.direction
    }
    /// The reference value in counts per tick.
    pub fn reference_counts<F: Real>(&self) -> F {
        F::of_u32(self.reference) / F::of_u32(self.scale)
    }
}

/// Lucas's reference value `(m1 − m0)/(ln m1 − ln m0)` (the logarithmic mean
/// of the two means), in the form `m0 · d / ln(1 + d)`, `d = (m1 − m0)/m0`,
/// which does not cancel when the means are close: `m1 − m0` is exact there
/// (Sterbenz) and `ln_1p` keeps its relative accuracy, so the result stays
/// between the two means for any pair (the difference of two logarithms lost
/// every digit for means a few ulps apart).
fn logarithmic_mean<F: Real>(m0: F, m1: F) -> F {
    let d = (m1 - m0) / m0;
    let k = if d.abs() <= F::ONE {
        m0 * (d / d.ln_1p()) // → m0 (1 + d/2) as d → 0; d ≠ 0 here
    } else {
        // Far apart (the relative step may even overflow): no cancellation.
        (m1 - m0) / (m1.ln() - m0.ln())
    };
    // Rounding cannot leave [min, max] by more than an ulp; clamp it back.
    let (lo, hi) = if m0 < m1 { (m0, m1) } else { (m1, m0) };
    if k < lo {
        lo
    } else if k > hi {
        hi
    } else {
        k
    }
}

/// A running Poisson CUSUM on per-tick counts.
///
/// Per tick: one multiply, an add and a saturating subtract on `u64`, a
/// compare. After a signal the statistic restarts at the head start.
/// Memory: 24 bytes.
///
/// ```
/// use countward::detect::{CusumConfig, CusumDirection, PoissonCusum};
/// // k = 2, h = 6 on whole counts (the published example of the IAcsSPCR docs).
/// let mut c = PoissonCusum::new(CusumConfig::new(1, 2, 6, 0, CusumDirection::Increase).unwrap());
/// assert!(!c.update(4)); // S = 2
/// assert!(!c.update(5)); // S = 5
/// assert!(c.update(3)); // S = 6 ≥ h: signal
/// assert_eq!(c.statistic(), 0);
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct PoissonCusum {
    config: CusumConfig,
    sum: u32,
}

impl PoissonCusum {
    /// Starts at the head start.
    pub const fn new(config: CusumConfig) -> Self {
        PoissonCusum {
            sum: config.head_start,
            config,
        }
    }

    /// Feeds one tick's counts; `true` when the scheme signals (it then restarts).
    pub fn update(&mut self, counts: u32) -> bool {
        let c = &self.config;
        let x = u64::from(counts) * u64::from(c.scale);
        let s = u64::from(self.sum);
        let next = match c.direction {
            CusumDirection::Increase => (s + x).saturating_sub(u64::from(c.reference)),
            CusumDirection::Decrease => (s + u64::from(c.reference)).saturating_sub(x),
        };
        if next >= u64::from(c.decision) {
            self.sum = c.head_start;
            return true;
        }
        self.sum = next as u32;
        false
    }

    /// The statistic `S · scale`.
    pub const fn statistic(&self) -> u32 {
        self.sum
    }

    /// Restarts at the head start.
    pub fn reset(&mut self) {
        self.sum = self.config.head_start;
    }

    /// The settings.
    pub const fn config(&self) -> &CusumConfig {
        &self.config
    }
}
