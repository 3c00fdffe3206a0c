//! The `arithvec` command line: parses arguments, calls the library, prints, and maps
//! outcomes to exit codes (0 success, 1 mismatches, 2 bad input or usage, 3 coverage short).

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::{CommandFactory, FromArgMatches, Parser, Subcommand, ValueEnum};

use arithvec::{
    csv_header, csv_row, emit_testbench, testbench_file_name, write_vector_set, Catalogue, Error,
    Generator, Hdl, Problem, Shard, Signal, Spec, TestbenchOptions, Value, WriteOptions,
};

mod cli;

use cli::util::{out, read_spec, Outcome};

const AFTER_HELP: &str = "Exit codes: 0 success; 1 check found mismatches or unknowns; \
2 bad input or usage; 3 coverage short of a requirement.\n\n\
Coverage of corner classes is evidence, not proof of correctness; sign-off follows your \
team's own verification plan.";

#[derive(Parser)]
#[command(
    name = "arithvec",
    version,
    about = "Golden-model test vectors, result checking and corner-class coverage for arithmetic datapaths",
    after_help = AFTER_HELP
)]
struct Cli {
    /// Print less (each command's `-q` help says what it leaves out); errors always print.
    #[arg(long, short, global = true)]
    quiet: bool,
    /// Draw tables with + - | only (automatic when the locale is not UTF-8). Tables wrap to
    /// COLUMNS, or to the terminal's width when stdout is one; files and pipes get full rows.
    #[arg(long, global = true)]
    ascii: bool,
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Write directed corner vectors plus seeded random vectors.
    #[command(
        after_help = "Example:\n  arithvec gen unit.toml --out vec/\n  arithvec gen unit.toml --out vec/ --count 100000 --seed 7\n  arithvec gen unit.toml --out shard1/ --shard 1/4"
    )]
    Gen {
        /// The operation spec (TOML).
        spec: PathBuf,
        /// Output directory (created if missing). `-o` is a file in every other command, so
        /// here it is only a hidden alias kept for old scripts.
        #[arg(long, short_alias = 'o')]
        out: PathBuf,
        /// Number of random vectors (overrides [random] count).
        #[arg(long)]
        count: Option<u64>,
        /// Random seed (overrides [random] seed).
        #[arg(long)]
        seed: Option<u64>,
        /// Write only shard I of N (0-based), e.g. 0/4; the shards' files concatenate to the
        /// unsharded files.
        #[arg(long, value_name = "I/N")]
        shard: Option<String>,
        /// Also read this CSV of operand values (as for `import`) and put its vectors after
        /// the random ones; the manifest records the file and its SHA-256.
        #[arg(long, value_name = "FILE", conflicts_with = "shard")]
        append: Option<PathBuf>,
        /// Also write launch/capture pairs for transition faults (add and sub units in
        /// unsigned or twos): after the directed corner vectors, vector 2k of the pairs
        /// launches pair k and vector 2k+1 captures it; the manifest records where they sit.
        #[arg(long, conflicts_with = "append")]
        pairs: bool,
        #[command(flatten)]
        threads: cli::threads::ThreadsArg,
    },
    /// Turn a CSV of operand values into a vector set with golden outputs and classes.
    #[command(after_help = cli::import::IMPORT_HELP)]
    Import {
        /// The operation spec (TOML).
        spec: PathBuf,
        /// The CSV: a header naming the input ports, then one vector a line.
        #[arg(long, value_name = "FILE")]
        csv: PathBuf,
        /// Output directory (created if missing); `-o` is only a hidden alias, as for gen.
        #[arg(long, short_alias = 'o')]
        out: PathBuf,
        #[command(flatten)]
        threads: cli::threads::ThreadsArg,
    },
    /// List the corner classes of a spec with their bins and directed hits.
    #[command(
        after_help = "Example:\n  arithvec classes unit.toml\n  arithvec classes unit.toml --bins\n  arithvec classes unit.toml --format json"
    )]
    Classes {
        /// The operation spec (TOML).
        spec: PathBuf,
        /// Output format.
        #[arg(long, value_enum, default_value_t = Format::Text)]
        format: Format,
        /// One row per bin instead of per class.
        #[arg(long)]
        bins: bool,
    },
    /// Show one vector again, decoded, from the spec, seed and index.
    #[command(
        after_help = "Example:\n  arithvec repro unit.toml --index 1234\n  arithvec repro unit.toml --index 1234 --seed 7 --format csv"
    )]
    Repro {
        /// The operation spec (TOML).
        spec: PathBuf,
        /// Vector index (directed vectors first, then random).
        #[arg(long)]
        index: u64,
        /// Random seed (overrides [random] seed).
        #[arg(long)]
        seed: Option<u64>,
        /// Number of random vectors in the set (overrides [random] count), as given to `gen`.
        #[arg(long)]
        count: Option<u64>,
        /// Allow an index past the end of the set: random vector j is defined for every j, so
        /// this shows the vector a longer set would hold there.
        #[arg(long)]
        beyond: bool,
        /// The set was written with `gen --pairs`: its directed part ends with the
        /// launch/capture pairs (and its random indices start after them).
        #[arg(long)]
        pairs: bool,
        /// Output format: text, csv (the header and the vector's row of vectors.csv), or json
        /// (one document: origin, every input and expected output, classes and bins hit).
        #[arg(long, value_enum, default_value_t = ReproFormat::Text)]
        format: ReproFormat,
    },
    /// Write a Verilog or VHDL testbench that applies a vector set to the DUT and logs results.
    #[command(
        after_help = "Example:\n  arithvec testbench unit.toml --vectors vec/ --hdl verilog -o tb.v\n  iverilog -g2005 -o sim tb.v my_sub.v && vvp sim +stimulus=vec/stimulus.hex +results=results.csv\n  arithvec check unit.toml --log results.csv --vectors vec/ --require 100\n\nThe spec needs a [dut] table naming the module (entity) and its parameters (generics)."
    )]
    Testbench {
        /// The operation spec (TOML) with a [dut] table.
        spec: PathBuf,
        /// The vector set to apply (its manifest gives the vector count).
        #[arg(long)]
        vectors: PathBuf,
        /// Hardware description language of the testbench.
        #[arg(long, value_enum, default_value_t = HdlArg::Verilog)]
        hdl: HdlArg,
        /// Output file ("-" for standard output; default: the testbench's own name in the
        /// current directory).
        #[arg(long, short)]
        output: Option<PathBuf>,
        /// Settle time per vector, in nanoseconds.
        #[arg(long, default_value_t = 1)]
        settle: u32,
        /// Also load expected.hex and count mismatches in the testbench itself.
        #[arg(long)]
        self_check: bool,
        /// Clocked units with [timing] valid_in: drop valid_in on about one cycle in K
        /// (pseudo-random cycles seeded by the set's seed).
        #[arg(long, value_name = "K", value_parser = clap::value_parser!(u32).range(1..))]
        stall_every: Option<u32>,
    },
    /// Check a simulator's result log against the golden model and score coverage.
    #[command(after_help = cli::check::CHECK_HELP)]
    Check(cli::check::CheckArgs),
    /// Combine JSON check reports of several runs or shards of one spec.
    #[command(after_help = cli::check::MERGE_HELP)]
    Merge(cli::check::MergeArgs),
    /// Grade the single stuck-at fault coverage of a vector set on a gate netlist.
    #[command(after_help = cli::grade::GRADE_HELP)]
    Grade(cli::grade::GradeArgs),
    /// Prove a gate netlist equivalent to the spec on every output it names (SAT).
    #[command(after_help = cli::prove::PROVE_HELP)]
    Prove(cli::prove::ProveArgs),
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum Format {
    // A table for people (`table` is the old spelling, still accepted as a hidden alias).
    #[value(alias = "table")]
    Text,
    Json,
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum HdlArg {
    Verilog,
    Vhdl,
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum ReproFormat {
    Text,
    Csv,
    Json,
}

/// What `-q/--quiet` leaves out, per command; each subcommand gets its own `-q` help from
/// this table (the flag stays global, so `arithvec -q check ...` works as well).
const QUIET_HELP: &[(&str, &str)] = &[
    (
        "gen",
        "Print no summary (vector counts, files and their SHA-256s) and no progress bar; \
         errors still print",
    ),
    (
        "import",
        "Print no summary of the set written (vector counts and files); errors still print",
    ),
    (
        "classes",
        "No effect: the class or bin listing is this command's output and always prints",
    ),
    (
        "repro",
        "No effect: the decoded vector is this command's output and always prints",
    ),
    (
        "testbench",
        "Print no \"wrote ... testbench\" line after writing the file; errors still print",
    ),
    (
        "check",
        "Print only the verdict line (no tables, pointers or repro commands) and no progress \
         bar; report files are written in full",
    ),
    (
        "merge",
        "Print only the merged verdict line (no tables); report files are written in full",
    ),
    (
        "grade",
        "Print no fault table, top-up or compaction summary and no progress bar; --format \
         json still prints its document and the exit code still gates",
    ),
    (
        "prove",
        "Print no text report (proof summary or counterexample); --format json still prints \
         its document and the exit code still gates",
    ),
];

/// The clap command with the per-command `-q` help of [`QUIET_HELP`].
fn command() -> clap::Command {
    let mut command = Cli::command();
    for (name, help) in QUIET_HELP {
        command = command.mut_subcommand(*name, |sub| {
            sub.arg(
                clap::Arg::new("quiet")
                    .long("quiet")
                    .short('q')
                    .action(clap::ArgAction::SetTrue)
                    .help(*help),
            )
        });
    }
    command
}

fn main() -> ExitCode {
    let cli = match command()
        .try_get_matches()
        .and_then(|m| Cli::from_arg_matches(&m))
    {
        Ok(c) => c,
        Err(e) => {
            let _ = e.print();
            return match e.kind() {
                clap::error::ErrorKind::DisplayHelp | clap::error::ErrorKind::DisplayVersion => {
                    ExitCode::SUCCESS
                }
                _ => ExitCode::from(2),
            };
        }
    };
    match run(cli) {
        Ok(outcome) => outcome.code(),
        Err(e) if e.is_broken_pipe() => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("error: {e}");
            ExitCode::from(2)
        }
    }
}

fn run(cli: Cli) -> Result<Outcome, Error> {
    let quiet = cli.quiet;
    arithvec::set_table_layout(cli::util::table_layout(cli.ascii));
    match cli.command {
        Command::Gen {
            spec,
            out: dir,
            count,
            seed,
            shard,
            append: Some(csv),
            threads,
            pairs: _,
        } => {
            let _ = shard; // clap refuses --shard with --append
            cli::import::gen_append(&spec, &dir, count, seed, &csv, threads, quiet)
        }
        Command::Gen {
            spec,
            out: dir,
            count,
            seed,
            shard,
            append: None,
            threads,
            pairs,
        } => gen(
            &spec,
            &dir,
            count,
            seed,
            shard.as_deref(),
            pairs,
            threads,
            quiet,
        ),
        Command::Import {
            spec,
            csv,
            out: dir,
            threads,
        } => cli::import::import(&spec, &csv, &dir, threads, quiet),
        Command::Classes { spec, format, bins } => classes(&spec, format, bins),
        Command::Repro {
            spec,
            index,
            seed,
            count,
            beyond,
            pairs,
            format,
        } => repro(&spec, index, seed, count, (beyond, pairs), format),
        Command::Testbench {
            spec,
            vectors,
            hdl,
            output,
            settle,
            self_check,
            stall_every,
        } => testbench(
            &spec,
            &vectors,
            hdl,
            output,
            (settle, stall_every),
            self_check,
            quiet,
        ),
        Command::Check(args) => cli::check::check(args, quiet),
        Command::Merge(args) => cli::check::merge(args, quiet),
        Command::Grade(args) => cli::grade::grade(args, quiet),
        Command::Prove(args) => cli::prove::prove(args, quiet),
    }
}

fn parse_shard(text: &str) -> Result<Shard, Error> {
    let bad = || {
        Error::problem(
            Problem::new(
                "--shard",
                format!("expected I/N with 0 <= I < N, got \"{text}\""),
            )
            .field("shard"),
        )
    };
    let (i, n) = text.split_once('/').ok_or_else(bad)?;
    let index: u64 = i.trim().parse().map_err(|_| bad())?;
    let count: u64 = n.trim().parse().map_err(|_| bad())?;
    if count == 0 || index >= count {
        return Err(bad());
    }
    Ok(Shard { index, count })
}

#[allow(clippy::too_many_arguments)]
fn gen(
    spec_path: &Path,
    dir: &Path,
    count: Option<u64>,
    seed: Option<u64>,
    shard: Option<&str>,
    pairs: bool,
    threads: cli::threads::ThreadsArg,
    quiet: bool,
) -> Result<Outcome, Error> {
    cli::util::refuse_collisions(&[("SPEC", spec_path)], &[("--out", dir)])?;
    let spec = read_spec(spec_path)?;
    let shard = shard.map(parse_shard).transpose()?;
    let threads = threads.resolve()?;
    let mut generator = Generator::new(&spec, count, seed);
    if pairs {
        generator = generator.with_transition_pairs(&spec)?;
    }
    // The index of every vector must fit in 64 bits; a total that overflows would wrap and
    // write a handful of vectors under a count nobody asked for.
    if (generator.directed().len() as u64)
        .checked_add(generator.random_count())
        .is_none()
    {
        let (file, field) = match count {
            Some(_) => ("--count".to_string(), "count"),
            None => (spec_path.display().to_string(), "random.count"),
        };
        return Err(Error::problem(
            Problem::new(
                file,
                format!(
                    "{} random vectors plus {} directed ones is more than 2^64 - 1 vectors; \
                     the largest count for this spec is {}",
                    generator.random_count(),
                    generator.directed().len(),
                    u64::MAX - generator.directed().len() as u64
                ),
            )
            .field(field),
        ));
    }
    let total = shard.map_or(generator.total(), |s| {
        let r = s.range(generator.total());
        r.end - r.start
    });
    let bar = cli::util::progress_bar(total, quiet, "vectors");
    let mut tick = |n: u64| {
        if let Some(b) = &bar {
            b.set_position(n);
        }
    };
    // The directories this run creates, deepest first: a failed run removes them again (when
    // they are still empty), so it leaves nothing behind.
    let created: Vec<PathBuf> = dir
        .ancestors()
        .filter(|d| !d.as_os_str().is_empty() && !d.exists())
        .map(Path::to_path_buf)
        .collect();
    // Interrupted by SIGINT/SIGTERM, the run removes its temporaries (and the directory when
    // it created it) before exiting.
    let _new_dir = cli::signals::guard_new_dir(dir);
    let _temporaries = cli::signals::guard_vector_set(dir);
    let manifest = write_vector_set(
        &generator,
        &spec,
        dir,
        WriteOptions {
            shard,
            progress: Some(&mut tick),
            threads,
        },
    )
    .inspect_err(|_| {
        for d in &created {
            // remove_dir refuses a directory that is not empty: only what this run made goes.
            let _ = std::fs::remove_dir(d);
        }
    })?;
    if let Some(b) = bar {
        b.finish_and_clear();
    }
    if !quiet {
        let mut o = out();
        writeln!(
            o,
            "wrote {} ({} directed + {} random, seed {}{}) for unit {} to {}",
            cli::util::counted(manifest.vectors, "vector", "vectors"),
            manifest.directed,
            manifest.random,
            manifest.seed,
            shard.map_or(String::new(), |s| format!(
                ", shard {}/{}",
                s.index, s.count
            )),
            spec.name,
            dir.display()
        )
        .map_err(cli::util::stdout_error)?;
        for f in &manifest.files {
            writeln!(
                o,
                "  {:<13} {:>12} bytes  sha256 {}",
                f.name, f.bytes, f.sha256
            )
            .map_err(cli::util::stdout_error)?;
        }
        writeln!(o, "  {:<13}", "manifest.json").map_err(cli::util::stdout_error)?;
        if let Some(p) = &manifest.pairs {
            writeln!(
                o,
                "  the directed part ends with {} launch/capture pairs (vectors {}..{}: 2k \
                 launches, 2k+1 captures)",
                p.pairs,
                p.first_index,
                p.first_index + 2 * p.pairs
            )
            .map_err(cli::util::stdout_error)?;
        }
    }
    Ok(Outcome::Success)
}

fn classes(spec_path: &Path, format: Format, bins: bool) -> Result<Outcome, Error> {
    let spec = read_spec(spec_path)?;
    let generator = Generator::new(&spec, Some(0), None);
    let cat: &Catalogue = generator.catalogue();
    let class_hits = generator.directed_class_hits();
    let why_unreachable = cli::reach::why_unreachable(&spec, cat);
    let mut o = out();
    if format == Format::Json {
        let list: Vec<serde_json::Value> = cat
            .classes()
            .iter()
            .enumerate()
            .map(|(ci, c)| {
                let bins: Vec<serde_json::Value> = (0..c.bin_count())
                    .map(|k| {
                        let b = c.first_bin() + k;
                        let mut bin = serde_json::json!({
                            "label": c.bin_labels()[k],
                            "reachable": cat.is_reachable(b),
                            "directed_hits": generator.directed_hits(b),
                        });
                        if !cat.is_reachable(b) {
                            bin["unreachable_because"] = why_unreachable[b].json().into();
                        }
                        bin
                    })
                    .collect();
                serde_json::json!({
                    "id": c.id(),
                    "description": c.description(),
                    "reachable": cat.is_class_reachable(ci),
                    "bins_reachable": cat.reachable_bins(ci).count(),
                    "bins_total": c.bin_count(),
                    "directed_vectors": class_hits[ci],
                    "bins": bins,
                })
            })
            .collect();
        let text = serde_json::to_string_pretty(&list).expect("json");
        writeln!(o, "{text}").map_err(cli::util::stdout_error)?;
        return Ok(Outcome::Success);
    }
    if bins {
        let mut rows: Vec<[String; 3]> = Vec::new();
        for (b, why) in why_unreachable.iter().enumerate() {
            rows.push([
                cat.bin_id(b),
                if cat.is_reachable(b) {
                    "reachable".into()
                } else {
                    format!("unreachable: {}", why.words())
                },
                generator.directed_hits(b).to_string(),
            ]);
        }
        let table = cli::util::table(&["bin", "status", "directed hits"], &rows);
        writeln!(o, "{table}").map_err(cli::util::stdout_error)?;
    }
    if !bins {
        let mut rows: Vec<[String; 4]> = Vec::new();
        for (ci, c) in cat.classes().iter().enumerate() {
            let reachable = cat.reachable_bins(ci).count();
            let bins_text = if reachable == c.bin_count() {
                reachable.to_string()
            } else {
                format!("{reachable} of {}", c.bin_count())
            };
            rows.push([
                c.id().to_string(),
                c.description().to_string(),
                bins_text,
                class_hits[ci].to_string(),
            ]);
        }
        let header = ["class", "description", "bins", "directed vectors"];
        let table = cli::util::table(&header, &rows);
        writeln!(o, "{table}").map_err(cli::util::stdout_error)?;
    }
    writeln!(
        o,
        "unit {}: {} {} {} bits; {} classes, {} reachable bins; {} directed vectors",
        spec.name,
        spec.operation,
        spec.encoding,
        spec.width,
        cat.classes().len(),
        (0..cat.bin_count())
            .filter(|&b| cat.is_reachable(b))
            .count(),
        generator.directed().len()
    )
    .map_err(cli::util::stdout_error)?;
    Ok(Outcome::Success)
}

fn repro(
    spec_path: &Path,
    index: u64,
    seed: Option<u64>,
    count: Option<u64>,
    (beyond, pairs): (bool, bool),
    format: ReproFormat,
) -> Result<Outcome, Error> {
    let spec = read_spec(spec_path)?;
    // Vector j is a pure function of (spec, seed, j), so the random part can be unbounded;
    // the set's own size (the spec's count or --count) decides what "past the end" means.
    let set_random = count.unwrap_or(spec.random.count);
    let mut generator = Generator::new(&spec, Some(u64::MAX - 1_000_000), seed);
    if pairs {
        generator = generator.with_transition_pairs(&spec)?;
    }
    let directed = generator.directed().len() as u64;
    let set_total = directed.saturating_add(set_random);
    if index >= set_total && !beyond {
        return Err(Error::problem(
            Problem::new(
                "--index",
                format!(
                    "index {index} is past the end of the set: it has {set_total} vectors \
                     ({directed} directed + {set_random} random, {}), so the last index is {}; \
                     give the set's --count, or pass --beyond to see random vector {} of the \
                     seed's stream anyway",
                    if count.is_some() {
                        "from --count"
                    } else {
                        "from the spec's [random] count"
                    },
                    set_total.saturating_sub(1),
                    index.saturating_sub(directed)
                ),
            )
            .field("index"),
        ));
    }
    let inputs = generator.vector(index).ok_or_else(|| {
        Error::problem(Problem::new("--index", "index out of range").field("index"))
    })?;
    let mut o = out();
    if format == ReproFormat::Csv {
        write!(
            o,
            "{}{}",
            csv_header(&spec),
            csv_row(&generator, &spec, index, &inputs)
        )
        .map_err(cli::util::stdout_error)?;
        return Ok(Outcome::Success);
    }
    let cat = generator.catalogue();
    let mut hits = arithvec::Hits::new();
    let outputs = generator.evaluate_at(index, &inputs, &mut hits);
    let d = generator.directed().len() as u64;
    if format == ReproFormat::Json {
        let port = |role: &str, sig: Signal, name: &str, v: &arithvec::Word| {
            let [_, _, hex, binary, value] = field_row(role, sig, name, v, &spec);
            serde_json::json!({
                "port": name, "role": sig.key(), "hex": hex, "binary": binary, "value": value,
            })
        };
        let inputs_json: Vec<_> = spec
            .inputs()
            .into_iter()
            .map(|(sig, name)| port("input", sig, name, &inputs.get(sig)))
            .collect();
        let outputs_json: Vec<_> = spec
            .outputs()
            .into_iter()
            .map(|(sig, name)| port("expected", sig, name, &outputs.get(sig)))
            .collect();
        let mut bins = Vec::new();
        hits.for_each_bin(|b| bins.push(b));
        bins.sort_unstable();
        let mut classes: Vec<String> = Vec::new();
        for &b in &bins {
            let id = cat.classes()[cat.class_of_bin(b)].id().to_string();
            if !classes.contains(&id) {
                classes.push(id);
            }
        }
        let doc = serde_json::json!({
            "unit": spec.name,
            "operation": spec.operation.to_string(),
            "encoding": spec.encoding.to_string(),
            "width": spec.width,
            "index": index,
            "origin": if index < d { "directed" } else { "random" },
            "directed_vectors": d,
            "random_index": index.checked_sub(d),
            "seed": generator.seed(),
            "set_vectors": set_total,
            "past_end_of_set": index >= set_total,
            "inputs": inputs_json,
            "expected": outputs_json,
            "classes": classes,
            "bins": bins.iter().map(|&b| cat.bin_id(b)).collect::<Vec<_>>(),
        });
        let text = serde_json::to_string_pretty(&doc)
            .map_err(|e| Error::io(Path::new("<stdout>"), std::io::Error::other(e.to_string())))?;
        writeln!(o, "{text}").map_err(cli::util::stdout_error)?;
        return Ok(Outcome::Success);
    }
    let origin = if index < d {
        format!("directed vector {index} of {d}")
    } else {
        let past = if index >= set_total {
            format!(", past the end of the set's {set_total} vectors (--beyond)")
        } else {
            String::new()
        };
        format!(
            "random vector {} (seed {}){past}",
            index - d,
            generator.seed()
        )
    };
    writeln!(
        o,
        "vector {index} of unit {} ({} {} {} bits): {origin}",
        spec.name, spec.operation, spec.encoding, spec.width
    )
    .map_err(cli::util::stdout_error)?;
    let mut rows = Vec::new();
    for (sig, name) in spec.inputs() {
        rows.push(field_row("input", sig, name, &inputs.get(sig), &spec));
    }
    for (sig, name) in spec.outputs() {
        rows.push(field_row("expected", sig, name, &outputs.get(sig), &spec));
    }
    let table = cli::util::table(&["", "port", "hex", "binary", "value"], &rows);
    writeln!(o, "{table}").map_err(cli::util::stdout_error)?;
    let mut list = String::new();
    cat.class_list(&hits, &mut list);
    writeln!(o, "classes: {list}").map_err(cli::util::stdout_error)?;
    // Per-bit families (cell rows, result bits) hit a bin at every bit; list the others
    // and count those.
    let mut bins = Vec::new();
    hits.for_each_bin(|b| bins.push(b));
    bins.sort_unstable();
    let mut listed = Vec::new();
    let mut per_bit: Vec<(usize, usize)> = Vec::new();
    for b in bins {
        let class = cat.class_of_bin(b);
        if spec.width > 1 && cat.classes()[class].bin_count() >= 2 * spec.width as usize {
            match per_bit.iter_mut().find(|(c, _)| *c == class) {
                Some((_, n)) => *n += 1,
                None => per_bit.push((class, 1)),
            }
        } else {
            listed.push(cat.bin_id(b));
        }
    }
    for (class, n) in per_bit {
        listed.push(format!("{} ({n} bins)", cat.classes()[class].id()));
    }
    writeln!(o, "bins: {}", listed.join(" ")).map_err(cli::util::stdout_error)?;
    Ok(Outcome::Success)
}

fn testbench(
    spec_path: &Path,
    vectors: &Path,
    hdl: HdlArg,
    output: Option<PathBuf>,
    (settle, stall_every): (u32, Option<u32>),
    self_check: bool,
    quiet: bool,
) -> Result<Outcome, Error> {
    if let Some(o) = &output {
        cli::util::refuse_collisions(
            &[("SPEC", spec_path), ("--vectors", vectors)],
            &[("--output", o)],
        )?;
    }
    let spec = read_spec(spec_path)?;
    let manifest = arithvec::read_manifest(vectors)?;
    if manifest.spec_sha256 != arithvec::spec_identity(&spec) {
        return Err(Error::problem(
            Problem::new(
                vectors.join(arithvec::MANIFEST_JSON).display().to_string(),
                "the vector set was generated from a different spec; regenerate it",
            )
            .field("spec_sha256"),
        ));
    }
    let hdl = match hdl {
        HdlArg::Verilog => Hdl::Verilog,
        HdlArg::Vhdl => Hdl::Vhdl,
    };
    let mut options = TestbenchOptions::new(hdl, manifest.vectors);
    options.first_index = manifest.first_index;
    options.settle = settle;
    options.self_check = self_check;
    options.stall_every = stall_every;
    options.stall_seed = manifest.seed;
    let text = emit_testbench(&spec, &options).map_err(|e| {
        // Name the spec file in problems the emitter could only attribute to the unit.
        let problems = e
            .problems()
            .iter()
            .map(|p| Problem {
                file: spec_path.display().to_string(),
                ..p.clone()
            })
            .collect::<Vec<_>>();
        if problems.is_empty() {
            e
        } else {
            Error::input(problems)
        }
    })?;
    let path = output.unwrap_or_else(|| PathBuf::from(testbench_file_name(&spec, hdl)));
    cli::util::write_output(&path, text.as_bytes())?;
    if !quiet && !cli::util::is_stdout(&path) {
        let mut o = out();
        writeln!(
            o,
            "wrote {} testbench {} for {} of unit {}{}; the file's header gives the commands to run it",
            match hdl {
                Hdl::Verilog => "Verilog",
                _ => "VHDL",
            },
            path.display(),
            cli::util::counted(manifest.vectors, "vector", "vectors"),
            spec.name,
            if self_check { " (self-checking)" } else { "" }
        )
        .map_err(cli::util::stdout_error)?;
    }
    Ok(Outcome::Success)
}

fn field_row(role: &str, sig: Signal, name: &str, v: &arithvec::Word, spec: &Spec) -> [String; 5] {
    let w = spec.signal_width(sig);
    let value = if matches!(
        sig,
        Signal::A | Signal::B | Signal::Result | Signal::Quotient | Signal::Remainder
    ) {
        format!("{} ({})", Value::decode(v, w, spec.encoding), spec.encoding)
    } else if sig == Signal::Select {
        let code = v.low_u64() as u32;
        match spec.select.as_ref().and_then(|s| s.operation_of(code)) {
            Some(op) => op.name().to_string(),
            None => "not a listed code".to_string(),
        }
    } else {
        (v.bit(0) as u8).to_string()
    };
    [
        role.to_string(),
        format!("{name} ({})", sig.key()),
        format!("0x{}", v.to_hex(w)),
        v.to_bin(w),
        value,
    ]
}
