//! End-to-end checks of the `countward` host tool: the exact interface,
//! the JSON shapes, and exit status 2 with one line on stderr for bad input.
//! Expected numbers are published or mpmath values (sources as in `published.rs`).

use std::process::Command;

fn run(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_countward"))
        .args(args)
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8(out.stdout).unwrap(),
        String::from_utf8(out.stderr).unwrap(),
    )
}

fn json_number(text: &str, key: &str) -> Option<f64> {
    let at = text.find(&format!("\"{key}\":"))? + key.len() + 3;
    let rest = &text[at..];
    let end = rest.find([',', '}']).unwrap_or(rest.len());
    rest[..end].trim().parse().ok()
}

#[test]
fn tail_json() {
    // P(N >= 5 | 1) = 0.0036598468273437123 (computed: mpmath at 40 digits).
    let (code, out, _) = run(&["tail", "--mean", "1", "--at-least", "5", "--json"]);
    assert_eq!(code, 0);
    assert!(
        out.trim_end().starts_with('{')
            && out.trim_end().ends_with('}')
            && out.lines().count() == 1
    );
    let p = json_number(&out, "p").unwrap();
    assert!((p / 0.0036598468273437123 - 1.0).abs() < 1e-12);
    let ln_p = json_number(&out, "ln_p").unwrap();
    assert!((ln_p - p.ln()).abs() < 1e-12);
    // Every tier answers; fixed and f32 within their tolerances.
    for (math, tol) in [("f32", 1e-5), ("fixed", 1e-8)] {
        let (code, out, _) = run(&[
            "tail",
            "--mean",
            "1",
            "--at-least",
            "5",
            "--math",
            math,
            "--json",
        ]);
        assert_eq!(code, 0);
        let q = json_number(&out, "p").unwrap();
        assert!((q / p - 1.0).abs() < tol, "{math}: {q}");
    }
    let (code, out, _) = run(&["tail", "--mean", "1000", "--at-most", "10", "--json"]);
    assert_eq!(code, 0);
    // ln P(N <= 10 | 1000) = -946.0168196296328 (computed: mpmath at 40 digits).
    assert!((json_number(&out, "ln_p").unwrap() + 946.0168196296328).abs() < 1e-9);
}

#[test]
fn threshold_json_all_tiers() {
    // μ = 10, α = 1e-6 → 29 (computed: mpmath).
    for math in ["f64", "f32", "fixed"] {
        let (code, out, _) = run(&[
            "threshold",
            "--mean",
            "10",
            "--alpha",
            "1e-6",
            "--math",
            math,
            "--json",
        ]);
        assert_eq!(code, 0, "{math}");
        assert_eq!(json_number(&out, "counts"), Some(29.0), "{math}: {out}");
        assert!(json_number(&out, "p").unwrap() <= 1e-6);
    }
    let (code, out, _) = run(&[
        "threshold",
        "--mean",
        "3",
        "--alpha",
        "1e-3",
        "--low",
        "--json",
    ]);
    assert_eq!(code, 0);
    assert_eq!(out.trim(), r#"{"counts":null,"p":null}"#);
    let (code, out, _) = run(&[
        "threshold",
        "--mean",
        "1000",
        "--alpha",
        "1e-6",
        "--low",
        "--json",
    ]);
    assert_eq!(code, 0);
    // 852 (tests/reference/thresholds.csv, mpmath).
    assert_eq!(json_number(&out, "counts"), Some(852.0));
}

#[test]
fn limits_and_silence_json() {
    // 10 counts, 95% two-sided: [4.795389, 18.39036] (Garwood; computed: mpmath).
    let (code, out, _) = run(&["limits", "--counts", "10", "--level", "0.95", "--json"]);
    assert_eq!(code, 0);
    assert!((json_number(&out, "lower").unwrap() - 4.795389).abs() < 1e-6);
    assert!((json_number(&out, "upper").unwrap() - 18.39036).abs() < 1e-5);
    // Zero counts one-sided 95%: 0 and 2.995732 (Gehrels 1986).
    let (code, out, _) = run(&[
        "limits",
        "--counts",
        "0",
        "--level",
        "0.95",
        "--one-sided",
        "--json",
    ]);
    assert_eq!(code, 0);
    assert_eq!(json_number(&out, "lower"), Some(0.0));
    assert!((json_number(&out, "upper").unwrap() - 2.995732273553991).abs() < 1e-12);
    // λ t* = 19.129168 for the 3rd event at α = 1e-6 (computed: mpmath).
    let (code, out, _) = run(&[
        "silence",
        "--rate-cps",
        "1",
        "--alpha",
        "1e-6",
        "--events",
        "3",
        "--json",
    ]);
    assert_eq!(code, 0);
    assert!((json_number(&out, "seconds").unwrap() - 19.129168).abs() < 1e-6);
    let (code, out, _) = run(&["silence", "--rate-cps", "0.5", "--alpha", "1e-3"]);
    assert_eq!(code, 0);
    assert!(out.contains("13.81551056 s"), "{out}"); // -ln(1e-3)/0.5 = 13.815510557964, 10 significant digits
}

#[test]
fn bad_input_exits_2_with_one_line() {
    let cases: &[(&[&str], &str)] = &[
        (&["threshold", "--mean", "-3", "--alpha", "0.1"], "--mean"),
        (&["threshold", "--mean", "NaN", "--alpha", "0.1"], "--mean"),
        (&["threshold", "--mean", "inf", "--alpha", "0.1"], "--mean"),
        (&["threshold", "--mean", "3", "--alpha", "1.5"], "--alpha"),
        (&["threshold", "--mean", "3", "--alpha", "0"], "--alpha"),
        (&["threshold", "--mean", "3"], "--alpha"),
        (&["tail", "--mean", "3"], "--at-least"),
        (
            &["tail", "--mean", "3", "--at-least", "2", "--at-most", "3"],
            "--at-most",
        ),
        (&["tail", "--mean", "3", "--at-least", "-2"], "--at-least"),
        (&["limits", "--counts", "5", "--level", "1"], "--level"),
        (&["limits", "--counts", "x", "--level", "0.9"], "--counts"),
        (
            &["silence", "--rate-cps", "0", "--alpha", "0.01"],
            "--rate-cps",
        ),
        (
            &[
                "silence",
                "--rate-cps",
                "1",
                "--alpha",
                "0.01",
                "--events",
                "0",
            ],
            "--events",
        ),
        (&["threshold", "--mean", "3e9", "--alpha", "0.1"], "--mean"),
        (
            &[
                "threshold",
                "--mean",
                "3",
                "--alpha",
                "0.1",
                "--math",
                "f16",
            ],
            "--math",
        ),
    ];
    for (args, flag) in cases {
        let (code, out, err) = run(args);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert!(out.is_empty(), "{args:?} printed {out}");
        assert_eq!(err.trim_end().lines().count(), 1, "{args:?}: {err}");
        assert!(err.contains(flag), "{args:?}: {err}");
        assert!(!err.contains("panicked"));
    }
}

#[test]
fn help_carries_the_safety_note() {
    let (code, out, _) = run(&["--help"]);
    assert_eq!(code, 0);
    assert!(out.contains("validated") && out.contains("regulations"));
}
