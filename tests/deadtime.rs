//! Dead time: models against published formulas and worked values, inverse∘
//! forward properties, the integer table against its bound, and simulated
//! non-paralyzable and paralyzable counters fed by Poisson streams, from
//! which each bench method must recover τ within its stated uncertainty
//! (coverage printed with `--nocapture`; `COUNTWARD_LONG=1` for more runs).

mod common;

use countward::deadtime::{
    CorrectionTable, DeadTime, DecayPoint, ModelKind, fit_decay, fit_intervals, two_source,
};
use proptest::prelude::*;

const TAU: f64 = 100e-6;

#[test]
fn inverse_matches_the_published_table() {
    // (computed with mpmath's lambertw; formulas of Knoll 2010 ch. 4), τ = 100 µs:
    // m, non-paralyzable n, paralyzable n on W₀, on W₋₁.
    let rows = [
        (1000.0, 1111.111, 1118.3256, 35771.52),
        (3000.0, 4285.714, 4894.0223, 17813.37),
        (3600.0, 5625.000, 8060.8432, 12227.70),
        (3678.0, 5817.779, 9793.6072, 10209.27),
    ];
    let np = DeadTime::non_paralyzable(TAU).unwrap();
    let p = DeadTime::paralyzable(TAU).unwrap();
    for (m, n_np, n_w0, n_wm1) in rows {
        assert!((np.correct(m).unwrap().true_cps - n_np).abs() < 1e-3, "{m}");
        let c = p.correct(m).unwrap();
        assert!(
            (c.true_cps - n_w0).abs() < 1e-4 * n_w0.max(1.0) / 1e3,
            "{m}: {}",
            c.true_cps
        );
        assert!((c.true_cps_high.unwrap() - n_wm1).abs() < 1e-2, "{m}");
    }
    // Maximum measured rate 1/(eτ) = 3678.7944 s^-1 at n = 1/τ (computed).
    let (n, m) = p.peak().unwrap();
    assert!((n - 10_000.0).abs() < 1e-9 && (m - 3678.7944).abs() < 1e-4);
    // Near the maximum the correction is ill-conditioned: flagged.
    assert!(p.correct(3678.0).unwrap().saturated);
    assert!(!p.correct(1000.0).unwrap().saturated);
    // Above the maximum, or at 1/τ for non-paralyzable: an error, not a number.
    assert!(p.correct(3679.0).is_err());
    assert!(np.correct(10_000.0).is_err());
    assert!(np.correct(f64::NAN).is_err() && np.correct(-1.0).is_err());
}

#[test]
fn hybrid_matches_the_reference_values() {
    // Computed (Lee & Gardner 2000 model): τ_p = 20 µs, τ_n = 80 µs.
    let h = DeadTime::hybrid(TAU, 0.2).unwrap();
    let m1 = h.measured_cps(1000.0).unwrap();
    let m2 = h.measured_cps(10_000.0).unwrap();
    assert!((m1 - 907.591364).abs() < 1e-6 && (m2 - 4548.504184).abs() < 1e-6);
    assert!((h.correct(m1).unwrap().true_cps - 1000.0).abs() < 1e-7);
    assert!((h.correct(m2).unwrap().true_cps - 10_000.0).abs() < 1e-5);
    // Limits of the hybrid: f = 1 is paralyzable, f = 0 non-paralyzable.
    let p = DeadTime::paralyzable(TAU).unwrap();
    let h1 = DeadTime::hybrid(TAU, 1.0).unwrap();
    assert!(
        (h1.correct(3000.0).unwrap().true_cps / p.correct(3000.0).unwrap().true_cps - 1.0).abs()
            < 1e-12
    );
    let h0 = DeadTime::hybrid(TAU, 0.0).unwrap();
    assert!((h0.correct(3000.0).unwrap().true_cps - 4285.714).abs() < 1e-3);
}

#[test]
fn two_source_matches_the_worked_values() {
    // Computed (Knoll 2010 formula on model-generated data):
    // τ = 100 µs, n_b = 1, n1 = 200, n2 = 300 s^-1: exact 1.000e-4 s, the
    // approximations 1.078e-4 and 1.055e-4.
    let np = DeadTime::non_paralyzable(TAU).unwrap();
    let m = |n: f64| np.measured_cps(n).unwrap();
    let r = two_source(m(201.0), m(301.0), m(501.0), m(1.0), None).unwrap();
    assert!((r.dead_time_s - 1e-4).abs() < 1e-12);
    assert!(
        (r.first_order_s - 1.078e-4).abs() < 5e-8,
        "{}",
        r.first_order_s
    );
    assert!((r.simple_s - 1.055e-4).abs() < 5e-8, "{}", r.simple_s);
    // No losses: the data cannot determine τ.
    assert!(two_source(200.0_f64, 300.0, 500.0, 0.0, None).is_err());
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(500))]

    // inverse ∘ forward = identity on both branches, for every model.
    #[test]
    fn inverse_of_forward_is_identity(tau_us in 0.1f64..1000.0, f in 0.0f64..=1.0, x in 1e-6f64..20.0, kind in 0u8..3) {
        let tau = tau_us * 1e-6;
        let model = match kind {
            0 => DeadTime::non_paralyzable(tau),
            1 => DeadTime::paralyzable(tau),
            _ => DeadTime::hybrid(tau, f),
        }.unwrap();
        let n = x / tau;
        let m = model.measured_cps(n).unwrap();
        let c = model.correct(m).unwrap();
        let back = match model.peak() {
            Some((n_peak, _)) if n > n_peak => c.true_cps_high.unwrap(),
            _ => c.true_cps,
        };
        // Near the peak the inverse is ill-conditioned: the tolerance follows
        // the condition number (documented as `gain`).
        let slope = model.log_slope(n).abs();
        let tol = 1e-12 + 4e-15 / slope.max(1e-300) + 2e-8 * (1.0 / slope.max(1e-300)).sqrt() * f64::from(slope < 1e-3);
        prop_assert!(((back - n) / n).abs() < tol.max(1e-10), "n {} back {} slope {}", n, back, slope);
    }

    // f32 and f64 agree to f32 precision away from the peak.
    #[test]
    fn f32_follows_f64(x in 1e-4f64..0.3) {
        let p64 = DeadTime::paralyzable(TAU).unwrap();
        let p32 = DeadTime::paralyzable(TAU as f32).unwrap();
        let m = x / TAU;
        let a = p64.correct(m).unwrap().true_cps;
        let b = f64::from(p32.correct(m as f32).unwrap().true_cps);
        prop_assert!(((a - b) / a).abs() < 2e-5);
    }
}

#[test]
fn integer_table_stays_within_its_bound() {
    for (model, coverage) in [
        (DeadTime::paralyzable(TAU).unwrap(), 0.9),
        (DeadTime::non_paralyzable(TAU).unwrap(), 0.5),
        (DeadTime::hybrid(TAU, 0.3).unwrap(), 0.8),
    ] {
        let table = CorrectionTable::<64>::new(&model, 1.0, coverage).unwrap();
        let bound = f64::from(table.error_bound_ppm()) * 1e-6;
        let limit = (coverage * model.measured_limit_cps()) as u32;
        let mut worst: f64 = 0.0;
        for counts in (0..limit).step_by(7) {
            let got = table.correct(counts).expect("within the table");
            let want = model.correct(f64::from(counts)).unwrap().true_cps;
            let err = (f64::from(got) - want).abs();
            assert!(
                err <= want * bound + 0.5 + 1e-9,
                "{model:?} {counts}: {got} vs {want}"
            );
            if want >= 1000.0 {
                worst = worst.max((err - 0.5).max(0.0) / want);
            }
        }
        assert_eq!(table.correct(limit + 2), None, "{model:?}");
        eprintln!(
            "{:?}: bound {} ppm, worst measured {:.1} ppm beyond the half-count rounding",
            model.kind(),
            table.error_bound_ppm(),
            worst * 1e6
        );
        // The stored parts rebuild the same table.
        let (g, p, e) = table.parts();
        assert_eq!(CorrectionTable::<64>::from_parts(*g, p, e), table);
    }
}

/// Coverage: the fraction of runs whose estimate is within 1.96 standard
/// uncertainties of the truth; with `runs` runs it should be 0.95 within
/// binomial noise. Two-sided, and the run counts are chosen so that the
/// upper side bites: at 400 runs or more, 0.95 + 3.5σ ≤ 0.988, below the
/// 0.9967 that an uncertainty stated 1.5× too large would give (an
/// overstated uncertainty is as wrong as an understated one).
fn check_coverage(what: &str, seed: u64, inside: usize, runs: usize) -> f64 {
    assert!(
        runs >= 400,
        "{what}: too few runs for a two-sided coverage check"
    );
    let c = inside as f64 / runs as f64;
    eprintln!("{what}: coverage of ±1.96σ {c:.3} over {runs} runs");
    common::assert_close(what, seed, c, 0.95, (0.95 * 0.05 / runs as f64).sqrt(), 3.5);
    c
}

#[test]
fn two_source_recovers_tau_from_simulated_counters() {
    let seed = common::seed(0x5eed_0301);
    let mut rng = common::rng(seed);
    let runs = if common::long_runs() { 4_000 } else { 800 };
    let t = 4.0;
    let tau = 200e-6;
    let mut inside = 0;
    for _ in 0..runs {
        let rate = |rng: &mut _, n: f64| common::recorded_count(rng, n, tau, t, false) as f64 / t;
        let (a, b, ab, bg) = (
            rate(&mut rng, 2005.0),
            rate(&mut rng, 3005.0),
            rate(&mut rng, 5005.0),
            rate(&mut rng, 5.0),
        );
        let r = two_source(a, b, ab, bg, Some(t)).unwrap();
        inside += usize::from((r.dead_time_s - tau).abs() <= 1.96 * r.std_uncertainty_s.unwrap());
    }
    check_coverage(
        "two-source (non-paralyzable, τ = 200 µs)",
        seed,
        inside,
        runs,
    );
}

#[test]
fn decay_fit_recovers_tau_and_prefers_the_true_model() {
    let seed = common::seed(0x5eed_0302);
    let mut rng = common::rng(seed);
    let runs = if common::long_runs() { 2_000 } else { 400 };
    let half_life = 3600.0;
    let lambda = 2f64.ln() / half_life;
    for (paralyzable, tau) in [(false, 100e-6), (true, 80e-6)] {
        let kind = if paralyzable {
            ModelKind::Paralyzable
        } else {
            ModelKind::NonParalyzable
        };
        let other = if paralyzable {
            ModelKind::NonParalyzable
        } else {
            ModelKind::Paralyzable
        };
        let (mut inside, mut preferred) = (0, 0);
        for _ in 0..runs {
            let points: Vec<DecayPoint<f64>> = (0..30)
                .map(|i| {
                    let t = 400.0 * f64::from(i);
                    let n = 8000.0 * (-lambda * t).exp();
                    let counts = common::recorded_count(&mut rng, n, tau, 1.0, paralyzable);
                    DecayPoint {
                        time_s: t,
                        measured_cps: counts as f64,
                        counting_s: Some(1.0),
                    }
                })
                .collect();
            let fit = fit_decay(&points, half_life, kind, 0.0).unwrap();
            inside += usize::from((fit.dead_time_s - tau).abs() <= 1.96 * fit.dead_time_sd_s);
            let alt = fit_decay(&points, half_life, other, 0.0);
            preferred += usize::from(alt.is_err() || alt.unwrap().chi2 > fit.chi2);
        }
        let what = if paralyzable {
            "decay fit (paralyzable, τ = 80 µs)"
        } else {
            "decay fit (non-paralyzable, τ = 100 µs)"
        };
        check_coverage(what, seed, inside, runs);
        eprintln!("{what}: the true model had the smaller χ² in {preferred}/{runs} runs");
        assert!(
            preferred * 10 >= runs * 8,
            "seed {seed}: {preferred}/{runs}"
        );
    }
}

#[test]
fn interval_method_recovers_tau() {
    let seed = common::seed(0x5eed_0303);
    let mut rng = common::rng(seed);
    let runs = if common::long_runs() { 8_000 } else { 800 };
    let mut inside = 0;
    let mut p_small = 0;
    for _ in 0..runs {
        let stamps = common::recorded_events(&mut rng, 2000.0, TAU, 1.0, false);
        let fit = fit_intervals(&stamps).unwrap();
        inside += usize::from((fit.dead_time_s - TAU).abs() <= 1.96 * fit.std_uncertainty_s);
        p_small += usize::from(fit.shape_p_value < 0.01);
    }
    check_coverage(
        "intervals (non-paralyzable, τ = 100 µs)",
        seed,
        inside,
        runs,
    );
    // The shape test rejects a true shifted exponential rarely.
    assert!(
        p_small * 100 <= runs * 5,
        "seed {seed}: {p_small}/{runs} shape rejections"
    );
    // Too few intervals, or rates too low for τ to show: NotDetermined.
    assert!(fit_intervals(&[0.0, 1.0, 2.0]).is_err());
    let sparse = common::recorded_events(&mut rng, 2.0, TAU, 100.0, false);
    assert!(fit_intervals(&sparse).is_err());
}

#[test]
fn corrected_rate_uncertainty_matches_simulation() {
    // (computed: Müller 1973 variances, checked by simulation): the
    // counting part of the stated uncertainty is the spread seen in runs.
    let seed = common::seed(0x5eed_0304);
    let mut rng = common::rng(seed);
    let runs = if common::long_runs() { 4_000 } else { 400 };
    for paralyzable in [false, true] {
        let model = if paralyzable {
            DeadTime::paralyzable(TAU)
        } else {
            DeadTime::non_paralyzable(TAU)
        }
        .unwrap();
        let (mut s1, mut s2, mut stated) = (0.0, 0.0, 0.0);
        for _ in 0..runs {
            let m = common::recorded_count(&mut rng, 5000.0, TAU, 0.5, paralyzable) as f64 / 0.5;
            let c = model.correct_with_uncertainty(m, 0.5, 0.0).unwrap();
            s1 += c.true_cps;
            s2 += c.true_cps * c.true_cps;
            stated += c.std_uncertainty_cps;
        }
        let n = runs as f64;
        let sd = (s2 / n - (s1 / n).powi(2)).sqrt();
        let stated = stated / n;
        eprintln!(
            "paralyzable {paralyzable}: corrected-rate SD {sd:.1} cps simulated, {stated:.1} stated"
        );
        common::assert_close(
            "corrected-rate SD ratio",
            seed,
            sd / stated,
            1.0,
            1.0 / (2.0 * n).sqrt(),
            4.5,
        );
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    // No input makes a dead-time call panic: bad input is an error, good input
    // a number. Inputs weighted so that most cases reach the computations
    // (uniform bit patterns reached them in ~7 % of cases); tests/hostile.rs
    // asserts finiteness on the same calls.
    #[test]
    fn no_panics(m in common::hostile_f64(), tau in common::hostile_f64(), f in common::hostile_f64(),
                 rates in prop::array::uniform4(common::hostile_f64()), counts in any::<u32>(),
                 stamps in prop::collection::vec(-1e3f64..1e3, 0..40)) {
        for model in [DeadTime::non_paralyzable(tau), DeadTime::paralyzable(tau), DeadTime::hybrid(tau, f)].into_iter().flatten() {
            if let Ok(c) = model.correct(m) {
                prop_assert!(c.true_cps >= 0.0 && !c.true_cps.is_nan());
            }
            let _ = model.measured_cps(m);
            let _ = model.correct_with_uncertainty(m, rates[0], rates[1]);
        }
        let _ = two_source(rates[0], rates[1], rates[2], rates[3], Some(m));
        let _ = fit_intervals(&stamps);
        let points: Vec<DecayPoint<f64>> = stamps.iter().map(|&t| DecayPoint { time_s: t, measured_cps: t.abs() * 10.0, counting_s: None }).collect();
        let _ = fit_decay(&points, 100.0, ModelKind::Paralyzable, 1.0);
        let table = CorrectionTable::<8>::new(&DeadTime::paralyzable(1e-4_f64).unwrap(), 1.0, 0.9).unwrap();
        if let Some(n) = table.correct(counts) {
            prop_assert!(n >= counts);
        }
    }
}
