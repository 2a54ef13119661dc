//! The host tool's CSV reader on arbitrary bytes: no panic, and every line
//! number it reports lies within the input.
#![no_main]

use libfuzzer_sys::fuzz_target;

#[path = "../../../src/bin/countward/input.rs"]
#[allow(dead_code)]
mod input;

fuzz_target!(|d: &[u8]| {
    let lines = 1 + d.iter().filter(|&&c| c == b'\n' || c == b'\r').count() as u64;
    let mut seen = 0u64;
    let result = input::read_each_from(
        "--input",
        "fuzz.csv",
        d,
        &["time_s", "measured_cps"],
        &["counting_s"],
        |line, values| {
            assert!(line >= 1 && line <= lines, "line {line} of {lines}");
            assert_eq!(values.len(), 3);
            assert!(values[0].is_some_and(f64::is_finite) && values[1].is_some_and(f64::is_finite));
            seen += 1;
            if values[1] == Some(0.0) {
                return Err("zero".into());
            }
            Ok(())
        },
    );
    if let Err(message) = result {
        assert!(!message.is_empty());
        for l in message.lines() {
            if let Some(rest) = l.split(" line ").nth(1) {
                let n: u64 = rest
                    .split(|c: char| !c.is_ascii_digit())
                    .next()
                    .unwrap()
                    .parse()
                    .unwrap_or(0);
                assert!(n <= lines, "{l}");
            }
        }
    }
    let _ = seen;
});
