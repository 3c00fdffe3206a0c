//! Generation throughput: 1,000,000 vectors of a 32-bit two's-complement subtractor with
//! borrow-in, written as vectors.csv, stimulus.hex and expected.hex. Prints vectors/s, the
//! ratio to a bare formatter writing files of the same shape (no model, no classes), and the
//! peak resident memory at growing counts (it should stay flat: the writer streams).
//!
//! Run with `cargo bench --bench gen`. Not a test: timings on shared machines are noisy.

use std::io::Write;
use std::time::Instant;

use arithvec::{write_vector_set, Encoding, Generator, Operation, Spec, WriteOptions};

fn peak_rss_kib() -> u64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines()
                .find(|l| l.starts_with("VmHWM:"))
                .and_then(|l| l.split_whitespace().nth(1).and_then(|v| v.parse().ok()))
        })
        .unwrap_or(0)
}

/// Writes 3 files with the same row shapes using plain formatting and a xorshift source.
fn bare(dir: &std::path::Path, n: u64) {
    let mut csv = std::io::BufWriter::new(std::fs::File::create(dir.join("bare.csv")).unwrap());
    let mut stim = std::io::BufWriter::new(std::fs::File::create(dir.join("bare_s.hex")).unwrap());
    let mut exp = std::io::BufWriter::new(std::fs::File::create(dir.join("bare_e.hex")).unwrap());
    let mut x: u64 = 0x9e3779b97f4a7c15;
    for i in 0..n {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        let (a, b, c) = (x as u32, (x >> 32) as u32, (x >> 63) as u32);
        let (d, o1) = a.overflowing_sub(b);
        let (d, o2) = d.overflowing_sub(c);
        let bo = (o1 || o2) as u32;
        writeln!(
            csv,
            "{i},{a:08x},{b:08x},{c},{d:08x},{bo},0,{},{},result.bits chain.length cell.rows",
            (d == 0) as u32,
            d >> 31
        )
        .unwrap();
        writeln!(
            stim,
            "{:017x}",
            ((a as u128) << 33) | ((b as u128) << 1) | c as u128
        )
        .unwrap();
        writeln!(
            exp,
            "{:09x}",
            ((d as u64) << 4) | ((bo as u64) << 3) | ((d >> 31) as u64)
        )
        .unwrap();
    }
}

fn main() {
    let mut spec = Spec::with_defaults(Operation::Sub, Encoding::Twos, 32);
    spec.name = "bench_sub32".into();
    let dir = tempfile::tempdir().expect("temp dir");
    let n = 1_000_000u64;

    let t = Instant::now();
    bare(dir.path(), n);
    let bare_rate = n as f64 / t.elapsed().as_secs_f64();

    let mut rates = Vec::new();
    for count in [250_000u64, 1_000_000, 4_000_000] {
        let g = Generator::new(&spec, Some(count), Some(1));
        let t = Instant::now();
        let m = write_vector_set(&g, &spec, dir.path(), WriteOptions::default()).expect("write");
        let secs = t.elapsed().as_secs_f64();
        let rate = m.vectors as f64 / secs;
        println!(
            "gen {:>9} vectors: {:>6.2} s, {:>6.2} M vectors/s, peak RSS {} KiB",
            m.vectors,
            secs,
            rate / 1e6,
            peak_rss_kib()
        );
        rates.push((count, rate));
    }
    let one_m = rates
        .iter()
        .find(|(c, _)| *c == 1_000_000)
        .map(|r| r.1)
        .unwrap_or(0.0);
    println!("bare formatter: {:.2} M vectors/s", bare_rate / 1e6);
    println!("arithvec / bare formatter: {:.2}", one_m / bare_rate);
    println!("goal: >= 10 M vectors/s on a 2-core machine");
}
