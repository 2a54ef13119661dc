//! End-to-end checks of `countward deadtime …`: the exact interface of the
//! issue, the JSON shapes, the CSV handling (every bad row reported with its
//! line number, exit status 2), and the SVG plot. Expected numbers are the
//! values checked in `tests/deadtime.rs` (computed from the published formulas named there).

use serde_json::Value;
mod common;

fn run(args: &[&str]) -> (i32, String, String) {
    common::run_exe(env!("CARGO_BIN_EXE_countward"), args)
}

fn json(args: &[&str]) -> Value {
    let (code, out, err) = run(args);
    assert_eq!(code, 0, "{args:?}: {err}");
    assert_eq!(out.lines().count(), 1, "one JSON object on one line");
    serde_json::from_str(&out).unwrap()
}

fn temp(name: &str, text: &str) -> String {
    common::temp_file("cli", name, text.as_bytes())
}

#[test]
fn correct_json_shape_and_values() {
    // (computed; Knoll 2010 formulas, mpmath Lambert W): τ = 100 µs, m = 3000 cps.
    let v = json(&[
        "deadtime",
        "correct",
        "--measured-cps",
        "3000",
        "--dead-time-s",
        "1e-4",
        "--model",
        "paralyzable",
        "--json",
    ]);
    assert!((v["true_cps"].as_f64().unwrap() - 4894.0223).abs() < 1e-3);
    assert!((v["true_cps_high"].as_f64().unwrap() - 17813.37).abs() < 1e-2);
    assert_eq!(v["saturated"], Value::Bool(false));
    let v = json(&[
        "deadtime",
        "correct",
        "--measured-cps",
        "3000",
        "--dead-time-s",
        "1e-4",
        "--model",
        "non-paralyzable",
        "--json",
    ]);
    assert!((v["true_cps"].as_f64().unwrap() - 4285.714).abs() < 1e-3);
    assert_eq!(v["true_cps_high"], Value::Null);
    // Near the maximum: flagged.
    let v = json(&[
        "deadtime",
        "correct",
        "--measured-cps",
        "3678",
        "--dead-time-s",
        "1e-4",
        "--model",
        "paralyzable",
        "--json",
    ]);
    assert_eq!(v["saturated"], Value::Bool(true));
    // Hybrid (Lee & Gardner 2000 model; computed): n = 1000 gives m = 907.591364 for τ_p = 20 µs, τ_n = 80 µs.
    let v = json(&[
        "deadtime",
        "correct",
        "--measured-cps",
        "907.591364",
        "--dead-time-s",
        "1e-4",
        "--model",
        "hybrid",
        "--paralyzable-fraction",
        "0.2",
        "--json",
    ]);
    assert!((v["true_cps"].as_f64().unwrap() - 1000.0).abs() < 1e-4);
    // With a counting time: an uncertainty (1/√M relative, non-paralyzable).
    let v = json(&[
        "deadtime",
        "correct",
        "--measured-cps",
        "3000",
        "--dead-time-s",
        "1e-4",
        "--model",
        "non-paralyzable",
        "--seconds",
        "10",
        "--json",
    ]);
    let rel = v["std_uncertainty_cps"].as_f64().unwrap() / v["true_cps"].as_f64().unwrap();
    assert!((rel - 1.0 / 30_000f64.sqrt()).abs() < 1e-12);
}

#[test]
fn two_source_json() {
    // Computed: τ = 200 µs from model-generated rates.
    let v = json(&[
        "deadtime",
        "two-source",
        "--a-cps",
        "1431.1206",
        "--b-cps",
        "1876.9519",
        "--ab-cps",
        "2501.2494",
        "--background-cps",
        "4.995005",
        "--seconds",
        "100",
        "--json",
    ]);
    assert!((v["dead_time_s"].as_f64().unwrap() - 2e-4).abs() < 1e-7);
    assert!(v["std_uncertainty_s"].as_f64().unwrap() > 0.0);
    let v = json(&[
        "deadtime",
        "two-source",
        "--a-cps",
        "1431.1206",
        "--b-cps",
        "1876.9519",
        "--ab-cps",
        "2501.2494",
        "--json",
    ]);
    assert_eq!(v["std_uncertainty_s"], Value::Null);
}

#[test]
fn decay_and_intervals_on_the_example_data() {
    // The bench example's data (a non-paralyzable probe, τ = 120 µs in the simulation).
    let svg = std::env::temp_dir().join(format!("countward-decay-{}.svg", std::process::id()));
    let svg = svg.to_string_lossy().into_owned();
    let v = json(&[
        "deadtime",
        "decay",
        "--input",
        "examples/data/foil_decay.csv",
        "--half-life-s",
        "9288",
        "--plot",
        &svg,
        "--json",
    ]);
    assert_eq!(v["model"], "non-paralyzable");
    let tau = v["dead_time_s"].as_f64().unwrap();
    let sd = v["std_uncertainty_s"].as_f64().unwrap();
    assert!((tau - 120e-6).abs() < 4.0 * sd, "{tau} ± {sd}");
    assert_eq!(v["fits"].as_array().unwrap().len(), 2);
    assert_eq!(v["fits"][0]["residuals"].as_array().unwrap().len(), 25);
    let plot = std::fs::read_to_string(&svg).unwrap();
    assert!(
        plot.starts_with("<svg")
            && plot.contains("polyline")
            && plot.matches("<circle").count() == 25
    );
    let v = json(&[
        "deadtime",
        "intervals",
        "--input",
        "examples/data/probe_stamps.csv",
        "--json",
    ]);
    let (tau, sd) = (
        v["dead_time_s"].as_f64().unwrap(),
        v["std_uncertainty_s"].as_f64().unwrap(),
    );
    assert!((tau - 120e-6).abs() < 4.0 * sd + 1e-6, "{tau} ± {sd}");
    for key in [
        "true_rate_cps",
        "intervals",
        "shape_chi2",
        "shape_dof",
        "shape_p_value",
    ] {
        assert!(v.get(key).is_some(), "{key}");
    }
    // One model only.
    let v = json(&[
        "deadtime",
        "decay",
        "--input",
        "examples/data/foil_decay.csv",
        "--half-life-s",
        "9288",
        "--model",
        "paralyzable",
        "--allow-poor-fit",
        "--json",
    ]);
    assert_eq!(v["model"], "paralyzable");
    // The data come from a non-paralyzable counter: the paralyzable model
    // alone is rejected by its chi-square test (refused without the flag).
    assert_eq!(v["fits"][0]["rejected"], true);
}

#[test]
fn bad_input_is_reported_with_line_numbers_and_exit_2() {
    let bad = temp(
        "bad.csv",
        "# a comment\ntime_s,measured_cps\n0,100\n\n10,abc\n20\n30,-5\n40,90\n",
    );
    let (code, out, err) = run(&["deadtime", "decay", "--input", &bad, "--half-life-s", "100"]);
    assert_eq!(code, 2);
    assert!(out.is_empty());
    let lines: Vec<&str> = err.lines().collect();
    assert_eq!(lines.len(), 3, "{err}");
    assert!(lines[0].contains("line 5") && lines[0].contains("abc"));
    assert!(lines[1].contains("line 6"));
    assert!(lines[2].contains("line 7") && lines[2].contains("-5"));
    let header = temp("header.csv", "t,m\n0,1\n");
    let (code, _, err) = run(&[
        "deadtime",
        "decay",
        "--input",
        &header,
        "--half-life-s",
        "100",
    ]);
    assert!(code == 2 && err.contains("time_s"), "{err}");
    let back = temp("back.csv", "timestamp_s\n0.1\n0.2\n0.15\n0.3\n");
    let (code, _, err) = run(&["deadtime", "intervals", "--input", &back]);
    assert!(
        code == 2 && err.contains("line 4") && err.contains("line 3"),
        "{err}"
    );
    let few = temp("few.csv", "timestamp_s\n0.1\n0.2\n0.3\n");
    let (code, _, err) = run(&["deadtime", "intervals", "--input", &few]);
    assert!(code == 2 && err.contains("too few"), "{err}");
    for args in [
        &[
            "deadtime",
            "correct",
            "--measured-cps",
            "3700",
            "--dead-time-s",
            "1e-4",
            "--model",
            "paralyzable",
        ][..],
        &[
            "deadtime",
            "correct",
            "--measured-cps",
            "10000",
            "--dead-time-s",
            "1e-4",
            "--model",
            "non-paralyzable",
        ],
        &[
            "deadtime",
            "correct",
            "--measured-cps",
            "nan",
            "--dead-time-s",
            "1e-4",
            "--model",
            "paralyzable",
        ],
        &[
            "deadtime",
            "correct",
            "--measured-cps",
            "100",
            "--dead-time-s",
            "-1",
            "--model",
            "paralyzable",
        ],
        &[
            "deadtime",
            "correct",
            "--measured-cps",
            "100",
            "--dead-time-s",
            "1e-4",
            "--model",
            "hybrid",
        ],
        &[
            "deadtime",
            "correct",
            "--measured-cps",
            "100",
            "--dead-time-s",
            "1e-4",
            "--model",
            "sticky",
        ],
        &[
            "deadtime",
            "two-source",
            "--a-cps",
            "200",
            "--b-cps",
            "300",
            "--ab-cps",
            "500",
        ],
        &[
            "deadtime",
            "decay",
            "--input",
            "/nonexistent/file.csv",
            "--half-life-s",
            "100",
        ],
    ] {
        let (code, out, err) = run(args);
        assert_eq!(code, 2, "{args:?}");
        assert!(out.is_empty(), "{args:?}");
        assert_eq!(err.lines().count(), 1, "{args:?}: {err}");
    }
}

#[test]
fn deadtime_help_carries_the_safety_note() {
    for sub in ["correct", "two-source", "decay", "intervals"] {
        let (code, out, _) = run(&["deadtime", sub, "--help"]);
        assert_eq!(code, 0);
        assert!(
            out.contains("validated") && out.contains("regulations"),
            "{sub}"
        );
    }
}
