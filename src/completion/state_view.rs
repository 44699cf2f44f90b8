//! The resumable state as a saving hook sees it: borrowed from the running completion, so a
//! save copies nothing but the bytes it writes.
//!
//! An owned [`Checkpoint`] holds every member as `i64` entries: made at every save, that copy
//! was the peak of memory of a build into the cache (the working set twice over, in a wider
//! type). A [`StateView`] instead reads the members where the completion keeps them and
//! encodes (serde) field for field as the `Checkpoint` it stands for, so what a hook stores
//! reads back as that `Checkpoint`.

use serde::ser::{SerializeSeq, SerializeStruct, SerializeStructVariant};
use serde::{Serialize, Serializer};

use super::checkpoint::{Checkpoint, InStage, StagePoint};
use super::packed_rows::PackedRows;
use super::store::{Entry, Stored};
use super::working::{Orbit, WorkingSet};

/// A resumable state, borrowed from the completion: what a saving hook receives
/// ([`super::Control::on_save`]).
pub struct StateView<'a> {
    lifted: &'a [usize],
    members: Members<'a>,
    within: Option<WithinView<'a>>,
    exact: bool,
}

/// The members of a saved state: a list of orbits (between stages) or a stage's working set.
#[derive(Clone, Copy)]
enum Members<'a> {
    Listed(&'a [Orbit]),
    Working(&'a dyn OrbitRows),
}

/// Where a stage stands, without its pending remainders (the scalar fields of a
/// [`StagePoint`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Position {
    /// As in [`StagePoint::Pairs`].
    Pairs { from: u64, tasks_done: usize },
    /// As in [`StagePoint::CatchUp`].
    CatchUp {
        level: u64,
        first_new: u32,
        members_done: usize,
    },
}

/// A stage in progress, its remainders borrowed.
#[derive(Clone, Copy)]
struct WithinView<'a> {
    component: usize,
    position: Position,
    sums: &'a [Vec<Entry>],
}

/// A set of orbits that can be read one at a time, in the order a [`Checkpoint`] lists them.
pub(crate) trait OrbitRows {
    /// How many orbits.
    fn orbit_count(&self) -> usize;
    /// The orbits, each as its representative and whether its negation is a member.
    fn orbit_rows(&self) -> Box<dyn Iterator<Item = (Vec<Entry>, bool)> + '_>;
}

impl OrbitRows for Members<'_> {
    fn orbit_count(&self) -> usize {
        match self {
            Members::Listed(orbits) => orbits.len(),
            Members::Working(set) => set.orbit_count(),
        }
    }

    fn orbit_rows(&self) -> Box<dyn Iterator<Item = (Vec<Entry>, bool)> + '_> {
        match self {
            Members::Listed(orbits) => {
                Box::new(orbits.iter().map(|o| (o.rep.clone(), o.symmetric)))
            }
            Members::Working(set) => set.orbit_rows(),
        }
    }
}

impl<const W: usize, E: Stored> OrbitRows for WorkingSet<W, E> {
    fn orbit_count(&self) -> usize {
        self.orbit_total()
    }

    fn orbit_rows(&self) -> Box<dyn Iterator<Item = (Vec<Entry>, bool)> + '_> {
        Box::new(self.all_orbits().map(|o| (o.rep, o.symmetric)))
    }
}

impl<'a> StateView<'a> {
    /// The state between two stages: `orbits` is the minimal set on `lifted`.
    pub(crate) fn between(lifted: &'a [usize], orbits: &'a [Orbit], exact: bool) -> Self {
        Self {
            lifted,
            members: Members::Listed(orbits),
            within: None,
            exact,
        }
    }

    /// The state inside the stage lifting `component`: `members` is its working set, the
    /// work stands at `position` with the remainders `sums` not yet merged.
    pub(crate) fn within(
        lifted: &'a [usize],
        members: &'a dyn OrbitRows,
        (component, position): (usize, Position),
        sums: &'a [Vec<Entry>],
        exact: bool,
    ) -> Self {
        Self {
            lifted,
            members: Members::Working(members),
            within: Some(WithinView {
                component,
                position,
                sums,
            }),
            exact,
        }
    }

    /// Components lifted so far, in lifting order.
    pub fn lifted(&self) -> &[usize] {
        self.lifted
    }

    /// How many elements (orbits) the state lists.
    pub fn elements(&self) -> usize {
        self.members.orbit_count()
    }

    /// Whether the state was saved inside a stage.
    pub fn mid_stage(&self) -> bool {
        self.within.is_some()
    }

    /// The owned state this view stands for (a copy of the whole set).
    pub fn to_checkpoint(&self) -> Checkpoint {
        let mut elements = PackedRows::default();
        let mut symmetric = Vec::with_capacity(self.elements());
        for (rep, sym) in self.members.orbit_rows() {
            let row: Vec<i64> = rep.iter().map(|&x| i64::from(x)).collect();
            elements
                .push(&row)
                .expect("the representatives of a working set share its width");
            symmetric.push(sym);
        }
        Checkpoint {
            lifted: self.lifted.to_vec(),
            elements,
            symmetric,
            within: self.within.map(|w| InStage {
                component: w.component,
                point: w
                    .position
                    .with_sums(w.sums.iter().map(|s| widen(s)).collect()),
            }),
            exact: self.exact,
        }
    }
}

impl Position {
    /// The point at this position with the remainders `sums`.
    pub(crate) fn with_sums(self, sums: Vec<Vec<i64>>) -> StagePoint {
        match self {
            Position::Pairs { from, tasks_done } => StagePoint::Pairs {
                from,
                tasks_done,
                sums,
            },
            Position::CatchUp {
                level,
                first_new,
                members_done,
            } => StagePoint::CatchUp {
                level,
                first_new,
                members_done,
                sums,
            },
        }
    }
}

impl StagePoint {
    /// The position and the remainders of this point.
    pub(crate) fn split(self) -> (Position, Vec<Vec<i64>>) {
        match self {
            StagePoint::Pairs {
                from,
                tasks_done,
                sums,
            } => (Position::Pairs { from, tasks_done }, sums),
            StagePoint::CatchUp {
                level,
                first_new,
                members_done,
                sums,
            } => (
                Position::CatchUp {
                    level,
                    first_new,
                    members_done,
                },
                sums,
            ),
        }
    }
}

fn widen(v: &[Entry]) -> Vec<i64> {
    v.iter().map(|&x| i64::from(x)).collect()
}

/// Serialises as the derived encoding of [`Checkpoint`]: the same fields in the same order,
/// entries as `i64`.
impl Serialize for StateView<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut state = serializer.serialize_struct("Checkpoint", 5)?;
        state.serialize_field("lifted", self.lifted)?;
        state.serialize_field("elements", &Elements(&self.members))?;
        state.serialize_field("symmetric", &Flags(&self.members))?;
        state.serialize_field("within", &self.within)?;
        state.serialize_field("exact", &self.exact)?;
        state.end()
    }
}

/// The representatives of a set of orbits, as a sequence of `i64` rows.
struct Elements<'a>(&'a dyn OrbitRows);

/// Whether each orbit of a set is symmetric.
struct Flags<'a>(&'a dyn OrbitRows);

/// Remainders as a sequence of `i64` rows.
struct Rows<'a>(&'a [Vec<Entry>]);

/// One row of entries, as `i64`.
struct Wide<'a>(&'a [Entry]);

impl Serialize for Elements<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut seq = serializer.serialize_seq(Some(self.0.orbit_count()))?;
        for (rep, _) in self.0.orbit_rows() {
            seq.serialize_element(&Wide(&rep))?;
        }
        seq.end()
    }
}

impl Serialize for Flags<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut seq = serializer.serialize_seq(Some(self.0.orbit_count()))?;
        for (_, symmetric) in self.0.orbit_rows() {
            seq.serialize_element(&symmetric)?;
        }
        seq.end()
    }
}

impl Serialize for Rows<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.collect_seq(self.0.iter().map(|row| Wide(row)))
    }
}

impl Serialize for Wide<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.collect_seq(self.0.iter().map(|&x| i64::from(x)))
    }
}

/// As the derived encoding of [`InStage`].
impl Serialize for WithinView<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut state = serializer.serialize_struct("InStage", 2)?;
        state.serialize_field("component", &self.component)?;
        state.serialize_field("point", &PointView(self.position, self.sums))?;
        state.end()
    }
}

/// A stage point, its remainders borrowed.
struct PointView<'a>(Position, &'a [Vec<Entry>]);

/// As the derived encoding of [`StagePoint`].
impl Serialize for PointView<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let sums = Rows(self.1);
        match self.0 {
            Position::Pairs { from, tasks_done } => {
                let mut v = serializer.serialize_struct_variant("StagePoint", 0, "Pairs", 3)?;
                v.serialize_field("from", &from)?;
                v.serialize_field("tasks_done", &tasks_done)?;
                v.serialize_field("sums", &sums)?;
                v.end()
            }
            Position::CatchUp {
                level,
                first_new,
                members_done,
            } => {
                let mut v = serializer.serialize_struct_variant("StagePoint", 1, "CatchUp", 4)?;
                v.serialize_field("level", &level)?;
                v.serialize_field("first_new", &first_new)?;
                v.serialize_field("members_done", &members_done)?;
                v.serialize_field("sums", &sums)?;
                v.end()
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn orbits() -> Vec<Orbit> {
        vec![
            Orbit {
                rep: vec![1, -2, 0, 70_000],
                symmetric: true,
            },
            Orbit {
                rep: vec![0, 3, -1, -1],
                symmetric: false,
            },
        ]
    }

    fn encoded<T: Serialize>(value: &T) -> Vec<u8> {
        bincode::serde::encode_to_vec(value, bincode::config::standard()).unwrap()
    }

    /// The view encodes exactly as the owned state it stands for, between stages and inside
    /// one at either kind of point (so a state a hook stored reads back as a `Checkpoint`).
    #[test]
    fn a_view_encodes_as_its_checkpoint() {
        let orbits = orbits();
        let lifted = [3, 0, 2];
        let between = StateView::between(&lifted, &orbits, true);
        assert_eq!(encoded(&between), encoded(&between.to_checkpoint()));
        let sums = vec![vec![5, -6, 7, 0], vec![-1, 0, 0, 1]];
        let positions = [
            Position::Pairs {
                from: 4,
                tasks_done: 17,
            },
            Position::CatchUp {
                level: 9,
                first_new: 3,
                members_done: 2,
            },
        ];
        for position in positions {
            let mut set = WorkingSet::<1, Entry>::new(4, vec![0, 1, 2, 3]);
            for o in &orbits {
                set.add(&o.rep, o.symmetric).unwrap();
            }
            let view = StateView::within(&lifted, &set, (1, position), &sums, false);
            let owned = view.to_checkpoint();
            assert_eq!(encoded(&view), encoded(&owned));
            assert_eq!(
                owned.within.unwrap().point.split(),
                (position, widen_all(&sums))
            );
            assert_eq!((view.elements(), view.mid_stage()), (2, true));
        }
    }

    fn widen_all(sums: &[Vec<Entry>]) -> Vec<Vec<i64>> {
        sums.iter().map(|s| widen(s)).collect()
    }

    /// The working set's orbits are listed once each, in id order, with their flags.
    #[test]
    fn a_working_set_lists_its_orbits_once() {
        let mut set = WorkingSet::<1, Entry>::new(4, vec![0, 1, 2, 3]);
        for o in orbits() {
            set.add(&o.rep, o.symmetric).unwrap();
        }
        assert_eq!(set.len(), 3);
        assert_eq!(set.orbit_count(), 2);
        let rows: Vec<(Vec<Entry>, bool)> = set.orbit_rows().collect();
        let expected: Vec<(Vec<Entry>, bool)> =
            orbits().into_iter().map(|o| (o.rep, o.symmetric)).collect();
        assert_eq!(rows, expected);
    }
}
