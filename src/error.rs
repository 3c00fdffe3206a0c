//! The library's one error type.
//!
//! Every bad input becomes an [`Error`] carrying one or more [`Problem`]s, each naming the file,
//! the line (where there is one) and the field or key, so the CLI can print them and exit 2.
//! Readers collect every problem they can before giving up, rather than stopping at the first.

use std::fmt;
use std::path::{Path, PathBuf};

/// One thing wrong with one input, located as precisely as the reader could.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Problem {
    /// The file (or `<stdin>`, or a description such as `--count`) the problem is in.
    pub file: String,
    /// 1-based line number, where the input has lines.
    pub line: Option<usize>,
    /// The key, column or field concerned.
    pub field: Option<String>,
    /// What is wrong, in plain words.
    pub message: String,
}

impl Problem {
    /// A problem at `file`, with no line or field yet.
    pub fn new(file: impl Into<String>, message: impl Into<String>) -> Problem {
        Problem {
            file: file.into(),
            line: None,
            field: None,
            message: message.into(),
        }
    }

    /// Sets the line.
    pub fn at_line(mut self, line: usize) -> Problem {
        self.line = Some(line);
        self
    }

    /// Sets the field.
    pub fn field(mut self, field: impl Into<String>) -> Problem {
        self.field = Some(field.into());
        self
    }
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file)?;
        if let Some(line) = self.line {
            write!(f, ":{line}")?;
        }
        if let Some(field) = &self.field {
            write!(f, ": {field}")?;
        }
        write!(f, ": {}", self.message)
    }
}

/// What went wrong.
#[derive(Debug)]
#[non_exhaustive]
pub enum ErrorKind {
    /// Reading or writing a file failed.
    Io {
        /// The file concerned.
        path: PathBuf,
        /// The operating system's error.
        source: std::io::Error,
    },
    /// One or more inputs are malformed or inconsistent.
    Input(Vec<Problem>),
}

/// The error type of every fallible arithvec function.
#[derive(Debug)]
pub struct Error(Box<ErrorKind>);

impl Error {
    /// An I/O error on `path`.
    pub fn io(path: &Path, source: std::io::Error) -> Error {
        Error(Box::new(ErrorKind::Io {
            path: path.to_path_buf(),
            source,
        }))
    }

    /// A bad-input error made of `problems` (which should not be empty).
    pub fn input(problems: Vec<Problem>) -> Error {
        Error(Box::new(ErrorKind::Input(problems)))
    }

    /// A bad-input error with one problem.
    pub fn problem(problem: Problem) -> Error {
        Error::input(vec![problem])
    }

    /// What went wrong.
    pub fn kind(&self) -> &ErrorKind {
        &self.0
    }

    /// The problems, when this is a bad-input error.
    pub fn problems(&self) -> &[Problem] {
        match &*self.0 {
            ErrorKind::Input(p) => p,
            ErrorKind::Io { .. } => &[],
        }
    }

    /// True when the error is a broken pipe (the reader of our output went away).
    pub fn is_broken_pipe(&self) -> bool {
        matches!(&*self.0, ErrorKind::Io { source, .. } if source.kind() == std::io::ErrorKind::BrokenPipe)
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match &*self.0 {
            ErrorKind::Io { path, source } => write!(f, "{}: {source}", path.display()),
            ErrorKind::Input(problems) => {
                for (i, p) in problems.iter().enumerate() {
                    if i > 0 {
                        writeln!(f)?;
                    }
                    write!(f, "{p}")?;
                }
                Ok(())
            }
        }
    }
}

impl std::error::Error for Error {
    fn source(&self) -> Option<&(dyn std::error::Error + 'static)> {
        match &*self.0 {
            ErrorKind::Io { source, .. } => Some(source),
            ErrorKind::Input(_) => None,
        }
    }
}

/// Shorthand for results with [`Error`].
pub type Result<T, E = Error> = std::result::Result<T, E>;
