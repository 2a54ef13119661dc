//! Shared by the benches: reading this run's Criterion estimates.

/// Mean time of one benchmark (`group/id`, as Criterion names its
/// directory) from this run's estimates, in ns.
pub fn estimate_ns(path: &str) -> Option<f64> {
    let dir = std::env::var("CARGO_TARGET_DIR").unwrap_or_else(|_| "target".into());
    let text =
        std::fs::read_to_string(format!("{dir}/criterion/{path}/new/estimates.json")).ok()?;
    let rest = &text[text.find("\"mean\"")?..];
    let p = rest.find("\"point_estimate\":")? + "\"point_estimate\":".len();
    let end = rest[p..].find(',')?;
    rest[p..p + end].trim().parse().ok()
}
