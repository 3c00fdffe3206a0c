//! `arithvec check` and `arithvec merge`: arguments, the log loop, report files, exit codes.

use std::io::{BufRead, BufReader, Write};
use std::path::{Path, PathBuf};

use clap::Args;

use arithvec::{
    merge_reports, read_manifest, render_check_html, render_junit, render_text, verdict_line,
    CheckOptions, CheckReport, Checker, ClassRows, Error, Generator, HtmlContext, HtmlRun,
    LogReader, Manifest, Problem, Radix, Spec, Verdict, HTML_FAILURES,
};

use crate::cli::util::{out, read_spec, stdout_error, write_atomic, Outcome};

pub const CHECK_HELP: &str = "Example:\n  arithvec check unit.toml --log results.csv --vectors vec/ --require 100 \\\n      --junit check.xml --json check.json\n\n\
The log has a header row naming columns after the spec's ports (and optionally `index`), \
comma- or whitespace-separated, values in hex unless --radix says otherwise; x/z digits make \
an output unknown, which never passes.\n\n\
Exit codes: 0 all passed and the gate is met; 1 a mismatch, an unknown output, or an \
incomplete log; 2 bad input; 3 all passed but coverage is short of --require.\n\n\
Coverage of corner classes is evidence, not proof of correctness; sign-off follows your \
team's own verification plan.";

pub const MERGE_HELP: &str =
    "Example:\n  arithvec merge run1.json run2.json shard3.json -o all.json --require 100\n\n\
Reports must come from `arithvec check --json` on the same spec (the [random] table may \
differ) and the same arithvec version. Exit codes as for check.";

#[derive(Args)]
pub struct CheckArgs {
    /// The operation spec (TOML).
    spec: PathBuf,
    /// The simulator's result log ("-" for standard input).
    #[arg(long)]
    log: PathBuf,
    /// The vector set the testbench applied (enables missing-vector and out-of-step checks,
    /// and operands by index for logs without operand columns).
    #[arg(long)]
    vectors: Option<PathBuf>,
    /// Radix of the log's values.
    #[arg(long, default_value = "hex", value_parser = parse_radix)]
    radix: Radix,
    /// Count and list unparseable lines instead of failing with exit 2.
    #[arg(long)]
    lenient: bool,
    /// Failures shown in detail.
    #[arg(long, default_value_t = 10)]
    max_failures: usize,
    /// Hits a bin needs to count as covered.
    #[arg(long, default_value_t = 1, value_parser = clap::value_parser!(u64).range(1..))]
    at_least: u64,
    /// Class coverage required, in percent (exit 3 when short).
    #[arg(long, value_name = "PCT", value_parser = parse_percent)]
    require: Option<f64>,
    /// Write JUnit XML here (one test case per corner class).
    #[arg(long, value_name = "FILE")]
    junit: Option<PathBuf>,
    /// Write the JSON report here.
    #[arg(long, value_name = "FILE")]
    json: Option<PathBuf>,
    /// Write a self-contained HTML report here (lists the first 100 failures).
    #[arg(long, value_name = "FILE")]
    html: Option<PathBuf>,
    /// List only classes that are not covered in the text report.
    #[arg(long)]
    brief: bool,
}

#[derive(Args)]
pub struct MergeArgs {
    /// JSON reports from `arithvec check --json`.
    #[arg(required = true)]
    reports: Vec<PathBuf>,
    /// Write the merged JSON report here.
    #[arg(long, short)]
    output: Option<PathBuf>,
    /// Class coverage required, in percent (exit 3 when short).
    #[arg(long, value_name = "PCT", value_parser = parse_percent)]
    require: Option<f64>,
    /// Hits a bin needs to count as covered.
    #[arg(long, default_value_t = 1, value_parser = clap::value_parser!(u64).range(1..))]
    at_least: u64,
    /// Write JUnit XML here.
    #[arg(long, value_name = "FILE")]
    junit: Option<PathBuf>,
    /// Write a self-contained HTML report here (a row per run and the union).
    #[arg(long, value_name = "FILE")]
    html: Option<PathBuf>,
    /// Failures shown in detail.
    #[arg(long, default_value_t = 10)]
    max_failures: usize,
    /// List only classes that are not covered in the text report.
    #[arg(long)]
    brief: bool,
}

fn parse_radix(s: &str) -> Result<Radix, String> {
    s.parse()
}

fn parse_percent(s: &str) -> Result<f64, String> {
    let v: f64 = s
        .trim_end_matches('%')
        .parse()
        .map_err(|_| format!("\"{s}\" is not a percentage"))?;
    if (0.0..=100.0).contains(&v) {
        Ok(v)
    } else {
        Err(format!("{v} is not between 0 and 100"))
    }
}

fn outcome(r: &CheckReport) -> Outcome {
    match r.verdict {
        Verdict::Pass => Outcome::Success,
        Verdict::Fail => Outcome::Mismatch,
        Verdict::CoverageShort => Outcome::CoverageShort,
    }
}

/// Reads the vector set's manifest and checks it belongs to this spec and this version.
pub fn open_vectors(dir: &Path, spec: &Spec) -> Result<(Manifest, Generator), Error> {
    let manifest = read_manifest(dir)?;
    let mpath = dir.join(arithvec::MANIFEST_JSON).display().to_string();
    if manifest.spec_sha256 != arithvec::spec_identity(spec) {
        return Err(Error::problem(
            Problem::new(
                mpath,
                format!(
                    "the vector set was generated from a different spec (unit \"{}\"); \
                     regenerate it with `arithvec gen`",
                    manifest.unit
                ),
            )
            .field("spec_sha256"),
        ));
    }
    if manifest.version != env!("CARGO_PKG_VERSION") {
        return Err(Error::problem(
            Problem::new(
                mpath,
                format!(
                    "the vector set was written by arithvec {}; this is {}; regenerate it",
                    manifest.version,
                    env!("CARGO_PKG_VERSION")
                ),
            )
            .field("version"),
        ));
    }
    // A selected (compacted) set regenerates its source set and maps positions to indices.
    let (random, directed) = match &manifest.selection {
        Some(s) => (s.source_random, s.source_directed),
        None => (manifest.random, manifest.directed),
    };
    let generator = Generator::new(spec, Some(random), Some(manifest.seed));
    if generator.directed().len() as u64 != directed {
        return Err(Error::problem(
            Problem::new(
                mpath,
                "the manifest's directed count does not match this spec",
            )
            .field("directed"),
        ));
    }
    Ok((manifest, generator))
}

pub fn check(args: CheckArgs, quiet: bool) -> Result<Outcome, Error> {
    let spec = read_spec(&args.spec)?;
    let (manifest, generator) = match &args.vectors {
        Some(dir) => {
            let (m, g) = open_vectors(dir, &spec)?;
            (Some(m), g)
        }
        None => (None, Generator::new(&spec, None, None)),
    };
    let log_name = args.log.display().to_string();
    let input: Box<dyn BufRead> = if args.log.as_os_str() == "-" {
        Box::new(BufReader::with_capacity(1 << 20, std::io::stdin()))
    } else {
        let f = std::fs::File::open(&args.log).map_err(|e| Error::io(&args.log, e))?;
        Box::new(BufReader::with_capacity(1 << 20, f))
    };
    let mut reader = LogReader::new(input, &log_name, &spec, args.radix)?;
    // The HTML page lists up to HTML_FAILURES failures; the other reports keep --max-failures.
    let kept = if args.html.is_some() {
        args.max_failures.max(HTML_FAILURES)
    } else {
        args.max_failures
    };
    let options = CheckOptions {
        max_failures: kept,
        at_least: args.at_least,
        require: args.require,
        repro_command: format!("arithvec repro {}", args.spec.display()),
        threads: 0,
    };
    let mut checker = Checker::new(
        &spec,
        &generator,
        manifest.as_ref(),
        reader.columns(),
        options,
    )
    .map_err(|p| {
        Error::problem(Problem {
            file: log_name.clone(),
            ..p
        })
    })?;
    checker.add_log(&log_name);
    let bar = spinner(quiet);
    let bad = checker.check_log(&mut reader, args.lenient, |n| {
        if let Some(b) = &bar {
            b.set_position(n);
        }
    })?;
    if let Some(b) = bar {
        b.finish_and_clear();
    }
    if !bad.is_empty() {
        let mut problems = bad;
        problems.push(Problem::new(
            log_name,
            "unparseable lines are bad input; fix the log or pass --lenient to count and skip them",
        ));
        return Err(Error::input(problems));
    }
    let mut report = checker.finish();
    if let Some(path) = &args.html {
        let ctx = HtmlContext {
            seed: Some(manifest.as_ref().map_or(spec.random.seed, |m| m.seed)),
            seed_source: if manifest.is_some() {
                "vector set manifest".to_string()
            } else {
                "spec; no --vectors given".to_string()
            },
            runs: Vec::new(),
        };
        let page = render_check_html(&report, &spec, generator.catalogue(), &ctx);
        write_atomic(path, page.as_bytes())?;
        report.failures.truncate(args.max_failures);
    }
    emit(
        &report,
        args.json.as_deref(),
        args.junit.as_deref(),
        quiet,
        args.brief,
    )?;
    Ok(outcome(&report))
}

fn spinner(quiet: bool) -> Option<indicatif::ProgressBar> {
    use std::io::IsTerminal;
    if quiet || !std::io::stderr().is_terminal() {
        return None;
    }
    let bar = indicatif::ProgressBar::new_spinner();
    if let Ok(style) =
        indicatif::ProgressStyle::with_template("{elapsed_precise} {pos} lines checked ({per_sec})")
    {
        bar.set_style(style);
    }
    Some(bar)
}

fn emit(
    report: &CheckReport,
    json: Option<&Path>,
    junit: Option<&Path>,
    quiet: bool,
    brief: bool,
) -> Result<(), Error> {
    if let Some(path) = json {
        let mut text = serde_json::to_string_pretty(report).expect("report serialises");
        text.push('\n');
        write_atomic(path, text.as_bytes())?;
    }
    if let Some(path) = junit {
        write_atomic(path, render_junit(report).as_bytes())?;
    }
    let mut o = out();
    if quiet {
        writeln!(o, "{}", verdict_line(report)).map_err(stdout_error)?;
    } else {
        let rows = if brief {
            ClassRows::Problems
        } else {
            ClassRows::All
        };
        write!(o, "{}", render_text(report, rows)).map_err(stdout_error)?;
    }
    o.flush().map_err(stdout_error)
}

pub fn merge(args: MergeArgs, quiet: bool) -> Result<Outcome, Error> {
    let mut reports = Vec::new();
    for path in &args.reports {
        let text = std::fs::read_to_string(path).map_err(|e| Error::io(path, e))?;
        let r: CheckReport = serde_json::from_str(&text).map_err(|e| {
            Error::problem(
                Problem::new(
                    path.display().to_string(),
                    format!("not an arithvec check report: {e}"),
                )
                .at_line(e.line()),
            )
        })?;
        reports.push((path.display().to_string(), r));
    }
    let (first_name, first) = &reports[0];
    let spec = Spec::parse(&first.spec_toml, &format!("{first_name} (spec_toml)"))?;
    let generator = Generator::new(&spec, Some(0), None);
    let options = CheckOptions {
        max_failures: if args.html.is_some() {
            args.max_failures.max(HTML_FAILURES)
        } else {
            args.max_failures
        },
        at_least: args.at_least,
        require: args.require,
        repro_command: String::new(),
        threads: 1,
    };
    let mut merged =
        merge_reports(&spec, &generator, &reports, &options).map_err(Error::problem)?;
    if let Some(path) = &args.html {
        let runs = reports
            .iter()
            .map(|(name, r)| HtmlRun {
                name: name.clone(),
                logs: r.logs.clone(),
                seed: Spec::parse(&r.spec_toml, name).ok().map(|s| s.random.seed),
                vectors: r.vectors,
                passed: r.passed,
                failed: r.failed,
                unknown: r.unknown,
                verdict: r.verdict,
            })
            .collect();
        let ctx = HtmlContext {
            seed: Some(spec.random.seed),
            seed_source: format!("spec of {first_name}; each run's seed is in the run table"),
            runs,
        };
        let page = render_check_html(&merged, &spec, generator.catalogue(), &ctx);
        write_atomic(path, page.as_bytes())?;
        merged.failures.truncate(args.max_failures);
    }
    emit(
        &merged,
        args.output.as_deref(),
        args.junit.as_deref(),
        quiet,
        args.brief,
    )?;
    Ok(outcome(&merged))
}
