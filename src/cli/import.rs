//! `arithvec import` and `gen --append`: a user's CSV of operand values read into a vector
//! set with golden outputs, classes and a manifest that records where the vectors came from.
//!
//! The parsing and the set writing are the library's (`parse_import_csv`, `write_imported`);
//! this module reads the file, names the options in errors and prints what was written.

use std::io::Write;
use std::path::{Path, PathBuf};

use arithvec::{
    csv_sha256, parse_import_csv, write_imported, Error, Generator, ImportSource, Inputs, Manifest,
    Spec, WriteOptions,
};

use crate::cli::util::{out, read_spec, refuse_collisions, stdout_error, Outcome};

/// Reads and parses the CSV at `path` for `spec`, with its provenance.
pub fn read_csv(spec: &Spec, path: &Path) -> Result<(Vec<Inputs>, ImportSource), Error> {
    let bytes = std::fs::read(path).map_err(|e| Error::io(path, e))?;
    let shown = path.display().to_string();
    let text = std::str::from_utf8(&bytes).map_err(|e| {
        Error::problem(arithvec::Problem::new(
            shown.clone(),
            format!("the file is not UTF-8 text (byte {})", e.valid_up_to()),
        ))
    })?;
    let vectors = parse_import_csv(text, &shown, spec)?;
    Ok((
        vectors,
        ImportSource {
            file: shown,
            sha256: csv_sha256(&bytes),
        },
    ))
}

/// Writes `generator` (with its appended vectors) to `dir`, removing a directory it created
/// when the write fails, and prints the summary.
pub fn write_set(
    generator: &Generator,
    spec: &Spec,
    dir: &Path,
    source: &ImportSource,
    threads: usize,
    quiet: bool,
) -> Result<Manifest, Error> {
    let created: Vec<PathBuf> = dir
        .ancestors()
        .filter(|d| !d.as_os_str().is_empty() && !d.exists())
        .map(Path::to_path_buf)
        .collect();
    let _new_dir = crate::cli::signals::guard_new_dir(dir);
    let _temporaries = crate::cli::signals::guard_vector_set(dir);
    let options = WriteOptions {
        threads,
        ..WriteOptions::default()
    };
    let manifest = write_imported(generator, spec, dir, options, source).inspect_err(|_| {
        for d in &created {
            let _ = std::fs::remove_dir(d);
        }
    })?;
    if !quiet {
        let mut o = out();
        let generated = manifest.directed + manifest.random;
        let what = if generated == 0 {
            String::new()
        } else {
            format!(
                " after {} generated ({} directed + {} random, seed {})",
                generated, manifest.directed, manifest.random, manifest.seed
            )
        };
        writeln!(
            o,
            "wrote {} for unit {} to {}: {} imported from {}{what}",
            crate::cli::util::counted(manifest.vectors, "vector", "vectors"),
            spec.name,
            dir.display(),
            generator.appended().len(),
            source.file
        )
        .map_err(stdout_error)?;
        for f in &manifest.files {
            writeln!(
                o,
                "  {:<13} {:>12} bytes  sha256 {}",
                f.name, f.bytes, f.sha256
            )
            .map_err(stdout_error)?;
        }
        writeln!(o, "  {:<13}", "manifest.json").map_err(stdout_error)?;
    }
    Ok(manifest)
}

/// `arithvec import SPEC --csv FILE --out DIR`.
pub fn import(
    spec_path: &Path,
    csv: &Path,
    dir: &Path,
    threads: crate::cli::threads::ThreadsArg,
    quiet: bool,
) -> Result<Outcome, Error> {
    refuse_collisions(&[("SPEC", spec_path), ("--csv", csv)], &[("--out", dir)])?;
    let spec = read_spec(spec_path)?;
    let threads = threads.resolve()?;
    let (vectors, source) = read_csv(&spec, csv)?;
    let generator = Generator::new(&spec, Some(0), None)
        .without_generated()
        .with_appended(vectors);
    write_set(&generator, &spec, dir, &source, threads, quiet)?;
    Ok(Outcome::Success)
}

/// `arithvec gen SPEC --out DIR --append FILE`: the generated set, then the CSV's vectors.
pub fn gen_append(
    spec_path: &Path,
    dir: &Path,
    count: Option<u64>,
    seed: Option<u64>,
    csv: &Path,
    threads: crate::cli::threads::ThreadsArg,
    quiet: bool,
) -> Result<Outcome, Error> {
    refuse_collisions(&[("SPEC", spec_path), ("--append", csv)], &[("--out", dir)])?;
    let spec = read_spec(spec_path)?;
    let threads = threads.resolve()?;
    let (vectors, source) = read_csv(&spec, csv)?;
    let generator = Generator::new(&spec, count, seed);
    let k = vectors.len() as u64;
    if (generator.directed().len() as u64)
        .checked_add(generator.random_count())
        .and_then(|n| n.checked_add(k))
        .is_none()
    {
        return Err(Error::problem(
            arithvec::Problem::new(
                "--count",
                "the generated vectors plus the appended ones are more than 2^64 - 1 vectors",
            )
            .field("count"),
        ));
    }
    let generator = generator.with_appended(vectors);
    write_set(&generator, &spec, dir, &source, threads, quiet)?;
    Ok(Outcome::Success)
}

/// The `import` command's help epilogue.
pub const IMPORT_HELP: &str = "Example:\n  arithvec import unit.toml --csv lab.csv --out lab/\n  \
arithvec gen unit.toml --out vec/ --append lab.csv\n\n\
The CSV's first line names the columns by the spec's input ports (columns named index, \
classes or after an output port are ignored); then one vector a line. Values are 0x-hex or \
0b-binary bit patterns, or decimal values under the spec's encoding (-5 for a signed unit). \
'#' lines are comments. Golden outputs and classes are computed; the manifest records the \
CSV's name and SHA-256, and check, testbench, merge and grade take the set like a generated one.";
