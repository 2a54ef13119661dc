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
