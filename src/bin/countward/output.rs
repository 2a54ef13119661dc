//! Writing the tool's output files without ever destroying an input: a
//! path that names one of the inputs is refused, and the file is written to
//! a temporary name in the same folder and renamed into place, so a failed
//! write leaves any earlier file untouched.

use super::Failure;
use std::path::Path;

/// Whether two paths name the same file (by their canonical forms when both
/// exist, else as written).
fn same_file(a: &str, b: &str) -> bool {
    match (Path::new(a).canonicalize(), Path::new(b).canonicalize()) {
        (Ok(x), Ok(y)) => x == y,
        _ => Path::new(a) == Path::new(b),
    }
}

/// Refuses an output `path` (given with `flag`) that is one of `inputs`
/// (`(flag, path)` pairs).
pub fn check_not_input(flag: &str, path: &str, inputs: &[(&str, &str)]) -> Result<(), Failure> {
    for (input_flag, input) in inputs {
        if same_file(path, input) {
            return Err(Failure(format!(
                "error: {flag} {path}: this is the {input_flag} file; refusing to overwrite an input (choose another path)"
            )));
        }
    }
    Ok(())
}

/// Writes `contents` to `path` (given with `flag`), refusing any path that
/// is one of `inputs` (`(flag, path)` pairs).
pub fn write(
    flag: &str,
    path: &str,
    contents: &str,
    inputs: &[(&str, &str)],
) -> Result<(), Failure> {
    check_not_input(flag, path, inputs)?;
    let target = Path::new(path);
    let name = target
        .file_name()
        .ok_or_else(|| Failure(format!("error: {flag} {path}: not a file name")))?;
    let mut temp_name = std::ffi::OsString::from(".");
    temp_name.push(name);
    temp_name.push(format!(".countward-{}.tmp", std::process::id()));
    let temp = target.with_file_name(temp_name);
    let fail = |e: std::io::Error| Failure(format!("error: {flag} {path}: {e}"));
    std::fs::write(&temp, contents).map_err(fail)?;
    std::fs::rename(&temp, target).map_err(|e| {
        let _ = std::fs::remove_file(&temp);
        fail(e)
    })
}
