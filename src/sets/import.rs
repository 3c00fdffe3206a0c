//! Imported vectors: a user's CSV of operand values (hand-written directed vectors, vectors
//! from another generator, a failing case from the lab) turned into inputs the set writer
//! puts after, or in place of, the generated ones; and reading them back from a set.
//!
//! The CSV: `#` lines and blank lines are skipped; the first other line is the header and
//! names columns by the spec's port names. Every input port needs a column; columns named
//! `index`, `classes` or after an output port are ignored (so a set's own `vectors.csv` can
//! be imported), any other column is refused. A value is `0x` + hex digits or `0b` + binary
//! digits (the bit pattern; `_` may separate digits), or a decimal number, read as the
//! operand's value under the spec's encoding (`-5`, and `-0` for the encodings with a
//! negative zero); the amount of a shifter, the carry-in, the mode and an unsigned operand
//! read decimals as plain numbers. Every problem is reported with file, line and column.
//!
//! No file I/O in the parser; [`read_imported`] reads a set's `stimulus.hex`.

use std::io::{BufRead, BufReader};
use std::path::Path;

use sha2::{Digest, Sha256};

use crate::arith::bits::{Bits, Wide};
use crate::arith::encoding::{encode, negative_zero, representable};
use crate::arith::model::Inputs;
use crate::arith::word::Word;
use crate::error::{Error, Problem, Result};
use crate::sets::hexfile::Packer;
use crate::sets::layout::Layout;
use crate::sets::vectorset::{Manifest, STIMULUS_HEX};
use crate::spec::{Encoding, Operation, Signal, Signedness, Spec};

/// Most problems listed before the parser stops collecting.
const MAX_PROBLEMS: usize = 50;

/// Parses the CSV `text` (from `file`, for messages) into input vectors for `spec`.
///
/// Errors (all collected): no header, a header without an input port's column, an unknown or
/// repeated column, a row with the wrong number of cells, a value that is not a number, does
/// not fit the port, or is outside the encoding's range, and a file with no vector.
pub fn parse_import_csv(text: &str, file: &str, spec: &Spec) -> Result<Vec<Inputs>> {
    let mut problems = Vec::new();
    let mut lines = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim_end_matches('\r')))
        .filter(|(_, l)| !l.trim().is_empty() && !l.trim_start().starts_with('#'));
    let Some((header_line, header)) = lines.next() else {
        return Err(Error::problem(Problem::new(
            file,
            "the file holds no header line naming the input ports",
        )));
    };
    let inputs = spec.inputs();
    let outputs = spec.outputs();
    // Column k is input signal Some(s), or None for an ignored column.
    let mut columns: Vec<Option<Signal>> = Vec::new();
    for (k, name) in header.split(',').map(str::trim).enumerate() {
        let col = format!("column {} ({name})", k + 1);
        if let Some((sig, _)) = inputs.iter().find(|(_, p)| *p == name) {
            if columns.contains(&Some(*sig)) {
                problems.push(
                    Problem::new(file, format!("port {name} has two columns"))
                        .at_line(header_line)
                        .field(col),
                );
            }
            columns.push(Some(*sig));
        } else if name == "index" || name == "classes" || outputs.iter().any(|(_, p)| *p == name) {
            columns.push(None);
        } else {
            problems.push(
                Problem::new(
                    file,
                    format!(
                        "\"{name}\" is not a port of unit {}; its inputs are {} (columns named \
                         index, classes or after an output port are ignored)",
                        spec.name,
                        names(&inputs)
                    ),
                )
                .at_line(header_line)
                .field(col),
            );
            columns.push(None);
        }
    }
    let missing: Vec<&str> = inputs
        .iter()
        .filter(|(s, _)| !columns.contains(&Some(*s)))
        .map(|(_, p)| *p)
        .collect();
    if !missing.is_empty() {
        problems.push(
            Problem::new(
                file,
                format!(
                    "the header has no column for input port(s) {}; every input needs one",
                    missing.join(", ")
                ),
            )
            .at_line(header_line)
            .field("header"),
        );
    }
    if !problems.is_empty() {
        return Err(Error::input(problems));
    }
    let mut vectors = Vec::new();
    for (n, line) in lines {
        if problems.len() >= MAX_PROBLEMS {
            break;
        }
        let cells: Vec<&str> = line.split(',').map(str::trim).collect();
        if cells.len() != columns.len() {
            problems.push(
                Problem::new(
                    file,
                    format!(
                        "{} values, but the header names {} columns",
                        cells.len(),
                        columns.len()
                    ),
                )
                .at_line(n),
            );
            continue;
        }
        let mut v = Inputs::default();
        let mut good = true;
        for (k, (cell, col)) in cells.iter().zip(&columns).enumerate() {
            let Some(sig) = col else { continue };
            let port = spec.ports.get(*sig).unwrap_or("?");
            match parse_value(cell, *sig, spec) {
                Ok(w) => v.set(*sig, w),
                Err(message) => {
                    good = false;
                    problems.push(
                        Problem::new(file, message)
                            .at_line(n)
                            .field(format!("column {} ({port})", k + 1)),
                    );
                }
            }
        }
        if good {
            vectors.push(v);
        }
    }
    if problems.is_empty() && vectors.is_empty() {
        problems.push(Problem::new(file, "the file holds a header but no vector"));
    }
    if !problems.is_empty() {
        return Err(Error::input(problems));
    }
    Ok(vectors)
}

fn names(fields: &[(Signal, &str)]) -> String {
    fields
        .iter()
        .map(|(_, p)| *p)
        .collect::<Vec<_>>()
        .join(", ")
}

/// The encoding a decimal value of `sig` is read in.
fn decimal_encoding(sig: Signal, spec: &Spec) -> Encoding {
    let b_unsigned = spec.operation == Operation::Mul
        && spec.options.as_ref().and_then(|o| o.signedness) == Some(Signedness::SignedUnsigned);
    match sig {
        Signal::A => spec.encoding,
        Signal::B if !b_unsigned => spec.encoding,
        _ => Encoding::Unsigned,
    }
}

/// One cell's value as the port's bit pattern, or the reason it is not one.
fn parse_value(cell: &str, sig: Signal, spec: &Spec) -> std::result::Result<Word, String> {
    let width = spec.signal_width(sig);
    if cell.is_empty() {
        return Err("no value".into());
    }
    let lower = cell.to_ascii_lowercase();
    let radix = if let Some(d) = lower.strip_prefix("0x") {
        Some((d, 4, "hex"))
    } else {
        lower.strip_prefix("0b").map(|d| (d, 1, "binary"))
    };
    if let Some((digits, bits, what)) = radix {
        let digits: String = digits.chars().filter(|&c| c != '_').collect();
        let w = (!digits.is_empty())
            .then(|| Word::parse_radix(digits.as_bytes(), bits))
            .flatten()
            .ok_or_else(|| format!("\"{cell}\" is not a {what} number"))?;
        if w.significant_bits() > width {
            return Err(format!(
                "{cell} does not fit the port's {width} bit{}",
                if width == 1 { "" } else { "s" }
            ));
        }
        return Ok(w);
    }
    let (negative, digits) = match cell.as_bytes()[0] {
        b'-' => (true, &cell[1..]),
        b'+' => (false, &cell[1..]),
        _ => (false, cell),
    };
    let magnitude = Word::parse_decimal(digits).ok_or_else(|| {
        format!("\"{cell}\" is not a number (decimal, or hex with 0x, binary with 0b)")
    })?;
    let encoding = decimal_encoding(sig, spec);
    let out_of_range = || {
        format!(
            "{cell} is outside the range of the port ({width} bit{}, {})",
            if width == 1 { "" } else { "s" },
            encoding.name()
        )
    };
    if magnitude.significant_bits() > width {
        return Err(out_of_range());
    }
    let m = Wide::from_word(&magnitude);
    if negative && m.is_zero() {
        // -0: the encoding's negative zero where it has one, else plain 0.
        return Ok(negative_zero::<Wide>(width, encoding).map_or(Word::ZERO, |p| p.to_word()));
    }
    let value = if negative { m.neg() } else { m };
    if !representable(value, width, encoding) {
        return Err(out_of_range());
    }
    Ok(encode(value, width, encoding).to_word())
}

/// SHA-256 of `bytes` as lowercase hex (the manifest's `csv_sha256`).
pub fn csv_sha256(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// Reads the imported vectors of the set in `dir` from its `stimulus.hex` (only those rows are
/// kept), checking the file against the manifest's SHA-256 and the rows' count.
pub fn read_imported(dir: &Path, spec: &Spec, manifest: &Manifest) -> Result<Vec<Inputs>> {
    let path = dir.join(STIMULUS_HEX);
    let shown = path.display().to_string();
    let Some(imported) = &manifest.imported else {
        return Ok(Vec::new());
    };
    let skip = imported
        .first_index
        .checked_sub(manifest.first_index)
        .ok_or_else(|| {
            Error::problem(
                Problem::new(
                    dir.join(crate::sets::vectorset::MANIFEST_JSON)
                        .display()
                        .to_string(),
                    "the imported vectors start before the files do",
                )
                .field("imported.first_index"),
            )
        })?;
    let layout = Layout::for_spec(spec);
    let packer = Packer::new(&layout.stimulus);
    let file = std::fs::File::open(&path).map_err(|e| Error::io(&path, e))?;
    let mut reader = BufReader::new(file);
    let mut hasher = Sha256::new();
    let mut line = String::new();
    let (mut n, mut position) = (0usize, 0u64);
    let mut rows = Vec::new();
    loop {
        line.clear();
        if reader
            .read_line(&mut line)
            .map_err(|e| Error::io(&path, e))?
            == 0
        {
            break;
        }
        hasher.update(line.as_bytes());
        n += 1;
        let t = line.trim();
        if t.is_empty() || t.starts_with("//") {
            continue;
        }
        if position >= skip {
            let fields = packer.unpack(t).ok_or_else(|| {
                Error::problem(
                    Problem::new(shown.clone(), format!("\"{t}\" is not a stimulus word"))
                        .at_line(n),
                )
            })?;
            let mut v = Inputs::default();
            for (f, w) in layout.stimulus.fields.iter().zip(fields) {
                v.set(f.signal, w);
            }
            rows.push(v);
        }
        position += 1;
    }
    let digest: String = hasher
        .finalize()
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    let recorded = manifest.files.iter().find(|f| f.name == STIMULUS_HEX);
    if recorded.is_none_or(|r| r.sha256 != digest) {
        return Err(Error::problem(Problem::new(
            shown,
            "the file does not match the SHA-256 in manifest.json (edited or truncated?); \
             import the vectors again",
        )));
    }
    if rows.len() as u64 != imported.vectors {
        return Err(Error::problem(Problem::new(
            shown,
            format!(
                "holds {} imported words but manifest.json says {}",
                rows.len(),
                imported.vectors
            ),
        )));
    }
    Ok(rows)
}
