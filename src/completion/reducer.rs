//! The reducibility index: "is there a stored `h` with `h ⊑ w` on the active components?"
//!
//! A support tree: each inner node splits its elements by the sign (`+`, `-`, `0`) of one
//! active component; a query for `w` only descends into the `0` child and the child of `w`'s
//! own sign there, so it touches few candidates. A leaf holds its members inline (sign masks,
//! norm, id; no pointer to follow per candidate) in increasing norm, so a scan stops at the
//! first member heavier than the query; the others are checked by sign masks, then entry
//! magnitudes. The masks take `W` words of 64 bits, the fewest that hold the components (one
//! word up to 64 variables), so a leaf of one-word members is a few cache lines. The index
//! refers to vectors by their [`VecStore`] ids.

use super::store::{sub_scaled, Entry, Stored, VecStore};
use crate::error::Result;

/// Members a leaf holds before it splits. Large leaves keep the paths short (each node on a
/// path is a dependent memory access) while a leaf's members are scanned in one sequential
/// pass. On the 3x3x4 tables 64 and 128 measured best of 12, 32, 48, 64 and 128 (about 12%
/// faster than 12), and 64 holds less heap (8.9 MB against 10.3 MB at 12).
const LEAF_CAPACITY: usize = 64;

/// Words per sign mask of the widest layout; the completion handles at most `64 * MAX_WORDS`
/// components.
pub(crate) const MAX_WORDS: usize = 4;

/// Sign masks of one vector over the active components (bit `k` stands for `comps[k]`), in
/// `W` words each.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct SignMask<const W: usize> {
    pos: [u64; W],
    neg: [u64; W],
}

impl<const W: usize> SignMask<W> {
    /// Sign masks of `v` on the components `comps` (at most `64 * W` of them).
    pub(crate) fn of<E: Stored>(v: &[E], comps: &[usize]) -> Self {
        Self::with_norm(v, comps).0
    }

    /// [`SignMask::of`] with the l1 norm of `v` on `comps`, in one branch-free pass.
    pub(crate) fn with_norm<E: Stored>(v: &[E], comps: &[usize]) -> (Self, u64) {
        let mut m = SignMask {
            pos: [0; W],
            neg: [0; W],
        };
        let mut norm = 0u64;
        for (k, &c) in comps.iter().enumerate() {
            let x: Entry = v[c].into();
            let shift = k % 64;
            m.pos[k / 64] |= u64::from(x > 0) << shift;
            m.neg[k / 64] |= u64::from(x < 0) << shift;
            norm += u64::from(x.unsigned_abs());
        }
        (m, norm)
    }

    /// Word `w` of the masks: the positions `64 w ..` where the vector is positive, and those
    /// where it is negative.
    pub(crate) fn word(&self, w: usize) -> (u64, u64) {
        (self.pos[w], self.neg[w])
    }

    /// True if the vector is zero on every component.
    fn is_empty(&self) -> bool {
        (0..W).all(|w| self.pos[w] | self.neg[w] == 0)
    }

    /// True if the signs of `self` are a subset of those of `other` (no conflict, no excess).
    fn fits_in(&self, other: &Self) -> bool {
        (0..W).all(|w| self.pos[w] & !other.pos[w] == 0 && self.neg[w] & !other.neg[w] == 0)
    }

    /// True if no active component has opposite signs in `self` and `other`.
    pub(crate) fn compatible(&self, other: &Self) -> bool {
        (0..W).all(|w| self.pos[w] & other.neg[w] == 0 && self.neg[w] & other.pos[w] == 0)
    }

    /// The child slot of position `k`: 0 positive, 1 negative, 2 zero.
    fn slot(&self, k: usize) -> usize {
        let bit = 1u64 << (k % 64);
        if self.pos[k / 64] & bit != 0 {
            0
        } else if self.neg[k / 64] & bit != 0 {
            1
        } else {
            2
        }
    }

    /// Makes the vector zero at the positions of the support of `within` where `zero` holds,
    /// branch-free (whether an entry vanished is a coin toss to a branch predictor; the
    /// branch cost about 8% of a build of the 3x3x4 tables).
    fn clear_where(&mut self, within: &Self, zero: impl Fn(usize) -> bool) {
        for w in 0..W {
            let vanished = set_bits(within.pos[w] | within.neg[w]).fold(0u64, |vanished, b| {
                vanished | u64::from(zero(w * 64 + b)) << b
            });
            self.pos[w] &= !vanished;
            self.neg[w] &= !vanished;
        }
    }

    /// Positions `k` (into the component list) where the vector is nonzero.
    fn support(&self) -> impl Iterator<Item = usize> + '_ {
        (0..W).flat_map(move |w| set_bits(self.pos[w] | self.neg[w]).map(move |b| w * 64 + b))
    }
}

/// The positions of the set bits of `bits`, lowest first.
pub(crate) fn set_bits(mut bits: u64) -> impl Iterator<Item = usize> {
    std::iter::from_fn(move || {
        (bits != 0).then(|| {
            let k = bits.trailing_zeros() as usize;
            bits &= bits - 1;
            k
        })
    })
}

/// One indexed member as a leaf holds it.
#[derive(Clone, Copy, Debug)]
struct Item<const W: usize> {
    mask: SignMask<W>,
    /// The l1 norm on the active components, saturated at `u32::MAX` (monotone, so a member
    /// ⊑ `w` never has a larger saturated norm than `w`).
    norm: u32,
    id: u32,
}

/// A node of the support tree with what every member below it shares: a query that some
/// member below fits must have these signs and at least this norm, so a node that fails
/// either is passed over without reading its children or items.
#[derive(Debug)]
struct Node<const W: usize> {
    /// The signs every member below has (for an empty node every bit, which nothing fits).
    common: SignMask<W>,
    /// The least norm of a member below (`u32::MAX` for an empty node).
    least_norm: u32,
    kind: Kind<W>,
}

#[derive(Debug)]
enum Kind<const W: usize> {
    /// Members in increasing norm (ties in order of insertion).
    Leaf(Vec<Item<W>>),
    /// Split by the sign at position `depth` of the component list.
    Split { depth: u32, children: [u32; 3] },
}

impl<const W: usize> Node<W> {
    /// A leaf holding `items`.
    fn leaf(items: Vec<Item<W>>) -> Self {
        let mut node = Node {
            common: SignMask {
                pos: [u64::MAX; W],
                neg: [u64::MAX; W],
            },
            least_norm: u32::MAX,
            kind: Kind::Leaf(Vec::new()),
        };
        items.iter().for_each(|item| node.admit(item));
        node.kind = Kind::Leaf(items);
        node
    }

    /// Counts `item` among the members below.
    fn admit(&mut self, item: &Item<W>) {
        for w in 0..W {
            self.common.pos[w] &= item.mask.pos[w];
            self.common.neg[w] &= item.mask.neg[w];
        }
        self.least_norm = self.least_norm.min(item.norm);
    }

    /// Whether some member below may fit `query`.
    fn may_hold(&self, query: &Item<W>) -> bool {
        self.least_norm <= query.norm && self.common.fits_in(&query.mask)
    }
}

/// Support-tree index over a set of stored vectors, restricted to the active components.
#[derive(Debug)]
pub(crate) struct Reducer<const W: usize> {
    comps: Vec<usize>,
    nodes: Vec<Node<W>>,
}

impl<const W: usize> Reducer<W> {
    /// An empty index comparing vectors on the components `comps` (in this order of splitting).
    pub(crate) fn new(comps: Vec<usize>) -> Self {
        debug_assert!(comps.len() <= 64 * W);
        Self {
            comps,
            nodes: vec![Node::leaf(Vec::new())],
        }
    }

    /// The active components.
    pub(crate) fn comps(&self) -> &[usize] {
        &self.comps
    }

    fn item<E: Stored>(&self, v: &[E], id: u32) -> Item<W> {
        let (mask, norm) = SignMask::with_norm(v, &self.comps);
        Item {
            mask,
            norm: u32::try_from(norm).unwrap_or(u32::MAX),
            id,
        }
    }

    /// Adds the stored vector `id` to the index.
    pub(crate) fn insert<E: Stored>(&mut self, store: &VecStore<E>, id: u32) {
        let item = self.item(store.get(id), id);
        let (mut node, mut depth) = (0, 0);
        loop {
            let current = &mut self.nodes[node];
            current.admit(&item);
            match &mut current.kind {
                Kind::Split { depth: d, children } => {
                    depth = *d as usize + 1;
                    node = children[item.mask.slot(*d as usize)] as usize;
                }
                Kind::Leaf(items) => {
                    let at = items.partition_point(|i| i.norm <= item.norm);
                    items.insert(at, item);
                    if items.len() > LEAF_CAPACITY && depth < self.comps.len() {
                        self.split(node, depth);
                    }
                    return;
                }
            }
        }
    }

    fn split(&mut self, node: usize, depth: usize) {
        let Kind::Leaf(items) =
            std::mem::replace(&mut self.nodes[node].kind, Kind::Leaf(Vec::new()))
        else {
            return;
        };
        let mut parts: [Vec<Item<W>>; 3] = Default::default();
        for item in items {
            parts[item.mask.slot(depth)].push(item);
        }
        let base = self.nodes.len() as u32;
        for part in parts {
            self.nodes.push(Node::leaf(part));
        }
        self.nodes[node].kind = Kind::Split {
            depth: depth as u32,
            children: [base, base + 1, base + 2],
        };
    }

    /// A stored vector `h` (other than `skip`) with `h ⊑ w` on the active components, if any.
    pub(crate) fn find<E: Stored, Q: Stored>(
        &self,
        store: &VecStore<E>,
        w: &[Q],
        skip: Option<u32>,
    ) -> Option<u32> {
        let query = self.item(w, u32::MAX);
        self.find_below(0, store, w, &query, skip)
            .map(|item| item.id)
    }

    /// Reduces `w` to normal form against the members of `store`: subtracts the largest
    /// multiple of a member `h ⊑ w` (on the active components) as long as one exists.
    /// Returns `true` if `w` became zero there.
    ///
    /// The query's signs and norm are computed once and then kept up to date: `k h ⊑ w`
    /// means `|w_c - k h_c| = |w_c| - k |h_c|` on every active component, so the norm drops
    /// by `k ||h||` and a sign can only vanish on the support of `h`.
    pub(crate) fn reduce<E: Stored>(&self, store: &VecStore<E>, w: &mut [Entry]) -> Result<bool> {
        let mut query = self.item(w, u32::MAX);
        while !query.mask.is_empty() {
            let Some(h) = self.find_below(0, store, w, &query, None) else {
                return Ok(false);
            };
            let v = store.get(h.id);
            let k = max_multiple(v, w, &self.comps);
            sub_scaled(w, v, k)?;
            let dropped = u64::from(h.norm) * k.unsigned_abs() as u64;
            match query.norm {
                u32::MAX => query = self.item(w, u32::MAX),
                norm => {
                    query.norm = (u64::from(norm) - dropped) as u32;
                    query.mask.clear_where(&h.mask, |k| w[self.comps[k]] == 0);
                }
            }
        }
        Ok(true)
    }

    fn find_below<E: Stored, Q: Stored>(
        &self,
        node: usize,
        store: &VecStore<E>,
        w: &[Q],
        query: &Item<W>,
        skip: Option<u32>,
    ) -> Option<Item<W>> {
        let current = &self.nodes[node];
        if !current.may_hold(query) {
            return None;
        }
        match &current.kind {
            Kind::Split { depth, children } => {
                let s = query.mask.slot(*depth as usize);
                if s != 2 {
                    if let Some(h) = self.find_below(children[s] as usize, store, w, query, skip) {
                        return Some(h);
                    }
                }
                self.find_below(children[2] as usize, store, w, query, skip)
            }
            Kind::Leaf(items) => items
                .iter()
                .take_while(|item| item.norm <= query.norm)
                .find(|item| {
                    item.mask.fits_in(&query.mask)
                        && Some(item.id) != skip
                        && self.magnitudes_fit(&item.mask, store.get(item.id), w)
                })
                .copied(),
        }
    }

    /// `|h_c| <= |w_c|` on the support of `h` (signs are already known to agree).
    fn magnitudes_fit<E: Stored, Q: Stored>(&self, mask: &SignMask<W>, h: &[E], w: &[Q]) -> bool {
        mask.support().all(|k| {
            let c = self.comps[k];
            h[c].into().unsigned_abs() <= w[c].into().unsigned_abs()
        })
    }
}

/// The largest `k` with `k * h ⊑ w` on `comps`, given `h ⊑ w` there and `h` nonzero there.
/// Most reductions subtract `h` once, which a test of `2h ⊑ w` by multiplication shows
/// before any division.
pub(crate) fn max_multiple<E: Stored>(h: &[E], w: &[Entry], comps: &[usize]) -> Entry {
    let h = |c: usize| -> Entry { h[c].into() };
    let twice = comps
        .iter()
        .all(|&c| 2 * u64::from(h(c).unsigned_abs()) <= u64::from(w[c].unsigned_abs()));
    if !twice {
        return 1;
    }
    comps
        .iter()
        .filter(|&&c| h(c) != 0)
        .map(|&c| w[c] / h(c))
        .min()
        .unwrap_or(1)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn brute(store: &VecStore<i8>, comps: &[usize], w: &[Entry]) -> bool {
        store.iter().any(|h| {
            comps.iter().all(|&c| {
                let h = Entry::from(h[c]);
                h * w[c] >= 0 && h.abs() <= w[c].abs()
            })
        })
    }

    /// A draw of sparse pseudo-random entries in -2..=2 (a linear congruential generator,
    /// common practice).
    fn generator(mut seed: u64) -> impl FnMut() -> Entry {
        move || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let draw = (seed >> 33) % 15;
            if draw < 5 {
                draw as Entry - 2
            } else {
                0
            }
        }
    }

    /// An index of `W`-word masks over `comps` of vectors `width` wide, filled with enough
    /// members for about as many leaves as the leaf capacity allows splits.
    fn filled<const W: usize>(
        width: usize,
        comps: &[usize],
        next: &mut impl FnMut() -> Entry,
    ) -> (VecStore<i8>, Reducer<W>) {
        let mut store = VecStore::<i8>::new(width);
        let mut index = Reducer::<W>::new(comps.to_vec());
        for _ in 0..25 * LEAF_CAPACITY {
            let v: Vec<Entry> = (0..width).map(|_| next()).collect();
            if comps.iter().any(|&c| v[c] != 0) {
                let id = store.push(&v).unwrap();
                index.insert(&store, id);
            }
        }
        (store, index)
    }

    /// Query `i` of a run: even ones random, odd ones twice a stored vector plus noise (often
    /// reducible by it, unless the noise flips a sign).
    fn query(i: usize, store: &VecStore<i8>, next: &mut impl FnMut() -> Entry) -> Vec<Entry> {
        let mut w: Vec<Entry> = (0..store.width()).map(|_| next() * 2).collect();
        if i % 2 == 1 {
            let base = store.get((i % store.len()) as u32);
            w.iter_mut()
                .zip(base)
                .for_each(|(x, &b)| *x += 2 * Entry::from(b));
        }
        w
    }

    /// Checks every query of an index filled with sparse pseudo-random vectors against a
    /// linear scan.
    fn agrees_with_linear_scan<const W: usize>(width: usize, comps: Vec<usize>) {
        let mut next = generator(7);
        let (store, index) = filled::<W>(width, &comps, &mut next);
        let mut hits = 0;
        for i in 0..400 {
            let w = query(i, &store, &mut next);
            let found = index.find(&store, &w, None);
            assert_eq!(found.is_some(), brute(&store, &comps, &w));
            hits += usize::from(found.is_some());
            if let Some(h) = found {
                let h = store.widened(h);
                assert!(comps
                    .iter()
                    .all(|&c| h[c] * w[c] >= 0 && h[c].abs() <= w[c].abs()));
            }
        }
        assert!(
            0 < hits && hits < 400,
            "both answers are asked for: {hits} hits"
        );
    }

    /// [`Reducer::reduce`], which keeps the query's signs and norm up to date instead of
    /// recomputing them, ends in a normal form: zero on the active components exactly when it
    /// says so, and otherwise reducible by no member (a linear scan); the vector only loses
    /// members (each step subtracts stored vectors).
    #[test]
    fn reduction_ends_in_a_normal_form() {
        let comps: Vec<usize> = (0..16).filter(|c| c % 4 != 1).rev().collect();
        let mut next = generator(11);
        let (store, index) = filled::<1>(16, &comps, &mut next);
        let mut zero = 0;
        for i in 0..400 {
            let mut w = query(i, &store, &mut next);
            let vanished = index.reduce(&store, &mut w).unwrap();
            assert_eq!(vanished, comps.iter().all(|&c| w[c] == 0));
            assert!(vanished || !brute(&store, &comps, &w));
            zero += usize::from(vanished);
        }
        assert!(0 < zero && zero < 400, "both outcomes are met: {zero} zero");
    }

    #[test]
    fn tree_agrees_with_linear_scan() {
        agrees_with_linear_scan::<1>(6, vec![0, 2, 3, 5]);
    }

    #[test]
    fn wide_masks_agree_with_linear_scan() {
        // Components past bit 64 and 128 land in the second and third words.
        let comps: Vec<usize> = (0..140).filter(|c| c % 7 != 3).rev().collect();
        agrees_with_linear_scan::<4>(140, comps.clone());
        let first: Vec<usize> = comps.into_iter().filter(|&c| c < 100).collect();
        agrees_with_linear_scan::<2>(140, first);
    }
}
