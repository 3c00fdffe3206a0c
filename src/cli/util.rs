//! Small helpers shared by the subcommands: reading the spec, stdout handling, progress bars,
//! tables and exit codes.

use std::io::{IsTerminal, Write};
use std::path::Path;
use std::process::ExitCode;

use arithvec::{Error, Spec};

/// How a subcommand ended, mapped to the documented exit codes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Outcome {
    /// 0: success.
    Success,
    /// 1: mismatches or unknown outputs.
    Mismatch,
    /// 3: everything passed but coverage is short of the requirement.
    CoverageShort,
}

impl Outcome {
    pub fn code(self) -> ExitCode {
        match self {
            Outcome::Success => ExitCode::SUCCESS,
            Outcome::Mismatch => ExitCode::from(1),
            Outcome::CoverageShort => ExitCode::from(3),
        }
    }
}

/// The one parser of every `--require PCT`: a finite number from 0 to 100, with an optional
/// `%` sign. `nan`, `inf` and `101` are refused (exit 2) the same way in every command.
pub fn parse_percent(s: &str) -> Result<f64, String> {
    let v: f64 = s
        .trim()
        .trim_end_matches('%')
        .parse()
        .map_err(|_| format!("\"{s}\" is not a percentage (a number from 0 to 100)"))?;
    if v.is_finite() && (0.0..=100.0).contains(&v) {
        Ok(v)
    } else {
        Err(format!("\"{s}\" is not a percentage from 0 to 100"))
    }
}

/// Reads and validates a spec file.
pub fn read_spec(path: &Path) -> Result<Spec, Error> {
    let text = std::fs::read_to_string(path).map_err(|e| Error::io(path, e))?;
    Spec::parse(&text, &path.display().to_string())
}

/// Buffered, locked stdout.
pub fn out() -> std::io::BufWriter<std::io::StdoutLock<'static>> {
    std::io::BufWriter::new(std::io::stdout().lock())
}

/// Wraps a stdout write error (a broken pipe exits quietly in main).
pub fn stdout_error(e: std::io::Error) -> Error {
    Error::io(Path::new("<stdout>"), e)
}

/// A progress bar on stderr for runs long enough to wait on; None when quiet, when stderr is
/// not a terminal, or when the job is small. No colours, so NO_COLOR holds trivially.
pub fn progress_bar(total: u64, quiet: bool, unit: &str) -> Option<indicatif::ProgressBar> {
    progress_bar_for_work(total, total, quiet, unit)
}

/// [`progress_bar`] counting `total` steps of `unit` for a job whose size is `work` (a bar of
/// fault classes, say, for a run that simulates every class against every vector).
pub fn progress_bar_for_work(
    total: u64,
    work: u64,
    quiet: bool,
    unit: &str,
) -> Option<indicatif::ProgressBar> {
    if quiet || work < 2_000_000 || !std::io::stderr().is_terminal() {
        return None;
    }
    let bar = indicatif::ProgressBar::new(total);
    let template = format!(
        "{{elapsed_precise}} [{{bar:40}}] {{pos}}/{{len}} {unit} ({{per_sec}}, eta {{eta}})"
    );
    if let Ok(style) = indicatif::ProgressStyle::with_template(&template) {
        bar.set_style(style.progress_chars("=> "));
    }
    Some(bar)
}

/// `count` followed by `one` when it is 1, else by `many`: "1 vector", "3 vectors".
pub fn counted(count: u64, one: &str, many: &str) -> String {
    format!("{count} {}", if count == 1 { one } else { many })
}

/// A plain table with a header row, in the process's table layout (see [`table_layout`]).
pub fn table<const N: usize>(header: &[&str; N], rows: &[[String; N]]) -> String {
    arithvec::render_table(header, rows.iter().map(|r| r.iter().cloned()))
}

/// The table layout for this run: ASCII with `--ascii` or when the locale (the first set of
/// `LC_ALL`, `LC_CTYPE`, `LANG`) names a character set other than UTF-8; a width limit from
/// `COLUMNS`, else the terminal's width when stdout is a terminal, else none (files and pipes
/// get full-width rows).
pub fn table_layout(ascii_flag: bool) -> arithvec::TableLayout {
    let locale = ["LC_ALL", "LC_CTYPE", "LANG"]
        .iter()
        .filter_map(|k| std::env::var(k).ok())
        .find(|v| !v.is_empty());
    let utf8 = match locale {
        None => true,
        Some(v) => {
            let v = v.to_ascii_lowercase();
            v.contains("utf-8") || v.contains("utf8")
        }
    };
    let columns = std::env::var("COLUMNS")
        .ok()
        .and_then(|c| c.trim().parse::<usize>().ok())
        .filter(|&c| c > 0);
    let max_width = columns.or_else(|| {
        if std::io::stdout().is_terminal() {
            console::Term::stdout()
                .size_checked()
                .map(|(_, cols)| cols as usize)
        } else {
            None
        }
    });
    arithvec::TableLayout {
        ascii: ascii_flag || !utf8,
        max_width,
    }
}

/// Writes `text` to `path` atomically (temporary file, then rename).
pub fn write_atomic(path: &Path, text: &[u8]) -> Result<(), Error> {
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "out".into());
    let tmp = dir.join(format!(".{name}.tmp"));
    let _interrupted = crate::cli::signals::guard_file(&tmp);
    let written = (|| {
        let mut f = std::fs::File::create(&tmp).map_err(|e| Error::io(&tmp, e))?;
        f.write_all(text).map_err(|e| Error::io(&tmp, e))?;
        f.sync_all().map_err(|e| Error::io(&tmp, e))?;
        drop(f);
        std::fs::rename(&tmp, path).map_err(|e| Error::io(path, e))
    })();
    if written.is_err() {
        // A failed write must not leave the temporary file behind.
        let _ = std::fs::remove_file(&tmp);
    }
    written
}

/// True when an output path is `-`, which means standard output for every file output.
pub fn is_stdout(path: &Path) -> bool {
    path.as_os_str() == "-"
}

/// Writes an output file: to standard output when `path` is `-`, else atomically.
pub fn write_output(path: &Path, text: &[u8]) -> Result<(), Error> {
    if is_stdout(path) {
        let mut o = out();
        o.write_all(text).map_err(stdout_error)?;
        return o.flush().map_err(stdout_error);
    }
    write_atomic(path, text)
}

/// The files of a vector-set directory: an output placed on one of them destroys the set.
const SET_FILES: [&str; 4] = [
    "manifest.json",
    "vectors.csv",
    "stimulus.hex",
    "expected.hex",
];

/// A path as far as it can be resolved: canonical when it exists, else its canonical parent
/// joined with its name (an output not written yet), else as given made absolute.
fn resolved(path: &Path) -> std::path::PathBuf {
    if let Ok(p) = path.canonicalize() {
        return p;
    }
    let parent = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    match (parent.canonicalize(), path.file_name()) {
        (Ok(dir), Some(name)) => dir.join(name),
        _ => std::path::absolute(path).unwrap_or_else(|_| path.to_path_buf()),
    }
}

/// Device and inode of an existing file, so hard links to one file are seen as one.
fn file_id(path: &Path) -> Option<(u64, u64)> {
    use std::os::unix::fs::MetadataExt;
    std::fs::metadata(path).ok().map(|m| (m.dev(), m.ino()))
}

/// Why output `out` would destroy `other` (an input, or another output), if it would.
fn collision(out: &Path, other: &Path) -> Option<&'static str> {
    if is_stdout(out) || is_stdout(other) {
        return (is_stdout(out) && is_stdout(other)).then_some("standard output as well as");
    }
    let (a, b) = (resolved(out), resolved(other));
    if a == b || file_id(out).is_some_and(|id| file_id(other) == Some(id)) {
        return Some("the same file or directory as");
    }
    // A file of a vector set inside the other's directory, either way round.
    let inside = |file: &std::path::Path, dir: &std::path::Path| {
        file.parent() == Some(dir)
            && file
                .file_name()
                .is_some_and(|n| SET_FILES.iter().any(|s| n == *s))
            && dir.is_dir()
    };
    if inside(&a, &b) || inside(&b, &a) {
        return Some("a file of the vector set in");
    }
    None
}

/// Refuses (exit 2) any output that is the same file or directory as an input or another
/// output (by canonical path and by inode), or that would replace a file of an input vector
/// set; two outputs on standard output (`-`) are refused too. Nothing has been written when
/// this fails. Each entry is (option, path).
pub fn refuse_collisions(inputs: &[(&str, &Path)], outputs: &[(&str, &Path)]) -> Result<(), Error> {
    use arithvec::Problem;
    let mut problems = Vec::new();
    for (k, (opt, out)) in outputs.iter().enumerate() {
        let others = inputs
            .iter()
            .map(|i| (i, "input"))
            .chain(outputs[..k].iter().map(|o| (o, "output")));
        for ((other_opt, other), role) in others {
            if let Some(how) = collision(out, other) {
                problems.push(
                    Problem::new(
                        out.display().to_string(),
                        format!(
                            "{opt} {} is {how} {role} {other_opt} {}; refusing to overwrite it \
                             (choose another path)",
                            out.display(),
                            other.display()
                        ),
                    )
                    .field(opt.trim_start_matches('-')),
                );
            }
        }
    }
    if problems.is_empty() {
        Ok(())
    } else {
        Err(Error::input(problems))
    }
}
