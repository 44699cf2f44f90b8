//! The cache entry of a network matrix: its Graver basis is the set of signed cycles of the
//! network (De Loera, Hemmecke, Köppe 2013, ch. 3), found by the network solver from the
//! matrix, so the entry records the key and the matrix's figures and stores no elements.
//!
//! The figures need no enumeration: a network matrix is totally unimodular (Schrijver,
//! "Theory of Linear and Integer Programming", 1986, §19.3), so `Δ = 1` exactly, and its rank
//! is the number of rows less the number of connected groups of rows that no arc links to the
//! root.

use std::collections::HashSet;
use std::time::Instant;

use cache::{Completeness, EntryKey, SetKind, SetMetadata, Truncation};

use super::build::{build, BuildOutcome, BuiltSet};
use super::spec::BuildSpec;
use crate::analysis::{AnalysisOptions, ColumnClasses, MatrixAnalysis};
use crate::completion::{Control, ElementSet};
use crate::error::Result;
use crate::lattice::RowSpaceKey;
use crate::matrix::IntMatrix;
use crate::model::Model;
use crate::network::Network;

/// The name recorded as the method of such entries.
pub const CYCLES_METHOD: &str = "network cycles (implicit)";

/// The key of the implicit set of network matrix `a`: its row space, kind
/// [`SetKind::Cycles`], every variable free, no truncation.
pub fn cycles_key(a: &IntMatrix) -> EntryKey {
    EntryKey {
        row_space: RowSpaceKey::of(a).canonical_text(),
        kind: SetKind::Cycles,
        signs: vec![cache::Sign::Free; a.cols()],
        truncation: Truncation::default(),
    }
}

/// The signed cycles of the network matrix `a` enumerated: its whole Graver basis built by
/// the completion under `control`, as a default build of the matrix writes it. This is what
/// a file gets where the cache holds the implicit entry, which has no elements to write.
pub fn enumerate_cycles(a: &IntMatrix, control: &Control<'_>) -> Result<BuildOutcome> {
    let model = Model::of_matrix(a.clone());
    let analysis = MatrixAnalysis::of(a, &AnalysisOptions::new());
    let spec = BuildSpec::default().resolve(&model, &analysis)?;
    build(a, &analysis, &spec, control, None)
}

/// The entry of `a`, detected as `network`: key, figures and no elements.
pub fn cycles_entry(a: &IntMatrix, network: &Network) -> Result<BuiltSet> {
    let start = Instant::now();
    let metadata = SetMetadata {
        matrix: a.to_rows(),
        rank: rank(network) as u64,
        delta: "1".to_string(),
        delta_exact: true,
        column_number: ColumnClasses::of(a).up_to_sign.len() as u64,
        norm_bound: None,
        method: CYCLES_METHOD.to_string(),
        completeness: Completeness::Complete,
        build_seconds: start.elapsed().as_secs_f64(),
        kernstep_version: env!("CARGO_PKG_VERSION").to_string(),
        created_unix: std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.as_secs()),
        model: None,
    };
    Ok(BuiltSet {
        key: cycles_key(a),
        metadata,
        set: ElementSet::from_rows(a.cols(), &[])?,
    })
}

/// `rank(A)`: the rows less one per connected group of rows without an arc to the root (the
/// incidence matrix of a connected graph on `k` nodes has rank `k - 1`).
fn rank(network: &Network) -> usize {
    let mut parent: Vec<usize> = (0..network.nodes()).collect();
    fn find(parent: &mut [usize], mut v: usize) -> usize {
        while parent[v] != v {
            parent[v] = parent[parent[v]];
            v = parent[v];
        }
        v
    }
    for arc in network.arcs() {
        let (a, b) = (find(&mut parent, arc.tail), find(&mut parent, arc.head));
        parent[a] = b;
    }
    let root = find(&mut parent, network.root());
    let groups: HashSet<usize> = (0..network.rows())
        .map(|v| find(&mut parent, v))
        .filter(|&g| g != root)
        .collect();
    network.rows() - groups.len()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn figures_of_a_lane_plan_and_of_an_unrooted_transport_matrix() {
        // The lane plan of examples/lane_plan.toml with kept columns: rows depots 0, 1 and
        // zones 2, 3; lanes (0,2), (0,3), (1,2), (1,3); kept arcs on both depots.
        let mut a = IntMatrix::zeros(4, 6);
        for (j, (d, z)) in [(0, 2), (0, 3), (1, 2), (1, 3)].into_iter().enumerate() {
            a.set(d, j, 1);
            a.set(z, j, 1);
        }
        a.set(0, 4, 1);
        a.set(1, 5, 1);
        let entry = cycles_entry(&a, &Network::detect(&a).unwrap()).unwrap();
        assert_eq!(entry.metadata.rank, 4);
        assert_eq!(entry.metadata.column_number, 6);
        assert_eq!(entry.key.kind, SetKind::Cycles);
        // Without the kept columns the 2 x 2 transport matrix has rank 3 (by hand: the row
        // sums of depots and zones agree), and one group of rows meets no root arc.
        let mut b = IntMatrix::zeros(4, 4);
        for (j, (d, z)) in [(0, 2), (0, 3), (1, 2), (1, 3)].into_iter().enumerate() {
            b.set(d, j, 1);
            b.set(z, j, 1);
        }
        assert_eq!(rank(&Network::detect(&b).unwrap()), 3);
    }
}
