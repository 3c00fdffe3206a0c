//! README.md's examples run as printed (issue 9, item 24).
//!
//! The rules, also stated in README.md's "Development" section:
//! - every ```` ```toml ```` block is a complete spec: it is written to `<name>.toml` (its own
//!   `name` key) in a fresh sandbox and `arithvec classes` must accept it;
//! - every ```` ```sh ```` block runs, in README order, in one bash session in that sandbox
//!   (so `B` and `S` set in one block hold in the next), with copies of `vector-sets/`,
//!   `tests/hdl/` and `scripts/`, and with `target/release/arithvec` being the binary under test;
//!   `cargo build --release` is the one cargo command allowed and only checks that binary is
//!   there (the test must not start a second build of the project);
//! - in a sh block, the whole-line comments right after a command state what it prints:
//!   `# exit N` is its exit code (0 when absent) and any other `# text` must appear in its
//!   standard output or standard error (spaces after the `#` are not part of the text);
//! - an unmarked ```` ``` ```` block is not run; only the few listed in [`NOT_RUN`] may exist
//!   (set-up scripts that install packages as root, a Slurm submission that needs a cluster),
//!   so a new example cannot slip in untested.
//!
//! Icarus Verilog, Verilator, GHDL, Yosys and GNU parallel must be installed; when one is
//! missing the test says SKIPPED loudly, and fails under CI.

#[path = "support/mod.rs"]
mod support;

use std::path::Path;
use std::process::Command;

use support::{require_tools, Sandbox, BIN};

/// First lines of the unmarked blocks that README.md may hold, with why they are not run.
const NOT_RUN: &[(&str, &str)] = &[
    (
        "bash scripts/demo.sh",
        "installs simulators as root and builds the project",
    ),
    ("bash scripts/test-all.sh", "runs this very suite"),
    (
        "ARITHVEC=$PWD/target/release/arithvec OUT=$PWD/farm REQUIRE=100 \\",
        "submits to a Slurm cluster",
    ),
];

/// One fenced block of README.md.
struct Block {
    /// The info string after the opening fence ("" when unmarked).
    lang: String,
    /// 1-based line of the opening fence.
    line: usize,
    /// The lines between the fences, with their 1-based line numbers.
    body: Vec<(usize, String)>,
}

fn blocks(text: &str) -> Vec<Block> {
    let mut out = Vec::new();
    let mut open: Option<Block> = None;
    for (i, line) in text.lines().enumerate() {
        let number = i + 1;
        match (&mut open, line.strip_prefix("```")) {
            (None, Some(lang)) => {
                open = Some(Block {
                    lang: lang.trim().to_string(),
                    line: number,
                    body: Vec::new(),
                })
            }
            (Some(_), Some(_)) => out.push(open.take().expect("an open block")),
            (Some(block), None) => block.body.push((number, line.to_string())),
            (None, None) => {}
        }
    }
    assert!(open.is_none(), "README.md ends inside a fenced block");
    out
}

/// One command of a sh block with what README says it prints.
struct Step {
    line: usize,
    command: String,
    exit: i32,
    prints: Vec<String>,
}

fn steps(block: &Block) -> Vec<Step> {
    let mut out: Vec<Step> = Vec::new();
    let mut lines = block.body.iter().peekable();
    while let Some((line, text)) = lines.next() {
        let trimmed = text.trim();
        if trimmed.is_empty() {
            continue;
        }
        if let Some(comment) = trimmed.strip_prefix('#') {
            let step = out.last_mut().unwrap_or_else(|| {
                panic!("README.md:{line}: a comment line before any command in a sh block")
            });
            let comment = comment.trim();
            match comment.strip_prefix("exit ") {
                Some(code) => {
                    step.exit = code.parse().unwrap_or_else(|_| {
                        panic!("README.md:{line}: `# exit N` needs a number, got {comment:?}")
                    })
                }
                None => step.prints.push(comment.to_string()),
            }
            continue;
        }
        let mut command = text.clone();
        // A here-document (`<<'END'`) runs to its terminator line, comments and all.
        if let Some(tag) = command
            .split("<<'")
            .nth(1)
            .and_then(|t| t.split('\'').next())
        {
            let tag = tag.to_string();
            for (_, next) in lines.by_ref() {
                command.push('\n');
                command.push_str(next);
                if next.trim() == tag {
                    break;
                }
            }
        }
        while command.ends_with('\\') {
            let (_, next) = lines
                .next()
                .unwrap_or_else(|| panic!("README.md:{line}: continuation past the block"));
            // Kept as a backslash-newline: bash joins the lines itself.
            command.push('\n');
            command.push_str(next);
        }
        out.push(Step {
            line: *line,
            command,
            exit: 0,
            prints: Vec::new(),
        });
    }
    out
}

fn copy_tree(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).expect("create a directory");
    for entry in std::fs::read_dir(from).expect("list a directory") {
        let entry = entry.expect("a directory entry");
        let target = to.join(entry.file_name());
        if entry.file_type().expect("a file type").is_dir() {
            copy_tree(&entry.path(), &target);
        } else {
            std::fs::copy(entry.path(), &target).expect("copy a file");
        }
    }
}

#[test]
fn readme_examples_run_as_printed() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let readme = std::fs::read_to_string(root.join("README.md")).expect("read README.md");
    let blocks = blocks(&readme);

    for block in blocks.iter().filter(|b| b.lang.is_empty()) {
        let first = block.body.first().map_or("", |(_, l)| l.as_str());
        assert!(
            NOT_RUN.iter().any(|(line, _)| *line == first),
            "README.md:{}: an unmarked block ({first:?}); mark it ```sh so that \
             tests/readme.rs runs it, or list it in NOT_RUN with the reason",
            block.line
        );
    }
    for block in &blocks {
        assert!(
            matches!(block.lang.as_str(), "" | "sh" | "toml"),
            "README.md:{}: block language {:?}; use sh, toml or none",
            block.line,
            block.lang
        );
    }
    let sh: Vec<&Block> = blocks.iter().filter(|b| b.lang == "sh").collect();
    assert!(
        sh.len() >= 4,
        "README.md has only {} sh blocks; the loop, the bug hunt, the other simulators, the \
         farm and grading should all be examples that run",
        sh.len()
    );

    if !require_tools(&["iverilog", "vvp", "verilator", "ghdl", "yosys", "parallel"]) {
        return;
    }
    let sandbox = Sandbox::new();
    copy_tree(&root.join("vector-sets"), &sandbox.path("vector-sets"));
    copy_tree(&root.join("tests/hdl"), &sandbox.path("tests/hdl"));
    copy_tree(&root.join("scripts"), &sandbox.path("scripts"));
    std::fs::create_dir_all(sandbox.path("target/release")).expect("create target/release");
    std::os::unix::fs::symlink(BIN, sandbox.path("target/release/arithvec"))
        .expect("link the binary under test");

    // Every toml block is a spec the tool accepts.
    let mut toml_blocks = 0;
    for block in blocks.iter().filter(|b| b.lang == "toml") {
        let text: String = block.body.iter().map(|(_, l)| format!("{l}\n")).collect();
        let doc: toml::Table = toml::from_str(&text)
            .unwrap_or_else(|e| panic!("README.md:{}: not TOML: {e}", block.line));
        let name = doc
            .get("name")
            .and_then(|v| v.as_str())
            .unwrap_or_else(|| panic!("README.md:{}: the spec has no name", block.line));
        let file = sandbox.write(&format!("{name}.toml"), &text);
        let run = sandbox.run(&["classes", &file]);
        assert_eq!(
            run.code,
            0,
            "README.md:{}: the spec block, copied literally, is refused\n{}",
            block.line,
            run.describe()
        );
        toml_blocks += 1;
    }
    assert!(toml_blocks >= 2, "README.md's spec examples are gone");

    // One script for every sh block: each command's output goes to its own file, and the
    // script stops at the first command whose exit code is not the documented one.
    let all: Vec<Step> = sh.iter().flat_map(|b| steps(b)).collect();
    let mut script = String::from(
        "cargo() {\n  if [ \"$*\" = \"build --release\" ]; then test -x target/release/arithvec; \
         else echo \"tests/readme.rs: only 'cargo build --release' may appear\" >&2; return 64; \
         fi\n}\nmkdir -p .readme\n",
    );
    for (i, step) in all.iter().enumerate() {
        script.push_str(&format!(
            "{{\n{}\n}} > .readme/out.{i} 2>&1 < /dev/null\nrc=$?\necho $rc > .readme/rc.{i}\n\
             if [ $rc -ne {} ]; then exit 0; fi\n",
            step.command, step.exit
        ));
    }
    let status = Command::new("bash")
        .arg("-c")
        .arg(&script)
        .current_dir(sandbox.root())
        // README shows full-width, box-drawn tables: no width limit, a UTF-8 locale.
        .env_remove("COLUMNS")
        .env_remove("LC_ALL")
        .env("LC_CTYPE", "C.UTF-8")
        .status()
        .expect("start bash");
    assert!(status.success(), "the README script itself failed");
    for (i, step) in all.iter().enumerate() {
        let rc = std::fs::read_to_string(sandbox.path(&format!(".readme/rc.{i}"))).unwrap_or_else(
            |_| {
                panic!(
                    "README.md:{}: never ran (an earlier command failed)",
                    step.line
                )
            },
        );
        let output = sandbox.read(&format!(".readme/out.{i}"));
        let rc: i32 = rc.trim().parse().expect("an exit code");
        assert_eq!(
            rc, step.exit,
            "README.md:{}: `{}` exited {rc}, README says {}\n--- output ---\n{output}",
            step.line, step.command, step.exit
        );
        for text in &step.prints {
            assert!(
                output.contains(text.as_str()),
                "README.md:{}: `{}` should print {text:?}\n--- output ---\n{output}",
                step.line,
                step.command
            );
        }
    }
}
