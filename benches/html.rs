//! The HTML report of a large failing run: 1,000,000 vectors of an invented 8-bit unsigned
//! adder with 10,000 failing rows (every hundredth: result bit 4 flipped). Times
//!
//! - `arithvec check` with and without `--html` (the difference is rendering and writing
//!   the page), and the page's size against the 5 MB goal;
//! - headless Chromium (Debian's `chromium`) loading the page, laying it out and dumping the
//!   DOM, and loading it and painting a screenshot, each against the same browser on a
//!   one-line page (the difference is what the report costs the browser) and the 2 s goal.
//!
//! Run with `cargo bench --bench html`. Not a test: timings on shared machines are noisy.
//! Each figure is the best of `ARITHVEC_BENCH_RUNS` runs (default 3). Without Chromium the
//! browser half prints a loud SKIPPED line.

use std::fs;
use std::path::Path;
use std::process::Command;
use std::time::{Duration, Instant};

const BIN: &str = env!("CARGO_BIN_EXE_arithvec");
const GOAL_SECONDS: f64 = 2.0;
const GOAL_BYTES: u64 = 5 * 1024 * 1024;

#[path = "../tests/support/html.rs"]
mod html_support;

use html_support::{find_chromium as chromium, headless};

fn runs() -> usize {
    std::env::var("ARITHVEC_BENCH_RUNS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(3)
}

fn best(mut f: impl FnMut() -> Duration) -> Duration {
    (0..runs()).map(|_| f()).min().unwrap()
}

fn arithvec(dir: &Path, args: &[&str]) -> (Duration, i32) {
    let t = Instant::now();
    let o = Command::new(BIN)
        .args(args)
        .current_dir(dir)
        .output()
        .expect("start arithvec");
    let d = t.elapsed();
    let code = o.status.code().unwrap_or(-1);
    assert!(
        code == 0 || code == 1,
        "arithvec {args:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    (d, code)
}

/// The log a unit with a broken bit-4 sum writes on every hundredth vector.
fn write_log(dir: &Path) -> u64 {
    html_support::write_log(dir, "results.csv", 0x10, |i| i % 100 == 7)
}

fn browse(chromium: &Path, work: &Path, mode: &str, page: &Path) -> Duration {
    let profile = tempfile::tempdir_in(work).unwrap();
    let shot = work.join("shot.png");
    let mut cmd = headless(chromium, profile.path());
    cmd.arg("--window-size=1280,1600");
    if mode == "dom" {
        cmd.arg("--dump-dom");
    } else {
        cmd.arg(format!("--screenshot={}", shot.display()));
    }
    cmd.arg(format!("file://{}", page.display()));
    let t = Instant::now();
    let o = cmd.output().expect("start chromium");
    let d = t.elapsed();
    assert!(
        o.status.success(),
        "chromium: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    d
}

fn main() {
    let dir = tempfile::tempdir().expect("temp dir");
    let d = dir.path();
    fs::write(
        d.join("unit.toml"),
        html_support::adder_spec("bench_tally", 1_000_000, 5),
    )
    .unwrap();
    arithvec(d, &["gen", "unit.toml", "--out", "vec", "-q"]);
    let broken = write_log(d);
    let check = |html: bool| {
        let mut args = vec![
            "check",
            "unit.toml",
            "--log",
            "results.csv",
            "--vectors",
            "vec",
            "-q",
        ];
        if html {
            args.extend(["--html", "big.html"]);
        }
        move || {
            let (t, code) = arithvec(d, &args);
            assert_eq!(code, 1);
            t
        }
    };
    let plain = best(check(false));
    let with_html = best(check(true));
    let page = d.join("big.html");
    let bytes = fs::metadata(&page).unwrap().len();
    let render = with_html.saturating_sub(plain);
    println!("html report of 1,000,000 vectors with {broken} failing rows");
    println!(
        "  page size          {:>10.2} MB   goal {:.0} MB   ratio {:.2}",
        bytes as f64 / 1048576.0,
        GOAL_BYTES as f64 / 1048576.0,
        bytes as f64 / GOAL_BYTES as f64
    );
    println!(
        "  check              {:>10.3} s    with --html {:.3} s   render + write {:.3} s",
        plain.as_secs_f64(),
        with_html.as_secs_f64(),
        render.as_secs_f64()
    );
    let Some(chromium) = chromium() else {
        println!("  SKIPPED: chromium not found; the browser half did not run (scripts/install-browser.sh)");
        return;
    };
    let tiny = d.join("tiny.html");
    fs::write(&tiny, "<!DOCTYPE html><title>t</title><p>t</p>").unwrap();
    for mode in ["dom", "screenshot"] {
        let base = best(|| browse(&chromium, d, mode, &tiny));
        let big = best(|| browse(&chromium, d, mode, &page));
        let cost = big.saturating_sub(base);
        println!(
            "  chromium {:<10} {:>10.3} s    a one-line page {:.3} s   the report's cost {:.3} s   goal {GOAL_SECONDS} s   ratio {:.2}",
            mode,
            big.as_secs_f64(),
            base.as_secs_f64(),
            cost.as_secs_f64(),
            cost.as_secs_f64() / GOAL_SECONDS
        );
    }
}
