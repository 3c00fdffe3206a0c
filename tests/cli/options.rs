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
