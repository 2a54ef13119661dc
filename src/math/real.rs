//! The floating-point types the numeric core works in (`f32` and `f64`).
//!
//! Every elementary function is called explicitly through the `libm` crate,
//! on every target, so host tests exercise exactly the arithmetic that
//! firmware runs (no dispatch through std's platform math).

use core::ops::{Add, AddAssign, Div, DivAssign, Mul, MulAssign, Neg, Sub, SubAssign};

mod sealed {
    pub trait Sealed {}
    impl Sealed for f32 {}
    impl Sealed for f64 {}
}

/// A floating-point type the core computes in: implemented for `f32` and `f64` only.
///
/// The constants that tune the algorithms to the precision of the type
/// (number of series terms, switch points) live here, so the `f32` and `f64`
/// tiers share one implementation of each method.
pub trait Real:
    sealed::Sealed
    + Copy
    + PartialOrd
    + core::fmt::Debug
    + core::fmt::Display
    + Add<Output = Self>
    + Sub<Output = Self>
    + Mul<Output = Self>
    + Div<Output = Self>
    + Neg<Output = Self>
    + AddAssign
    + SubAssign
    + MulAssign
    + DivAssign
{
    /// 0.
    const ZERO: Self;
    /// 1.
    const ONE: Self;
    /// 1/2.
    const HALF: Self;
    /// 2.
    const TWO: Self;
    /// Machine epsilon.
    const EPSILON: Self;
    /// Smallest positive normal number.
    const MIN_POSITIVE: Self;
    /// Positive infinity.
    const INFINITY: Self;
    /// Largest finite value.
    const MAX: Self;
    /// Number of Temme coefficients `c_k` used for this precision.
    const TEMME_TERMS: usize;
    /// Number of powers of eta used in each `c_k`.
    const TEMME_DEGREE: usize;
    /// Above this argument `erfcx` uses its continued fraction (below it, `exp(y²) erfc(y)`).
    const ERFCX_FRACTION_FROM: Self;
    /// Largest integer shape for which the prefactor x^a e^{-x}/Γ(a+1) is formed as a
    /// product (0: never). Used by `f32`, whose logarithmic form would round the
    /// exponent of tails near 1e-30 by several ulp.
    const PRODUCT_MAX_SHAPE: u32;
    /// Whether Loader's deviance is summed in double-word (compensated)
    /// arithmetic: `f32`, where a plain sum loses several ulp of an exponent near 60.
    const COMPENSATED_DEVIANCE: bool;
    /// Veltkamp's splitting constant 2^⌈p/2⌉ + 1 for this precision.
    const SPLITTER: Self;

    /// Converts from `f64` (rounding to nearest); used for constants.
    fn of(v: f64) -> Self;
    /// Converts a count (exact in `f64`; exact in `f32` up to 2^24).
    fn of_u32(n: u32) -> Self;
    /// e^x.
    fn exp(self) -> Self;
    /// Natural logarithm.
    fn ln(self) -> Self;
    /// ln(1 + x), accurate for small x.
    fn ln_1p(self) -> Self;
    /// e^x − 1, accurate for small x.
    fn exp_m1(self) -> Self;
    /// Square root.
    fn sqrt(self) -> Self;
    /// Absolute value.
    fn abs(self) -> Self;
    /// Largest integer not above the value.
    fn floor(self) -> Self;
    /// Complementary error function.
    fn erfc(self) -> Self;
    /// ln |Γ(x)|.
    fn ln_gamma_abs(self) -> Self;
    /// True unless NaN or infinite.
    fn is_finite(self) -> bool;
    /// True for NaN.
    fn is_nan(self) -> bool;
    /// Saturating conversion to `u32` (NaN → 0), after truncation toward zero.
    fn to_u32_saturating(self) -> u32;
    /// Saturating conversion to `u64` (NaN → 0), after truncation toward zero.
    fn to_u64_saturating(self) -> u64;
    /// Converts a 64-bit count (rounding to nearest above 2^53 or 2^24).
    fn of_u64(n: u64) -> Self;
}

macro_rules! impl_real {
    ($t:ty, $exp:path, $expm1:path, $ln:path, $ln1p:path, $sqrt:path, $floor:path,
     $erfc:path, $lgamma:path, $terms:expr, $degree:expr, $erfcx_from:expr, $product:expr,
     $compensated:expr, $splitter:expr) => {
        impl Real for $t {
            const ZERO: Self = 0.0;
            const ONE: Self = 1.0;
            const HALF: Self = 0.5;
            const TWO: Self = 2.0;
            const EPSILON: Self = <$t>::EPSILON;
            const MIN_POSITIVE: Self = <$t>::MIN_POSITIVE;
            const INFINITY: Self = <$t>::INFINITY;
            const MAX: Self = <$t>::MAX;
            const TEMME_TERMS: usize = $terms;
            const TEMME_DEGREE: usize = $degree;
            const ERFCX_FRACTION_FROM: Self = $erfcx_from;
            const PRODUCT_MAX_SHAPE: u32 = $product;
            const COMPENSATED_DEVIANCE: bool = $compensated;
            const SPLITTER: Self = $splitter;

            #[inline]
            fn of(v: f64) -> Self {
                v as $t
            }
            #[inline]
            fn of_u32(n: u32) -> Self {
                n as $t
            }
            #[inline]
            fn exp(self) -> Self {
                $exp(self)
            }
            #[inline]
            fn exp_m1(self) -> Self {
                $expm1(self)
            }
            #[inline]
            fn ln(self) -> Self {
                $ln(self)
            }
            #[inline]
            fn ln_1p(self) -> Self {
                $ln1p(self)
            }
            #[inline]
            fn sqrt(self) -> Self {
                $sqrt(self)
            }
            #[inline]
            fn abs(self) -> Self {
                <$t>::abs(self)
            }
            #[inline]
            fn floor(self) -> Self {
                $floor(self)
            }
            #[inline]
            fn erfc(self) -> Self {
                $erfc(self)
            }
            #[inline]
            fn ln_gamma_abs(self) -> Self {
                $lgamma(self)
            }
            #[inline]
            fn is_finite(self) -> bool {
                <$t>::is_finite(self)
            }
            #[inline]
            fn is_nan(self) -> bool {
                <$t>::is_nan(self)
            }
            #[inline]
            fn to_u32_saturating(self) -> u32 {
                self as u32
            }
            #[inline]
            fn to_u64_saturating(self) -> u64 {
                self as u64
            }
            #[inline]
            fn of_u64(n: u64) -> Self {
                n as $t
            }
        }
    };
}

impl_real!(
    f64,
    libm::exp,
    libm::expm1,
    libm::log,
    libm::log1p,
    libm::sqrt,
    libm::floor,
    libm::erfc,
    libm::lgamma,
    10,
    31,
    26.0,
    0,
    false,
    134_217_729.0
);
impl_real!(
    f32,
    libm::expf,
    libm::expm1f,
    libm::logf,
    libm::log1pf,
    libm::sqrtf,
    libm::floorf,
    libm::erfcf,
    libm::lgammaf,
    4,
    16,
    9.0,
    150,
    true,
    4097.0
);
