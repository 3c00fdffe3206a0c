//! Issue 10, select units: `operation = "select"` with a `[select]` table. Bad tables are
//! exit 2 at their line; classes are the carried operations' own, prefixed, plus
//! `select.code`; the checker compares only the outputs the selected operation defines
//! (unless `undefined_outputs = "zero"`) and the report says which, per operation.

use crate::support::Sandbox;
use crate::util::VectorCsv;

/// An invented 8-bit ALU spec; `select` is the [select] body, `extra` more tables.
fn alu(select: &str, extra: &str) -> String {
    format!(
        "name = \"ledger_alu\"\noperation = \"select\"\nwidth = 8\nencoding = \"twos\"\n\
         \n[select]\n{select}\n[ports]\na = \"a\"\nb = \"b\"\nselect = \"op\"\nresult = \"rd\"\n\
         carry_out = \"co\"\noverflow = \"v\"\nzero = \"z\"\nnegative = \"n\"\nless = \"lt\"\n\
         equal = \"eq\"\ngreater = \"gt\"\n{extra}\n[random]\ncount = 300\nseed = 3\n"
    )
}

const GOOD: &str = "width = 4\nadd = 0x0\nsub = 0x1\ncompare = 0x5\nnegate = 0x6\n";

#[test]
fn issue10_bad_select_tables_are_refused_at_their_line() {
    let sb = Sandbox::new();
    // (select body, field, line, words in the message). The [select] body starts on line 7.
    let cases: &[(&str, &str, usize, &str)] = &[
        (
            "width = 4\nadd = 0x0\nsub = 0x0\n",
            "select.sub",
            9,
            "already used by select.add",
        ),
        (
            "width = 2\nadd = 0x0\nsub = 0x4\n",
            "select.sub",
            9,
            "does not fit in the select width of 2 bits",
        ),
        (
            "width = 4\nadd = 0x0\nsra = 0x3\n",
            "select.sra",
            9,
            "does not fit the encoding",
        ),
        (
            "width = 4\nadd = 0x0\naddsub = 0x3\n",
            "select.addsub",
            9,
            "own mode port",
        ),
        (
            "width = 4\nadd = 0x0\nfrobnicate = 1\n",
            "select.frobnicate",
            9,
            "unknown key",
        ),
        (
            "width = 0\nadd = 0x0\n",
            "select.width",
            7,
            "must be 1..=16",
        ),
    ];
    for (body, field, line, words) in cases {
        // Drop the comparison ports for tables without compare, so only the table is wrong.
        let mut text = alu(body, "");
        if !body.contains("compare") {
            text = text.replace("less = \"lt\"\nequal = \"eq\"\ngreater = \"gt\"\n", "");
        }
        if body.contains("sra") {
            // sra is defined for twos only.
            text = text.replace("encoding = \"twos\"", "encoding = \"unsigned\"");
        }
        sb.write("bad.toml", &text);
        let run = sb.run(&["classes", "bad.toml"]);
        run.expect_code(2)
            .expect_stderr(&format!("bad.toml:{line}: {field}: "))
            .expect_stderr(words);
    }
    // A port no carried operation has, and a missing select port.
    sb.write("noport.toml", &alu("width = 4\nadd = 0x0\n", ""));
    sb.run(&["classes", "noport.toml"])
        .expect_code(2)
        .expect_stderr("noport.toml:19: ports.less: no operation in [select] has the less port");
    let text = alu(GOOD, "").replace("select = \"op\"\n", "");
    sb.write("nosel.toml", &text);
    sb.run(&["classes", "nosel.toml"])
        .expect_code(2)
        .expect_stderr("ports.select: a select unit needs a `select` port");
}

#[test]
fn issue10_select_classes_are_prefixed_per_operation() {
    let sb = Sandbox::new();
    sb.write("alu.toml", &alu(GOOD, ""));
    sb.gen("alu.toml", "vec", &[]).expect_code(0);
    let csv = VectorCsv::read(&sb, "vec");
    let mut codes = std::collections::BTreeSet::new();
    let mut prefixes = std::collections::BTreeSet::new();
    for i in 0..csv.rows.len() {
        let code = csv.get(i, "op").to_string();
        let want = match code.as_str() {
            "0" => "add.",
            "1" => "sub.",
            "5" => "compare.",
            "6" => "negate.",
            other => panic!("row {i}: unlisted code {other}"),
        };
        for c in csv.classes(i) {
            assert!(
                c == "select.code" || c == "select.switch" || c.starts_with(want),
                "row {i} (code {code}) has class {c}"
            );
            if let Some((p, _)) = c.split_once('.') {
                prefixes.insert(p.to_string());
            }
        }
        assert!(csv.classes(i).contains(&"select.code".to_string()));
        codes.insert(code);
    }
    assert_eq!(codes.len(), 4, "every code is driven: {codes:?}");
    assert_eq!(
        prefixes.into_iter().collect::<Vec<_>>(),
        ["add", "compare", "negate", "select", "sub"]
    );
    // The compare part's own ids keep one prefix.
    let classes = sb.run(&["classes", "alu.toml"]);
    classes
        .expect_code(0)
        .expect_stdout("compare.outcome")
        .expect_stdout("sub.borrow.edge")
        .expect_stdout("select.code");
}

#[test]
fn issue10_outputs_an_operation_does_not_define_are_not_compared_unless_zero() {
    let sb = Sandbox::new();
    sb.write("alu.toml", &alu(GOOD, ""));
    sb.gen("alu.toml", "vec", &[]).expect_code(0);
    let csv = VectorCsv::read(&sb, "vec");
    let mut log = csv.perfect_log();
    // Junk on every output the selected operation does not define.
    for i in 0..log.rows.len() {
        let undefined: &[&str] = match csv.get(i, "op") {
            "5" => &["rd", "co", "v", "z", "n"],
            _ => &["lt", "eq", "gt"],
        };
        for port in undefined {
            let cell = log.cell(i, port);
            *cell = if *port == "rd" {
                "a5".into()
            } else {
                "1".into()
            };
        }
    }
    sb.write("junk.csv", &log.csv());
    let (_, report) = sb.check("alu.toml", "junk.csv", &["--vectors", "vec"], 0);
    assert_eq!(report["verdict"], "pass");
    let per_op = report["operation_outputs"]
        .as_array()
        .expect("per operation");
    let compare = per_op
        .iter()
        .find(|o| o["operation"] == "compare")
        .expect("compare listed");
    assert_eq!(compare["code"], 5);
    assert_eq!(compare["compared"], serde_json::json!(["lt", "eq", "gt"]));
    assert_eq!(
        compare["not_compared"],
        serde_json::json!(["rd", "co", "v", "z", "n"])
    );
    let add = per_op.iter().find(|o| o["operation"] == "add").unwrap();
    assert_eq!(
        add["compared"],
        serde_json::json!(["rd", "co", "v", "z", "n"])
    );
    // The same log fails when the unit must drive 0 on them.
    sb.write(
        "zero.toml",
        &alu(GOOD, "\n[conventions]\nundefined_outputs = \"zero\"\n"),
    );
    sb.gen("zero.toml", "vecz", &[]).expect_code(0);
    let (_, report) = sb.check("zero.toml", "junk.csv", &["--vectors", "vecz"], 1);
    assert_eq!(report["failed"].as_u64(), Some(csv.rows.len() as u64));
    // A wrong defined output still fails under the default.
    let mut bad = csv.perfect_log();
    let row = (0..csv.rows.len())
        .find(|&i| csv.get(i, "op") == "5")
        .unwrap();
    *bad.cell(row, "lt") = if csv.get(row, "lt") == "1" { "0" } else { "1" }.into();
    sb.write("bad.csv", &bad.csv());
    let (_, report) = sb.check("alu.toml", "bad.csv", &["--vectors", "vec"], 1);
    assert_eq!(report["failed"], 1);
    let failure = &report["failures"][0];
    let ports: Vec<&str> = failure["outputs"]
        .as_array()
        .unwrap()
        .iter()
        .map(|o| o["port"].as_str().unwrap())
        .collect();
    assert_eq!(
        ports,
        ["lt", "eq", "gt"],
        "only compare's outputs are shown"
    );
}

#[test]
fn issue10_select_spec_reads_back_and_self_check_needs_zero() {
    let sb = Sandbox::new();
    sb.write("alu.toml", &alu(GOOD, "\n[dut]\nmodule = \"ledger_alu\"\n"));
    sb.gen("alu.toml", "vec", &[]).expect_code(0);
    sb.run(&[
        "testbench",
        "alu.toml",
        "--vectors",
        "vec",
        "--self-check",
        "-o",
        "tb.v",
    ])
    .expect_code(2)
    .expect_stderr("undefined_outputs");
    // repro names the selected operation.
    sb.run(&["repro", "alu.toml", "--index", "0"])
        .expect_code(0)
        .expect_stdout("add");
}

#[test]
fn issue10_active_low_flags_are_inverted_and_bad_entries_refused() {
    let sb = Sandbox::new();
    sb.write(
        "low.toml",
        &alu(GOOD, "\n[conventions]\nactive_low = [\"zero\", \"less\"]\n"),
    );
    sb.write("high.toml", &alu(GOOD, ""));
    sb.gen("low.toml", "low", &[]).expect_code(0);
    sb.gen("high.toml", "high", &[]).expect_code(0);
    let (low, high) = (VectorCsv::read(&sb, "low"), VectorCsv::read(&sb, "high"));
    assert_eq!(low.rows.len(), high.rows.len());
    let flip = |v: &str| if v == "1" { "0" } else { "1" };
    for i in 0..low.rows.len() {
        let defined = |port: &str| match low.get(i, "op") {
            "5" => ["lt", "eq", "gt"].contains(&port),
            _ => !["lt", "eq", "gt"].contains(&port),
        };
        for port in ["z", "lt"] {
            if defined(port) {
                assert_eq!(low.get(i, port), flip(high.get(i, port)), "row {i} {port}");
            }
        }
        assert_eq!(low.get(i, "n"), high.get(i, "n"), "row {i} n");
        assert_eq!(low.get(i, "eq"), high.get(i, "eq"), "row {i} eq");
    }
    // The active-high log fails the active-low spec on exactly the z and lt columns.
    sb.write("highlog.csv", &high.perfect_log().csv());
    let (_, report) = sb.check("low.toml", "highlog.csv", &["--vectors", "low"], 1);
    let ports: Vec<(String, u64)> = report["output_ports"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|p| p["wrong"].as_u64() > Some(0))
        .map(|p| (p["port"].as_str().unwrap().to_string(), 0))
        .collect();
    let names: Vec<&str> = ports.iter().map(|(p, _)| p.as_str()).collect();
    assert_eq!(names, ["z", "lt"]);
    // Bad entries: not a flag, a flag the unit lacks, listed twice.
    for (list, words) in [
        ("[\"result\"]", "\"result\" is not a flag"),
        ("[\"zero\", \"zero\"]", "\"zero\" is listed twice"),
        ("\"zero\"", "expected a list of flag names"),
    ] {
        sb.write(
            "bad.toml",
            &alu(GOOD, &format!("\n[conventions]\nactive_low = {list}\n")),
        );
        sb.run(&["classes", "bad.toml"])
            .expect_code(2)
            .expect_stderr("bad.toml:27: conventions.active_low: ")
            .expect_stderr(words);
    }
    let text = alu(GOOD, "\n[conventions]\nactive_low = [\"overflow\"]\n")
        .replace("overflow = \"v\"\n", "");
    sb.write("nov.toml", &text);
    sb.run(&["classes", "nov.toml"])
        .expect_code(2)
        .expect_stderr("the unit has no overflow port");
}
