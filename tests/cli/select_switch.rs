//! Issue 10, `select.switch`: one bin per ordered pair of operations applied back to back
//! (the operation after itself too). The directed set hits every bin by construction, each
//! row of vectors.csv lists the class when the row before it holds a listed code, `classes
//! --bins` lists the pairs, and the checker scores the pairs the log's rows apply.

use crate::support::Sandbox;
use crate::util::VectorCsv;

/// An invented 8-bit ALU spec (add, sub, compare, negate behind a 4-bit code).
pub fn alu(extra_ports: &str, extra: &str) -> String {
    format!(
        "name = \"ledger_alu\"\noperation = \"select\"\nwidth = 8\nencoding = \"twos\"\n\
         \n[select]\nwidth = 4\nadd = 0x0\nsub = 0x1\ncompare = 0x5\nnegate = 0x6\n\
         \n[ports]\na = \"a\"\nb = \"b\"\nselect = \"op\"\nresult = \"rd\"\n\
         carry_out = \"co\"\noverflow = \"v\"\nzero = \"z\"\nnegative = \"n\"\nless = \"lt\"\n\
         equal = \"eq\"\ngreater = \"gt\"\n{extra_ports}{extra}\n[random]\ncount = 300\n\
         seed = 3\n"
    )
}

const OPS: [(&str, &str); 4] = [
    ("0", "add"),
    ("1", "sub"),
    ("5", "compare"),
    ("6", "negate"),
];

fn op_name(code: &str) -> &'static str {
    OPS.iter().find(|(c, _)| *c == code).expect("listed code").1
}

#[test]
fn issue10_select_switch_bins_are_every_ordered_pair_and_the_directed_set_hits_each() {
    let sb = Sandbox::new();
    sb.write("alu.toml", &alu("", ""));
    sb.gen("alu.toml", "vec", &["--count", "0"]).expect_code(0);
    let csv = VectorCsv::read(&sb, "vec");
    // Row i lists select.switch exactly when it has a row before it; the pairs it makes
    // are every ordered pair.
    let mut pairs = std::collections::BTreeSet::new();
    for i in 0..csv.rows.len() {
        let listed = csv.classes(i).contains(&"select.switch".to_string());
        assert_eq!(listed, i > 0, "row {i}: {:?}", csv.classes(i));
        if i > 0 {
            pairs.insert(format!(
                "{}->{}",
                op_name(csv.get(i - 1, "op")),
                op_name(csv.get(i, "op"))
            ));
        }
    }
    let mut all = std::collections::BTreeSet::new();
    for (_, p) in OPS {
        for (_, q) in OPS {
            all.insert(format!("{p}->{q}"));
        }
    }
    assert_eq!(pairs, all, "the directed set alone makes every pair");
    // classes --bins lists the 16 pairs, each reachable and hit by the directed set.
    let run = sb.run(&["classes", "alu.toml", "--bins", "--format", "json"]);
    run.expect_code(0);
    let listing: serde_json::Value = serde_json::from_str(&run.stdout).expect("json");
    let text = listing.to_string();
    for pair in &all {
        assert!(
            text.contains(&format!("select.switch[{pair}]")) || text.contains(pair.as_str()),
            "classes --bins lacks {pair}"
        );
    }
    let plain = sb.run(&["classes", "alu.toml", "--bins"]);
    plain
        .expect_code(0)
        .expect_stdout("select.switch[negate->add]");
    plain.expect_stdout("select.switch[sub->sub]");
}

#[test]
fn issue10_checker_scores_select_switch_from_the_rows_applied() {
    let sb = Sandbox::new();
    sb.write("alu.toml", &alu("", ""));
    sb.gen("alu.toml", "vec", &[]).expect_code(0);
    let csv = VectorCsv::read(&sb, "vec");
    // The whole set: every pair covered.
    sb.write("all.csv", &csv.perfect_log().csv());
    let (_, report) = sb.check("alu.toml", "all.csv", &["--vectors", "vec"], 0);
    let switch = |r: &serde_json::Value| {
        r["classes"]
            .as_array()
            .unwrap()
            .iter()
            .find(|c| c["id"] == "select.switch")
            .expect("select.switch in the report")
            .clone()
    };
    let s = switch(&report);
    assert_eq!(
        (s["bins_total"].as_u64(), s["bins_covered"].as_u64()),
        (Some(16), Some(16))
    );
    assert_eq!(s["status"], "covered");
    // Only the add rows at the start of the set: one pair (add->add) applied.
    let adds = (0..csv.rows.len())
        .take_while(|&i| csv.get(i, "op") == "0")
        .count();
    assert!(adds > 2);
    let mut log = csv.perfect_log();
    log.rows.truncate(adds);
    sb.write("adds.csv", &log.csv());
    let (_, report) = sb.check("alu.toml", "adds.csv", &[], 0);
    let s = switch(&report);
    assert_eq!(s["bins_covered"].as_u64(), Some(1), "{s}");
    assert_eq!(s["status"], "missed");
    let missed = s["missed_bins"].to_string();
    assert!(missed.contains("add->sub"), "{missed}");
    assert!(!missed.contains("add->add"), "{missed}");
    // A wrong result right after a switch fails that pair's bin.
    let row = (1..csv.rows.len())
        .find(|&i| csv.get(i - 1, "op") == "1" && csv.get(i, "op") == "6")
        .expect("a sub->negate pair");
    let mut bad = csv.perfect_log();
    let rd = bad.cell(row, "rd");
    *rd = if rd == "00" { "01".into() } else { "00".into() };
    sb.write("bad.csv", &bad.csv());
    let (_, report) = sb.check("alu.toml", "bad.csv", &["--vectors", "vec"], 1);
    let s = switch(&report);
    assert_eq!(s["status"], "failing", "{s}");
    assert!(s["failing_bins"].to_string().contains("sub->negate"), "{s}");
}
