//! Issue 12: the HTML report's class table sorts on a click without script. The page holds
//! the table once per (column, direction) in `div.sorted` blocks with their own ids; every
//! column heading links to the table sorted by that column, and CSS (`:target`) shows the one
//! the URL names, else the default (worst first). Checked on the page's markup (every order is
//! right, every heading link lands on a table, the rows are the same in each) and in headless
//! Chromium (Debian's `chromium`): opening the page at a sort's fragment shows that order.

use std::collections::BTreeSet;
use std::fs;
use std::path::Path;
use std::process::Command;

const BIN: &str = env!("CARGO_BIN_EXE_arithvec");

#[path = "support/html.rs"]
mod html_support;

use html_support::{chromium_for_test as chromium, headless, png_frame, run_browser};

/// Generates the set, writes a log whose rows with index % 4 == 0 have result bit 2 flipped
/// (so some classes fail, some are covered), checks it with `--html` and returns the page.
fn failing_page(dir: &Path) -> String {
    // An invented 8-bit unsigned adder with carry-in and every flag.
    let spec = html_support::adder_spec("pallet_sum", 300, 11);
    fs::write(dir.join("unit.toml"), spec).unwrap();
    let g = Command::new(BIN)
        .args(["gen", "unit.toml", "--out", "vec", "-q"])
        .current_dir(dir)
        .output()
        .unwrap();
    assert!(g.status.success(), "{}", String::from_utf8_lossy(&g.stderr));
    html_support::write_log(dir, "results.csv", 0x04, |i| i % 4 == 0);
    let c = Command::new(BIN)
        .args([
            "check",
            "unit.toml",
            "--log",
            "results.csv",
            "--vectors",
            "vec",
            "--html",
            "report.html",
        ])
        .current_dir(dir)
        .output()
        .unwrap();
    assert_eq!(
        c.status.code(),
        Some(1),
        "{}",
        String::from_utf8_lossy(&c.stderr)
    );
    fs::read_to_string(dir.join("report.html")).unwrap()
}

fn sel(css: &str) -> scraper::Selector {
    scraper::Selector::parse(css).unwrap()
}

/// One class row: (catalogue #, status word, class id, hits, failures, bins covered share).
type Row = (u64, String, String, u64, u64, f64);

fn rows_of(block: scraper::ElementRef) -> Vec<Row> {
    block
        .select(&sel("tbody tr"))
        .map(|tr| {
            let cells: Vec<String> = tr
                .select(&sel("td"))
                .map(|td| td.text().collect::<String>().trim().to_string())
                .collect();
            let bins: Vec<f64> = cells[5]
                .split('/')
                .map(|s| s.trim().parse().unwrap())
                .collect();
            let share = if bins[1] == 0.0 {
                0.0
            } else {
                bins[0] / bins[1]
            };
            (
                cells[0].parse().unwrap(),
                cells[1].clone(),
                cells[2].clone(),
                cells[3].parse().unwrap(),
                cells[4].parse().unwrap(),
                share,
            )
        })
        .collect()
}

fn status_rank(word: &str) -> u8 {
    if word.contains("FAILING") {
        0
    } else if word.contains("missed") {
        1
    } else if word.contains("covered") {
        2
    } else {
        3
    }
}

#[test]
fn issue12_class_table_sorts_by_every_column_without_script() {
    let dir = tempfile::tempdir().unwrap();
    let html = failing_page(dir.path());
    let doc = scraper::Html::parse_document(&html);
    assert!(
        doc.select(&sel("script")).next().is_none(),
        "the page has a script"
    );
    let blocks: Vec<_> = doc.select(&sel("div.sorts > div.sorted")).collect();
    assert_eq!(blocks.len(), 12, "six columns, two directions each");
    let ids: BTreeSet<String> = blocks
        .iter()
        .map(|b| b.value().attr("id").unwrap().to_string())
        .collect();
    assert_eq!(ids.len(), 12, "ids are unique: {ids:?}");
    // Exactly one default, the last block (so `:target ~ .default` hides it), worst first,
    // and it holds the table#classes the rest of the page's tests use.
    let defaults: Vec<_> = doc.select(&sel("div.sorted.default")).collect();
    assert_eq!(defaults.len(), 1);
    assert_eq!(
        defaults[0].value().attr("id"),
        Some("classes-by-status-asc")
    );
    assert_eq!(
        blocks.last().unwrap().value().attr("id"),
        Some("classes-by-status-asc")
    );
    assert_eq!(doc.select(&sel("table#classes")).count(), 1);
    assert!(html.contains(".sorted:target~.sorted.default{display:none}"));

    let reference: BTreeSet<String> = rows_of(defaults[0]).into_iter().map(|r| r.2).collect();
    assert!(reference.len() > 10, "{} classes", reference.len());
    let failing = rows_of(defaults[0]).iter().filter(|r| r.4 > 0).count();
    assert!(
        failing > 0 && failing < reference.len(),
        "{failing} failing classes"
    );
    for block in &blocks {
        let id = block.value().attr("id").unwrap();
        let rows = rows_of(*block);
        let names: BTreeSet<String> = rows.iter().map(|r| r.2.clone()).collect();
        assert_eq!(names, reference, "{id} holds other rows");
        let desc = id.ends_with("-desc");
        for pair in rows.windows(2) {
            let (x, y) = (&pair[0], &pair[1]);
            let ordered = match id.trim_end_matches("-desc").trim_end_matches("-asc") {
                "classes-by-catalogue" => x.0 < y.0,
                "classes-by-status" => {
                    (status_rank(&x.1), std::cmp::Reverse(x.4))
                        <= (status_rank(&y.1), std::cmp::Reverse(y.4))
                }
                "classes-by-class" => x.2 <= y.2,
                "classes-by-hits" => x.3 <= y.3,
                "classes-by-failures" => x.4 <= y.4,
                "classes-by-bins" => x.5 <= y.5,
                other => panic!("unknown sort {other}"),
            };
            let ordered = if desc {
                // Reversed: the pair is in order read the other way (ties allowed).
                match id.trim_end_matches("-desc") {
                    "classes-by-catalogue" => x.0 > y.0,
                    "classes-by-status" => {
                        (status_rank(&x.1), std::cmp::Reverse(x.4))
                            >= (status_rank(&y.1), std::cmp::Reverse(y.4))
                    }
                    "classes-by-class" => x.2 >= y.2,
                    "classes-by-hits" => x.3 >= y.3,
                    "classes-by-failures" => x.4 >= y.4,
                    "classes-by-bins" => x.5 >= y.5,
                    _ => unreachable!(),
                }
            } else {
                ordered
            };
            assert!(ordered, "{id}: {x:?} before {y:?}");
        }
        // Every sortable heading links to a table on the page; the sorted column says so, and
        // its link reverses the order.
        let headings: Vec<_> = block.select(&sel("thead th")).collect();
        let mut active = 0;
        for th in &headings {
            let Some(a) = th.select(&sel("a.sort")).next() else {
                continue;
            };
            let href = a.value().attr("href").unwrap();
            assert!(ids.contains(&href[1..]), "{id}: heading links to {href}");
            if let Some(dir) = th.value().attr("aria-sort") {
                active += 1;
                assert_eq!(dir, if desc { "descending" } else { "ascending" });
                let text: String = a.text().collect();
                assert!(
                    text.ends_with(if desc { "\u{25BC}" } else { "\u{25B2}" }),
                    "{text}"
                );
                let other = if desc {
                    id.replace("-desc", "-asc")
                } else {
                    id.replace("-asc", "-desc")
                };
                assert_eq!(&href[1..], other, "{id}: the sorted column's link reverses");
            }
        }
        assert_eq!(active, 1, "{id}: one sorted column");
        assert_eq!(
            headings
                .iter()
                .filter(|t| t.select(&sel("a.sort")).next().is_some())
                .count(),
            6
        );
    }
    // The orders really differ (the page is not twelve copies of one order).
    let order_of = |id: &str| -> Vec<String> {
        let block = doc.select(&sel(&format!("div#{id}"))).next().unwrap();
        rows_of(block).into_iter().map(|r| r.2).collect()
    };
    assert_ne!(
        order_of("classes-by-hits-desc"),
        order_of("classes-by-hits-asc")
    );
    assert_ne!(
        order_of("classes-by-hits-desc"),
        order_of("classes-by-status-asc")
    );

    in_browser(dir.path());
}

/// A screenshot of the page opened at `fragment`, as raw bytes of the PNG.
fn screenshot(chromium: &Path, dir: &Path, fragment: &str) -> Vec<u8> {
    let profile = tempfile::tempdir_in(dir).unwrap();
    let shot = dir.join(format!("shot-{fragment}.png"));
    let mut cmd = headless(chromium, profile.path());
    cmd.args(["--hide-scrollbars", "--window-size=1280,10000"])
        .arg(format!("--screenshot={}", shot.display()))
        .arg(format!(
            "file://{}#{fragment}",
            dir.join("report.html").display()
        ));
    run_browser(cmd);
    png_frame(&shot).1
}

/// Every sorted table sits at the same place on the page (only one is displayed), and the
/// window is tall enough to hold the whole page, so screenshots of the page opened at two
/// sorts' fragments differ only if the browser shows a different order for each, and the
/// same fragment twice gives the same picture. Without `:target` working, every fragment
/// would show the default table.
fn in_browser(dir: &Path) {
    let Some(chromium) = chromium() else { return };
    let hits_desc = screenshot(&chromium, dir, "classes-by-hits-desc");
    let hits_desc_again = screenshot(&chromium, dir, "classes-by-hits-desc");
    let hits_asc = screenshot(&chromium, dir, "classes-by-hits-asc");
    let default = screenshot(&chromium, dir, "classes-by-status-asc");
    assert!(
        hits_desc == hits_desc_again,
        "the same sort renders differently twice"
    );
    assert!(
        hits_desc != hits_asc,
        "hits descending and ascending render the same"
    );
    assert!(
        hits_desc != default,
        "hits descending renders as the default order"
    );
}
