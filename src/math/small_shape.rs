//! P(a, x) and Q(a, x) for shapes below 1 near the origin, where Q is the
//! small side although the series for P converges: `1 − P` there loses every
//! digit of a small Q (Q(2e-12, 1e-12) ≈ 5.6e-11 came out 5.8e-5 off in
//! `f64`, and 0 in `f32`).
//!
//! Method (the Taylor-series treatment of Q for small arguments used by
//! Gautschi 1979, ACM TOMS 5:466–481, and by DiDonato & Morris 1986, ACM TOMS
//! 12:377–393; recalled from memory, the papers not re-read here, the
//! derivation below stands on its own): with `D = x^a/Γ(1 + a)`,
//!
//! `Q(a, x) = (1 − D) + D · a · Σ_{n≥1} (−1)^{n+1} x^n / (n! (a + n))`,
//!
//! from the series `P = D (1 + a Σ_{n≥1} (−x)^n/(n! (a + n)))` (DLMF 8.7.1
//! rearranged). `1 − D = −expm1(a ln x − ln Γ(1 + a))` keeps its relative
//! accuracy however close D is to 1, provided ln Γ(1 + a) is accurate in
//! *relative* terms for small a, which `lgamma(1 + a)` is not (forming 1 + a
//! already rounds away the digits of a). It comes from Abramowitz & Stegun
//! (1964) eq. 6.1.33,
//!
//! `ln Γ(1 + a) = −ln(1 + a) + a (1 − γ) + Σ_{k≥2} (−1)^k (ζ(k) − 1)/k · a^k`,
//!
//! whose terms fall like `(a/2)^k/k`.

use crate::Real;

/// Euler's constant γ (computed with mpmath to 25 digits, `tests/reference/gen_small_shape.py`).
const EULER_GAMMA: f64 = 0.577_215_664_901_532_9;

/// (ζ(k) − 1)/k for k = 2..40, the coefficients of A&S 6.1.33 (computed with
/// mpmath at 50 digits by `tests/reference/gen_small_shape.py`).
#[allow(clippy::excessive_precision)]
const LN_GAMMA_1P_ZETA: [f64; 39] = [
    3.22467033424113203e-01, // k = 2
    6.73523010531981020e-02, // k = 3
    2.05808084277845464e-02, // k = 4
    7.38555102867398568e-03, // k = 5
    2.89051033074152336e-03, // k = 6
    1.19275391170326102e-03, // k = 7
    5.09669524743042450e-04, // k = 8
    2.23154758453579386e-04, // k = 9
    9.94575127818085310e-05, // k = 10
    4.49262367381331420e-05, // k = 11
    2.05072127756706911e-05, // k = 12
    9.43948827526839672e-06, // k = 13
    4.37486678990748817e-06, // k = 14
    2.03921575380136619e-06, // k = 15
    9.55141213040741935e-07, // k = 16
    4.49246919876456619e-07, // k = 17
    2.12071848055546646e-07, // k = 18
    1.00432248239680991e-07, // k = 19
    4.76981016936398040e-08, // k = 20
    2.27110946089431635e-08, // k = 21
    1.08386592148969546e-08, // k = 22
    5.18347504197004664e-09, // k = 23
    2.48367454380247848e-09, // k = 24
    1.19214014058609115e-09, // k = 25
    5.73136724167886225e-10, // k = 26
    2.75952288512423336e-10, // k = 27
    1.33047643742444888e-10, // k = 28
    6.42296456383809960e-11, // k = 29
    3.10442477473222756e-11, // k = 30
    1.50213840807541417e-11, // k = 31
    7.27597448023907917e-12, // k = 32
    3.52774247657591507e-12, // k = 33
    1.71199179055961798e-12, // k = 34
    8.31538584142028498e-13, // k = 35
    4.04220052528944019e-13, // k = 36
    1.96647563109661653e-13, // k = 37
    9.57363038783855557e-14, // k = 38
    4.66407602642837444e-14, // k = 39
    2.27373696006597242e-14, // k = 40
];

/// Below this shape ln Γ(1 + a) comes from the series; above, from `lgamma`.
const SERIES_MAX_SHAPE: f64 = 0.5;

/// The region of the small-shape method: shapes below 1, arguments below 1.5
/// (the alternating sum then needs at most ~25 terms and loses under one digit).
pub(crate) fn in_region<F: Real>(a: F, x: F) -> bool {
    a < F::ONE && x < F::of(1.5)
}

/// ln Γ(1 + a) for 0 ≤ a < 1, to a few ulp *relative* (also for tiny a,
/// where it is ≈ −γa).
pub(crate) fn ln_gamma_1p<F: Real>(a: F) -> F {
    if a >= F::of(SERIES_MAX_SHAPE) {
        return (F::ONE + a).ln_gamma_abs();
    }
    // |ln Γ(1 + a)| ≥ 0.24 a on [0, 1/2]: stop at a term below ε of that.
    let tol = a * F::EPSILON * F::of(0.1);
    let mut sum = F::ZERO;
    let mut power = -a; // (−a)^(k−1) before the update below
    for c in LN_GAMMA_1P_ZETA {
        power *= -a;
        let term = F::of(c) * power;
        sum += term;
        if term.abs() <= tol {
            break;
        }
    }
    -a.ln_1p() + a * F::of(1.0 - EULER_GAMMA) + sum
}

/// Q(a, x) for `in_region(a, x)` and x > 0, relative accuracy a few ε
/// wherever the result is normal. Cost: a logarithm, `expm1`, `exp`, up to
/// ~25 series terms and (a < 1/2) up to 27 terms of the ln Γ series.
pub(crate) fn upper<F: Real>(a: F, x: F) -> F {
    let ln_d = a * x.ln() - ln_gamma_1p(a);
    let one_minus_d = -ln_d.exp_m1();
    // −Σ_{n≥1} (−x)^n/(n! (a + n)): alternating, first term x/(1 + a).
    let mut power = F::ONE; // (−x)^n / n!
    let mut sum = F::ZERO;
    let mut n = F::ZERO;
    for _ in 0..64 {
        n += F::ONE;
        power *= -x / n;
        let term = power / (a + n);
        sum -= term;
        if term.abs() <= sum.abs() * F::EPSILON * F::HALF {
            break;
        }
    }
    one_minus_d + ln_d.exp() * a * sum
}
