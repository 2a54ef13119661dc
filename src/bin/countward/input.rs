//! Reading the bench tool's CSV inputs with the `csv` crate: a header row
//! naming the columns (a UTF-8 byte-order mark before it is accepted), then
//! one record per line (LF, CRLF or CR line endings; quoted fields; blank
//! lines and lines starting with `#` are not data). Every other line must
//! parse: each bad one is reported with its line number, nothing is dropped
//! silently. Records are handed to the caller one at a time, so a large file
//! costs only what the caller keeps of it.

use std::collections::HashMap;
use std::fs::File;
use std::io::{BufReader, Read};

/// Turns every blank, whitespace-only or comment line into a line holding
/// just `#` on the way into the CSV reader, which then returns it as a
/// one-field record that [`read_each`] skips. (The reader's own skipping of
/// blank and comment lines reports the next record at the skipped line's
/// number, and a quote inside a comment could swallow later lines.) So every
/// reported line number is the line a user sees in an editor. LF, CRLF and
/// CR line endings are recognised.
struct BlankLinesAsComments<R> {
    inner: R,
    raw: Vec<u8>,
    out: std::collections::VecDeque<u8>,
    at_line_start: bool,
    prev_cr: bool,
    pending_space: Vec<u8>,
    in_comment: bool,
    first: bool,
    done: bool,
}

impl<R: Read> BlankLinesAsComments<R> {
    fn new(inner: R) -> Self {
        BlankLinesAsComments {
            inner,
            raw: vec![0; 1 << 16],
            out: std::collections::VecDeque::with_capacity(1 << 17),
            at_line_start: true,
            prev_cr: false,
            pending_space: Vec::new(),
            in_comment: false,
            first: true,
            done: false,
        }
    }

    fn push(&mut self, c: u8) {
        if c == b'\n' && self.prev_cr {
            // The second half of a CRLF.
            self.prev_cr = false;
            self.out.push_back(c);
            return;
        }
        self.prev_cr = false;
        match c {
            b'\r' | b'\n' => {
                if self.at_line_start {
                    self.pending_space.clear();
                    self.out.push_back(b'#');
                }
                self.out.push_back(c);
                self.at_line_start = true;
                self.in_comment = false;
                self.prev_cr = c == b'\r';
            }
            _ if self.in_comment => {}
            b' ' | b'\t' if self.at_line_start => self.pending_space.push(c),
            b'#' if self.at_line_start => {
                self.pending_space.clear();
                self.out.push_back(b'#');
                self.at_line_start = false;
                self.in_comment = true;
            }
            _ => {
                if self.at_line_start {
                    self.out.extend(self.pending_space.drain(..));
                    self.at_line_start = false;
                }
                self.out.push_back(c);
            }
        }
    }
}

impl<R: Read> Read for BlankLinesAsComments<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        while self.out.is_empty() && !self.done {
            let n = self.inner.read(&mut self.raw)?;
            if n == 0 {
                self.done = true;
            }
            // A UTF-8 byte-order mark at the very start is not data.
            let skip = if self.first && self.raw[..n].starts_with(&[0xEF, 0xBB, 0xBF]) {
                3
            } else {
                0
            };
            self.first = false;
            for i in skip..n {
                let c = self.raw[i];
                self.push(c);
            }
        }
        let n = buf.len().min(self.out.len());
        for (slot, c) in buf.iter_mut().zip(self.out.drain(..n)) {
            *slot = c;
        }
        Ok(n)
    }
}

/// At most this many bad lines are listed one by one; the rest are counted.
const MAX_LISTED: usize = 20;

/// Problems found while reading, one line each for stderr.
#[derive(Default)]
pub struct Problems {
    lines: Vec<String>,
    more: usize,
}

impl Problems {
    /// Records one problem.
    pub fn push(&mut self, line: String) {
        if self.lines.len() < MAX_LISTED {
            self.lines.push(line);
        } else {
            self.more += 1;
        }
    }
    /// Whether nothing was wrong.
    pub fn is_empty(&self) -> bool {
        self.lines.is_empty()
    }
    /// All problems as one message.
    pub fn message(&self) -> String {
        let mut m = self.lines.join("\n");
        if self.more > 0 {
            m += &format!("\n... and {} more bad lines", self.more);
        }
        m
    }
}

/// Reads `path` (given with `flag`), requiring the columns `required` and
/// accepting `optional` ones, and calls `each(line, values)` for every good
/// record: `values` holds the required columns, then the optional ones
/// (`None` where the file has no such column). `each` may report a problem
/// of its own by returning `Err(message)` (without the file and line, which
/// are added). A missing or unreadable file, a missing header, a missing or
/// duplicated column are errors at once; bad records are collected and
/// reported together.
pub fn read_each(
    flag: &str,
    path: &str,
    required: &[&str],
    optional: &[&str],
    each: impl FnMut(u64, &[Option<f64>]) -> Result<(), String>,
) -> Result<(), String> {
    let file = File::open(path).map_err(|e| format!("error: {flag} {path}: {e}"))?;
    let size = file.metadata().map_or(0, |m| m.len());
    // A progress bar on stderr for inputs that take more than a moment
    // (indicatif draws nothing when stderr is not a terminal).
    let bar = (size > PROGRESS_FROM_BYTES).then(|| {
        let bar = indicatif::ProgressBar::new(size);
        bar.set_style(
            indicatif::ProgressStyle::with_template(
                "reading {msg} {bar:30} {bytes}/{total_bytes} ({eta} left)",
            )
            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        );
        bar.set_message(path.to_string());
        bar
    });
    let source = BufReader::with_capacity(1 << 16, file);
    let result = match &bar {
        Some(bar) => read_each_from(flag, path, bar.wrap_read(source), required, optional, each),
        None => read_each_from(flag, path, source, required, optional, each),
    };
    if let Some(bar) = bar {
        bar.finish_and_clear();
    }
    result
}

/// Inputs above this size (about a second's reading) show a progress bar.
const PROGRESS_FROM_BYTES: u64 = 16 << 20;

/// A spinner on stderr for a long computation (hidden when stderr is not a
/// terminal); `None` for small inputs.
pub fn spinner(message: &str, input_points: usize) -> Option<indicatif::ProgressBar> {
    (input_points > 200_000).then(|| {
        let s = indicatif::ProgressBar::new_spinner();
        s.set_message(message.to_string());
        s.enable_steady_tick(std::time::Duration::from_millis(200));
        s
    })
}

/// As [`read_each`], from any reader (`path` names it in messages); the
/// fuzz target `csv_reader` drives this directly.
pub fn read_each_from(
    flag: &str,
    path: &str,
    source: impl Read,
    required: &[&str],
    optional: &[&str],
    mut each: impl FnMut(u64, &[Option<f64>]) -> Result<(), String>,
) -> Result<(), String> {
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .trim(csv::Trim::All)
        .from_reader(BlankLinesAsComments::new(source));
    // The header: the first record that is not a blank or comment line.
    let mut header = csv::ByteRecord::new();
    loop {
        let more = reader
            .read_byte_record(&mut header)
            .map_err(|e| format!("error: {flag} {path}: {}", describe(&e)))?;
        if !more {
            return Err(format!("error: {flag} {path}: no header row and no data"));
        }
        if !(header.len() == 1 && &header[0] == b"#") {
            break;
        }
    }
    let header_line = header.position().map_or(1, |p| p.line());
    let mut names = Vec::with_capacity(header.len());
    for (i, f) in header.iter().enumerate() {
        let name = std::str::from_utf8(f).map_err(|_| {
            format!(
                "error: {path} line {header_line}: column {} of the header is not UTF-8 text",
                i + 1
            )
        })?;
        // A byte-order mark before the first name (in case a reader left it).
        names.push(name.trim_start_matches('\u{feff}').trim().to_string());
    }
    let mut index: HashMap<&str, usize> = HashMap::new();
    for (i, n) in names.iter().enumerate() {
        if let Some(first) = index.insert(n.as_str(), i) {
            return Err(format!(
                "error: {path} line {header_line}: columns {} and {} are both named '{n}' (which one is meant?)",
                first + 1,
                i + 1
            ));
        }
    }
    let shown = names.join(",");
    for r in required {
        if !index.contains_key(r) {
            return Err(format!(
                "error: {path} line {header_line}: the header must name a column '{r}' (found: {shown})"
            ));
        }
    }
    let wanted: Vec<(&str, Option<usize>)> = required
        .iter()
        .chain(optional)
        .map(|n| (*n, index.get(n).copied()))
        .collect();
    let mut problems = Problems::default();
    let mut values: Vec<Option<f64>> = Vec::with_capacity(wanted.len());
    let mut record = csv::ByteRecord::new();
    loop {
        match reader.read_byte_record(&mut record) {
            Ok(false) => break,
            Ok(true) => {}
            Err(e) => {
                problems.push(format!("error: {path}: {}", describe(&e)));
                if matches!(e.kind(), csv::ErrorKind::Io(_)) {
                    break;
                }
                continue;
            }
        }
        if record.len() == 1 && &record[0] == b"#" {
            continue; // a blank or comment line
        }
        let line = record.position().map_or(0, |p| p.line());
        if record.len() != names.len() {
            problems.push(format!(
                "error: {path} line {line}: {} fields, the header has {}",
                record.len(),
                names.len()
            ));
            continue;
        }
        values.clear();
        let mut ok = true;
        for (name, i) in &wanted {
            let Some(i) = i else {
                values.push(None);
                continue;
            };
            let raw = &record[*i];
            let parsed = std::str::from_utf8(raw)
                .ok()
                .and_then(|s| s.parse::<f64>().ok());
            match parsed {
                Some(v) if v.is_finite() => values.push(Some(v)),
                _ => {
                    let shown = String::from_utf8_lossy(raw);
                    let why = if std::str::from_utf8(raw).is_err() {
                        "is not UTF-8 text"
                    } else {
                        "is not a finite number"
                    };
                    problems.push(format!("error: {path} line {line}: {name} '{shown}' {why}"));
                    ok = false;
                }
            }
        }
        if ok && let Err(why) = each(line, &values) {
            problems.push(format!("error: {path} line {line}: {why}"));
        }
    }
    if problems.is_empty() {
        Ok(())
    } else {
        Err(problems.message())
    }
}

/// One line for a CSV error. (Field counts and UTF-8 are checked record by
/// record above, with their line numbers: the reader is flexible and reads
/// bytes, so only I/O and quoting errors come from it.)
fn describe(e: &csv::Error) -> String {
    match e.kind() {
        csv::ErrorKind::Io(io) => format!("cannot read: {io}"),
        _ => format!("{e}"),
    }
}
