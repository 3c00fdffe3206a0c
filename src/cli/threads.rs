//! `--threads N` and `ARITHVEC_THREADS`: how many worker threads gen, check and grade use,
//! so CI and farms can pin it. The option wins over the variable; without either, one
//! thread per core. Outputs are the same for every value.

use clap::Args;

use arithvec::{Error, Problem};

/// The environment variable read when `--threads` is not given.
pub const THREADS_ENV: &str = "ARITHVEC_THREADS";

/// The `--threads` option, flattened into the commands that run worker threads.
#[derive(Args, Clone, Copy, Debug, Default)]
pub struct ThreadsArg {
    /// Worker threads (default: $ARITHVEC_THREADS, else one per core). Results are the
    /// same on any number.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u32).range(1..=1024))]
    threads: Option<u32>,
}

impl ThreadsArg {
    /// The thread count to use: the option, else the variable, else the cores.
    pub fn resolve(self) -> Result<usize, Error> {
        let from_env = std::env::var_os(THREADS_ENV).map(|v| v.to_string_lossy().into_owned());
        resolve(self.threads, from_env.as_deref(), || {
            std::thread::available_parallelism().map_or(1, |n| n.get())
        })
    }
}

/// [`ThreadsArg::resolve`] with the variable's value and the core count given.
fn resolve(
    option: Option<u32>,
    variable: Option<&str>,
    cores: impl FnOnce() -> usize,
) -> Result<usize, Error> {
    if let Some(n) = option {
        return Ok(n as usize);
    }
    let Some(text) = variable else {
        return Ok(cores().max(1));
    };
    match text.trim().parse::<u32>() {
        Ok(n @ 1..=1024) => Ok(n as usize),
        _ => Err(Error::problem(
            Problem::new(
                "<environment>",
                format!("{THREADS_ENV}={text:?} is not a thread count: expected a whole number from 1 to 1024"),
            )
            .field(THREADS_ENV),
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::resolve;

    #[test]
    fn option_then_variable_then_cores() {
        assert_eq!(resolve(Some(3), Some("5"), || 7).expect("option"), 3);
        assert_eq!(resolve(None, Some(" 5 "), || 7).expect("variable"), 5);
        assert_eq!(resolve(None, None, || 7).expect("cores"), 7);
        for bad in ["0", "-1", "two", "", "1025"] {
            let e = resolve(None, Some(bad), || 7).expect_err(bad).to_string();
            assert!(e.contains("ARITHVEC_THREADS"), "{bad}: {e}");
        }
    }
}
