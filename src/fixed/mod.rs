//! The integer-only tier, for MCUs without an FPU (Cortex-M0/M0+, small RISC-V).
//!
//! Nothing here uses floating point: the mean is a [`FixedMean`] (UQ32.32,
//! unsigned with 32 fractional bits), α is a [`FixedAlpha`] (ln α in Q32.32),
//! and all arithmetic is on `u64`/`i128`/`u128` with shifts, multiplies and
//! divides. The algorithms mirror the float tier: Loader's pmf, Temme's
//! uniform expansion near the mean (coefficients converted to Q62 integers at
//! compile time), positive-term sums elsewhere, and the same galloping and
//! bisection search. A `thumbv6m-none-eabi` build of this module links no
//! soft-float routine; CI checks the symbols of a firmware binary with `llvm-nm`.
//!
//! Accuracy: logarithms of tails within about 1e-9 absolute of the f64 tier
//! (measured in the tests), so thresholds agree with f64 except where α lies
//! within 1e-3 of a tail value (the documented rule; the measured disagreement
//! band is far narrower). Cost: about 10–25 tail evaluations, each a few
//! hundred 128-bit multiply/divide operations; this belongs on the cold path
//! (when the background estimate changes), never per pulse.
//!
//! ```
//! use countward::fixed::{FixedAlpha, FixedMean, alarm_threshold};
//! // 2.5 counts expected per window (e.g. 250 background counts over 100 windows),
//! // one false alarm in a million windows:
//! let mean = FixedMean::from_ratio(250, 100).unwrap();
//! let alpha = FixedAlpha::one_in(1_000_000).unwrap();
//! let t = alarm_threshold(mean, alpha).unwrap();
//! // The f64 tier agrees:
//! let f = countward::poisson::alarm_threshold(2.5_f64, 1e-6).unwrap();
//! assert_eq!(t.counts, f.counts);
//! ```

mod erfcx;
mod q64;
mod tail;

use crate::error::{Error, Param};
use crate::search::first_accepted;

/// Largest mean accepted: [`crate::poisson::MAX_MEAN`] (2e9) in UQ32.32.
pub(crate) const MAX_MEAN_RAW: u64 = 2_000_000_000u64 << 32;
/// Smallest ln α accepted: -1e5 (far below any practical false-alarm probability).
const MIN_LN_ALPHA_RAW: i64 = -100_000i64 << 32;

/// A Poisson mean (expected counts) in UQ32.32: `raw / 2^32` counts.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FixedMean(u64);

impl FixedMean {
    /// From the raw UQ32.32 value; at most 2e9 counts.
    pub const fn from_raw(raw: u64) -> Result<Self, Error> {
        if raw > MAX_MEAN_RAW {
            return Err(Error::OutOfRange(Param::Mean));
        }
        Ok(FixedMean(raw))
    }

    /// A whole number of counts.
    pub const fn from_counts(counts: u32) -> Result<Self, Error> {
        Self::from_raw((counts as u64) << 32)
    }

    /// `num / den` counts, rounded to the nearest 2^-32 (e.g. background
    /// counts summed over `den` windows). `den = 0` is an error, and so is a
    /// positive ratio below 2^-33 (it would round to a mean of 0).
    pub const fn from_ratio(num: u64, den: u64) -> Result<Self, Error> {
        if den == 0 {
            return Err(Error::OutOfRange(Param::Mean));
        }
        let q = (((num as u128) << 33) / den as u128).div_ceil(2);
        // A positive mean that rounds to 0 (below 2^-33 counts) cannot be
        // represented: refused, never answered as a mean of 0 (p = 0).
        if q > MAX_MEAN_RAW as u128 || (q == 0 && num > 0) {
            return Err(Error::OutOfRange(Param::Mean));
        }
        Self::from_raw(q as u64)
    }

    /// The raw UQ32.32 value.
    pub const fn raw(self) -> u64 {
        self.0
    }
}

/// A false-alarm probability α, held as ln α in Q32.32 (signed, 32
/// fractional bits), so that values far below 2^-64 are representable.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FixedAlpha(i64);

impl FixedAlpha {
    /// From ln α in Q32.32; must be negative (α < 1) and at least -1e5.
    pub const fn from_ln_raw(ln_q32: i64) -> Result<Self, Error> {
        if ln_q32 >= 0 || ln_q32 < MIN_LN_ALPHA_RAW {
            return Err(Error::OutOfRange(Param::Alpha));
        }
        Ok(FixedAlpha(ln_q32))
    }

    /// α = 1/n, "one false alarm in n checks"; n ≥ 2.
    pub fn one_in(n: u64) -> Result<Self, Error> {
        Self::from_ratio(1, n)
    }

    /// α = num/den with 0 < num < den.
    pub fn from_ratio(num: u64, den: u64) -> Result<Self, Error> {
        if num == 0 || num >= den {
            return Err(Error::OutOfRange(Param::Alpha));
        }
        let l = q64::ln(num as u128, 0) - q64::ln(den as u128, 0);
        Self::from_ln_raw(q64_to_q32(l))
    }

    /// ln α in Q32.32.
    pub const fn ln_raw(self) -> i64 {
        self.0
    }
}

/// A count threshold from the integer tier, with the logarithm of the tail
/// it achieves (Q32.32; `i64::MIN` stands for ln 0).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FixedThreshold {
    /// The threshold count.
    pub counts: u32,
    /// ln of the tail at `counts` (P(N ≥ n) for alarms, P(N ≤ n) for faults), Q32.32.
    pub ln_tail_q32: i64,
}

fn q64_to_q32(v: i128) -> i64 {
    if v == i128::MIN {
        return i64::MIN;
    }
    let r = (v + (1 << 31)) >> 32;
    r.clamp(i64::MIN as i128 + 1, i64::MAX as i128) as i64
}

/// ln P(N ≥ k) in Q64 (i128::MIN for ln 0).
fn ln_at_least_64(mean: FixedMean, k: u32) -> i128 {
    if k == 0 {
        0
    } else if mean.0 == 0 {
        i128::MIN
    } else {
        tail::tails(u64::from(k), mean.0).ln_lower()
    }
}

/// ln P(N ≤ k) in Q64.
fn ln_at_most_64(mean: FixedMean, k: u32) -> i128 {
    if mean.0 == 0 {
        0
    } else {
        tail::tails(u64::from(k) + 1, mean.0).ln_upper()
    }
}

/// ln P(N ≥ k) in Q32.32 for a Poisson count with mean `mean`
/// (`i64::MIN` when the probability is 0).
///
/// ```
/// use countward::fixed::{FixedMean, ln_at_least_q32};
/// // ln P(N ≥ 5 | μ = 1) = ln 0.0036598468273437123 = -5.610333982897 (mpmath).
/// let l = ln_at_least_q32(FixedMean::from_counts(1).unwrap(), 5);
/// assert!(((l as f64) / 4294967296.0 + 5.610_333_982_897).abs() < 1e-8);
/// ```
pub fn ln_at_least_q32(mean: FixedMean, k: u32) -> i64 {
    q64_to_q32(ln_at_least_64(mean, k))
}

/// ln P(N ≤ k) in Q32.32 for a Poisson count with mean `mean`.
pub fn ln_at_most_q32(mean: FixedMean, k: u32) -> i64 {
    q64_to_q32(ln_at_most_64(mean, k))
}

/// Start and stride for the search, in integers: the Cornish–Fisher quantile
/// μ ± √μ z + (z² - 1)/6 with z from Abramowitz & Stegun 26.2.23.
fn guess(mean: FixedMean, alpha: FixedAlpha, upper: bool) -> (u32, u32) {
    let ln_a = -(alpha.0 as i128); // Q32, > 0
    // α > 1/2 never gives a useful start from this side; use the mean.
    let mu_int = (mean.0 >> 32) as i128;
    if ln_a < (2_977_044_471i128) {
        // ln 2 in Q32
        return (mu_int as u32, 2);
    }
    let one: i128 = 1 << 32;
    let t = q64::isqrt((2 * ln_a as u128) << 32) as i128; // √(-2 ln α), Q32
    // A&S 26.2.23 coefficients (from memory of the handbook) in Q32.
    const C0: i128 = 10_804_063_248; // 2.515517
    const C1: i128 = 3_448_227_378; // 0.802853
    const C2: i128 = 44_358_422; // 0.010328
    const D1: i128 = 6_153_777_602; // 1.432788
    const D2: i128 = 812_904_165; // 0.189269
    const D3: i128 = 5_617_817; // 0.001308
    let num = C0 + ((t * (C1 + ((t * C2) >> 32))) >> 32);
    let den = one + ((t * (D1 + ((t * (D2 + ((t * D3) >> 32))) >> 32))) >> 32);
    let z = t - (num << 32) / den; // Q32
    let s = q64::isqrt(u128::from(mean.0)) as i128; // √μ in Q16
    let zs = (z * s) >> 16; // Q32
    let corr = (((z * z) >> 32) - one) / 6;
    let q = (mean.0 as i128) + if upper { zs } else { -zs } + corr + one / 2;
    let n = (q >> 32).clamp(0, u32::MAX as i128) as u32;
    let stride = 2 + (s >> 16) / 1000;
    (n, stride as u32)
}

/// The alarm threshold (smallest n ≥ 1 with P(N ≥ n) ≤ α), integer-only.
///
/// Same definition as [`crate::poisson::alarm_threshold`]; see the
/// [module docs](self) for accuracy and cost.
pub fn alarm_threshold(mean: FixedMean, alpha: FixedAlpha) -> Result<FixedThreshold, Error> {
    let ln_alpha = i128::from(alpha.0) << 32;
    let (g, stride) = guess(mean, alpha, true);
    let n = first_accepted(1, u32::MAX, g.saturating_add(1), stride, |n| {
        Ok::<bool, Error>(ln_at_least_64(mean, n) <= ln_alpha)
    })?
    .ok_or(Error::NoConvergence)?;
    Ok(FixedThreshold {
        counts: n,
        ln_tail_q32: ln_at_least_q32(mean, n),
    })
}

/// The fault threshold (largest n with P(N ≤ n) ≤ α, or `None`), integer-only.
///
/// Same definition as [`crate::poisson::fault_threshold`].
///
/// ```
/// use countward::fixed::{FixedAlpha, FixedMean, fault_threshold};
/// let t = fault_threshold(FixedMean::from_counts(1000).unwrap(), FixedAlpha::one_in(10_000).unwrap()).unwrap();
/// let f = countward::poisson::fault_threshold(1000.0_f64, 1e-4).unwrap();
/// assert_eq!(t.map(|t| t.counts), f.map(|f| f.counts));
/// ```
pub fn fault_threshold(
    mean: FixedMean,
    alpha: FixedAlpha,
) -> Result<Option<FixedThreshold>, Error> {
    let ln_alpha = i128::from(alpha.0) << 32;
    let (g, stride) = guess(mean, alpha, false);
    let first_over = first_accepted(0, u32::MAX, g, stride, |n| {
        Ok::<bool, Error>(ln_at_most_64(mean, n) > ln_alpha)
    })?
    .ok_or(Error::NoConvergence)?;
    Ok(first_over.checked_sub(1).map(|n| FixedThreshold {
        counts: n,
        ln_tail_q32: ln_at_most_q32(mean, n),
    }))
}
