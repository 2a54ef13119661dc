//! The numeric core on arbitrary bits: tails, thresholds, limits, special
//! functions, silence, dead-time models and firmware designs. No panic
//! (overflow checks are on in fuzz builds), and every `Ok` is meaningful:
//! probabilities in [0, 1], no NaN or infinity in a result.
#![no_main]

use countward::deadtime::{DeadTime, ModelKind};
use countward::detect::{CusumConfig, SprtConfig};
use countward::gap::silence_threshold_s;
use countward::math::{gamma_p, gamma_p_inv, gamma_q, gamma_q_inv};
use countward::poisson::{alarm_threshold, at_least, at_most, exact_limits, fault_threshold, pmf};
use libfuzzer_sys::fuzz_target;

fn f64_at(d: &[u8], i: usize) -> f64 {
    f64::from_le_bytes(d[i..i + 8].try_into().unwrap())
}

fuzz_target!(|d: &[u8]| {
    if d.len() < 28 {
        return;
    }
    let (x, y, z) = (f64_at(d, 0), f64_at(d, 8), f64_at(d, 16));
    let k = u32::from_le_bytes(d[24..28].try_into().unwrap());
    for t in [at_least(x, k), at_most(x, k), pmf(x, k)]
        .into_iter()
        .flatten()
    {
        assert!((0.0..=1.0).contains(&t.p) && !t.ln_p.is_nan() && t.ln_p <= 0.0);
    }
    for t in [at_least(x as f32, k), at_most(x as f32, k)]
        .into_iter()
        .flatten()
    {
        assert!((0.0..=1.0).contains(&t.p) && !t.ln_p.is_nan());
    }
    if let Ok(t) = alarm_threshold(x, y) {
        assert!(t.tail.p <= y * (1.0 + 1e-12));
    }
    if let Ok(Some(t)) = fault_threshold(x, y) {
        assert!(t.tail.p <= y * (1.0 + 1e-12));
    }
    if let Ok(l) = exact_limits(k % 100_000, y) {
        assert!(l.lower.is_finite() && l.upper.is_finite() && l.lower <= l.upper);
    }
    for v in [gamma_p(x, y), gamma_q(x, y)].into_iter().flatten() {
        assert!((0.0..=1.0).contains(&v));
    }
    for v in [gamma_p_inv(x, y), gamma_q_inv(x, y)].into_iter().flatten() {
        assert!(v.is_finite() && v >= 0.0);
    }
    if let Ok(s) = silence_threshold_s(x, y, k % 1000) {
        assert!(s.is_finite() && s >= 0.0);
    }
    for kind in [
        ModelKind::NonParalyzable,
        ModelKind::Paralyzable,
        ModelKind::Hybrid,
    ] {
        if let Ok(m) = DeadTime::of_kind(kind, x, z)
            && let Ok(c) = m.correct(y)
        {
            assert!(c.true_cps.is_finite() && c.true_cps_high.is_none_or(f64::is_finite));
        }
    }
    if let Ok(c) = CusumConfig::for_means(x, y, z, k, k & 1 == 1) {
        assert!(c.reference() > 0 && c.decision() > 0);
    }
    if let Ok(s) = SprtConfig::for_means(x, y, z, z, k, 0) {
        let (pc, pt, up, lo, _, _) = s.scaled();
        assert!(pc > 0 && pt > 0 && up > 0 && lo < 0);
    }
});
