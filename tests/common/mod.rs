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

/// Any f64, weighted toward the values that break numerics (NaN, ±∞, 0,
/// subnormals, the extremes) and toward the ranges where the code does its
/// work, so that most cases reach the branches under test.
pub fn hostile_f64() -> impl proptest::strategy::Strategy<Value = f64> {
    use proptest::prelude::*;
    prop_oneof![
        2 => proptest::num::f64::ANY,
        1 => Just(f64::NAN),
        1 => Just(f64::INFINITY),
        1 => Just(f64::NEG_INFINITY),
        1 => Just(0.0),
        1 => Just(f64::MIN_POSITIVE),
        1 => Just(f64::MAX),
        1 => Just(5e-324),
        1 => 1e-320f64..1e-300,
        1 => 1e300f64..1e308,
        3 => (-20.0f64..20.0).prop_map(|e| 10f64.powf(e)),
        2 => 0.0f64..1.0,
        1 => (1.0f64 - 1e-15)..1.0,
    ]
}

/// Wald's SPRT on an integer lattice, as an absorbing Markov chain: from a
/// log-likelihood ratio of 0, each tick adds `counts · per_count − per_tick`
/// with counts ~ Poisson(`mean`) (statrs pmf); the test stops at `≥ upper`
/// or `≤ lower`. Returns (P(stop at the upper boundary), E[ticks per test]),
/// solved by Gauss–Seidel sweeps to convergence. An independent f64
/// reference for the SPRT's operating characteristic (Wald's formulas ignore
/// the overshoot; this does not).
pub fn sprt_chain(mean: f64, per_count: i64, per_tick: i64, upper: i64, lower: i64) -> (f64, f64) {
    use statrs::distribution::{Discrete, DiscreteCDF, Poisson};
    let poisson = Poisson::new(mean).unwrap();
    // Counts that matter: up to the first that always reaches the upper boundary.
    let max_counts = ((upper - lower + per_tick) / per_count + 1) as u64;
    let pmf: Vec<f64> = (0..=max_counts).map(|c| poisson.pmf(c)).collect();
    let beyond = poisson.sf(max_counts); // P(counts > max_counts): always upper
    let states = (upper - lower - 1) as usize; // lower + 1 ..= upper − 1
    let mut p_up = vec![0.0f64; states];
    let mut t = vec![0.0f64; states];
    for _ in 0..200_000 {
        let mut change = 0.0f64;
        for i in 0..states {
            let s = lower + 1 + i as i64;
            let (mut pu, mut tt) = (beyond, 1.0);
            for (c, &w) in pmf.iter().enumerate() {
                let next = s + c as i64 * per_count - per_tick;
                if next >= upper {
                    pu += w;
                } else if next > lower {
                    let j = (next - lower - 1) as usize;
                    pu += w * p_up[j];
                    tt += w * t[j];
                }
            }
            change = change.max((pu - p_up[i]).abs()).max((tt - t[i]).abs() / tt);
            p_up[i] = pu;
            t[i] = tt;
        }
        if change < 1e-13 {
            break;
        }
    }
    let start = (-lower - 1) as usize; // the state s = 0
    (p_up[start], t[start])
}

/// Writes `bytes` to a file `name` in a folder of this test process
/// (`countward-<tag>-<pid>` in the system's temporary folder) and returns its path.
pub fn temp_file(tag: &str, name: &str, bytes: &[u8]) -> String {
    let dir = std::env::temp_dir().join(format!("countward-{tag}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(name);
    std::fs::write(&p, bytes).unwrap();
    p.to_string_lossy().into_owned()
}

/// Runs the binary at `exe` (pass `env!("CARGO_BIN_EXE_countward")`) with
/// `args`: (exit status, stdout, stderr), output read as lossy UTF-8.
pub fn run_exe(exe: &str, args: &[&str]) -> (i32, String, String) {
    let out = std::process::Command::new(exe).args(args).output().unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// A threshold plan from "one in n" probabilities per check: warning,
/// alarm, clearing (the hysteresis band) and low counts.
pub fn plan_one_in(
    warn: u64,
    alarm: u64,
    clear: u64,
    low: u64,
) -> countward::detect::ThresholdPlan {
    use countward::fixed::FixedAlpha;
    countward::detect::ThresholdPlan::new(
        FixedAlpha::one_in(warn).unwrap(),
        FixedAlpha::one_in(alarm).unwrap(),
        FixedAlpha::one_in(clear).unwrap(),
        FixedAlpha::one_in(low).unwrap(),
    )
    .unwrap()
}
