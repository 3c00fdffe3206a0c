//! Merge throughput: 1,000 shard reports of a 1,000,000-vector set of a 16-bit
//! two's-complement subtractor with borrow-in (1,000 vectors per shard, every one passing),
//! merged by the library (parse + merge) and by the `arithvec merge` command (read, parse,
//! merge, write). Prints the times and their ratio to the goal of 2 s for 1,000 reports.
//!
//! Run with `cargo bench --bench merge`. Not a test: timings on shared machines are noisy.
//! `ARITHVEC_BENCH_SHARDS=N` changes the number of shards.

use std::process::Command;
use std::time::Instant;

use arithvec::{
    merge_reports, write_vector_set, CheckOptions, CheckReport, Checker, Encoding, Generator, Hits,
    Observed, Operation, Shard, Spec, Word, WriteOptions,
};

const GOAL_SECONDS: f64 = 2.0;
const PER_SHARD: u64 = 1000;

fn main() {
    let shards: u64 = std::env::var("ARITHVEC_BENCH_SHARDS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(1000);
    let mut spec = Spec::with_defaults(Operation::Sub, Encoding::Twos, 16);
    spec.name = "bench_merge".into();
    let directed = Generator::new(&spec, Some(0), Some(1)).directed().len() as u64;
    let total = shards * PER_SHARD;
    let generator = Generator::new(&spec, Some(total - directed), Some(1));
    let dir = tempfile::tempdir().expect("temp dir");

    // One real shard manifest; the others differ only in their range.
    let set_dir = dir.path().join("shard0");
    let manifest0 = write_vector_set(
        &generator,
        &spec,
        &set_dir,
        WriteOptions {
            shard: Some(Shard {
                index: 0,
                count: shards,
            }),
            ..WriteOptions::default()
        },
    )
    .expect("write shard 0");
    let started = Instant::now();
    let columns: Vec<_> = spec.outputs().into_iter().map(|(s, _)| s).collect();
    let cat = generator.catalogue();
    let mut hits = Hits::new();
    let mut paths = Vec::new();
    for k in 0..shards {
        let shard = Shard {
            index: k,
            count: shards,
        };
        let range = shard.range(total);
        let mut manifest = manifest0.clone();
        manifest.shard = Some(shard);
        manifest.first_index = range.start;
        manifest.vectors = range.end - range.start;
        let options = CheckOptions {
            threads: 1,
            ..CheckOptions::default()
        };
        let mut checker =
            Checker::new(&spec, &generator, Some(&manifest), &columns, options).expect("checker");
        checker.add_log(&format!("shard{k}.csv"));
        for (line, i) in range.clone().enumerate() {
            let v = generator.vector(i).expect("vector");
            let o = cat.evaluate(&v, &mut hits);
            // The log has the output columns only; operands come from the set by index.
            checker.row(line + 2, Some(i), |s| {
                columns.contains(&s).then(|| Observed {
                    bits: o.get(s),
                    unknown: Word::default(),
                    z: Word::default(),
                })
            });
        }
        let report = checker.finish();
        let path = dir.path().join(format!("shard{k}.json"));
        std::fs::write(&path, serde_json::to_string_pretty(&report).expect("json")).expect("write");
        paths.push(path);
    }
    let bytes: u64 = paths
        .iter()
        .map(|p| std::fs::metadata(p).map_or(0, |m| m.len()))
        .sum();
    println!(
        "{shards} shard reports of {PER_SHARD} vectors ({:.1} MB of JSON) made in {:.1} s",
        bytes as f64 / 1e6,
        started.elapsed().as_secs_f64()
    );

    // The library: parse every report and merge.
    let t = Instant::now();
    let reports: Vec<(String, CheckReport)> = paths
        .iter()
        .map(|p| {
            let text = std::fs::read_to_string(p).expect("read");
            (
                p.display().to_string(),
                serde_json::from_str(&text).expect("report"),
            )
        })
        .collect();
    let parsed = t.elapsed().as_secs_f64();
    let merge_generator = Generator::new(&spec, Some(0), None);
    let merged =
        merge_reports(&spec, &merge_generator, &reports, &CheckOptions::default()).expect("merge");
    let library = t.elapsed().as_secs_f64();
    assert_eq!(merged.vectors, total);
    assert_eq!(merged.log_problems.missing, 0);
    assert_eq!(merged.passed, total, "the bench's logs are perfect");
    println!(
        "library: parse {parsed:.3} s + merge {:.3} s = {library:.3} s ({:.2} of the {GOAL_SECONDS} s goal)",
        library - parsed,
        library / GOAL_SECONDS
    );

    // The command, end to end.
    let out = dir.path().join("merged.json");
    let t = Instant::now();
    let status = Command::new(env!("CARGO_BIN_EXE_arithvec"))
        .arg("merge")
        .args(&paths)
        .arg("-o")
        .arg(&out)
        .arg("-q")
        .status()
        .expect("run arithvec merge");
    let command = t.elapsed().as_secs_f64();
    assert!(status.success(), "arithvec merge failed: {status}");
    println!(
        "arithvec merge of {shards} reports: {command:.3} s ({:.2} of the {GOAL_SECONDS} s goal)",
        command / GOAL_SECONDS
    );
}
