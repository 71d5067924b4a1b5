//! Tabular results and their printers.
//!
//! Every command that prints rows (flow tables, the atmosphere, stations,
//! sweeps) builds one [`Table`]; the [`Printer`] trait turns it into text,
//! CSV or JSON, so the three formats never drift apart. JSON is an object
//! `{"rows": [{key: value, ...}, ...]}` with `null` for undefined cells and
//! full round-trip numbers; CSV has one header row of keys with their unit
//! in brackets ("tt [K]"); text aligns columns under a header of labels and
//! a line of units. Text and CSV print [`precision`] significant figures.

use std::io::{self, Write};
use std::sync::atomic::{AtomicUsize, Ordering};

/// Significant figures of numbers in text and CSV (JSON always carries the
/// full round-trip value). Set once by the command line's `--precision`.
static PRECISION: AtomicUsize = AtomicUsize::new(DEFAULT_PRECISION);

/// Significant figures when nothing else is asked for.
pub const DEFAULT_PRECISION: usize = 6;

/// Significant figures asked for values in sentences; 0 until asked.
static PROSE: AtomicUsize = AtomicUsize::new(0);

/// Set the significant figures of text and CSV numbers (clamped to
/// 1..=17), tables and values in sentences alike.
pub fn set_precision(n: usize) {
    PRECISION.store(n.clamp(1, 17), Ordering::Relaxed);
    PROSE.store(n.clamp(1, 17), Ordering::Relaxed);
}

/// Figures of a value in a sentence: those asked with `--precision`, or
/// `default` (the quantity's display figures).
pub fn prose_digits(default: usize) -> usize {
    match PROSE.load(Ordering::Relaxed) {
        0 => default,
        n => n,
    }
}

/// The significant figures of text and CSV numbers.
pub fn precision() -> usize {
    PRECISION.load(Ordering::Relaxed)
}

/// A CSV header cell: the key, and its unit in brackets when it has one
/// ("tt [K]"), the one header style of every command.
pub fn csv_key(c: &Column) -> String {
    if c.unit.is_empty() {
        c.key.clone()
    } else {
        format!("{} [{}]", c.key, c.unit)
    }
}

/// A CSV cell: a number to [`precision`] significant figures.
pub fn csv_cell(c: &Cell) -> String {
    let mut s = String::new();
    csv_cell_to(&mut s, c);
    s
}

/// [`csv_cell`] into a buffer (cleared first).
fn csv_cell_to(buf: &mut String, c: &Cell) {
    buf.clear();
    match c {
        Cell::Num(v) => sig_to(buf, *v, precision()),
        Cell::Text(t) => buf.push_str(t),
        Cell::Empty => {}
    }
}

/// One CSV row through one reusable buffer.
fn csv_row<W: Write>(w: &mut csv::Writer<W>, row: &[Cell], buf: &mut String) -> csv::Result<()> {
    for c in row {
        csv_cell_to(buf, c);
        w.write_field(buf.as_bytes())?;
    }
    w.write_record(None::<&[u8]>)
}

/// A column: machine key, human label, unit shown in text output.
#[derive(Debug, Clone, PartialEq)]
pub struct Column {
    /// Key for CSV and JSON ("p_pt").
    pub key: String,
    /// Label for text ("p/pt").
    pub label: String,
    /// Unit shown under the label in text ("" for ratios).
    pub unit: String,
}

impl Column {
    /// A column whose label is its key.
    pub fn new(key: &str, label: &str, unit: &str) -> Column {
        Column {
            key: key.to_string(),
            label: label.to_string(),
            unit: unit.to_string(),
        }
    }
}

/// A cell: a number, a text, or nothing.
#[derive(Debug, Clone, PartialEq)]
pub enum Cell {
    /// A number in the column's unit.
    Num(f64),
    /// A text (a name, a problem).
    Text(String),
    /// Not defined here.
    Empty,
}

impl From<f64> for Cell {
    fn from(v: f64) -> Cell {
        if v.is_finite() {
            Cell::Num(v)
        } else {
            Cell::Empty
        }
    }
}
impl From<Option<f64>> for Cell {
    fn from(v: Option<f64>) -> Cell {
        v.map_or(Cell::Empty, Cell::from)
    }
}
impl From<&str> for Cell {
    fn from(v: &str) -> Cell {
        Cell::Text(v.to_string())
    }
}
impl From<String> for Cell {
    fn from(v: String) -> Cell {
        Cell::Text(v)
    }
}

/// Rows under named columns.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Table {
    /// Column definitions.
    pub columns: Vec<Column>,
    /// Rows, each as long as `columns`.
    pub rows: Vec<Vec<Cell>>,
}

impl Table {
    /// A table with these columns and no rows.
    pub fn new(columns: Vec<Column>) -> Table {
        Table {
            columns,
            rows: Vec::new(),
        }
    }
}

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    /// Aligned text for a terminal.
    Text,
    /// Comma-separated values.
    Csv,
    /// JSON object with `rows`.
    Json,
}

/// One interface over the output formats.
pub trait Printer {
    /// Write the whole table.
    fn print(&self, table: &Table, out: &mut dyn Write) -> io::Result<()>;
}

/// The printer for a format.
pub fn printer(format: Format) -> Box<dyn Printer> {
    match format {
        Format::Text => Box::new(TextPrinter),
        Format::Csv => Box::new(CsvPrinter),
        Format::Json => Box::new(JsonPrinter),
    }
}

/// Aligned columns, [`precision`] significant figures.
pub struct TextPrinter;
/// CSV with a header row of keys with units, [`precision`] significant figures.
pub struct CsvPrinter;
/// JSON `{"rows": [...]}`, full precision.
pub struct JsonPrinter;

/// A number with `sig` significant digits, without exponent for ordinary
/// magnitudes and without "-0".
pub fn sig(v: f64, sig: usize) -> String {
    let mut out = String::new();
    sig_to(&mut out, v, sig);
    out
}

/// [`sig`] appended to `out` (no allocation on the fast path: a sweep
/// writes millions of cells through one buffer).
pub fn sig_to(out: &mut String, v: f64, sig: usize) {
    use std::fmt::Write as _;
    if v == 0.0 || !v.is_finite() {
        out.push_str(if v.is_finite() { "0" } else { "-" });
        return;
    }
    let mut mag = v.abs().log10().floor() as i32;
    // Rounding to `sig` digits can carry into the next decade:
    // 0.99999999999 is 1.00000 to six digits, not 1.000000.
    let d = sig as i32 - 1 - mag;
    if scale10(v.abs(), d).round() >= scale10(1.0, sig as i32) {
        mag += 1;
    }
    if !(-4..=9).contains(&mag) {
        let _ = write!(out, "{:.*e}", sig.saturating_sub(1), v);
        return;
    }
    // Up to 12 figures the digits come from one scaled integer (a few
    // dozen instructions; a sweep prints millions of cells); next to a
    // rounding tie and beyond 12 figures the exact conversion is used, so
    // the result is always that of the exact conversion.
    if sig <= 12 && fast_sig(out, v, sig, mag) {
        return;
    }
    let decimals = (sig as i32 - 1 - mag).max(0) as usize;
    // Whole numbers longer than `sig` digits are rounded too (1974632.3 to
    // six figures is 1974630), so no printed digit claims more than asked.
    let v = if mag >= sig as i32 {
        let unit = 10f64.powi(mag + 1 - sig as i32);
        (v / unit).round() * unit
    } else {
        v
    };
    let s = format!("{v:.decimals$}");
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        out.push_str(&s[1..]);
    } else {
        out.push_str(&s);
    }
}

/// `a` times 10^d: through an exact power of ten from a table (a multiply
/// or a divide, one rounding) where |d| <= 22, else `powi`.
fn scale10(a: f64, d: i32) -> f64 {
    const P: [f64; 23] = [
        1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
        1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
    ];
    match d {
        0..=22 => a * P[d as usize],
        -22..=-1 => a / P[(-d) as usize],
        _ => a * 10f64.powi(d),
    }
}

/// [`sig`] for `sig <= 12` and a decade `mag` in -4..=9, through one
/// rounded integer of `sig` digits, appended to `out`; false (nothing
/// written) next to a rounding tie, where the one rounding of the scaled
/// product could decide the other way from the exact decimal value (the
/// caller then converts exactly).
fn fast_sig(out: &mut String, v: f64, sig: usize, mag: i32) -> bool {
    let d = sig as i32 - 1 - mag;
    // Exact powers of ten up to 1e22: one rounding in the product.
    let scaled = scale10(v.abs(), d);
    if (scaled - scaled.floor() - 0.5).abs() < 1e-6 {
        return false;
    }
    let mut m = scaled.round() as u64;
    // The digits of m, on the stack.
    let mut buf = [0u8; 20];
    let mut n = 0;
    loop {
        buf[19 - n] = b'0' + (m % 10) as u8;
        n += 1;
        m /= 10;
        if m == 0 {
            break;
        }
    }
    let digits = &buf[20 - n..];
    let is_zero = digits.iter().all(|&c| c == b'0');
    if v < 0.0 && !is_zero {
        out.push('-');
    }
    let push = |out: &mut String, bytes: &[u8]| {
        for &b in bytes {
            out.push(b as char);
        }
    };
    if d <= 0 {
        push(out, digits);
        for _ in 0..(-d) {
            out.push('0');
        }
    } else {
        let d = d as usize;
        if digits.len() <= d {
            out.push_str("0.");
            for _ in 0..(d - digits.len()) {
                out.push('0');
            }
            push(out, digits);
        } else {
            let (whole, frac) = digits.split_at(digits.len() - d);
            push(out, whole);
            out.push('.');
            push(out, frac);
        }
    }
    true
}

fn text_cell(c: &Cell) -> String {
    match c {
        Cell::Num(v) => sig(*v, precision()),
        Cell::Text(t) => t.clone(),
        Cell::Empty => "-".to_string(),
    }
}

/// Column widths and alignment of aligned text for a table's rows.
fn text_layout(table: &Table, cells: &[Vec<String>]) -> (Vec<usize>, Vec<bool>) {
    let widths: Vec<usize> = table
        .columns
        .iter()
        .enumerate()
        .map(|(i, c)| {
            let w = cells
                .iter()
                .map(|r| r.get(i).map_or(0, |s| s.chars().count()))
                .max()
                .unwrap_or(0);
            w.max(c.label.chars().count())
                .max(c.unit.chars().count() + 2)
        })
        .collect();
    // Text columns (names, problems) read better left-aligned.
    let text_col: Vec<bool> = (0..table.columns.len())
        .map(|i| {
            table
                .rows
                .iter()
                .any(|r| matches!(r.get(i), Some(Cell::Text(_))))
                && !table
                    .rows
                    .iter()
                    .any(|r| matches!(r.get(i), Some(Cell::Num(_))))
        })
        .collect();
    (widths, text_col)
}

fn text_line(parts: &[String], widths: &[usize], left: &[bool]) -> String {
    parts
        .iter()
        .zip(widths)
        .zip(left)
        .map(|((s, w), left)| {
            if *left {
                format!("{s:<w$}")
            } else {
                format!("{s:>w$}")
            }
        })
        .collect::<Vec<_>>()
        .join("  ")
        .trim_end()
        .to_string()
}

fn text_header(
    table: &Table,
    widths: &[usize],
    left: &[bool],
    out: &mut dyn Write,
) -> io::Result<()> {
    let labels: Vec<String> = table.columns.iter().map(|c| c.label.clone()).collect();
    writeln!(out, "{}", text_line(&labels, widths, left))?;
    if table.columns.iter().any(|c| !c.unit.is_empty()) {
        let units: Vec<String> = table
            .columns
            .iter()
            .map(|c| {
                if c.unit.is_empty() {
                    String::new()
                } else {
                    format!("[{}]", c.unit)
                }
            })
            .collect();
        writeln!(out, "{}", text_line(&units, widths, left))?;
    }
    Ok(())
}

impl Printer for TextPrinter {
    fn print(&self, table: &Table, out: &mut dyn Write) -> io::Result<()> {
        let cells: Vec<Vec<String>> = table
            .rows
            .iter()
            .map(|r| r.iter().map(text_cell).collect())
            .collect();
        let (widths, left) = text_layout(table, &cells);
        text_header(table, &widths, &left, out)?;
        for r in cells {
            writeln!(out, "{}", text_line(&r, &widths, &left))?;
        }
        Ok(())
    }
}

/// A table written in pieces, for outputs too long to hold (a sweep of
/// millions of points): each [`Streamer::chunk`] is a table with the same
/// columns and the next rows. Memory is that of one chunk. Text takes its
/// column widths from the first chunk; CSV writes one header; JSON writes
/// one object `{"rows": [...]}` with a row per line.
pub struct Streamer {
    format: Format,
    layout: Option<(Vec<usize>, Vec<bool>)>,
    rows: u64,
}

impl Streamer {
    /// A streamer for a format.
    pub fn new(format: Format) -> Streamer {
        Streamer {
            format,
            layout: None,
            rows: 0,
        }
    }

    /// Write the next rows (`chunk.rows`) of the table.
    pub fn chunk(&mut self, chunk: &Table, out: &mut dyn Write) -> io::Result<()> {
        let first = self.rows == 0 && self.layout.is_none();
        match self.format {
            Format::Text => {
                let cells: Vec<Vec<String>> = chunk
                    .rows
                    .iter()
                    .map(|r| r.iter().map(text_cell).collect())
                    .collect();
                if self.layout.is_none() {
                    let l = text_layout(chunk, &cells);
                    text_header(chunk, &l.0, &l.1, out)?;
                    self.layout = Some(l);
                }
                if let Some((w, l)) = &self.layout {
                    for r in cells {
                        writeln!(out, "{}", text_line(&r, w, l))?;
                    }
                }
            }
            Format::Csv => {
                let mut w = csv::Writer::from_writer(&mut *out);
                if first {
                    w.write_record(chunk.columns.iter().map(csv_key))?;
                    self.layout = Some((Vec::new(), Vec::new()));
                }
                let mut buf = String::new();
                for r in &chunk.rows {
                    csv_row(&mut w, r, &mut buf)?;
                }
                w.flush()?;
            }
            Format::Json => {
                if first {
                    write!(out, "{{\"rows\": [")?;
                    self.layout = Some((Vec::new(), Vec::new()));
                }
                for (i, r) in chunk.rows.iter().enumerate() {
                    let sep = if self.rows == 0 && i == 0 {
                        "\n"
                    } else {
                        ",\n"
                    };
                    write!(out, "{sep}{}", row_json(&chunk.columns, r))?;
                }
            }
        }
        self.rows += chunk.rows.len() as u64;
        Ok(())
    }

    /// End the output (closes the JSON object).
    pub fn finish(&mut self, out: &mut dyn Write) -> io::Result<()> {
        if self.format == Format::Json {
            if self.layout.is_none() {
                write!(out, "{{\"rows\": [")?;
            }
            writeln!(out, "\n]}}")?;
        }
        out.flush()
    }
}

impl Printer for CsvPrinter {
    fn print(&self, table: &Table, out: &mut dyn Write) -> io::Result<()> {
        let mut w = csv::Writer::from_writer(out);
        w.write_record(table.columns.iter().map(csv_key))?;
        let mut buf = String::new();
        for r in &table.rows {
            csv_row(&mut w, r, &mut buf)?;
        }
        w.flush()?;
        Ok(())
    }
}

/// One row as a JSON object.
pub fn row_json(columns: &[Column], row: &[Cell]) -> serde_json::Value {
    let mut m = serde_json::Map::new();
    for (c, v) in columns.iter().zip(row) {
        m.insert(c.key.clone(), cell_json(v));
    }
    serde_json::Value::Object(m)
}

/// One cell as JSON (null when empty).
pub fn cell_json(v: &Cell) -> serde_json::Value {
    match v {
        Cell::Num(x) => serde_json::Number::from_f64(*x)
            .map_or(serde_json::Value::Null, serde_json::Value::Number),
        Cell::Text(t) => serde_json::Value::String(t.clone()),
        Cell::Empty => serde_json::Value::Null,
    }
}

impl Printer for JsonPrinter {
    fn print(&self, table: &Table, out: &mut dyn Write) -> io::Result<()> {
        let rows: Vec<serde_json::Value> = table
            .rows
            .iter()
            .map(|r| row_json(&table.columns, r))
            .collect();
        let v = serde_json::json!({ "rows": rows });
        serde_json::to_writer_pretty(&mut *out, &v)?;
        writeln!(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_digits() {
        assert_eq!(sig(0.127801, 5), "0.12780");
        assert_eq!(sig(101325.0, 6), "101325");
        assert_eq!(sig(1974632.3, 6), "1974630");
        assert_eq!(sig(-1974635.0, 4), "-1975000");
        assert_eq!(sig(-0.0000001, 3), "-1.00e-7");
        assert_eq!(sig(-0.00001, 2), "-1.0e-5");
        assert_eq!(sig(-0.0001, 2), "-0.00010");
        assert_eq!(sig(-0.0004, 1), "-0.0004");
        // Rounding that carries into the next decade keeps the digit count.
        assert_eq!(sig(0.9999999999999998, 6), "1.00000");
        assert_eq!(sig(99.99996, 6), "100.000");
        assert_eq!(sig(0.99999, 6), "0.999990");
    }

    #[test]
    fn fast_figures_agree_with_exact_decimal_conversion() {
        // Independent: the standard library's exact decimal formatting.
        let mut x = 0.000123456789f64;
        let mut n = 0;
        while x < 9.9e9 {
            for v in [x, -x, x * 1.000000001, 0.5 * x] {
                for digits in [1, 3, 6, 10, 15] {
                    let ours = sig(v, digits);
                    let back: f64 = ours.parse().unwrap();
                    // Same value to the figures asked, and the exact form.
                    let mut mag = v.abs().log10().floor() as i32;
                    let k = digits as i32 - 1 - mag;
                    if (v.abs() * 10f64.powi(k)).round() >= 10f64.powi(digits as i32) {
                        mag += 1;
                    }
                    let dec = (digits as i32 - 1 - mag).max(0) as usize;
                    if (-4..=9).contains(&mag) && mag < digits as i32 {
                        let exact = format!("{v:.dec$}");
                        let exact = exact.trim_start_matches('-');
                        assert_eq!(ours.trim_start_matches('-'), exact, "{v} to {digits}");
                    }
                    let unit = 10f64.powi(mag + 1 - digits as i32);
                    assert!(
                        (back - v).abs() <= 0.51 * unit + 4.0 * f64::EPSILON * v.abs(),
                        "{v} {digits}: {ours}"
                    );
                    n += 1;
                }
            }
            x *= 1.37;
        }
        assert!(n > 1000);
        // Ties and near-ties take the exact conversion's side.
        for (v, digits) in [
            (0.125, 2),
            (869.075, 5),
            (2.5, 1),
            (1234.5, 4),
            (0.000123455, 5),
        ] {
            let mag = f64::log10(v).floor() as i32;
            let dec = (digits as i32 - 1 - mag).max(0) as usize;
            assert_eq!(sig(v, digits), format!("{v:.dec$}"), "{v} to {digits}");
        }
    }

    #[test]
    fn json_and_csv_carry_nulls_and_keys() {
        let mut t = Table::new(vec![Column::new("a", "A", ""), Column::new("b", "B", "K")]);
        t.rows.push(vec![Cell::Num(1.5), Cell::Empty]);
        t.rows.push(vec![Cell::Num(0.1 + 0.2), Cell::Num(2.0)]);
        let mut j = Vec::new();
        JsonPrinter.print(&t, &mut j).unwrap();
        let v: serde_json::Value = serde_json::from_slice(&j).unwrap();
        assert_eq!(v["rows"][0]["a"], 1.5);
        assert!(v["rows"][0]["b"].is_null());
        let mut c = Vec::new();
        CsvPrinter.print(&t, &mut c).unwrap();
        assert_eq!(
            String::from_utf8(c).unwrap(),
            "a,b [K]\n1.50000,\n0.300000,2.00000\n"
        );
        assert_eq!(v["rows"][1]["a"].as_f64(), Some(0.1 + 0.2));
    }
}
