//! Running one build or one batch across the ranks of an MPI job (`mpirun -np N kernstep
//! ...`; cargo feature `mpi`, rsmpi over the system's MPI).
//!
//! - `build`: every rank keeps the whole working set and reduces its share of each round of
//!   sums ([`kernstep::completion::WorkShare`]); rank 0 alone takes the cache lock, saves the
//!   checkpoints and stores the entry, which is the one a single process stores.
//! - `batch`: each rank loads the set from the shared cache and solves one contiguous block
//!   of the days; rank 0 writes every result in input order and the summary.
//!
//! MPI is started only when the process was launched by `mpirun` (its environment says so),
//! so a binary built with the feature runs alone as before. A rank that dies ends the job:
//! `mpirun` stops the others, nothing half-built is stored, and a build resumes from its last
//! checkpoint.

pub mod batch;
pub mod build;

use std::sync::OnceLock;

use kernstep::completion::{StopReason, WorkShare};
use mpi::datatype::PartitionMut;
use mpi::environment::Universe;
use mpi::topology::{Communicator, SimpleCommunicator};
use mpi::traits::{CommunicatorCollectives, Root};
use mpi::Count;

/// Environment variables that the launchers of OpenMPI and of PMIx-based MPIs set for each
/// rank.
const LAUNCHED: [&str; 2] = ["OMPI_COMM_WORLD_SIZE", "PMIX_RANK"];

static RANKS: OnceLock<Ranks> = OnceLock::new();

/// This process's place in the MPI job.
#[derive(Clone, Copy, Debug)]
pub struct Ranks {
    /// This rank.
    pub rank: usize,
    /// The number of ranks.
    pub size: usize,
}

/// Starts MPI when the process was launched by `mpirun`; the returned universe finalises MPI
/// when dropped (at the end of `main`).
pub fn start() -> Option<Universe> {
    if !LAUNCHED.iter().any(|v| std::env::var_os(v).is_some()) {
        return None;
    }
    // Serialized: MPI is called from one thread at a time, though not always the same one
    // (the verbs run inside a rayon pool).
    let (universe, _) = mpi::initialize_with_threading(mpi::Threading::Serialized)?;
    let world = universe.world();
    let ranks = Ranks {
        rank: usize::try_from(world.rank()).ok()?,
        size: usize::try_from(world.size()).ok()?,
    };
    RANKS.set(ranks).ok()?;
    Some(universe)
}

/// The job this process belongs to, when it has more than one rank.
pub fn current() -> Option<Ranks> {
    RANKS.get().copied().filter(|r| r.size > 1)
}

impl Ranks {
    fn world(&self) -> SimpleCommunicator {
        SimpleCommunicator::world()
    }

    /// Every rank's `mine`, concatenated in rank order, on every rank.
    fn all_gather<T: mpi::datatype::Equivalence + Default + Clone>(
        &self,
        mine: &[T],
    ) -> kernstep::Result<Vec<T>> {
        let world = self.world();
        let count = Count::try_from(mine.len())
            .map_err(|_| kernstep::Error::Overflow("a rank's share of one exchange".into()))?;
        let mut counts = vec![0 as Count; self.size];
        world.all_gather_into(&count, &mut counts[..]);
        let (displs, total) = offsets(&counts)?;
        let mut all = vec![T::default(); total];
        let mut partition = PartitionMut::new(&mut all[..], counts, &displs[..]);
        world.all_gather_varcount_into(mine, &mut partition);
        Ok(all)
    }

    /// Every rank's bytes, in rank order, on rank 0 (`None` on the others).
    pub fn gather_bytes(&self, mine: &[u8]) -> kernstep::Result<Option<Vec<u8>>> {
        let world = self.world();
        let root = world.process_at_rank(0);
        let count = Count::try_from(mine.len())
            .map_err(|_| kernstep::Error::Overflow("a rank's results".into()))?;
        if self.rank != 0 {
            root.gather_into(&count);
            root.gather_varcount_into(mine);
            return Ok(None);
        }
        let mut counts = vec![0 as Count; self.size];
        root.gather_into_root(&count, &mut counts[..]);
        let (displs, total) = offsets(&counts)?;
        let mut all = vec![0u8; total];
        let mut partition = PartitionMut::new(&mut all[..], counts, &displs[..]);
        root.gather_varcount_into_root(mine, &mut partition);
        Ok(Some(all))
    }

    /// Every rank's text, in rank order, on every rank.
    pub fn all_gather_text(&self, mine: &str) -> kernstep::Result<Vec<String>> {
        let lengths = self.all_gather(&[mine.len() as u64])?;
        let bytes = self.all_gather(mine.as_bytes())?;
        let mut out = Vec::with_capacity(self.size);
        let mut at = 0usize;
        for len in lengths {
            let end = at + len as usize;
            out.push(String::from_utf8_lossy(&bytes[at..end]).into_owned());
            at = end;
        }
        Ok(out)
    }
}

/// The displacements of `counts` and their total.
fn offsets(counts: &[Count]) -> kernstep::Result<(Vec<Count>, usize)> {
    let mut displs = Vec::with_capacity(counts.len());
    let mut total: Count = 0;
    for &c in counts {
        displs.push(total);
        total = total
            .checked_add(c)
            .ok_or_else(|| kernstep::Error::Overflow("the entries of one exchange".into()))?;
    }
    Ok((displs, usize::try_from(total).unwrap_or(0)))
}

/// A stop request as one number for the exchange: 0 for none.
fn stop_code(stop: Option<StopReason>) -> i32 {
    match stop {
        None => 0,
        Some(StopReason::ElementLimit) => 1,
        Some(StopReason::TimeLimit) => 2,
        Some(StopReason::Cancelled) => 3,
    }
}

fn stop_of(code: i32) -> Option<StopReason> {
    match code {
        1 => Some(StopReason::ElementLimit),
        2 => Some(StopReason::TimeLimit),
        3 => Some(StopReason::Cancelled),
        _ => None,
    }
}

impl WorkShare for Ranks {
    fn part(&self) -> (usize, usize) {
        (self.rank, self.size)
    }

    fn exchange(
        &self,
        remainders: Vec<i32>,
        stop: Option<StopReason>,
    ) -> kernstep::Result<(Vec<i32>, Option<StopReason>)> {
        let stops = self.all_gather(&[stop_code(stop)])?;
        let all = self.all_gather(&remainders)?;
        Ok((all, stops.into_iter().find_map(stop_of)))
    }
}
