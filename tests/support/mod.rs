//! Test support shared by the integration-test binaries (`tests/cli`, `tests/grade`,
//! `tests/sim_e2e`), each of which includes it with `#[path = "../support/mod.rs"] mod
//! support;`: the built binary, a runner that returns (exit code, stdout, stderr) and
//! asserts no panic, a fresh temporary directory per test, the reference hardware's path,
//! and what a missing external tool means (an error under CI, a loud SKIPPED line
//! otherwise). Helpers for one binary only stay in that binary's own modules.

// Each binary uses only part of this module.
#![allow(dead_code)]

use std::io::Write as _;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};

use serde_json::Value;

/// The binary under test, built by Cargo for this test target.
pub const BIN: &str = env!("CARGO_BIN_EXE_arithvec");

/// A file of the reference hardware, e.g. `hdl("ripple_add.v")` or `hdl("vhdl/ripple_sub.vhd")`.
pub fn hdl(relative: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/hdl")
        .join(relative)
}

/// The outcome of one run of the binary.
pub struct Run {
    /// The command line, for messages.
    pub command: String,
    /// The exit code (-1 when killed by a signal).
    pub code: i32,
    /// Standard output.
    pub stdout: String,
    /// Standard error.
    pub stderr: String,
}

impl Run {
    /// Everything about the run, for a failure message.
    pub fn describe(&self) -> String {
        format!(
            "command: {}\nexit code: {}\n--- stdout ---\n{}\n--- stderr ---\n{}",
            self.command, self.code, self.stdout, self.stderr
        )
    }

    /// Asserts the exit code, showing expected against actual and the whole run otherwise.
    #[track_caller]
    pub fn expect_code(&self, expected: i32) -> &Run {
        assert_eq!(
            self.code,
            expected,
            "expected exit code {expected}, got {}\n{}",
            self.code,
            self.describe()
        );
        self
    }

    /// Asserts that stderr contains `needle`.
    #[track_caller]
    pub fn expect_stderr(&self, needle: &str) -> &Run {
        assert!(
            self.stderr.contains(needle),
            "expected stderr to contain {needle:?}\n{}",
            self.describe()
        );
        self
    }

    /// Asserts that stdout contains `needle`.
    #[track_caller]
    pub fn expect_stdout(&self, needle: &str) -> &Run {
        assert!(
            self.stdout.contains(needle),
            "expected stdout to contain {needle:?}\n{}",
            self.describe()
        );
        self
    }

    /// Parses stdout as JSON.
    #[track_caller]
    pub fn json(&self) -> Value {
        serde_json::from_str(&self.stdout)
            .unwrap_or_else(|e| panic!("stdout is not JSON ({e})\n{}", self.describe()))
    }
}

/// A fresh temporary directory for one test; every relative path below is inside it, and the
/// binary and tools run with it as the working directory.
pub struct Sandbox {
    dir: tempfile::TempDir,
}

impl Sandbox {
    /// A new, empty sandbox, named after the test binary (`arithvec-cli-...`).
    pub fn new() -> Sandbox {
        Sandbox {
            dir: tempfile::Builder::new()
                .prefix(&format!("arithvec-{}-", env!("CARGO_CRATE_NAME")))
                .tempdir()
                .expect("create a temporary directory"),
        }
    }

    /// The sandbox's root.
    pub fn root(&self) -> &Path {
        self.dir.path()
    }

    /// `rel` inside the sandbox.
    pub fn path(&self, rel: &str) -> PathBuf {
        self.dir.path().join(rel)
    }

    /// Writes `text` to `rel` (creating parent directories) and returns the relative name.
    pub fn write(&self, rel: &str, text: &str) -> String {
        let p = self.path(rel);
        if let Some(parent) = p.parent() {
            std::fs::create_dir_all(parent).expect("create parent directory");
        }
        std::fs::write(&p, text).unwrap_or_else(|e| panic!("write {}: {e}", p.display()));
        rel.to_string()
    }

    /// Reads `rel` as text.
    pub fn read(&self, rel: &str) -> String {
        let p = self.path(rel);
        std::fs::read_to_string(&p).unwrap_or_else(|e| panic!("read {}: {e}", p.display()))
    }

    /// Reads `rel` as bytes.
    pub fn bytes(&self, rel: &str) -> Vec<u8> {
        let p = self.path(rel);
        std::fs::read(&p).unwrap_or_else(|e| panic!("read {}: {e}", p.display()))
    }

    /// Reads and parses `rel` as JSON.
    pub fn json(&self, rel: &str) -> Value {
        let text = self.read(rel);
        serde_json::from_str(&text).unwrap_or_else(|e| panic!("{rel} is not JSON ({e}):\n{text}"))
    }

    /// The sorted names of the entries in directory `rel`, hidden ones included.
    pub fn list(&self, rel: &str) -> Vec<String> {
        let p = self.path(rel);
        let mut names: Vec<String> = std::fs::read_dir(&p)
            .unwrap_or_else(|e| panic!("list {}: {e}", p.display()))
            .map(|e| {
                e.expect("directory entry")
                    .file_name()
                    .to_string_lossy()
                    .into_owned()
            })
            .collect();
        names.sort();
        names
    }

    /// Runs the binary with `args` in the sandbox. Every run, whatever its exit code, must end
    /// without a panic: user input never panics the tool.
    pub fn run(&self, args: &[&str]) -> Run {
        self.run_with_env(args, &[])
    }

    /// [`Sandbox::run`] with extra environment variables set for the child.
    pub fn run_with_env(&self, args: &[&str], env: &[(&str, &str)]) -> Run {
        // Tables are drawn as on a UTF-8 log without a width limit unless a test sets
        // COLUMNS or the locale itself.
        let output = Command::new(BIN)
            .args(args)
            .env_remove("COLUMNS")
            .env_remove("LC_ALL")
            .env("LC_CTYPE", "C.UTF-8")
            .envs(env.iter().copied())
            .current_dir(self.root())
            .output()
            .expect("start the arithvec binary");
        let run = Run {
            command: format!("arithvec {}", args.join(" ")),
            code: output.status.code().unwrap_or(-1),
            stdout: String::from_utf8_lossy(&output.stdout).into_owned(),
            stderr: String::from_utf8_lossy(&output.stderr).into_owned(),
        };
        assert!(
            !run.stderr.contains("panicked"),
            "the binary panicked\n{}",
            run.describe()
        );
        run
    }

    /// Runs `gen SPEC --out DIR -q` plus `extra`, expecting success.
    #[track_caller]
    pub fn gen(&self, spec: &str, dir: &str, extra: &[&str]) -> Run {
        let mut args = vec!["gen", spec, "--out", dir, "-q"];
        args.extend_from_slice(extra);
        let run = self.run(&args);
        run.expect_code(0);
        run
    }

    /// Runs an external tool in the sandbox, expecting success; returns its stdout.
    #[track_caller]
    pub fn tool(&self, program: &str, args: &[&str]) -> String {
        let out = Command::new(program)
            .args(args)
            .current_dir(self.root())
            .output()
            .unwrap_or_else(|e| panic!("start {program}: {e}"));
        assert!(
            out.status.success(),
            "{program} {} failed:\n{}\n{}",
            args.join(" "),
            String::from_utf8_lossy(&out.stdout),
            String::from_utf8_lossy(&out.stderr)
        );
        String::from_utf8_lossy(&out.stdout).into_owned()
    }
}

/// What a test does about one external tool.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ToolDecision {
    /// The tool is there: run the test.
    Run,
    /// The tool is missing on a developer's machine: say so loudly and skip.
    Skip,
    /// The tool is missing under CI: fail the test.
    Fail,
}

/// The decision for a tool that was or was not `found`, with or without `ci` set: under CI
/// a missing tool is an error, because a suite that silently skips proves nothing.
pub fn decide(found: bool, ci: bool) -> ToolDecision {
    match (found, ci) {
        (true, _) => ToolDecision::Run,
        (false, true) => ToolDecision::Fail,
        (false, false) => ToolDecision::Skip,
    }
}

/// True when `name` can be started from PATH. Icarus' tools take `-V` for their version,
/// the others `--version`; only whether the program starts matters.
pub fn tool_found(name: &str) -> bool {
    let flag = if name == "iverilog" || name == "vvp" {
        "-V"
    } else {
        "--version"
    };
    Command::new(name)
        .arg(flag)
        .stdin(Stdio::null())
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .status()
        .is_ok()
}

/// The panic message for a tool missing under CI.
pub fn missing_under_ci(name: &str) -> String {
    format!("{name} not found on PATH and CI is set: the tests that need it must run in CI")
}

/// Prints a loud SKIPPED line straight to the stderr handle: the harness captures
/// `eprintln!` and would show it only for failing tests.
pub fn skipped(what: &str) {
    let _ = writeln!(std::io::stderr(), "\n*** SKIPPED: {what} ***\n");
}

/// True when `name` is available. A missing tool panics when `CI` is set and otherwise prints
/// `*** SKIPPED: <name> not found ***` to stderr and returns false.
pub fn require_tool(name: &str) -> bool {
    match decide(tool_found(name), std::env::var_os("CI").is_some()) {
        ToolDecision::Run => true,
        ToolDecision::Fail => panic!("{}", missing_under_ci(name)),
        ToolDecision::Skip => {
            skipped(&format!("{name} not found"));
            false
        }
    }
}

/// True when every tool in `names` is available (each missing one is reported).
pub fn require_tools(names: &[&str]) -> bool {
    // Every tool is asked before deciding, so each missing one gets its own line.
    let found: Vec<bool> = names.iter().map(|name| require_tool(name)).collect();
    found.into_iter().all(|ok| ok)
}
