//! `arithvec check` and `arithvec merge`: arguments, the log loop, report files, exit codes.

use std::io::{BufRead, BufReader, Write};
use std::path::{Path, PathBuf};

use clap::Args;

use arithvec::verify_files;
use arithvec::{
    merge_reports, read_manifest_unverified, render_check_html, render_junit_timed, render_text,
    verdict_line, CheckOptions, CheckReport, Checker, ClassRows, Error, Generator, HtmlContext,
    HtmlRun, LogReader, Manifest, Mix, Problem, Radix, Spec, Verdict, HTML_FAILURES,
};

use crate::cli::util::{
    is_stdout, out, parse_percent, read_spec, refuse_collisions, stdout_error, write_output,
    Outcome,
};

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
Reports must come from `arithvec check --json` on the same spec (the [random] table and \
[dut] may differ) and the same arithvec version. Counts and coverage add up; completeness is \
judged over the union of the runs' seen indices: the runs of one vector set must see every \
index once (indices seen twice are duplicates). The same run given twice is refused (exit 2).\n\n\
Incremental: `arithvec merge --into total.json shard7.json` merges into total.json in place \
(starting it when it does not exist yet). Exit codes as for check.";

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
    /// Radix of the log's values: hex, bin or dec (a leading - in dec is a signed value in
    /// the spec's encoding).
    #[arg(long, default_value = "hex", value_parser = parse_radix, value_name = "hex|bin|dec")]
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
    /// Write JUnit XML here (one test case per corner class; "-" for standard output).
    #[arg(long, value_name = "FILE")]
    junit: Option<PathBuf>,
    /// Write the JSON report here ("-" for standard output).
    #[arg(long, value_name = "FILE")]
    json: Option<PathBuf>,
    /// Write a self-contained HTML report here (lists the first 100 failures).
    #[arg(long, value_name = "FILE")]
    html: Option<PathBuf>,
    /// List only classes that are not covered in the text report.
    #[arg(long)]
    brief: bool,
    /// Compare only these output ports (comma-separated port names, e.g. y,co). Without it
    /// every output of the spec must be in the log; the reports state the narrowing.
    #[arg(long, value_name = "PORTS", value_delimiter = ',')]
    outputs: Option<Vec<String>>,
    /// Clocked units with a reset port: require every output known (no x/z) in the
    /// testbench's reset sample, taken after reset and before the first vector.
    #[arg(long)]
    reset_known: bool,
    #[command(flatten)]
    threads: crate::cli::threads::ThreadsArg,
}

#[derive(Args)]
pub struct MergeArgs {
    /// JSON reports from `arithvec check --json` (or earlier merges).
    #[arg(required = true)]
    reports: Vec<PathBuf>,
    /// Write the merged JSON report here ("-" for standard output).
    #[arg(long, short)]
    output: Option<PathBuf>,
    /// Merge the reports into this merged report, in place (created when missing).
    #[arg(long, value_name = "TOTAL.json", conflicts_with = "output")]
    into: Option<PathBuf>,
    /// Class coverage required, in percent (exit 3 when short).
    #[arg(long, value_name = "PCT", value_parser = parse_percent)]
    require: Option<f64>,
    /// Hits a bin needs to count as covered.
    #[arg(long, default_value_t = 1, value_parser = clap::value_parser!(u64).range(1..))]
    at_least: u64,
    /// Write JUnit XML here ("-" for standard output).
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

fn outcome_of(r: &CheckReport) -> Outcome {
    match r.verdict {
        Verdict::Pass => Outcome::Success,
        Verdict::Fail => Outcome::Mismatch,
        Verdict::CoverageShort => Outcome::CoverageShort,
    }
}

/// Reads the vector set's manifest, verifies the files against it, and checks it belongs to
/// this spec and this version.
pub fn open_vectors(dir: &Path, spec: &Spec) -> Result<(Manifest, Generator), Error> {
    let opened = open_vectors_unverified(dir, spec)?;
    verify_files(dir, &opened.0)?;
    Ok(opened)
}

/// [`open_vectors`] without the files' verification, for a caller that verifies them on
/// another thread while it works and refuses the set before giving any verdict.
fn open_vectors_unverified(dir: &Path, spec: &Spec) -> Result<(Manifest, Generator), Error> {
    let manifest = read_manifest_unverified(dir)?;
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
    if let Some(s) = &manifest.selection {
        let positions = s.indices.len() as u64 + s.top_up.len() as u64;
        if positions != manifest.vectors {
            return Err(Error::problem(
                Problem::new(
                    mpath,
                    format!(
                        "the selection lists {} source indices and {} top-up vectors but the \
                         set holds {} vectors",
                        s.indices.len(),
                        s.top_up.len(),
                        manifest.vectors
                    ),
                )
                .field("selection"),
            ));
        }
        for (k, t) in s.top_up.iter().enumerate() {
            t.operands(spec, &mpath, k)?;
        }
    }
    // A selected (compacted) set regenerates its source set and maps positions to indices.
    let (random, directed) = match &manifest.selection {
        Some(s) => (s.source_random, s.source_directed),
        None => (manifest.random, manifest.directed),
    };
    // The set's own [random] draw (mix, corner share) determines its random vectors, as its
    // own count and seed do; the spec's [random] table may differ (it is not in the identity).
    let mut set_spec = spec.clone();
    let r = &manifest.spec["random"];
    set_spec.random.mix = match r["mix"].as_str() {
        Some("uniform") => Mix::Uniform,
        Some("corner") => Mix::Corner,
        _ => {
            return Err(Error::problem(
                Problem::new(mpath, "the manifest's spec has no valid random.mix")
                    .field("spec.random.mix"),
            ))
        }
    };
    set_spec.random.corner_share = match r["corner_share"].as_u64().map(u32::try_from) {
        Some(Ok(share)) if share <= 100 => share,
        _ => {
            return Err(Error::problem(
                Problem::new(
                    mpath,
                    "the manifest's spec has no valid random.corner_share",
                )
                .field("spec.random.corner_share"),
            ))
        }
    };
    let mut generator = Generator::new(&set_spec, Some(random), Some(manifest.seed));
    if let Some(pairs) = &manifest.pairs {
        // Launch/capture pairs (`gen --pairs`) are rebuilt from the spec like the other
        // directed vectors; their recorded place must be where they are rebuilt.
        let corner_directed = generator.directed().len() as u64;
        generator = generator.with_transition_pairs(&set_spec)?;
        if pairs.layout != arithvec::PAIR_LAYOUT
            || pairs.first_index != corner_directed
            || generator.transition_pair_block() != Some((pairs.first_index, pairs.pairs))
        {
            return Err(Error::problem(
                Problem::new(
                    mpath,
                    format!(
                        "the manifest's pairs ({} pairs from index {}, layout \"{}\") are not the \
                         pairs this spec gives ({} pairs from index {corner_directed}, layout \
                         \"{}\")",
                        pairs.pairs,
                        pairs.first_index,
                        pairs.layout,
                        generator.transition_pair_block().map_or(0, |b| b.1),
                        arithvec::PAIR_LAYOUT
                    ),
                )
                .field("pairs"),
            ));
        }
    }
    if let Some(imported) = &manifest.imported {
        // Imported vectors are read from the set's own stimulus.hex; a set made only of them
        // (`arithvec import`) has no directed or random part.
        if manifest.selection.is_some() || manifest.shard.is_some() {
            return Err(Error::problem(
                Problem::new(
                    mpath,
                    "a set with imported vectors is never a shard or a selection; the manifest \
                     is damaged",
                )
                .field("imported"),
            ));
        }
        if imported.first_index == 0 {
            generator = generator.without_generated();
        }
        let rows = arithvec::read_imported(dir, spec, &manifest)?;
        generator = generator.with_appended(rows);
        if generator.directed().len() as u64 + generator.random_count() != imported.first_index
            || generator.total() != manifest.total
        {
            return Err(Error::problem(
                Problem::new(
                    mpath,
                    "the imported vectors' position does not match the set's directed and \
                     random counts",
                )
                .field("imported.first_index"),
            ));
        }
        return Ok((manifest, generator));
    }
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

/// The signals of `--outputs`: each name must be an output port of the spec.
fn output_signals(spec: &Spec, names: &[String]) -> Result<Vec<arithvec::Signal>, Error> {
    let outputs = spec.outputs();
    let mut chosen = Vec::new();
    let mut problems = Vec::new();
    for name in names.iter().map(|n| n.trim()) {
        match outputs.iter().find(|(_, port)| *port == name) {
            Some((sig, _)) if !chosen.contains(sig) => chosen.push(*sig),
            Some(_) => problems.push(
                Problem::new("--outputs", format!("output \"{name}\" is named twice"))
                    .field("outputs"),
            ),
            None => problems.push(
                Problem::new(
                    "--outputs",
                    format!(
                        "\"{name}\" is not an output port of the spec; its outputs are {}",
                        outputs
                            .iter()
                            .map(|(_, p)| *p)
                            .collect::<Vec<_>>()
                            .join(", ")
                    ),
                )
                .field("outputs"),
            ),
        }
    }
    if chosen.is_empty() && problems.is_empty() {
        problems.push(Problem::new("--outputs", "names no output port").field("outputs"));
    }
    if problems.is_empty() {
        Ok(chosen)
    } else {
        Err(Error::input(problems))
    }
}

pub fn check(args: CheckArgs, quiet: bool) -> Result<Outcome, Error> {
    let mut inputs: Vec<(&str, &Path)> = vec![("SPEC", &args.spec), ("--log", &args.log)];
    if let Some(v) = &args.vectors {
        inputs.push(("--vectors", v));
    }
    let mut outputs: Vec<(&str, &Path)> = Vec::new();
    if let Some(j) = &args.json {
        outputs.push(("--json", j));
    }
    if let Some(j) = &args.junit {
        outputs.push(("--junit", j));
    }
    if let Some(h) = &args.html {
        outputs.push(("--html", h));
    }
    refuse_collisions(&inputs, &outputs)?;
    let started = std::time::Instant::now();
    let spec = read_spec(&args.spec)?;
    let (manifest, generator) = match &args.vectors {
        Some(dir) => {
            let (m, g) = open_vectors_unverified(dir, &spec)?;
            (Some(m), g)
        }
        None => (None, Generator::new(&spec, None, None)),
    };
    // The set's files are hashed on a thread of their own while the log is checked (one
    // streaming pass each); a mismatch refuses the set (exit 2) before any verdict is shown.
    let verification = match (&args.vectors, &manifest) {
        (Some(dir), Some(m)) => {
            let (dir, m) = (dir.clone(), m.clone());
            Some(std::thread::spawn(move || verify_files(&dir, &m)))
        }
        _ => None,
    };
    let outcome = check_log(&args, quiet, &spec, &generator, manifest.as_ref());
    if let Some(handle) = verification {
        handle
            .join()
            .unwrap_or_else(|panic| std::panic::resume_unwind(panic))?;
    }
    let mut report = outcome?;
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
        write_output(path, page.as_bytes())?;
        report.failures.truncate(args.max_failures);
    }
    emit(
        &report,
        started,
        args.json.as_deref(),
        args.junit.as_deref(),
        quiet,
        args.brief,
    )?;
    Ok(outcome_of(&report))
}

/// The log half of `check`: reads and judges every row and returns the report.
fn check_log(
    args: &CheckArgs,
    quiet: bool,
    spec: &Spec,
    generator: &Generator,
    manifest: Option<&Manifest>,
) -> Result<CheckReport, Error> {
    let log_name = args.log.display().to_string();
    if spec.timing.is_some() && args.log.as_os_str() == "-" {
        return Err(Error::problem(
            Problem::new(
                "--log",
                "a clocked unit's log is read twice (results, then their count and order): \
                 give a file, not standard input",
            )
            .field("log"),
        ));
    }
    if args.reset_known && spec.timing.as_ref().is_none_or(|t| t.reset.is_none()) {
        return Err(Error::problem(
            Problem::new(
                "--reset-known",
                "needs a clocked unit with a reset port ([timing] reset = \"<port>\")",
            )
            .field("reset_known"),
        ));
    }
    let input: Box<dyn BufRead> = if args.log.as_os_str() == "-" {
        Box::new(BufReader::with_capacity(1 << 20, std::io::stdin()))
    } else {
        let f = std::fs::File::open(&args.log).map_err(|e| Error::io(&args.log, e))?;
        Box::new(BufReader::with_capacity(1 << 20, f))
    };
    let mut reader = LogReader::new(input, &log_name, spec, args.radix)?;
    let outputs = args
        .outputs
        .as_deref()
        .map(|names| output_signals(spec, names))
        .transpose()?;
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
        threads: args.threads.resolve()?,
        outputs,
    };
    let mut checker =
        Checker::new(spec, generator, manifest, reader.columns(), options).map_err(|p| {
            Error::problem(Problem {
                file: log_name.clone(),
                ..p
            })
        })?;
    checker.add_log(&log_name);
    // With --vectors the total is the manifest's vector count: a bar with ETA; without, a
    // spinner. Either only on a terminal (stderr), so files and pipes see the same bytes.
    let bar = match manifest {
        Some(m) => crate::cli::util::progress_bar(m.vectors, quiet, "rows checked"),
        None => spinner(quiet),
    };
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
    if spec.timing.is_some() {
        timing_pass(args, spec, generator, manifest, &mut report)?;
    }
    Ok(report)
}

/// A clocked unit's second pass over its log: the results' count and order and the reset
/// sample (`arithvec::TimingPass`).
fn timing_pass(
    args: &CheckArgs,
    spec: &Spec,
    generator: &Generator,
    manifest: Option<&Manifest>,
    report: &mut CheckReport,
) -> Result<(), Error> {
    let open = || -> Result<BufReader<std::fs::File>, Error> {
        let f = std::fs::File::open(&args.log).map_err(|e| Error::io(&args.log, e))?;
        Ok(BufReader::with_capacity(1 << 20, f))
    };
    let log_name = args.log.display().to_string();
    let markers = arithvec::scan_markers(open()?).map_err(|e| Error::io(&args.log, e))?;
    let (first, vectors) = manifest.map_or((0, generator.total()), |m| (m.first_index, m.vectors));
    let mut pass = arithvec::TimingPass::new(spec, generator, first, vectors);
    let mut reader = LogReader::new(open()?, &log_name, spec, args.radix)?;
    let mut row = arithvec::LogRow::new();
    loop {
        match reader.read_row(&mut row) {
            Ok(true) => pass.row(&row),
            Ok(false) => break,
            // Bad lines were judged by the first pass (refused, or counted with --lenient).
            Err(arithvec::RowError::Line(_)) => continue,
            Err(arithvec::RowError::Io(e)) => return Err(e),
        }
    }
    arithvec::apply_timing(report, pass.finish(markers, args.reset_known));
    Ok(())
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
    started: std::time::Instant,
    json: Option<&Path>,
    junit: Option<&Path>,
    quiet: bool,
    brief: bool,
) -> Result<(), Error> {
    if let Some(path) = json {
        let mut text = serde_json::to_string_pretty(report).expect("report serialises");
        text.push('\n');
        write_output(path, text.as_bytes())?;
    }
    if let Some(path) = junit {
        write_output(
            path,
            render_junit_timed(report, Some(started.elapsed())).as_bytes(),
        )?;
    }
    let text = if quiet {
        format!("{}\n", verdict_line(report))
    } else {
        let rows = if brief {
            ClassRows::Problems
        } else {
            ClassRows::All
        };
        render_text(report, rows)
    };
    // When a report file goes to standard output, the text for people goes to stderr so
    // the file stays parseable.
    if json.is_some_and(is_stdout) || junit.is_some_and(is_stdout) {
        eprint!("{text}");
        return Ok(());
    }
    let mut o = out();
    write!(o, "{text}").map_err(stdout_error)?;
    o.flush().map_err(stdout_error)
}

/// Reads one JSON check report.
fn read_report(path: &Path) -> Result<CheckReport, Error> {
    let text = std::fs::read_to_string(path).map_err(|e| Error::io(path, e))?;
    serde_json::from_str(&text).map_err(|e| {
        Error::problem(
            Problem::new(
                path.display().to_string(),
                format!("not an arithvec check report: {e}"),
            )
            .at_line(e.line()),
        )
    })
}

pub fn merge(args: MergeArgs, quiet: bool) -> Result<Outcome, Error> {
    let started = std::time::Instant::now();
    let inputs: Vec<(&str, &Path)> = args
        .reports
        .iter()
        .map(|r| ("REPORT", r.as_path()))
        .collect();
    let mut outputs: Vec<(&str, &Path)> = Vec::new();
    if let Some(o) = &args.output {
        outputs.push(("--output", o));
    }
    if let Some(into) = &args.into {
        // --into is read and rewritten in place on purpose; it must not also be a REPORT.
        outputs.push(("--into", into));
    }
    if let Some(j) = &args.junit {
        outputs.push(("--junit", j));
    }
    refuse_collisions(&inputs, &outputs)?;
    let mut reports = Vec::new();
    if let Some(into) = &args.into {
        if into.exists() {
            reports.push((into.display().to_string(), read_report(into)?));
        }
    }
    for path in &args.reports {
        reports.push((path.display().to_string(), read_report(path)?));
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
        outputs: None,
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
        write_output(path, page.as_bytes())?;
        merged.failures.truncate(args.max_failures);
    }
    emit(
        &merged,
        started,
        args.output.as_deref().or(args.into.as_deref()),
        args.junit.as_deref(),
        quiet,
        args.brief,
    )?;
    Ok(outcome_of(&merged))
}
