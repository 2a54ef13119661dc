//! Dead-time models: forward (true → measured) and inverse (measured → true).

use crate::error::{Error, Param, check_range};
use crate::math::{Real, bracket_split, lambert_w0, lambert_wm1};

/// Which dead-time behaviour a counter has.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum ModelKind {
    /// Non-paralyzable (non-extending, Feller's type I): `m = n/(1 + nτ)`.
    NonParalyzable,
    /// Paralyzable (extending, type II): `m = n e^{−nτ}`.
    Paralyzable,
    /// The hybrid model of Lee & Gardner (2000) with both dead times at
    /// once, in the paralysis-factor form of Patil & Usman (2009):
    /// `m = n e^{−n f τ}/(1 + n (1 − f) τ)`.
    Hybrid,
}

/// The model as a person reads it: `non-paralyzable`, `paralyzable`, `hybrid`.
impl core::fmt::Display for ModelKind {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        f.write_str(match self {
            ModelKind::NonParalyzable => "non-paralyzable",
            ModelKind::Paralyzable => "paralyzable",
            ModelKind::Hybrid => "hybrid",
        })
    }
}

/// Relative-uncertainty gain from which a corrected reading is flagged
/// [`Correction::saturated`]: where the correction multiplies the relative
/// uncertainty of the measured rate by 10 or more (for a paralyzable
/// counter, `nτ ≥ 0.9`). A choice of this library (common practice to
/// flag an over-range well before the maximum, no source).
pub const SATURATION_GAIN: f64 = 10.0;

/// A dead time τ and its model.
///
/// ```
/// use countward::deadtime::DeadTime;
/// // (computed; Knoll 2010 formulas; mpmath Lambert W): τ = 100 µs, m = 3000 cps.
/// let np = DeadTime::non_paralyzable(100e-6_f64).unwrap();
/// assert!((np.correct(3000.0).unwrap().true_cps - 4285.714).abs() < 1e-3);
/// let p = DeadTime::paralyzable(100e-6_f64).unwrap();
/// let c = p.correct(3000.0).unwrap();
/// assert!((c.true_cps - 4894.0223).abs() < 1e-3); // W₀: the physical branch
/// assert!((c.true_cps_high.unwrap() - 17813.37).abs() < 1e-2); // W₋₁: fold-back
/// assert!(p.correct(3700.0).is_err()); // above 1/(eτ) = 3678.79 cps: not a reading of this model
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct DeadTime<F> {
    kind: ModelKind,
    tau_s: F,
    fraction: F,
}

/// The inverse of a dead-time model at one measured rate.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Correction<F> {
    /// The true rate on the low-rate branch, counts per second: the physical
    /// solution under the assumption that the counter has not been driven
    /// past its maximum (the field rose from low values and the reading was
    /// followed continuously).
    pub true_cps: F,
    /// The other solution, above the rate of the maximum (fold-back branch)
    /// of a paralyzable or hybrid counter; `None` for a non-paralyzable
    /// counter (one solution), for a zero reading, and where the fold-back
    /// root lies beyond the float range (τ within a few hundred powers of ten
    /// of the smallest float).
    pub true_cps_high: Option<F>,
    /// `d ln n / d ln m` on the low branch: by how much the correction
    /// multiplies the relative uncertainty of the measured rate.
    pub gain: F,
    /// The reading lies where the correction is ill-conditioned (`gain` ≥
    /// [`SATURATION_GAIN`]): near the maximum of a paralyzable or hybrid
    /// counter, where the two branches approach and fold-back cannot be
    /// excluded, or deep in the losses of a non-paralyzable one. Treat as
    /// over-range, not as a number.
    pub saturated: bool,
}

impl<F: Real> DeadTime<F> {
    fn checked(kind: ModelKind, tau_s: F, fraction: F) -> Result<Self, Error> {
        let tau_s = check_range(tau_s, F::MIN_POSITIVE, F::of(1e3), Param::DeadTime)?;
        let fraction = check_range(fraction, F::ZERO, F::ONE, Param::Fraction)?;
        Ok(DeadTime {
            kind,
            tau_s,
            fraction,
        })
    }

    /// A non-paralyzable dead time of `tau_s` seconds.
    pub fn non_paralyzable(tau_s: F) -> Result<Self, Error> {
        Self::checked(ModelKind::NonParalyzable, tau_s, F::ZERO)
    }

    /// A paralyzable dead time of `tau_s` seconds.
    pub fn paralyzable(tau_s: F) -> Result<Self, Error> {
        Self::checked(ModelKind::Paralyzable, tau_s, F::ONE)
    }

    /// The hybrid model: total dead time `tau_s`, of which the fraction
    /// `paralyzable_fraction` (in [0, 1]) is extending (Lee & Gardner 2000;
    /// paralysis factor of Patil & Usman 2009).
    pub fn hybrid(tau_s: F, paralyzable_fraction: F) -> Result<Self, Error> {
        Self::checked(ModelKind::Hybrid, tau_s, paralyzable_fraction)
    }

    /// A model of the given kind; `paralyzable_fraction` is used by the hybrid only.
    pub fn of_kind(kind: ModelKind, tau_s: F, paralyzable_fraction: F) -> Result<Self, Error> {
        match kind {
            ModelKind::NonParalyzable => Self::non_paralyzable(tau_s),
            ModelKind::Paralyzable => Self::paralyzable(tau_s),
            ModelKind::Hybrid => Self::hybrid(tau_s, paralyzable_fraction),
        }
    }

    /// The model.
    pub fn kind(&self) -> ModelKind {
        self.kind
    }

    /// τ in seconds.
    pub fn tau_s(&self) -> F {
        self.tau_s
    }

    /// The extending fraction f (0 non-paralyzable, 1 paralyzable).
    pub fn paralyzable_fraction(&self) -> F {
        self.fraction
    }

    /// The extending and non-extending parts `(f τ, (1 − f) τ)`.
    pub(crate) fn parts(&self) -> (F, F) {
        match self.kind {
            ModelKind::NonParalyzable => (F::ZERO, self.tau_s),
            ModelKind::Paralyzable => (self.tau_s, F::ZERO),
            ModelKind::Hybrid => (
                self.fraction * self.tau_s,
                (F::ONE - self.fraction) * self.tau_s,
            ),
        }
    }

    fn forward(&self, n: F) -> F {
        let (a, b) = self.parts();
        n * (-n * a).exp() / (F::ONE + n * b)
    }

    /// `d ln m / d ln n` at true rate `n` (1 at low rates, 0 at the peak,
    /// negative beyond it): the inverse of [`Correction::gain`].
    pub fn log_slope(&self, n: F) -> F {
        let (a, b) = self.parts();
        F::ONE - n * a - n * b / (F::ONE + n * b)
    }

    /// `∂ ln m / ∂ τ` at fixed true rate `n` (τ scaled with f fixed).
    pub(crate) fn log_tau_slope(&self, n: F) -> F {
        let (a, b) = self.parts();
        let f = a / self.tau_s;
        -(f * n + (F::ONE - f) * n / (F::ONE + n * b))
    }

    /// The measured rate for a true rate `true_cps` (≥ 0).
    pub fn measured_cps(&self, true_cps: F) -> Result<F, Error> {
        let n = check_range(true_cps, F::ZERO, F::MAX, Param::RateCps)?;
        Ok(self.forward(n))
    }

    /// The true rate at which the measured rate peaks, and that peak, for
    /// models that have one (`None` for non-paralyzable, which tends to 1/τ).
    ///
    /// For `m = n e^{−na}/(1 + nb)` the peak is where `1 − na − n²ab = 0`:
    /// `n* = 2/(a + √(a² + 4ab))` (1/τ when paralyzable).
    pub fn peak(&self) -> Option<(F, F)> {
        let (a, _) = self.parts();
        if a <= F::ZERO {
            return None;
        }
        // In units of τ (a = fτ, b = (1 − f)τ), so that a² and ab cannot
        // underflow for tiny τ (they did below τ ≈ 1.5e-154: 26 % low).
        let f = match self.kind {
            ModelKind::Paralyzable => F::ONE,
            _ => self.fraction,
        };
        let n = F::TWO / self.tau_s / (f + (f * f + F::of(4.0) * f * (F::ONE - f)).sqrt());
        // A peak beyond the float range: the paralyzable part never shows.
        n.is_finite().then(|| (n, self.forward(n)))
    }

    /// The largest measured rate the model can produce: the peak, or 1/τ
    /// (not reached) for non-paralyzable.
    pub fn measured_limit_cps(&self) -> F {
        match self.peak() {
            Some((_, m)) => m,
            None => F::ONE / self.tau_s,
        }
    }

    /// Both true rates that give the measured rate `measured_cps`.
    ///
    /// Non-paralyzable: `n = m/(1 − mτ)`; paralyzable: `n = −W₀(−mτ)/τ` and
    /// `−W₋₁(−mτ)/τ` (Lambert W, Corless et al. 1996); hybrid: safeguarded
    /// Newton on `ln m(n)` on each side of the peak. A measured rate at or
    /// above the non-paralyzable limit 1/τ, or above the peak of the other
    /// models, is an error: no true rate produces it.
    pub fn correct(&self, measured_cps: F) -> Result<Correction<F>, Error> {
        let m = check_range(measured_cps, F::ZERO, F::MAX, Param::RateCps)?;
        let gain_limit = F::of(SATURATION_GAIN);
        let tau = self.tau_s;
        let (low, high) = match self.kind {
            // No peak (non-paralyzable, or a hybrid with f = 0): one closed-form solution.
            _ if self.peak().is_none() => {
                if m * tau >= F::ONE {
                    return Err(Error::OutOfRange(Param::RateCps));
                }
                (m / (F::ONE - m * tau), None)
            }
            ModelKind::Paralyzable => {
                let x = -m * tau;
                let limit = F::ONE / F::ONE.exp();
                if -x > limit * (F::ONE + F::EPSILON * F::of(4.0)) {
                    return Err(Error::OutOfRange(Param::RateCps));
                }
                if m == F::ZERO {
                    (F::ZERO, None)
                } else {
                    let x = if -x > limit { -limit } else { x };
                    let lo = -lambert_w0(x)? / tau;
                    let hi = -lambert_wm1(x)? / tau;
                    // For τ near the bottom of the float range the fold-back
                    // solution lies beyond it: no representable second root.
                    (lo, hi.is_finite().then_some(hi))
                }
            }
            _ => self.hybrid_inverse(m)?,
        };
        // A true rate beyond the float range is no reading (τ and m near the
        // ends of the range).
        if !low.is_finite() {
            return Err(Error::OutOfRange(Param::RateCps));
        }
        let slope = self.log_slope(low);
        let gain = if slope > F::ZERO {
            F::ONE / slope
        } else {
            F::INFINITY
        };
        Ok(Correction {
            true_cps: low,
            true_cps_high: high,
            gain,
            saturated: gain >= gain_limit,
        })
    }

    fn hybrid_inverse(&self, m: F) -> Result<(F, Option<F>), Error> {
        // `correct` handles the models without a peak in closed form.
        let (n_peak, m_peak) = self.peak().ok_or(Error::NoConvergence)?;
        if m > m_peak * (F::ONE + F::EPSILON * F::of(8.0)) {
            return Err(Error::OutOfRange(Param::RateCps));
        }
        if m == F::ZERO {
            return Ok((F::ZERO, None));
        }
        if m >= m_peak {
            return Ok((n_peak, Some(n_peak)));
        }
        let low = self.solve_branch(m, m, n_peak, true)?;
        // The high branch: bracket by doubling beyond the peak. Where the
        // bracket would leave the float range (τ near its bottom), the
        // fold-back root is not representable: no second solution.
        let mut hi = n_peak * F::TWO;
        loop {
            if !hi.is_finite() {
                return Ok((low, None));
            }
            if self.forward(hi) <= m {
                break;
            }
            hi *= F::TWO; // at most ~2100 doublings from a positive normal
        }
        let high = self.solve_branch(m, n_peak, hi, false)?;
        Ok((low, Some(high)))
    }

    /// The root of `forward(n) = m` in `[lo, hi]`, where `ln forward − ln m`
    /// rises (`rising`: the low branch) or falls (the high branch). The
    /// direction is known, not read off `g(lo)`: next to the peak `g(lo)` is
    /// within rounding of 0 and its sign is noise (the fold-back root came
    /// out 26 % off within 1e-15 of the peak). Newton where it stays in the
    /// bracket; else bisection, geometric while the bracket spans more than
    /// a factor 4 (an arithmetic one needed over 200 halvings for brackets
    /// like [500, 3e67], the peak of a hybrid with f = 1e-130).
    fn solve_branch(&self, m: F, mut lo: F, mut hi: F, rising: bool) -> Result<F, Error> {
        let target = m.ln();
        let g = |n: F| -> F { self.forward(n).ln() - target };
        let mut n = bracket_split(lo, hi);
        for _ in 0..400 {
            let v = g(n);
            if v == F::ZERO {
                return Ok(n);
            }
            if (v < F::ZERO) == rising {
                lo = n;
            } else {
                hi = n;
            }
            let d = self.log_slope(n) / n;
            let newton = n - v / d;
            let next = if d != F::ZERO && newton > lo && newton < hi {
                newton
            } else {
                bracket_split(lo, hi)
            };
            if (next - n).abs() <= F::EPSILON * F::of(4.0) * n
                || hi - lo <= F::EPSILON * F::of(4.0) * hi
            {
                return Ok(next);
            }
            n = next;
        }
        Err(Error::NoConvergence)
    }
}
