//! The HTML report (`--html FILE` on check, merge and grade), run through the real binary:
//! the page parses as HTML without errors, holds no script and escapes every value from a
//! log, and headless Chromium (Debian's `chromium`, installed by scripts/install-browser.sh)
//! renders it: its DOM holds the verdict, the class table and the heat map's SVG, and its
//! screenshot is not blank. A report of 1M vectors with 10,000 failures stays under 5 MB.
//!
//! Without Chromium the browser checks print a loud SKIPPED line, unless `CI` is set, when a
//! missing browser fails the test.

use std::collections::HashSet;
use std::fs;
use std::path::Path;
use std::process::Command;

const BIN: &str = env!("CARGO_BIN_EXE_arithvec");

#[path = "support/html.rs"]
mod html_support;

use html_support::{chromium_for_test as chromium, headless, png_frame, run_browser};

/// An invented 8-bit unsigned adder with carry-in and every flag.
fn tray_counter() -> String {
    html_support::adder_spec("tray_counter", 400, 7)
}

struct Out {
    code: i32,
    stdout: String,
    stderr: String,
}

fn run(dir: &Path, args: &[&str]) -> Out {
    let o = Command::new(BIN)
        .args(args)
        .current_dir(dir)
        .output()
        .expect("start arithvec");
    let out = Out {
        code: o.status.code().unwrap_or(-1),
        stdout: String::from_utf8_lossy(&o.stdout).into_owned(),
        stderr: String::from_utf8_lossy(&o.stderr).into_owned(),
    };
    assert!(!out.stderr.contains("panicked"), "panic: {}", out.stderr);
    out
}

/// A spec and its generated vector set in a fresh directory.
fn setup(count: Option<&str>) -> tempfile::TempDir {
    let dir = tempfile::tempdir().expect("temp dir");
    fs::write(dir.path().join("unit.toml"), tray_counter()).unwrap();
    let mut args = vec!["gen", "unit.toml", "--out", "vec"];
    if let Some(c) = count {
        args.extend(["--count", c]);
    }
    let g = run(dir.path(), &args);
    assert_eq!(g.code, 0, "gen failed: {}{}", g.stdout, g.stderr);
    dir
}

/// The result log a correct unit writes: vectors.csv without its classes column. Rows whose
/// index `breaks` returns true get result bit 4 flipped (a broken bit-4 sum).
fn write_log(dir: &Path, name: &str, breaks: impl Fn(u64) -> bool) -> u64 {
    html_support::write_log(dir, name, 0x10, breaks)
}

fn parse(html: &str) -> scraper::Html {
    scraper::Html::parse_document(html)
}

fn select<'a>(doc: &'a scraper::Html, css: &str) -> Vec<scraper::ElementRef<'a>> {
    let sel = scraper::Selector::parse(css).unwrap();
    doc.select(&sel).collect()
}

/// The page parses with no HTML parse error, has no script, no event-handler attribute and
/// no reference to anything outside the file.
fn assert_clean_page(html: &str) {
    let doc = parse(html);
    assert!(doc.errors.is_empty(), "HTML parse errors: {:?}", doc.errors);
    assert!(select(&doc, "script").is_empty(), "the page has a script");
    for el in doc
        .root_element()
        .descendants()
        .filter_map(scraper::ElementRef::wrap)
    {
        for (name, value) in el.value().attrs() {
            assert!(
                !name.to_ascii_lowercase().starts_with("on"),
                "event handler {name} on <{}>",
                el.value().name()
            );
            if matches!(name, "href" | "src" | "xlink:href") {
                assert!(value.starts_with('#'), "outside reference {name}={value}");
            }
        }
    }
    for bad in ["http://", "https://", "@import", "url(http"] {
        let outside: Vec<&str> = html
            .match_indices(bad)
            .map(|(i, _)| &html[i..(i + 40).min(html.len())])
            .filter(|s| !s.starts_with("http://www.w3.org/2000/svg"))
            .collect();
        assert!(outside.is_empty(), "page refers outside: {outside:?}");
    }
}

fn browser(chromium: &Path, work: &Path, args: &[&str], page: &Path) -> std::process::Output {
    let profile = tempfile::tempdir_in(work).expect("profile dir");
    let mut cmd = headless(chromium, profile.path());
    cmd.args(args).arg(format!("file://{}", page.display()));
    run_browser(cmd)
}

/// Distinct RGB colours of a PNG.
fn distinct_colours(png_path: &Path) -> usize {
    let (colour_type, bytes) = png_frame(png_path);
    let step = match colour_type {
        png::ColorType::Rgba => 4,
        png::ColorType::Rgb => 3,
        other => panic!("unexpected PNG colour type {other:?}"),
    };
    bytes
        .chunks(step)
        .map(|p| (p[0], p[1], p[2]))
        .collect::<HashSet<_>>()
        .len()
}

/// Renders `page` in Chromium: the DOM holds `needles`, the screenshot is not blank.
fn check_in_browser(dir: &Path, page: &Path, needles: &[&str]) {
    let Some(chromium) = chromium() else { return };
    let dom = browser(&chromium, dir, &["--dump-dom"], page);
    let dom = String::from_utf8_lossy(&dom.stdout);
    for n in needles {
        assert!(dom.contains(n), "the rendered DOM lacks {n:?}");
    }
    let shot = dir.join(format!(
        "{}.png",
        page.file_stem().unwrap().to_string_lossy()
    ));
    browser(
        &chromium,
        dir,
        &[
            "--window-size=1280,1600",
            &format!("--screenshot={}", shot.display()),
        ],
        page,
    );
    let colours = distinct_colours(&shot);
    // A blank page has one colour; text alone gives a few dozen anti-aliasing greys. The
    // banner, the bars and the heat map's ramp add many more.
    assert!(colours > 40, "screenshot has only {colours} colours");
}

#[test]
fn issue12_passing_run_renders_a_pass_page() {
    let dir = setup(None);
    write_log(dir.path(), "results.csv", |_| false);
    let c = run(
        dir.path(),
        &[
            "check",
            "unit.toml",
            "--log",
            "results.csv",
            "--vectors",
            "vec",
            "--html",
            "report.html",
        ],
    );
    assert_eq!(c.code, 0, "{}{}", c.stdout, c.stderr);
    let html = fs::read_to_string(dir.path().join("report.html")).unwrap();
    assert_clean_page(&html);
    let doc = parse(&html);
    let banner: Vec<String> = select(&doc, "header.banner")
        .iter()
        .map(|e| e.text().collect())
        .collect();
    assert_eq!(banner.len(), 1);
    assert!(banner[0].contains("PASS"), "{}", banner[0]);
    // The banner's reason is the text report's verdict line.
    let verdict = c
        .stdout
        .lines()
        .find(|l| l.starts_with("verdict: "))
        .unwrap();
    assert!(banner[0].contains(verdict), "{} lacks {verdict}", banner[0]);
    assert!(!select(&doc, "svg.heatmap").is_empty());
    assert!(select(&doc, "path.allfail, path.somefail").is_empty());
    let rows = select(&doc, "table#classes tbody tr");
    assert!(rows.len() > 10, "{} class rows", rows.len());
    for row in &rows {
        let text: String = row.text().collect();
        assert!(
            text.contains("covered") || text.contains("unreachable"),
            "{text}"
        );
    }
    let dd: String = select(&doc, "dl.meta")
        .iter()
        .flat_map(|e| e.text())
        .collect();
    for needle in ["tray_counter", "add", "8 bits", "unsigned", "seed", "0.1.0"] {
        assert!(dd.contains(needle), "meta lacks {needle}: {dd}");
    }
    check_in_browser(
        dir.path(),
        &dir.path().join("report.html"),
        &["PASS", "id=\"classes\"", "<svg class=\"heatmap\""],
    );
}

#[test]
fn issue12_failing_run_marks_the_broken_bit() {
    let dir = setup(None);
    let broken = write_log(dir.path(), "results.csv", |i| i % 3 == 0);
    let c = run(
        dir.path(),
        &[
            "check",
            "unit.toml",
            "--log",
            "results.csv",
            "--vectors",
            "vec",
            "--html",
            "report.html",
            "--json",
            "report.json",
        ],
    );
    assert_eq!(c.code, 1, "{}{}", c.stdout, c.stderr);
    // The text report's one-line bit map points at bit 4 of y, and only there.
    let map = c
        .stdout
        .lines()
        .find(|l| l.starts_with("failing bits in the"))
        .expect("a bit map line");
    assert!(map.contains("y[7:0] ...#...."), "{map}");
    let html = fs::read_to_string(dir.path().join("report.html")).unwrap();
    assert_clean_page(&html);
    let doc = parse(&html);
    let banner: String = select(&doc, "header.banner.fail")[0].text().collect();
    assert!(banner.contains("FAIL"), "{banner}");
    // The page lists the first 100 failures even though the text and JSON keep 10.
    assert_eq!(select(&doc, "div.failure").len(), 100);
    let json: serde_json::Value =
        serde_json::from_str(&fs::read_to_string(dir.path().join("report.json")).unwrap()).unwrap();
    assert_eq!(json["failures"].as_array().unwrap().len(), 10);
    let more: String = select(&doc, "div.failure ~ p strong")
        .iter()
        .flat_map(|e| e.text())
        .collect();
    assert!(
        more.contains(&format!("{} more", broken - 100)),
        "{more} (broken {broken})"
    );
    // Each listed failure marks exactly one differing bit of y: bit 4, the fourth from the
    // right of the 8-bit pattern; and carries its repro command.
    for f in select(&doc, "div.failure").iter().take(5) {
        let marks: Vec<String> = f
            .select(&scraper::Selector::parse("mark.diff").unwrap())
            .map(|m| m.value().attr("title").unwrap_or("").to_string())
            .collect();
        assert!(marks.contains(&"bit 4".to_string()), "{marks:?}");
        let code: String = f
            .select(&scraper::Selector::parse("code").unwrap())
            .flat_map(|e| e.text())
            .collect();
        assert!(
            code.starts_with("arithvec repro unit.toml --index "),
            "{code}"
        );
    }
    check_in_browser(
        dir.path(),
        &dir.path().join("report.html"),
        &[
            "FAIL",
            "id=\"classes\"",
            "<svg class=\"heatmap\"",
            "mismatch at vector",
        ],
    );
}

#[test]
fn issue12_values_from_the_log_are_escaped() {
    let dir = setup(Some("20"));
    write_log(dir.path(), "<script>log.csv", |_| false);
    // Lines whose port values hold markup, kept as bad lines (--lenient); the reader quotes
    // the offending digit, and the log's name is quoted whole.
    let name = dir.path().join("<script>log.csv");
    let mut text = fs::read_to_string(&name).unwrap();
    text.push_str("3,<script>alert(1)</script>,00,0,00,0,0,1,0\n");
    text.push_str("4,\"><img src=x onerror=alert(2)>,00,0,00,0,0,1,0\n");
    fs::write(&name, text).unwrap();
    let c = run(
        dir.path(),
        &[
            "check",
            "unit.toml",
            "--log",
            "<script>log.csv",
            "--vectors",
            "vec",
            "--lenient",
            "--html",
            "report.html",
        ],
    );
    assert_ne!(c.code, 2, "{}{}", c.stdout, c.stderr);
    let html = fs::read_to_string(dir.path().join("report.html")).unwrap();
    assert!(!html.contains("<script"), "raw <script in the page");
    assert!(!html.contains("<img"), "raw <img in the page");
    assert!(
        html.contains("&lt;script&gt;log.csv"),
        "log name not shown escaped"
    );
    assert!(
        html.contains("bad hex digit '&lt;'"),
        "bad line not shown escaped"
    );
    assert_clean_page(&html);
    let doc = parse(&html);
    assert!(select(&doc, "img").is_empty());
    let pre: String = select(&doc, "pre").iter().flat_map(|e| e.text()).collect();
    assert!(
        pre.contains("<script>log.csv") && pre.contains("'<'"),
        "{pre}"
    );
}

#[test]
fn issue12_merge_page_has_a_row_per_run_and_the_union() {
    let dir = setup(None);
    write_log(dir.path(), "good.csv", |_| false);
    write_log(dir.path(), "bad.csv", |i| i == 5);
    for (log, json) in [("good.csv", "good.json"), ("bad.csv", "bad.json")] {
        run(
            dir.path(),
            &[
                "check",
                "unit.toml",
                "--log",
                log,
                "--vectors",
                "vec",
                "--json",
                json,
            ],
        );
    }
    let m = run(
        dir.path(),
        &["merge", "good.json", "bad.json", "--html", "merged.html"],
    );
    assert_eq!(m.code, 1, "{}{}", m.stdout, m.stderr);
    let html = fs::read_to_string(dir.path().join("merged.html")).unwrap();
    assert_clean_page(&html);
    let doc = parse(&html);
    let rows: Vec<String> = select(&doc, "h2 + table tbody tr")
        .iter()
        .map(|r| r.text().collect::<String>())
        .filter(|t| t.contains(".json"))
        .collect();
    assert_eq!(rows.len(), 2, "{rows:?}");
    assert!(
        rows[0].contains("good.json") && rows[0].contains("PASS"),
        "{}",
        rows[0]
    );
    assert!(
        rows[1].contains("bad.json") && rows[1].contains("FAIL"),
        "{}",
        rows[1]
    );
    let union: String = select(&doc, "tfoot tr")[0].text().collect();
    assert!(
        union.contains("union of 2 runs") && union.contains("FAIL"),
        "{union}"
    );
}

#[test]
fn issue12_grade_page_shows_fault_coverage() {
    // The 16-bit two's-complement subtractor of the checked-in example, graded on arithvec's
    // own ripple-borrow model with the directed vectors only.
    let dir = tempfile::tempdir().expect("temp dir");
    let example =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("vector-sets/level_delta/level_delta.toml");
    fs::copy(example, dir.path().join("unit.toml")).unwrap();
    let g = run(
        dir.path(),
        &["gen", "unit.toml", "--out", "vec", "--count", "0"],
    );
    assert_eq!(g.code, 0, "{}{}", g.stdout, g.stderr);
    let g = run(
        dir.path(),
        &[
            "grade",
            "unit.toml",
            "--vectors",
            "vec",
            "--builtin",
            "--compact",
            "--out",
            "vec-min",
            "--html",
            "grade.html",
        ],
    );
    assert!(g.code == 0 || g.code == 3, "{}{}", g.stdout, g.stderr);
    let html = fs::read_to_string(dir.path().join("grade.html")).unwrap();
    assert_clean_page(&html);
    let doc = parse(&html);
    let text: String = doc.root_element().text().collect();
    for needle in [
        "Fault coverage",
        "collapsed",
        "Compacted",
        "vec-min",
        "GRADED",
    ] {
        assert!(text.contains(needle), "grade page lacks {needle}");
    }
    // The page's coverage figure is the one the table prints.
    let pct = g
        .stdout
        .split_whitespace()
        .find(|w| w.ends_with('%'))
        .expect("a coverage figure");
    assert!(text.contains(pct), "page lacks {pct}");
}

#[test]
fn issue12_a_million_vectors_with_ten_thousand_failures_stay_under_5_mb() {
    let dir = setup(Some("1000000"));
    let broken = write_log(dir.path(), "results.csv", |i| i % 100 == 7);
    assert!(broken >= 10_000, "{broken}");
    let c = run(
        dir.path(),
        &[
            "check",
            "unit.toml",
            "--log",
            "results.csv",
            "--vectors",
            "vec",
            "--html",
            "big.html",
            "-q",
        ],
    );
    assert_eq!(c.code, 1, "{}{}", c.stdout, c.stderr);
    let size = fs::metadata(dir.path().join("big.html")).unwrap().len();
    assert!(size < 5 * 1024 * 1024, "report is {size} bytes");
    let html = fs::read_to_string(dir.path().join("big.html")).unwrap();
    assert!(
        html.contains(&format!("{} failing vectors", broken)),
        "count missing"
    );
    assert_clean_page(&html);
}

/// `grade --top-up --html`: the page has a top-up section whose outcome counts, coverage
/// figures and vector table are the ones `--format json` reports for the same run (the
/// 24-bit offset-binary subtractor whose set misses faults on the zero detector).
#[test]
fn grade_page_shows_the_top_up_results() {
    let have_yosys = Command::new("yosys")
        .arg("-V")
        .output()
        .is_ok_and(|o| o.status.success());
    if !have_yosys {
        return;
    }
    let dir = tempfile::tempdir().expect("temp dir");
    let hdl = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/hdl");
    fs::copy(
        hdl.join("specs/behav_offset_sub.toml"),
        dir.path().join("unit.toml"),
    )
    .unwrap();
    let y = Command::new("yosys")
        .current_dir(dir.path())
        .args([
            "-q",
            "-p",
            &format!(
                "read_verilog {}; synth -flatten -top behav_offset_sub; abc -g \
                 AND,NAND,OR,NOR,XOR,XNOR,MUX; opt_clean; write_json sub.json",
                hdl.join("behav/behav_offset_sub.v").display()
            ),
        ])
        .output()
        .expect("yosys");
    assert!(y.status.success(), "{}", String::from_utf8_lossy(&y.stderr));
    let g = run(dir.path(), &["gen", "unit.toml", "--out", "vec"]);
    assert_eq!(g.code, 0, "{}{}", g.stdout, g.stderr);
    let g = run(
        dir.path(),
        &[
            "grade",
            "unit.toml",
            "--vectors",
            "vec",
            "--netlist",
            "sub.json",
            "--top-up",
            "--out",
            "vec2",
            "--html",
            "grade.html",
            "--format",
            "json",
        ],
    );
    assert_eq!(g.code, 0, "{}{}", g.stdout, g.stderr);
    let doc: serde_json::Value = serde_json::from_str(&g.stdout).unwrap();
    let t = &doc["top_up"];
    let added = t["added_vectors"].as_array().unwrap();
    assert!(!added.is_empty(), "{t}");
    let html = fs::read_to_string(dir.path().join("grade.html")).unwrap();
    assert_clean_page(&html);
    let page = parse(&html);
    let cells = |css: &str| -> Vec<Vec<String>> {
        select(&page, css)
            .iter()
            .map(|row| {
                row.select(&scraper::Selector::parse("td").unwrap())
                    .map(|c| c.text().collect::<String>().trim().to_string())
                    .collect()
            })
            .collect()
    };
    let counts = cells("table.topup tbody tr");
    assert_eq!(counts.len(), 1);
    let c = &counts[0];
    let n = |k: &str| t[k].as_u64().unwrap().to_string();
    let by_top_up = t["faults"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|f| f["top_up"]["status"] == "detected")
        .count();
    assert_eq!(c[0], n("collapsed"));
    assert_eq!(c[1], n("detected_before"));
    assert_eq!(c[2], by_top_up.to_string());
    assert_eq!(
        t["detected"].as_u64().unwrap(),
        t["detected_before"].as_u64().unwrap() + by_top_up as u64
    );
    assert!(c[3].starts_with(&n("proven_redundant")), "{c:?}");
    assert_eq!(c[4], n("aborted"));
    assert!(c[5].ends_with(&format!("{:.2}%", t["coverage_percent"].as_f64().unwrap())));
    assert!(c[6].ends_with("100.00%"), "{c:?}");
    // One row per added vector: its index in the written set, the fault and the method.
    let rows = cells("table.topup-vectors tbody tr");
    assert_eq!(rows.len(), added.len());
    let before = t["vectors_before"].as_u64().unwrap();
    for (i, (row, v)) in rows.iter().zip(added).enumerate() {
        assert_eq!(row[0], (before + i as u64).to_string());
        assert_eq!(row[1], v["fault"].as_str().unwrap());
        assert_eq!(row[2], v["method"].as_str().unwrap());
    }
    let text: String = page.root_element().text().collect();
    assert!(text.contains("Test top-up"));
    assert!(text.contains("vec2"));
    assert!(text.contains("the solver stops at the first check past it"));
}
