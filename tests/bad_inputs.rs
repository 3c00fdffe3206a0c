//! Bad inputs, tried for real (issue 9, "done when"): every case runs the binary in a fresh
//! directory holding a good spec, a vector set, a passing log and its report, with one thing
//! broken; each must exit with its code (2 for bad input or usage), say what is wrong on the
//! first line of standard error (the case's `needle`), never panic, and leave every file as it
//! was: nothing half-written, no temporary file, no new directory.
//!
//! The table in DEVELOPERS.md ("Bad inputs tried") is this list with the exit code and first
//! line each case printed. The test compares it; `ARITHVEC_BLESS=1 cargo test --release --test
//! bad_inputs` rewrites it after a deliberate change.

#[path = "support/mod.rs"]
mod support;

use std::collections::BTreeMap;
use std::path::Path;

use support::Sandbox;

const SPEC: &str = r#"name = "feed_adder"
operation = "add"
width = 8
encoding = "unsigned"

[ports]
a = "a"
b = "b"
carry_in = "cin"
result = "y"
carry_out = "co"
zero = "z"

[random]
count = 20
seed = 5

[dut]
module = "feed_add"
"#;

/// An edit of an existing file: its path and a function of its text.
type Edit = (&'static str, fn(String) -> String);

/// One bad input: what to break, the command, the exit code and a phrase of the first line.
struct Case {
    what: &'static str,
    /// Files to (over)write before the run: (path, contents).
    files: &'static [(&'static str, &'static str)],
    /// An edit of an existing file: (path, function of its text).
    edit: Option<Edit>,
    args: &'static [&'static str],
    code: i32,
    needle: &'static str,
}

const fn case(
    what: &'static str,
    files: &'static [(&'static str, &'static str)],
    args: &'static [&'static str],
    needle: &'static str,
) -> Case {
    Case {
        what,
        files,
        edit: None,
        args,
        code: 2,
        needle,
    }
}

const fn edited(
    what: &'static str,
    edit: Edit,
    args: &'static [&'static str],
    needle: &'static str,
) -> Case {
    Case {
        what,
        files: &[],
        edit: Some(edit),
        args,
        code: 2,
        needle,
    }
}

fn spec_with(from: &str, to: &str) -> String {
    assert!(SPEC.contains(from), "the spec has {from:?}");
    SPEC.replacen(from, to, 1)
}

const CASES: &[Case] = &[
    case("spec file missing", &[], &["gen", "nope.toml", "--out", "o"], "nope.toml"),
    case("spec not TOML", &[("bad.toml", "name = = 1\n")], &["gen", "bad.toml", "--out", "o"], "bad.toml:1"),
    edited("unknown operation", ("spec.toml", |_| spec_with("\"add\"", "\"plus\"")), &["gen", "spec.toml", "--out", "o"], "operation"),
    edited("width 0", ("spec.toml", |_| spec_with("width = 8", "width = 0")), &["gen", "spec.toml", "--out", "o"], "width"),
    edited("width 600", ("spec.toml", |_| spec_with("width = 8", "width = 600")), &["gen", "spec.toml", "--out", "o"], "width"),
    edited("unknown encoding", ("spec.toml", |_| spec_with("\"unsigned\"", "\"gray\"")), &["classes", "spec.toml"], "encoding"),
    edited("unknown top-level key", ("spec.toml", |_| spec_with("[ports]", "colour = 1\n[ports]")), &["classes", "spec.toml"], "colour"),
    edited("duplicate port name", ("spec.toml", |_| spec_with("b = \"b\"", "b = \"a\"")), &["classes", "spec.toml"], "ports.b"),
    edited("reserved port name", ("spec.toml", |_| spec_with("result = \"y\"", "result = \"index\"")), &["classes", "spec.toml"], "ports.result"),
    edited("port the operation lacks", ("spec.toml", |_| spec_with("zero = \"z\"", "zero = \"z\"\nmode = \"m\"")), &["classes", "spec.toml"], "ports.mode"),
    edited("negative random count", ("spec.toml", |_| spec_with("count = 20", "count = -3")), &["classes", "spec.toml"], "random.count"),
    edited("convention without effect", ("spec.toml", |_| spec_with("[random]", "[conventions]\nnegative_zero = \"either\"\n\n[random]")), &["classes", "spec.toml"], "conventions.negative_zero"),
    edited("bad module name", ("spec.toml", |_| spec_with("module = \"feed_add\"", "module = \"9feed\"")), &["classes", "spec.toml"], "dut.module"),
    case("shard index out of range", &[], &["gen", "spec.toml", "--out", "o", "--shard", "4/4"], "--shard"),
    case("shard not I/N", &[], &["gen", "spec.toml", "--out", "o", "--shard", "two"], "--shard"),
    case("count that overflows", &[], &["gen", "spec.toml", "--out", "o", "--count", "18446744073709551615"], "count"),
    case("count not a number", &[], &["gen", "spec.toml", "--out", "o", "--count", "many"], "--count"),
    case("gen output is the spec", &[], &["gen", "spec.toml", "--out", "spec.toml"], "spec.toml"),
    case("threads 0", &[], &["gen", "spec.toml", "--out", "o", "--threads", "0"], "threads"),
    case("repro index past the set", &[], &["repro", "spec.toml", "--index", "5000"], "5000"),
    case("repro unknown format", &[], &["repro", "spec.toml", "--index", "1", "--format", "xml"], "xml"),
    edited("testbench without [dut]", ("spec.toml", |t| t.replace("[dut]\nmodule = \"feed_add\"\n", "")), &["testbench", "spec.toml", "--vectors", "vec", "-o", "tb.v"], "dut"),
    case("testbench vector set missing", &[], &["testbench", "spec.toml", "--vectors", "none", "-o", "tb.v"], "none"),
    edited("stimulus.hex edited", ("vec/stimulus.hex", |t| t.replacen("0", "1", 1)), &["testbench", "spec.toml", "--vectors", "vec", "-o", "tb.v"], "stimulus.hex"),
    edited("vectors.csv truncated", ("vec/vectors.csv", |t| t[..t.len() / 2].to_string()), &["check", "spec.toml", "--log", "log.csv", "--vectors", "vec"], "vectors.csv"),
    edited("manifest not JSON", ("vec/manifest.json", |t| t[..10].to_string()), &["check", "spec.toml", "--log", "log.csv", "--vectors", "vec"], "manifest.json"),
    case("testbench output over an input", &[], &["testbench", "spec.toml", "--vectors", "vec", "-o", "vec/stimulus.hex"], "stimulus.hex"),
    case("unknown HDL", &[], &["testbench", "spec.toml", "--vectors", "vec", "--hdl", "systemc"], "systemc"),
    case("log missing", &[], &["check", "spec.toml", "--log", "gone.csv"], "gone.csv"),
    case("log header with an unknown column", &[("odd.csv", "index,a,b,cin,y,co,z,colour\n0,00,00,0,00,0,1,0\n")], &["check", "spec.toml", "--log", "odd.csv"], "odd.csv"),
    case("log with a bad digit", &[("digit.csv", "index,a,b,cin,y,co,z\n0,00,00,0,0g,0,1\n")], &["check", "spec.toml", "--log", "digit.csv"], "digit.csv"),
    case("empty log", &[("empty.csv", "")], &["check", "spec.toml", "--log", "empty.csv"], "empty.csv"),
    case("log with no output column", &[("inputs.csv", "index,a,b,cin\n0,00,00,0\n")], &["check", "spec.toml", "--log", "inputs.csv"], "inputs.csv"),
    case("log index negative", &[("neg.csv", "index,a,b,cin,y,co,z\n-1,00,00,0,00,0,1\n")], &["check", "spec.toml", "--log", "neg.csv"], "neg.csv"),
    case("require 101", &[], &["check", "spec.toml", "--log", "log.csv", "--require", "101"], "--require"),
    case("require nan", &[], &["check", "spec.toml", "--log", "log.csv", "--require", "nan"], "--require"),
    case("unknown radix", &[], &["check", "spec.toml", "--log", "log.csv", "--radix", "oct"], "oct"),
    case("json and junit the same file", &[], &["check", "spec.toml", "--log", "log.csv", "--json", "x", "--junit", "x"], "x"),
    case("json over the log", &[], &["check", "spec.toml", "--log", "log.csv", "--json", "log.csv"], "log.csv"),
    case("vector set of another spec", &[("other.toml", "name = \"other\"\noperation = \"sub\"\nwidth = 8\nencoding = \"twos\"\n\n[ports]\na = \"a\"\nb = \"b\"\nresult = \"y\"\n")], &["check", "other.toml", "--log", "log.csv", "--vectors", "vec"], "different spec"),
    case("merge a missing report", &[], &["merge", "r.json", "gone.json"], "gone.json"),
    case("merge the same report twice", &[], &["merge", "r.json", "r.json"], "r.json"),
    case("merge a file that is not JSON", &[("junk.json", "{ not json")], &["merge", "r.json", "junk.json"], "junk.json"),
    case("grade netlist missing", &[], &["grade", "spec.toml", "--vectors", "vec", "--netlist", "gone.json"], "gone.json"),
    case("grade netlist not JSON", &[("net.json", "[1, 2")], &["grade", "spec.toml", "--vectors", "vec", "--netlist", "net.json"], "net.json"),
    case("grade require -1", &[], &["grade", "spec.toml", "--vectors", "vec", "--builtin", "--require=-1"], "--require"),
    case("grade without a netlist", &[], &["grade", "spec.toml", "--vectors", "vec"], "required arguments were not provided"),
    case("grade compact over its input", &[], &["grade", "spec.toml", "--vectors", "vec", "--builtin", "--compact", "--out", "vec"], "vec"),
    case("unknown subcommand", &[], &["frobnicate"], "frobnicate"),
    case("seed not a number", &[], &["gen", "spec.toml", "--out", "o", "--seed", "abc"], "--seed"),
    edited("timing latency 0 with a clock", ("spec.toml", |_| format!("{SPEC}\n[timing]\nclock = \"clk\"\nlatency = 0\n")), &["classes", "spec.toml"], "timing.latency"),
    edited("timing valid_out without a clock", ("spec.toml", |_| format!("{SPEC}\n[timing]\nlatency = 2\nvalid_out = \"done\"\n")), &["classes", "spec.toml"], "timing.valid_out"),
    edited("timing unknown key", ("spec.toml", |_| format!("{SPEC}\n[timing]\nclock = \"clk\"\nlatency = 2\nclock_period = 10\n")), &["classes", "spec.toml"], "timing.clock_period"),
    edited("timing port colliding with a port", ("spec.toml", |_| format!("{SPEC}\n[timing]\nclock = \"clk\"\nlatency = 2\nvalid_in = \"cin\"\n")), &["classes", "spec.toml"], "timing.valid_in"),
    edited("timing interval 0", ("spec.toml", |_| format!("{SPEC}\n[timing]\nclock = \"clk\"\nlatency = 2\ninterval = 0\n")), &["classes", "spec.toml"], "timing.interval"),
    case("stall without a clocked unit", &[], &["testbench", "spec.toml", "--vectors", "vec", "-o", "tb.v", "--stall-every", "4"], "stalls need a clocked unit"),
    case("reset-known without a clocked unit", &[], &["check", "spec.toml", "--log", "log.csv", "--reset-known"], "--reset-known"),
    edited("add_sat with a carry_in port", ("spec.toml", |_| spec_with("\"add\"", "\"add_sat\"")), &["classes", "spec.toml"], "ports.carry_in"),
    edited("sub_sat with an overflow port", ("spec.toml", |_| spec_with("\"add\"", "\"sub_sat\"").replace("carry_in = \"cin\"\n", "").replace("carry_out = \"co\"", "overflow = \"ov\"")), &["classes", "spec.toml"], "ports.overflow"),
    edited("packed flag bit used twice", ("spec.toml", |_| packed("carry_out = 0\nzero = 0\n")), &["classes", "spec.toml"], "flags.zero"),
    edited("packed flag bit outside its port", ("spec.toml", |_| packed("width = 2\ncarry_out = 0\nzero = 2\n")), &["classes", "spec.toml"], "flags.zero"),
    edited("packed flag the operation lacks", ("spec.toml", |_| packed("zero = 0\nless = 1\n")), &["classes", "spec.toml"], "flags.less"),
    edited("[flags] without ports.flags", ("spec.toml", |_| spec_with("[random]", "[flags]\noverflow = 0\n\n[random]")), &["classes", "spec.toml"], "flags"),
];

/// The spec with its carry and zero flags packed in port `f`, laid out by `[flags]` `body`.
fn packed(body: &str) -> String {
    spec_with("carry_out = \"co\"\nzero = \"z\"\n", "flags = \"f\"\n").replacen(
        "[random]",
        &format!("[flags]\n{body}\n[random]"),
        1,
    )
}

/// Every file under `dir` with its contents.
fn snapshot(dir: &Path) -> BTreeMap<String, Vec<u8>> {
    let mut out = BTreeMap::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(d) = stack.pop() {
        for entry in std::fs::read_dir(&d).expect("list") {
            let entry = entry.expect("entry");
            let path = entry.path();
            let rel = path
                .strip_prefix(dir)
                .expect("inside")
                .display()
                .to_string();
            if entry.file_type().expect("type").is_dir() {
                out.insert(format!("{rel}/"), Vec::new());
                stack.push(path);
            } else {
                out.insert(rel, std::fs::read(&path).expect("read"));
            }
        }
    }
    out
}

/// The good starting point: spec, vector set, passing log and its report.
fn fixture() -> Sandbox {
    let sb = Sandbox::new();
    sb.write("spec.toml", SPEC);
    sb.gen("spec.toml", "vec", &[]);
    let csv = sb.read("vec/vectors.csv");
    let log: String = csv
        .lines()
        .map(|l| {
            let cut = l.rfind(',').expect("a classes column");
            format!("{}\n", &l[..cut])
        })
        .collect();
    sb.write("log.csv", &log);
    sb.run(&[
        "check",
        "spec.toml",
        "--log",
        "log.csv",
        "--vectors",
        "vec",
        "--json",
        "r.json",
        "-q",
    ])
    .expect_code(0);
    sb
}

/// A first line as the table shows it: hashes (runs of 32 or more hex digits) replaced by
/// `<hash>`, so the table does not change with every report format change, and cut at 110
/// characters.
fn shown(line: &str) -> String {
    let mut out = String::new();
    let mut run = String::new();
    let flush = |run: &mut String, out: &mut String| {
        if run.len() >= 32 {
            out.push_str("<hash>");
        } else {
            out.push_str(run);
        }
        run.clear();
    };
    for c in line.chars() {
        if c.is_ascii_hexdigit() {
            run.push(c);
        } else {
            flush(&mut run, &mut out);
            out.push(c);
        }
    }
    flush(&mut run, &mut out);
    if out.chars().count() > 110 {
        out = out.chars().take(110).collect::<String>() + "…";
    }
    out
}

fn table(rows: &[(String, String, i32, String)]) -> String {
    let mut t = String::from(
        "| # | bad input | command | exit | first line of the message |\n|---|---|---|---|---|\n",
    );
    for (i, (what, command, code, first)) in rows.iter().enumerate() {
        let cell = |s: &str| s.replace('|', "\\|");
        t.push_str(&format!(
            "| {} | {} | `{}` | {code} | {} |\n",
            i + 1,
            cell(what),
            cell(command),
            cell(&shown(first))
        ));
    }
    t
}

const BEGIN: &str = "<!-- bad-inputs table: generated by tests/bad_inputs.rs -->\n";
const END: &str = "<!-- end of bad-inputs table -->\n";

#[test]
fn every_bad_input_is_refused_cleanly_and_the_table_is_true() {
    assert!(CASES.len() >= 40, "at least 40 bad inputs");
    let mut rows = Vec::new();
    let mut problems = Vec::new();
    for case in CASES {
        let sb = fixture();
        for (path, text) in case.files {
            sb.write(path, text);
        }
        if let Some((path, edit)) = case.edit {
            let text = sb.read(path);
            sb.write(path, &edit(text));
        }
        let before = snapshot(sb.root());
        let run = sb.run(case.args);
        let after = snapshot(sb.root());
        let first = run.stderr.lines().next().unwrap_or("").trim().to_string();
        if run.code != case.code {
            problems.push(format!(
                "{}: exit {} (want {})\n{}",
                case.what,
                run.code,
                case.code,
                run.describe()
            ));
        }
        if !first.contains(case.needle) {
            problems.push(format!(
                "{}: first line {first:?} lacks {:?}\n{}",
                case.what,
                case.needle,
                run.describe()
            ));
        }
        if before != after {
            let changed: Vec<&String> = before
                .keys()
                .chain(after.keys())
                .filter(|k| before.get(*k) != after.get(*k))
                .collect();
            problems.push(format!("{}: files changed: {changed:?}", case.what));
        }
        rows.push((
            case.what.to_string(),
            format!("arithvec {}", case.args.join(" ")),
            run.code,
            first,
        ));
    }
    assert!(problems.is_empty(), "{}", problems.join("\n\n"));

    let generated = table(&rows);
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("DEVELOPERS.md");
    let doc = std::fs::read_to_string(&path).expect("read DEVELOPERS.md");
    let (Some(a), Some(b)) = (doc.find(BEGIN), doc.find(END)) else {
        panic!("DEVELOPERS.md lacks the markers {BEGIN:?} and {END:?}");
    };
    let current = &doc[a + BEGIN.len()..b];
    if std::env::var_os("ARITHVEC_BLESS").is_some() {
        let updated = format!("{}{BEGIN}{generated}{}", &doc[..a], &doc[b..]);
        std::fs::write(&path, updated).expect("write DEVELOPERS.md");
    } else {
        assert_eq!(
            current, generated,
            "DEVELOPERS.md's bad-inputs table is out of date; rerun with ARITHVEC_BLESS=1"
        );
    }
}
