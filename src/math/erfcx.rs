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
        by_product(y)
    } else {
        by_fraction(y)
    }
}

fn by_product<F: Real>(y: F) -> F {
    (y * y).exp() * y.erfc()
}

fn by_fraction<F: Real>(y: F) -> F {
    // Depth 24 is far beyond what y ≥ 9 needs for 1e-17 (terms fall like 1/(2y²)).
    let mut t = y;
    let mut k = 24u32;
    while k > 0 {
        t = y + F::of_u32(k) * F::HALF / t;
        k -= 1;
    }
    F::of(FRAC_1_SQRT_PI) / t
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn both_forms_agree_near_switch_f64() {
        for y in [20.0_f64, 24.0, 26.0, 26.5] {
            let (a, b) = (by_product(y), by_fraction(y));
            assert!((a / b - 1.0).abs() < 2e-13, "y = {y}: {a} vs {b}");
        }
    }

    #[test]
    fn both_forms_agree_near_switch_f32() {
        for y in [7.0_f32, 8.0, 9.0] {
            let (a, b) = (by_product(y), by_fraction(y));
            assert!((a / b - 1.0).abs() < 2e-6, "y = {y}: {a} vs {b}");
        }
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
