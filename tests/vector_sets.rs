//! The checked-in example sets under vector-sets/ regenerate byte for byte, and match the
//! checked-in SHA256SUMS: same spec + seed gives identical files on every run and platform.

use std::path::{Path, PathBuf};
use std::process::Command;

use sha2::{Digest, Sha256};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

fn specs() -> Vec<PathBuf> {
    let mut out = Vec::new();
    for entry in std::fs::read_dir(root().join("vector-sets")).expect("vector-sets/") {
        let dir = entry.expect("entry").path();
        if !dir.is_dir() {
            continue;
        }
        for f in std::fs::read_dir(&dir).expect("set dir") {
            let p = f.expect("entry").path();
            if p.extension().is_some_and(|e| e == "toml") {
                out.push(p);
            }
        }
    }
    out.sort();
    out
}

#[test]
fn every_example_set_regenerates_byte_for_byte() {
    let specs = specs();
    assert!(
        specs.len() >= 4,
        "expected the four example units, found {specs:?}"
    );
    let sums = std::fs::read_to_string(root().join("vector-sets/SHA256SUMS")).expect("SHA256SUMS");
    let tmp = tempfile::tempdir().expect("temp dir");
    for spec in specs {
        let set = spec.parent().expect("dir");
        let unit = set.file_name().expect("name").to_string_lossy().to_string();
        let out = tmp.path().join(&unit);
        let status = Command::new(env!("CARGO_BIN_EXE_arithvec"))
            .args(["gen", "-q"])
            .arg(&spec)
            .arg("--out")
            .arg(&out)
            .status()
            .expect("run arithvec");
        assert!(status.success(), "gen failed for {}", spec.display());
        for name in [
            "vectors.csv",
            "stimulus.hex",
            "expected.hex",
            "manifest.json",
        ] {
            let fresh = std::fs::read(out.join(name)).expect("fresh file");
            let checked_in =
                std::fs::read(set.join("vectors").join(name)).expect("checked-in file");
            assert!(
                fresh == checked_in,
                "{unit}/{name} differs from the checked-in file; if the change is deliberate run \
                 scripts/regen-vector-sets.sh"
            );
            let line = format!("{}  {unit}/vectors/{name}", hex(&Sha256::digest(&fresh)));
            assert!(
                sums.lines().any(|l| l == line),
                "SHA256SUMS has no line `{line}`"
            );
        }
    }
}

#[test]
fn no_stray_files_in_the_sets() {
    for spec in specs() {
        let dir = spec.parent().expect("dir").join("vectors");
        let mut names: Vec<String> = std::fs::read_dir(&dir)
            .expect("vectors dir")
            .map(|e| e.expect("entry").file_name().to_string_lossy().to_string())
            .collect();
        names.sort();
        assert_eq!(
            names,
            [
                "expected.hex",
                "manifest.json",
                "stimulus.hex",
                "vectors.csv"
            ],
            "in {}",
            Path::new(&dir).display()
        );
    }
}
