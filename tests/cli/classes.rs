//! `arithvec classes`: the corner-class catalogue as a table and as JSON, and the promise
//! that the directed vectors hit every reachable bin.

use serde_json::Value;

use crate::util::{spec_text, u64_of, Sandbox, ENCODINGS, FLOW_ADDER, OPERATIONS, VALVE_TRIM};

/// Runs `classes SPEC --format json` and returns the parsed array.
fn classes_json(sb: &Sandbox, spec: &str) -> Vec<Value> {
    let run = sb.run(&["classes", spec, "--format", "json"]);
    run.expect_code(0);
    let v: Value = serde_json::from_str(&run.stdout)
        .unwrap_or_else(|e| panic!("not JSON ({e})\n{}", run.describe()));
    v.as_array().expect("a JSON array").clone()
}

/// The structural promises of the JSON listing.
fn assert_well_formed(list: &[Value], what: &str) {
    assert!(!list.is_empty(), "{what}: no classes");
    let mut ids = std::collections::BTreeSet::new();
    for c in list {
        let id = c["id"]
            .as_str()
            .unwrap_or_else(|| panic!("{what}: no id in {c}"));
        let description = c["description"].as_str().unwrap_or("");
        assert!(!id.is_empty() && !description.is_empty(), "{what}: {c}");
        assert!(ids.insert(id.to_string()), "{what}: duplicate id {id}");
        let bins = c["bins"].as_array().expect("bins");
        assert_eq!(bins.len() as u64, u64_of(&c["bins_total"]), "{what} {id}");
        let reachable = bins.iter().filter(|b| b["reachable"] == true).count() as u64;
        assert_eq!(reachable, u64_of(&c["bins_reachable"]), "{what} {id}");
        assert_eq!(c["reachable"] == true, reachable > 0, "{what} {id}");
        for b in bins {
            assert!(
                b["label"].as_str().is_some_and(|l| !l.is_empty()),
                "{what} {id}: {b}"
            );
            if b["reachable"] == true {
                assert!(
                    u64_of(&b["directed_hits"]) >= 1,
                    "{what}: reachable bin {id}[{}] has no directed vector",
                    b["label"]
                );
            }
        }
        if reachable > 0 {
            assert!(u64_of(&c["directed_vectors"]) >= 1, "{what} {id}");
        }
    }
}

#[test]
fn table_lists_every_class_id() {
    let sb = Sandbox::new();
    let spec = sb.write("valve_trim.toml", VALVE_TRIM);
    let list = classes_json(&sb, &spec);
    let run = sb.run(&["classes", &spec]);
    run.expect_code(0).expect_stdout("valve_trim");
    for c in &list {
        let id = c["id"].as_str().unwrap();
        assert!(
            run.stdout
                .lines()
                .any(|l| l.split('│').any(|cell| cell.trim() == id)),
            "class {id} not in the table\n{}",
            run.describe()
        );
    }
    // With --bins, one row per bin: every class id opens at least one row, and the row count
    // equals the bin count.
    let bins = sb.run(&["classes", &spec, "--bins"]);
    bins.expect_code(0);
    let total: u64 = list.iter().map(|c| u64_of(&c["bins_total"])).sum();
    let rows: Vec<&str> = bins
        .stdout
        .lines()
        .filter(|l| l.starts_with('│'))
        .skip(1)
        .collect();
    assert_eq!(rows.len() as u64, total, "{}", bins.describe());
    for c in &list {
        let id = c["id"].as_str().unwrap();
        assert!(rows.iter().any(|r| r.contains(id)), "no bin row for {id}");
    }
}

#[test]
fn json_has_id_and_description_everywhere_and_directed_hits_every_reachable_bin() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    assert_well_formed(&classes_json(&sb, &spec), "flow_adder");
    // Every operation in every encoding at a small width.
    for op in OPERATIONS {
        for enc in ENCODINGS {
            let name = format!("{op}_{enc}");
            let spec = sb.write(&format!("{name}.toml"), &spec_text(&name, op, enc, 6, 0, 1));
            assert_well_formed(&classes_json(&sb, &spec), &name);
        }
    }
}

#[test]
fn widths_1_and_512_work() {
    let sb = Sandbox::new();
    for (width, op, enc) in [
        (1, "sub", "signmag"),
        (1, "compare", "ones"),
        (512, "addsub", "twos"),
    ] {
        let name = format!("edge_{op}_{width}");
        let spec = sb.write(
            &format!("{name}.toml"),
            &spec_text(&name, op, enc, width, 0, 1),
        );
        let list = classes_json(&sb, &spec);
        assert_well_formed(&list, &name);
        let run = sb.run(&["classes", &spec]);
        run.expect_code(0)
            .expect_stdout(&format!("{width} bits"))
            .expect_stdout(list[0]["id"].as_str().unwrap());
    }
    // At width 1 a sign-magnitude value has no magnitude bits, so some classes cannot be
    // reached; the listing must say so rather than promise them.
    let spec = sb.write("tiny.toml", &spec_text("tiny", "sub", "signmag", 1, 0, 1));
    let list = classes_json(&sb, &spec);
    assert!(
        list.iter().any(|c| c["bins"]
            .as_array()
            .unwrap()
            .iter()
            .any(|b| b["reachable"] == false)),
        "width-1 sign-magnitude lists no unreachable bin"
    );
}

/// Issue 15: `classes` for a signed compare spec lists the comparator classes, each bin of
/// the per-bit families reachable from bit 0 (bit 1 for the lower-bits class) to the top, and
/// the directed vectors hit every one of them.
#[test]
fn issue15_compare_lists_first_difference_classes() {
    let sb = Sandbox::new();
    let spec = sb.write(
        "cmp.toml",
        "name = \"cmp\"\noperation = \"compare\"\nwidth = 12\nencoding = \"twos\"\n\
         [ports]\na = \"a\"\nb = \"b\"\nless = \"lt\"\nequal = \"eq\"\ngreater = \"gt\"\n",
    );
    let list = classes_json(&sb, &spec);
    let find = |id: &str| {
        list.iter()
            .find(|c| c["id"] == id)
            .unwrap_or_else(|| panic!("no class {id} in {list:?}"))
            .clone()
    };
    for (id, bins, reachable) in [
        ("compare.first_difference", 24, 24),
        ("compare.single_bit_difference", 24, 24),
        ("compare.lower_bits_oppose", 24, 22),
        ("compare.equal_specials", 5, 5),
        ("compare.sign_only", 2, 2),
    ] {
        let c = find(id);
        assert_eq!(u64_of(&c["bins_total"]), bins, "{id}: {c}");
        assert_eq!(u64_of(&c["bins_reachable"]), reachable, "{id}: {c}");
    }
    let bins = find("compare.first_difference")["bins"].clone();
    assert_eq!(bins[0]["label"], "bit0.a1b0");
    assert_eq!(bins[23]["label"], "bit11.a0b1");
    // Unsigned compare has no sign bit, so no sign-only class.
    let unsigned = sb.write(
        "cmpu.toml",
        &sb.read("cmp.toml").replace("\"twos\"", "\"unsigned\""),
    );
    assert!(classes_json(&sb, &unsigned)
        .iter()
        .all(|c| c["id"] != "compare.sign_only"));
}
