//! Alarm-threshold speed: countward's f64 search against a baseline search
//! on `statrs`'s Poisson survival function, with identical answers asserted
//! first. Run: `cargo bench --bench threshold`; the ratio table printed at
//! the end comes from this run's Criterion estimates.
//!
//! The baseline is what a careful engineer would write with statrs: integer
//! bisection for the smallest n with P(N ≥ n) = sf(n - 1) ≤ α on the safe
//! bracket [1, μ + 12√μ + 40] (P(N ≥ μ + 12√μ + 40) < 1e-9 for every μ here).

use countward::fixed::{FixedAlpha, FixedMean};
use criterion::{BenchmarkId, Criterion};
use statrs::distribution::{DiscreteCDF, Poisson};
use std::hint::black_box;
use std::time::Duration;

const MEANS: [f64; 5] = [0.1, 10.0, 1e3, 1e5, 1e7];
const ALPHA: f64 = 1e-6;

fn statrs_threshold(mean: f64, alpha: f64) -> u32 {
    let d = Poisson::new(mean).unwrap();
    let mut lo: u64 = 0; // P(N ≥ 0) = 1 > α
    let mut hi: u64 = (mean + 12.0 * mean.sqrt() + 40.0) as u64;
    assert!(d.sf(hi - 1) <= alpha);
    while hi - lo > 1 {
        let mid = lo + (hi - lo) / 2;
        if d.sf(mid - 1) <= alpha {
            hi = mid
        } else {
            lo = mid
        }
    }
    hi as u32
}

fn benches(c: &mut Criterion) {
    let mut g = c.benchmark_group("alarm_threshold");
    g.warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(2))
        .sample_size(20);
    for &mu in &MEANS {
        let ours = countward::poisson::alarm_threshold(mu, ALPHA)
            .unwrap()
            .counts;
        assert_eq!(
            ours,
            statrs_threshold(mu, ALPHA),
            "answers differ at mean {mu}"
        );
        g.bench_with_input(BenchmarkId::new("countward_f64", mu), &mu, |b, &m| {
            b.iter(|| {
                countward::poisson::alarm_threshold(black_box(m), black_box(ALPHA))
                    .unwrap()
                    .counts
            })
        });
        g.bench_with_input(BenchmarkId::new("statrs_bisection", mu), &mu, |b, &m| {
            b.iter(|| statrs_threshold(black_box(m), black_box(ALPHA)))
        });
        g.bench_with_input(BenchmarkId::new("countward_f32", mu), &mu, |b, &m| {
            b.iter(|| {
                countward::poisson::alarm_threshold(black_box(m as f32), black_box(ALPHA as f32))
                    .unwrap()
                    .counts
            })
        });
        let fm = FixedMean::from_raw((mu * 4294967296.0).round() as u64).unwrap();
        let fa = FixedAlpha::one_in(1_000_000).unwrap();
        g.bench_with_input(BenchmarkId::new("countward_fixed", mu), &mu, |b, _| {
            b.iter(|| {
                countward::fixed::alarm_threshold(black_box(fm), black_box(fa))
                    .unwrap()
                    .counts
            })
        });
    }
    g.finish();
}

mod support;

/// Mean time of one benchmark of this group at mean `mu`, in ns.
fn estimate_ns(bench: &str, mu: f64) -> Option<f64> {
    support::estimate_ns(&format!("alarm_threshold/{bench}/{mu}"))
}

fn main() {
    let mut c = Criterion::default().configure_from_args();
    benches(&mut c);
    c.final_summary();
    println!(
        "\nalarm threshold, alpha = {ALPHA}: mean time per call, and statrs-baseline / countward ratio"
    );
    println!(
        "{:>8} {:>14} {:>14} {:>9} {:>12} {:>12}",
        "mean", "countward f64", "statrs bisect", "ratio", "f32", "fixed"
    );
    for &mu in &MEANS {
        let (Some(ours), Some(base)) = (
            estimate_ns("countward_f64", mu),
            estimate_ns("statrs_bisection", mu),
        ) else {
            continue;
        };
        let f32_ns = estimate_ns("countward_f32", mu).unwrap_or(f64::NAN);
        let fixed_ns = estimate_ns("countward_fixed", mu).unwrap_or(f64::NAN);
        println!(
            "{:>8} {:>11.0} ns {:>11.0} ns {:>8.1}x {:>9.0} ns {:>9.0} ns",
            mu,
            ours,
            base,
            base / ours,
            f32_ns,
            fixed_ns
        );
    }
}
