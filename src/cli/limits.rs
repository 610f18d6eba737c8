//! The per-case budget options shared by `solve`, `batch` and `from-mass`
//! (`--time-limit`, `--memory-limit`); see [`crate::budget`].

use super::Failure;
use crate::budget::{Budget, LimitReached, DEFAULT_MEMORY_LIMIT_MB, DEFAULT_TIME_LIMIT_S};
use crate::diag::Diagnostic;
use clap::Args;
use std::time::Duration;

/// Longest time limit accepted, seconds (one week).
pub const MAX_TIME_LIMIT_S: f64 = 604_800.0;

/// Budget options of one case.
#[derive(Clone, Debug, Args)]
pub struct LimitArgs {
    /// Stop a case after SECONDS of wall time (exit 2, naming what to add to the case).
    #[arg(long, value_name = "SECONDS", default_value_t = DEFAULT_TIME_LIMIT_S)]
    pub time_limit: f64,
    /// Stop a case that holds more than MB megabytes of formulas, combinations and
    /// candidates (an estimate the program counts, not the process size; exit 2).
    #[arg(long, value_name = "MB", default_value_t = DEFAULT_MEMORY_LIMIT_MB)]
    pub memory_limit: u64,
}

impl LimitArgs {
    /// The budget, or a usage failure naming the option.
    pub fn budget(&self) -> Result<Budget, Failure> {
        if !(self.time_limit.is_finite()
            && self.time_limit > 0.0
            && self.time_limit <= MAX_TIME_LIMIT_S)
        {
            return Err(Diagnostic::error(
                "--time-limit",
                format!(
                    "time limit {} s must be above 0 and at most {MAX_TIME_LIMIT_S}",
                    self.time_limit
                ),
            )
            .into());
        }
        if self.memory_limit == 0 {
            return Err(Diagnostic::error(
                "--memory-limit",
                "--memory-limit must be at least 1 MB",
            )
            .into());
        }
        Ok(Budget {
            time: Some(Duration::from_secs_f64(self.time_limit)),
            memory_bytes: Some(self.memory_limit.saturating_mul(1_000_000)),
        })
    }
}

/// The failure of work stopped by its budget (exit 2): the limit and stage, placed at
/// `origin` (the case file, or the argument the query came from), with the advice.
pub fn limit_failure(origin: &str, stop: &LimitReached) -> Failure {
    Diagnostic::error(origin, stop.message())
        .with_help(stop.advice())
        .into()
}
