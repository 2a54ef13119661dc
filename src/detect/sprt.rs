//! Wald's sequential probability ratio test for a rate increase.

use crate::error::{Error, Param, check_open_unit, check_range};
use crate::math::Real;
use crate::ticks::{NextDeadline, Ticks};

/// What an [`Sprt`] decided at a tick.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum SprtDecision {
    /// Not yet decided.
    Continue,
    /// The log-likelihood ratio reached the upper boundary: rate increase.
    RateIncrease,
    /// It reached the lower boundary: background accepted.
    Background,
    /// The test hit its maximum length undecided (background kept).
    Truncated,
}

/// Settings of an [`Sprt`], in scaled integers (`scale` units per nat).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SprtConfig {
    per_count: i64,
    per_tick: i64,
    upper: i64,
    lower: i64,
    max_ticks: u32,
    scale: u32,
}

impl SprtConfig {
    /// Wald's test of `mean0` against `mean1 > mean0` counts per tick with
    /// error probabilities `alpha` (false alarm) and `beta` (miss): the
    /// log-likelihood ratio gains `ln(μ1/μ0)` per count and loses `μ1 − μ0`
    /// per tick; upper boundary `ln((1 − β)/α)`, lower `ln(β/(1 − α))`
    /// (Wald 1945). Each term is rounded to `1/scale` nat; `max_ticks`
    /// truncates a test (0: never), as recommended for long-term monitoring.
    ///
    /// Errors: [`Param::Scale`] when `scale` is too coarse for the design
    /// (a gain, loss or boundary would round to 0 or move by more than 1 %).
    ///
    /// ```
    /// use countward::detect::SprtConfig;
    /// // λ0 = 1, λ1 = 2 per tick, α = β = 0.05: boundaries ±ln 19 = ±2.944439.
    /// let c = SprtConfig::for_means(1.0_f64, 2.0, 0.05, 0.05, 1 << 16, 0).unwrap();
    /// assert!((c.upper_nats::<f64>() - 2.944439).abs() < 1e-5);
    /// assert!((c.lower_nats::<f64>() + 2.944439).abs() < 1e-5);
    /// ```
    pub fn for_means<F: Real>(
        mean0: F,
        mean1: F,
        alpha: F,
        beta: F,
        scale: u32,
        max_ticks: u32,
    ) -> Result<Self, Error> {
        let big = F::of(1e6);
        let m0 = check_range(mean0, F::MIN_POSITIVE, big, Param::Mean)?;
        let m1 = check_range(mean1, F::MIN_POSITIVE, big, Param::Mean)?;
        let a = check_open_unit(alpha, Param::Alpha)?;
        let b = check_open_unit(beta, Param::Probability)?;
        if m1 <= m0 {
            return Err(Error::OutOfRange(Param::Mean));
        }
        if scale == 0 || scale > (1 << 20) {
            return Err(Error::OutOfRange(Param::Scale));
        }
        if a + b >= F::ONE {
            return Err(Error::OutOfRange(Param::Probability));
        }
        let s = F::of_u32(scale);
        let round = |v: F| -> Result<i64, Error> {
            let r = v * s;
            if !r.is_finite() || r.abs() >= F::of(9e15) {
                return Err(Error::OutOfRange(Param::Mean));
            }
            let mag = (r.abs() + F::HALF).floor().to_u64_saturating() as i64;
            Ok(if r < F::ZERO { -mag } else { mag })
        };
        // ln(μ1/μ0) as ln_1p of the relative step (no cancellation for
        // close means); the boundaries likewise as ln_1p of small differences.
        let per_count = (m1 - m0) / m0;
        let terms = [
            per_count.ln_1p(),
            m1 - m0,
            ((F::ONE - b - a) / a).ln_1p(),
            -((F::ONE - a - b) / b).ln_1p(),
        ];
        let mut scaled = [0i64; 4];
        for (out, v) in scaled.iter_mut().zip(terms) {
            let r = round(v)?;
            // Every term must survive the lattice within 1 %: a gain or
            // loss rounded to 0 (or far off) is a different test, one that
            // may never decide.
            let err = (F::of(r as f64) - v * s).abs();
            if r == 0 || err > F::of(0.01) * (v * s).abs() {
                return Err(Error::OutOfRange(Param::Scale));
            }
            *out = r;
        }
        let [per_count, per_tick, upper, lower] = scaled;
        Self::from_scaled(per_count, per_tick, upper, lower, max_ticks, scale)
    }

    /// From scaled integers (`scale` units per nat): the gain per count
    /// `ln(μ1/μ0)`, the loss per tick `μ1 − μ0`, the boundaries
    /// (`upper > 0 > lower`) and the truncation (0: none); for firmware that
    /// stores a design made elsewhere.
    pub const fn from_scaled(
        per_count: i64,
        per_tick: i64,
        upper: i64,
        lower: i64,
        max_ticks: u32,
        scale: u32,
    ) -> Result<Self, Error> {
        if per_count <= 0 || per_tick <= 0 || upper <= 0 || lower >= 0 || scale == 0 {
            return Err(Error::OutOfRange(Param::Threshold));
        }
        Ok(SprtConfig {
            per_count,
            per_tick,
            upper,
            lower,
            max_ticks,
            scale,
        })
    }

    /// The scaled parts `(per_count, per_tick, upper, lower, max_ticks, scale)`.
    pub const fn scaled(&self) -> (i64, i64, i64, i64, u32, u32) {
        (
            self.per_count,
            self.per_tick,
            self.upper,
            self.lower,
            self.max_ticks,
            self.scale,
        )
    }

    /// The upper boundary in nats.
    pub fn upper_nats<F: Real>(&self) -> F {
        F::of(self.upper as f64) / F::of_u32(self.scale)
    }
    /// The lower boundary in nats.
    pub fn lower_nats<F: Real>(&self) -> F {
        F::of(self.lower as f64) / F::of_u32(self.scale)
    }
    /// The truncation length in ticks (0: none).
    pub const fn max_ticks(&self) -> u32 {
        self.max_ticks
    }
}

/// Wald's SPRT on per-tick counts, restarted after each decision (continuous
/// surveillance; with the restart it behaves like a CUSUM with a reflecting
/// lower boundary).
///
/// Per tick: one multiply and two adds on `i64`, two compares. Because the
/// ratio crosses the upper boundary by jumps, the real false-alarm
/// probability per test is below the nominal α (about 0.039 for a nominal
/// 0.05 in the published example; see the tests). Memory: 56 bytes.
///
/// ```
/// use countward::detect::{Sprt, SprtConfig, SprtDecision};
/// use countward::Ticks;
/// let config = SprtConfig::for_means(1.0_f64, 2.0, 0.05, 0.05, 1 << 16, 0).unwrap();
/// let mut t = Sprt::new(config);
/// let mut decision = SprtDecision::Continue;
/// let mut n = 0;
/// while decision == SprtDecision::Continue {
///     decision = t.update(Ticks(n), 4); // four counts per tick against 1 or 2
///     n += 1;
/// }
/// assert_eq!(decision, SprtDecision::RateIncrease);
/// assert_eq!(n, 2);
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Sprt {
    config: SprtConfig,
    llr: i64,
    ticks: u32,
    started: Ticks,
}

impl Sprt {
    /// A test at its start.
    pub const fn new(config: SprtConfig) -> Self {
        Sprt {
            config,
            llr: 0,
            ticks: 0,
            started: Ticks(0),
        }
    }

    /// Feeds the counts of tick `now`.
    pub fn update(&mut self, now: Ticks, counts: u32) -> SprtDecision {
        let c = &self.config;
        if self.ticks == 0 {
            self.started = now;
        }
        self.llr = self
            .llr
            .saturating_add(i64::from(counts).saturating_mul(c.per_count))
            .saturating_sub(c.per_tick);
        self.ticks = self.ticks.saturating_add(1);
        let decision = if self.llr >= c.upper {
            SprtDecision::RateIncrease
        } else if self.llr <= c.lower {
            SprtDecision::Background
        } else if c.max_ticks != 0 && self.ticks >= c.max_ticks {
            SprtDecision::Truncated
        } else {
            return SprtDecision::Continue;
        };
        self.llr = 0;
        self.ticks = 0;
        decision
    }

    /// The log-likelihood ratio in nats.
    pub fn llr_nats<F: Real>(&self) -> F {
        F::of(self.llr as f64) / F::of_u32(self.config.scale)
    }

    /// Ticks into the current test.
    pub const fn ticks(&self) -> u32 {
        self.ticks
    }
}

impl NextDeadline for Sprt {
    /// The tick at which a truncated test ends, if truncation is set and a
    /// test is running.
    fn next_deadline(&self) -> Option<Ticks> {
        if self.config.max_ticks == 0 || self.ticks == 0 {
            return None;
        }
        Some(self.started.plus(self.config.max_ticks - 1))
    }
}
