//! The CLI tests' own plumbing: fixture specs, `check` runs, readers for the files the
//! binary writes, and assertions that print expected against actual. The sandbox and the
//! runner come from the shared `tests/support` module.

use serde_json::Value;
use sha2::{Digest, Sha256};

pub use crate::support::{Run, Sandbox};

/// An 8-bit unsigned adder with carry-in and every flag; small enough to re-derive by hand.
pub const FLOW_ADDER: &str = r#"name = "flow_adder"
operation = "add"
width = 8
encoding = "unsigned"

[ports]
a = "a"
b = "b"
carry_in = "cin"
result = "y"
carry_out = "co"
overflow = "ovf"
zero = "z"
negative = "n"

[random]
count = 20
seed = 5
"#;

/// An 8-bit two's-complement subtractor with borrow-in and borrow-out (the default
/// conventions).
pub const RESERVOIR_LEVEL: &str = r#"name = "reservoir_level"
operation = "sub"
width = 8
encoding = "twos"

[ports]
a = "level"
b = "drain"
carry_in = "bin"
result = "delta"
carry_out = "bout"
overflow = "ovf"
zero = "empty"
negative = "neg"

[random]
count = 24
seed = 3
"#;

/// A 12-bit two's-complement add/subtract unit with a mode port.
pub const VALVE_TRIM: &str = r#"name = "valve_trim"
operation = "addsub"
width = 12
encoding = "twos"

[ports]
a = "pos"
b = "trim"
carry_in = "cin"
mode = "sub"
result = "out"
carry_out = "cout"
overflow = "ovf"
zero = "zf"
negative = "nf"

[conventions]
carry_in = "borrow"

[random]
count = 30
seed = 11
"#;

/// Operations, with the spec spelling, for generated specs.
pub const OPERATIONS: [&str; 7] = [
    "add",
    "sub",
    "addsub",
    "negate",
    "increment",
    "decrement",
    "compare",
];

/// Encodings, with the spec spelling, for generated specs.
pub const ENCODINGS: [&str; 5] = ["unsigned", "twos", "ones", "signmag", "offset"];

/// A spec with every port `operation` may have under `encoding` (per the spec rules in
/// DEVELOPERS.md: no carry-in for ones/signmag, no carry-out for signmag or a ones negator),
/// default conventions, and `count` random vectors from `seed`.
pub fn spec_text(
    name: &str,
    operation: &str,
    encoding: &str,
    width: u32,
    count: u64,
    seed: u64,
) -> String {
    let binary = matches!(operation, "add" | "sub" | "addsub" | "compare");
    let mut ports = vec![("a", "op_a")];
    if binary {
        ports.push(("b", "op_b"));
    }
    if operation == "compare" {
        ports.extend([("less", "lt"), ("equal", "eq"), ("greater", "gt")]);
    } else {
        let plain_carry = matches!(encoding, "unsigned" | "twos" | "offset");
        if matches!(operation, "add" | "sub" | "addsub") && plain_carry {
            ports.push(("carry_in", "c_in"));
        }
        if operation == "addsub" {
            ports.push(("mode", "subtract"));
        }
        ports.push(("result", "res"));
        let has_carry_out = encoding != "signmag" && !(encoding == "ones" && operation == "negate");
        if has_carry_out {
            ports.push(("carry_out", "c_out"));
        }
        ports.extend([("overflow", "ovf"), ("zero", "zf"), ("negative", "nf")]);
    }
    let mut text = format!(
        "name = \"{name}\"\noperation = \"{operation}\"\nwidth = {width}\nencoding = \"{encoding}\"\n\n[ports]\n"
    );
    for (key, port) in ports {
        text.push_str(&format!("{key} = \"{port}\"\n"));
    }
    if operation == "addsub" && text.contains("carry_in = ") {
        // An addsub carry_in port must say what it means when subtracting.
        text.push_str("\n[conventions]\ncarry_in = \"borrow\"\n");
    }
    text.push_str(&format!("\n[random]\ncount = {count}\nseed = {seed}\n"));
    text
}

impl Sandbox {
    /// Runs `check SPEC --log LOG --json <fresh file>` plus `extra`, expecting `code`, and
    /// returns the run and the parsed report.
    #[track_caller]
    pub fn check(&self, spec: &str, log: &str, extra: &[&str], code: i32) -> (Run, Value) {
        let json = report_name(log);
        let mut args = vec!["check", spec, "--log", log, "--json", &json, "-q"];
        args.extend_from_slice(extra);
        let run = self.run(&args);
        run.expect_code(code);
        let report = self.json(&json);
        (run, report)
    }
}

/// The JSON report file [`Sandbox::check`] writes for `log`.
pub fn report_name(log: &str) -> String {
    format!("{log}.report.json")
}

/// A parsed `vectors.csv`: header and rows of fields (the classes field kept whole).
#[derive(Clone, Debug)]
pub struct VectorCsv {
    /// Column names.
    pub header: Vec<String>,
    /// One vector per row, fields as written.
    pub rows: Vec<Vec<String>>,
}

impl VectorCsv {
    /// Parses the text of a vectors.csv (plain fields, no quoting: arithvec writes none).
    pub fn parse(text: &str) -> VectorCsv {
        let mut lines = text.lines();
        let header: Vec<String> = lines
            .next()
            .expect("a header row")
            .split(',')
            .map(str::to_string)
            .collect();
        let rows: Vec<Vec<String>> = lines
            .map(|l| l.split(',').map(str::to_string).collect())
            .collect();
        for (i, r) in rows.iter().enumerate() {
            assert_eq!(r.len(), header.len(), "row {i} of vectors.csv: {r:?}");
        }
        VectorCsv { header, rows }
    }

    /// Reads DIR/vectors.csv in the sandbox.
    pub fn read(sb: &Sandbox, dir: &str) -> VectorCsv {
        VectorCsv::parse(&sb.read(&format!("{dir}/vectors.csv")))
    }

    /// The position of column `name`.
    pub fn col(&self, name: &str) -> usize {
        self.header
            .iter()
            .position(|h| h == name)
            .unwrap_or_else(|| panic!("no column {name} in {:?}", self.header))
    }

    /// Row `i`'s value in column `name`.
    pub fn get(&self, i: usize, name: &str) -> &str {
        &self.rows[i][self.col(name)]
    }

    /// Row `i`'s classes, as a sorted list.
    pub fn classes(&self, i: usize) -> Vec<String> {
        let mut c: Vec<String> = self
            .get(i, "classes")
            .split(' ')
            .filter(|s| !s.is_empty())
            .map(str::to_string)
            .collect();
        c.sort();
        c
    }

    /// The port columns (everything but index and classes).
    pub fn ports(&self) -> Vec<String> {
        self.header
            .iter()
            .filter(|h| *h != "index" && *h != "classes")
            .cloned()
            .collect()
    }

    /// A log table with `columns` taken from every row.
    pub fn table(&self, columns: &[&str]) -> Table {
        let idx: Vec<usize> = columns.iter().map(|c| self.col(c)).collect();
        Table {
            header: columns.iter().map(|c| c.to_string()).collect(),
            rows: self
                .rows
                .iter()
                .map(|r| idx.iter().map(|&i| r[i].clone()).collect())
                .collect(),
        }
    }

    /// The perfect log: every column but classes (so with the index column).
    pub fn perfect_log(&self) -> Table {
        let cols: Vec<String> = self
            .header
            .iter()
            .filter(|h| *h != "classes")
            .cloned()
            .collect();
        let refs: Vec<&str> = cols.iter().map(String::as_str).collect();
        self.table(&refs)
    }
}

/// A result log under construction: header and rows of fields.
#[derive(Clone, Debug, PartialEq)]
pub struct Table {
    /// Column names.
    pub header: Vec<String>,
    /// Rows of fields.
    pub rows: Vec<Vec<String>>,
}

impl Table {
    /// The position of column `name`.
    pub fn col(&self, name: &str) -> usize {
        self.header
            .iter()
            .position(|h| h == name)
            .unwrap_or_else(|| panic!("no column {name} in {:?}", self.header))
    }

    /// Mutable access to row `row`'s field in column `name`.
    pub fn cell(&mut self, row: usize, name: &str) -> &mut String {
        let c = self.col(name);
        &mut self.rows[row][c]
    }

    /// The table as text, fields joined by `sep`.
    pub fn render(&self, sep: &str) -> String {
        let mut out = self.header.join(sep);
        out.push('\n');
        for r in &self.rows {
            out.push_str(&r.join(sep));
            out.push('\n');
        }
        out
    }

    /// Comma-separated text.
    pub fn csv(&self) -> String {
        self.render(",")
    }
}

/// Flips bit `bit` of the hex value `hex` (lowercase, zero-padded), keeping its length.
pub fn flip_hex_bit(hex: &str, bit: u32) -> String {
    let mut digits: Vec<u8> = hex.bytes().collect();
    let pos = digits.len() - 1 - (bit / 4) as usize;
    let v = (digits[pos] as char).to_digit(16).expect("hex digit") ^ (1 << (bit % 4));
    digits[pos] = char::from_digit(v, 16).expect("nibble") as u8;
    String::from_utf8(digits).expect("ascii")
}

/// The `width`-bit binary spelling of hex value `hex`, MSB first.
pub fn hex_to_bin(hex: &str, width: u32) -> String {
    let bits = hex_bits(hex);
    (0..width)
        .rev()
        .map(|i| {
            if bits.get(i as usize).copied().unwrap_or(false) {
                '1'
            } else {
                '0'
            }
        })
        .collect()
}

/// The bits of hex value `hex`, least significant first.
pub fn hex_bits(hex: &str) -> Vec<bool> {
    let mut bits = Vec::new();
    for c in hex.chars().rev() {
        let v = c.to_digit(16).unwrap_or_else(|| panic!("not hex: {hex:?}"));
        for k in 0..4 {
            bits.push(v >> k & 1 == 1);
        }
    }
    bits
}

/// Bits `lsb..=msb` of `bits` as a zero-padded lowercase hex value of the field's width.
pub fn field_hex(bits: &[bool], msb: u32, lsb: u32) -> String {
    let width = msb - lsb + 1;
    let digits = width.div_ceil(4);
    (0..digits)
        .rev()
        .map(|d| {
            let mut v = 0;
            for k in 0..4 {
                let i = lsb + d * 4 + k;
                if i <= msb && bits[i as usize] {
                    v |= 1 << k;
                }
            }
            char::from_digit(v, 16).expect("nibble")
        })
        .collect()
}

/// The data lines of a $readmemh file (comment header skipped).
pub fn hex_words(text: &str) -> Vec<&str> {
    text.lines().filter(|l| !l.starts_with("//")).collect()
}

/// Unpacks DIR's stimulus.hex and expected.hex by the manifest's layout into a log table
/// (port columns in layout order, inputs first, no index column).
pub fn unpack_hex_log(sb: &Sandbox, dir: &str) -> Table {
    let manifest = sb.json(&format!("{dir}/manifest.json"));
    let mut header = Vec::new();
    let mut columns: Vec<Vec<String>> = Vec::new();
    for (file, word) in [("stimulus.hex", "stimulus"), ("expected.hex", "expected")] {
        let layout = &manifest["layout"][word];
        let text = sb.read(&format!("{dir}/{file}"));
        let words = hex_words(&text);
        let fields = layout["fields"].as_array().expect("fields");
        for f in fields {
            header.push(f["name"].as_str().expect("name").to_string());
            let (msb, lsb) = (u32_of(&f["msb"]), u32_of(&f["lsb"]));
            columns.push(
                words
                    .iter()
                    .map(|w| field_hex(&hex_bits(w), msb, lsb))
                    .collect(),
            );
        }
    }
    let n = columns.first().map_or(0, Vec::len);
    Table {
        header,
        rows: (0..n)
            .map(|i| columns.iter().map(|c| c[i].clone()).collect())
            .collect(),
    }
}

/// A JSON number as u32.
pub fn u32_of(v: &Value) -> u32 {
    v.as_u64().unwrap_or_else(|| panic!("not a number: {v}")) as u32
}

/// A JSON number as u64.
pub fn u64_of(v: &Value) -> u64 {
    v.as_u64().unwrap_or_else(|| panic!("not a number: {v}"))
}

/// Lowercase hex SHA-256 of `data` (sha2 crate).
pub fn sha256_hex(data: &[u8]) -> String {
    Sha256::digest(data)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// The failure indices of a check report.
pub fn failure_indices(report: &Value) -> Vec<u64> {
    report["failures"]
        .as_array()
        .expect("failures array")
        .iter()
        .map(|f| u64_of(&f["index"]))
        .collect()
}

/// Asserts that `actual` contains `expected`: every key of every expected object is present
/// with a matching value (recursively), arrays match element by element, other values are
/// equal. On a difference, prints its JSON path and both documents.
#[track_caller]
pub fn assert_json_includes(actual: &Value, expected: &Value) {
    if let Err(path) = includes(actual, expected, "$") {
        panic!(
            "JSON differs at {path}\n--- expected (subset) ---\n{}\n--- actual ---\n{}",
            serde_json::to_string_pretty(expected).unwrap_or_default(),
            serde_json::to_string_pretty(actual).unwrap_or_default()
        );
    }
}

fn includes(actual: &Value, expected: &Value, path: &str) -> Result<(), String> {
    match (actual, expected) {
        (Value::Object(a), Value::Object(e)) => {
            for (k, ev) in e {
                let p = format!("{path}.{k}");
                match a.get(k) {
                    Some(av) => includes(av, ev, &p)?,
                    None => return Err(format!("{p} (missing)")),
                }
            }
            Ok(())
        }
        (Value::Array(a), Value::Array(e)) => {
            if a.len() != e.len() {
                return Err(format!(
                    "{path} (length {} vs expected {})",
                    a.len(),
                    e.len()
                ));
            }
            for (i, (av, ev)) in a.iter().zip(e).enumerate() {
                includes(av, ev, &format!("{path}[{i}]"))?;
            }
            Ok(())
        }
        _ if actual == expected => Ok(()),
        _ => Err(format!("{path} (got {actual}, expected {expected})")),
    }
}

/// Checks that `xml` is well formed in the small sense this suite needs: one XML declaration
/// up front, then properly nested and closed elements with quoted attributes. Returns the
/// element names in document order.
pub fn xml_elements(xml: &str) -> Vec<String> {
    let body = xml
        .strip_prefix("<?xml")
        .and_then(|rest| rest.split_once("?>"))
        .map(|(_, rest)| rest)
        .unwrap_or_else(|| panic!("no XML declaration:\n{xml}"));
    let mut stack: Vec<String> = Vec::new();
    let mut names = Vec::new();
    let mut rest = body;
    let mut roots = 0;
    while let Some(start) = rest.find('<') {
        let text = &rest[..start];
        assert!(
            !text.contains('>') && (!stack.is_empty() || text.trim().is_empty()),
            "stray text {text:?} in XML:\n{xml}"
        );
        let end = rest[start..]
            .find('>')
            .unwrap_or_else(|| panic!("unclosed tag in XML:\n{xml}"))
            + start;
        let tag = &rest[start + 1..end];
        rest = &rest[end + 1..];
        if let Some(name) = tag.strip_prefix('/') {
            let open = stack
                .pop()
                .unwrap_or_else(|| panic!("</{name}> closes nothing"));
            assert_eq!(open, name.trim(), "mismatched closing tag in XML:\n{xml}");
            continue;
        }
        let self_closing = tag.ends_with('/');
        let tag = tag.trim_end_matches('/');
        let name: String = tag.split_whitespace().next().unwrap_or("").to_string();
        assert!(!name.is_empty(), "empty tag in XML:\n{xml}");
        assert_eq!(
            tag.matches('"').count() % 2,
            0,
            "unbalanced quotes in <{tag}>"
        );
        if stack.is_empty() {
            roots += 1;
        }
        names.push(name.clone());
        if !self_closing {
            stack.push(name);
        }
    }
    assert!(rest.trim().is_empty(), "trailing text in XML: {rest:?}");
    assert!(
        stack.is_empty(),
        "unclosed elements {stack:?} in XML:\n{xml}"
    );
    assert_eq!(roots, 1, "expected one root element in XML:\n{xml}");
    names
}
