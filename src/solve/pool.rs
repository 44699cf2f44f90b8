//! Thread pools for work spread over days or models: rayon pools of a chosen size, capped to
//! the threads the machine runs at once.

use std::sync::OnceLock;

use crate::error::{Error, Result};

/// `threads` capped to the machine's parallelism: more threads than cores only add
/// switching (and, in a build, memory for each thread's buffers).
pub fn capped_threads(threads: usize) -> usize {
    threads.min(cores())
}

/// The threads the machine runs at once, asked once per process: the standard library reads
/// the cgroup's quota files on every call (about twenty system calls on Linux).
fn cores() -> usize {
    static CORES: OnceLock<usize> = OnceLock::new();
    *CORES.get_or_init(|| std::thread::available_parallelism().map_or(usize::MAX, |n| n.get()))
}

/// Runs `f` on a rayon pool of `threads` threads (at least one; capped by
/// [`capped_threads`]).
pub fn in_pool<T: Send>(threads: usize, f: impl FnOnce() -> T + Send) -> Result<T> {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(capped_threads(threads.max(1)))
        .build()
        .map_err(|e| Error::Unsupported(format!("starting a pool of {threads} threads: {e}")))?;
    Ok(pool.install(f))
}
