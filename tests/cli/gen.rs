//! `arithvec gen`: reproducible, self-describing vector sets whose contents agree with an
//! independent computation, across widths, shards and failures to write.

use crate::util::{
    field_hex, hex_bits, hex_words, sha256_hex, spec_text, u32_of, u64_of, unpack_hex_log, Sandbox,
    VectorCsv, FLOW_ADDER, RESERVOIR_LEVEL, VALVE_TRIM,
};

const SET_FILES: [&str; 4] = [
    "expected.hex",
    "manifest.json",
    "stimulus.hex",
    "vectors.csv",
];

#[test]
fn two_runs_are_byte_identical_including_the_manifest() {
    let sb = Sandbox::new();
    let spec = sb.write("valve_trim.toml", VALVE_TRIM);
    sb.gen(&spec, "first", &[]);
    sb.gen(&spec, "second", &[]);
    for name in SET_FILES {
        let a = sb.bytes(&format!("first/{name}"));
        let b = sb.bytes(&format!("second/{name}"));
        assert!(!a.is_empty(), "{name} is empty");
        assert!(a == b, "{name} differs between two runs of the same spec");
    }
}

#[test]
fn count_and_seed_overrides_are_recorded_in_the_manifest() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "plain", &[]);
    sb.gen(&spec, "over", &["--count", "7", "--seed", "99"]);
    let plain = sb.json("plain/manifest.json");
    let over = sb.json("over/manifest.json");
    // The spec says count 20, seed 5.
    assert_eq!(u64_of(&plain["seed"]), 5);
    assert_eq!(u64_of(&plain["random"]), 20);
    assert_eq!(u64_of(&over["seed"]), 99);
    assert_eq!(u64_of(&over["random"]), 7);
    let directed = u64_of(&over["directed"]);
    assert_eq!(directed, u64_of(&plain["directed"]));
    assert_eq!(u64_of(&over["total"]), directed + 7);
    assert_eq!(u64_of(&over["vectors"]), directed + 7);
    assert_eq!(u64_of(&over["first_index"]), 0);
    assert!(over["shard"].is_null());
    assert_eq!(over["unit"], "flow_adder");
    assert_eq!(over["tool"], "arithvec");
    let csv = VectorCsv::read(&sb, "over");
    assert_eq!(csv.rows.len() as u64, directed + 7);
    // Directed vectors do not depend on the seed; the random ones do.
    let plain_csv = VectorCsv::read(&sb, "plain");
    let d = directed as usize;
    assert_eq!(csv.rows[..d], plain_csv.rows[..d]);
    assert_ne!(csv.rows[d..], plain_csv.rows[d..d + 7]);
}

#[test]
fn three_shards_concatenate_to_the_unsharded_files() {
    let sb = Sandbox::new();
    let spec = sb.write("reservoir_level.toml", RESERVOIR_LEVEL);
    sb.gen(&spec, "all", &[]);
    let whole = sb.json("all/manifest.json");
    let mut next_first = 0;
    for i in 0..3 {
        let shard = format!("{i}/3");
        sb.gen(&spec, &format!("s{i}"), &["--shard", &shard]);
        let m = sb.json(&format!("s{i}/manifest.json"));
        assert_eq!(u64_of(&m["shard"]["index"]), i);
        assert_eq!(u64_of(&m["shard"]["count"]), 3);
        assert_eq!(u64_of(&m["first_index"]), next_first, "shard {shard}");
        assert_eq!(m["total"], whole["total"]);
        assert!(u64_of(&m["vectors"]) > 0, "shard {shard} is empty");
        next_first += u64_of(&m["vectors"]);
    }
    assert_eq!(next_first, u64_of(&whole["total"]));
    for name in ["vectors.csv", "stimulus.hex", "expected.hex"] {
        let mut joined = Vec::new();
        for i in 0..3 {
            joined.extend(sb.bytes(&format!("s{i}/{name}")));
        }
        assert!(
            joined == sb.bytes(&format!("all/{name}")),
            "{name}: the shards do not concatenate to the unsharded file"
        );
    }
}

#[test]
fn manifest_hashes_and_sizes_match_the_files() {
    let sb = Sandbox::new();
    let spec = sb.write("valve_trim.toml", VALVE_TRIM);
    sb.gen(&spec, "v", &[]);
    let m = sb.json("v/manifest.json");
    let files = m["files"].as_array().expect("files");
    let names: Vec<&str> = files.iter().map(|f| f["name"].as_str().unwrap()).collect();
    assert_eq!(names, ["vectors.csv", "stimulus.hex", "expected.hex"]);
    for f in files {
        let name = f["name"].as_str().unwrap();
        let data = sb.bytes(&format!("v/{name}"));
        assert_eq!(u64_of(&f["bytes"]), data.len() as u64, "{name} size");
        assert_eq!(
            f["sha256"].as_str().unwrap(),
            sha256_hex(&data),
            "{name} SHA-256"
        );
    }
    assert_eq!(m["spec_sha256"].as_str().unwrap().len(), 64);
}

#[test]
fn every_adder_row_matches_rust_u8_arithmetic() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "v", &["--count", "200"]);
    let csv = VectorCsv::read(&sb, "v");
    assert_eq!(csv.header[0], "index");
    assert_eq!(csv.header.last().unwrap(), "classes");
    let byte = |s: &str| u8::from_str_radix(s, 16).unwrap_or_else(|_| panic!("{s:?}"));
    for (i, row) in csv.rows.iter().enumerate() {
        assert_eq!(row[0], i.to_string());
        let (a, b, cin) = (
            byte(csv.get(i, "a")),
            byte(csv.get(i, "b")),
            byte(csv.get(i, "cin")),
        );
        assert!(cin <= 1);
        // Reference: Rust standard library u8::overflowing_add (wrapping sum and carry).
        let (s1, c1) = a.overflowing_add(b);
        let (y, c2) = s1.overflowing_add(cin);
        let co = (c1 || c2) as u8;
        let expect = [
            ("y", format!("{y:02x}")),
            ("co", co.to_string()),
            // Unsigned: the true sum is unrepresentable exactly when it carries out.
            ("ovf", co.to_string()),
            ("z", ((y == 0) as u8).to_string()),
            ("n", (y >> 7).to_string()),
        ];
        for (port, want) in expect {
            assert_eq!(csv.get(i, port), want, "row {i} ({row:?}), port {port}");
        }
    }
}

#[test]
fn every_subtractor_row_matches_rust_i8_arithmetic() {
    let sb = Sandbox::new();
    let spec = sb.write("reservoir_level.toml", RESERVOIR_LEVEL);
    sb.gen(&spec, "v", &["--count", "200"]);
    let csv = VectorCsv::read(&sb, "v");
    let byte = |s: &str| u8::from_str_radix(s, 16).unwrap_or_else(|_| panic!("{s:?}"));
    for (i, row) in csv.rows.iter().enumerate() {
        let a = byte(csv.get(i, "level"));
        let b = byte(csv.get(i, "drain"));
        let bin = byte(csv.get(i, "bin"));
        // Reference: Rust standard library u8::overflowing_sub (wrapping difference and
        // borrow) and the `as i8` reinterpretation of two's complement.
        let (d1, b1) = a.overflowing_sub(b);
        let (delta, b2) = d1.overflowing_sub(bin);
        let truth = a as i8 as i16 - b as i8 as i16 - bin as i16;
        assert_eq!(delta as i8 as i16, truth.rem_euclid(256) as u8 as i8 as i16);
        let ovf = !(i8::MIN as i16..=i8::MAX as i16).contains(&truth);
        let expect = [
            ("delta", format!("{delta:02x}")),
            ("bout", ((b1 || b2) as u8).to_string()),
            ("ovf", (ovf as u8).to_string()),
            ("empty", ((delta == 0) as u8).to_string()),
            ("neg", (delta >> 7).to_string()),
        ];
        for (port, want) in expect {
            assert_eq!(csv.get(i, port), want, "row {i} ({row:?}), port {port}");
        }
    }
}

/// Checks DIR's hex files against its manifest layout and its CSV: the header comment, one
/// word per vector of exactly `digits` lowercase hex digits with nothing above `width`, and
/// every field unpacked equal to the CSV's value.
fn assert_hex_files_match_layout(sb: &Sandbox, dir: &str) {
    let m = sb.json(&format!("{dir}/manifest.json"));
    let vectors = u64_of(&m["vectors"]) as usize;
    for (file, word) in [("stimulus.hex", "stimulus"), ("expected.hex", "expected")] {
        let layout = &m["layout"][word];
        let width = u32_of(&layout["width"]);
        let digits = u32_of(&layout["digits"]);
        assert_eq!(digits, width.div_ceil(4), "{file}: digits for {width} bits");
        // Fields are packed MSB-first in spec order with no gaps.
        let mut top = width;
        for f in layout["fields"].as_array().unwrap() {
            let (msb, lsb) = (u32_of(&f["msb"]), u32_of(&f["lsb"]));
            assert_eq!(
                msb + 1,
                top,
                "{file}: field {f} does not follow the previous one"
            );
            assert!(msb >= lsb);
            top = lsb;
        }
        assert_eq!(top, 0, "{file}: fields do not reach bit 0");
        let text = sb.read(&format!("{dir}/{file}"));
        assert!(text.starts_with("//"), "{file} has no comment header");
        let words = hex_words(&text);
        assert_eq!(words.len(), vectors, "{file}: one word per vector");
        for (i, w) in words.iter().enumerate() {
            assert_eq!(w.len(), digits as usize, "{file} word {i}: {w:?}");
            assert!(
                w.bytes()
                    .all(|c| c.is_ascii_digit() || (b'a'..=b'f').contains(&c)),
                "{file} word {i} is not lowercase hex: {w:?}"
            );
            let bits = hex_bits(w);
            assert!(
                bits[width as usize..].iter().all(|b| !b),
                "{file} word {i} has bits above {width}"
            );
        }
    }
    let csv = VectorCsv::read(sb, dir);
    let unpacked = unpack_hex_log(sb, dir);
    assert_eq!(unpacked.rows.len(), csv.rows.len());
    let ports = csv.ports();
    assert_eq!(unpacked.header, ports, "layout fields vs CSV ports");
    assert_eq!(
        unpacked,
        csv.table(&ports.iter().map(String::as_str).collect::<Vec<_>>())
    );
}

#[test]
fn hex_files_match_the_layout_and_the_csv() {
    let sb = Sandbox::new();
    for (name, text) in [("flow_adder", FLOW_ADDER), ("valve_trim", VALVE_TRIM)] {
        let spec = sb.write(&format!("{name}.toml"), text);
        sb.gen(&spec, name, &[]);
        assert_hex_files_match_layout(&sb, name);
    }
}

#[test]
fn widths_1_64_65_and_512_produce_valid_files() {
    let sb = Sandbox::new();
    for (width, op, enc) in [
        (1, "add", "twos"),
        (64, "addsub", "unsigned"),
        (65, "sub", "offset"),
        (512, "add", "ones"),
    ] {
        let name = format!("w{width}");
        let spec = sb.write(
            &format!("{name}.toml"),
            &spec_text(&name, op, enc, width, 5, 2),
        );
        sb.gen(&spec, &name, &[]);
        assert_hex_files_match_layout(&sb, &name);
        let csv = VectorCsv::read(&sb, &name);
        let digits = (width as usize).div_ceil(4);
        for (i, row) in csv.rows.iter().enumerate() {
            for port in ["op_a", "res"] {
                let v = csv.get(i, port);
                assert_eq!(v.len(), digits, "width {width} row {i} {port}: {row:?}");
                let bits = hex_bits(v);
                assert!(
                    bits[width as usize..].iter().all(|b| !b),
                    "{port} too wide: {v}"
                );
            }
            assert!(
                !csv.classes(i).is_empty(),
                "width {width} row {i} has no classes"
            );
        }
        // A set of any width is checkable against itself.
        let log = sb.write(&format!("{name}.csv"), &csv.perfect_log().csv());
        let (_, report) = sb.check(&spec, &log, &["--vectors", &name], 0);
        assert_eq!(report["verdict"], "pass", "width {width}");
    }
    // The unpacking helper itself, on a value straddling the 64-bit boundary.
    let bits = hex_bits("1ffffffffffffffff");
    assert_eq!(field_hex(&bits, 64, 64), "1");
    assert_eq!(field_hex(&bits, 64, 1), "ffffffffffffffff");
}

#[test]
fn no_temporary_files_are_left_behind() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    sb.gen(&spec, "v", &[]);
    assert_eq!(sb.list("v"), SET_FILES);
    // Writing over an existing set leaves exactly the set too.
    sb.gen(&spec, "v", &["--seed", "8"]);
    assert_eq!(sb.list("v"), SET_FILES);
    sb.gen(&spec, "v", &["--shard", "1/2"]);
    assert_eq!(sb.list("v"), SET_FILES);
}

#[test]
fn an_unwritable_output_fails_with_exit_2_and_leaves_nothing() {
    let sb = Sandbox::new();
    let spec = sb.write("flow_adder.toml", FLOW_ADDER);
    // A directory below a regular file cannot be created, even by root.
    sb.write("plain_file", "not a directory\n");
    sb.run(&["gen", &spec, "--out", "plain_file/vec"])
        .expect_code(2)
        .expect_stderr("plain_file/vec");
    assert_eq!(sb.read("plain_file"), "not a directory\n");

    // One target name is taken by a directory: the last steps (renames) fail, and neither the
    // files renamed before it nor any temporary file may stay.
    for blocked in ["expected.hex", "manifest.json"] {
        let dir = format!("blocked_{}", blocked.replace('.', "_"));
        std::fs::create_dir_all(sb.path(&format!("{dir}/{blocked}"))).unwrap();
        sb.run(&["gen", &spec, "--out", &dir])
            .expect_code(2)
            .expect_stderr(blocked);
        assert_eq!(sb.list(&dir), [blocked], "{dir} holds partial files");
    }

    // A read-only directory, where permissions apply (they do not for root).
    let ro = sb.path("read_only");
    std::fs::create_dir(&ro).unwrap();
    use std::os::unix::fs::PermissionsExt;
    std::fs::set_permissions(&ro, std::fs::Permissions::from_mode(0o555)).unwrap();
    let permissions_apply = std::fs::write(ro.join("probe"), "").is_err();
    let _ = std::fs::remove_file(ro.join("probe"));
    if permissions_apply {
        sb.run(&["gen", &spec, "--out", "read_only"])
            .expect_code(2)
            .expect_stderr("read_only");
        assert!(sb.list("read_only").is_empty());
    } else {
        eprintln!("note: running as a user that ignores permissions; read-only case not run");
    }
    std::fs::set_permissions(&ro, std::fs::Permissions::from_mode(0o755)).unwrap();
}
