//! `countward`: the host tool over the countward library (feature `cli`).
//!
//! A thin shell: every number printed is computed by the library.

use clap::error::{ContextKind, ContextValue, ErrorKind};
use clap::{Args, Parser, Subcommand, ValueEnum};
use countward::fixed::{FixedAlpha, FixedMean};
use countward::poisson::{self, MAX_MEAN};
use countward::{Error, Param, gap};
use serde_json::{Value, json};
use std::process::ExitCode;

mod deadtime;
mod input;
mod output;
mod svg;

const SAFETY: &str = "Safety: radiation alarms protect people. Settings computed here must be validated \
for the instrument they run on, and local regulations and licensed radiation-protection practice take \
precedence over anything this tool prints.";

/// Counting statistics for Poisson event streams: tails, count thresholds,
/// exact limits on a mean, silence thresholds, and dead time.
#[derive(Parser)]
#[command(name = "countward", version, after_help = SAFETY)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Poisson tail probability P(N >= K) or P(N <= K) for a mean.
    #[command(after_help = SAFETY)]
    Tail(TailArgs),
    /// Alarm threshold (smallest n with P(N >= n) <= alpha) or, with --low,
    /// fault threshold (largest n with P(N <= n) <= alpha).
    #[command(after_help = SAFETY)]
    Threshold(ThresholdArgs),
    /// Exact (Garwood) confidence limits on a Poisson mean from observed counts.
    #[command(after_help = SAFETY)]
    Limits(LimitsArgs),
    /// Silence threshold: shortest time after which fewer than K events is improbable at alpha.
    #[command(after_help = SAFETY)]
    Silence(SilenceArgs),
    /// Dead time: correct measured rates, and measure τ on the bench.
    #[command(subcommand, after_help = SAFETY)]
    Deadtime(deadtime::DeadtimeCommand),
}

/// Which tier of the library computes the answer.
#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum Math {
    /// Double precision (the reference).
    F64,
    /// Single precision, as on an MCU with an FPU.
    F32,
    /// Integer-only fixed point, as on an MCU without an FPU.
    Fixed,
}

#[derive(Args)]
#[command(group(clap::ArgGroup::new("side").required(true).args(["at_least", "at_most"])))]
struct TailArgs {
    /// Expected counts (Poisson mean), 0 to 2e9.
    #[arg(long, value_name = "M", allow_hyphen_values = true)]
    mean: f64,
    /// Probability of K or more counts.
    #[arg(long, value_name = "K", allow_hyphen_values = true)]
    at_least: Option<u32>,
    /// Probability of K or fewer counts.
    #[arg(long, value_name = "K", allow_hyphen_values = true)]
    at_most: Option<u32>,
    /// Arithmetic tier.
    #[arg(long, value_enum, default_value = "f64")]
    math: Math,
    /// Print one JSON object.
    #[arg(long)]
    json: bool,
}

#[derive(Args)]
struct ThresholdArgs {
    /// Expected background counts per check (Poisson mean), 0 to 2e9.
    #[arg(long, value_name = "M", allow_hyphen_values = true)]
    mean: f64,
    /// False-alarm probability per check, strictly between 0 and 1.
    #[arg(long, value_name = "A", allow_hyphen_values = true)]
    alpha: f64,
    /// Compute the fault (too few counts) threshold instead of the alarm threshold.
    #[arg(long)]
    low: bool,
    /// Arithmetic tier.
    #[arg(long, value_enum, default_value = "f64")]
    math: Math,
    /// Print one JSON object.
    #[arg(long)]
    json: bool,
}

#[derive(Args)]
struct LimitsArgs {
    /// Observed counts.
    #[arg(long, value_name = "N", allow_hyphen_values = true)]
    counts: u32,
    /// Confidence level, strictly between 0 and 1 (e.g. 0.95).
    #[arg(long, value_name = "L", allow_hyphen_values = true)]
    level: f64,
    /// One-sided upper limit (lower is 0).
    #[arg(long)]
    one_sided: bool,
    /// Print one JSON object.
    #[arg(long)]
    json: bool,
}

#[derive(Args)]
struct SilenceArgs {
    /// Event rate in counts per second (> 0).
    #[arg(long, value_name = "R", allow_hyphen_values = true)]
    rate_cps: f64,
    /// Probability that a live source stays this quiet, strictly between 0 and 1.
    #[arg(long, value_name = "A", allow_hyphen_values = true)]
    alpha: f64,
    /// Wait for the K-th event (default 1: any event).
    #[arg(
        long,
        value_name = "K",
        default_value_t = 1,
        allow_hyphen_values = true
    )]
    events: u32,
    /// Print one JSON object.
    #[arg(long)]
    json: bool,
}

/// A one-line failure: exit status 2.
struct Failure(String);

/// A refused value, shown as the user typed it (from the command line) where
/// the flag was given there, else as the tool read it.
fn bad(flag: &str, value: impl std::fmt::Display, why: &str) -> Failure {
    let shown = typed(flag).unwrap_or_else(|| value.to_string());
    Failure(format!("error: {flag} {shown}: {why}"))
}

/// The text given for `flag` on the command line (`--flag V` or `--flag=V`).
fn typed(flag: &str) -> Option<String> {
    let args: Vec<String> = std::env::args().collect();
    let prefix = format!("{flag}=");
    args.iter().enumerate().find_map(|(i, a)| {
        if a == flag {
            args.get(i + 1).cloned()
        } else {
            a.strip_prefix(&prefix).map(str::to_string)
        }
    })
}

/// Validates a number given on the command line, naming the flag.
fn check(flag: &str, v: f64, ok: bool, why: &str) -> Result<f64, Failure> {
    if !v.is_finite() {
        return Err(bad(flag, v, "must be a finite number"));
    }
    if !ok {
        return Err(bad(flag, v, why));
    }
    Ok(v)
}

/// A finite number greater than 0.
fn check_positive(flag: &str, v: f64) -> Result<f64, Failure> {
    check(flag, v, v > 0.0, "must be greater than 0")
}

/// A finite number of 0 or more.
fn check_non_negative(flag: &str, v: f64) -> Result<f64, Failure> {
    check(flag, v, v >= 0.0, "must be 0 or more")
}

fn check_mean(v: f64) -> Result<f64, Failure> {
    check(
        "--mean",
        v,
        (0.0..=MAX_MEAN).contains(&v),
        "must be between 0 and 2e9",
    )
}

fn check_open(flag: &str, v: f64) -> Result<f64, Failure> {
    check(
        flag,
        v,
        v > 0.0 && v < 1.0,
        "must lie strictly between 0 and 1",
    )
}

/// A nonzero value that f32 cannot hold (it would round to 0) is reported, not rounded.
fn check_f32(flag: &str, v: f64) -> Result<(), Failure> {
    if v != 0.0 && (v as f32) < f32::MIN_POSITIVE {
        return Err(bad(
            flag,
            v,
            "is too small for the f32 tier (below 1.2e-38); use --math f64 or fixed",
        ));
    }
    Ok(())
}

/// A library error in the user's words: the flag and the value typed for
/// the parameter at fault (from `flags`), never an internal name.
fn lib_in(e: Error, flags: &[(Param, &str, f64)]) -> Failure {
    let why = match e {
        Error::NotFinite(_) => "must be a finite number",
        Error::OutOfRange(_) => "is outside the range this calculation supports",
        Error::NotDetermined(_) => "cannot be determined from these inputs",
        Error::NoConvergence => {
            return Failure(
                "error: an iteration did not converge; this is a defect of countward (please report the command line)".into(),
            );
        }
        _ => "was refused",
    };
    match e.param().and_then(|p| flags.iter().find(|f| f.0 == p)) {
        Some((_, flag, value)) => bad(flag, num(*value), why),
        None => {
            let all: Vec<String> = flags
                .iter()
                .map(|f| format!("{} {}", f.1, num(f.2)))
                .collect();
            Failure(format!(
                "error: the inputs ({}) are outside the range this calculation supports",
                all.join(", ")
            ))
        }
    }
}

/// A library error of a call whose inputs the command validated itself.
fn lib(e: Error) -> Failure {
    lib_in(e, &[])
}

/// Human-readable number: plain for moderate magnitudes, exponent otherwise.
fn num(v: f64) -> String {
    // At most 10 significant digits: enough for every figure the tool
    // prints, and no binary noise such as 9.999999999999999e-19.
    let v = if v.is_finite() && v != 0.0 {
        format!("{v:.9e}").parse::<f64>().unwrap_or(v)
    } else {
        v
    };
    let a = v.abs();
    if v == 0.0 || (1e-4..1e6).contains(&a) {
        format!("{v}")
    } else {
        format!("{v:e}")
    }
}

fn fixed_mean(mean: f64) -> Result<FixedMean, Failure> {
    let raw = (mean * 4_294_967_296.0).round();
    // A positive mean that rounds to 0 in UQ32.32 would be answered as a
    // mean of 0 (p = 0): refused instead.
    if mean > 0.0 && raw < 1.0 {
        return Err(bad(
            "--mean",
            num(mean),
            "is too small for the fixed tier (its resolution is 2^-32 = 2.3e-10 counts); use --math f64",
        ));
    }
    FixedMean::from_raw(raw as u64).map_err(|e| lib_in(e, &[(Param::Mean, "--mean", mean)]))
}

fn fixed_alpha(alpha: f64) -> Result<FixedAlpha, Failure> {
    FixedAlpha::from_ln_raw((alpha.ln() * 4_294_967_296.0).round() as i64).map_err(|_| {
        bad(
            "--alpha",
            alpha,
            "is too small for the fixed tier (ln alpha must be at least -1e5)",
        )
    })
}

fn q32(v: i64) -> f64 {
    if v == i64::MIN {
        f64::NEG_INFINITY
    } else {
        v as f64 / 4_294_967_296.0
    }
}

fn tail(a: TailArgs) -> Result<(String, Value), Failure> {
    let mean = check_mean(a.mean)?;
    let (k, upper) = match (a.at_least, a.at_most) {
        (Some(k), None) => (k, true),
        (None, Some(k)) => (k, false),
        _ => {
            return Err(Failure(
                "error: give exactly one of --at-least and --at-most".into(),
            ));
        }
    };
    if a.math == Math::F32 {
        check_f32("--mean", mean)?;
    }
    let (p, ln_p) = match a.math {
        Math::F64 => {
            let t = if upper {
                poisson::at_least(mean, k)
            } else {
                poisson::at_most(mean, k)
            }
            .map_err(lib)?;
            (t.p, t.ln_p)
        }
        Math::F32 => {
            let m = mean as f32;
            let t = if upper {
                poisson::at_least(m, k)
            } else {
                poisson::at_most(m, k)
            }
            .map_err(lib)?;
            (f64::from(t.p), f64::from(t.ln_p))
        }
        Math::Fixed => {
            let m = fixed_mean(mean)?;
            let l = if upper {
                countward::fixed::ln_at_least_q32(m, k)
            } else {
                countward::fixed::ln_at_most_q32(m, k)
            };
            let l = q32(l);
            (l.exp(), l)
        }
    };
    let rel = if upper { ">=" } else { "<=" };
    let text = format!(
        "P(N {rel} {k} | mean {}) = {}   (ln p = {})",
        num(mean),
        num(p),
        num(ln_p)
    );
    Ok((text, json!({ "p": p, "ln_p": ln_p })))
}

fn threshold(a: ThresholdArgs) -> Result<(String, Value), Failure> {
    let mean = check_mean(a.mean)?;
    let alpha = check_open("--alpha", a.alpha)?;
    if a.math == Math::F32 {
        check_f32("--mean", mean)?;
        check_f32("--alpha", alpha)?;
    }
    // (counts, tail p) or None.
    let found: Option<(u32, f64)> = match (a.math, a.low) {
        (Math::F64, false) => poisson::alarm_threshold(mean, alpha)
            .map(|t| Some((t.counts, t.tail.p)))
            .map_err(lib)?,
        (Math::F64, true) => poisson::fault_threshold(mean, alpha)
            .map(|t| t.map(|t| (t.counts, t.tail.p)))
            .map_err(lib)?,
        (Math::F32, false) => poisson::alarm_threshold(mean as f32, alpha as f32)
            .map(|t| Some((t.counts, f64::from(t.tail.p))))
            .map_err(lib)?,
        (Math::F32, true) => poisson::fault_threshold(mean as f32, alpha as f32)
            .map(|t| t.map(|t| (t.counts, f64::from(t.tail.p))))
            .map_err(lib)?,
        (Math::Fixed, low) => {
            let (m, al) = (fixed_mean(mean)?, fixed_alpha(alpha)?);
            let t = if low {
                countward::fixed::fault_threshold(m, al).map_err(lib)?
            } else {
                Some(countward::fixed::alarm_threshold(m, al).map_err(lib)?)
            };
            t.map(|t| (t.counts, q32(t.ln_tail_q32).exp()))
        }
    };
    let text = match (found, a.low) {
        (Some((n, p)), false) => format!(
            "alarm threshold: {n} counts  (alarm when a check reaches {n}; P(N >= {n}) = {} <= alpha {})",
            num(p),
            num(alpha)
        ),
        (Some((n, p)), true) => format!(
            "fault threshold: {n} counts  (fault when a check reads {n} or fewer; P(N <= {n}) = {} <= alpha {})",
            num(p),
            num(alpha)
        ),
        (None, _) => format!(
            "fault threshold: none  (even zero counts has probability {} > alpha {})",
            num((-mean).exp()),
            num(alpha)
        ),
    };
    let v = match found {
        Some((n, p)) => json!({ "counts": n, "p": p }),
        None => json!({ "counts": null, "p": null }),
    };
    Ok((text, v))
}

fn limits(a: LimitsArgs) -> Result<(String, Value), Failure> {
    let level = check_open("--level", a.level)?;
    let (lower, upper) = if a.one_sided {
        (
            0.0,
            poisson::exact_upper_limit(a.counts, level).map_err(|e| level_error(e, level))?,
        )
    } else {
        let l = poisson::exact_limits(a.counts, level).map_err(|e| level_error(e, level))?;
        (l.lower, l.upper)
    };
    let kind = if a.one_sided {
        "one-sided upper"
    } else {
        "two-sided"
    };
    let text = format!(
        "{} counts, {kind} {} %: mean between {} and {}",
        a.counts,
        num(level * 100.0),
        num(lower),
        num(upper)
    );
    Ok((text, json!({ "lower": lower, "upper": upper })))
}

fn level_error(e: Error, level: f64) -> Failure {
    lib_in(
        e,
        &[
            (Param::Level, "--level", level),
            (Param::Probability, "--level", level),
        ],
    )
}

fn silence(a: SilenceArgs) -> Result<(String, Value), Failure> {
    let rate = check_positive("--rate-cps", a.rate_cps)?;
    let alpha = check_open("--alpha", a.alpha)?;
    if a.events == 0 {
        return Err(bad("--events", 0, "must be at least 1"));
    }
    let t = gap::silence_threshold_s(rate, alpha, a.events).map_err(|e| {
        lib_in(
            e,
            &[
                (Param::RateCps, "--rate-cps", rate),
                (Param::Alpha, "--alpha", alpha),
                (Param::Probability, "--alpha", alpha),
                (Param::Events, "--events", f64::from(a.events)),
            ],
        )
    })?;
    let what = if a.events == 1 {
        "no event".to_string()
    } else {
        format!("fewer than {} events", a.events)
    };
    let text = format!(
        "silence threshold: {} s  (P({what} in {} s at {} cps) = {})",
        num(t),
        num(t),
        num(rate),
        num(alpha)
    );
    Ok((text, json!({ "seconds": t })))
}

/// A short usage line and the commands, for a command line without one.
fn short_usage(e: &clap::Error) -> String {
    let rendered = e.render().to_string();
    // The first "Usage:" line of clap's help, then the command names.
    let usage = rendered
        .lines()
        .find(|l| l.starts_with("Usage:"))
        .unwrap_or("Usage: countward <COMMAND>")
        .to_string();
    let cmd = <Cli as clap::CommandFactory>::command();
    let path: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| !a.starts_with('-'))
        .collect();
    let mut node = &cmd;
    for p in &path {
        match node.find_subcommand(p) {
            Some(c) => node = c,
            None => break,
        }
    }
    let names: Vec<&str> = node
        .get_subcommands()
        .map(|c| c.get_name())
        .filter(|n| *n != "help")
        .collect();
    format!("{usage}\ncommands: {}\n(--help for more)", names.join(", "))
}

/// Flattens a clap error to one line naming what was wrong.
fn one_line(e: &clap::Error) -> String {
    if e.kind() == ErrorKind::MissingRequiredArgument
        && let Some(ContextValue::Strings(args)) = e.get(ContextKind::InvalidArg)
    {
        return format!("error: missing required {}", args.join(", "));
    }
    let rendered = e.render().to_string();
    let first = rendered
        .split("\n\n")
        .next()
        .unwrap_or("error: bad command line");
    first.split_whitespace().collect::<Vec<_>>().join(" ")
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            if matches!(e.kind(), ErrorKind::DisplayHelp | ErrorKind::DisplayVersion) {
                let _ = e.print();
                return ExitCode::SUCCESS;
            }
            if e.kind() == ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand {
                eprintln!("{}", short_usage(&e));
                return ExitCode::from(2);
            }
            eprintln!("{}", one_line(&e));
            return ExitCode::from(2);
        }
    };
    let (json_out, result) = match cli.command {
        Command::Tail(a) => (a.json, tail(a)),
        Command::Threshold(a) => (a.json, threshold(a)),
        Command::Limits(a) => (a.json, limits(a)),
        Command::Silence(a) => (a.json, silence(a)),
        Command::Deadtime(c) => (deadtime::json_flag(&c), deadtime::run(c)),
    };
    match result {
        Ok((text, value)) => {
            if json_out {
                println!("{value}");
            } else {
                println!("{text}");
            }
            ExitCode::SUCCESS
        }
        Err(Failure(msg)) => {
            eprintln!("{msg}");
            ExitCode::from(2)
        }
    }
}
