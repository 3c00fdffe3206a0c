//! Keeps the source tree's stage boundaries true: every `crate::<stage>` path in a file under
//! `src/<stage>/` must name its own stage or one the stage may import (the table below, which
//! DEVELOPERS.md's code map repeats). An import that goes up the pipeline fails this test with
//! the file, line and offending path.

use std::collections::BTreeMap;
use std::fs;
use std::path::{Path, PathBuf};

/// Stage -> the stages it may import (besides itself). `error` is the library's foundation.
fn allowed() -> BTreeMap<&'static str, &'static [&'static str]> {
    BTreeMap::from([
        ("error", &[][..]),
        ("spec", &["error"][..]),
        ("arith", &["error", "spec"][..]),
        ("corners", &["error", "spec", "arith"][..]),
        ("sets", &["error", "spec", "arith", "corners"][..]),
        ("sim", &["error", "spec", "arith", "corners", "sets"][..]),
        (
            "verdict",
            &["error", "spec", "arith", "corners", "sets", "sim"][..],
        ),
        ("gates", &["error", "spec", "arith", "corners", "sets"][..]),
        // The CLI lives in the binary: `crate::` there is the binary crate.
        ("cli", &[][..]),
    ])
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for entry in fs::read_dir(dir).unwrap() {
        let path = entry.unwrap().path();
        if path.is_dir() {
            rust_files(&path, out);
        } else if path.extension().is_some_and(|e| e == "rs") {
            out.push(path);
        }
    }
}

/// The stage a source file belongs to: its folder under src/, or its file stem at the top.
fn stage_of(src: &Path, file: &Path) -> String {
    let rel = file.strip_prefix(src).unwrap();
    let first = rel
        .components()
        .next()
        .unwrap()
        .as_os_str()
        .to_string_lossy();
    first.trim_end_matches(".rs").to_string()
}

#[test]
fn imports_follow_the_pipeline() {
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let table = allowed();
    let mut files = Vec::new();
    rust_files(&src, &mut files);
    files.sort();
    let mut bad = Vec::new();
    for file in &files {
        let stage = stage_of(&src, file);
        if stage == "lib" || stage == "main" {
            continue;
        }
        let Some(may) = table.get(stage.as_str()) else {
            bad.push(format!(
                "{}: stage `{stage}` is not in tests/layout.rs's table (add it, and to DEVELOPERS.md)",
                file.display()
            ));
            continue;
        };
        let text = fs::read_to_string(file).unwrap();
        for (n, line) in text.lines().enumerate() {
            if line.trim_start().starts_with("//") {
                continue; // doc links may name any public item
            }
            let mut rest = line;
            while let Some(at) = rest.find("crate::") {
                let tail = &rest[at + "crate::".len()..];
                let name: String = tail
                    .chars()
                    .take_while(|c| c.is_alphanumeric() || *c == '_')
                    .collect();
                rest = &tail[name.len()..];
                if name.is_empty() || name == stage || may.contains(&name.as_str()) {
                    continue;
                }
                if name.starts_with(|c: char| c.is_uppercase()) {
                    bad.push(format!(
                        "{}:{}: `crate::{name}` goes through lib.rs's re-exports; name the stage's path",
                        file.display(),
                        n + 1
                    ));
                    continue;
                }
                bad.push(format!(
                    "{}:{}: stage `{stage}` imports `crate::{name}`, which it may not",
                    file.display(),
                    n + 1
                ));
            }
        }
    }
    assert!(
        bad.is_empty(),
        "imports against the pipeline:\n{}",
        bad.join("\n")
    );
}

#[test]
fn every_stage_folder_says_what_it_owns() {
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let table = allowed();
    for entry in fs::read_dir(&src).unwrap() {
        let path = entry.unwrap().path();
        if !path.is_dir() {
            continue;
        }
        let name = path.file_name().unwrap().to_string_lossy().to_string();
        assert!(
            table.contains_key(name.as_str()),
            "src/{name}/ is not a known stage"
        );
        let text = fs::read_to_string(path.join("mod.rs"))
            .unwrap_or_else(|_| panic!("src/{name}/mod.rs is missing"));
        assert!(
            text.starts_with("//!"),
            "src/{name}/mod.rs must open with a //! paragraph saying what the stage owns"
        );
        assert!(
            text.contains("import"),
            "src/{name}/mod.rs must say what the stage may import"
        );
    }
}

/// The test's own rule catches an upward import (so the test can fail).
#[test]
fn an_upward_import_is_caught() {
    let table = allowed();
    assert!(!table["arith"].contains(&"verdict"));
    assert!(!table["gates"].contains(&"sim"));
    assert!(table["verdict"].contains(&"sim"));
}
