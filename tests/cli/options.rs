//! Issue 9, item 19: one meaning per option name across commands, checked on every
//! subcommand's `--help`: `-o`/`--output` is a file, `--out` a directory, `--format` values are
//! words from text|json|csv (text for people), and `--radix` lists its values. The old
//! spellings (`--format table`, `gen -o DIR`) still work as hidden aliases.

use crate::util::{Sandbox, FLOW_ADDER};

fn subcommands(sb: &Sandbox) -> Vec<String> {
    let help = sb.run(&["--help"]);
    help.expect_code(0);
    help.stdout
        .lines()
        .skip_while(|l| !l.starts_with("Commands:"))
        .skip(1)
        .take_while(|l| l.starts_with("  "))
        .filter_map(|l| l.split_whitespace().next())
        .filter(|c| *c != "help")
        .map(str::to_string)
        .collect()
}

#[test]
fn issue9_option_names_mean_one_thing_in_every_command() {
    let sb = Sandbox::new();
    let commands = subcommands(&sb);
    assert!(commands.len() >= 7, "{commands:?}");
    for command in &commands {
        let help = sb.run(&[command, "--help"]);
        help.expect_code(0);
        // In clap's long layout an option's description and values follow on the next
        // lines; join each option with them.
        let mut options: Vec<String> = Vec::new();
        for line in help.stdout.lines().map(str::trim_start) {
            if line.starts_with('-') {
                options.push(line.to_string());
            } else if let Some(last) = options.last_mut() {
                if !line.is_empty() {
                    last.push(' ');
                    last.push_str(line);
                }
            }
        }
        for line in options.iter().map(String::as_str) {
            let describe = || format!("{command} --help: {line}");
            if line.starts_with("-o, ") {
                assert!(line.starts_with("-o, --output "), "{}", describe());
            }
            if line.starts_with("-o, --output ") || line.starts_with("--output ") {
                assert!(
                    line.contains("file") || line.contains("report"),
                    "--output names a file: {}",
                    describe()
                );
            }
            if line.starts_with("--out ") {
                assert!(
                    line.contains("directory"),
                    "--out is a directory: {}",
                    describe()
                );
            }
            if line.starts_with("--format ") {
                let values = line
                    .split("[possible values: ")
                    .nth(1)
                    .unwrap_or_else(|| panic!("no values: {}", describe()));
                for v in values.trim_end_matches(']').split(',').map(str::trim) {
                    assert!(
                        ["text", "json", "csv"].contains(&v),
                        "format value {v:?}: {}",
                        describe()
                    );
                }
                assert!(values.contains("text"), "{}", describe());
            }
            if line.starts_with("--radix ") {
                for v in ["hex", "bin", "dec"] {
                    assert!(line.contains(v), "--radix lists {v}: {}", describe());
                }
            }
        }
    }

    // The old spellings still run.
    let spec = sb.write("flow.toml", FLOW_ADDER);
    sb.run(&["classes", &spec, "--format", "table"])
        .expect_code(0);
    sb.run(&["classes", &spec, "--format", "text"])
        .expect_code(0);
    sb.run(&["gen", &spec, "-o", "old", "-q"]).expect_code(0);
    assert!(sb.path("old/manifest.json").exists());
}

/// The `-q/--quiet` help of one subcommand, joined across clap's wrapped lines.
fn quiet_help(sb: &Sandbox, command: &str) -> String {
    let help = sb.run(&[command, "--help"]);
    help.expect_code(0);
    let mut text = String::new();
    let mut inside = false;
    for line in help.stdout.lines().map(str::trim) {
        if line.starts_with("-q, --quiet") {
            inside = true;
            text.push_str(line.trim_start_matches("-q, --quiet").trim());
        } else if inside {
            if line.is_empty() || line.starts_with('-') {
                break;
            }
            text.push(' ');
            text.push_str(line);
        }
    }
    assert!(!text.is_empty(), "{command} --help has no -q, --quiet");
    text
}

#[test]
fn issue9_quiet_help_is_written_per_command() {
    let sb = Sandbox::new();
    let commands = subcommands(&sb);
    let mut seen: Vec<(String, String)> = Vec::new();
    for command in &commands {
        let text = quiet_help(&sb, command);
        if let Some((other, _)) = seen.iter().find(|(_, t)| *t == text) {
            panic!("{command} and {other} share one -q help: {text}");
        }
        seen.push((command.clone(), text));
    }
    // Each says what that command stops printing (or that it prints its output anyway).
    let said = |c: &str| seen.iter().find(|(n, _)| n == c).unwrap().1.clone();
    assert!(said("check").contains("verdict line"), "{}", said("check"));
    assert!(said("gen").contains("summary"), "{}", said("gen"));
    assert!(said("gen").contains("progress bar"), "{}", said("gen"));
    assert!(said("testbench").contains("file"), "{}", said("testbench"));

    // -q works before and after the command name.
    let spec = sb.write("flow.toml", FLOW_ADDER);
    for (dir, args) in [("q1", ["-q", "gen"]), ("q2", ["gen", "-q"])] {
        let run = sb.run(&[args[0], args[1], &spec, "--out", dir]);
        run.expect_code(0);
        assert_eq!(run.stdout, "", "{args:?}");
    }
    let loud = sb.run(&["gen", &spec, "--out", "q3"]);
    loud.expect_code(0);
    assert!(loud.stdout.contains("wrote "), "{}", loud.stdout);
}
