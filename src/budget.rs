//! Time and memory budgets of one case (or one formula query), and the meter that
//! enforces them.
//!
//! The engine and the formula search are pure, but some inputs ask for far more work
//! than a laptop can give: a nominal molecular ion near m/z 800 allows tens of millions
//! of formulas. Rather than grow until the allocator aborts the process, the work is
//! metered. A [`Meter`] is told about each unit of work ([`Meter::tick`]) and about every
//! large thing kept ([`Meter::hold`], an *estimate* of the bytes held: formula candidates,
//! consistent combinations, pooled candidates); it answers with a stop when the budget is
//! spent, and the stop travels up as an error ([`LimitReached`]) that names the limit,
//! where it was reached and what evidence to add to the case so that it becomes cheap.
//!
//! [`Unmetered`] never stops (its stop type is [`std::convert::Infallible`]), so library
//! callers that do not want a budget keep their infallible signatures. [`Metered`] holds a
//! [`Budget`]; the clock is read only every [`TICKS_PER_CLOCK_READ`] ticks.
//!
//! The memory figure is a proxy the code can count, not the process's resident size:
//! it sums `size_of` plus the heap parts of what is held. The defaults leave room for the
//! rest of the process (catalogue, reports, allocator slack) on a 2-core, 24 GB laptop
//! running `batch` with one worker per core.

use std::convert::Infallible;
use std::time::{Duration, Instant};

/// Default wall-time budget per case, seconds.
pub const DEFAULT_TIME_LIMIT_S: f64 = 60.0;
/// Default memory budget per case (estimated bytes held), MB (10⁶ bytes).
pub const DEFAULT_MEMORY_LIMIT_MB: u64 = 1_000;
/// The clock is read once per this many ticks (reading it costs ~20 ns).
pub const TICKS_PER_CLOCK_READ: u32 = 4_096;

/// A budget: either limit may be absent (no limit).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Budget {
    /// Wall time allowed.
    pub time: Option<Duration>,
    /// Estimated bytes that may be held at once.
    pub memory_bytes: Option<u64>,
}

impl Default for Budget {
    /// [`DEFAULT_TIME_LIMIT_S`] and [`DEFAULT_MEMORY_LIMIT_MB`].
    fn default() -> Budget {
        Budget {
            time: Some(Duration::from_secs_f64(DEFAULT_TIME_LIMIT_S)),
            memory_bytes: Some(DEFAULT_MEMORY_LIMIT_MB * 1_000_000),
        }
    }
}

impl Budget {
    /// No limit at all.
    pub const UNLIMITED: Budget = Budget {
        time: None,
        memory_bytes: None,
    };
}

/// The stage of the work a meter was told about (for the message).
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Stage {
    /// Searching formulas for a molecular ion.
    FormulaSearch,
    /// Enumerating the group combinations of a stated formula.
    Enumeration,
    /// Enumerating the group combinations of a formula lead (no formula stated).
    LeadEnumeration,
    /// Pooling the candidates of several formula leads.
    Pooling,
    /// Generating structures (constitutional isomers).
    Structures,
}

impl Stage {
    /// The stage in words.
    pub fn words(self) -> &'static str {
        match self {
            Stage::FormulaSearch => "searching formulas for the molecular ion",
            Stage::Enumeration => "enumerating group combinations",
            Stage::LeadEnumeration => {
                "enumerating group combinations of the formulas the molecular ion allows"
            }
            Stage::Pooling => "pooling the candidates of the formula leads",
            Stage::Structures => "generating structures",
        }
    }
}

/// Which limit was reached.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
#[serde(tag = "limit", rename_all = "snake_case")]
pub enum Limit {
    /// The wall-time budget, seconds.
    Time {
        /// The budget, seconds.
        seconds: f64,
    },
    /// The memory budget (estimated bytes held), bytes.
    Memory {
        /// The budget, bytes.
        bytes: u64,
    },
}

/// A budget was spent: the work stopped before an answer.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[error("{}", self.message())]
pub struct LimitReached {
    /// The limit.
    pub limit: Limit,
    /// Where the work was.
    pub stage: Stage,
}

impl LimitReached {
    /// One line: which limit, where.
    pub fn message(&self) -> String {
        match self.limit {
            Limit::Time { seconds } => format!(
                "the time limit of {seconds} s was reached while {}, so the work stopped there",
                self.stage.words()
            ),
            Limit::Memory { bytes } => format!(
                "the memory limit of {} MB (estimated data held) was reached while {}, so the work stopped there",
                bytes.div_ceil(1_000_000),
                self.stage.words()
            ),
        }
    }

    /// What the analyst can add to the case (or the command line) to make it cheap.
    pub fn advice(&self) -> String {
        let raise = match self.limit {
            Limit::Time { .. } => "--time-limit",
            Limit::Memory { .. } => "--memory-limit",
        };
        match self.stage {
            Stage::FormulaSearch | Stage::LeadEnumeration | Stage::Pooling => format!(
                "narrow the formulas: state `formula:`, or give an accurate `ms.molecular_ion` \
                 with `ms.ppm`, or measured `ms.isotopes` (M+1, M+2); or raise {raise}"
            ),
            Stage::Enumeration => format!(
                "add evidence that narrows the groups (more bands with strengths, `ir.technique`), \
                 lower --limit, or raise {raise}"
            ),
            Stage::Structures => {
                format!("narrow the structures with --groups, lower --max, or raise {raise}")
            }
        }
    }
}

/// Something that meters work. See the module documentation.
pub trait Meter: Send + Sized {
    /// What a stop is ([`Infallible`] for a meter that never stops).
    type Stop: Send;
    /// One unit of work was done.
    fn tick(&mut self, stage: Stage) -> Result<(), Self::Stop>;
    /// `bytes` more are held from now on.
    fn hold(&mut self, bytes: u64, stage: Stage) -> Result<(), Self::Stop>;
    /// `bytes` held before are given back.
    fn release(&mut self, bytes: u64);
    /// Estimated bytes held now.
    fn held(&self) -> u64;
    /// A meter for work done at the same time on another thread, under this one's
    /// budget: the same deadline and half of the memory not yet held, which this meter
    /// lends until [`Meter::rejoin`]. `None` when the meter cannot be split.
    fn split(&mut self) -> Option<Self>;
    /// Takes back a meter [`Meter::split`] off this one: the memory lent and what the
    /// part still holds.
    fn rejoin(&mut self, part: Self);
}

/// A meter that never stops.
#[derive(Clone, Copy, Debug, Default)]
pub struct Unmetered;

impl Meter for Unmetered {
    type Stop = Infallible;
    fn tick(&mut self, _: Stage) -> Result<(), Infallible> {
        Ok(())
    }
    fn hold(&mut self, _: u64, _: Stage) -> Result<(), Infallible> {
        Ok(())
    }
    fn release(&mut self, _: u64) {}
    fn held(&self) -> u64 {
        0
    }
    fn split(&mut self) -> Option<Unmetered> {
        Some(Unmetered)
    }
    fn rejoin(&mut self, _: Unmetered) {}
}

/// A meter enforcing a [`Budget`] from the moment it is made.
#[derive(Clone, Debug)]
pub struct Metered {
    budget: Budget,
    deadline: Option<Instant>,
    held: u64,
    peak: u64,
    ticks: u32,
}

impl Metered {
    /// Starts the clock on `budget`.
    pub fn new(budget: Budget) -> Metered {
        Metered {
            budget,
            deadline: budget.time.and_then(|t| Instant::now().checked_add(t)),
            held: 0,
            peak: 0,
            ticks: 0,
        }
    }

    /// Largest estimate of bytes held so far (while parts were split off, an upper
    /// bound: their peaks are added).
    pub fn peak(&self) -> u64 {
        self.peak
    }

    fn time_up(&self, stage: Stage) -> Result<(), LimitReached> {
        match (self.deadline, self.budget.time) {
            (Some(deadline), Some(t)) if Instant::now() >= deadline => Err(LimitReached {
                limit: Limit::Time {
                    seconds: t.as_secs_f64(),
                },
                stage,
            }),
            _ => Ok(()),
        }
    }
}

impl Meter for Metered {
    type Stop = LimitReached;

    fn tick(&mut self, stage: Stage) -> Result<(), LimitReached> {
        self.ticks += 1;
        if self.ticks >= TICKS_PER_CLOCK_READ {
            self.ticks = 0;
            self.time_up(stage)?;
        }
        Ok(())
    }

    fn hold(&mut self, bytes: u64, stage: Stage) -> Result<(), LimitReached> {
        self.held = self.held.saturating_add(bytes);
        self.peak = self.peak.max(self.held);
        if let Some(limit) = self.budget.memory_bytes {
            if self.held > limit {
                return Err(LimitReached {
                    limit: Limit::Memory { bytes: limit },
                    stage,
                });
            }
        }
        self.tick(stage)
    }

    fn release(&mut self, bytes: u64) {
        self.held = self.held.saturating_sub(bytes);
    }

    fn held(&self) -> u64 {
        self.held
    }

    fn split(&mut self) -> Option<Metered> {
        let mut budget = self.budget;
        if let Some(limit) = &mut self.budget.memory_bytes {
            let half = limit.saturating_sub(self.held) / 2;
            *limit -= half;
            budget.memory_bytes = Some(half);
        }
        Some(Metered {
            budget,
            deadline: self.deadline,
            held: 0,
            peak: 0,
            ticks: 0,
        })
    }

    fn rejoin(&mut self, part: Metered) {
        if let (Some(limit), Some(lent)) = (&mut self.budget.memory_bytes, part.budget.memory_bytes)
        {
            *limit += lent;
        }
        self.held = self.held.saturating_add(part.held);
        self.peak = self.peak.saturating_add(part.peak).max(self.held);
    }
}

/// The value of a result whose meter cannot stop.
pub fn infallible<T>(r: Result<T, Infallible>) -> T {
    match r {
        Ok(t) => t,
        Err(never) => match never {},
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_memory_budget_stops_once_exceeded_and_not_before() {
        let mut m = Metered::new(Budget {
            time: None,
            memory_bytes: Some(100),
        });
        assert!(m.hold(60, Stage::FormulaSearch).is_ok());
        m.release(30);
        assert!(m.hold(70, Stage::FormulaSearch).is_ok());
        assert_eq!(m.held(), 100);
        let stop = m.hold(1, Stage::Pooling).unwrap_err();
        assert_eq!(stop.limit, Limit::Memory { bytes: 100 });
        assert_eq!(stop.stage, Stage::Pooling);
        assert!(
            stop.message().contains("memory limit"),
            "{}",
            stop.message()
        );
        assert!(stop.advice().contains("formula:"), "{}", stop.advice());
    }

    #[test]
    fn a_split_meter_lends_half_of_the_memory_left_and_takes_it_back() {
        let mut m = Metered::new(Budget {
            time: None,
            memory_bytes: Some(100),
        });
        assert!(m.hold(20, Stage::Enumeration).is_ok());
        let mut part = m.split().expect("a budget meter splits");
        // 80 left: 40 lent, 40 kept.
        assert!(part.hold(40, Stage::Enumeration).is_ok());
        assert!(part.hold(1, Stage::Enumeration).is_err());
        assert!(m.hold(40, Stage::Enumeration).is_ok());
        assert!(m.hold(1, Stage::Enumeration).is_err());
        m.release(41);
        part.release(41);
        m.rejoin(part);
        assert_eq!(m.held(), 20);
        assert!(m.hold(80, Stage::Enumeration).is_ok());
        assert!(m.hold(1, Stage::Enumeration).is_err());
    }

    #[test]
    fn a_zero_time_budget_stops_at_the_first_clock_read() {
        let mut m = Metered::new(Budget {
            time: Some(Duration::ZERO),
            memory_bytes: None,
        });
        let mut stopped = None;
        for i in 0..2 * TICKS_PER_CLOCK_READ {
            if let Err(e) = m.tick(Stage::Enumeration) {
                stopped = Some((i, e));
                break;
            }
        }
        let (i, e) = stopped.expect("a zero budget stops");
        assert_eq!(i + 1, TICKS_PER_CLOCK_READ);
        assert!(matches!(e.limit, Limit::Time { .. }));
        assert!(e.advice().contains("--time-limit"));
    }

    #[test]
    fn the_unmetered_meter_never_stops() {
        let mut m = Unmetered;
        for _ in 0..10_000 {
            infallible(m.tick(Stage::Enumeration));
            infallible(m.hold(u64::MAX, Stage::Pooling));
        }
    }
}
