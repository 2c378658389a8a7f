//! Parallel work: one global pool of worker threads (rayon's work-stealing pool) shared
//! by every stage that splits its work: tessellation rows and cells, the deviation bound,
//! the self-intersection search.
//!
//! **Same bytes on any number of threads.** Every parallel loop in the library maps
//! independent pieces of work to results that are gathered in their input order (rayon's
//! indexed `collect`), and no floating-point sum is split across threads, so the output
//! does not depend on the number of threads or on scheduling. `tests/tessellation.rs`
//! builds blades on pools of one and four threads and compares meshes and STL bytes.
//!
//! Without [`init_threads`], rayon sizes its pool from the `RAYON_NUM_THREADS`
//! environment variable or, when unset, the number of logical cores.

/// Why the thread pool could not be set up.
#[derive(Debug, thiserror::Error)]
pub enum ThreadsError {
    /// The global pool was already started (by an earlier call, or by parallel work that
    /// ran before the call) with another thread count.
    #[error("the worker pool already runs {running} threads; set the thread count before any work starts (asked for {asked})")]
    AlreadyStarted {
        /// Threads asked for.
        asked: usize,
        /// Threads the running pool has.
        running: usize,
    },
    /// The system would not start the worker threads.
    #[error("cannot start the worker threads: {0}")]
    Build(String),
}

/// Sizes the global worker pool: `Some(n)` runs parallel work on `n` threads (`n = 1`
/// runs it on one worker thread), `None` uses every logical core. Call it once, before
/// any parallel work; a second call asking for the size the pool already has is
/// accepted.
///
/// # Errors
/// [`ThreadsError::AlreadyStarted`] when the pool already runs another thread count.
pub fn init_threads(threads: Option<usize>) -> Result<(), ThreadsError> {
    let asked = threads.unwrap_or(0);
    let built = rayon::ThreadPoolBuilder::new()
        .num_threads(asked)
        .build_global();
    if built.is_ok() {
        return Ok(());
    }
    let running = rayon::current_num_threads();
    let wanted = threads.unwrap_or_else(|| {
        std::thread::available_parallelism().map_or(1, std::num::NonZeroUsize::get)
    });
    if running == wanted {
        Ok(())
    } else {
        Err(ThreadsError::AlreadyStarted {
            asked: wanted,
            running,
        })
    }
}

/// Runs `work` on a worker pool of `threads` threads (`None`: every logical core), from
/// one of its workers: the parallel loops `work` starts then share the pool without
/// handing jobs across from an outside thread (what a command line does with its whole
/// command).
///
/// # Errors
/// [`ThreadsError::Build`] when the system refuses the threads.
pub fn run_on_pool<R: Send>(
    threads: Option<usize>,
    work: impl FnOnce() -> R + Send,
) -> Result<R, ThreadsError> {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(threads.unwrap_or(0))
        .build()
        .map_err(|e| ThreadsError::Build(e.to_string()))?;
    Ok(pool.install(work))
}

/// Number of threads parallel work runs on (the current pool's size).
pub fn threads() -> usize {
    rayon::current_num_threads()
}

#[cfg(test)]
mod tests {
    #[test]
    fn a_local_pool_of_any_size_reports_its_size() {
        // rayon's documented contract: inside `install`, `current_num_threads` is the
        // installing pool's size.
        for n in [1, 3] {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(n)
                .build()
                .unwrap();
            assert_eq!(pool.install(super::threads), n);
        }
    }
}
