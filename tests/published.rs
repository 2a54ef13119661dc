//! Checks against published values and values computed outside this project.
//! Each value names its source: a published table or worked example, or
//! "computed" for a value computed with mpmath at 30–50 digits from the
//! named published formula (not a published number).

// Reference values are kept with every digit their source gives.
#![allow(clippy::excessive_precision, clippy::approx_constant)]

use countward::gap::{silence_probability, silence_threshold_s};
use countward::math::{gamma_q, lambert_w0, lambert_wm1};
use countward::poisson::{
    alarm_threshold, at_least, at_most, exact_limits, exact_upper_limit, fault_threshold, pmf,
};

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

/// P(N ≥ n): (computed; mpmath gammainc and 40-digit series agree).
#[test]
fn upper_tails_f64() {
    let cases: &[(u32, f64, f64)] = &[
        (5, 1.0, 0.0036598468273437123),
        (10, 3.0, 0.0011024881301154797),
        (20, 10.0, 0.0034543419758568077),
        (30, 10.0, 2.5099512015279078e-7),
        (150, 100.0, 1.88421046603867e-6),
        (1, 1e-6, 9.9999950000016662e-7),
        (2, 1e-6, 4.9999966666679162e-13),
        (10500, 1e4, 3.5995897948120386e-7),
        (10005000, 1e7, 0.056950256797463303),
        (10030000, 1e7, 1.2473934369422250e-21),
    ];
    for &(n, mu, want) in cases {
        let got = at_least(mu, n).unwrap().p;
        assert!(
            rel(got, want) < 1e-12,
            "P(N >= {n}; {mu}) = {got:e}, want {want:e}"
        );
    }
    // Rows 10 and 12 are quoted to 11–12 digits only.
    assert!(rel(at_least(1e7_f64, 10015811).unwrap().p, 2.8895717062e-7) < 1e-10);
    assert!(rel(at_least(1e6_f64, 1001000).unwrap().p, 0.158776219138) < 1e-11);
}

/// ln P tails: (computed; mpmath series).
#[test]
fn log_tails_f64() {
    assert!((at_least(10.0_f64, 100).unwrap().ln_p + 143.37672310061887).abs() < 1e-10);
    assert!((at_least(10.0_f64, 1000).unwrap().ln_p + 3619.53304535075).abs() < 1e-9);
    assert!((at_least(1e-6_f64, 200).unwrap().ln_p + 3626.334099780285).abs() < 1e-9);
    assert!((at_least(1e5_f64, 105000).unwrap().ln_p + 126.6264724894137).abs() < 1e-10);
    assert!((at_most(1000.0_f64, 10).unwrap().ln_p + 946.0168196296328).abs() < 1e-10);
    assert!((at_most(1e7_f64, 9990000).unwrap().ln_p + 7.153846254466808).abs() < 1e-10);
    assert!((pmf(1e7_f64, 10005000).unwrap().ln_p + 10.228028023268207).abs() < 1e-10);
}

/// Q(1e6 + 1, 1e6) = 0.500265961486284: pytensor issue #2291 quotes SciPy's
/// 0.5002659615 as correct; the value itself computed with mpmath.
#[test]
fn gamma_q_large_shape() {
    assert!(rel(gamma_q(1e6 + 1.0, 1e6).unwrap(), 0.500265961486284) < 1e-12);
}

/// Alarm thresholds n*: computed table (40-digit series, quadrature check
/// at 1e7), with the table's smaller margin (relative distance of α from the
/// tail at n* or n* - 1): f32 may be off by one where it is below 1e-3.
#[test]
fn alarm_thresholds_f64() {
    let cases: &[(f64, f64, u32, f64)] = &[
        (1e-6, 1e-3, 1, 0.999),
        (1e-6, 1e-6, 1, 5.0e-7),
        (1e-6, 1e-9, 2, 0.9995),
        (1e-3, 1e-3, 1, 5.0e-4),
        (1e-3, 1e-6, 2, 0.50),
        (1e-3, 1e-9, 3, 0.83),
        (0.1, 1e-3, 3, 0.85),
        (0.1, 1e-6, 5, 0.92),
        (0.1, 1e-9, 7, 0.275),
        (1.0, 1e-3, 6, 0.41),
        (1.0, 1e-6, 10, 0.125),
        (1.0, 1e-9, 12, 0.17),
        (10.0, 1e-3, 22, 0.30),
        (10.0, 1e-6, 29, 0.24),
        (10.0, 1e-9, 35, 0.39),
        (100.0, 1e-3, 133, 0.065),
        (100.0, 1e-6, 152, 0.20),
        (100.0, 1e-9, 167, 0.0171),
        (1e3, 1e-3, 1100, 0.037),
        (1e3, 1e-6, 1155, 0.0561),
        (1e3, 1e-9, 1196, 0.018),
        (1e4, 1e-3, 10311, 1.9e-3),
        (1e4, 1e-6, 10480, 0.0209),
        (1e4, 1e-9, 10607, 4.75e-3),
        (1e5, 1e-3, 100980, 1.49e-3),
        (1e5, 1e-6, 101508, 4.04e-3),
        (1e5, 1e-9, 101903, 1.5e-4),
        (1e6, 1e-3, 1003093, 5.3e-4),
        (1e6, 1e-6, 1004758, 2.4e-3),
        (1e6, 1e-9, 1006005, 8.2e-4),
        (1e7, 1e-3, 10009775, 1.0e-4),
        (1e7, 1e-6, 10015036, 4.0e-4),
        (1e7, 1e-9, 10018974, 1.2e-4),
    ];
    for &(mu, alpha, want, margin) in cases {
        let t = alarm_threshold(mu, alpha).unwrap();
        assert_eq!(t.counts, want, "mu = {mu}, alpha = {alpha}");
        let f = alarm_threshold(mu as f32, alpha as f32).unwrap();
        if margin >= 1e-3 {
            assert_eq!(f.counts, want, "f32: mu = {mu}, alpha = {alpha}");
        } else {
            assert!(
                f.counts.abs_diff(want) <= 1,
                "f32 near tie: mu = {mu}, alpha = {alpha}: {}",
                f.counts
            );
        }
    }
}

/// Exact critical count with a well-known background: μ_B = 10, α = 0.05 →
/// alarm if N > 15, achieved 0.0487 (Poisson; computed).
#[test]
fn critical_count_background_ten() {
    let t = alarm_threshold(10.0_f64, 0.05).unwrap();
    assert_eq!(t.counts, 16);
    assert!((t.tail.p - 0.0487).abs() < 1e-4);
}

/// Garwood limits: (computed; mpmath root finding; epitools quotes 2.996 and 3.689).
#[test]
fn garwood_limits() {
    let up: &[(u32, f64, f64)] = &[
        (0, 0.95, 2.995732),
        (0, 0.90, 2.302585),
        (0, 0.99, 4.605170),
        (1, 0.95, 4.743865),
        (1, 0.975, 5.571643),
        (10, 0.95, 16.96222),
        (100, 0.95, 118.0793),
        (50, 0.99, 69.06724),
    ];
    for &(n, cl, want) in up {
        let got = exact_upper_limit(n, cl).unwrap();
        assert!(rel(got, want) < 1e-6, "U({n}, {cl}) = {got}, want {want}");
    }
    let two: &[(u32, f64, f64, f64)] = &[
        (0, 0.95, 0.0, 3.688879),
        (5, 0.95, 1.623486, 11.66833),
        (10, 0.95, 4.795389, 18.39036),
        (100, 0.95, 81.36399, 121.62679),
        (10, 0.99, 3.716922, 21.39783),
        (1, 0.99, 0.00501254, 7.430130),
    ];
    for &(n, cl, lo, hi) in two {
        let l = exact_limits(n, cl).unwrap();
        assert!(
            (l.lower - lo).abs() <= 1e-6 * lo.max(1e-3),
            "L({n}, {cl}) = {}",
            l.lower
        );
        assert!(rel(l.upper, hi) < 1e-6, "U({n}, {cl}) = {}", l.upper);
    }
    // Closed forms: -ln 0.05, -ln 0.025 (common practice, no source needed beyond the identity).
    assert!(rel(exact_upper_limit(0, 0.95_f64).unwrap(), 2.995732273553991) < 1e-14);
    assert!(rel(exact_limits(0, 0.95_f64).unwrap().upper, 3.688879454113936) < 1e-14);
}

/// Silence thresholds: (computed; exponential and gamma quantiles, mpmath).
#[test]
fn silence_thresholds() {
    let lam = 1.0_f64 / 60.0;
    assert!((silence_threshold_s(lam, 1e-3, 1).unwrap() - 414.4653).abs() < 1e-4);
    assert!((silence_threshold_s(lam, 1e-6, 1).unwrap() - 828.9306).abs() < 1e-4);
    assert!((silence_threshold_s(lam, 1e-9, 1).unwrap() - 1243.396).abs() < 1e-3);
    let k: &[(u32, f64, f64)] = &[
        (2, 1e-3, 9.233413),
        (2, 1e-6, 16.688421),
        (3, 1e-3, 11.228872),
        (3, 1e-6, 19.129168),
        (5, 1e-3, 14.794149),
        (5, 1e-6, 23.431523),
        (10, 1e-3, 22.657373),
        (10, 1e-6, 32.710341),
    ];
    for &(events, alpha, want) in k {
        let got = silence_threshold_s(1.0_f64, alpha, events).unwrap();
        assert!(
            (got - want).abs() < 2e-6,
            "k = {events}, alpha = {alpha}: {got}"
        );
        // The threshold's own tail is α.
        let p = silence_probability(1.0_f64, got, events).unwrap().p;
        assert!(rel(p, alpha) < 1e-10);
    }
}

/// Lambert W: W₀(1) = Ω and W(-1/e) = -1 (Corless et al. 1996, DLMF 4.13);
/// the rest mpmath at 30 digits (computed: mpmath).
#[test]
fn lambert_w_values() {
    assert!(rel(lambert_w0(1.0_f64).unwrap(), 0.5671432904097838729999687) < 4e-16);
    assert!(rel(lambert_w0(core::f64::consts::E).unwrap(), 1.0) < 4e-16);
    assert_eq!(lambert_w0(-0.36787944117144233_f64).unwrap(), -1.0);
    assert_eq!(lambert_wm1(-0.36787944117144233_f64).unwrap(), -1.0);
    let w0: &[(f64, f64)] = &[
        (-0.3, -0.48940222718021496904),
        (-0.1, -0.11183255915896296483),
        (-0.01, -0.010101527198538753273),
        (-1e-6, -1.0000010000015000027e-6),
        (0.1, 0.0912765271608622643),
        (10.0, 1.7455280027406993831),
        (1e6, 11.383358086140052622),
    ];
    for &(x, want) in w0 {
        assert!(rel(lambert_w0(x).unwrap(), want) < 1e-15, "W0({x})");
    }
    let wm1: &[(f64, f64)] = &[
        (-0.3, -1.781337023421627612),
        (-0.1, -3.5771520639572972184),
        (-0.01, -6.4727751243940046947),
        (-1e-6, -16.626508901372473388),
    ];
    for &(x, want) in wm1 {
        assert!(rel(lambert_wm1(x).unwrap(), want) < 1e-15, "W-1({x})");
    }
    // Near the branch point (mpmath, computed): the derivative is unbounded,
    // so the tolerance is the input's rounding effect √(2eδ).
    assert!(rel(lambert_w0(-0.3678794_f64).unwrap(), -0.999526966607568) < 1e-9);
    assert!(rel(lambert_wm1(-0.3678794_f64).unwrap(), -1.00047318261322) < 1e-9);
}

/// f32 tails against the same mpmath values at 1e-5 relative.
#[test]
fn upper_tails_f32() {
    let cases: &[(u32, f32, f64)] = &[
        (5, 1.0, 0.0036598468273437123),
        (30, 10.0, 2.5099512015279078e-7),
        (150, 100.0, 1.88421046603867e-6),
        (1, 1e-6, 9.9999950000016662e-7),
        (2, 1e-6, 4.9999966666679162e-13),
        (10500, 1e4, 3.5995897948120386e-7),
        (10005000, 1e7, 0.056950256797463303),
        (10030000, 1e7, 1.2473934369422250e-21),
    ];
    for &(n, mu, want) in cases {
        let got = at_least(mu, n).unwrap().p as f64;
        assert!(
            rel(got, want) < 1e-5,
            "f32 P(N >= {n}; {mu}) = {got:e}, want {want:e}"
        );
    }
}

/// Fault thresholds are consistent with the lower tail on both sides.
#[test]
fn fault_threshold_brackets() {
    for &(mu, alpha) in &[(1000.0, 1e-4), (30.0, 1e-6), (1e6, 1e-9), (8.0, 1e-3)] {
        let t = fault_threshold(mu, alpha).unwrap().unwrap();
        assert!(t.tail.p <= alpha);
        assert!(at_most(mu, t.counts + 1).unwrap().p > alpha);
    }
}
