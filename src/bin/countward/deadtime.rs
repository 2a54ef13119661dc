//! `countward deadtime …`: correction of measured rates and bench
//! estimation of the dead time. Every number comes from `countward::deadtime`.

use super::{Failure, SAFETY, bad, check, check_non_negative, check_positive, lib, lib_in, num};
use clap::{Args, Subcommand, ValueEnum};
use countward::deadtime::{self, DeadTime, DecayFit, DecayPoint, ModelKind};
use countward::{Error, Param};
use serde_json::{Value, json};

use crate::input;
use crate::output;
use crate::svg;

#[derive(Subcommand)]
pub enum DeadtimeCommand {
    /// Correct a measured rate for dead time (both solutions of a paralyzable counter).
    #[command(after_help = SAFETY)]
    Correct(CorrectArgs),
    /// Dead time from the two-source method (non-paralyzable counter).
    #[command(after_help = SAFETY)]
    TwoSource(TwoSourceArgs),
    /// Dead time from a decaying source: CSV with columns time_s, measured_cps[, counting_s].
    #[command(after_help = SAFETY)]
    Decay(DecayArgs),
    /// Dead time from event time stamps: CSV with a column timestamp_s.
    #[command(after_help = SAFETY)]
    Intervals(IntervalsArgs),
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
pub enum Model {
    /// m = n/(1 + n τ).
    NonParalyzable,
    /// m = n exp(−n τ).
    Paralyzable,
    /// Lee & Gardner (2000): m = n exp(−n f τ)/(1 + n (1 − f) τ); needs --paralyzable-fraction.
    Hybrid,
}

impl Model {
    fn kind(self) -> ModelKind {
        match self {
            Model::NonParalyzable => ModelKind::NonParalyzable,
            Model::Paralyzable => ModelKind::Paralyzable,
            Model::Hybrid => ModelKind::Hybrid,
        }
    }
}

fn model_name(k: ModelKind) -> &'static str {
    match k {
        ModelKind::NonParalyzable => "non-paralyzable",
        ModelKind::Paralyzable => "paralyzable",
        ModelKind::Hybrid => "hybrid",
    }
}

/// A duration with 4 significant digits in the unit that suits it (ns, µs, ms, s).
fn time_text(v: f64) -> String {
    let (scale, unit) = time_unit(v);
    format!("{} {unit}", sig(v * scale, 4))
}

/// A duration and its standard uncertainty in one unit: value to 4
/// significant digits, uncertainty to 2, coverage stated.
fn time_sd_text(v: f64, sd: f64) -> String {
    let (scale, unit) = time_unit(v);
    format!("{} ± {} {unit} (1σ)", sig(v * scale, 4), sig(sd * scale, 2))
}

fn time_unit(v: f64) -> (f64, &'static str) {
    let a = v.abs();
    if a >= 1.0 || a == 0.0 {
        (1.0, "s")
    } else if a >= 1e-3 {
        (1e3, "ms")
    } else if a >= 1e-6 {
        (1e6, "µs")
    } else {
        (1e9, "ns")
    }
}

/// `v` to `digits` significant digits, plain notation for moderate magnitudes.
fn sig(v: f64, digits: i32) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let exp = v.abs().log10().floor() as i32;
    if !(-4..9).contains(&exp) {
        return format!("{:.*e}", (digits - 1).max(0) as usize, v);
    }
    let decimals = (digits - 1 - exp).max(0) as usize;
    format!("{v:.decimals$}")
}

/// A rate with 4 significant digits.
fn cps_text(v: f64) -> String {
    format!("{} cps", sig(v, 4))
}

#[derive(Args)]
pub struct CorrectArgs {
    /// Measured (recorded) rate, counts per second.
    #[arg(long, value_name = "M", allow_hyphen_values = true)]
    measured_cps: f64,
    /// Dead time τ, seconds.
    #[arg(long, value_name = "T", allow_hyphen_values = true)]
    dead_time_s: f64,
    /// Dead-time model.
    #[arg(long, value_enum)]
    model: Model,
    /// Extending fraction f of τ for the hybrid model, 0 to 1.
    #[arg(long, value_name = "F", allow_hyphen_values = true)]
    paralyzable_fraction: Option<f64>,
    /// Counting time behind the measured rate, seconds: adds its standard uncertainty.
    #[arg(long, value_name = "S", allow_hyphen_values = true)]
    seconds: Option<f64>,
    /// Standard uncertainty of τ, seconds (needs --seconds).
    #[arg(
        long,
        value_name = "U",
        allow_hyphen_values = true,
        requires = "seconds"
    )]
    dead_time_sd_s: Option<f64>,
    /// Print one JSON object.
    #[arg(long)]
    json: bool,
}

#[derive(Args)]
pub struct TwoSourceArgs {
    /// Measured rate of source A alone, counts per second.
    #[arg(long, value_name = "A", allow_hyphen_values = true)]
    a_cps: f64,
    /// Measured rate of source B alone.
    #[arg(long, value_name = "B", allow_hyphen_values = true)]
    b_cps: f64,
    /// Measured rate of A and B together.
    #[arg(long, value_name = "AB", allow_hyphen_values = true)]
    ab_cps: f64,
    /// Measured background rate (default 0).
    #[arg(
        long,
        value_name = "BG",
        allow_hyphen_values = true,
        default_value_t = 0.0
    )]
    background_cps: f64,
    /// Counting time of each of the four measurements, seconds: gives the uncertainty.
    #[arg(long, value_name = "T", allow_hyphen_values = true)]
    seconds: Option<f64>,
    /// Print one JSON object.
    #[arg(long)]
    json: bool,
}

#[derive(Args)]
pub struct DecayArgs {
    /// CSV file with a header row: time_s, measured_cps and optionally counting_s.
    #[arg(long, value_name = "FILE.csv")]
    input: String,
    /// Half-life of the source, seconds.
    #[arg(long, value_name = "H", allow_hyphen_values = true)]
    half_life_s: f64,
    /// Fit only this model (default: fit non-paralyzable and paralyzable and compare).
    #[arg(long, value_enum)]
    model: Option<Model>,
    /// Extending fraction f for --model hybrid, 0 to 1.
    #[arg(long, value_name = "F", allow_hyphen_values = true)]
    paralyzable_fraction: Option<f64>,
    /// Write an SVG chart of the data and the fitted curves (never over the input).
    #[arg(long, value_name = "FILE.svg")]
    plot: Option<String>,
    /// Report the fits even when every model is rejected by its chi-square
    /// test (p < 0.001 with counting times given), marked as rejected.
    #[arg(long)]
    allow_poor_fit: bool,
    /// Print one JSON object.
    #[arg(long)]
    json: bool,
}

#[derive(Args)]
pub struct IntervalsArgs {
    /// CSV file with a header row naming a column timestamp_s (seconds, non-decreasing).
    #[arg(long, value_name = "FILE.csv")]
    input: String,
    /// Print one JSON object.
    #[arg(long)]
    json: bool,
}

pub fn json_flag(c: &DeadtimeCommand) -> bool {
    match c {
        DeadtimeCommand::Correct(a) => a.json,
        DeadtimeCommand::TwoSource(a) => a.json,
        DeadtimeCommand::Decay(a) => a.json,
        DeadtimeCommand::Intervals(a) => a.json,
    }
}

pub fn run(c: DeadtimeCommand) -> Result<(String, Value), Failure> {
    match c {
        DeadtimeCommand::Correct(a) => correct(a),
        DeadtimeCommand::TwoSource(a) => two_source(a),
        DeadtimeCommand::Decay(a) => decay(a),
        DeadtimeCommand::Intervals(a) => intervals(a),
    }
}

fn fraction(model: Model, f: Option<f64>) -> Result<f64, Failure> {
    match (model, f) {
        (Model::Hybrid, None) => Err(Failure(
            "error: --model hybrid needs --paralyzable-fraction F (the extending part of the dead time, 0 to 1)".into(),
        )),
        (Model::Hybrid, Some(f)) => check("--paralyzable-fraction", f, (0.0..=1.0).contains(&f), "must lie between 0 and 1"),
        (_, Some(f)) => Err(bad("--paralyzable-fraction", f, "applies to --model hybrid only")),
        (_, None) => Ok(0.0),
    }
}

fn correct(a: CorrectArgs) -> Result<(String, Value), Failure> {
    let m = check_non_negative("--measured-cps", a.measured_cps)?;
    let tau = check(
        "--dead-time-s",
        a.dead_time_s,
        a.dead_time_s > 0.0 && a.dead_time_s <= 1e3,
        "must be greater than 0 (and at most 1000 s)",
    )?;
    let f = fraction(a.model, a.paralyzable_fraction)?;
    let flags = [
        (Param::RateCps, "--measured-cps", m),
        (Param::DeadTime, "--dead-time-s", tau),
        (Param::Fraction, "--paralyzable-fraction", f),
    ];
    let model = DeadTime::of_kind(a.model.kind(), tau, f).map_err(|e| lib_in(e, &flags))?;
    let c = match model.correct(m) {
        Ok(c) => c,
        Err(Error::OutOfRange(_)) => {
            let limit = model.measured_limit_cps();
            // Dead times are micro- to milliseconds: a τ of 10 ms or more
            // that makes the reading impossible is most likely a unit slip.
            if tau >= 1e-2 {
                return Err(bad(
                    "--dead-time-s",
                    num(tau),
                    &format!(
                        "is in seconds: with τ = {} the counter could record at most {}, below --measured-cps {}; did you mean {} µs, i.e. --dead-time-s {}e-6?",
                        time_text(tau),
                        cps_text(limit),
                        num(m),
                        num(tau),
                        num(tau)
                    ),
                ));
            }
            let what = if a.model == Model::NonParalyzable {
                "1/τ"
            } else {
                "the model's maximum"
            };
            return Err(bad(
                "--measured-cps",
                num(m),
                &format!(
                    "is above the largest rate this counter can record ({}, {what}); it is not a reading of this model",
                    cps_text(limit)
                ),
            ));
        }
        Err(e) => return Err(lib_in(e, &flags)),
    };
    let mut v = json!({
        "true_cps": c.true_cps,
        "true_rate_cps": c.true_cps,
        "true_cps_high": c.true_cps_high,
        "true_rate_high_cps": c.true_cps_high,
        "saturated": c.saturated,
        "gain": c.gain,
        "correction_factor": if m > 0.0 { c.true_cps / m } else { 1.0 },
        "noise_gain": c.gain,
    });
    let mut text = format!(
        "true rate: {}  ({} model, τ = {})",
        cps_text(c.true_cps),
        model_name(a.model.kind()),
        time_text(tau)
    );
    if let Some(t) = a.seconds {
        let t = check_positive("--seconds", t)?;
        let sd = check_non_negative("--dead-time-sd-s", a.dead_time_sd_s.unwrap_or(0.0))?;
        if sd > tau {
            return Err(bad(
                "--dead-time-sd-s",
                num(sd),
                &format!(
                    "is larger than the dead time itself ({}); give the standard uncertainty of τ in seconds",
                    time_text(tau)
                ),
            ));
        }
        let u = model.correct_with_uncertainty(m, t, sd).map_err(|e| {
            lib_in(
                e,
                &[
                    (Param::Seconds, "--seconds", t),
                    (Param::DeadTime, "--dead-time-sd-s", sd),
                    (Param::RateCps, "--measured-cps", m),
                ],
            )
        })?;
        v["std_uncertainty_cps"] = json!(u.std_uncertainty_cps);
        text += &format!(
            "\n  standard uncertainty (1σ): {}  (from counting {}, from the dead time {})",
            cps_text(u.std_uncertainty_cps),
            cps_text(u.from_counts_cps),
            cps_text(u.from_dead_time_cps)
        );
    }
    if let Some(h) = c.true_cps_high {
        // The fold-back solution is physical only past the peak, i.e. in a
        // field that the counter reads as at most its maximum while the true
        // rate exceeds 1/(fτ): say how extreme that would be.
        text += &format!(
            "\n  other solution (fold-back branch, past the counter's peak): {} — only if the field can be that strong; a reading alone cannot exclude it, an independent instrument can",
            cps_text(h)
        );
    }
    if c.saturated {
        text += &format!(
            "\n  SATURATED: the correction amplifies counting noise {}-fold here; treat the reading as over-range",
            sig(c.gain, 3)
        );
    }
    Ok((text, v))
}

fn two_source(a: TwoSourceArgs) -> Result<(String, Value), Failure> {
    let (m1, m2, m12) = (
        check_positive("--a-cps", a.a_cps)?,
        check_positive("--b-cps", a.b_cps)?,
        check_positive("--ab-cps", a.ab_cps)?,
    );
    let mb = check_non_negative("--background-cps", a.background_cps)?;
    let t = match a.seconds {
        Some(t) => Some(check_positive("--seconds", t)?),
        None => None,
    };
    let r = deadtime::two_source(m1, m2, m12, mb, t).map_err(|e| match e {
        Error::OutOfRange(_) | Error::NotFinite(_) => lib_in(
            e,
            &[
                (Param::Seconds, "--seconds", t.unwrap_or(f64::NAN)),
            ],
        ),
        Error::NotDetermined(_) => Failure(
            "error: these rates cannot determine the dead time (no significant loss: A + B − AB − background must clearly exceed 0; try stronger sources or longer counts)".into(),
        ),
        e => lib(e),
    })?;
    let main = match r.std_uncertainty_s {
        Some(u) => time_sd_text(r.dead_time_s, u),
        None => format!(
            "{} (give --seconds for its uncertainty)",
            time_text(r.dead_time_s)
        ),
    };
    // An approximation is reported as valid only where it agrees with the
    // exact solution to 5 %; otherwise it is shown as invalid at these losses.
    let judged = |v: f64| {
        let off = (v / r.dead_time_s - 1.0).abs();
        if off <= 0.05 {
            format!("{} ({} % from exact)", time_text(v), sig(off * 100.0, 2))
        } else {
            format!(
                "{} (NOT valid at these losses: {} % from exact)",
                time_text(v),
                sig(off * 100.0, 2)
            )
        }
    };
    let loss = m12 * r.dead_time_s; // 1 − m/n for a non-paralyzable counter
    let text = format!(
        "dead time: {main}  (exact two-source solution, non-paralyzable; count loss at A+B {} %)\n  approximations: small-loss with background {}; simple without background {}",
        sig(loss * 100.0, 2),
        judged(r.first_order_s),
        judged(r.simple_s)
    );
    Ok((
        text,
        json!({
            "dead_time_s": r.dead_time_s,
            "std_uncertainty_s": r.std_uncertainty_s,
            "first_order_s": r.first_order_s,
            "simple_s": r.simple_s,
            "first_order_valid": (r.first_order_s / r.dead_time_s - 1.0).abs() <= 0.05,
            "simple_valid": (r.simple_s / r.dead_time_s - 1.0).abs() <= 0.05,
        }),
    ))
}

fn decay(a: DecayArgs) -> Result<(String, Value), Failure> {
    let half = check_positive("--half-life-s", a.half_life_s)?;
    if let Some(plot) = &a.plot {
        // Refused before the work, not after it.
        output::check_not_input("--plot", plot, &[("--input", &a.input)])?;
    }
    let mut points: Vec<DecayPoint<f64>> = Vec::new();
    let mut lines: Vec<u64> = Vec::new();
    input::read_each(
        "--input",
        &a.input,
        &["time_s", "measured_cps"],
        &["counting_s"],
        |line, v| {
            let (t, m, c) = (v[0].unwrap_or(f64::NAN), v[1].unwrap_or(f64::NAN), v[2]);
            if m <= 0.0 {
                return Err(format!("measured_cps {m} must be greater than 0"));
            }
            if c.is_some_and(|c| c <= 0.0) {
                return Err("counting_s must be greater than 0".into());
            }
            points.push(DecayPoint {
                time_s: t,
                measured_cps: m,
                counting_s: c,
            });
            lines.push(line);
            Ok(())
        },
    )
    .map_err(Failure)?;
    // Two measurements at one time are a copy-paste slip, not data.
    let mut order: Vec<u32> = (0..points.len() as u32).collect();
    if points.windows(2).any(|w| w[1].time_s <= w[0].time_s) {
        order.sort_by(|&i, &j| {
            points[i as usize]
                .time_s
                .total_cmp(&points[j as usize].time_s)
        });
        let mut problems = input::Problems::default();
        for w in order.windows(2) {
            let (i, j) = (w[0] as usize, w[1] as usize);
            if points[i].time_s == points[j].time_s {
                let (first, second) = (lines[i].min(lines[j]), lines[i].max(lines[j]));
                problems.push(format!(
                    "error: {} line {second}: time_s {} repeats line {first} (two measurements at one time)",
                    a.input, points[i].time_s
                ));
            }
        }
        if !problems.is_empty() {
            return Err(Failure(problems.message()));
        }
    }
    drop(order);
    let kinds: Vec<(ModelKind, f64)> = match a.model {
        Some(m) => vec![(m.kind(), fraction(m, a.paralyzable_fraction)?)],
        None => {
            if a.paralyzable_fraction.is_some() {
                return Err(bad(
                    "--paralyzable-fraction",
                    a.paralyzable_fraction.unwrap_or(0.0),
                    "applies to --model hybrid only",
                ));
            }
            vec![
                (ModelKind::NonParalyzable, 0.0),
                (ModelKind::Paralyzable, 1.0),
            ]
        }
    };
    let mut fits: Vec<DecayFit<f64>> = Vec::new();
    let mut failures = Vec::new();
    for (k, f) in &kinds {
        let spin = input::spinner(
            &format!(
                "fitting the {} model to {} points",
                model_name(*k),
                points.len()
            ),
            points.len(),
        );
        let result = deadtime::fit_decay(&points, half, *k, *f);
        if let Some(s) = spin {
            s.finish_and_clear();
        }
        match result {
            Ok(fit) => fits.push(fit),
            Err(e @ (Error::OutOfRange(Param::Seconds) | Error::NotFinite(Param::Seconds))) => {
                return Err(lib_in(e, &[(Param::Seconds, "--half-life-s", half)]));
            }
            Err(e) => failures.push((*k, e)),
        }
    }
    if fits.is_empty() {
        let why = match failures.first().map(|f| f.1) {
            Some(Error::NotDetermined(_)) => "the data cannot determine the dead time (too few points, or losses too small to show above the counting noise)".to_string(),
            Some(e) => format!("{e}"),
            None => "no fit".to_string(),
        };
        return Err(Failure(format!("error: --input {}: {why}", a.input)));
    }
    let best = fits
        .iter()
        .min_by(|x, y| x.chi2.total_cmp(&y.chi2))
        .copied()
        .expect("at least one fit");
    // Goodness of fit: with counting times the weights are absolute and
    // chi2 follows a chi-square law with `dof` degrees of freedom under the
    // model; p < 0.001 rejects it.
    let fit_p = |fit: &DecayFit<f64>| -> Option<f64> {
        (fit.weighted_by_counts && fit.dof > 0)
            .then(|| countward::math::gamma_q(f64::from(fit.dof) / 2.0, fit.chi2 / 2.0).ok())
            .flatten()
    };
    let rejected = |fit: &DecayFit<f64>| fit_p(fit).is_some_and(|p| p < 1e-3);
    if fits.iter().all(rejected) && !a.allow_poor_fit {
        let worst: Vec<String> = fits
            .iter()
            .map(|f| {
                format!(
                    "{} chi2/dof = {}",
                    model_name(f.model.kind()),
                    sig(f.chi2 / f64::from(f.dof), 3)
                )
            })
            .collect();
        return Err(Failure(format!(
            "error: --input {}: no dead-time model fits these data ({}; p < 0.001): the rates do not follow a decaying source seen through a dead time (check --half-life-s, the units, and the data); --allow-poor-fit prints the rejected fits",
            a.input,
            worst.join(", ")
        )));
    }
    let mut text = String::new();
    let mut fit_values = Vec::new();
    for fit in &fits {
        let name = model_name(fit.model.kind());
        let residuals: Vec<f64> = points.iter().map(|p| fit.residual(p)).collect();
        let p = fit_p(fit);
        let verdict = match p {
            Some(p) if p < 1e-3 => format!(", p = {} — MODEL REJECTED", sig(p, 2)),
            Some(p) => format!(", p = {}", sig(p, 2)),
            None => String::new(),
        };
        text += &format!(
            "{name}: dead time {}, initial true rate {} ± {} (1σ), chi2 {} for {} degrees of freedom{verdict}\n",
            time_sd_text(fit.dead_time_s, fit.dead_time_sd_s),
            cps_text(fit.initial_cps),
            sig(fit.initial_sd_cps, 2),
            sig(fit.chi2, 4),
            fit.dof
        );
        fit_values.push(json!({
            "model": name,
            "dead_time_s": fit.dead_time_s,
            "std_uncertainty_s": fit.dead_time_sd_s,
            "initial_cps": fit.initial_cps,
            "initial_sd_cps": fit.initial_sd_cps,
            "chi2": fit.chi2,
            "dof": fit.dof,
            "fit_p_value": p,
            "rejected": p.is_some_and(|p| p < 1e-3),
            "residuals": residuals,
        }));
    }
    for (k, e) in &failures {
        text += &format!("{}: no fit ({e})\n", model_name(*k));
    }
    if fits.len() > 1 {
        text += &format!(
            "better fit: {} (smaller chi2)",
            model_name(best.model.kind())
        );
    } else {
        text.pop();
    }
    if !best.weighted_by_counts {
        text += "\n  (no counting_s column: relative weights, uncertainties scaled by the scatter)";
    }
    if let Some(path) = &a.plot {
        let data: Vec<(f64, f64)> = points.iter().map(|p| (p.time_s, p.measured_cps)).collect();
        let (t0, t1) = data
            .iter()
            .fold((f64::MAX, f64::MIN), |(a, b), p| (a.min(p.0), b.max(p.0)));
        let colours = ["#c0392b", "#1f6fb2", "#2e8b57"];
        let curves: Vec<svg::Curve> = fits
            .iter()
            .zip(colours)
            .map(|(fit, colour)| svg::Curve {
                label: format!(
                    "{} (τ = {})",
                    model_name(fit.model.kind()),
                    time_text(fit.dead_time_s)
                ),
                colour,
                points: (0..=200)
                    .map(|i| {
                        let t = t0 + (t1 - t0) * f64::from(i) / 200.0;
                        (t, fit.predicted_cps(t))
                    })
                    .collect(),
            })
            .collect();
        let chart = svg::chart(
            "Decaying source: measured rate and dead-time fits",
            "time (s)",
            "measured rate (cps)",
            &data,
            &curves,
        );
        output::write("--plot", path, &chart, &[("--input", &a.input)])?;
        text += &format!("\nplot written to {path}");
    }
    Ok((
        text,
        json!({
            "model": model_name(best.model.kind()),
            "dead_time_s": best.dead_time_s,
            "std_uncertainty_s": best.dead_time_sd_s,
            "initial_cps": best.initial_cps,
            "fits": fit_values,
        }),
    ))
}

fn intervals(a: IntervalsArgs) -> Result<(String, Value), Failure> {
    let mut stamps: Vec<f64> = Vec::new();
    let mut previous: Option<(u64, f64)> = None;
    input::read_each("--input", &a.input, &["timestamp_s"], &[], |line, v| {
        let t = v[0].unwrap_or(f64::NAN);
        if let Some((pl, pt)) = previous {
            if t < pt {
                return Err(format!(
                    "timestamp_s {t} is earlier than {pt} on line {pl} (time stamps must not decrease)"
                ));
            }
            if t == pt {
                return Err(format!(
                    "timestamp_s {t} repeats line {pl}: a counter with dead time cannot record two events at one instant (time stamps too coarse, or a duplicated line)"
                ));
            }
        }
        previous = Some((line, t));
        stamps.push(t);
        Ok(())
    })
    .map_err(Failure)?;
    let spin = input::spinner("fitting the interval distribution", stamps.len());
    let fit = deadtime::fit_intervals(&stamps);
    if let Some(s) = spin {
        s.finish_and_clear();
    }
    let fit = fit.map_err(|e| match e {
        Error::NotDetermined(countward::Param::Data) => Failure(format!(
            "error: --input {}: too few time stamps to determine the dead time (need at least 21)",
            a.input
        )),
        Error::NotDetermined(_) => Failure(format!(
            "error: --input {}: the dead time does not show (the shortest intervals are explained by the rate alone; the rate is too low for this dead time)",
            a.input
        )),
        e => lib(e),
    })?;
    let text = format!(
        "dead time: {}  (from the shortest of {} intervals; true rate {} if non-paralyzable)\n  shape beyond τ: chi2 {} for {} degrees of freedom, p = {}{}",
        time_sd_text(fit.dead_time_s, fit.std_uncertainty_s),
        fit.intervals,
        cps_text(fit.true_rate_cps),
        sig(fit.shape_chi2, 4),
        fit.shape_dof,
        sig(fit.shape_p_value, 2),
        if fit.shape_p_value < 0.01 {
            "  (NOT a shifted exponential: check the counter model, afterpulses or the source)"
        } else {
            ""
        }
    );
    Ok((
        text,
        json!({
            "dead_time_s": fit.dead_time_s,
            "std_uncertainty_s": fit.std_uncertainty_s,
            "true_rate_cps": fit.true_rate_cps,
            "intervals": fit.intervals,
            "shape_chi2": fit.shape_chi2,
            "shape_dof": fit.shape_dof,
            "shape_p_value": fit.shape_p_value,
        }),
    ))
}
