//! The scaled complementary error function `erfcx(y) = e^{y²} erfc(y)` for y ≥ 0.
//!
//! `libm` has no `erfcx`; the log-form Poisson tails need it where `erfc`
//! underflows. Method: `e^{y²} erfc(y)` with libm's `erfc` (FreeBSD msun
//! rational approximations) below a switch point (26 in f64, 9 in f32, where
//! `erfc` is still far above underflow), and Laplace's continued fraction
//! `erfcx(y) = (1/√π) / (y + (1/2)/(y + 1/(y + (3/2)/(y + …))))` above it
//! (DLMF 7.9.2), evaluated bottom-up with a fixed depth.

use crate::Real;

/// 1/√π.
const FRAC_1_SQRT_PI: f64 = 0.564_189_583_547_756_3;

/// `e^{y²} erfc(y)` for y ≥ 0 (callers guarantee the sign).
///
/// Accuracy: a few ulp of the type, plus the rounding of `y²` (relative
/// `2 ε y²` near the switch point, 1.5e-13 in f64 at y = 26).
pub(crate) fn erfcx<F: Real>(y: F) -> F {
    if y < F::ERFCX_FRACTION_FROM {
        (y * y).exp() * y.erfc()
    } else {
        // Depth 24 is far beyond what y ≥ 9 needs for 1e-17 (terms fall like 1/(2y²)).
        let mut t = y;
        let mut k = 24u32;
        while k > 0 {
            t = y + F::of_u32(k) * F::HALF / t;
            k -= 1;
        }
        F::of(FRAC_1_SQRT_PI) / t
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn continuous_at_switch_f64() {
        let below = erfcx(25.999_999_f64);
        let above = erfcx(26.0_f64);
        assert!((below / above - 1.0).abs() < 1e-12);
    }

    #[test]
    fn continuous_at_switch_f32() {
        let below = erfcx(8.999_9_f32);
        let above = erfcx(9.0_f32);
        assert!((below / above - 1.0).abs() < 1e-5);
    }

    #[test]
    fn asymptote() {
        // erfcx(y) ~ 1/(y sqrt(pi)) (1 - 1/(2y^2)); DLMF 7.12.1.
        let y = 1e4_f64;
        let approx = FRAC_1_SQRT_PI / y * (1.0 - 0.5 / (y * y));
        assert!((erfcx(y) / approx - 1.0).abs() < 1e-15);
        assert_eq!(erfcx(0.0_f64), 1.0);
    }
}
