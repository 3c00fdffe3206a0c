//! What a missing simulator means: under CI (the `CI` environment variable is set) it is an
//! error, because a suite that silently skips proves nothing; on a developer's machine it is
//! a loud `*** SKIPPED: <tool> not found ***` line on stderr and the test returns early.
//!
//! The rule lives in the shared `tests/support` module (the grading tests follow it too);
//! here the decision, a pure function (`decide`), is tested for every input, and
//! `require_tool` is also run for real in a child process of this test binary with a PATH
//! that lacks the tool.

#[cfg(test)]
mod tests {
    use std::io::Write as _;
    use std::process::Command;

    use crate::support::{decide, missing_under_ci, require_tool, tool_found, ToolDecision};

    /// The environment variable that tells `probe_require_tool` which tool to look for.
    const PROBE_TOOL: &str = "SIM_E2E_PROBE_TOOL";

    #[test]
    fn decision_for_every_input() {
        assert_eq!(decide(true, true), ToolDecision::Run);
        assert_eq!(decide(true, false), ToolDecision::Run);
        assert_eq!(decide(false, true), ToolDecision::Fail);
        assert_eq!(decide(false, false), ToolDecision::Skip);
    }

    /// `require_tool` agrees with `tool_found` for the tool named by `SIM_E2E_PROBE_TOOL`
    /// (default iverilog). In the normal run the tool is present; `missing_simulator_is_an_error_under_ci`
    /// also runs it in a child process with a PATH lacking the tool.
    #[test]
    fn probe_require_tool() {
        let tool = std::env::var(PROBE_TOOL).unwrap_or_else(|_| "iverilog".into());
        let ran = require_tool(&tool);
        let _ = writeln!(std::io::stderr(), "probe result: {tool} ran={ran}");
        assert_eq!(ran, tool_found(&tool));
    }

    /// Runs `probe_require_tool` in a child of this test binary with PATH pointing at an
    /// empty directory, with and without CI, and returns (succeeded, stdout + stderr).
    fn probe_without_tool(tool: &str, ci: bool) -> (bool, String) {
        let empty = tempfile::tempdir().unwrap();
        let mut child = Command::new(std::env::current_exe().unwrap());
        child
            .args([
                "tools::tests::probe_require_tool",
                "--exact",
                "--nocapture",
                "--test-threads=1",
            ])
            .env("PATH", empty.path())
            .env(PROBE_TOOL, tool);
        if ci {
            child.env("CI", "true");
        } else {
            child.env_remove("CI");
        }
        let output = child.output().unwrap();
        let text = format!(
            "{}{}",
            String::from_utf8_lossy(&output.stdout),
            String::from_utf8_lossy(&output.stderr)
        );
        (output.status.success(), text)
    }

    #[test]
    fn missing_simulator_is_an_error_under_ci() {
        let (ok, text) = probe_without_tool("iverilog", true);
        assert!(
            !ok,
            "the probe passed although iverilog was missing under CI:\n{text}"
        );
        assert!(text.contains("1 failed"), "the probe did not run:\n{text}");
        assert!(text.contains(&missing_under_ci("iverilog")), "{text}");
        assert!(!text.contains("SKIPPED"), "{text}");
    }

    #[test]
    fn missing_simulator_is_a_loud_skip_without_ci() {
        let (ok, text) = probe_without_tool("ghdl", false);
        assert!(ok, "the probe failed without CI:\n{text}");
        assert!(text.contains("1 passed"), "the probe did not run:\n{text}");
        assert!(text.contains("*** SKIPPED: ghdl not found ***"), "{text}");
        assert!(text.contains("probe result: ghdl ran=false"), "{text}");
    }
}
