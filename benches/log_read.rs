//! Throughput of the result-log reader on the checker's reference workload: a 1,000,000-line
//! log of a 32-bit subtractor (index, a, b, cin, y, co, ovf, zero, neg; about 45 bytes a line),
//! built in memory from a fixed seed so every run reads the same bytes.
//!
//! Run with `cargo bench --bench log_read`. It prints lines/s and MB/s for the comma-separated
//! log read straight from memory and through a 64 KiB `BufReader` (as a file would be read),
//! and for the same log blank-separated. The best of five passes is reported.
//! `ARITHVEC_BENCH_LINES` and `ARITHVEC_BENCH_PASSES` override the size and pass count (for
//! quick runs under an instruction-counting profiler).

use std::hint::black_box;
use std::io::{BufRead, BufReader, Cursor};
use std::time::{Duration, Instant};

use arithvec::{LogReader, LogRow, Radix, Signal, Spec};

fn setting(name: &str, default: usize) -> usize {
    std::env::var(name)
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(default)
}

const SPEC: &str = r#"
name = "coolant_flow_delta"
operation = "sub"
width = 32
encoding = "twos"
[ports]
a = "a"
b = "b"
carry_in = "cin"
result = "y"
carry_out = "co"
overflow = "ovf"
zero = "zero"
negative = "neg"
"#;

/// The log text with `separator` between fields; results are a true 32-bit subtraction so
/// the flags vary the way a real run's do.
fn build_log(separator: &str, lines: usize) -> Vec<u8> {
    use std::fmt::Write as _;
    let mut text = String::with_capacity(lines * 48);
    let header = ["index", "a", "b", "cin", "y", "co", "ovf", "zero", "neg"];
    text.push_str(&header.join(separator));
    text.push('\n');
    let mut state: u64 = 0x9e37_79b9_7f4a_7c15;
    let mut next = move || {
        // xorshift64: deterministic and fast; statistical quality does not matter here.
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        state
    };
    for i in 0..lines {
        let r = next();
        let (a, b, cin) = (r as u32, (r >> 32) as u32, (next() & 1) as u32);
        let wide = a as i64 - b as i64 - cin as i64;
        let y = wide as u32;
        let borrow = (wide < 0) as u32;
        let signed = a as i32 as i64 - b as i32 as i64 - cin as i64;
        let ovf = (signed != y as i32 as i64) as u32;
        let (zero, neg) = ((y == 0) as u32, y >> 31);
        let s = separator;
        writeln!(
            text,
            "{i}{s}{a:08x}{s}{b:08x}{s}{cin}{s}{y:08x}{s}{borrow}{s}{ovf}{s}{zero}{s}{neg}"
        )
        .unwrap();
    }
    text.into_bytes()
}

/// Reads every row and returns a checksum of the values, so no work can be optimised away.
fn read_all<R: BufRead>(source: R, spec: &Spec) -> (usize, u64) {
    let mut reader = LogReader::new(source, "bench.log", spec, Radix::Hex).unwrap();
    let mut row = LogRow::new();
    let mut rows = 0;
    let mut sum = 0u64;
    while reader.read_row(&mut row).unwrap() {
        rows += 1;
        sum = sum
            .wrapping_add(row.get(Signal::Result).unwrap().bits.low_u64())
            .wrapping_add(row.get(Signal::Negative).unwrap().bits.low_u64())
            .wrapping_add(row.index.unwrap_or(0));
    }
    (rows, sum)
}

fn report(
    label: &str,
    (lines, bytes, passes): (usize, usize, usize),
    mut pass: impl FnMut() -> (usize, u64),
) {
    let mut best = Duration::MAX;
    let mut result = (0, 0);
    for _ in 0..passes {
        let start = Instant::now();
        result = black_box(pass());
        best = best.min(start.elapsed());
    }
    assert_eq!(result.0, lines, "{label}: every line should read as a row");
    let secs = best.as_secs_f64();
    println!(
        "{label:<36} {:>7.2} M lines/s {:>8.1} MB/s  ({:.1} ms, {:.1} ns/line, checksum {:x})",
        lines as f64 / secs / 1e6,
        bytes as f64 / secs / 1e6,
        secs * 1e3,
        secs * 1e9 / lines as f64,
        result.1
    );
}

fn main() {
    let spec = Spec::parse(SPEC, "bench.toml").unwrap();
    let lines = setting("ARITHVEC_BENCH_LINES", 1_000_000);
    let passes = setting("ARITHVEC_BENCH_PASSES", 5).max(1);
    let comma = build_log(",", lines);
    let blank = build_log(" ", lines);
    println!(
        "log reader: {lines} lines of a 32-bit sub log, {:.1} bytes/line, best of {passes}",
        comma.len() as f64 / lines as f64
    );
    let size = |log: &[u8]| (lines, log.len(), passes);
    report("comma-separated, in memory", size(&comma), || {
        read_all(comma.as_slice(), &spec)
    });
    report("comma-separated, 64 KiB BufReader", size(&comma), || {
        read_all(
            BufReader::with_capacity(64 * 1024, Cursor::new(comma.as_slice())),
            &spec,
        )
    });
    report("blank-separated, in memory", size(&blank), || {
        read_all(blank.as_slice(), &spec)
    });
}
