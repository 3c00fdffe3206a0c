//! Issue 9, item 20: text tables fit the terminal (`COLUMNS`, else the tty's width) and are
//! drawn in ASCII with `--ascii` or when the locale is not UTF-8; files and pipes without
//! `COLUMNS` keep full-width, box-drawn rows.

use crate::util::{Sandbox, FLOW_ADDER};

/// The width of the widest table line (prose lines above a table are not tables).
fn widest(text: &str) -> usize {
    text.lines()
        .filter(|l| l.starts_with(['┌', '├', '│', '└']))
        .map(|l| l.chars().count())
        .max()
        .unwrap_or(0)
}

#[test]
fn issue9_tables_wrap_to_columns_and_stay_full_width_in_files() {
    let sb = Sandbox::new();
    let spec = sb.write("flow.toml", FLOW_ADDER);
    let full = sb.run(&["classes", &spec]);
    full.expect_code(0);
    assert!(widest(&full.stdout) > 100, "{}", full.stdout);
    assert!(full.stdout.contains('┌'), "{}", full.stdout);
    let narrow = sb.run_with_env(&["classes", &spec], &[("COLUMNS", "60")]);
    narrow.expect_code(0);
    assert!(widest(&narrow.stdout) <= 60, "{}", narrow.stdout);
    // Wrapped, not cut: every class name still appears (possibly split over lines), and the
    // table has more lines than before.
    assert!(narrow.stdout.lines().count() > full.stdout.lines().count());
    assert!(narrow.stdout.contains("carry"), "{}", narrow.stdout);
}

#[test]
fn issue9_ascii_tables_by_flag_or_locale() {
    let sb = Sandbox::new();
    let spec = sb.write("flow.toml", FLOW_ADDER);
    let flag = sb.run(&["classes", &spec, "--bins", "--ascii"]);
    flag.expect_code(0);
    assert!(flag.stdout.is_ascii(), "{}", flag.stdout);
    assert!(flag.stdout.starts_with("+-"), "{}", flag.stdout);
    assert!(flag.stdout.contains("| bin "), "{}", flag.stdout);
    let c = sb.run_with_env(&["classes", &spec, "--bins"], &[("LC_ALL", "C")]);
    c.expect_code(0);
    assert_eq!(c.stdout, flag.stdout, "LC_ALL=C draws as --ascii");
    let latin = sb.run_with_env(
        &["classes", &spec, "--bins"],
        &[("LC_CTYPE", "de_DE.ISO-8859-1")],
    );
    assert_eq!(
        latin.stdout, flag.stdout,
        "a non-UTF-8 charset draws as --ascii"
    );
    let utf8 = sb.run_with_env(&["classes", &spec, "--bins"], &[("LC_ALL", "en_US.UTF-8")]);
    assert!(utf8.stdout.starts_with('┌'), "{}", utf8.stdout);
}
