//! Property tests against independent references: `statrs` 0.19 (its Poisson
//! survival function and CDF, `statrs::distribution::Poisson`) for means where
//! it is accurate (≤ 1e5; its prefactor `a ln x - x - ln Γ(a)` loses digits
//! beyond), and a plain f64 pmf summation written here for small means.

use countward::fixed::{FixedAlpha, FixedMean};
use countward::math::{gamma_p, gamma_p_inv, gamma_q, gamma_q_inv, lambert_w0, lambert_wm1};
use countward::poisson::{
    alarm_threshold, at_least, at_most, exact_limits, exact_upper_limit, fault_threshold,
};
use proptest::prelude::*;
use statrs::distribution::{DiscreteCDF, Poisson};

/// A mean spread evenly in log10 from 1e-9 to 1e8.
fn mean() -> impl Strategy<Value = f64> {
    (-9.0f64..8.0).prop_map(|e| 10f64.powf(e))
}

/// A count near the mean: μ + z√μ for z in [-12, 40], and small counts.
fn count_near(mu: f64) -> impl Strategy<Value = u32> {
    prop_oneof![
        (-12.0f64..40.0).prop_map(move |z| (mu + z * mu.sqrt()).max(0.0).round() as u32),
        0u32..40,
    ]
}

/// α from 1e-30 up to within 1e-7 of 1: the far tail, the usual range, and
/// the near-1 band where linear tails resolve nothing (f32 once answered 1
/// instead of 6 at α = 0.99999994).
fn alpha() -> impl Strategy<Value = f64> {
    prop_oneof![
        3 => (-12.0f64..-0.5).prop_map(|e| 10f64.powf(e)),
        1 => (-30.0f64..-12.0).prop_map(|e| 10f64.powf(e)),
        1 => 0.5f64..0.999,
        1 => (-7.0f64..-3.0).prop_map(|e| 1.0 - 10f64.powf(e)),
    ]
}

/// Whether a tail value is within 1e-3 of α, measured on the smaller side
/// (for α > 1/2 the complements are compared: 1 − tail against 1 − α).
fn near_tie(tail: f64, al: f64) -> bool {
    if al <= 0.5 {
        (tail / al - 1.0).abs() < 1e-3
    } else {
        ((1.0 - tail) / (1.0 - al) - 1.0).abs() < 1e-3
    }
}

/// Independent reference for small means: Σ pmf with pmf by the recurrence
/// p(k+1) = p(k) μ/(k+1) from p(0) = e^{-μ}, summing the smaller tail.
fn reference_at_least(mu: f64, k: u32) -> f64 {
    let mut p = (-mu).exp();
    let mut below = 0.0;
    let mut j = 0u32;
    while j < k {
        below += p;
        j += 1;
        p *= mu / f64::from(j);
    }
    if k as f64 > mu {
        // Sum the upper tail directly from p(k).
        let mut s = 0.0;
        let mut q = p;
        let mut i = k;
        while q > s * 1e-18 {
            s += q;
            i += 1;
            q *= mu / f64::from(i);
        }
        s
    } else {
        1.0 - below
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 400, max_global_rejects: 1_000_000, ..ProptestConfig::default() })]

    /// P(N ≥ k) + P(N ≤ k - 1) = 1 (f64, every mean in the documented range).
    #[test]
    fn complements_add_to_one((mu, k) in mean().prop_flat_map(|m| (Just(m), count_near(m)))) {
        prop_assume!(k >= 1);
        let s = at_least(mu, k).unwrap().p + at_most(mu, k - 1).unwrap().p;
        prop_assert!((s - 1.0).abs() < 4e-15, "mu {mu} k {k}: {s}");
    }

    /// Tails agree with statrs where statrs is accurate (μ ≤ 1e5, tail ≥ 1e-280).
    /// Tolerance 1e-12 + 3e-14 μ: statrs's own error, growing with μ, sets it:
    /// at μ = 8086.54, k = 8087 statrs gives 0.4994571856607779 where mpmath
    /// (40 digits) gives 0.4994571856652459 (ours 0.49945718566524583); at
    /// μ = 63488.03, k = 63543 statrs gives 0.41418388427731095, mpmath
    /// 0.4141838843151784 (ours 0.4141838843151784); P(N ≤ 62516) there: statrs
    /// 5.5542431563570285e-5, mpmath 5.554243157168619e-5 (ours 5.554243157168616e-5).
    /// The 1e-12 claim itself is
    /// checked against the mpmath vectors in `reference_vectors.rs`.
    #[test]
    fn tails_match_statrs((mu, k) in (-9.0f64..5.0).prop_map(|e| 10f64.powf(e)).prop_flat_map(|m| (Just(m), count_near(m)))) {
        prop_assume!(k >= 1);
        let d = Poisson::new(mu).unwrap();
        let want = d.sf(u64::from(k) - 1);
        prop_assume!(want >= 1e-280);
        let tol = 1e-12 + 3e-14 * mu;
        let got = at_least(mu, k).unwrap().p;
        prop_assert!((got / want - 1.0).abs() < tol, "P(N >= {k}; {mu}) = {got:e}, statrs {want:e}");
        let want_low = d.cdf(u64::from(k));
        prop_assume!(want_low >= 1e-280);
        let got_low = at_most(mu, k).unwrap().p;
        prop_assert!((got_low / want_low - 1.0).abs() < tol, "P(N <= {k}; {mu}) = {got_low:e}, statrs {want_low:e}");
    }

    /// Tails agree with the plain summation for small means.
    #[test]
    fn tails_match_summation(mu in 1e-6f64..30.0, k in 1u32..80) {
        let want = reference_at_least(mu, k);
        prop_assume!(want >= 1e-290);
        let got = at_least(mu, k).unwrap().p;
        prop_assert!((got / want - 1.0).abs() < 1e-12, "P(N >= {k}; {mu}) = {got:e}, sum {want:e}");
    }

    /// f32 tails within 1e-5 of f64 where ≥ 1e-30 (μ ≤ 1e7).
    #[test]
    fn f32_tails_track_f64((mu, k) in (-6.0f64..7.0).prop_map(|e| 10f64.powf(e)).prop_flat_map(|m| (Just(m), count_near(m)))) {
        let m32 = mu as f32;
        let m = f64::from(m32);
        let want = at_least(m, k).unwrap().p;
        prop_assume!(want >= 1e-30);
        let got = f64::from(at_least(m32, k).unwrap().p);
        prop_assert!((got / want - 1.0).abs() < 1e-5, "f32 P(N >= {k}; {m}) = {got:e}, f64 {want:e}");
    }

    /// The alarm threshold is minimal (by statrs's tails where accurate) and
    /// its own tail is at most α.
    #[test]
    fn alarm_threshold_is_minimal(mu in (-9.0f64..5.0).prop_map(|e| 10f64.powf(e)), a in alpha()) {
        let t = alarm_threshold(mu, a).unwrap();
        prop_assert!(t.tail.p <= a);
        let d = Poisson::new(mu).unwrap();
        let at = if t.counts == 0 { 1.0 } else { d.sf(u64::from(t.counts) - 1) };
        let before = if t.counts <= 1 { 1.0 } else { d.sf(u64::from(t.counts) - 2) };
        // Exact except within 1e-9 of a tie.
        prop_assert!(at <= a * (1.0 + 1e-9), "mu {mu} a {a}: P(N >= n*) = {at:e}");
        prop_assert!(before > a * (1.0 - 1e-9), "mu {mu} a {a}: P(N >= n*-1) = {before:e}");
    }

    /// The fault threshold is maximal, or absent exactly when e^{-μ} > α.
    #[test]
    fn fault_threshold_is_maximal(mu in mean(), a in alpha()) {
        match fault_threshold(mu, a).unwrap() {
            None => prop_assert!((-mu).exp() > a * (1.0 - 1e-12)),
            Some(t) => {
                prop_assert!(t.tail.p <= a);
                let next = at_most(mu, t.counts + 1).unwrap().p;
                prop_assert!(next > a * (1.0 - 1e-9), "mu {mu} a {a}: next {next:e}");
            }
        }
    }

    /// Thresholds are monotone: non-decreasing in μ; alarm non-increasing and
    /// fault non-decreasing in α.
    #[test]
    fn thresholds_are_monotone(m1 in mean(), f in 1.0f64..1.5, a1 in alpha(), g in 1.0f64..10.0) {
        let m2 = (m1 * f).min(1e8);
        let a2 = a1 + (1.0 - a1) * (1.0 - 1.0 / g); // a1 <= a2 < 1
        prop_assert!(alarm_threshold(m1, a1).unwrap().counts <= alarm_threshold(m2, a1).unwrap().counts);
        prop_assert!(alarm_threshold(m1, a2).unwrap().counts <= alarm_threshold(m1, a1).unwrap().counts);
        let low = |m: f64, a: f64| fault_threshold(m, a).unwrap().map(|t| i64::from(t.counts)).unwrap_or(-1);
        prop_assert!(low(m1, a1) <= low(m2, a1));
        prop_assert!(low(m1, a1) <= low(m1, a2));
    }

    /// The integer tier gives the f64 thresholds (at the same quantized mean and
    /// α), except where α is within 1e-3 of a tail value; then off by at most one.
    #[test]
    fn fixed_thresholds_match_f64(mu in (-6.0f64..8.0).prop_map(|e| 10f64.powf(e)), a in alpha()) {
        let fm = FixedMean::from_raw((mu * 4294967296.0).round() as u64).unwrap();
        let fa = FixedAlpha::from_ln_raw((a.ln() * 4294967296.0).round() as i64).unwrap();
        let m = fm.raw() as f64 / 4294967296.0;
        let al = (fa.ln_raw() as f64 / 4294967296.0).exp();
        let want = alarm_threshold(m, al).unwrap().counts;
        let got = countward::fixed::alarm_threshold(fm, fa).unwrap().counts;
        if got != want {
            let near = |n: u32| near_tie(at_least(m, n).unwrap().p, al);
            prop_assert!(got.abs_diff(want) == 1 && (near(want) || near(want - 1)), "mu {m} alpha {al}: fixed {got}, f64 {want}");
        }
        let want = fault_threshold(m, al).unwrap().map(|t| t.counts);
        let got = countward::fixed::fault_threshold(fm, fa).unwrap().map(|t| t.counts);
        if got != want {
            let near = |n: u32| near_tie(at_most(m, n).unwrap().p, al);
            let w = want.map(i64::from).unwrap_or(-1);
            let g = got.map(i64::from).unwrap_or(-1);
            prop_assert!((w - g).abs() == 1 && (near(w.max(g) as u32)), "mu {m} alpha {al}: fixed {got:?}, f64 {want:?}");
        }
    }

    /// The f32 tier's thresholds follow the same rule.
    #[test]
    fn f32_thresholds_match_f64(mu in (-6.0f64..7.0).prop_map(|e| 10f64.powf(e)), a in alpha()) {
        let (m32, a32) = (mu as f32, a as f32);
        let (m, al) = (f64::from(m32), f64::from(a32));
        let want = alarm_threshold(m, al).unwrap().counts;
        let got = alarm_threshold(m32, a32).unwrap().counts;
        if got != want {
            let near = |n: u32| near_tie(at_least(m, n).unwrap().p, al);
            prop_assert!(got.abs_diff(want) == 1 && (near(want) || near(want - 1)), "mu {m} alpha {al}: f32 {got}, f64 {want}");
        }
        let want = fault_threshold(m, al).unwrap().map(|t| t.counts);
        let got = fault_threshold(m32, a32).unwrap().map(|t| t.counts);
        if got != want {
            let near = |n: u32| near_tie(at_most(m, n).unwrap().p, al);
            let w = want.map(i64::from).unwrap_or(-1);
            let g = got.map(i64::from).unwrap_or(-1);
            prop_assert!((w - g).abs() == 1 && near(w.max(g) as u32), "mu {m} alpha {al}: f32 {got:?}, f64 {want:?}");
        }
    }

    /// inverse ∘ forward = identity for the incomplete gamma function.
    #[test]
    fn gamma_inverse_roundtrip(a in (-1.0f64..6.0).prop_map(|e| 10f64.powf(e)), r in -5.0f64..5.0) {
        let x = (a + r * a.sqrt()).max(a * 1e-3);
        let p = gamma_p(a, x).unwrap();
        prop_assume!(p > 1e-300 && p < 1.0 - 1e-12);
        let back = if p < 0.5 { gamma_p_inv(a, p).unwrap() } else { gamma_q_inv(a, gamma_q(a, x).unwrap()).unwrap() };
        prop_assert!((back / x - 1.0).abs() < 1e-9, "a {a} x {x}: {back}");
    }

    /// Garwood limits solve their defining equations.
    #[test]
    fn garwood_limits_solve_their_equations(n in 0u32..5000, level in 0.5f64..0.9999) {
        let l = exact_limits(n, level).unwrap();
        let tail = (1.0 - level) / 2.0;
        prop_assert!((at_most(l.upper, n).unwrap().p / tail - 1.0).abs() < 1e-9);
        if n > 0 {
            prop_assert!((at_least(l.lower, n).unwrap().p / tail - 1.0).abs() < 1e-9);
        }
        let u = exact_upper_limit(n, level).unwrap();
        prop_assert!((at_most(u, n).unwrap().p / (1.0 - level) - 1.0).abs() < 1e-9);
        prop_assert!(u < l.upper);
    }

    /// W(x) e^{W(x)} = x on both branches.
    #[test]
    fn lambert_w_inverts(x in -0.3678794f64..1e6) {
        let w = lambert_w0(x).unwrap();
        prop_assert!(w >= -1.0);
        prop_assert!((w * w.exp() - x).abs() <= 1e-13 * x.abs().max(1e-300) + 1e-16);
        if x < 0.0 {
            let v = lambert_wm1(x).unwrap();
            prop_assert!(v <= -1.0);
            prop_assert!((v * v.exp() - x).abs() <= 1e-13 * x.abs());
        }
    }

    /// Near the branch point: x = w eʷ for w within 0.2 of −1 on either side
    /// (found by the dead-time properties: Halley used to cycle at the last
    /// ulps at x = −0.365 and report NoConvergence).
    #[test]
    fn lambert_w_near_the_branch_point(d in 1e-6f64..0.2, upper in any::<bool>()) {
        let w = if upper { -1.0 + d } else { -1.0 - d };
        let x = w * w.exp();
        let got = if upper { lambert_w0(x) } else { lambert_wm1(x) }.unwrap();
        // Conditioning: dW/dx = W/(x(1+W)); the input rounding of x alone
        // moves W by about ε/(e·d).
        prop_assert!((got - w).abs() <= 8.0 * f64::EPSILON / d + 1e-15, "w {} got {}", w, got);
    }

    /// No input makes a call panic: bad input is an error, good input a number.
    #[test]
    fn no_panics(m in proptest::num::f64::ANY, a in proptest::num::f64::ANY, k in proptest::num::u32::ANY) {
        let _ = at_least(m, k);
        let _ = at_most(m, k);
        let _ = alarm_threshold(m, a);
        let _ = fault_threshold(m, a);
        let _ = exact_limits(k, a);
        let _ = countward::gap::silence_threshold_s(m, a, k % 50);
        let _ = lambert_w0(m);
        let _ = lambert_wm1(m);
        if let Ok(t) = at_least(m, k) {
            prop_assert!(t.p >= 0.0 && t.p <= 1.0 && !t.ln_p.is_nan());
        }
    }

    /// The integer tier never panics (tests run with overflow checks on) and
    /// its tails are probabilities, for any admissible mean, α and count.
    #[test]
    fn fixed_no_panics(raw in 0u64..=(2_000_000_000u64 << 32), ln_a in -(100_000i64 << 32)..-1i64, k in proptest::num::u32::ANY) {
        let m = FixedMean::from_raw(raw).unwrap();
        let a = FixedAlpha::from_ln_raw(ln_a).unwrap();
        let up = countward::fixed::ln_at_least_q32(m, k);
        let low = countward::fixed::ln_at_most_q32(m, k);
        prop_assert!(up <= 0 && low <= 0);
        let t = countward::fixed::alarm_threshold(m, a).unwrap();
        prop_assert!(t.ln_tail_q32 <= ln_a);
        if let Some(f) = countward::fixed::fault_threshold(m, a).unwrap() {
            prop_assert!(f.ln_tail_q32 <= ln_a);
        }
    }
}
