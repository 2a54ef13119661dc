//! Reading the bench tool's CSV inputs: a header row naming the columns,
//! then one record per line. Blank lines and lines starting with `#` are not
//! data; every other line must parse, and each bad one is reported with its
//! line number (nothing is dropped silently).

use std::collections::HashMap;

/// The named numeric columns of a CSV file, row by row, with line numbers.
pub struct Table {
    /// (line number, values in the order of the requested columns; `None`
    /// for an optional column that is absent from the file).
    pub rows: Vec<(usize, Vec<Option<f64>>)>,
    /// One line for stderr per bad row; the caller adds its own checks and
    /// fails if any line is here.
    pub errors: Vec<String>,
}

/// Reads `path`, requiring the columns `required` and accepting `optional`
/// ones. A missing file or header is an error; bad rows are listed in
/// [`Table::errors`] (one line each) so that all problems are reported at once.
pub fn read(path: &str, required: &[&str], optional: &[&str]) -> Result<Table, Vec<String>> {
    let text =
        std::fs::read_to_string(path).map_err(|e| vec![format!("error: --input {path}: {e}")])?;
    let mut lines = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
    let Some((header_line, header)) = lines.next() else {
        return Err(vec![format!(
            "error: --input {path}: no header row and no data"
        )]);
    };
    let names: Vec<&str> = header.split(',').map(str::trim).collect();
    let index: HashMap<&str, usize> = names.iter().enumerate().map(|(i, n)| (*n, i)).collect();
    let mut errors = Vec::new();
    for r in required {
        if !index.contains_key(r) {
            errors.push(format!(
                "error: {path} line {header_line}: the header must name a column '{r}' (found: {header})"
            ));
        }
    }
    if !errors.is_empty() {
        return Err(errors);
    }
    let wanted: Vec<(&str, Option<usize>)> = required
        .iter()
        .chain(optional)
        .map(|n| (*n, index.get(n).copied()))
        .collect();
    let mut rows = Vec::new();
    for (line, l) in lines {
        let fields: Vec<&str> = l.split(',').map(str::trim).collect();
        if fields.len() != names.len() {
            errors.push(format!(
                "error: {path} line {line}: {} fields, the header has {}",
                fields.len(),
                names.len()
            ));
            continue;
        }
        let mut values = Vec::with_capacity(wanted.len());
        let mut ok = true;
        for (name, i) in &wanted {
            match i {
                None => values.push(None),
                Some(i) => match fields[*i].parse::<f64>() {
                    Ok(v) if v.is_finite() => values.push(Some(v)),
                    _ => {
                        errors.push(format!(
                            "error: {path} line {line}: {name} '{}' is not a finite number",
                            fields[*i]
                        ));
                        ok = false;
                    }
                },
            }
        }
        if ok {
            rows.push((line, values));
        }
    }
    Ok(Table { rows, errors })
}
