//! Reading recorded scan files strictly, one scan per line.
//!
//! A data-acquisition file has a header line of channel names and one line
//! per scan. Each line is split on its own, so a malformed line (an
//! unterminated quote, too few or too many fields, text that is not UTF-8,
//! a line longer than [`MAX_LINE`]) is a problem of that scan only: the
//! lines after it are read normally and keep their own row numbers. A CSV
//! reader that lets a quoted field run across lines would instead swallow
//! the scans that follow an unterminated quote.
//!
//! Only regular files are read: a device, a pipe or a directory (an input
//! without an end, such as `/dev/zero`) is refused before anything is read.

use super::ReduceError;
use std::io::{BufRead, BufReader};
use std::path::Path;

/// Longest line read, bytes; a longer one is a bad line.
pub const MAX_LINE: usize = 1 << 20;

/// One line of a scan file.
#[derive(Debug, Clone, PartialEq)]
pub enum ScanLine {
    /// The cells of a well-formed line (trimmed).
    Record(csv::StringRecord),
    /// A line read with a repair, and what was repaired: a cell with an
    /// unterminated quote is kept as written when the line still splits
    /// into the header's fields (a stray quote in a note column must not
    /// lose the scan's readings). The scan carries this as a flag.
    Repaired(csv::StringRecord, String),
    /// A line that cannot be split into the header's fields, and why.
    Bad(String),
}

impl ScanLine {
    /// The cells, when the line could be split.
    pub fn record(&self) -> Option<&csv::StringRecord> {
        match self {
            ScanLine::Record(r) | ScanLine::Repaired(r, _) => Some(r),
            ScanLine::Bad(_) => None,
        }
    }
}

/// A scan file being read.
#[derive(Debug)]
pub struct ScanReader<R> {
    inner: R,
    delimiter: u8,
    header: Vec<String>,
    position: u64,
}

impl ScanReader<BufReader<std::fs::File>> {
    /// Open a scan file (a regular file only).
    pub fn open(path: &Path) -> Result<Self, ReduceError> {
        let err = |e: std::io::Error| ReduceError::Read(format!("{}: {e}", path.display()));
        let meta = std::fs::metadata(path).map_err(err)?;
        if !meta.is_file() {
            return Err(ReduceError::Read(format!(
                "{}: not a regular file (a device, pipe or folder has no end to read to); copy the scans to a file",
                path.display()
            )));
        }
        let f = std::fs::File::open(path).map_err(err)?;
        ScanReader::from_reader(BufReader::new(f))
    }
}

enum Raw {
    Line(Vec<u8>),
    TooLong,
    End,
}

fn read_line<R: BufRead>(r: &mut R, pos: &mut u64) -> std::io::Result<Raw> {
    let mut line = Vec::new();
    let mut too_long = false;
    loop {
        let buf = r.fill_buf()?;
        if buf.is_empty() {
            return Ok(if too_long {
                Raw::TooLong
            } else if line.is_empty() {
                Raw::End
            } else {
                Raw::Line(line)
            });
        }
        let (take, done) = match buf.iter().position(|&b| b == b'\n') {
            Some(i) => (i + 1, true),
            None => (buf.len(), false),
        };
        if !too_long {
            if line.len() + take > MAX_LINE + 1 {
                too_long = true;
                line = Vec::new();
            } else {
                line.extend_from_slice(&buf[..take]);
            }
        }
        r.consume(take);
        *pos += take as u64;
        if done {
            return Ok(if too_long {
                Raw::TooLong
            } else {
                Raw::Line(line)
            });
        }
    }
}

/// A line with an odd number of quotes, split on every delimiter: cells
/// quoted whole lose their quotes, the cell with the unpaired quote is kept
/// as written (its index is returned). A quoted delimiter makes the field
/// count wrong, and the caller then refuses the line.
fn split_literal(line: &str, delimiter: u8) -> (csv::StringRecord, Option<usize>) {
    let mut rec = csv::StringRecord::new();
    let mut odd = None;
    for (i, c) in line.split(delimiter as char).enumerate() {
        let c = c.trim();
        let quotes = c.matches('"').count();
        if quotes % 2 == 1 && odd.is_none() {
            odd = Some(i);
            rec.push_field(c);
        } else if c.len() >= 2 && c.starts_with('"') && c.ends_with('"') {
            rec.push_field(&c[1..c.len() - 1].replace("\"\"", "\""));
        } else {
            rec.push_field(c);
        }
    }
    (rec, odd)
}

fn split(line: &str, delimiter: u8) -> Result<csv::StringRecord, String> {
    if line.bytes().filter(|&b| b == b'"').count() % 2 == 1 {
        return Err("unterminated quote".into());
    }
    let mut r = csv::ReaderBuilder::new()
        .has_headers(false)
        .delimiter(delimiter)
        .flexible(true)
        .trim(csv::Trim::All)
        .from_reader(line.as_bytes());
    let mut rec = csv::StringRecord::new();
    match r.read_record(&mut rec) {
        Ok(_) => Ok(rec),
        Err(e) => Err(e.to_string()),
    }
}

impl<R: BufRead> ScanReader<R> {
    /// Read the header line (tab-separated when it has a tab, else commas).
    pub fn from_reader(mut inner: R) -> Result<Self, ReduceError> {
        let mut position = 0;
        let header = loop {
            match read_line(&mut inner, &mut position)
                .map_err(|e| ReduceError::Read(e.to_string()))?
            {
                Raw::End => return Err(ReduceError::Read("empty file: no header row".into())),
                Raw::TooLong => {
                    return Err(ReduceError::Read(format!(
                        "the header line is longer than {MAX_LINE} bytes"
                    )));
                }
                Raw::Line(l) => {
                    let text = String::from_utf8(l).map_err(|_| {
                        ReduceError::Read("the header line is not UTF-8 text".into())
                    })?;
                    let text = text.trim_end_matches(['\n', '\r']).to_string();
                    if !text.trim().is_empty() {
                        break text;
                    }
                }
            }
        };
        let delimiter = if header.contains('\t') { b'\t' } else { b',' };
        let rec = split(&header, delimiter)
            .map_err(|e| ReduceError::Read(format!("header line: {e}")))?;
        let header: Vec<String> = rec.iter().map(|s| s.trim().to_string()).collect();
        if header.iter().all(|h| h.is_empty()) {
            return Err(ReduceError::Read("empty file: no header row".into()));
        }
        Ok(ScanReader {
            inner,
            delimiter,
            header,
            position,
        })
    }

    /// The header's column names.
    pub fn header(&self) -> &[String] {
        &self.header
    }

    /// Bytes read so far.
    pub fn position(&self) -> u64 {
        self.position
    }

    /// The next scan line (blank lines are passed over), or None at the end.
    pub fn next_line(&mut self) -> Result<Option<ScanLine>, ReduceError> {
        loop {
            let raw = read_line(&mut self.inner, &mut self.position)
                .map_err(|e| ReduceError::Read(e.to_string()))?;
            let bytes = match raw {
                Raw::End => return Ok(None),
                Raw::TooLong => {
                    return Ok(Some(ScanLine::Bad(format!(
                        "line longer than {MAX_LINE} bytes"
                    ))));
                }
                Raw::Line(b) => b,
            };
            let Ok(text) = String::from_utf8(bytes) else {
                return Ok(Some(ScanLine::Bad("not UTF-8 text".into())));
            };
            let text = text.trim_end_matches(['\n', '\r']);
            if text.trim().is_empty() {
                continue;
            }
            if text.bytes().filter(|&b| b == b'"').count() % 2 == 1 {
                let (rec, odd) = split_literal(text, self.delimiter);
                return Ok(Some(if rec.len() == self.header.len() {
                    let col = odd
                        .and_then(|i| self.header.get(i))
                        .map_or("?", |h| h.as_str());
                    let cell = odd.and_then(|i| rec.get(i)).unwrap_or("");
                    ScanLine::Repaired(
                        rec.clone(),
                        format!("column {col}: unterminated quote in {cell}, read as written"),
                    )
                } else {
                    ScanLine::Bad(format!(
                        "unterminated quote (and the row does not split into the header's {} fields without it)",
                        self.header.len()
                    ))
                }));
            }
            return Ok(Some(match split(text, self.delimiter) {
                Err(e) => ScanLine::Bad(e),
                Ok(rec) if rec.len() != self.header.len() => ScanLine::Bad(format!(
                    "the row has {} of the header's {} fields",
                    rec.len(),
                    self.header.len()
                )),
                Ok(rec) => ScanLine::Record(rec),
            }));
        }
    }
}

impl<'a> ScanReader<BufReader<&'a [u8]>> {
    /// Read scans from text in memory (tests, benchmarks).
    pub fn from_text(text: &'a str) -> Result<Self, ReduceError> {
        ScanReader::from_reader(BufReader::new(text.as_bytes()))
    }
}
