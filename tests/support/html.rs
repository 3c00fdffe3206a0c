//! Support shared by the HTML report's tests (`tests/html_report.rs`, `tests/html_sort.rs`)
//! and its bench (`benches/html.rs`), each of which includes it with `#[path]`: the invented
//! 8-bit adder they check, the result log a unit writes with chosen rows broken, and headless
//! Chromium (Debian's `chromium`, installed by scripts/install-browser.sh).

// Each includer uses only part of this module.
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

/// An invented 8-bit unsigned adder with carry-in and every flag, named `name`, with `count`
/// random vectors from `seed`.
pub fn adder_spec(name: &str, count: u64, seed: u64) -> String {
    format!(
        r#"name = "{name}"
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
count = {count}
seed = {seed}
"#
    )
}

/// Writes `dir/name`, the result log a unit writes for the set in `dir/vec` (its
/// `vectors.csv` without the classes column), with result `y` XORed with `flip` in the rows
/// whose index `breaks` returns true; returns how many rows were broken.
pub fn write_log(dir: &Path, name: &str, flip: u8, breaks: impl Fn(u64) -> bool) -> u64 {
    let csv = std::fs::read_to_string(dir.join("vec/vectors.csv")).unwrap();
    let mut lines = csv.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let y = header.iter().position(|&h| h == "y").unwrap();
    let mut out = String::with_capacity(csv.len());
    out.push_str(&header[..header.len() - 1].join(","));
    out.push('\n');
    let mut broken = 0;
    for line in lines {
        let mut f: Vec<String> = line.split(',').map(str::to_string).collect();
        f.pop();
        let index: u64 = f[0].parse().unwrap();
        if breaks(index) {
            let v = u8::from_str_radix(&f[y], 16).unwrap() ^ flip;
            f[y] = format!("{v:02x}");
            broken += 1;
        }
        out.push_str(&f.join(","));
        out.push('\n');
    }
    std::fs::write(dir.join(name), out).unwrap();
    broken
}

/// Chromium on PATH, if there is one.
pub fn find_chromium() -> Option<PathBuf> {
    ["chromium", "chromium-browser"].iter().find_map(|name| {
        let o = Command::new("which").arg(name).output().ok()?;
        o.status
            .success()
            .then(|| PathBuf::from(String::from_utf8_lossy(&o.stdout).trim()))
    })
}

/// Chromium for a test's browser half: a missing browser fails the test when `CI` is set and
/// otherwise prints a SKIPPED line (and the caller skips the browser half).
pub fn chromium_for_test() -> Option<PathBuf> {
    if let Some(path) = find_chromium() {
        return Some(path);
    }
    if std::env::var_os("CI").is_some() {
        panic!("chromium is missing and CI is set: run scripts/install-browser.sh");
    }
    eprintln!("SKIPPED: chromium not found; the browser half of this test did not run (scripts/install-browser.sh installs it)");
    None
}

/// Headless Chromium with the flags every run here uses and its own profile directory
/// `profile`; the caller adds its arguments and the page.
pub fn headless(chromium: &Path, profile: &Path) -> Command {
    let mut cmd = Command::new(chromium);
    cmd.args([
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
    ])
    .arg(format!("--user-data-dir={}", profile.display()));
    cmd
}

/// Runs a Chromium command built by [`headless`], asserting it succeeded.
pub fn run_browser(mut cmd: Command) -> Output {
    let out = cmd.output().expect("start chromium");
    assert!(
        out.status.success(),
        "chromium failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

/// The first frame of the PNG at `path`: its colour type and pixel bytes.
pub fn png_frame(path: &Path) -> (png::ColorType, Vec<u8>) {
    let file = std::fs::File::open(path).unwrap();
    let decoder = png::Decoder::new(std::io::BufReader::new(file));
    let mut reader = decoder.read_info().expect("a PNG");
    let mut buf = vec![0; reader.output_buffer_size().expect("size")];
    let info = reader.next_frame(&mut buf).expect("a frame");
    buf.truncate(info.buffer_size());
    (info.color_type, buf)
}
