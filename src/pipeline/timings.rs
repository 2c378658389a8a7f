//! Wall-clock time per stage, for people (`--timings`) and benchmarks (`--json`).

use std::time::Instant;

/// Seconds spent in each stage, in the order the stages ran.
#[derive(Debug, Clone, Default, PartialEq, serde::Serialize)]
pub struct Timings {
    /// `(stage, seconds)` pairs; a stage may appear once per part it ran for.
    pub stages: Vec<(String, f64)>,
}

impl Timings {
    /// Runs `f`, adding its wall-clock time under `stage`.
    pub fn time<T>(&mut self, stage: &str, f: impl FnOnce() -> T) -> T {
        let start = Instant::now();
        let out = f();
        self.add(stage, start.elapsed().as_secs_f64());
        out
    }

    /// Adds `seconds` to `stage` (a new entry, or the existing one of that name).
    pub fn add(&mut self, stage: &str, seconds: f64) {
        match self.stages.iter_mut().find(|(s, _)| s == stage) {
            Some((_, t)) => *t += seconds,
            None => self.stages.push((stage.to_string(), seconds)),
        }
    }

    /// Appends every stage of `other`.
    pub fn extend(&mut self, other: &Timings) {
        for (s, t) in &other.stages {
            self.add(s, *t);
        }
    }

    /// Total seconds over the stages.
    pub fn total(&self) -> f64 {
        self.stages.iter().map(|(_, t)| t).sum()
    }

    /// One line: `stage 1.2 ms, stage 3.4 ms, ...`.
    pub fn line(&self) -> String {
        self.stages
            .iter()
            .map(|(s, t)| format!("{s} {:.1} ms", t * 1e3))
            .collect::<Vec<_>>()
            .join(", ")
    }
}
