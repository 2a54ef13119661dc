//! The exponentially weighted rate: the digital form of an RC ratemeter.

use super::{RateReading, check_tick_s};
use crate::error::{Error, Param};
use crate::math::Real;

/// Largest smoothing shift: weight 2^-24, a time constant of 16.7 M ticks.
pub const MAX_SHIFT: u8 = 24;

/// An exponentially weighted moving average of counts per tick with weight
/// `a = 2^-shift`: `y ← y + a (x − y)`, once per tick.
///
/// * State in UQ32.32 counts per tick (32 guard bits), rounded to nearest, so
///   there is no dead band or bias from truncation.
/// * Start-up: the first tick has weight 1 and the weight halves as ticks
///   accumulate (`2^-min(shift, ⌊log2 n⌋)` at the n-th tick), which tracks
///   the running mean until the full time constant is reached instead of
///   creeping up from zero.
/// * Equivalent counting time (the plain count with the same variance at a
///   steady rate): `(2 − a)/a` ticks, since `Var(y) = a/(2 − a)·μ`
///   (first-order recursive filter; Schiff & Evans 1936 give 2RC for the
///   analog meter). Relative standard uncertainty `√(a/((2 − a) μ))`.
/// * Time constant `−Δ/ln(1 − a) ≈ 2^shift` ticks; 95% of a step after
///   about 3 time constants.
///
/// Cost per tick: a compare, a subtract, a shift and an add on `u64`.
/// Memory: 16 bytes.
///
/// ```
/// use countward::rate::SmoothedRate;
/// let mut r = SmoothedRate::new(4).unwrap(); // weight 1/16
/// for _ in 0..200 {
///     r.update(10);
/// }
/// let reading = r.reading(0.5_f64).unwrap().unwrap(); // half-second ticks
/// assert!((reading.rate_cps - 20.0).abs() < 1e-6);
/// // Relative uncertainty sqrt(a / ((2 - a) mu)) with a = 1/16, mu = 10:
/// let expected = (1.0_f64 / 16.0 / ((2.0 - 1.0 / 16.0) * 10.0)).sqrt();
/// assert!((reading.relative_uncertainty().unwrap() - expected).abs() < 1e-12);
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SmoothedRate {
    mean_q32: u64,
    ticks_seen: u32,
    shift: u8,
}

/// `d / 2^s` rounded to nearest (ties up): `(d + 2^(s−1)) >> s` without the
/// sum, which overflows for `d` near `u64::MAX`; never more than `d`.
const fn rounded_shift(d: u64, s: u8) -> u64 {
    if s == 0 {
        d
    } else {
        (d >> s) + ((d >> (s - 1)) & 1)
    }
}

impl SmoothedRate {
    /// A ratemeter of weight `2^-shift` (`shift` at most [`MAX_SHIFT`]).
    pub const fn new(shift: u8) -> Result<Self, Error> {
        if shift > MAX_SHIFT {
            return Err(Error::OutOfRange(Param::Shift));
        }
        Ok(SmoothedRate {
            mean_q32: 0,
            ticks_seen: 0,
            shift,
        })
    }

    /// A ratemeter that starts settled at `mean_q32` counts per tick
    /// (UQ32.32), e.g. a background known from calibration.
    pub const fn settled_at(shift: u8, mean_q32: u64) -> Result<Self, Error> {
        match Self::new(shift) {
            Ok(mut r) => {
                r.mean_q32 = mean_q32;
                r.ticks_seen = u32::MAX;
                Ok(r)
            }
            Err(e) => Err(e),
        }
    }

    /// The weight shift currently applied (smaller during start-up).
    pub const fn effective_shift(&self) -> u8 {
        let grown = if self.ticks_seen == 0 {
            0
        } else {
            self.ticks_seen.ilog2()
        };
        if grown < self.shift as u32 {
            grown as u8
        } else {
            self.shift
        }
    }

    /// Feeds the counts of one tick.
    pub fn update(&mut self, counts: u32) {
        self.ticks_seen = self.ticks_seen.saturating_add(1);
        // Settled (the usual case): the full shift, without the logarithm of
        // the tick count (a software count-leading-zeros on a Cortex-M0).
        let s = if self.ticks_seen >= 1u32 << self.shift {
            self.shift
        } else {
            self.effective_shift()
        };
        let x = u64::from(counts) << 32;
        // The step is at most the distance, so neither update can overflow,
        // whatever the state (a settled mean may be any u64).
        if x >= self.mean_q32 {
            self.mean_q32 += rounded_shift(x - self.mean_q32, s);
        } else {
            self.mean_q32 -= rounded_shift(self.mean_q32 - x, s);
        }
    }

    /// The smoothed counts per tick, UQ32.32 (0 before the first tick).
    pub const fn mean_per_tick_q32(&self) -> u64 {
        self.mean_q32
    }

    /// Ticks fed so far (saturating; `u32::MAX` when created settled).
    pub const fn ticks_seen(&self) -> u32 {
        self.ticks_seen
    }

    /// The weight 2^-shift in use.
    pub fn weight<F: Real>(&self) -> F {
        F::ONE / F::of_u64(1u64 << self.effective_shift())
    }

    /// Equivalent counting time in ticks: `(2 − a)/a`.
    pub fn equivalent_counting_ticks<F: Real>(&self) -> F {
        let a = self.weight::<F>();
        (F::TWO - a) / a
    }

    /// The time constant `−1/ln(1 − a)` in ticks (0 for `a = 1`, a
    /// ratemeter without memory).
    pub fn time_constant_ticks<F: Real>(&self) -> F {
        let a = self.weight::<F>();
        if a >= F::ONE {
            return F::ZERO;
        }
        -F::ONE / (-a).ln_1p()
    }

    /// The reading for a tick of `tick_s` seconds; `None` before the first tick.
    pub fn reading<F: Real>(&self, tick_s: F) -> Result<Option<RateReading<F>>, Error> {
        let tick_s = check_tick_s(tick_s)?;
        if self.ticks_seen == 0 {
            return Ok(None);
        }
        let mu = F::of_u64(self.mean_q32) / F::of(4_294_967_296.0);
        let t_eq = self.equivalent_counting_ticks::<F>();
        // Var(y) = a/(2 − a) · μ = μ / t_eq.
        let std_per_tick = (mu / t_eq).sqrt();
        let equivalent = (mu * t_eq + F::HALF).to_u64_saturating();
        Ok(Some(RateReading {
            rate_cps: mu / tick_s,
            std_uncertainty_cps: std_per_tick / tick_s,
            counts: equivalent,
            seconds: t_eq * tick_s,
        }))
    }
}
