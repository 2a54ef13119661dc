//! The host tool's handling of hostile and mistaken input, as an outside
//! review threw it: negative numbers reach validation, errors name the flag
//! and the value typed, inputs are never overwritten, CSV quirks are read or
//! refused with a line number, flags that need another flag say so, a fit
//! that does not fit is not a result, and every help carries the caution.

mod common;

/// `deadtime correct` for 100 cps behind 100 µs, paralyzable: the start of several command lines.
const CORRECT_100_CPS_100_US: &[&str] = &[
    "deadtime",
    "correct",
    "--measured-cps",
    "100",
    "--dead-time-s",
    "1e-4",
    "--model",
    "paralyzable",
];

fn run_bytes(args: &[&str]) -> (i32, String, String) {
    common::run_exe(env!("CARGO_BIN_EXE_countward"), args)
}

/// Runs a command that must fail with one line on stderr; returns that line.
fn refused(args: &[&str]) -> String {
    let (code, out, err) = run_bytes(args);
    assert_eq!(code, 2, "{args:?}: {out}{err}");
    assert!(out.is_empty(), "{args:?}: {out}");
    assert_eq!(err.lines().count(), 1, "{args:?}: {err}");
    err.trim().to_string()
}

fn temp(name: &str, bytes: &[u8]) -> String {
    common::temp_file("cli-trust", name, bytes)
}

#[test]
fn negative_numbers_reach_validation_and_are_refused_by_flag() {
    let e = refused(&["threshold", "--mean", "-inf", "--alpha", "1e-6"]);
    assert!(e.contains("--mean -inf") && e.contains("finite"), "{e}");
    let e = refused(&[
        "deadtime",
        "correct",
        "--measured-cps",
        "100",
        "--dead-time-s",
        "-1e-4",
        "--model",
        "non-paralyzable",
    ]);
    assert!(e.contains("--dead-time-s -1e-4"), "{e}"); // as typed
}

#[test]
fn errors_name_the_flag_and_the_value_typed() {
    let e = refused(&["silence", "--rate-cps", "1e-320", "--alpha", "0.01"]);
    assert!(
        e.contains("--rate-cps 1e-320") && !e.contains("rate_cps"),
        "{e}"
    );
    let e = refused(
        &[
            CORRECT_100_CPS_100_US,
            &["--seconds", "10", "--dead-time-sd-s", "2000"],
        ]
        .concat(),
    );
    assert!(
        e.contains("--dead-time-sd-s 2000") && !e.contains("dead_time_s"),
        "{e}"
    );
    // Microseconds typed as seconds: blame --dead-time-s and suggest the unit.
    let e = refused(&[
        "deadtime",
        "correct",
        "--measured-cps",
        "1000",
        "--dead-time-s",
        "100",
        "--model",
        "non-paralyzable",
    ]);
    assert!(
        e.contains("--dead-time-s 100") && e.contains("100e-6"),
        "{e}"
    );
    let data = temp("decay.csv", b"time_s,measured_cps\n0,100\n10,90\n");
    let e = refused(&[
        "deadtime",
        "decay",
        "--input",
        &data,
        "--half-life-s",
        "1e-320",
    ]);
    assert!(
        e.contains("--half-life-s 1e-320") && !e.contains("--input"),
        "{e}"
    );
    // Tiny one-sided levels are valid (they were refused as a "probability").
    let (code, out, _) = run_bytes(&[
        "limits",
        "--counts",
        "3",
        "--level",
        "1e-20",
        "--one-sided",
        "--json",
    ]);
    assert_eq!(code, 0);
    assert!(out.contains("upper"));
}

#[test]
fn the_fixed_tier_refuses_a_mean_it_cannot_represent() {
    // 1e-13 counts rounds to 0 in UQ32.32: it was answered "p = 0".
    let e = refused(&[
        "tail",
        "--mean",
        "1e-13",
        "--at-least",
        "1",
        "--math",
        "fixed",
    ]);
    assert!(
        e.contains("--mean 1e-13") && e.contains("fixed tier"),
        "{e}"
    );
}

#[test]
fn a_flag_that_needs_another_is_an_error() {
    let e = refused(&[CORRECT_100_CPS_100_US, &["--dead-time-sd-s", "1e-6"]].concat());
    assert!(e.contains("--seconds"), "{e}");
}

#[test]
fn the_input_is_never_overwritten() {
    let text = std::fs::read("examples/data/foil_decay.csv").unwrap();
    let data = temp("foil.csv", &text);
    let e = refused(&[
        "deadtime",
        "decay",
        "--input",
        &data,
        "--half-life-s",
        "9288",
        "--plot",
        &data,
    ]);
    assert!(e.contains("--plot") && e.contains("--input"), "{e}");
    assert_eq!(std::fs::read(&data).unwrap(), text, "the input changed");
    // A plot elsewhere is written whole (through a temporary file).
    let plot = temp("plot.svg", b"old");
    let (code, _, err) = run_bytes(&[
        "deadtime",
        "decay",
        "--input",
        &data,
        "--half-life-s",
        "9288",
        "--plot",
        &plot,
    ]);
    assert_eq!(code, 0, "{err}");
    let svg = std::fs::read_to_string(&plot).unwrap();
    assert!(
        svg.starts_with("<svg") || svg.starts_with("<?xml"),
        "{}",
        &svg[..40.min(svg.len())]
    );
}

#[test]
fn csv_quirks_are_read_or_refused_with_a_line_number() {
    let text = std::fs::read_to_string("examples/data/foil_decay.csv").unwrap();
    let base = run_bytes(&[
        "deadtime",
        "decay",
        "--input",
        "examples/data/foil_decay.csv",
        "--half-life-s",
        "9288",
        "--json",
    ]);
    assert_eq!(base.0, 0, "{}", base.2);
    // A UTF-8 byte-order mark, CRLF and CR-only line endings: the same answer.
    let mut bom = vec![0xEF, 0xBB, 0xBF];
    bom.extend_from_slice(text.as_bytes());
    for (name, bytes) in [
        ("bom.csv", bom),
        ("crlf.csv", text.replace('\n', "\r\n").into_bytes()),
        ("cr.csv", text.replace('\n', "\r").into_bytes()),
    ] {
        let p = temp(name, &bytes);
        let got = run_bytes(&[
            "deadtime",
            "decay",
            "--input",
            &p,
            "--half-life-s",
            "9288",
            "--json",
        ]);
        assert_eq!(got.0, 0, "{name}: {}", got.2);
        assert_eq!(got.1, base.1, "{name}");
    }
    // A duplicated column name names both columns.
    let p = temp("dup.csv", b"time_s,measured_cps,time_s\n0,1,2\n");
    let e = refused(&["deadtime", "decay", "--input", &p, "--half-life-s", "100"]);
    assert!(e.contains("line 1") && e.contains("columns 1 and 3"), "{e}");
    // Non-UTF-8 bytes: reported on their line.
    let p = temp(
        "latin1.csv",
        b"time_s,measured_cps\n0,100\n10,9\xe90\n20,80\n",
    );
    let e = refused(&["deadtime", "decay", "--input", &p, "--half-life-s", "100"]);
    assert!(e.contains("line 3") && e.contains("UTF-8"), "{e}");
    // Blank and comment lines do not shift the line numbers.
    let p = temp(
        "blank.csv",
        b"# bench 2\ntime_s,measured_cps\n\n0,100\n  \n10,x\n",
    );
    let e = refused(&["deadtime", "decay", "--input", &p, "--half-life-s", "100"]);
    assert!(e.contains("line 6") && e.contains("'x'"), "{e}");
    // Two measurements at one time.
    let p = temp(
        "twice.csv",
        b"time_s,measured_cps\n0,100\n10,90\n10,91\n20,80\n",
    );
    let e = refused(&["deadtime", "decay", "--input", &p, "--half-life-s", "100"]);
    assert!(e.contains("line 4") && e.contains("repeats line 3"), "{e}");
}

#[test]
fn a_fit_that_does_not_fit_is_refused() {
    // A constant rate with counting times, given to the decay fit: no
    // dead-time model explains a rate that does not fall with the source.
    let mut csv = String::from("time_s,measured_cps,counting_s\n");
    for i in 0..30 {
        let wiggle = if i % 2 == 0 { 1.0 } else { -1.0 };
        csv += &format!("{},{},60\n", i * 1200, 2000.0 + 3.0 * wiggle);
    }
    let p = temp("constant.csv", csv.as_bytes());
    let e = refused(&["deadtime", "decay", "--input", &p, "--half-life-s", "9288"]);
    assert!(
        e.contains("no dead-time model fits") && e.contains("chi2/dof"),
        "{e}"
    );
}

#[test]
fn no_command_gives_a_short_usage() {
    let (code, out, err) = run_bytes(&[]);
    assert_eq!(code, 2);
    assert!(out.is_empty());
    assert!(
        err.lines().count() <= 3 && err.contains("deadtime") && err.contains("threshold"),
        "{err}"
    );
}

#[test]
fn every_help_carries_the_safety_caution() {
    for args in [
        vec!["--help"],
        vec!["tail", "--help"],
        vec!["threshold", "--help"],
        vec!["limits", "--help"],
        vec!["silence", "--help"],
        vec!["deadtime", "--help"],
        vec!["deadtime", "correct", "--help"],
        vec!["deadtime", "two-source", "--help"],
        vec!["deadtime", "decay", "--help"],
        vec!["deadtime", "intervals", "--help"],
    ] {
        let (code, out, _) = run_bytes(&args);
        assert_eq!(code, 0);
        assert!(
            out.contains("validated") && out.contains("local regulations"),
            "{args:?}"
        );
    }
}

#[test]
fn approximations_that_do_not_hold_are_flagged() {
    // Rates of a counter with τ = 200 µs at 50 % loss: the small-loss form
    // is several times off there and must say so, in text and in JSON.
    let args = [
        "deadtime",
        "two-source",
        "--a-cps",
        "1431.12",
        "--b-cps",
        "1876.95",
        "--ab-cps",
        "2501.25",
        "--background-cps",
        "5",
    ];
    let (code, out, _) = run_bytes(&[&args[..], &["--json"]].concat());
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["first_order_valid"], false);
    let (_, text, _) = run_bytes(&args);
    assert!(text.contains("NOT valid"), "{text}");
}
