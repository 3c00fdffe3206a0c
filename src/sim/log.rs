//! Streaming reader for simulator result logs: one row of port values per line, read into a
//! reused [`LogRow`] without allocating, for `arithvec check` to compare against the vectors.
//!
//! This module owns the log file format. A log is text, one record per line:
//!
//! - Lines whose first non-blank characters are `#` or `//`, and blank lines, are skipped
//!   everywhere, before the header too. A trailing CR (CRLF line endings) is ignored, and so is
//!   a UTF-8 byte-order mark at the start of the file.
//! - The first other line is the header. It names the columns after the spec's port names
//!   (`spec.ports`, exactly, case-sensitive), plus an optional `index` column, in any order.
//!   If the header contains a comma the whole file is comma-separated and every field may have
//!   spaces or tabs around it; otherwise runs of spaces and tabs separate fields. A header
//!   naming an unknown or duplicate column, or none of the spec's outputs, is a bad-input error.
//!   Input columns are optional: [`LogReader::has`] says which signals the log carries, and the
//!   checker takes missing operands from the vector set by index.
//! - Every later line holds one value per column. `index` is unsigned decimal (as Verilog `%0d`
//!   prints it; no sign). Port values are in the [`Radix`] the caller selects (hex by default).
//!
//! Values (the rules the tests below pin down):
//!
//! - `_` may appear anywhere among the digits and is ignored.
//! - Hex radix: an optional `0x`/`0X` prefix, except that a token of exactly `ceil(W/4)`
//!   characters (W = the column's width) is read as digits. That is how Icarus `%h` and GHDL
//!   `hwrite` print a W-bit value whose second digit is unknown (`0x05`, `0X05`, observed), and
//!   misreading that as a known value would hide an unknown. A hand-written prefixed value
//!   should therefore carry fewer or more digits than `%h` prints (`0x5`, `0x0005`).
//! - Binary radix: an optional `0b`/`0B` prefix (`b` is never a binary digit, so no ambiguity).
//! - Decimal radix: no prefix; a leading `-` (as `%0d` prints a signed reg) stands for the
//!   two's-complement pattern of the column's width and must lie in its range. A decimal value
//!   is unknown only as a whole (below); an x among decimal digits is a problem. Plain `%d`
//!   pads with spaces, which blank separation absorbs and comma separation trims.
//! - A Verilog-style literal, `[size]'[s]<base><digits>` with base `h`, `b`, `o` or `d`
//!   (`16'h00ab`, `1'b0`, `'hff`), is accepted in every radix and its base wins. The value must
//!   fit both its size and the column; as in IEEE 1364-2005 3.5.1 (from memory), an x or z
//!   leftmost digit extends the unknown up to the size (or the column width when unsized).
//! - Unknown digits (IEEE 1364-2005 17.1.1.3, confirmed against Icarus 11 output; VHDL-2008
//!   `hwrite`, confirmed against GHDL 2.0 output): in hex and octal, `x`/`X` is a digit whose
//!   bits are unknown and `z`/`Z`/`?` one that is high impedance. `%h` prints lowercase `x`/`z`
//!   when all of a digit's bits are x/z and uppercase `X`/`Z` when only some are; `hwrite`
//!   prints `X` for a nibble holding any of U X W - and `Z` for an all-Z nibble. An uppercase
//!   digit does not say which bits are unknown, so every bit of it is marked unknown
//!   (conservative: a checker then refuses to call that digit's known bits correct).
//! - Binary radix reads Verilog `%b` (`0 1 x z`) and VHDL `write` of `std_logic`
//!   (`U X 0 1 Z W L H -`): U, X, W and `-` are unknown, Z (and `?`) is high impedance, L reads
//!   as 0 and H as 1 (the weak drivers' logic values). Inside a Verilog literal only
//!   `0 1 x X z Z ?` are binary digits.
//! - A field that is one unknown character (`x`, `X`, `z`, `Z`, and in binary also `U`, `W`,
//!   `-`) means every bit is unknown, in every radix; Icarus `%0d` prints a wholly unknown value
//!   as `x`/`z` and a partly unknown one as `X`/`Z` (observed), which is treated the same way.
//!   A one-character field `U`, `W`, `-`, `L` or `H` is also accepted in hex and decimal logs,
//!   because GHDL logs print one-bit ports with `write` next to `hwrite` vectors.
//! - Unknown bits at or above the width are dropped (a 13-bit `%h` value has a 4-digit top);
//!   known 1 bits there make the value too wide, and that is a problem for the line.
//!
//! A parsed value is a [`FieldValue`]: the known bits, a mask of unknown bits (whose `bits` are
//! 0), and whether any digit was high impedance, so a report can say "z (undriven)".
//!
//! Speed: a line is parsed where it lies in the source's buffer (copied only when it straddles
//! a buffer boundary), and a line of plain digits, the usual case, is read in one pass with
//! wide hex values taken 8 digits at a time. Any other line is parsed again from its start by
//! the general parser, which is the reference for every rule above and words the problems;
//! property tests hold the two paths together.

use std::fmt;
use std::io::BufRead;
use std::path::Path;
use std::str::FromStr;
use std::sync::Arc;

use crate::arith::word::{hex_digits, Word, LIMBS, MAX_WIDTH};
use crate::error::{Error, Problem, Result};
use crate::spec::{Signal, Spec};

/// The number of distinct signals, and so of value slots in a [`LogRow`].
const SLOTS: usize = Signal::ALL.len();

/// The digit radix of a log's port values (the `index` column is always decimal).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
#[non_exhaustive]
pub enum Radix {
    /// Hexadecimal, as Verilog `%h` and VHDL `hwrite` print (the default).
    #[default]
    Hex,
    /// Binary, as Verilog `%b` and VHDL `write` of a `std_logic_vector` print.
    Bin,
    /// Unsigned decimal, as Verilog `%0d` prints (a leading `-` is a two's-complement pattern).
    Dec,
}

impl Radix {
    /// Every radix, in documentation order.
    pub const ALL: [Radix; 3] = [Radix::Hex, Radix::Bin, Radix::Dec];

    /// The command-line spelling: `hex`, `bin` or `dec`.
    pub fn name(self) -> &'static str {
        match self {
            Radix::Hex => "hex",
            Radix::Bin => "bin",
            Radix::Dec => "dec",
        }
    }

    /// Looks a radix up by its command-line spelling.
    pub fn from_name(name: &str) -> Option<Radix> {
        Radix::ALL.into_iter().find(|r| r.name() == name)
    }
}

impl fmt::Display for Radix {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Radix {
    type Err = String;

    fn from_str(s: &str) -> std::result::Result<Radix, String> {
        Radix::from_name(s)
            .ok_or_else(|| format!("unknown radix \"{s}\": expected hex, bin or dec"))
    }
}

/// One port value read from a log: known bits plus a mask of bits that were x or z.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub struct FieldValue {
    /// The known bits; 0 wherever `unknown` is set.
    pub bits: Word,
    /// The bits that were printed as unknown (x, z, U, W, `-`, or part of an `X`/`Z` digit).
    pub unknown: Word,
    /// True when any digit was high impedance (`z`, `Z`, `?`), so reports can say "undriven".
    pub high_z: bool,
}

impl FieldValue {
    /// A fully known value.
    pub const fn known(bits: Word) -> FieldValue {
        FieldValue {
            bits,
            unknown: Word::ZERO,
            high_z: false,
        }
    }

    /// True when no bit is unknown.
    pub fn is_known(&self) -> bool {
        self.unknown.is_zero()
    }
}

/// One data line of a log. Reuse one row for every [`LogReader::read_row`] call: the reader
/// overwrites the columns the log has and nothing else. After a call that returned an error the
/// row's contents are unspecified.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct LogRow {
    /// The 1-based line number in the log file.
    pub line: usize,
    /// The `index` column's value, or None when the log has no `index` column.
    pub index: Option<u64>,
    values: [FieldValue; SLOTS],
    present: u16,
}

impl Default for LogRow {
    fn default() -> LogRow {
        LogRow::new()
    }
}

impl LogRow {
    /// An empty row, to pass to [`LogReader::read_row`].
    pub fn new() -> LogRow {
        LogRow {
            line: 0,
            index: None,
            values: [FieldValue::default(); SLOTS],
            present: 0,
        }
    }

    /// The value of `signal` on this line, or None when the log has no column for it.
    pub fn get(&self, signal: Signal) -> Option<&FieldValue> {
        let slot = slot(signal);
        (self.present >> slot & 1 == 1).then(|| &self.values[slot])
    }
}

/// Why [`LogReader::read_row`] could not return a row.
#[derive(Debug)]
pub enum RowError {
    /// The line is malformed. The reader stays usable: the next call reads the next line, so a
    /// lenient caller can count the problem and go on.
    Line(Problem),
    /// Reading the file failed. The reader is finished: later calls return `Ok(false)`.
    Io(Error),
}

impl fmt::Display for RowError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            RowError::Line(p) => p.fmt(f),
            RowError::Io(e) => e.fmt(f),
        }
    }
}

impl std::error::Error for RowError {
    fn source(&self) -> Option<&(dyn std::error::Error + 'static)> {
        match self {
            RowError::Line(_) => None,
            RowError::Io(e) => Some(e),
        }
    }
}

impl From<RowError> for Error {
    /// Lets a strict caller write `while reader.read_row(&mut row)? { .. }`.
    fn from(e: RowError) -> Error {
        match e {
            RowError::Line(p) => Error::problem(p),
            RowError::Io(e) => e,
        }
    }
}

/// Where one column's values go.
#[derive(Debug, Clone, Copy)]
enum Target {
    Index,
    Value { slot: usize, width: u32 },
}

#[derive(Debug, Clone)]
struct Column {
    name: String,
    target: Target,
}

/// Everything needed to parse a data line, kept apart from the byte source so a line can be
/// parsed in place inside the source's buffer.
#[derive(Debug)]
pub(crate) struct LineFormat {
    comma: bool,
    radix: Radix,
    columns: Vec<Column>,
    /// The columns as the hot path needs them, in the same order.
    plain: Vec<PlainColumn>,
    present: u16,
    has_index: bool,
}

/// One column for [`LineFormat::parse_plain_line`].
#[derive(Debug, Clone, Copy)]
struct PlainColumn {
    /// The value slot, or None for the index.
    slot: Option<usize>,
    /// Decimal for the index, the log's radix otherwise.
    radix: Radix,
    /// The largest value that fits the column.
    max: u64,
    /// True for columns of 16 bits or more, whose hex values are read 8 digits at a time.
    wide: bool,
}

/// Reads a result log row by row. See the module documentation for the format.
///
/// I/O errors are reported as [`RowError::Io`] (an [`Error`] naming the file), kept apart from
/// malformed lines ([`RowError::Line`]) so a lenient caller that skips bad lines still stops on
/// a failing disk.
#[derive(Debug)]
pub struct LogReader<R: BufRead> {
    reader: R,
    file: String,
    /// Shared with the checker's worker threads, which parse lines of blocks read here.
    format: Arc<LineFormat>,
    signals: Vec<Signal>,
    header_line: usize,
    line: usize,
    spare: Vec<u8>,
    finished: bool,
}

impl<R: BufRead> LogReader<R> {
    /// Reads up to and including the header row and checks it against `spec`; `file` names the
    /// log in messages. Every header problem is reported at once.
    pub fn new(mut reader: R, file: &str, spec: &Spec, radix: Radix) -> Result<LogReader<R>> {
        let mut buf = Vec::with_capacity(256);
        let mut line = 0usize;
        loop {
            buf.clear();
            let n = reader
                .read_until(b'\n', &mut buf)
                .map_err(|e| Error::io(Path::new(file), e))?;
            if n == 0 {
                let message = if line == 0 {
                    "the log is empty: expected a header row naming the columns"
                } else {
                    "the log has only comments and blank lines: expected a header row naming the \
                     columns"
                };
                return Err(Error::problem(Problem::new(file, message)));
            }
            line += 1;
            if line == 1 && buf.starts_with(b"\xEF\xBB\xBF") {
                buf.drain(..3);
            }
            if !is_skipped(trim_line_end(&buf)) {
                break;
            }
        }
        let format = parse_header(trim_line_end(&buf), file, line, spec, radix)?;
        let signals = format
            .columns
            .iter()
            .filter_map(|c| match c.target {
                Target::Value { slot, .. } => Some(Signal::ALL[slot]),
                Target::Index => None,
            })
            .collect();
        buf.clear();
        Ok(LogReader {
            reader,
            file: file.to_string(),
            format: Arc::new(format),
            signals,
            header_line: line,
            line,
            spare: buf,
            finished: false,
        })
    }

    /// The signals the log has a column for, in the file's column order.
    pub fn columns(&self) -> &[Signal] {
        &self.signals
    }

    /// True when the log has a column for `signal`.
    pub fn has(&self, signal: Signal) -> bool {
        self.format.present >> slot(signal) & 1 == 1
    }

    /// True when the log has an `index` column.
    pub fn has_index(&self) -> bool {
        self.format.has_index
    }

    /// True when the header (and so every line) is comma-separated.
    pub fn is_comma_separated(&self) -> bool {
        self.format.comma
    }

    /// The radix values are read in.
    pub fn radix(&self) -> Radix {
        self.format.radix
    }

    /// The 1-based line number of the header row.
    pub fn header_line(&self) -> usize {
        self.header_line
    }

    /// The number of lines consumed so far (the last line read).
    pub fn line(&self) -> usize {
        self.line
    }

    /// The file name used in messages.
    pub fn file(&self) -> &str {
        &self.file
    }

    /// Reads the next data line into `row`, skipping comments and blank lines. Returns
    /// `Ok(true)` when `row` holds a new line, `Ok(false)` at the end of the log.
    pub fn read_row(&mut self, row: &mut LogRow) -> std::result::Result<bool, RowError> {
        loop {
            if self.finished {
                return Ok(false);
            }
            let available = match self.reader.fill_buf() {
                Ok(bytes) => bytes,
                Err(e) if e.kind() == std::io::ErrorKind::Interrupted => continue,
                Err(e) => return Err(self.fail(e)),
            };
            if available.is_empty() {
                self.finished = true;
                return Ok(false);
            }
            self.line += 1;
            // The common case: the whole line is in the source's buffer, so parse it there.
            let outcome = if let Some(end) = find_newline(available) {
                let outcome = self
                    .format
                    .parse_line(&available[..end], self.line, &self.file, row);
                self.reader.consume(end + 1);
                outcome
            } else {
                self.spare.clear();
                if let Err(e) = self.reader.read_until(b'\n', &mut self.spare) {
                    return Err(self.fail(e));
                }
                let line = self.spare.strip_suffix(b"\n").unwrap_or(&self.spare);
                self.format.parse_line(line, self.line, &self.file, row)
            };
            match outcome {
                LineOutcome::Skipped => continue,
                LineOutcome::Row => return Ok(true),
                LineOutcome::Bad(problem) => return Err(RowError::Line(*problem)),
            }
        }
    }

    /// Reads whole lines, about `target` bytes of them (at least one line unless the log has
    /// ended), into `block`, LF line ends kept. Returns the line number of the first line in
    /// the block, or None at the end of the log. Lines are numbered exactly as
    /// [`LogReader::read_row`] numbers them, so a block parsed line by line with
    /// [`LogReader::line_format`] gives the same rows and problems.
    pub(crate) fn read_block(
        &mut self,
        block: &mut Vec<u8>,
        target: usize,
    ) -> std::result::Result<Option<usize>, Error> {
        block.clear();
        let first = self.line + 1;
        while !self.finished && block.len() < target {
            let available = match self.reader.fill_buf() {
                Ok(bytes) => bytes,
                Err(e) if e.kind() == std::io::ErrorKind::Interrupted => continue,
                Err(e) => {
                    self.finished = true;
                    return Err(Error::io(Path::new(&self.file), e));
                }
            };
            if available.is_empty() {
                self.finished = true;
                break;
            }
            match available.iter().rposition(|&b| b == b'\n') {
                Some(end) => {
                    block.extend_from_slice(&available[..=end]);
                    self.reader.consume(end + 1);
                }
                None => {
                    // A line longer than the buffer, or the last line without its LF.
                    if let Err(e) = self.reader.read_until(b'\n', block) {
                        self.finished = true;
                        return Err(Error::io(Path::new(&self.file), e));
                    }
                }
            }
        }
        if block.is_empty() {
            return Ok(None);
        }
        let lines = block.iter().filter(|&&b| b == b'\n').count()
            + usize::from(block.last() != Some(&b'\n'));
        self.line += lines;
        Ok(Some(first))
    }

    /// The parser of this log's data lines, for parsing blocks on other threads.
    pub(crate) fn line_format(&self) -> Arc<LineFormat> {
        Arc::clone(&self.format)
    }

    fn fail(&mut self, e: std::io::Error) -> RowError {
        self.finished = true;
        RowError::Io(Error::io(Path::new(&self.file), e))
    }
}

pub(crate) enum LineOutcome {
    Skipped,
    Row,
    Bad(Box<Problem>),
}

impl LineFormat {
    /// Parses one line (without its LF) into `row`.
    #[inline]
    pub(crate) fn parse_line(
        &self,
        line: &[u8],
        line_no: usize,
        file: &str,
        row: &mut LogRow,
    ) -> LineOutcome {
        let line = trim_line_end(line);
        if is_skipped(line) {
            return LineOutcome::Skipped;
        }
        if !self.parse_plain_line(line, row) {
            if let Err(problem) = self.parse_fields(line, line_no, file, row) {
                return LineOutcome::Bad(problem);
            }
        }
        if !self.has_index {
            row.index = None;
        }
        row.line = line_no;
        row.present = self.present;
        LineOutcome::Row
    }

    /// The hot path: a line of plain digits only (no prefix, `_`, unknown digit or literal),
    /// each value fitting in 64 bits and in its column, with well-formed separators, read in
    /// one pass. Returns false as soon as anything else turns up; the caller then parses the
    /// whole line again with [`LineFormat::parse_fields`], which accepts the same lines with
    /// the same values (a property test holds the two together) and words every problem.
    #[inline]
    fn parse_plain_line(&self, line: &[u8], row: &mut LogRow) -> bool {
        let n = line.len();
        let mut p = skip_blanks(line, 0);
        let last = self.plain.len().wrapping_sub(1);
        for (i, column) in self.plain.iter().enumerate() {
            let start = p;
            let mut v: u64 = 0;
            let max_digits = match column.radix {
                Radix::Hex => {
                    // Wide columns take up to 8 digits at once; the byte loop does the rest
                    // (and stops at once when the field ended within those 8 bytes).
                    if column.wide && p + 8 <= n {
                        let mut chunk = [0u8; 8];
                        chunk.copy_from_slice(&line[p..p + 8]);
                        let (value, digits) = hex8(chunk);
                        v = value;
                        p += digits;
                    }
                    while let Some(&c) = line.get(p) {
                        let d = HEX_VALUE[c as usize];
                        if d > 15 {
                            break;
                        }
                        v = v << 4 | d as u64;
                        p += 1;
                    }
                    16
                }
                Radix::Bin => {
                    while let Some(&c) = line.get(p) {
                        let d = c.wrapping_sub(b'0');
                        if d > 1 {
                            break;
                        }
                        v = v << 1 | d as u64;
                        p += 1;
                    }
                    64
                }
                Radix::Dec => {
                    while let Some(&c) = line.get(p) {
                        let d = c.wrapping_sub(b'0');
                        if d > 9 {
                            break;
                        }
                        v = v.wrapping_mul(10).wrapping_add(d as u64);
                        p += 1;
                    }
                    19
                }
            };
            if p == start || p - start > max_digits || v > column.max {
                return false;
            }
            let end = p;
            p = skip_blanks(line, p);
            if i == last {
                if p != n {
                    return false;
                }
            } else if self.comma {
                if line.get(p) != Some(&b',') {
                    return false;
                }
                p = skip_blanks(line, p + 1);
            } else if p == end || p == n {
                return false;
            }
            match column.slot {
                Some(slot) => row.values[slot] = FieldValue::known(Word::from_u64(v)),
                None => row.index = Some(v),
            }
        }
        true
    }

    /// The general path: every value form, and a problem naming the field when the line is
    /// bad. Fills `row`'s columns but not its line number or presence mask.
    fn parse_fields(
        &self,
        line: &[u8],
        line_no: usize,
        file: &str,
        row: &mut LogRow,
    ) -> std::result::Result<(), Box<Problem>> {
        let mut fields = Fields::new(line, self.comma);
        for (i, column) in self.columns.iter().enumerate() {
            let Some(token) = fields.next() else {
                return Err(self.count_problem(line, i, file, line_no));
            };
            let result = match column.target {
                Target::Index => parse_index(token).map(|v| row.index = Some(v)),
                Target::Value { slot, width } => {
                    parse_value(token, self.radix, width, &mut row.values[slot])
                }
            };
            if let Err(e) = result {
                // A misaligned line shows up as a bad value first; report the real cause.
                let found = i + 1 + fields.count();
                if found != self.columns.len() {
                    return Err(self.count_problem(line, found, file, line_no));
                }
                let message = e.message(token, column);
                return Err(Box::new(
                    Problem::new(file, message)
                        .at_line(line_no)
                        .field(column.name.as_str()),
                ));
            }
        }
        if fields.next().is_some() {
            let found = self.columns.len() + 1 + fields.count();
            return Err(self.count_problem(line, found, file, line_no));
        }
        Ok(())
    }

    fn count_problem(&self, line: &[u8], found: usize, file: &str, line_no: usize) -> Box<Problem> {
        let found = if found < self.columns.len() {
            // Count every field, not just those seen before giving up.
            Fields::new(line, self.comma).count()
        } else {
            found
        };
        let mut message = format!("expected {} fields, found {found}", self.columns.len());
        if !self.comma && line.contains(&b',') {
            message.push_str(" (the header has no comma, so fields are separated by blanks)");
        } else if self.comma && found == 1 {
            message.push_str(" (the header is comma-separated, so every line must be)");
        }
        Box::new(Problem::new(file, message).at_line(line_no))
    }
}

/// Checks the header row and works out the columns.
fn parse_header(
    header: &[u8],
    file: &str,
    line: usize,
    spec: &Spec,
    radix: Radix,
) -> Result<LineFormat> {
    let comma = header.contains(&b',');
    let mut problems = Vec::new();
    let mut columns: Vec<Column> = Vec::new();
    let mut present = 0u16;
    let mut has_index = false;
    let port_list = || {
        Signal::ALL
            .iter()
            .filter_map(|&s| spec.ports.get(s))
            .collect::<Vec<_>>()
            .join(", ")
    };
    for (i, token) in Fields::new(header, comma).enumerate() {
        let name = String::from_utf8_lossy(token).into_owned();
        if name.is_empty() {
            problems.push(
                Problem::new(file, format!("column {} of the header has no name", i + 1))
                    .at_line(line)
                    .field(format!("column {}", i + 1)),
            );
            continue;
        }
        if columns.iter().any(|c| c.name == name) {
            problems.push(
                Problem::new(
                    file,
                    format!("column \"{name}\" appears twice in the header"),
                )
                .at_line(line)
                .field(name.as_str()),
            );
            continue;
        }
        let target = if name == "index" {
            has_index = true;
            Target::Index
        } else if let Some(signal) = Signal::ALL
            .into_iter()
            .find(|&s| spec.ports.get(s) == Some(name.as_str()))
        {
            present |= 1 << slot(signal);
            Target::Value {
                slot: slot(signal),
                width: signal.width(spec.width),
            }
        } else if i == 0 && name.bytes().all(|b| b.is_ascii_digit()) {
            // A data line where the header should be: one problem says it all.
            let message = format!(
                "this line looks like data: the first line that is not a comment must be a \
                 header row naming the columns ({}, optionally index)",
                port_list()
            );
            return Err(Error::problem(
                Problem::new(file, message)
                    .at_line(line)
                    .field(name.as_str()),
            ));
        } else {
            let mut message = format!(
                "unknown column \"{name}\": the spec's ports are {} (plus an optional index \
                 column)",
                port_list()
            );
            if let Some(near) = Signal::ALL
                .iter()
                .filter_map(|&s| spec.ports.get(s))
                .find(|p| p.eq_ignore_ascii_case(&name))
            {
                message.push_str(&format!(
                    "; column names are case-sensitive: did you mean \"{near}\"?"
                ));
            }
            problems.push(
                Problem::new(file, message)
                    .at_line(line)
                    .field(name.as_str()),
            );
            continue;
        };
        columns.push(Column { name, target });
    }
    let outputs = spec.outputs();
    if !outputs.iter().any(|&(s, _)| present >> slot(s) & 1 == 1) {
        let names: Vec<&str> = outputs.iter().map(|&(_, n)| n).collect();
        problems.push(
            Problem::new(
                file,
                format!(
                    "the header names none of the spec's outputs ({}), so nothing could be checked",
                    names.join(", ")
                ),
            )
            .at_line(line)
            .field("header"),
        );
    }
    if !problems.is_empty() {
        return Err(Error::input(problems));
    }
    let plain = columns
        .iter()
        .map(|c| match c.target {
            Target::Index => PlainColumn {
                slot: None,
                radix: Radix::Dec,
                max: u64::MAX,
                wide: false,
            },
            Target::Value { slot, width } => PlainColumn {
                slot: Some(slot),
                radix,
                max: if width >= 64 {
                    u64::MAX
                } else {
                    (1 << width) - 1
                },
                wide: width >= 16,
            },
        })
        .collect();
    Ok(LineFormat {
        comma,
        radix,
        columns,
        plain,
        present,
        has_index,
    })
}

/// The slot of `signal` in a [`LogRow`]: its position in [`Signal::ALL`], which is also its
/// declaration order (a unit test holds the two together).
fn slot(signal: Signal) -> usize {
    signal as usize
}

fn is_blank(b: u8) -> bool {
    b == b' ' || b == b'\t'
}

/// The first position at or after `p` that is not a blank.
#[inline]
fn skip_blanks(line: &[u8], mut p: usize) -> usize {
    while line.get(p).is_some_and(|&b| is_blank(b)) {
        p += 1;
    }
    p
}

/// The line without a trailing CR (and LF, for lines read whole).
fn trim_line_end(line: &[u8]) -> &[u8] {
    let line = line.strip_suffix(b"\n").unwrap_or(line);
    line.strip_suffix(b"\r").unwrap_or(line)
}

/// True for blank lines and `#` or `//` comment lines.
fn is_skipped(line: &[u8]) -> bool {
    match line.iter().position(|&b| !is_blank(b)) {
        None => true,
        Some(i) => line[i] == b'#' || line[i..].starts_with(b"//"),
    }
}

/// The position of the first LF, eight bytes at a time.
pub(crate) fn find_newline(bytes: &[u8]) -> Option<usize> {
    const ONES: u64 = 0x0101_0101_0101_0101;
    const HIGHS: u64 = 0x8080_8080_8080_8080;
    const LFS: u64 = ONES * b'\n' as u64;
    let mut chunks = bytes.chunks_exact(8);
    let mut offset = 0;
    for chunk in &mut chunks {
        let mut word = [0u8; 8];
        word.copy_from_slice(chunk);
        let x = u64::from_le_bytes(word) ^ LFS;
        // The classic "has a zero byte" test: exact for the lowest flagged byte, which is all
        // that is needed here (false flags only appear above a true zero).
        let zero = x.wrapping_sub(ONES) & !x & HIGHS;
        if zero != 0 {
            return Some(offset + (zero.trailing_zeros() / 8) as usize);
        }
        offset += 8;
    }
    chunks
        .remainder()
        .iter()
        .position(|&b| b == b'\n')
        .map(|p| offset + p)
}

/// Splits a line into fields: at commas (trimming blanks around each field) or at runs of
/// blanks.
struct Fields<'a> {
    rest: &'a [u8],
    comma: bool,
    done: bool,
}

impl<'a> Fields<'a> {
    fn new(line: &'a [u8], comma: bool) -> Fields<'a> {
        Fields {
            rest: line,
            comma,
            done: false,
        }
    }
}

impl<'a> Iterator for Fields<'a> {
    type Item = &'a [u8];

    #[inline]
    fn next(&mut self) -> Option<&'a [u8]> {
        if self.done {
            return None;
        }
        let rest = self.rest;
        if self.comma {
            let (field, after) = match rest.iter().position(|&b| b == b',') {
                Some(i) => (&rest[..i], &rest[i + 1..]),
                None => {
                    self.done = true;
                    (rest, &rest[rest.len()..])
                }
            };
            self.rest = after;
            let start = field
                .iter()
                .position(|&b| !is_blank(b))
                .unwrap_or(field.len());
            let end = field
                .iter()
                .rposition(|&b| !is_blank(b))
                .map_or(start, |i| i + 1);
            Some(&field[start..end])
        } else {
            let Some(start) = rest.iter().position(|&b| !is_blank(b)) else {
                self.done = true;
                return None;
            };
            let end = rest[start..]
                .iter()
                .position(|&b| is_blank(b))
                .map_or(rest.len(), |i| start + i);
            self.rest = &rest[end..];
            Some(&rest[start..end])
        }
    }
}

/// What is wrong with one value; the caller adds the column and the token.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum ValueError {
    Empty,
    NoDigits,
    BadDigit(u8, Base),
    UnknownDecimalDigit(u8),
    TooWide,
    OverSize(u32),
    BadSize,
    BadBase(Option<u8>),
    BelowRange,
    BadIndex,
    IndexTooLarge,
}

impl ValueError {
    fn message(self, token: &[u8], column: &Column) -> String {
        let col = &column.name;
        let tok = String::from_utf8_lossy(token);
        let width = match column.target {
            Target::Value { width, .. } => width,
            Target::Index => 64,
        };
        match self {
            ValueError::Empty => format!("empty value in column {col}"),
            ValueError::NoDigits => format!("value {tok} in column {col} has no digits"),
            ValueError::BadDigit(c, base) => {
                format!("bad {} digit {} in column {col}", base.name(), show_byte(c))
            }
            ValueError::UnknownDecimalDigit(c) => format!(
                "bad decimal digit {} in column {col} (a decimal value can be unknown only as a \
                 whole: x or z)",
                show_byte(c)
            ),
            ValueError::TooWide => format!("value {tok} does not fit in {width}-bit column {col}"),
            ValueError::OverSize(size) => {
                format!("value {tok} does not fit in its own {size}-bit size (column {col})")
            }
            ValueError::BadSize => format!(
                "bad size in value {tok} in column {col}: expected a decimal bit count before '"
            ),
            ValueError::BadBase(c) => format!(
                "bad base {} in value {tok} in column {col}: expected h, b, o or d after '",
                c.map_or("(none)".to_string(), show_byte)
            ),
            ValueError::BelowRange => format!(
                "value {tok} is below the {width}-bit two's-complement range (column {col})"
            ),
            ValueError::BadIndex => {
                format!("bad index \"{tok}\" in column {col}: expected an unsigned decimal number")
            }
            ValueError::IndexTooLarge => {
                format!("index {tok} in column {col} is larger than {}", u64::MAX)
            }
        }
    }
}

/// A byte for a message: quoted when printable, as an escape otherwise.
fn show_byte(c: u8) -> String {
    if c.is_ascii_graphic() {
        format!("'{}'", c as char)
    } else {
        format!("'\\x{c:02x}'")
    }
}

/// The digit base of a value: the log's radix, or the base of a Verilog-style literal.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Base {
    Bin,
    Oct,
    Hex,
    Dec,
}

impl Base {
    fn name(self) -> &'static str {
        match self {
            Base::Bin => "binary",
            Base::Oct => "octal",
            Base::Hex => "hex",
            Base::Dec => "decimal",
        }
    }

    fn bits_per_digit(self) -> u32 {
        match self {
            Base::Bin => 1,
            Base::Oct => 3,
            Base::Hex | Base::Dec => 4,
        }
    }
}

/// One character of a value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Digit {
    Value(u8),
    Unknown { high_z: bool },
    Separator,
    Bad,
}

/// Classifies `c` as a digit of `base`; `std_logic` admits VHDL's `U W L H -` in binary.
fn classify(c: u8, base: Base, std_logic: bool) -> Digit {
    match c {
        b'_' => Digit::Separator,
        b'x' | b'X' => Digit::Unknown { high_z: false },
        b'z' | b'Z' => Digit::Unknown { high_z: true },
        b'?' if base != Base::Dec => Digit::Unknown { high_z: true },
        b'U' | b'W' | b'-' if std_logic && base == Base::Bin => Digit::Unknown { high_z: false },
        b'L' if std_logic && base == Base::Bin => Digit::Value(0),
        b'H' if std_logic && base == Base::Bin => Digit::Value(1),
        _ => {
            let v = HEX_VALUE[c as usize];
            let limit = match base {
                Base::Bin => 2,
                Base::Oct => 8,
                Base::Dec => 10,
                Base::Hex => 16,
            };
            if v < limit {
                Digit::Value(v)
            } else {
                Digit::Bad
            }
        }
    }
}

/// Reads the leading hex digits of `chunk` (up to all 8) in a few word operations; returns
/// their value and count. Equivalent to the byte loop over [`HEX_VALUE`] (a property test
/// compares the two).
#[inline]
fn hex8(chunk: [u8; 8]) -> (u64, usize) {
    const ONES: u64 = 0x0101_0101_0101_0101;
    const HIGHS: u64 = 0x8080_8080_8080_8080;
    const LOW7: u64 = 0x7f7f_7f7f_7f7f_7f7f;
    let x = u64::from_le_bytes(chunk);
    // Per byte, with bit 7 cleared first so no lane carries into the next: bit 7 of
    // `low7 + (0x80 - k)` is set exactly when the byte is >= k.
    let at_least = |low7: u64, k: u64| (low7 + ONES * (0x80 - k)) & HIGHS;
    let low7 = x & LOW7;
    let digit = at_least(low7, b'0' as u64) & !at_least(low7, b'9' as u64 + 1);
    // Setting bit 5 folds 'A'..='F' onto 'a'..='f' and leaves no other byte in that range.
    let folded = (x | (ONES * 0x20)) & LOW7;
    let letter = at_least(folded, b'a' as u64) & !at_least(folded, b'f' as u64 + 1);
    let valid = (digit | letter) & !x & HIGHS;
    let count = ((!valid & HIGHS).trailing_zeros() / 8) as usize;
    if count == 0 {
        return (0, 0);
    }
    // Digit values: the low nibble, plus 9 for letters (bit 6 set).
    let nibbles = (x & (ONES * 0x0f)) + ((x >> 6) & ONES) * 9;
    // Keep the `count` digits, last digit in the lowest byte, then pack pairs, quads, octets.
    let mut y = (nibbles << (8 * (8 - count))).swap_bytes();
    y = (y | y >> 4) & 0x00ff_00ff_00ff_00ff;
    y = (y | y >> 8) & 0x0000_ffff_0000_ffff;
    y = (y | y >> 16) & 0x0000_0000_ffff_ffff;
    (y, count)
}

/// Hex digit values by byte; 0xff for anything else.
const HEX_VALUE: [u8; 256] = {
    let mut table = [0xffu8; 256];
    let mut i = 0;
    while i < 10 {
        table[b'0' as usize + i] = i as u8;
        i += 1;
    }
    let mut i = 0;
    while i < 6 {
        table[b'a' as usize + i] = 10 + i as u8;
        table[b'A' as usize + i] = 10 + i as u8;
        i += 1;
    }
    table
};

/// Parses the `index` column: unsigned decimal, no sign, no separators.
fn parse_index(token: &[u8]) -> std::result::Result<u64, ValueError> {
    if token.is_empty() {
        return Err(ValueError::Empty);
    }
    let mut v: u64 = 0;
    let mut overflow = false;
    for &c in token {
        let d = c.wrapping_sub(b'0');
        if d > 9 {
            return Err(ValueError::BadIndex);
        }
        match v.checked_mul(10).and_then(|v| v.checked_add(d as u64)) {
            Some(n) => v = n,
            None => overflow = true,
        }
    }
    if overflow {
        return Err(ValueError::IndexTooLarge);
    }
    Ok(v)
}

/// Strips a `0x`/`0X` prefix unless the token is exactly as long as `%h` prints a value of
/// `width` bits (then the `x` is an unknown digit; see the module documentation).
fn strip_hex_prefix(token: &[u8], width: u32) -> &[u8] {
    if token.len() >= 2
        && token[0] == b'0'
        && (token[1] | 0x20) == b'x'
        && token.len() != hex_digits(width) as usize
    {
        &token[2..]
    } else {
        token
    }
}

fn strip_bin_prefix(token: &[u8]) -> &[u8] {
    if token.len() >= 2 && token[0] == b'0' && (token[1] | 0x20) == b'b' {
        &token[2..]
    } else {
        token
    }
}

/// Parses one port value of `width` bits into `out`.
#[inline]
fn parse_value(
    token: &[u8],
    radix: Radix,
    width: u32,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    if let Some(v) = parse_plain_u64(token, radix, width) {
        if width < 64 && v >> width != 0 {
            return Err(ValueError::TooWide);
        }
        *out = FieldValue::known(Word::from_u64(v));
        return Ok(());
    }
    parse_general(token, radix, width, out)
}

/// The hot path: a token of plain digits that fits in 64 bits, in one tight loop. Returns None
/// for anything else (unknown digits, separators, literals, long tokens, errors), which the
/// general path then handles with the same rules.
#[inline]
fn parse_plain_u64(token: &[u8], radix: Radix, width: u32) -> Option<u64> {
    let mut v: u64 = 0;
    match radix {
        Radix::Hex => {
            let digits = strip_hex_prefix(token, width);
            if digits.is_empty() || digits.len() > 16 {
                return None;
            }
            for &c in digits {
                let d = HEX_VALUE[c as usize];
                if d > 15 {
                    return None;
                }
                v = v << 4 | d as u64;
            }
        }
        Radix::Bin => {
            let digits = strip_bin_prefix(token);
            if digits.is_empty() || digits.len() > 64 {
                return None;
            }
            for &c in digits {
                let d = c.wrapping_sub(b'0');
                if d > 1 {
                    return None;
                }
                v = v << 1 | d as u64;
            }
        }
        Radix::Dec => {
            if token.is_empty() || token.len() > 19 {
                return None;
            }
            for &c in token {
                let d = c.wrapping_sub(b'0');
                if d > 9 {
                    return None;
                }
                v = v * 10 + d as u64;
            }
        }
    }
    Some(v)
}

/// Every value form, at any width.
fn parse_general(
    token: &[u8],
    radix: Radix,
    width: u32,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    if token.is_empty() {
        return Err(ValueError::Empty);
    }
    if let Some(quote) = token.iter().position(|&c| c == b'\'') {
        return parse_literal(&token[..quote], &token[quote + 1..], width, out);
    }
    // GHDL prints one-bit ports with `write`: U W - L H are std_logic values in every radix.
    if let [c @ (b'U' | b'W' | b'-' | b'L' | b'H')] = token {
        return parse_digits(&[*c], Base::Bin, true, width, None, out);
    }
    match radix {
        Radix::Hex => parse_digits(
            strip_hex_prefix(token, width),
            Base::Hex,
            false,
            width,
            None,
            out,
        ),
        Radix::Bin => parse_digits(strip_bin_prefix(token), Base::Bin, true, width, None, out),
        Radix::Dec => match token.strip_prefix(b"-") {
            Some(magnitude) => parse_negative_decimal(magnitude, width, out),
            None => parse_digits(token, Base::Dec, false, width, None, out),
        },
    }
}

/// Parses the part after the `'` of a Verilog-style literal `[size]'[s]<base><digits>`.
fn parse_literal(
    size: &[u8],
    rest: &[u8],
    width: u32,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    let size = if size.is_empty() {
        None
    } else {
        match parse_index(size) {
            Ok(n @ 1..=0xffff_ffff) => Some(n as u32),
            _ => return Err(ValueError::BadSize),
        }
    };
    let rest = match rest.first() {
        Some(b's' | b'S') => &rest[1..],
        _ => rest,
    };
    let base = match rest.first().map(|c| c | 0x20) {
        Some(b'h') => Base::Hex,
        Some(b'b') => Base::Bin,
        Some(b'o') => Base::Oct,
        Some(b'd') => Base::Dec,
        other => return Err(ValueError::BadBase(other.map(|_| rest[0]))),
    };
    parse_digits(&rest[1..], base, false, width, Some(size), out)
}

/// Parses digits of `base`. `literal` is `Some(size)` inside a Verilog-style literal, where an
/// unknown leftmost digit extends up to the size (or the width when unsized); in a plain value
/// only a single unknown character does that, covering the whole field.
fn parse_digits(
    digits: &[u8],
    base: Base,
    std_logic: bool,
    width: u32,
    literal: Option<Option<u32>>,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    let mut bits = [0u64; LIMBS];
    let mut unknown = [0u64; LIMBS];
    let mut high_z = false;
    let mut count = 0usize;
    let mut leftmost_unknown = false;
    let mut pos: u32 = 0;
    if base == Base::Dec {
        for &c in digits {
            match classify(c, base, false) {
                Digit::Separator => continue,
                Digit::Value(d) => {
                    if !mul_add(&mut bits, 10, d as u64) {
                        return Err(ValueError::TooWide);
                    }
                    leftmost_unknown = false;
                }
                Digit::Unknown { high_z: z } => {
                    if count > 0 || digits.iter().filter(|&&c| c != b'_').count() > 1 {
                        return Err(ValueError::UnknownDecimalDigit(c));
                    }
                    high_z = z;
                    leftmost_unknown = true;
                }
                Digit::Bad => return Err(ValueError::BadDigit(c, base)),
            }
            count += 1;
        }
    } else {
        let shift = base.bits_per_digit();
        let digit_mask = (1u64 << shift) - 1;
        for &c in digits.iter().rev() {
            match classify(c, base, std_logic) {
                Digit::Separator => continue,
                Digit::Value(d) => {
                    if !or_at(&mut bits, pos, d as u64) {
                        return Err(ValueError::TooWide);
                    }
                    leftmost_unknown = false;
                }
                Digit::Unknown { high_z: z } => {
                    or_at(&mut unknown, pos, digit_mask);
                    high_z |= z;
                    leftmost_unknown = true;
                }
                Digit::Bad => {
                    // Name the first bad character, not the last.
                    let first = digits
                        .iter()
                        .copied()
                        .find(|&c| classify(c, base, std_logic) == Digit::Bad)
                        .unwrap_or(c);
                    return Err(ValueError::BadDigit(first, base));
                }
            }
            count += 1;
            pos = pos.saturating_add(shift);
        }
    }
    if count == 0 {
        return Err(ValueError::NoDigits);
    }
    // How far an unknown leftmost digit reaches.
    let extend_to = match literal {
        Some(size) => leftmost_unknown.then(|| size.unwrap_or(width)),
        None => (count == 1 && leftmost_unknown).then_some(width),
    };
    let mut unknown = Word::from_limbs(unknown);
    if let Some(top) = extend_to {
        let top = top.min(MAX_WIDTH);
        unknown = unknown.or(&Word::ones(top).and(&Word::ones(pos.min(top)).not(top)));
    }
    let bits = Word::from_limbs(bits);
    if let Some(Some(size)) = literal {
        if size < width && !bits.masked(size).eq(&bits) {
            return Err(ValueError::OverSize(size));
        }
        unknown = unknown.masked(size);
    }
    if !bits.masked(width).eq(&bits) {
        return Err(ValueError::TooWide);
    }
    let unknown = unknown.masked(width);
    *out = FieldValue {
        bits: bits.and(&unknown.not(MAX_WIDTH)),
        unknown,
        high_z: high_z && !unknown.is_zero(),
    };
    Ok(())
}

/// A negative decimal: the two's-complement pattern of `-magnitude` in `width` bits.
fn parse_negative_decimal(
    magnitude: &[u8],
    width: u32,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    let mut m = [0u64; LIMBS];
    let mut count = 0;
    for &c in magnitude {
        match classify(c, Base::Dec, false) {
            Digit::Separator => continue,
            Digit::Value(d) => {
                if !mul_add(&mut m, 10, d as u64) {
                    return Err(ValueError::BelowRange);
                }
            }
            Digit::Unknown { .. } => return Err(ValueError::UnknownDecimalDigit(c)),
            Digit::Bad => return Err(ValueError::BadDigit(c, Base::Dec)),
        }
        count += 1;
    }
    if count == 0 {
        return Err(ValueError::NoDigits);
    }
    if m.iter().all(|&l| l == 0) {
        *out = FieldValue::known(Word::ZERO);
        return Ok(());
    }
    // -m = ~(m - 1); it is in range when m - 1 < 2^(width - 1).
    let mut borrow = true;
    for limb in m.iter_mut() {
        let (v, b) = limb.overflowing_sub(borrow as u64);
        *limb = v;
        borrow = b;
    }
    let below = Word::from_limbs(m);
    if below.significant_bits() > width - 1 {
        return Err(ValueError::BelowRange);
    }
    *out = FieldValue::known(below.not(width));
    Ok(())
}

/// `limbs = limbs * factor + add`; false when the result needs more than 512 bits.
fn mul_add(limbs: &mut [u64; LIMBS], factor: u64, add: u64) -> bool {
    let mut carry = add as u128;
    for limb in limbs.iter_mut() {
        let cur = *limb as u128 * factor as u128 + carry;
        *limb = cur as u64;
        carry = cur >> 64;
    }
    carry == 0
}

/// ORs `value` (at most 4 bits wide) in at bit `pos`; false when a set bit would land at or
/// above 512.
fn or_at(limbs: &mut [u64; LIMBS], pos: u32, value: u64) -> bool {
    if value == 0 {
        return true;
    }
    if pos >= MAX_WIDTH {
        return false;
    }
    let (i, offset) = ((pos / 64) as usize, pos % 64);
    limbs[i] |= value << offset;
    if offset > 60 {
        let spill = value >> (64 - offset);
        if spill != 0 {
            if i + 1 == LIMBS {
                return false;
            }
            limbs[i + 1] |= spill;
        }
    }
    true
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::io::{BufReader, Read};

    /// A 16-bit subtractor with a borrow-in, named like a small DUT of ours.
    const SPEC16: &str = r#"
name = "tank_level_delta"
operation = "sub"
width = 16
encoding = "twos"
[ports]
a = "a"
b = "b"
carry_in = "cin"
result = "y"
carry_out = "co"
"#;

    fn spec16() -> Spec {
        Spec::parse(SPEC16, "unit.toml").unwrap()
    }

    fn spec_of_width(width: u32) -> Spec {
        Spec::parse(
            &SPEC16.replace("width = 16", &format!("width = {width}")),
            "unit.toml",
        )
        .unwrap()
    }

    /// Shows a value digit by digit: in hex, `x` for a digit with every bit unknown and `?` for
    /// one with some; in binary, `x` per unknown bit. A trailing `~z` marks high impedance.
    fn show(v: &FieldValue, width: u32, binary: bool) -> String {
        let mut s = String::new();
        if binary {
            for i in (0..width).rev() {
                s.push(match (v.unknown.bit(i), v.bits.bit(i)) {
                    (true, _) => 'x',
                    (false, true) => '1',
                    (false, false) => '0',
                });
            }
        } else {
            for d in (0..hex_digits(width)).rev() {
                let unknown = v.unknown.extract(d * 4, 4).low_u64();
                let in_field = Word::ones(width).extract(d * 4, 4).low_u64();
                s.push(if unknown == 0 {
                    char::from_digit(v.bits.extract(d * 4, 4).low_u64() as u32, 16).unwrap()
                } else if unknown == in_field {
                    'x'
                } else {
                    '?'
                });
            }
        }
        if v.high_z {
            s.push_str("~z");
        }
        s
    }

    /// Reads every line of `text` and renders each outcome as one string:
    /// `"<line>: index=<i> <port>=<value> .."` or `"<line>: ! <field>: <message>"`.
    fn outcomes(text: &str, spec: &Spec, radix: Radix, binary: bool) -> Vec<String> {
        let mut reader = LogReader::new(text.as_bytes(), "run.log", spec, radix).unwrap();
        let mut row = LogRow::new();
        let mut out = Vec::new();
        loop {
            match reader.read_row(&mut row) {
                Ok(false) => break,
                Ok(true) => {
                    let mut s = format!("{}:", row.line);
                    if let Some(i) = row.index {
                        s.push_str(&format!(" index={i}"));
                    }
                    for &signal in reader.columns() {
                        let v = row.get(signal).unwrap();
                        let name = spec.ports.get(signal).unwrap();
                        s.push_str(&format!(
                            " {name}={}",
                            show(v, signal.width(spec.width), binary)
                        ));
                    }
                    out.push(s);
                }
                Err(RowError::Line(p)) => out.push(format!(
                    "{}: ! {}: {}",
                    p.line.unwrap(),
                    p.field.as_deref().unwrap_or("-"),
                    p.message
                )),
                Err(RowError::Io(e)) => panic!("unexpected I/O error {e}"),
            }
        }
        out
    }

    fn header_problems(text: &str) -> Vec<String> {
        match LogReader::new(text.as_bytes(), "run.log", &spec16(), Radix::Hex) {
            Ok(_) => vec![],
            Err(e) => e.problems().iter().map(|p| p.to_string()).collect(),
        }
    }

    #[test]
    fn signal_slots_follow_the_signal_list() {
        for (i, s) in Signal::ALL.iter().enumerate() {
            assert_eq!(slot(*s), i, "{s:?}");
        }
    }

    // Observed with Icarus Verilog 11.0 (`$fdisplay(fh, "%0d,%h,%h,%b,%h,%b", ...)`, the
    // testbench is in tests/log_iverilog.rs, which also checks this exact text live). IEEE
    // 1364-2005 17.1.1.3: a digit whose bits are all x prints `x`, all z `z`, some x `X`, some z
    // (no x) `Z`. Row 3's a = 0000_0000_0zx0_1111 mixes z and x in one digit and prints `X`;
    // its y = 0x05 with the second digit unknown prints `0x05`, which must not read as a prefix.
    const ICARUS_HEX: &str = "index,a,b,cin,y,co
0,00ab,0001,0,00aa,0
1,xxxx,zzzz,x,12x4,z
2,00Xf,00Zf,1,z0z0,1
3,00Xf,ffff,0,0x05,0
";

    // The same run with `%b` and blanks between fields.
    const ICARUS_BIN: &str = "index a b cin y co
0 0000000010101011 0000000000000001 0 0000000010101010 0
1 xxxxxxxxxxxxxxxx zzzzzzzzzzzzzzzz x 00010010xxxx0100 z
2 000000000x101111 000000000z101111 1 zzzz0000zzzz0000 1
3 000000000zx01111 1111111111111111 0 0000xxxx00000101 0
";

    // The same run with `%0d`: a wholly unknown value prints `x`/`z`, a partly unknown one
    // `X`/`Z` (observed).
    const ICARUS_DEC: &str = "index a b cin y co
0 171 1 0 170 0
1 x z x X z
2 X Z 1 Z 1
3 X 65535 0 X 0
";

    #[test]
    fn reads_icarus_hex_with_x_and_z_digits() {
        assert_eq!(
            outcomes(ICARUS_HEX, &spec16(), Radix::Hex, false),
            [
                "2: index=0 a=00ab b=0001 cin=0 y=00aa co=0",
                "3: index=1 a=xxxx b=xxxx~z cin=x y=12x4 co=x~z",
                "4: index=2 a=00xf b=00xf~z cin=1 y=x0x0~z co=1",
                "5: index=3 a=00xf b=ffff cin=0 y=0x05 co=0",
            ]
        );
    }

    #[test]
    fn reads_icarus_binary_bit_by_bit() {
        assert_eq!(
            outcomes(ICARUS_BIN, &spec16(), Radix::Bin, true),
            [
                "2: index=0 a=0000000010101011 b=0000000000000001 cin=0 y=0000000010101010 co=0",
                "3: index=1 a=xxxxxxxxxxxxxxxx b=xxxxxxxxxxxxxxxx~z cin=x y=00010010xxxx0100 co=x~z",
                "4: index=2 a=000000000x101111 b=000000000x101111~z cin=1 y=xxxx0000xxxx0000~z co=1",
                "5: index=3 a=000000000xx01111~z b=1111111111111111 cin=0 y=0000xxxx00000101 co=0",
            ]
        );
    }

    #[test]
    fn reads_icarus_decimal_with_whole_field_unknowns() {
        assert_eq!(
            outcomes(ICARUS_DEC, &spec16(), Radix::Dec, false),
            [
                "2: index=0 a=00ab b=0001 cin=0 y=00aa co=0",
                "3: index=1 a=xxxx b=xxxx~z cin=x y=xxxx co=x~z",
                "4: index=2 a=xxxx b=xxxx~z cin=1 y=xxxx~z co=1",
                "5: index=3 a=xxxx b=ffff cin=0 y=xxxx co=0",
            ]
        );
    }

    // Observed with GHDL 2.0.0 (VHDL-2008 `hwrite` for the vectors, `write` for the one-bit
    // std_logic ports, no index column; the testbench is in tests/log_iverilog.rs). A nibble
    // holding any of U X W - prints `X`, an all-Z nibble `Z`; L and H read as 0 and 1 and
    // print as values in hex (`LHLH` -> 5).
    const GHDL_HEX: &str = "a b cin y co
00AB 0001 0 00AA L
XXXX ZZZZ U 12X4 Z
00XF 0Z5F H Z0X0 -
00XF FFFF W 0X05 X
";

    // The same run with `write` for every port: one std_logic character per bit.
    const GHDL_BIN: &str = "a b cin y co
0000000010101011 0000000000000001 0 0000000010101010 L
UUUUUUUUUUUUUUUU ZZZZZZZZZZZZZZZZ U 0001001000XX0100 Z
000000000W101111 0000ZZZZLHLH1111 H ZZZZ0000----0000 -
00000000ZZZ-HHHH 1111111111111111 W 0000XXXX00000101 X
";

    #[test]
    fn reads_ghdl_uppercase_hex_and_std_logic_bits() {
        assert_eq!(
            outcomes(GHDL_HEX, &spec16(), Radix::Hex, false),
            [
                "2: a=00ab b=0001 cin=0 y=00aa co=0",
                "3: a=xxxx b=xxxx~z cin=x y=12x4 co=x~z",
                "4: a=00xf b=0x5f~z cin=1 y=x0x0~z co=x",
                "5: a=00xf b=ffff cin=x y=0x05 co=x",
            ]
        );
        assert_eq!(
            outcomes(GHDL_BIN, &spec16(), Radix::Bin, true),
            [
                "2: a=0000000010101011 b=0000000000000001 cin=0 y=0000000010101010 co=0",
                "3: a=xxxxxxxxxxxxxxxx b=xxxxxxxxxxxxxxxx~z cin=x y=0001001000xx0100 co=x~z",
                "4: a=000000000x101111 b=0000xxxx01011111~z cin=1 y=xxxx0000xxxx0000~z co=x",
                "5: a=00000000xxxx1111~z b=1111111111111111 cin=x y=0000xxxx00000101 co=x",
            ]
        );
    }

    /// Data-driven cases: a log, its radix, and every line's outcome.
    struct Case {
        name: &'static str,
        radix: Radix,
        text: &'static str,
        expect: &'static [&'static str],
    }

    const CASES: &[Case] = &[
        Case {
            name: "comments, blank lines and CRLF everywhere",
            radix: Radix::Hex,
            text: "// produced by tb_tank\r\n\r\n   # another comment\r\nindex, a, b, cin, y, co\r\n\
                   \r\n0 , 0001 , 0002 , 1 , fffe , 1\r\n  // mid-file comment\r\n\t\r\n1,0,0,0,0,0\r\n",
            expect: &[
                "6: index=0 a=0001 b=0002 cin=1 y=fffe co=1",
                "9: index=1 a=0000 b=0000 cin=0 y=0000 co=0",
            ],
        },
        Case {
            name: "blank-separated with tabs and runs of spaces, no final newline",
            radix: Radix::Hex,
            text: "index\ta  b\t\tcin y co\n  7\t00ff   0001 0\t00fe 0  \n8 1 2 1 3 0",
            expect: &[
                "2: index=7 a=00ff b=0001 cin=0 y=00fe co=0",
                "3: index=8 a=0001 b=0002 cin=1 y=0003 co=0",
            ],
        },
        Case {
            name: "underscores and prefixes",
            radix: Radix::Hex,
            text: "a,b,cin,y,co\n0x00_ab,0X0FF,0x1,ab_cd,0x0\n16'h00ab,'hff,1'b1,16'b1010_1010,'d1\n\
                   8'hx,4'bz1,1'b0,16'o177777,1'bx\n",
            expect: &[
                "2: a=00ab b=00ff cin=1 y=abcd co=0",
                "3: a=00ab b=00ff cin=1 y=00aa co=1",
                "4: a=00xx b=000?~z cin=0 y=ffff co=x",
            ],
        },
        Case {
            name: "binary prefix and decimal forms",
            radix: Radix::Bin,
            text: "a b cin y co\n0b1111_0000 0B1 0 'hbeef 'd1\n",
            expect: &["2: a=0000000011110000 b=0000000000000001 cin=0 y=1011111011101111 co=1"],
        },
        Case {
            name: "decimal, negative two's complement and separators",
            radix: Radix::Dec,
            text: "a b cin y co\n65_535 -1 0 -32768 1\n0 -0 0 32767 0\n",
            expect: &[
                "2: a=ffff b=ffff cin=0 y=8000 co=1",
                "3: a=0000 b=0000 cin=0 y=7fff co=0",
            ],
        },
        Case {
            name: "columns in another order, inputs missing",
            radix: Radix::Hex,
            text: "co y index\n1 8000 41\n0 0001 42\n",
            expect: &["2: index=41 co=1 y=8000", "3: index=42 co=0 y=0001"],
        },
        Case {
            name: "bad lines are reported and reading goes on",
            radix: Radix::Hex,
            text: "index,a,b,cin,y,co\n0,1,2,0,3\n1,1,2,0,3,0,9\n2,1,2,0,3g,0\n3,1,2,0,1ffff,0\n\
                   4,1,2,2,3,0\n+5,1,2,0,3,0\n6,1,,0,3,0\n7,1,2,0,0x,0\n8 1 2 0 3 0\n\
                   18446744073709551616,1,2,0,3,0\n9,1,2,0,3,0\n",
            expect: &[
                "2: ! -: expected 6 fields, found 5",
                "3: ! -: expected 6 fields, found 7",
                "4: ! y: bad hex digit 'g' in column y",
                "5: ! y: value 1ffff does not fit in 16-bit column y",
                "6: ! cin: value 2 does not fit in 1-bit column cin",
                "7: ! index: bad index \"+5\" in column index: expected an unsigned decimal number",
                "8: ! b: empty value in column b",
                "9: ! y: value 0x in column y has no digits",
                "10: ! -: expected 6 fields, found 1 (the header is comma-separated, so every line must be)",
                "11: ! index: index 18446744073709551616 in column index is larger than 18446744073709551615",
                "12: index=9 a=0001 b=0002 cin=0 y=0003 co=0",
            ],
        },
        Case {
            name: "a bad value in a misaligned line reports the field count",
            radix: Radix::Hex,
            text: "a b cin y co\n1 2 q 0 3 0\n1,2,0,3,0\n",
            expect: &[
                "2: ! -: expected 5 fields, found 6",
                "3: ! -: expected 5 fields, found 1 (the header has no comma, so fields are separated by blanks)",
            ],
        },
        Case {
            name: "decimal errors",
            radix: Radix::Dec,
            text: "a b cin y co\n1x 0 0 0 0\n0 -32769 0 0 0\n0 0 0 65536 0\n0 0 0 0 a\n",
            expect: &[
                "2: ! a: bad decimal digit 'x' in column a (a decimal value can be unknown only as a whole: x or z)",
                "3: ! b: value -32769 is below the 16-bit two's-complement range (column b)",
                "4: ! y: value 65536 does not fit in 16-bit column y",
                "5: ! co: bad decimal digit 'a' in column co",
            ],
        },
        Case {
            name: "literal errors",
            radix: Radix::Hex,
            text: "a b cin y co\n4'hff 0 0 0 0\nq'h1 0 0 0 0\n0 'q1 0 0 0\n0 0 0 ' 0\n0 0 0 8'b1021 0\n",
            expect: &[
                "2: ! a: value 4'hff does not fit in its own 4-bit size (column a)",
                "3: ! a: bad size in value q'h1 in column a: expected a decimal bit count before '",
                "4: ! b: bad base 'q' in value 'q1 in column b: expected h, b, o or d after '",
                "5: ! y: bad base (none) in value ' in column y: expected h, b, o or d after '",
                "6: ! y: bad binary digit '2' in column y",
            ],
        },
        Case {
            name: "std_logic letters are binary digits only in the binary radix",
            radix: Radix::Hex,
            text: "a b cin y co\n00H0 0 0 0 0\n",
            expect: &["2: ! a: bad hex digit 'H' in column a"],
        },
    ];

    #[test]
    fn data_driven_cases() {
        let spec = spec16();
        for case in CASES {
            let binary = case.radix == Radix::Bin;
            assert_eq!(
                outcomes(case.text, &spec, case.radix, binary),
                case.expect,
                "case: {}",
                case.name
            );
        }
    }

    #[test]
    fn prefix_ambiguity_follows_the_printed_width() {
        // For 16 bits `%h` prints 4 characters, so a 4-character "0x.." is digits.
        let mut v = FieldValue::default();
        parse_value(b"0x05", Radix::Hex, 16, &mut v).unwrap();
        assert_eq!(show(&v, 16, false), "0x05");
        parse_value(b"0x5", Radix::Hex, 16, &mut v).unwrap();
        assert_eq!(v, FieldValue::known(Word::from_u64(5)));
        parse_value(b"0x0005", Radix::Hex, 16, &mut v).unwrap();
        assert_eq!(v, FieldValue::known(Word::from_u64(5)));
        // For 8 bits `%h` prints 2 characters: "0x" is a known 0 and an unknown digit.
        parse_value(b"0x", Radix::Hex, 8, &mut v).unwrap();
        assert_eq!(show(&v, 8, false), "0x");
    }

    #[test]
    fn unknown_digits_above_the_width_are_dropped() {
        // A 13-bit value prints as 4 hex digits; the top digit carries one bit.
        let mut v = FieldValue::default();
        parse_value(b"xfff", Radix::Hex, 13, &mut v).unwrap();
        assert_eq!(v.unknown, Word::bit_mask(12));
        assert_eq!(v.bits, Word::from_u64(0xfff));
        parse_value(b"1fff", Radix::Hex, 13, &mut v).unwrap();
        assert_eq!(v.bits, Word::from_u64(0x1fff));
        assert_eq!(
            parse_value(b"2fff", Radix::Hex, 13, &mut v),
            Err(ValueError::TooWide)
        );
    }

    #[test]
    fn wide_fields_use_the_general_path() {
        let spec = spec_of_width(200);
        let text = format!(
            "a,b,cin,y,co\n{},{},0,{},1\n",
            "f".repeat(50),
            format_args!("1{}", "0".repeat(49)),
            format_args!("{}x{}", "0".repeat(10), "1".repeat(39)),
        );
        let mut reader = LogReader::new(text.as_bytes(), "wide.log", &spec, Radix::Hex).unwrap();
        let mut row = LogRow::new();
        assert!(reader.read_row(&mut row).unwrap());
        assert_eq!(row.get(Signal::A).unwrap().bits, Word::ones(200));
        assert_eq!(row.get(Signal::B).unwrap().bits, Word::bit_mask(196));
        let y = row.get(Signal::Result).unwrap();
        // The x is digit 39 from the right: bits 156..=159.
        assert_eq!(y.unknown, Word::ones(160).and(&Word::ones(156).not(160)));
        let mut ones_digits = Word::ZERO;
        for d in 0..39 {
            ones_digits.set_bit(4 * d, true);
        }
        assert_eq!(y.bits, ones_digits);
        assert!(!reader.read_row(&mut row).unwrap());
    }

    #[test]
    fn header_problems_are_all_reported() {
        assert_eq!(
            header_problems("index,a,Y,a,carry\n"),
            [
                "run.log:1: Y: unknown column \"Y\": the spec's ports are a, b, cin, y, co (plus an \
                 optional index column); column names are case-sensitive: did you mean \"y\"?",
                "run.log:1: a: column \"a\" appears twice in the header",
                "run.log:1: carry: unknown column \"carry\": the spec's ports are a, b, cin, y, co \
                 (plus an optional index column)",
                "run.log:1: header: the header names none of the spec's outputs (y, co), so nothing \
                 could be checked",
            ]
        );
        assert_eq!(
            header_problems("# first\n\n0 1 2 0 3 0\n"),
            [
                "run.log:3: 0: this line looks like data: the first line that is not a comment \
              must be a header row naming the columns (a, b, cin, y, co, optionally index)"
            ]
        );
        assert_eq!(
            header_problems("index,,y\n"),
            ["run.log:1: column 2: column 2 of the header has no name"]
        );
        assert_eq!(
            header_problems("index index y\n"),
            ["run.log:1: index: column \"index\" appears twice in the header"]
        );
    }

    #[test]
    fn empty_and_comment_only_logs_have_no_header() {
        assert_eq!(
            header_problems(""),
            ["run.log: the log is empty: expected a header row naming the columns"]
        );
        assert_eq!(
            header_problems("// nothing ran\n\n  # really\n"),
            [
                "run.log: the log has only comments and blank lines: expected a header row naming \
              the columns"
            ]
        );
    }

    #[test]
    fn byte_order_mark_and_accessors() {
        let text = "\u{feff}y\tindex\tco\n0001 3 1\n";
        let reader = LogReader::new(text.as_bytes(), "bom.log", &spec16(), Radix::Hex).unwrap();
        assert_eq!(reader.columns(), [Signal::Result, Signal::CarryOut]);
        assert!(reader.has_index());
        assert!(reader.has(Signal::Result));
        assert!(!reader.has(Signal::A));
        assert!(!reader.is_comma_separated());
        assert_eq!(reader.header_line(), 1);
        assert_eq!(reader.radix(), Radix::Hex);
        assert_eq!(reader.file(), "bom.log");
        let mut row = LogRow::new();
        let mut reader = reader;
        assert!(reader.read_row(&mut row).unwrap());
        assert_eq!(row.get(Signal::A), None);
        assert_eq!(row.index, Some(3));
        assert_eq!(reader.line(), 2);
    }

    #[test]
    fn lines_split_across_small_buffers_read_the_same() {
        // A 7-byte buffer forces most lines through the copying path.
        let whole = outcomes(ICARUS_HEX, &spec16(), Radix::Hex, false);
        let mut reader = LogReader::new(
            BufReader::with_capacity(7, ICARUS_HEX.as_bytes()),
            "small.log",
            &spec16(),
            Radix::Hex,
        )
        .unwrap();
        let mut row = LogRow::new();
        let mut lines = Vec::new();
        while reader.read_row(&mut row).unwrap() {
            lines.push((row.line, row.index, *row.get(Signal::Result).unwrap()));
        }
        assert_eq!(lines.len(), whole.len());
        assert_eq!(lines[3].0, 5);
        assert_eq!(show(&lines[3].2, 16, false), "0x05");
        assert_eq!(lines[1].1, Some(1));
    }

    /// A source that yields `data` and then fails.
    struct Failing<'a> {
        data: &'a [u8],
    }

    impl Read for Failing<'_> {
        fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
            if self.data.is_empty() {
                return Err(std::io::Error::other("device went away"));
            }
            let n = self.data.len().min(buf.len());
            buf[..n].copy_from_slice(&self.data[..n]);
            self.data = &self.data[n..];
            Ok(n)
        }
    }

    #[test]
    fn io_errors_are_not_line_problems_and_end_the_reader() {
        let source = BufReader::new(Failing {
            data: b"y co\n0001 1\n0002",
        });
        let mut reader = LogReader::new(source, "dev.log", &spec16(), Radix::Hex).unwrap();
        let mut row = LogRow::new();
        assert!(reader.read_row(&mut row).unwrap());
        match reader.read_row(&mut row) {
            Err(RowError::Io(e)) => assert_eq!(e.to_string(), "dev.log: device went away"),
            other => panic!("expected an I/O error, got {other:?}"),
        }
        assert!(!reader.read_row(&mut row).unwrap());
    }

    #[test]
    fn strict_callers_can_use_the_question_mark() {
        fn count(text: &str) -> Result<usize> {
            let mut reader = LogReader::new(text.as_bytes(), "q.log", &spec16(), Radix::Hex)?;
            let mut row = LogRow::new();
            let mut n = 0;
            while reader.read_row(&mut row)? {
                n += 1;
            }
            Ok(n)
        }
        assert_eq!(count("y\n1\n2\n").unwrap(), 2);
        let err = count("y\n1\nq\n").unwrap_err();
        assert_eq!(err.to_string(), "q.log:3: y: bad hex digit 'q' in column y");
    }

    #[test]
    fn radix_names_round_trip() {
        for r in Radix::ALL {
            assert_eq!(r.name().parse::<Radix>(), Ok(r));
        }
        assert_eq!(Radix::default(), Radix::Hex);
        assert!("oct".parse::<Radix>().is_err());
    }

    #[test]
    fn newline_search_matches_a_plain_scan() {
        let text = b"0123456789abcdef\n0123\n\n01234567\n";
        for start in 0..text.len() {
            let s = &text[start..];
            assert_eq!(
                find_newline(s),
                s.iter().position(|&b| b == b'\n'),
                "from {start}"
            );
        }
        assert_eq!(find_newline(b"no newline at all here"), None);
    }

    #[test]
    fn fast_path_takes_plain_lines_and_leaves_the_rest() {
        let spec = spec16();
        let comma = parse_header(b"index,a,b,cin,y,co", "f.log", 1, &spec, Radix::Hex).unwrap();
        let blank = parse_header(b"index a b cin y co", "f.log", 1, &spec, Radix::Hex).unwrap();
        let mut row = LogRow::new();
        for line in [
            "0,00ab,0001,0,00aa,0",
            " 12 , ffff,0 ,1,  8000 ,1  ",
            "7,A,b,1,C,0",
        ] {
            assert!(comma.parse_plain_line(line.as_bytes(), &mut row), "{line}");
        }
        assert!(blank.parse_plain_line(b"3\t00ab  0001 0 00aa 0 ", &mut row));
        assert_eq!(row.index, Some(3));
        assert_eq!(
            row.values[slot(Signal::A)],
            FieldValue::known(Word::from_u64(0xab))
        );
        for line in [
            "0,0x05,0001,0,00aa,0",  // a prefix (or an unknown digit)
            "0,00ab,0001,0,00aa",    // too few fields
            "0,00ab,0001,0,00aa,0,", // a trailing comma
            "0,00ab,0001,2,00aa,0",  // too wide for cin
            "0,1ffff,0001,0,00aa,0", // too wide for a
            "0,00_ab,0001,0,00aa,0", // a separator
            "0,00ab,0001,0,00aa,z",  // an unknown
            "0,00ab,0001,0,00 aa,0", // a blank inside a field
            "+0,00ab,0001,0,00aa,0", // a signed index
        ] {
            assert!(!comma.parse_plain_line(line.as_bytes(), &mut row), "{line}");
        }
        assert!(!blank.parse_plain_line(b"0,00ab 0001 0 00aa 0", &mut row));
        // The decimal index stops at 'a'; without a blank that is not a field boundary.
        assert!(!blank.parse_plain_line(b"12ab 0001 0 00aa 0", &mut row));
    }

    mod fast_path {
        use super::*;
        use proptest::prelude::*;

        /// One generated field: a value, how to write it, and now and then an odd token.
        type FieldSpec = (u64, usize, bool, u8, String, String);

        fn field() -> impl Strategy<Value = FieldSpec> {
            (
                any::<u64>(),
                0usize..3,
                any::<bool>(),
                any::<u8>(),
                "[ \t]{0,2}",
                "[ \t]{0,2}",
            )
        }

        const ODD: [&str; 10] = ["0x5", "x", "1_0", "Z", "'h1", "-1", "", "0b1", "U", "+1"];

        /// A line for `columns` columns of `widths` (None for the index) in `radix`.
        fn build(
            widths: &[Option<u32>],
            radix: Radix,
            comma: bool,
            fields: &[FieldSpec],
            count_change: i8,
        ) -> String {
            let mut text = String::new();
            let n = (widths.len() as isize + count_change as isize).max(1) as usize;
            for i in 0..n {
                let (value, zeros, upper, odd, before, after) = &fields[i % fields.len()];
                let width = widths.get(i).copied().flatten();
                let token = if odd % 16 == 0 {
                    ODD[*odd as usize / 16 % ODD.len()].to_string()
                } else {
                    // Mostly in range; sometimes one bit too many.
                    let bits = width.unwrap_or(64).min(64) + (odd % 8 == 1) as u32;
                    let v = if bits >= 64 {
                        *value
                    } else {
                        value & ((1 << bits) - 1)
                    };
                    let digits = match (width, radix) {
                        (None, _) | (_, Radix::Dec) => v.to_string(),
                        (_, Radix::Hex) if *upper => format!("{v:X}"),
                        (_, Radix::Hex) => format!("{v:x}"),
                        _ => format!("{v:b}"),
                    };
                    format!("{}{digits}", "0".repeat(*zeros))
                };
                if i > 0 {
                    text.push_str(if comma { "," } else { " " });
                }
                text.push_str(before);
                text.push_str(&token);
                text.push_str(after);
            }
            text
        }

        proptest! {
            #![proptest_config(ProptestConfig::with_cases(3000))]

            /// Whatever the fast path accepts, the general path accepts with the same values.
            #[test]
            fn fast_path_agrees_with_the_general_path(
                fields in proptest::collection::vec(field(), 6),
                comma in any::<bool>(),
                count_change in prop_oneof![8 => Just(0i8), 1 => Just(-1), 1 => Just(1)],
                radix in prop_oneof![Just(Radix::Hex), Just(Radix::Bin), Just(Radix::Dec)],
                width in prop_oneof![Just(1u32), Just(16), Just(32), Just(64), Just(70)],
                with_index in any::<bool>(),
            ) {
                let spec = spec_of_width(width);
                let mut names = vec!["a", "b", "cin", "y", "co"];
                let mut widths = vec![Some(width), Some(width), Some(1), Some(width), Some(1)];
                if with_index {
                    names.insert(0, "index");
                    widths.insert(0, None);
                }
                let header = names.join(if comma { "," } else { " " });
                let format = parse_header(header.as_bytes(), "p.log", 1, &spec, radix).unwrap();
                let text = build(&widths, radix, comma, &fields, count_change);
                let mut fast = LogRow::new();
                let mut general = LogRow::new();
                let result = format.parse_fields(text.as_bytes(), 2, "p.log", &mut general);
                if format.parse_plain_line(text.as_bytes(), &mut fast) {
                    prop_assert!(result.is_ok(), "{:?} refused {:?}", text, result);
                    prop_assert_eq!(fast.index, general.index, "{:?}", text);
                    for s in [Signal::A, Signal::B, Signal::CarryIn, Signal::Result, Signal::CarryOut] {
                        prop_assert_eq!(fast.values[slot(s)], general.values[slot(s)], "{:?}", text);
                    }
                } else if result.is_ok() {
                    // Only forms outside the plain ones may leave the fast path: an odd
                    // token, or more digits than a u64 loop takes (the index is decimal).
                    let odd = fields.iter().any(|f| f.3 % 16 == 0);
                    let limit = match radix {
                        Radix::Hex => 16,
                        Radix::Bin => 64,
                        Radix::Dec => 19,
                    };
                    let long = text
                        .split([',', ' ', '\t'])
                        .filter(|t| !t.is_empty())
                        .enumerate()
                        .any(|(i, t)| t.len() > if with_index && i == 0 { 19 } else { limit });
                    prop_assert!(odd || long, "plain line {:?} left the fast path", text);
                }
            }

            #[test]
            fn hex8_matches_the_byte_loop(chunk in proptest::array::uniform8(prop_oneof![
                4 => proptest::sample::select(b"0123456789abcdefABCDEF".to_vec()),
                1 => proptest::sample::select(b"/:@G`gxX_, \t".to_vec()),
                1 => any::<u8>(),
            ])) {
                let mut value = 0u64;
                let mut count = 0;
                for &c in &chunk {
                    let d = HEX_VALUE[c as usize];
                    if d > 15 {
                        break;
                    }
                    value = value << 4 | d as u64;
                    count += 1;
                }
                prop_assert_eq!(hex8(chunk), (value, count), "{:?}", chunk);
            }
        }
    }

    mod round_trip {
        use super::*;
        use proptest::prelude::*;

        /// How a test value is written out.
        #[derive(Debug, Clone)]
        struct Style {
            radix: Radix,
            full_width: bool,
            prefix: bool,
            literal: bool,
            upper: bool,
            separators: Vec<usize>,
        }

        fn style() -> impl Strategy<Value = Style> {
            (
                prop_oneof![Just(Radix::Hex), Just(Radix::Bin), Just(Radix::Dec)],
                any::<bool>(),
                any::<bool>(),
                any::<bool>(),
                any::<bool>(),
                proptest::collection::vec(0usize..200, 0..4),
            )
                .prop_map(|(radix, full_width, prefix, literal, upper, separators)| {
                    Style {
                        radix,
                        full_width,
                        prefix,
                        literal,
                        upper,
                        separators,
                    }
                })
        }

        /// Writes `bits` (with unknown digits where `unknown_digits` says, hex and binary
        /// only) in `style`, and returns the text with the value the reader should produce.
        fn format(
            bits: Word,
            unknown_digits: u128,
            width: u32,
            style: &Style,
        ) -> (String, FieldValue) {
            let per_digit = match style.radix {
                Radix::Hex => 4,
                _ => 1,
            };
            let digits_needed = width.div_ceil(per_digit);
            let mut expect_unknown = Word::ZERO;
            let mut digits: Vec<u8> = Vec::new();
            if style.radix == Radix::Dec {
                digits.extend(bits.to_decimal().bytes());
                if style.full_width {
                    let full = Word::ones(width).to_decimal().len();
                    while digits.len() < full {
                        digits.insert(0, b'0');
                    }
                }
            } else {
                for d in (0..digits_needed).rev() {
                    // Digits above bit 127 stay known to keep the unknown mask a u128.
                    let unknown = d < 128 && unknown_digits >> d & 1 == 1;
                    let value = bits.extract(d * per_digit, per_digit).low_u64() as u32;
                    if unknown {
                        for i in 0..per_digit {
                            if d * per_digit + i < width {
                                expect_unknown.set_bit(d * per_digit + i, true);
                            }
                        }
                        digits.push(b"xXzZ"[(value % 4) as usize]);
                    } else {
                        let c = char::from_digit(value, 16).unwrap();
                        let c = if style.upper {
                            c.to_ascii_uppercase()
                        } else {
                            c
                        };
                        digits.push(c as u8);
                    }
                }
                if !style.full_width {
                    // Drop leading known zeros, keeping at least one digit.
                    while digits.len() > 1 && digits[0] == b'0' {
                        digits.remove(0);
                    }
                }
            }
            // An all-unknown single digit means "every bit unknown" in a plain value.
            if digits.len() == 1 && matches!(digits[0], b'x' | b'X' | b'z' | b'Z') {
                expect_unknown = Word::ones(width);
            }
            // A leading "0x" digit pair is read as digits only at the exact printed length, so
            // separators there would turn it into a prefix (documented); keep such tokens bare.
            let digit_pair = digits.len() >= 2 && digits[0] == b'0' && digits[1] | 0x20 == b'x';
            for &at in &style.separators {
                if digits.len() > 1 && !digit_pair {
                    let at = 1 + at % (digits.len() - 1);
                    digits.insert(at, b'_');
                }
            }
            let mut text = String::from_utf8(digits).unwrap();
            if style.literal && !text.starts_with(['x', 'X', 'z', 'Z']) {
                let base = match style.radix {
                    Radix::Hex => 'h',
                    Radix::Bin => 'b',
                    _ => 'd',
                };
                text = format!("{width}'{base}{text}");
            } else if style.prefix {
                match style.radix {
                    Radix::Hex => {
                        text = format!("0x{text}");
                        // Keep clear of the length at which "0x" reads as digits; a
                        // separator changes the length but not the digits.
                        if text.len() == hex_digits(width) as usize {
                            text.insert(2, '_');
                        }
                    }
                    Radix::Bin => text = format!("0b{text}"),
                    _ => {}
                }
            }
            let bits = bits.and(&expect_unknown.not(MAX_WIDTH));
            let high_z = !expect_unknown.is_zero() && text.contains(['z', 'Z']);
            (
                text,
                FieldValue {
                    bits,
                    unknown: expect_unknown,
                    high_z,
                },
            )
        }

        proptest! {
            #![proptest_config(ProptestConfig::with_cases(2000))]

            #[test]
            fn formatted_values_parse_back(
                width in prop_oneof![1u32..=70, 1u32..=512],
                limbs in any::<[u64; LIMBS]>(),
                unknown_digits in any::<u128>(),
                with_unknowns in any::<bool>(),
                style in style(),
            ) {
                let bits = Word::from_limbs(limbs).masked(width);
                let unknown_digits = if with_unknowns && style.radix != Radix::Dec {
                    unknown_digits
                } else {
                    0
                };
                let (text, expect) = format(bits, unknown_digits, width, &style);
                let mut got = FieldValue::default();
                let result = parse_value(text.as_bytes(), style.radix, width, &mut got);
                prop_assert_eq!(result, Ok(()), "text {}", text);
                prop_assert_eq!(got, expect, "text {}", text);
            }

            #[test]
            fn one_bit_too_many_is_refused(width in 1u32..=511, radix in prop_oneof![Just(Radix::Hex), Just(Radix::Bin), Just(Radix::Dec)]) {
                let too_big = Word::bit_mask(width);
                let text = match radix {
                    Radix::Hex => too_big.to_hex(width + 1),
                    Radix::Bin => too_big.to_bin(width + 1),
                    _ => too_big.to_decimal(),
                };
                let mut got = FieldValue::default();
                prop_assert_eq!(parse_value(text.as_bytes(), radix, width, &mut got), Err(ValueError::TooWide));
            }
        }
    }
}
