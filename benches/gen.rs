//! Generation throughput: 1,000,000 vectors of a 32-bit two's-complement subtractor with
//! borrow-in, written as vectors.csv, stimulus.hex, expected.hex and manifest.json (hashes
//! included). Prints vectors/s, CPU time and cores busy, the ratio to a bare formatter
//! writing files of the same shape (no model, no classes, no hashes), and the peak resident
//! memory at growing counts (it should stay flat: the writer streams).
//!
//! Every size runs twice: "disk" writes into a temporary directory on the file system of
//! the build (the target directory), "memory" into a directory under /dev/shm (a tmpfs, so
//! no disk is involved) when it exists. The disk figure depends on the disk; the memory one
//! shows what the generator itself does.
//!
//! Run with `cargo bench --bench gen`. Not a test: timings on shared machines are noisy.
//! `ARITHVEC_BENCH_VECTORS=N` runs one size only, into memory (for callgrind),
//! `ARITHVEC_BENCH_THREADS=T` sets the writer's thread count, and `ARITHVEC_BENCH_BIG=1` adds
//! a run of 100,000,000 vectors to disk (about 11 GB, removed afterwards) to show the peak
//! RSS staying flat.
//!
//! Last, a 32 x 32 multiplier and a 64-bit divider are generated at the same count and
//! compared with the 32-bit subtractor (goal: at least 0.5x its vectors per second).
//!
//! The peer ("bare formatter") writes files of the same shape from the same ChaCha stream
//! with plain `write!` formatting and no model, classes or hashes; the goal is arithvec at
//! no less than 0.6x its rate.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::time::Instant;

use arithvec::{write_vector_set, Encoding, Generator, Operation, Spec, WriteOptions};

/// CPU seconds (user + system) this process has used so far, all threads.
fn cpu_seconds() -> f64 {
    let stat = std::fs::read_to_string("/proc/self/stat").unwrap_or_default();
    // Fields after the parenthesised command name; utime and stime are the 12th and 13th,
    // in clock ticks (100 per second on Linux; proc(5)).
    let rest = stat.rsplit(')').next().unwrap_or("");
    let f: Vec<u64> = rest
        .split_whitespace()
        .map(|v| v.parse().unwrap_or(0))
        .collect();
    if f.len() < 13 {
        return 0.0;
    }
    (f[11] + f[12]) as f64 / 100.0
}

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

/// Writes 3 files with the same row shapes from the same ChaCha stream, with plain
/// formatting (`write!`), a borrow computed inline, a fixed class text, and no model, no
/// classification and no hashes: the peer the goal compares with.
fn bare(g: &Generator, dir: &Path, n: u64) {
    let mut csv = std::io::BufWriter::new(std::fs::File::create(dir.join("bare.csv")).unwrap());
    let mut stim = std::io::BufWriter::new(std::fs::File::create(dir.join("bare_s.hex")).unwrap());
    let mut exp = std::io::BufWriter::new(std::fs::File::create(dir.join("bare_e.hex")).unwrap());
    let mut stream = g.random_stream(0);
    for i in 0..n {
        let v = stream.next_inputs();
        let (a, b, c) = (
            v.a.low_u64() as u32,
            v.b.low_u64() as u32,
            v.carry_in as u32,
        );
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

/// A fresh directory under `root`, removed when dropped.
struct Scratch(PathBuf);

impl Scratch {
    fn new(root: &Path, name: &str) -> Scratch {
        let dir = root.join(format!("arithvec-gen-bench-{}-{name}", std::process::id()));
        std::fs::create_dir_all(&dir).expect("scratch dir");
        Scratch(dir)
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

fn main() {
    let mut spec = Spec::with_defaults(Operation::Sub, Encoding::Twos, 32);
    spec.name = "bench_sub32".into();
    let threads: usize = std::env::var("ARITHVEC_BENCH_THREADS")
        .map(|t| t.parse().expect("ARITHVEC_BENCH_THREADS is a number"))
        .unwrap_or(0);
    let single = std::env::var("ARITHVEC_BENCH_VECTORS").ok().map(|n| {
        n.parse::<u64>()
            .expect("ARITHVEC_BENCH_VECTORS is a number")
    });
    let shm = Path::new("/dev/shm");
    let mut targets: Vec<(&str, Scratch)> = Vec::new();
    if single.is_none() {
        targets.push((
            "disk",
            Scratch::new(Path::new(env!("CARGO_TARGET_TMPDIR")), "disk"),
        ));
    }
    if shm.is_dir() {
        targets.push(("memory", Scratch::new(shm, "memory")));
    } else if single.is_some() {
        targets.push((
            "disk",
            Scratch::new(Path::new(env!("CARGO_TARGET_TMPDIR")), "disk"),
        ));
    }
    let sizes = match single {
        Some(n) => vec![n],
        None => vec![250_000u64, 1_000_000, 4_000_000],
    };
    let big = std::env::var_os("ARITHVEC_BENCH_BIG").is_some();
    for (place, dir) in &targets {
        // 100M vectors are about 11 GB of files: to disk only, never into memory.
        let mut sizes = sizes.clone();
        if big && *place == "disk" {
            sizes.push(100_000_000);
        }
        let (mut one_m, mut one_m_cpu) = (0.0, 0.0);
        for &count in &sizes {
            let g = Generator::new(&spec, Some(count), Some(1));
            let cpu = cpu_seconds();
            let t = Instant::now();
            let options = WriteOptions {
                threads,
                ..WriteOptions::default()
            };
            let m = write_vector_set(&g, &spec, &dir.0, options).expect("write");
            let secs = t.elapsed().as_secs_f64();
            let cpu = cpu_seconds() - cpu;
            let rate = m.vectors as f64 / secs;
            if count == 1_000_000 {
                one_m = rate;
                one_m_cpu = cpu;
            }
            println!(
                "gen {:>9} vectors to {place:<6}: {secs:>6.2} s wall, {cpu:>5.2} s CPU ({:.2} \
                 cores busy), {:>6.2} M vectors/s, peak RSS {} KiB",
                m.vectors,
                cpu / secs,
                rate / 1e6,
                peak_rss_kib()
            );
        }
        if single.is_some() {
            continue;
        }
        let n = 1_000_000u64;
        let g = Generator::new(&spec, Some(n), Some(1));
        let cpu = cpu_seconds();
        let t = Instant::now();
        bare(&g, &dir.0, n);
        let secs = t.elapsed().as_secs_f64();
        let cpu = cpu_seconds() - cpu;
        let bare_rate = n as f64 / secs;
        println!(
            "bare formatter to {place}: {:.2} M vectors/s ({cpu:.2} s CPU, one thread)",
            bare_rate / 1e6
        );
        println!(
            "arithvec / bare formatter ({place}): {:.2}x wall   goal: >= 0.6x   \
             (CPU seconds, bare / arithvec: {:.2})",
            one_m / bare_rate,
            cpu / one_m_cpu.max(1e-9)
        );
    }
    println!("goal: >= 10 M vectors/s on a 2-core machine");
    if let Some((place, dir)) = targets.last() {
        operations_against_sub32(place, &dir.0, single.unwrap_or(1_000_000), threads);
    }
}

/// Generation rate of a 32 x 32 multiplier (twos, full 64-bit product) and a 64-bit divider
/// (divrem, twos) against the 32-bit subtractor, same count, same place.
fn operations_against_sub32(place: &str, dir: &Path, count: u64, threads: usize) {
    let rate = |spec: &Spec| {
        let g = Generator::new(spec, Some(count), Some(1));
        let t = Instant::now();
        let options = WriteOptions {
            threads,
            ..WriteOptions::default()
        };
        let m = write_vector_set(&g, spec, dir, options).expect("write");
        m.vectors as f64 / t.elapsed().as_secs_f64()
    };
    let mut sub = Spec::with_defaults(Operation::Sub, Encoding::Twos, 32);
    sub.name = "bench_sub32".into();
    let mut mul = Spec::with_defaults(Operation::Mul, Encoding::Twos, 32);
    mul.name = "bench_mul32".into();
    let mut div = Spec::with_defaults(Operation::DivRem, Encoding::Twos, 64);
    div.name = "bench_div64".into();
    let base = rate(&sub);
    println!(
        "sub32 {count} vectors to {place}: {:.2} M vectors/s",
        base / 1e6
    );
    for (label, spec) in [("mul 32x32", &mul), ("divrem 64", &div)] {
        let r = rate(spec);
        println!(
            "{label} {count} vectors to {place}: {:.2} M vectors/s, {:.2}x the 32-bit \
             subtractor   goal: >= 0.5x",
            r / 1e6,
            r / base
        );
    }
}
