//! Shared helpers of the integration tests: seeded Poisson streams (from
//! `rand_distr`, an outside sampler) and statistical assertions that print
//! the seed. Not every test file uses every helper.
#![allow(dead_code)]

use rand::SeedableRng;
use rand::rngs::SmallRng;
use rand_distr::{Distribution, Exp, Poisson};

/// The seed: `COUNTWARD_SEED` if set, else the test's own default.
pub fn seed(default: u64) -> u64 {
    std::env::var("COUNTWARD_SEED")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(default)
}

/// Whether the long Monte-Carlo runs were asked for (`COUNTWARD_LONG=1`).
pub fn long_runs() -> bool {
    std::env::var("COUNTWARD_LONG").is_ok_and(|v| v == "1")
}

/// A seeded generator.
pub fn rng(seed: u64) -> SmallRng {
    SmallRng::seed_from_u64(seed)
}

/// A Poisson count of mean `mean` (0 for mean 0).
pub fn poisson(rng: &mut SmallRng, mean: f64) -> u32 {
    if mean <= 0.0 {
        return 0;
    }
    Poisson::new(mean).unwrap().sample(rng) as u32
}

/// An exponential gap of rate `rate`.
pub fn exponential(rng: &mut SmallRng, rate: f64) -> f64 {
    Exp::new(rate).unwrap().sample(rng)
}

/// Asserts |observed − expected| ≤ z · sd, naming the quantity and the seed.
pub fn assert_close(what: &str, seed: u64, observed: f64, expected: f64, sd: f64, z: f64) {
    assert!(
        (observed - expected).abs() <= z * sd,
        "{what}: observed {observed}, expected {expected} ± {z}·{sd} (seed {seed}; rerun with COUNTWARD_SEED={seed})"
    );
}

/// Brook & Evans (1972): the average run length of a Poisson CUSUM on a
/// lattice of `1/scale` counts ("signal when S ≥ h"), from every start state
/// `0..decision`: solves `(I − R) L = 1` for the sub-stochastic transition
/// matrix `R` by Gauss–Jordan elimination with partial pivoting, using
/// statrs' Poisson pmf. An independent f64 reference for the tests.
pub fn brook_evans_arl(mean: f64, scale: u32, reference: u32, decision: u32) -> Vec<f64> {
    use statrs::distribution::{Discrete, Poisson};
    let d = Poisson::new(mean).unwrap();
    let n = decision as usize;
    let mut a = vec![vec![0.0; n + 1]; n];
    for (i, row) in a.iter_mut().enumerate() {
        row[i] += 1.0;
        row[n] = 1.0;
        let mut x = 0u64;
        loop {
            let next = (i as i64 + i64::from(scale) * x as i64 - i64::from(reference)).max(0);
            if next >= n as i64 {
                break;
            }
            row[next as usize] -= d.pmf(x);
            x += 1;
        }
    }
    for c in 0..n {
        let p = (c..n)
            .max_by(|&i, &j| a[i][c].abs().total_cmp(&a[j][c].abs()))
            .unwrap();
        a.swap(c, p);
        let pivot = a[c].clone();
        for (r, row) in a.iter_mut().enumerate() {
            if r != c {
                let f = row[c] / pivot[c];
                for (v, p) in row.iter_mut().zip(&pivot).skip(c) {
                    *v -= f * p;
                }
            }
        }
    }
    (0..n).map(|i| a[i][n] / a[i][i]).collect()
}

/// Time stamps (s) recorded in `[0, duration_s)` by a counter with dead time
/// `tau_s` fed by a Poisson stream of `rate_cps`: non-paralyzable (arrivals
/// within τ of the last *recorded* event are lost) or paralyzable (within τ
/// of the last *arrival*, recorded or not).
pub fn recorded_events(
    rng: &mut SmallRng,
    rate_cps: f64,
    tau_s: f64,
    duration_s: f64,
    paralyzable: bool,
) -> Vec<f64> {
    let mut out = Vec::new();
    let mut t = 0.0;
    let mut dead_until = f64::NEG_INFINITY;
    loop {
        t += exponential(rng, rate_cps);
        if t >= duration_s {
            return out;
        }
        if t >= dead_until {
            out.push(t);
            dead_until = t + tau_s;
        } else if paralyzable {
            dead_until = t + tau_s;
        }
    }
}

/// The number of events such a counter records in `duration_s`.
pub fn recorded_count(
    rng: &mut SmallRng,
    rate_cps: f64,
    tau_s: f64,
    duration_s: f64,
    paralyzable: bool,
) -> u64 {
    recorded_events(rng, rate_cps, tau_s, duration_s, paralyzable).len() as u64
}
