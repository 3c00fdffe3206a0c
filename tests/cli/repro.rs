//! `arithvec repro`: one vector again from (spec, seed, index), identical to the vector set.

use crate::util::{hex_to_bin, u64_of, Sandbox, VectorCsv, FLOW_ADDER, VALVE_TRIM};

/// Runs `repro SPEC --index I --format csv` plus `extra`.
fn repro_csv(sb: &Sandbox, spec: &str, index: u64, extra: &[&str]) -> String {
    let i = index.to_string();
    let mut args = vec!["repro", spec, "--index", &i, "--format", "csv"];
    args.extend_from_slice(extra);
    let run = sb.run(&args);
    run.expect_code(0);
    run.stdout
}

#[test]
fn csv_format_equals_the_header_and_the_matching_row_of_vectors_csv() {
    let sb = Sandbox::new();
    let spec = sb.write("valve_trim.toml", VALVE_TRIM);
    sb.gen(&spec, "v", &[]);
    let text = sb.read("v/vectors.csv");
    let lines: Vec<&str> = text.lines().collect();
    let m = sb.json("v/manifest.json");
    let (directed, total) = (u64_of(&m["directed"]), u64_of(&m["total"]));
    assert!(directed > 2 && total > directed + 2);
    for index in [0, 1, directed - 1, directed, directed + 1, total - 1] {
        let want = format!("{}\n{}\n", lines[0], lines[index as usize + 1]);
        assert_eq!(repro_csv(&sb, &spec, index, &[]), want, "index {index}");
    }
}

#[test]
fn text_format_shows_hex_binary_and_decoded_values() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "v", &[]);
    let csv = VectorCsv::read(&sb, "v");
    let directed = u64_of(&sb.json("v/manifest.json")["directed"]) as usize;
    for (index, origin) in [(2, "directed"), (directed + 3, "random")] {
        let run = sb.run(&["repro", &spec, "--index", &index.to_string()]);
        run.expect_code(0)
            .expect_stdout(origin)
            .expect_stdout("flow_adder");
        for port in ["a", "b", "y"] {
            let hex = csv.get(index, port);
            let value = u8::from_str_radix(hex, 16).unwrap();
            // The row of this port holds its hex, its binary and its decoded value.
            let row = run
                .stdout
                .lines()
                .find(|l| l.contains(&format!(" {port} (")))
                .unwrap_or_else(|| panic!("no row for {port}\n{}", run.describe()));
            for want in [
                format!("0x{hex}"),
                hex_to_bin(hex, 8),
                format!("{value} (unsigned)"),
            ] {
                assert!(row.contains(&want), "row {row:?} lacks {want:?}");
            }
        }
        for class in csv.classes(index) {
            run.expect_stdout(&class);
        }
    }
}

#[test]
fn another_seed_changes_random_vectors_but_not_directed_ones() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "seed6", &["--seed", "6"]);
    let m = sb.json("seed6/manifest.json");
    let directed = u64_of(&m["directed"]);
    let lines: Vec<String> = sb
        .read("seed6/vectors.csv")
        .lines()
        .map(String::from)
        .collect();
    for index in [0, directed / 2, directed - 1] {
        let five = repro_csv(&sb, &spec, index, &[]);
        let six = repro_csv(&sb, &spec, index, &["--seed", "6"]);
        assert_eq!(five, six, "directed vector {index} depends on the seed");
    }
    for index in directed..directed + 4 {
        let five = repro_csv(&sb, &spec, index, &[]);
        let six = repro_csv(&sb, &spec, index, &["--seed", "6"]);
        assert_ne!(
            five, six,
            "random vector {index} does not depend on the seed"
        );
        // And --seed 6 reproduces what gen --seed 6 wrote.
        assert_eq!(
            six,
            format!("{}\n{}\n", lines[0], lines[index as usize + 1])
        );
    }
}

/// Issue 9 item 17: an index past the set's count is refused unless --beyond, which says so.
#[test]
fn issue9_an_index_past_the_set_is_refused_unless_beyond() {
    let sb = crate::util::Sandbox::new();
    let spec = sb.write("flow_adder.toml", crate::util::FLOW_ADDER);
    sb.run(&["repro", &spec, "--index", "5000"])
        .expect_code(2)
        .expect_stderr("past the end of the set")
        .expect_stderr("--beyond");
    sb.run(&["repro", &spec, "--index", "5000", "--beyond"])
        .expect_code(0)
        .expect_stdout("past the end of the set's");
    // With the set's --count the index is inside it.
    sb.run(&["repro", &spec, "--index", "5000", "--count", "10000"])
        .expect_code(0);
}

/// Issue 9, item 19: `repro --format json` is one document naming the vector's origin, each
/// input and expected output, and the classes it hits.
#[test]
fn issue9_repro_json_is_one_document() {
    let sb = crate::util::Sandbox::new();
    let spec = sb.write("adder.toml", crate::util::FLOW_ADDER);
    let run = sb.run(&["repro", &spec, "--index", "3", "--format", "json"]);
    run.expect_code(0);
    let doc: serde_json::Value = serde_json::from_str(&run.stdout).expect("one JSON document");
    assert_eq!(doc["index"], 3);
    assert_eq!(doc["origin"], "directed");
    assert_eq!(doc["unit"], "flow_adder");
    let inputs = doc["inputs"].as_array().expect("inputs");
    assert!(inputs.iter().any(|p| p["port"] == "a"), "{}", run.stdout);
    let expected = doc["expected"].as_array().expect("expected");
    assert!(expected.iter().any(|p| p["port"] == "y"), "{}", run.stdout);
    assert!(!doc["classes"].as_array().expect("classes").is_empty());
    let random = sb.run(&["repro", &spec, "--index", "40", "--format", "json"]);
    random.expect_code(0);
    let doc: serde_json::Value = serde_json::from_str(&random.stdout).expect("one document");
    assert_eq!(doc["origin"], "random");
    assert_eq!(doc["random_index"], 4);
    assert_eq!(doc["seed"], 5);
}
