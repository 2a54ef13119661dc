//! `countward deadtime …`: correction of measured rates and bench
//! estimation of the dead time. Every number comes from `countward::deadtime`.

use super::{Failure, SAFETY, bad, check, check_non_negative, check_positive, lib, num};
use clap::{Args, Subcommand, ValueEnum};
use countward::Error;
use countward::deadtime::{self, DeadTime, DecayFit, DecayPoint, ModelKind};
use serde_json::{Value, json};

use crate::csv;
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

#[derive(Args)]
pub struct CorrectArgs {
    /// Measured (recorded) rate, counts per second.
    #[arg(long, value_name = "M", allow_negative_numbers = true)]
    measured_cps: f64,
    /// Dead time τ, seconds.
    #[arg(long, value_name = "T", allow_negative_numbers = true)]
    dead_time_s: f64,
    /// Dead-time model.
    #[arg(long, value_enum)]
    model: Model,
    /// Extending fraction f of τ for the hybrid model, 0 to 1.
    #[arg(long, value_name = "F", allow_negative_numbers = true)]
    paralyzable_fraction: Option<f64>,
    /// Counting time behind the measured rate, seconds: adds its standard uncertainty.
    #[arg(long, value_name = "S", allow_negative_numbers = true)]
    seconds: Option<f64>,
    /// Standard uncertainty of τ, seconds (with --seconds).
    #[arg(
        long,
        value_name = "U",
        allow_negative_numbers = true,
        default_value_t = 0.0
    )]
    dead_time_sd_s: f64,
    /// Print one JSON object.
    #[arg(long)]
    json: bool,
}

#[derive(Args)]
pub struct TwoSourceArgs {
    /// Measured rate of source A alone, counts per second.
    #[arg(long, value_name = "A", allow_negative_numbers = true)]
    a_cps: f64,
    /// Measured rate of source B alone.
    #[arg(long, value_name = "B", allow_negative_numbers = true)]
    b_cps: f64,
    /// Measured rate of A and B together.
    #[arg(long, value_name = "AB", allow_negative_numbers = true)]
    ab_cps: f64,
    /// Measured background rate (default 0).
    #[arg(
        long,
        value_name = "BG",
        allow_negative_numbers = true,
        default_value_t = 0.0
    )]
    background_cps: f64,
    /// Counting time of each of the four measurements, seconds: gives the uncertainty.
    #[arg(long, value_name = "T", allow_negative_numbers = true)]
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
    #[arg(long, value_name = "H", allow_negative_numbers = true)]
    half_life_s: f64,
    /// Fit only this model (default: fit non-paralyzable and paralyzable and compare).
    #[arg(long, value_enum)]
    model: Option<Model>,
    /// Extending fraction f for --model hybrid, 0 to 1.
    #[arg(long, value_name = "F", allow_negative_numbers = true)]
    paralyzable_fraction: Option<f64>,
    /// Write an SVG chart of the data and the fitted curves.
    #[arg(long, value_name = "FILE.svg")]
    plot: Option<String>,
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
    let model = DeadTime::of_kind(a.model.kind(), tau, f).map_err(lib)?;
    let c = match model.correct(m) {
        Ok(c) => c,
        Err(Error::OutOfRange(_)) => {
            let limit = model.measured_limit_cps();
            let what = if a.model == Model::NonParalyzable {
                "1/τ"
            } else {
                "the model's maximum"
            };
            return Err(bad(
                "--measured-cps",
                m,
                &format!(
                    "is above the largest rate this counter can record ({} cps, {what}); it is not a reading of this model",
                    num(limit)
                ),
            ));
        }
        Err(e) => return Err(lib(e)),
    };
    let mut v = json!({
        "true_cps": c.true_cps,
        "true_cps_high": c.true_cps_high,
        "saturated": c.saturated,
        "gain": c.gain,
    });
    let mut text = format!(
        "true rate: {} cps  ({} model, τ = {} s)",
        num(c.true_cps),
        model_name(a.model.kind()),
        num(tau)
    );
    if let Some(t) = a.seconds {
        let t = check_positive("--seconds", t)?;
        let sd = check_non_negative("--dead-time-sd-s", a.dead_time_sd_s)?;
        let u = model.correct_with_uncertainty(m, t, sd).map_err(lib)?;
        v["std_uncertainty_cps"] = json!(u.std_uncertainty_cps);
        text += &format!(
            "\n  standard uncertainty: {} cps  (counting {} cps, dead time {} cps)",
            num(u.std_uncertainty_cps),
            num(u.from_counts_cps),
            num(u.from_dead_time_cps)
        );
    }
    if let Some(h) = c.true_cps_high {
        text += &format!(
            "\n  other solution (fold-back branch, above the peak): {} cps — a reading alone cannot exclude it",
            num(h)
        );
    }
    if c.saturated {
        text += &format!(
            "\n  SATURATED: the correction amplifies counting noise {}-fold here; treat the reading as over-range",
            num(c.gain)
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
        Error::NotDetermined(_) => Failure(
            "error: these rates cannot determine the dead time (no significant loss: A + B − AB − background must clearly exceed 0; try stronger sources or longer counts)".into(),
        ),
        e => lib(e),
    })?;
    let unc = r
        .std_uncertainty_s
        .map_or("(give --seconds for its uncertainty)".to_string(), |u| {
            format!("± {} s", num(u))
        });
    let text = format!(
        "dead time: {} s {unc}  (exact two-source solution, non-paralyzable)\n  approximations: {} s (small-loss, with background), {} s (simple, no background)",
        num(r.dead_time_s),
        num(r.first_order_s),
        num(r.simple_s)
    );
    Ok((
        text,
        json!({
            "dead_time_s": r.dead_time_s,
            "std_uncertainty_s": r.std_uncertainty_s,
            "first_order_s": r.first_order_s,
            "simple_s": r.simple_s,
        }),
    ))
}

fn decay(a: DecayArgs) -> Result<(String, Value), Failure> {
    let half = check_positive("--half-life-s", a.half_life_s)?;
    let table = csv::read(&a.input, &["time_s", "measured_cps"], &["counting_s"])
        .map_err(|e| Failure(e.join("\n")))?;
    let mut errors = table.errors.clone();
    let mut points = Vec::new();
    for (line, v) in &table.rows {
        let (t, m, c) = (v[0].unwrap_or(f64::NAN), v[1].unwrap_or(f64::NAN), v[2]);
        if m <= 0.0 {
            errors.push(format!(
                "error: {} line {line}: measured_cps {m} must be greater than 0",
                a.input
            ));
        } else if c.is_some_and(|c| c <= 0.0) {
            errors.push(format!(
                "error: {} line {line}: counting_s must be greater than 0",
                a.input
            ));
        } else {
            points.push(DecayPoint {
                time_s: t,
                measured_cps: m,
                counting_s: c,
            });
        }
    }
    if !errors.is_empty() {
        return Err(Failure(errors.join("\n")));
    }
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
        match deadtime::fit_decay(&points, half, *k, *f) {
            Ok(fit) => fits.push(fit),
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
    let mut text = String::new();
    let mut fit_values = Vec::new();
    for fit in &fits {
        let name = model_name(fit.model.kind());
        let residuals: Vec<f64> = points.iter().map(|p| fit.residual(p)).collect();
        text += &format!(
            "{name}: dead time {} s ± {} s, initial true rate {} ± {} cps, chi2 {} for {} degrees of freedom\n",
            num(fit.dead_time_s),
            num(fit.dead_time_sd_s),
            num(fit.initial_cps),
            num(fit.initial_sd_cps),
            num(fit.chi2),
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
                    "{} (τ = {} s)",
                    model_name(fit.model.kind()),
                    num(fit.dead_time_s)
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
        std::fs::write(path, chart).map_err(|e| Failure(format!("error: --plot {path}: {e}")))?;
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
    let table = csv::read(&a.input, &["timestamp_s"], &[]).map_err(|e| Failure(e.join("\n")))?;
    let mut stamps = Vec::with_capacity(table.rows.len());
    let mut errors = table.errors.clone();
    let mut previous: Option<(usize, f64)> = None;
    for (line, v) in &table.rows {
        let t = v[0].unwrap_or(f64::NAN);
        if let Some((pl, pt)) = previous
            && t < pt
        {
            errors.push(format!(
                "error: {} line {line}: timestamp_s {t} is earlier than {pt} on line {pl} (time stamps must not decrease)",
                a.input
            ));
        }
        previous = Some((*line, t));
        stamps.push(t);
    }
    if !errors.is_empty() {
        return Err(Failure(errors.join("\n")));
    }
    let fit = deadtime::fit_intervals(&stamps).map_err(|e| match e {
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
        "dead time: {} s ± {} s  (from the shortest of {} intervals; true rate {} cps if non-paralyzable)\n  shape beyond τ: chi2 {} for {} degrees of freedom, p = {}{}",
        num(fit.dead_time_s),
        num(fit.std_uncertainty_s),
        fit.intervals,
        num(fit.true_rate_cps),
        num(fit.shape_chi2),
        fit.shape_dof,
        num(fit.shape_p_value),
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
