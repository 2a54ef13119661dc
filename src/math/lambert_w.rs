//! Lambert W on both real branches: W₀ on [-1/e, ∞) and W₋₁ on [-1/e, 0).
//!
//! Method (Corless, Gonnet, Hare, Jeffrey & Knuth 1996, "On the Lambert W
//! function", Adv. Comput. Math. 5:329–359): starting values from the
//! branch-point series `W = -1 + p - p²/3 + 11p³/72 - …`, p = ±√(2(ex+1)),
//! near x = -1/e, and from the asymptotic `L₁ - L₂ + L₂/L₁` on the outer
//! parts, then Halley's iteration on `w eʷ - x` (or, where eʷ would overflow
//! or underflow, Newton's iteration on the logarithmic form `w + ln|w| - ln|x|`).
//! Stops when a step is below 4ε|w|, bounded to 32 steps.

use crate::Real;
use crate::error::{Error, Param};

/// 1/e.
const INV_E: f64 = 0.367_879_441_171_442_33;
/// Step bound.
const MAX_STEPS: u32 = 32;

fn check<F: Real>(x: F) -> Result<(), Error> {
    if !x.is_finite() {
        return Err(Error::NotFinite(Param::X));
    }
    if x < -F::of(INV_E) {
        return Err(Error::OutOfRange(Param::X));
    }
    Ok(())
}

fn at_least_one<F: Real>(v: F) -> F {
    if v > F::ONE { v } else { F::ONE }
}

/// Branch-point series in p (Corless et al. 1996, §4).
fn branch_series<F: Real>(p: F) -> F {
    const C: [f64; 7] = [
        -1.0,
        1.0,
        -1.0 / 3.0,
        11.0 / 72.0,
        -43.0 / 540.0,
        769.0 / 17280.0,
        -221.0 / 8505.0,
    ];
    let mut w = F::ZERO;
    for k in C.iter().rev() {
        w = w * p + F::of(*k);
    }
    w
}

/// Halley's iteration on f(w) = w eʷ - x. Stops when the step is below 4ε,
/// when the residual is down to its rounding noise (near the branch point
/// f'(w) → 0 and that noise alone moves w by more than 4ε), or when a step
/// stops shrinking (cycling at the last ulps).
fn halley<F: Real>(x: F, mut w: F) -> Result<F, Error> {
    let mut last_step = F::INFINITY;
    for _ in 0..MAX_STEPS {
        let ew = w.exp();
        let f = w * ew - x;
        let w1 = w + F::ONE;
        let noise = F::of(2.0) * F::EPSILON * (x.abs() + (w * ew).abs());
        if w1 == F::ZERO || f.abs() <= noise {
            return Ok(w);
        }
        let denom = ew * w1 - (w + F::TWO) * f / (F::TWO * w1);
        if denom == F::ZERO || !denom.is_finite() {
            return Ok(w);
        }
        let step = f / denom;
        if step.abs() >= last_step && last_step <= F::EPSILON.sqrt() * at_least_one(w.abs()) {
            return Ok(w);
        }
        last_step = step.abs();
        w -= step;
        if step.abs() <= F::of(4.0) * F::EPSILON * at_least_one(w.abs()) {
            return Ok(w);
        }
    }
    Err(Error::NoConvergence)
}

/// Newton's iteration on g(w) = w + ln|w| - ln|x|, for w away from 0 and -1.
fn log_newton<F: Real>(ln_abs_x: F, mut w: F) -> Result<F, Error> {
    for _ in 0..MAX_STEPS {
        let g = w + w.abs().ln() - ln_abs_x;
        let step = g / (F::ONE + F::ONE / w);
        w -= step;
        if step.abs() <= F::of(4.0) * F::EPSILON * w.abs() {
            return Ok(w);
        }
    }
    Err(Error::NoConvergence)
}

/// p² = 2(ex + 1), formed as 2e(x + 1/e) with 1/e split in two parts so that
/// points near the branch point keep their distance from it.
fn branch_distance<F: Real>(x: F) -> F {
    const INV_E_HI: f64 = 0.367_879_441_171_442_33;
    const INV_E_LO: f64 = -1.242_875_367_278_836_3e-17;
    F::TWO * F::of(core::f64::consts::E) * ((x + F::of(INV_E_HI)) + F::of(INV_E_LO))
}

/// The principal branch W₀(x): the solution w ≥ -1 of w eʷ = x, for x ≥ -1/e.
///
/// Accuracy: 4ε relative (f64, checked against mpmath values in the tests),
/// except within about √ε of -1/e, where the function is not Lipschitz and an
/// input rounding δ moves W by about √(2eδ). Cost: 1–4 Halley steps.
///
/// ```
/// use countward::math::lambert_w0;
/// // The omega constant, W₀(1) (Corless et al. 1996; DLMF 4.13).
/// assert!((lambert_w0(1.0_f64).unwrap() - 0.567_143_290_409_783_8).abs() < 1e-15);
/// ```
pub fn lambert_w0<F: Real>(x: F) -> Result<F, Error> {
    check(x)?;
    if x == F::ZERO {
        return Ok(F::ZERO);
    }
    let p2 = branch_distance(x);
    if p2 <= F::ZERO {
        return Ok(-F::ONE);
    }
    if x < F::of(-0.25) {
        return halley(x, branch_series(p2.sqrt()));
    }
    if x < F::of(3.0) {
        // ln(1 + x) is within 30% of W₀ on [-0.25, 3); Halley converges from it.
        return halley(x, x.ln_1p());
    }
    let l1 = x.ln();
    let l2 = l1.ln();
    log_newton(l1, l1 - l2 + l2 / l1)
}

/// The lower branch W₋₁(x): the solution w ≤ -1 of w eʷ = x, for -1/e ≤ x < 0.
///
/// Accuracy and cost as [`lambert_w0`]; x ≥ 0 is out of range.
///
/// ```
/// use countward::math::lambert_wm1;
/// // W₋₁(-0.1) = -3.5771520639572972 (computed: mpmath at 40 digits).
/// let w = lambert_wm1(-0.1_f64).unwrap();
/// assert!((w + 3.5771520639572972).abs() < 1e-14);
/// ```
pub fn lambert_wm1<F: Real>(x: F) -> Result<F, Error> {
    check(x)?;
    if x >= F::ZERO {
        return Err(Error::OutOfRange(Param::X));
    }
    let p2 = branch_distance(x);
    if p2 <= F::ZERO {
        return Ok(-F::ONE);
    }
    if x < F::of(-0.25) {
        return halley(x, branch_series(-p2.sqrt()));
    }
    let l1 = (-x).ln();
    let l2 = (-l1).ln();
    log_newton(l1, l1 - l2 + l2 / l1)
}
