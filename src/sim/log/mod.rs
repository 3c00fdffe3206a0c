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
//! - Decimal radix: no prefix. Digits alone are the bit pattern read as an unsigned number (as
//!   `%0d` prints an unsigned reg). A leading `-` makes the token a signed value: in the value
//!   columns (a, b, result) it is encoded in the spec's encoding (two's complement: the
//!   pattern `%0d` of a signed reg stands for; ones: `~m`; sign-magnitude: sign bit and
//!   magnitude; offset binary: `2^(W-1) - m`; `-0` is the negative zero of ones and
//!   sign-magnitude; unsigned has no negative values and refuses one); in flag columns it is the
//!   two's-complement pattern of the column's width. The value must lie in the range. A decimal value
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
use crate::spec::{Encoding, Signal, Spec};

mod value;
use value::*;

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
    /// The unknown bits that were printed as high impedance (a subset of `unknown`); the
    /// others were x. Per digit: every bit of a `z`/`Z`/`?` digit is here.
    pub z: Word,
}

impl FieldValue {
    /// A fully known value.
    pub const fn known(bits: Word) -> FieldValue {
        FieldValue {
            bits,
            unknown: Word::ZERO,
            high_z: false,
            z: Word::ZERO,
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
    /// `encoding` is the spec's encoding for the value ports (a, b, result), whose signed
    /// decimals are values encoded in it; None for flags and the mode bit.
    Value {
        slot: usize,
        width: u32,
        encoding: Option<Encoding>,
    },
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
                Target::Value {
                    slot,
                    width,
                    encoding,
                } => match (self.radix, encoding, token.strip_prefix(b"-")) {
                    // A lone `-` is GHDL's std_logic don't-care, not a sign.
                    (Radix::Dec, Some(enc), Some(magnitude)) if !magnitude.is_empty() => {
                        parse_signed_decimal(magnitude, width, enc, &mut row.values[slot])
                    }
                    _ => parse_value(token, self.radix, width, &mut row.values[slot]),
                },
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
                width: spec.signal_width(signal),
                encoding: matches!(
                    signal,
                    Signal::A | Signal::B | Signal::Result | Signal::Quotient | Signal::Remainder
                )
                .then_some(spec.encoding),
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
            Target::Value { slot, width, .. } => PlainColumn {
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

#[cfg(test)]
mod tests;
