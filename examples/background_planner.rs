//! Demo: planning the count thresholds of a small radiation probe.
//!
//! Invented scenario: a probe on a hilltop weather mast carries one
//! Geiger-Mueller tube whose background, measured over a quiet week, is
//! about 0.35 counts per second. Its firmware counts pulses in back-to-back
//! (non-overlapping) windows and must (1) alarm on excess counts with at
//! most one false alarm per year, (2) report a dead tube when a window holds
//! improbably few counts, and (3) report a stalled pulse line when no pulse
//! at all arrives for too long. The MCU is a Cortex-M0 without an FPU, so the
//! table it stores is computed here and cross-checked against the
//! integer-only tier the firmware itself would run.
//!
//! Run: `cargo run --example background_planner`
//!
//! This is a planning aid, not a certified design: settings must be validated
//! for the instrument, and local regulations and licensed radiation-protection
//! practice take precedence.

use countward::fixed::{self, FixedAlpha, FixedMean};
use countward::gap::silence_threshold_s;
use countward::poisson::{alarm_threshold, exact_limits, fault_threshold};

const SECONDS_PER_YEAR: f64 = 365.25 * 24.0 * 3600.0;

fn main() -> Result<(), countward::Error> {
    // The quiet week: 211 680 pulses in 7 days (invented data).
    let week_s = 7.0 * 24.0 * 3600.0;
    let week_counts = 211_680u32;
    let limits = exact_limits(week_counts, 0.95_f64)?;
    let (bg_lo, bg_hi) = (limits.lower / week_s, limits.upper / week_s);
    let bg = f64::from(week_counts) / week_s;
    println!(
        "Background from the quiet week: {bg:.4} cps (95% exact interval {bg_lo:.4} to {bg_hi:.4} cps)"
    );
    println!(
        "Thresholds use the upper end, {bg_hi:.4} cps: a larger mean never lowers them, so the plan stays conservative.\n"
    );

    println!("Alarm on excess counts, at most one false alarm per year:");
    println!(
        "{:>9} {:>12} {:>10} {:>14} {:>9} {:>9} {:>9}",
        "window s", "mean counts", "alpha", "P(false)/check", "f64", "f32", "fixed"
    );
    for window_s in [1.0_f64, 2.0, 5.0, 10.0, 30.0] {
        let mean = bg_hi * window_s;
        let checks_per_year = SECONDS_PER_YEAR / window_s;
        let alpha = 1.0 / checks_per_year;
        let t64 = alarm_threshold(mean, alpha)?;
        let t32 = alarm_threshold(mean as f32, alpha as f32)?;
        let fm = FixedMean::from_raw((mean * 4_294_967_296.0).round() as u64)?;
        let fa = FixedAlpha::one_in(checks_per_year.round() as u64)?;
        let tf = fixed::alarm_threshold(fm, fa)?;
        println!(
            "{window_s:>9} {mean:>12.3} {alpha:>10.2e} {:>14.2e} {:>9} {:>9} {:>9}",
            t64.tail.p, t64.counts, t32.counts, tf.counts
        );
    }

    println!("\nDead tube: a 60 s window with improbably few counts (one false report per year):");
    let mean = bg_lo * 60.0; // the low end is the conservative side for a fault
    let alpha = 60.0 / SECONDS_PER_YEAR;
    match fault_threshold(mean, alpha)? {
        Some(t) => println!(
            "  expected {mean:.1} counts; report a fault at {} counts or fewer (P = {:.2e} per window)",
            t.counts, t.tail.p
        ),
        None => println!(
            "  expected {mean:.1} counts: no count is improbable enough; lengthen the window"
        ),
    }

    println!("\nStalled pulse line: no pulse at all for t seconds at {bg_lo:.4} cps:");
    for per_year in [1.0_f64, 0.01] {
        // Each gap between pulses is one chance; there are about rate × year gaps per year.
        let alpha = per_year / (bg_lo * SECONDS_PER_YEAR);
        let t = silence_threshold_s(bg_lo, alpha, 1)?;
        println!("  {per_year} false report(s) per year: silent for {t:.1} s");
    }

    println!(
        "\nTable for the firmware (2 s windows, one false alarm per year), one row per background step;"
    );
    println!("firmware uses the row at or above its current background estimate:");
    let alpha_2s = 2.0 / SECONDS_PER_YEAR;
    for step in 0..8 {
        let rate = 0.25 + 0.05 * f64::from(step);
        let t = alarm_threshold(rate * 2.0, alpha_2s)?;
        println!(
            "  background <= {rate:.2} cps: alarm at {} counts in 2 s",
            t.counts
        );
    }
    println!("\nValidate every setting on the instrument itself; local regulations and licensed");
    println!("radiation-protection practice take precedence over these numbers.");
    Ok(())
}
