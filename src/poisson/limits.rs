//! Exact (Garwood 1936) confidence limits on a Poisson mean from an observed count.

use crate::Real;
use crate::error::{Error, Param, check_open_unit};
use crate::math::{gamma_p_inv, gamma_q_inv};

/// Lower and upper limits on a Poisson mean (in counts; divide by the
/// counting time for a rate).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct MeanLimits<F> {
    /// Lower limit (0 for zero counts).
    pub lower: F,
    /// Upper limit.
    pub upper: F,
}

/// Two-sided exact (Garwood) limits at confidence `level` for `counts`
/// observed counts: the central interval with (1 - level)/2 in each tail,
/// lower = ½χ²_{(1-L)/2}(2n), upper = ½χ²_{(1+L)/2}(2n + 2)
/// (Garwood 1936, Biometrika 28:437; Gehrels 1986, ApJ 303:336).
///
/// Solved as P(n, lower) = (1-L)/2 and Q(n+1, upper) = (1-L)/2 with
/// [`crate::math::gamma_p_inv`] / [`crate::math::gamma_q_inv`]. Domain:
/// 0 < level < 1, any count. Accuracy: relative 1e-12 (f64), 1e-5 (f32).
/// The interval is conservative (coverage ≥ level) because counts are discrete.
///
/// ```
/// use countward::poisson::exact_limits;
/// // 10 counts, 95%: [4.795389, 18.39036] (Garwood; computed: mpmath).
/// let l = exact_limits(10, 0.95_f64).unwrap();
/// assert!((l.lower - 4.795389).abs() < 1e-6 && (l.upper - 18.39036).abs() < 1e-5);
/// ```
pub fn exact_limits<F: Real>(counts: u32, level: F) -> Result<MeanLimits<F>, Error> {
    let level = check_open_unit(level, Param::Level)?;
    let tail = (F::ONE - level) * F::HALF;
    let lower = if counts == 0 {
        F::ZERO
    } else {
        gamma_p_inv(F::of_u32(counts), tail)?
    };
    let upper = gamma_q_inv(F::of_u32(counts) + F::ONE, tail)?;
    Ok(MeanLimits { lower, upper })
}

/// One-sided exact upper limit at confidence `level`: the mean U with
/// P(N ≤ counts | U) = 1 - level, i.e. ½χ²_L(2n + 2).
///
/// For zero counts this is -ln(1 - level) exactly (2.996 at 95%).
/// Domain, accuracy and cost as [`exact_limits`].
///
/// ```
/// use countward::poisson::exact_upper_limit;
/// // Zero counts, 95% one-sided: 2.995732 (Gehrels 1986; epitools "2.996").
/// let u = exact_upper_limit(0, 0.95_f64).unwrap();
/// assert!((u - 2.995_732_273_553_991).abs() < 1e-12);
/// ```
pub fn exact_upper_limit<F: Real>(counts: u32, level: F) -> Result<F, Error> {
    let level = check_open_unit(level, Param::Level)?;
    // Q(n + 1, u) = 1 − level, solved as P(n + 1, u) = level for small
    // levels (1 − level rounds to 1 below ε/2 and was refused).
    let shape = F::of_u32(counts) + F::ONE;
    if level < F::HALF {
        gamma_p_inv(shape, level)
    } else {
        gamma_q_inv(shape, F::ONE - level)
    }
}
