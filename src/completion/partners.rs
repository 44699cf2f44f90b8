//! Partner groups of a lifting stage, kept in sign slices so that a member's sign-compatible
//! partners are found a word of 64 members at a time instead of one pair at a time.
//!
//! A group holds members in blocks of 64. For each position `k` of the compared components a
//! block has two words: the bits of its members positive at `k` and of those negative there
//! (a "bit-sliced" layout, 2 bits per member and position). A member `p` conflicts with the
//! members of a block that have the opposite sign at one of `p`'s nonzero positions, so its
//! compatible partners are the block's members with every such word's bits cleared: one AND per
//! nonzero position of `p` for 64 members. Most pairs of a stage are not sign-compatible (99%
//! on the three-way tables), so this enumerates the compatible ones without testing the rest
//! one by one; it also keeps 2 bits per member and position instead of a mask pair of 128 bits.

use super::reducer::{set_bits, SignMask};

/// Members per block (one bit each in a word).
const BLOCK: usize = 64;

/// Members with one (norm on `S`, `|v_j|`) on one side of component `j`, in the order they
/// joined (ids increasing), with their sign slices over the positions of `S`.
pub(super) struct Group {
    ids: Vec<u32>,
    /// Per block, `2 * positions` words: word `2k` has the bits of the members positive at
    /// position `k`, word `2k + 1` those of the members negative there.
    slices: Vec<u64>,
    positions: usize,
}

impl Group {
    /// An empty group over `positions` compared components.
    pub(super) fn new(positions: usize) -> Self {
        Self {
            ids: Vec::new(),
            slices: Vec::new(),
            positions,
        }
    }

    /// Adds member `id`, whose signs on the compared components are `signs`.
    pub(super) fn push<const W: usize>(&mut self, id: u32, signs: &SignMask<W>) {
        let i = self.ids.len();
        let words = 2 * self.positions;
        if i.is_multiple_of(BLOCK) {
            self.slices.resize(self.slices.len() + words, 0);
        }
        let block = &mut self.slices[i / BLOCK * words..];
        let bit = 1u64 << (i % BLOCK);
        for chunk in 0..W {
            let (pos, neg) = signs.word(chunk);
            for (bits, slice) in [(pos, 0), (neg, 1)] {
                for k in set_bits(bits) {
                    block[128 * chunk + 2 * k + slice] |= bit;
                }
            }
        }
        self.ids.push(id);
    }

    /// The ids of the members, in the order they joined.
    pub(super) fn ids(&self) -> &[u32] {
        &self.ids
    }

    /// The members with an id below `before` that are sign-compatible with a member of signs
    /// `signs` (no opposite sign at any position: for each of its positive positions the
    /// negative slice is cleared, and the other way round), block by block in the order they
    /// joined: the bits of the compatible ones and the block's ids (bit `i` stands for
    /// `ids[i]`).
    pub(super) fn compatible<'g, const W: usize>(
        &'g self,
        signs: &'g SignMask<W>,
        before: u32,
    ) -> impl Iterator<Item = (u64, &'g [u32])> + 'g {
        let words = 2 * self.positions;
        let members = self.ids.partition_point(|&id| id < before);
        (0..members.div_ceil(BLOCK)).filter_map(move |b| {
            let block = &self.slices[b * words..(b + 1) * words];
            let ids = &self.ids[b * BLOCK..members.min((b + 1) * BLOCK)];
            let mut bits = u64::MAX >> (BLOCK - ids.len());
            for chunk in 0..W {
                let (pos, neg) = signs.word(chunk);
                for (conflicting, opposite) in [(pos, 1), (neg, 0)] {
                    for k in set_bits(conflicting) {
                        bits &= !block[128 * chunk + 2 * k + opposite];
                        if bits == 0 {
                            return None;
                        }
                    }
                }
            }
            Some((bits, ids))
        })
    }
}

/// The ids that the blocks of [`Group::compatible`] mark, in order.
pub(super) fn marked<'g>(
    blocks: impl Iterator<Item = (u64, &'g [u32])> + 'g,
) -> impl Iterator<Item = u32> + 'g {
    blocks.flat_map(|(bits, ids)| set_bits(bits).map(|i| ids[i]))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The members the slices report are exactly those without opposite signs, member by
    /// member (the definition of sign-compatible), over more than one block.
    #[test]
    fn compatible_members_are_those_without_opposite_signs() {
        let comps = [0, 2, 3];
        let vectors: Vec<[i8; 4]> = (0..150i32)
            .map(|i| {
                let s = |d: i32| ((i / d) % 3 - 1) as i8;
                [s(1), 5, s(3), s(9)]
            })
            .collect();
        let mut group = Group::new(comps.len());
        for (id, v) in vectors.iter().enumerate() {
            group.push(id as u32 * 2, &SignMask::<1>::of(v, &comps));
        }
        for p in &vectors {
            let signs = SignMask::<1>::of(p, &comps);
            let found: Vec<u32> = marked(group.compatible(&signs, u32::MAX)).collect();
            let expected: Vec<u32> = (0..vectors.len() as u32)
                .filter(|&q| comps.iter().all(|&c| p[c] * vectors[q as usize][c] >= 0))
                .map(|q| q * 2)
                .collect();
            assert_eq!(found, expected);
            let before: Vec<u32> = marked(group.compatible(&signs, 131)).collect();
            let expected: Vec<u32> = expected.into_iter().filter(|&q| q < 131).collect();
            assert_eq!(before, expected);
        }
    }
}
