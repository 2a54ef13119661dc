//! Integer kernels in Q64 (i128/u128 with 64 fractional bits) and Q62:
//! natural logarithm, exponential and integer square root, using shifts,
//! adds, integer multiplies and divides only.

/// Fractional bits of the Q64 format.
pub(crate) const FRAC: u32 = 64;
/// 1.0 in Q64.
pub(crate) const ONE: i128 = 1 << FRAC;
/// 1.0 in Q62.
pub(crate) const ONE_62: i128 = 1 << 62;
/// ln 2 in Q64 (mpmath, 50 digits).
pub(crate) const LN2: i128 = 12_786_308_645_202_655_660;
/// ln √(2π) in Q64 (mpmath, 50 digits).
pub(crate) const LN_SQRT_2PI: i128 = 16_951_423_941_496_644_917;
/// 2π in Q62 (mpmath, 50 digits).
pub(crate) const TWO_PI_62: i128 = 28_976_077_832_308_491_370;
/// 1/√π in Q62 (mpmath, 50 digits).
pub(crate) const FRAC_1_SQRT_PI_62: i128 = 2_601_865_214_189_558_307;
/// 2/√π in Q62 (mpmath, 50 digits).
pub(crate) const FRAC_2_SQRT_PI_62: i128 = 5_203_730_428_379_116_615;

/// Position of the highest set bit (x > 0).
fn msb(x: u128) -> u32 {
    127 - x.leading_zeros()
}

/// ln(x / 2^frac) in Q64, for x > 0; `i128::MIN` for x = 0 (ln 0 = -∞).
///
/// Method: x = 2^e·m with m ∈ [1, 2) by a shift, then
/// ln m = 2 atanh(s) = 2(s + s³/3 + s⁵/5 + …), s = (m-1)/(m+1) ∈ [0, 1/3),
/// summed in Q64 until the terms vanish (at most 21 terms).
/// Error: below 2^-60 absolute plus |e|·2^-64.
pub(crate) fn ln(x: u128, frac: u32) -> i128 {
    if x == 0 {
        return i128::MIN;
    }
    let top = msb(x);
    let e = top as i128 - frac as i128;
    // Mantissa in Q1.63 (u64 range), truncating the bits below.
    let m: u128 = if top >= 63 {
        x >> (top - 63)
    } else {
        x << (63 - top)
    };
    let one_63: u128 = 1 << 63;
    // s in Q64: (m - 1)/(m + 1).
    let s: u128 = ((m - one_63) << 64) / (m + one_63);
    let s2 = (s * s) >> 64;
    // s < 2^64/3 and s² < 2^64/9, so the terms fit a u64; dividing a u64
    // (not a u128) keeps this cheap on cores without a divider.
    let mut term = s as u64;
    let s2 = s2 as u64;
    let mut sum = s;
    let mut k: u64 = 1;
    while term != 0 {
        term = ((u128::from(term) * u128::from(s2)) >> 64) as u64;
        k += 2;
        sum += u128::from(term / k);
    }
    e * LN2 + 2 * sum as i128
}

/// e^v for v in Q64, as a u128 in Q62; saturates at u128::MAX for v ≥ 65 ln 2
/// and gives 0 below -62 ln 2 (callers use it for v ≤ 16).
///
/// Method: v = k ln 2 + r with r ∈ [0, ln 2), e^r by its Taylor series in
/// Q62 (at most 27 terms), then a shift by k. Error: a few units of 2^-62
/// relative.
pub(crate) fn exp(v: i128) -> u128 {
    let k = v.div_euclid(LN2);
    let r = v.rem_euclid(LN2) >> 2; // Q62, 0 ≤ r < ln 2
    let r = r as u64;
    // Terms stay below 2^62, so they are divided as u64 values.
    let mut term: u64 = 1 << 62;
    let mut sum: u128 = u128::from(term);
    let mut j: u64 = 1;
    while term != 0 {
        term = ((u128::from(term) * u128::from(r)) >> 62) as u64 / j;
        sum += u128::from(term);
        j += 1;
    }
    if k >= 65 {
        u128::MAX
    } else if k >= 0 {
        sum << k
    } else if k > -126 {
        sum >> (-k)
    } else {
        0
    }
}

/// ⌊√x⌋ for a u128, digit by digit (shifts, adds and compares only: no
/// division, which is a slow software routine on Cortex-M0).
pub(crate) fn isqrt(x: u128) -> u128 {
    if x < 2 {
        return x;
    }
    let mut rem = x;
    let mut root: u128 = 0;
    let mut bit: u128 = 1 << (msb(x) & !1);
    while bit != 0 {
        if rem >= root + bit {
            rem -= root + bit;
            root = (root >> 1) + bit;
        } else {
            root >>= 1;
        }
        bit >>= 2;
    }
    root
}

#[cfg(test)]
mod tests {
    use super::*;

    fn to_f64(q64: i128) -> f64 {
        q64 as f64 / 18_446_744_073_709_551_616.0
    }

    #[test]
    fn ln_matches_libm() {
        for &x in &[
            1.0_f64,
            1.5,
            2.0,
            3.0,
            1e-9,
            0.3,
            1e9,
            12345.678,
            1.0 + 1e-12,
        ] {
            let raw = (x * 4_294_967_296.0) as u128;
            let want = libm::log(raw as f64 / 4_294_967_296.0);
            let got = to_f64(ln(raw, 32));
            assert!(
                (got - want).abs() < 1e-14 * want.abs().max(1.0),
                "ln({x}) = {got}, want {want}"
            );
        }
        assert_eq!(ln(1 << 64, 64), 0);
        assert_eq!(ln(0, 64), i128::MIN);
    }

    #[test]
    fn exp_matches_libm() {
        for &v in &[0.0_f64, 0.5, 1.0, 4.0, 16.0, -1.0, -20.0, 0.693] {
            let q = (v * 18_446_744_073_709_551_616.0) as i128;
            let got = exp(q) as f64 / 4_611_686_018_427_387_904.0;
            let want = libm::exp(v);
            // Q62 output: relative 1e-14 for e^v ≥ 1, absolute 2^-60 below —
            // checked at that bound, plus the reference's own error (libm's
            // exp is within 1 ulp: 2.2e-16 of the value).
            if v >= 0.0 {
                let err = (got / want - 1.0).abs();
                assert!(err < 1e-14, "exp({v}) = {got}, want {want}");
            } else {
                let err = (got - want).abs();
                let tol = 2f64.powi(-60) + 2.3e-16 * want;
                assert!(
                    err <= tol,
                    "exp({v}) = {got}, want {want}: {err:e} > {tol:e}"
                );
            }
        }
    }

    #[test]
    fn isqrt_is_floor() {
        for x in [
            0u128,
            1,
            2,
            3,
            4,
            15,
            16,
            17,
            1 << 100,
            (1 << 100) + 12345,
            u128::MAX,
        ] {
            let r = isqrt(x);
            assert!(r * r <= x);
            assert!((r + 1).checked_mul(r + 1).is_none_or(|s| s > x));
        }
    }
}
