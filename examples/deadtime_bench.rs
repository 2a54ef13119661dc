//! Demo: measuring the dead time of a Geiger-Mueller probe on the bench,
//! three ways, with countward's bench methods.
//!
//! Invented scenario: bench 3 of the Ashgill detector workshop qualifies a
//! pancake GM probe whose electronics impose a non-paralyzable dead time
//! (the true value in this simulation is 120 µs; the bench does not know it).
//! * Two sources: check sources A and B, alone and together, and the
//!   background, 60 s each.
//! * A decaying source: an activated foil (half-life 2.58 h, invented) read
//!   for 30 s every 20 minutes over 8 hours.
//! * Time stamps: 1 s of pulse time stamps from a strong source (1 µs
//!   resolution of the capture card).
//!
//! The counts and time stamps are simulated (a Poisson stream through a
//! non-paralyzable dead time, seeded). With `--write-data` the example also
//! writes the decay series and the time stamps to `examples/data/`, the
//! files the host tool's commands in the README read.
//!
//! Run: `cargo run --example deadtime_bench`

use countward::deadtime::{DeadTime, DecayPoint, ModelKind, fit_decay, fit_intervals, two_source};
use rand::SeedableRng;
use rand::rngs::SmallRng;
use rand_distr::{Distribution, Exp};
use std::fmt::Write;

const TRUE_TAU_S: f64 = 120e-6;

/// Time stamps recorded in `[0, duration)` behind a non-paralyzable dead time.
fn recorded(rng: &mut SmallRng, rate_cps: f64, duration_s: f64) -> Vec<f64> {
    let gaps = Exp::new(rate_cps).unwrap();
    let (mut t, mut live_from, mut out) = (0.0, 0.0, Vec::new());
    loop {
        t += gaps.sample(rng);
        if t >= duration_s {
            return out;
        }
        if t >= live_from {
            out.push(t);
            live_from = t + TRUE_TAU_S;
        }
    }
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let write_data = std::env::args().any(|a| a == "--write-data");
    let mut rng = SmallRng::seed_from_u64(31_337);
    println!("Ashgill workshop, bench 3: dead time of a pancake GM probe (simulated counts)\n");

    // 1. Two sources.
    let t = 60.0;
    let mut rate = |n: f64| recorded(&mut rng, n, t).len() as f64 / t;
    let (a, b, ab, bg) = (rate(2600.0), rate(3400.0), rate(5990.0), rate(0.9));
    let r = two_source(a, b, ab, bg, Some(t))?;
    println!(
        "two sources: A {a:.1} cps, B {b:.1} cps, A+B {ab:.1} cps, background {bg:.2} cps (60 s each)"
    );
    println!(
        "  dead time {:.1} µs ± {:.1} µs (exact solution); approximations {:.1} µs (small-loss) and {:.1} µs (simple)",
        r.dead_time_s * 1e6,
        r.std_uncertainty_s.unwrap_or(f64::NAN) * 1e6,
        r.first_order_s * 1e6,
        r.simple_s * 1e6
    );

    // 2. The decaying foil.
    let half_life_s = 2.58 * 3600.0;
    let lambda = 2f64.ln() / half_life_s;
    let mut csv = String::from(
        "# Ashgill bench 3, activated foil, 30 s counts every 20 min (simulated)\ntime_s,measured_cps,counting_s\n",
    );
    let mut points = Vec::new();
    for i in 0..25 {
        let start = 1200.0 * f64::from(i);
        let n = 9000.0 * (-lambda * start).exp();
        let m = recorded(&mut rng, n, 30.0).len() as f64 / 30.0;
        points.push(DecayPoint {
            time_s: start,
            measured_cps: m,
            counting_s: Some(30.0),
        });
        writeln!(csv, "{start},{m:.4},30")?;
    }
    println!(
        "\ndecaying foil: {} readings over 8 h, from {:.0} down to {:.0} cps",
        points.len(),
        points[0].measured_cps,
        points[24].measured_cps
    );
    for kind in [ModelKind::NonParalyzable, ModelKind::Paralyzable] {
        let fit = fit_decay(&points, half_life_s, kind, 0.0)?;
        println!(
            "  {kind:?}: dead time {:.1} µs ± {:.1} µs, initial true rate {:.0} ± {:.0} cps, chi2 {:.1} / {}",
            fit.dead_time_s * 1e6,
            fit.dead_time_sd_s * 1e6,
            fit.initial_cps,
            fit.initial_sd_cps,
            fit.chi2,
            fit.dof
        );
    }

    // 3. Time stamps, rounded to the capture card's 1 µs.
    let stamps: Vec<f64> = recorded(&mut rng, 2500.0, 1.0)
        .iter()
        .map(|t| (t * 1e6).round() / 1e6)
        .collect();
    let fit = fit_intervals(&stamps)?;
    println!(
        "\ntime stamps: {} intervals; dead time {:.1} µs ± {:.1} µs, true rate {:.0} cps; shape p = {:.2}",
        fit.intervals,
        fit.dead_time_s * 1e6,
        fit.std_uncertainty_s * 1e6,
        fit.true_rate_cps,
        fit.shape_p_value
    );

    // Using the result: correct a survey reading with the two-source τ.
    let probe = DeadTime::non_paralyzable(r.dead_time_s)?;
    let c = probe.correct_with_uncertainty(2200.0, 10.0, r.std_uncertainty_s.unwrap_or(0.0))?;
    println!(
        "\na survey reading of 2200 cps (10 s) corrects to {:.0} ± {:.0} cps (counting {:.0}, dead time {:.0})",
        c.true_cps, c.std_uncertainty_cps, c.from_counts_cps, c.from_dead_time_cps
    );
    println!("(simulation truth: τ = 120 µs)");

    if write_data {
        std::fs::write("examples/data/foil_decay.csv", csv)?;
        let mut s = String::from(
            "# Ashgill bench 3, 1 s of pulse time stamps, 1 µs resolution (simulated)\ntimestamp_s\n",
        );
        for t in &stamps {
            writeln!(s, "{t:.6}")?;
        }
        std::fs::write("examples/data/probe_stamps.csv", s)?;
        println!("wrote examples/data/foil_decay.csv and examples/data/probe_stamps.csv");
    }
    Ok(())
}
