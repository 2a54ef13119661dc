//! Bench methods that measure τ: two sources, a decaying source, and the
//! distribution of intervals between time stamps.

use super::model::{DeadTime, ModelKind};
use crate::error::{Error, Param, check_range};
use crate::math::{Real, gamma_q};

/// The result of the two-source method.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct TwoSource<F> {
    /// τ from the exact solution for a non-paralyzable counter, seconds.
    pub dead_time_s: F,
    /// Its standard uncertainty from counting statistics (when the counting
    /// time is known).
    pub std_uncertainty_s: Option<F>,
    /// The small-loss approximation with background (from `n ≈ m (1 + mτ)`),
    /// `(m1 + m2 − m12 − mb)/(m12² + mb² − m1² − m2²)`; meaningless at large
    /// losses (it can even exceed the exact τ several times).
    pub first_order_s: F,
    /// The common approximation without background, `(m1 + m2 − m12)/(2 m1 m2)`.
    pub simple_s: F,
}

fn two_source_exact<F: Real>(m1: F, m2: F, m12: F, mb: F) -> Option<F> {
    let x = m1 * m2 - mb * m12;
    let y = m1 * m2 * (m12 + mb) - mb * m12 * (m1 + m2);
    let loss = m1 + m2 - m12 - mb;
    if !(x > F::ZERO && y > F::ZERO && loss > F::ZERO) {
        return None;
    }
    let z = y * loss / (x * x);
    if !(z <= F::ONE) {
        return None;
    }
    // τ = X (1 − √(1 − Z))/Y, written without cancellation.
    Some(x * z / (y * (F::ONE + (F::ONE - z).sqrt())))
}

/// The two-source method: rates of source A alone, B alone, both, and
/// background (all measured rates, counts per second), for a
/// non-paralyzable counter with `n_a + n_b = n_ab + n_bg`.
///
/// Exact solution (Knoll 2010, ch. 4): with `X = m1 m2 − mb m12`,
/// `Y = m1 m2 (m12 + mb) − mb m12 (m1 + m2)`, `Z = Y (m1 + m2 − m12 − mb)/X²`,
/// `τ = X (1 − √(1 − Z))/Y`. When `seconds` (the counting time of each of the
/// four measurements) is given, the uncertainty of τ is propagated by
/// numerical derivatives from the variance of a rate recorded behind a
/// non-paralyzable dead time, `Var(m) = m (1 − mτ)²/t` (Müller 1973; plain
/// Poisson `m/t` would overstate it by up to 4× at 50% losses), and a τ smaller than twice its
/// uncertainty is [`Error::NotDetermined`]. Data without a real solution
/// (no loss, `Z > 1`) are `NotDetermined` too.
///
/// ```
/// use countward::deadtime::two_source;
/// // Computed (data generated with the model, τ = 200 µs):
/// let r = two_source(1431.1206_f64, 1876.9519, 2501.2494, 4.995005, None).unwrap();
/// assert!((r.dead_time_s - 2.000e-4).abs() < 1e-7);
/// assert!((r.simple_s - 1.50e-4).abs() < 5e-7); // 25% low at these losses
/// ```
pub fn two_source<F: Real>(
    a_cps: F,
    b_cps: F,
    ab_cps: F,
    background_cps: F,
    seconds: Option<F>,
) -> Result<TwoSource<F>, Error> {
    let m1 = check_range(a_cps, F::MIN_POSITIVE, F::MAX, Param::RateCps)?;
    let m2 = check_range(b_cps, F::MIN_POSITIVE, F::MAX, Param::RateCps)?;
    let m12 = check_range(ab_cps, F::MIN_POSITIVE, F::MAX, Param::RateCps)?;
    let mb = check_range(background_cps, F::ZERO, F::MAX, Param::RateCps)?;
    let t = match seconds {
        Some(s) => Some(check_range(s, F::MIN_POSITIVE, F::MAX, Param::Seconds)?),
        None => None,
    };
    let tau = two_source_exact(m1, m2, m12, mb).ok_or(Error::NotDetermined(Param::DeadTime))?;
    let first_order = (m1 + m2 - m12 - mb) / (m12 * m12 + mb * mb - m1 * m1 - m2 * m2);
    let simple = (m1 + m2 - m12) / (F::TWO * m1 * m2);
    let std_uncertainty_s = match t {
        None => None,
        Some(t) => {
            let rates = [m1, m2, m12, mb];
            // Steps relative to the scale of the data, not of each rate: a
            // step relative to a tiny (even subnormal) background is no step
            // at all, and its difference quotient was NaN. A rate smaller
            // than its step gets a one-sided (forward) difference.
            let big = |u: F, v: F| if u > v { u } else { v };
            let scale = big(big(m1, m2), m12);
            let h = scale * F::EPSILON.sqrt() * F::of(8.0);
            let mut var = F::ZERO;
            for i in 0..4 {
                if rates[i] == F::ZERO {
                    continue;
                }
                let mut up = rates;
                let mut down = rates;
                up[i] += h;
                let central = rates[i] > h;
                if central {
                    down[i] -= h;
                }
                let (Some(tu), Some(td)) = (
                    two_source_exact(up[0], up[1], up[2], up[3]),
                    two_source_exact(down[0], down[1], down[2], down[3]),
                ) else {
                    return Err(Error::NotDetermined(Param::DeadTime));
                };
                let d = (tu - td) / if central { F::TWO * h } else { h };
                let live = F::ONE - rates[i] * tau;
                var += d * d * rates[i] * live * live / t;
            }
            let sd = var.sqrt();
            // No NaN or infinity leaves as a result.
            if !sd.is_finite() || tau < F::TWO * sd {
                return Err(Error::NotDetermined(Param::DeadTime));
            }
            Some(sd)
        }
    };
    Ok(TwoSource {
        dead_time_s: tau,
        std_uncertainty_s,
        first_order_s: first_order,
        simple_s: simple,
    })
}

/// One measurement of a decaying source.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct DecayPoint<F> {
    /// When (start of the series = 0), seconds.
    pub time_s: F,
    /// The measured rate, counts per second.
    pub measured_cps: F,
    /// The counting time behind the rate, seconds (`None` if unknown).
    pub counting_s: Option<F>,
}

/// A fit of one dead-time model to a decaying-source series.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct DecayFit<F> {
    /// The model fitted (the hybrid with its fixed paralyzable fraction).
    pub model: DeadTime<F>,
    /// τ, seconds.
    pub dead_time_s: F,
    /// Its standard uncertainty.
    pub dead_time_sd_s: F,
    /// The true rate at time 0, counts per second.
    pub initial_cps: F,
    /// Its standard uncertainty.
    pub initial_sd_cps: F,
    /// Weighted sum of squared residuals.
    pub chi2: F,
    /// Degrees of freedom (points − 2).
    pub dof: u32,
    /// Whether the weights came from the counting times (so `chi2/dof ≈ 1`
    /// for a good fit); otherwise the weights are relative (`1/m`) and the
    /// uncertainties are scaled by the scatter of the residuals.
    pub weighted_by_counts: bool,
    decay_per_s: F,
}

impl<F: Real> DecayFit<F> {
    /// The fitted measured rate at `time_s`.
    pub fn predicted_cps(&self, time_s: F) -> F {
        let n = self.initial_cps * (-self.decay_per_s * time_s).exp();
        self.model.measured_cps(n).unwrap_or(F::ZERO)
    }

    /// The standardized residual of a point: `(m − fit)/σ`, with σ from the
    /// fit's weights (scaled by the scatter when they were relative).
    pub fn residual(&self, p: &DecayPoint<F>) -> F {
        let w = VarianceModel {
            model: self.model,
            n0: self.initial_cps,
            lambda: self.decay_per_s,
            weighted: self.weighted_by_counts,
        }
        .weight(p);
        let scale = if self.weighted_by_counts {
            F::ONE
        } else {
            self.chi2 / F::of_u32(self.dof.max(1))
        };
        (p.measured_cps - self.predicted_cps(p.time_s)) * (w / scale).sqrt()
    }
}

/// Fits τ and the initial true rate of a decaying source (half-life
/// `half_life_s`) to a series of measured rates, for one model
/// (`paralyzable_fraction` is used by the hybrid only).
///
/// Method: the linearizations of Knoll (2010, ch. 4) give the start —
/// non-paralyzable `m e^{λt} = n0 − n0 τ m`, paralyzable
/// `λt + ln m = ln n0 − n0 τ e^{−λt}` — then weighted least squares of the
/// measured rates (Levenberg–Marquardt on `(n0, τ)`, three passes of
/// reweighting), weights `1/Var(m_i)` with the variance of a count recorded
/// behind the model's dead time (Müller 1973) when every point has its
/// counting time, `1/m_i` otherwise.
/// Uncertainties from the inverse normal matrix (scaled by `χ²/dof` in the
/// second case). Needs at least 3 points; a τ not larger than twice its
/// uncertainty is [`Error::NotDetermined`] (the losses are too small to show).
///
/// ```
/// use countward::deadtime::{DeadTime, DecayPoint, ModelKind, fit_decay};
/// // A source of 2.6 h half-life seen by a paralyzable counter with τ = 80 µs
/// // (exact model values, so the fit returns the model).
/// let model = DeadTime::paralyzable(80e-6_f64).unwrap();
/// let lambda = 2f64.ln() / (2.6 * 3600.0);
/// let points: Vec<_> = (0..24)
///     .map(|i| {
///         let t = 1800.0 * i as f64;
///         let m = model.measured_cps(9000.0 * (-lambda * t).exp()).unwrap();
///         DecayPoint { time_s: t, measured_cps: m, counting_s: Some(60.0) }
///     })
///     .collect();
/// let fit = fit_decay(&points, 2.6 * 3600.0, ModelKind::Paralyzable, 1.0).unwrap();
/// assert!((fit.dead_time_s / 80e-6 - 1.0).abs() < 1e-6);
/// assert!((fit.initial_cps / 9000.0 - 1.0).abs() < 1e-6);
/// ```
pub fn fit_decay<F: Real>(
    points: &[DecayPoint<F>],
    half_life_s: F,
    kind: ModelKind,
    paralyzable_fraction: F,
) -> Result<DecayFit<F>, Error> {
    let half = check_range(half_life_s, F::MIN_POSITIVE, F::MAX, Param::Seconds)?;
    check_range(paralyzable_fraction, F::ZERO, F::ONE, Param::Fraction)?;
    if points.len() < 3 {
        return Err(Error::NotDetermined(Param::Data));
    }
    let with_time = points.iter().filter(|p| p.counting_s.is_some()).count();
    if with_time != 0 && with_time != points.len() {
        return Err(Error::OutOfRange(Param::Data));
    }
    for p in points {
        check_range(p.time_s, -F::MAX, F::MAX, Param::Data)?;
        check_range(p.measured_cps, F::MIN_POSITIVE, F::MAX, Param::RateCps)?;
        if let Some(t) = p.counting_s {
            check_range(t, F::MIN_POSITIVE, F::MAX, Param::Seconds)?;
        }
    }
    let weighted = with_time == points.len();
    let lambda = F::of(core::f64::consts::LN_2) / half;
    let (n0, tau) = linear_start(points, lambda, kind == ModelKind::Paralyzable);
    let model_at = |tau: F| DeadTime::of_kind(kind, tau, paralyzable_fraction);
    // Iteratively reweighted: the weights use the variance of a recorded
    // count at the current estimate; three passes settle them.
    let mut fitted = (n0, tau);
    let mut last = None;
    for _ in 0..3 {
        let weights = VarianceModel {
            model: model_at(fitted.1)?,
            n0: fitted.0,
            lambda,
            weighted,
        };
        let fit = levenberg_marquardt(points, lambda, fitted, &weights, &model_at)?;
        fitted = (fit.0, fit.1);
        last = Some((fit, weights));
    }
    let ((n0, tau, chi2, normal), _) = last.ok_or(Error::NoConvergence)?;
    let dof = points.len() as u32 - 2;
    let scale = if weighted {
        F::ONE
    } else {
        chi2 / F::of_u32(dof)
    };
    let det = normal[0][0] * normal[1][1] - normal[0][1] * normal[1][0];
    if !(det > F::ZERO) {
        return Err(Error::NotDetermined(Param::DeadTime));
    }
    let var_n0 = normal[1][1] / det * scale;
    let var_tau = normal[0][0] / det * scale;
    let (sd_n0, sd_tau) = (var_n0.sqrt(), var_tau.sqrt());
    if !(tau > F::TWO * sd_tau) {
        return Err(Error::NotDetermined(Param::DeadTime));
    }
    Ok(DecayFit {
        model: model_at(tau)?,
        dead_time_s: tau,
        dead_time_sd_s: sd_tau,
        initial_cps: n0,
        initial_sd_cps: sd_n0,
        chi2,
        dof,
        weighted_by_counts: weighted,
        decay_per_s: lambda,
    })
}

/// Weights of the decay fit: `1/Var(m_i)`, with the variance of a count
/// recorded behind the dead time (as in
/// [`DeadTime::correct_with_uncertainty`]) when counting times are known,
/// else relative weights `1/m_i`.
struct VarianceModel<F> {
    model: DeadTime<F>,
    n0: F,
    lambda: F,
    weighted: bool,
}

impl<F: Real> VarianceModel<F> {
    fn weight(&self, p: &DecayPoint<F>) -> F {
        let m = p.measured_cps;
        let Some(t) = p.counting_s.filter(|_| self.weighted) else {
            return F::ONE / m;
        };
        let tau = self.model.tau_s();
        let n = self.n0 * (-self.lambda * p.time_s).exp();
        let factor = match self.model.kind() {
            ModelKind::NonParalyzable => (F::ONE - m * tau) * (F::ONE - m * tau),
            ModelKind::Paralyzable => F::ONE - F::TWO * n * tau * (-n * tau).exp(),
            ModelKind::Hybrid => F::ONE,
        };
        let floor = F::of(1e-3);
        t / (m * if factor > floor { factor } else { floor })
    }
}

type Normal<F> = [[F; 2]; 2];

/// Levenberg–Marquardt on `(n0, τ)` with Marquardt's diagonal scaling and
/// fixed weights; returns the estimate, its χ² and the normal matrix.
fn levenberg_marquardt<F: Real>(
    points: &[DecayPoint<F>],
    lambda: F,
    start: (F, F),
    weights: &VarianceModel<F>,
    model_at: &dyn Fn(F) -> Result<DeadTime<F>, Error>,
) -> Result<(F, F, F, Normal<F>), Error> {
    let weight = |p: &DecayPoint<F>| weights.weight(p);
    let chi2_at = |n0: F, tau: F| -> Result<F, Error> {
        let m = model_at(tau)?;
        let mut s = F::ZERO;
        for p in points {
            let pred = m.measured_cps(n0 * (-lambda * p.time_s).exp())?;
            let r = p.measured_cps - pred;
            s += weight(p) * r * r;
        }
        Ok(s)
    };
    let (mut n0, mut tau) = start;
    let mut chi2 = chi2_at(n0, tau)?;
    let mut mu = F::of(1e-3);
    let mut normal = [[F::ZERO; 2]; 2];
    for _ in 0..300 {
        let m = model_at(tau)?;
        let mut jtj = [[F::ZERO; 2]; 2];
        let mut jtr = [F::ZERO; 2];
        for p in points {
            let n = n0 * (-lambda * p.time_s).exp();
            let pred = m.measured_cps(n)?;
            let j = [pred * m.log_slope(n) / n0, pred * m.log_tau_slope(n)];
            let w = weight(p);
            let r = p.measured_cps - pred;
            for a in 0..2 {
                jtr[a] += w * j[a] * r;
                for b in 0..2 {
                    jtj[a][b] += w * j[a] * j[b];
                }
            }
        }
        normal = jtj;
        let mut improved = false;
        for _ in 0..40 {
            let a00 = jtj[0][0] * (F::ONE + mu);
            let a11 = jtj[1][1] * (F::ONE + mu);
            let det = a00 * a11 - jtj[0][1] * jtj[1][0];
            if !(det.abs() > F::ZERO) {
                return Err(Error::NotDetermined(Param::DeadTime));
            }
            let d0 = (jtr[0] * a11 - jtj[0][1] * jtr[1]) / det;
            let d1 = (a00 * jtr[1] - jtj[1][0] * jtr[0]) / det;
            let (n_new, t_new) = (n0 + d0, tau + d1);
            let trial = if n_new > F::ZERO && t_new > F::ZERO {
                chi2_at(n_new, t_new).ok()
            } else {
                None
            };
            if let Some(c) = trial.filter(|&c| c <= chi2) {
                let small = (d0 / n0).abs() < F::EPSILON * F::of(16.0)
                    && (d1 / tau).abs() < F::EPSILON * F::of(16.0);
                n0 = n_new;
                tau = t_new;
                let change = chi2 - c;
                chi2 = c;
                mu /= F::of(3.0);
                improved = !(small || change <= chi2 * F::EPSILON * F::of(4.0));
                break;
            }
            mu *= F::of(4.0);
        }
        if !improved {
            break;
        }
    }
    Ok((n0, tau, chi2, normal))
}

/// Start values from a straight-line fit (weighted by the measured rate):
/// non-paralyzable `y = m e^{λt}` against `x = m`; paralyzable
/// `y = λt + ln m` against `x = e^{−λt}` (intercept ln n0).
fn linear_start<F: Real>(points: &[DecayPoint<F>], lambda: F, paralyzable: bool) -> (F, F) {
    let (mut sw, mut sx, mut sy, mut sxx, mut sxy) = (F::ZERO, F::ZERO, F::ZERO, F::ZERO, F::ZERO);
    for p in points {
        let (x, y) = if paralyzable {
            (
                (-lambda * p.time_s).exp(),
                lambda * p.time_s + p.measured_cps.ln(),
            )
        } else {
            (p.measured_cps, p.measured_cps * (lambda * p.time_s).exp())
        };
        let w = p.measured_cps;
        sw += w;
        sx += w * x;
        sy += w * y;
        sxx += w * x * x;
        sxy += w * x * y;
    }
    let slope = (sw * sxy - sx * sy) / (sw * sxx - sx * sx);
    let intercept = (sy - slope * sx) / sw;
    let n0 = if paralyzable {
        intercept.exp()
    } else {
        intercept
    };
    let n_max = points.iter().fold(F::ZERO, |a, p| {
        if p.measured_cps > a {
            p.measured_cps
        } else {
            a
        }
    });
    let n0 = if n0.is_finite() && n0 >= n_max {
        n0
    } else {
        n_max * F::of(1.01)
    };
    let tau = -slope / n0;
    let floor = F::of(1e-3) / n0;
    let tau = if tau.is_finite() && tau > floor {
        tau
    } else {
        floor
    };
    (n0, tau)
}

/// τ from the intervals between time stamps.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct IntervalFit<F> {
    /// τ, seconds.
    pub dead_time_s: F,
    /// Its standard uncertainty.
    pub std_uncertainty_s: F,
    /// The true rate implied under a non-paralyzable dead time, counts per second.
    pub true_rate_cps: F,
    /// Intervals used.
    pub intervals: u32,
    /// χ² of the intervals beyond τ against the fitted exponential, in
    /// equiprobable bins.
    pub shape_chi2: F,
    /// Its degrees of freedom (bins − 3).
    pub shape_dof: u32,
    /// The χ² tail probability: small values say the intervals are not a
    /// shifted exponential (a paralyzable or hybrid counter at high rates,
    /// afterpulses, a non-Poisson source).
    pub shape_p_value: F,
}

/// Estimates τ from time stamps (seconds, non-decreasing) of recorded events.
///
/// Behind a non-paralyzable dead time the recorded intervals are `τ` plus
/// an exponential gap of the true rate n (renewal theory; Müller 1973). The
/// smallest interval is the maximum-likelihood estimate of the shift; the
/// unbiased (UMVU) estimate removes its bias `1/(N n)`:
/// `τ̂ = min − (mean − min)/(N − 1)`, with standard uncertainty
/// `(mean − min)/(N − 1)` (the spread of the minimum, `1/(N n)`), and
/// `n̂ = 1/(mean − τ̂)`. The shape of the distribution beyond τ̂ is checked by
/// χ² in up to 10 bins that are equiprobable under the fitted exponential
/// (p-value from the regularized gamma function; approximate, since two
/// parameters were fitted). Time-stamp resolution δ biases τ̂ by up to δ.
///
/// Needs at least 20 intervals; a τ̂ not larger than twice its uncertainty
/// (rates too low for the dead time to show) is [`Error::NotDetermined`].
/// Decreasing time stamps are [`Error::OutOfRange`] for [`Param::Data`].
///
/// ```
/// use countward::deadtime::fit_intervals;
/// // Intervals of 50 µs + a spread of gaps (deterministic here; a
/// // 3-cycle pattern of 20, 140 and 390 µs).
/// let mut t = 0.0_f64;
/// let mut stamps = vec![0.0];
/// for i in 0..300 {
///     t += 50e-6 + [20e-6, 140e-6, 390e-6][i % 3];
///     stamps.push(t);
/// }
/// let fit = fit_intervals(&stamps).unwrap();
/// // min 70 µs, mean 233.3 µs: τ = 70 µs − (233.3 − 70) µs / 299.
/// assert!((fit.dead_time_s - (70e-6 - (700e-6 / 3.0 - 70e-6) / 299.0)).abs() < 1e-12);
/// assert!(fit.shape_p_value < 1e-6); // not exponential at all
/// ```
pub fn fit_intervals<F: Real>(timestamps_s: &[F]) -> Result<IntervalFit<F>, Error> {
    if timestamps_s.len() < 21 {
        return Err(Error::NotDetermined(Param::Data));
    }
    let mut min = F::MAX;
    let mut sum = F::ZERO;
    for w in timestamps_s.windows(2) {
        check_range(w[0], -F::MAX, F::MAX, Param::Data)?;
        check_range(w[1], -F::MAX, F::MAX, Param::Data)?;
        let d = w[1] - w[0];
        if d < F::ZERO {
            return Err(Error::OutOfRange(Param::Data));
        }
        if d < min {
            min = d;
        }
        sum += d;
    }
    let n = (timestamps_s.len() - 1) as u32;
    let nf = F::of_u32(n);
    let mean = sum / nf;
    let excess = mean - min;
    if !(excess > F::ZERO) {
        return Err(Error::NotDetermined(Param::Data));
    }
    let sd = excess / (nf - F::ONE);
    let tau = min - sd;
    if !(tau > F::TWO * sd) {
        return Err(Error::NotDetermined(Param::DeadTime));
    }
    let rate = F::ONE / (mean - tau);
    // χ² of the shape in equiprobable bins.
    let bins = (n / 5).clamp(4, 10) as usize;
    let mut counts = [0u32; 10];
    for w in timestamps_s.windows(2) {
        let u = (w[1] - w[0] - tau) * rate; // Exp(1) under the model
        let cdf = if u > F::ZERO {
            F::ONE - (-u).exp()
        } else {
            F::ZERO
        };
        let b = (cdf * F::of_u32(bins as u32)).floor().to_u32_saturating() as usize;
        counts[b.min(bins - 1)] += 1;
    }
    let expected = nf / F::of_u32(bins as u32);
    let mut chi2 = F::ZERO;
    for &c in &counts[..bins] {
        let d = F::of_u32(c) - expected;
        chi2 += d * d / expected;
    }
    let dof = bins as u32 - 3;
    let p = gamma_q(F::of_u32(dof) * F::HALF, chi2 * F::HALF)?;
    Ok(IntervalFit {
        dead_time_s: tau,
        std_uncertainty_s: sd,
        true_rate_cps: rate,
        intervals: n,
        shape_chi2: chi2,
        shape_dof: dof,
        shape_p_value: p,
    })
}
