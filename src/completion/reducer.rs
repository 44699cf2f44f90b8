//! The reducibility index: "is there a stored `h` with `h ⊑ w` on the active components?"
//!
//! A support tree: each inner node splits its elements by the sign (`+`, `-`, `0`) of one
//! active component; a query for `w` only descends into the `0` child and the child of `w`'s
//! own sign there, so it touches few candidates. Leaves are checked with sign bit masks and
//! then entry magnitudes. The index refers to vectors by their [`VecStore`] ids.

use super::store::{Entry, VecStore};

const LEAF_CAPACITY: usize = 12;

/// Words per sign mask; the completion handles at most `64 * MASK_WORDS` components.
pub(crate) const MASK_WORDS: usize = 4;

/// Sign masks of one vector over the active components (bit `k` stands for `comps[k]`).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub(crate) struct SignMask {
    pos: [u64; MASK_WORDS],
    neg: [u64; MASK_WORDS],
}

impl SignMask {
    /// Sign masks of `v` on the components `comps` (at most `64 * MASK_WORDS` of them).
    pub(crate) fn of(v: &[Entry], comps: &[usize]) -> Self {
        let mut m = SignMask::default();
        for (k, &c) in comps.iter().enumerate() {
            let bit = 1u64 << (k % 64);
            match v[c].signum() {
                1 => m.pos[k / 64] |= bit,
                -1 => m.neg[k / 64] |= bit,
                _ => {}
            }
        }
        m
    }

    /// True if the signs of `self` are a subset of those of `other` (no conflict, no excess).
    fn fits_in(&self, other: &SignMask) -> bool {
        (0..MASK_WORDS)
            .all(|w| self.pos[w] & !other.pos[w] == 0 && self.neg[w] & !other.neg[w] == 0)
    }

    /// True if no active component has opposite signs in `self` and `other`.
    pub(crate) fn compatible(&self, other: &SignMask) -> bool {
        (0..MASK_WORDS).all(|w| self.pos[w] & other.neg[w] == 0 && self.neg[w] & other.pos[w] == 0)
    }

    /// Positions `k` (into the component list) where the vector is nonzero.
    fn support(&self) -> impl Iterator<Item = usize> + '_ {
        (0..MASK_WORDS).flat_map(move |w| {
            let mut bits = self.pos[w] | self.neg[w];
            std::iter::from_fn(move || {
                (bits != 0).then(|| {
                    let b = bits.trailing_zeros() as usize;
                    bits &= bits - 1;
                    w * 64 + b
                })
            })
        })
    }
}

#[derive(Debug)]
enum Node {
    Leaf(Vec<usize>),
    Split { depth: usize, children: [usize; 3] },
}

/// Support-tree index over a set of stored vectors, restricted to the active components.
#[derive(Debug)]
pub(crate) struct Reducer {
    comps: Vec<usize>,
    ids: Vec<u32>,
    masks: Vec<SignMask>,
    nodes: Vec<Node>,
}

impl Reducer {
    /// An empty index comparing vectors on the components `comps` (in this order of splitting).
    pub(crate) fn new(comps: Vec<usize>) -> Self {
        Self {
            comps,
            ids: Vec::new(),
            masks: Vec::new(),
            nodes: vec![Node::Leaf(Vec::new())],
        }
    }

    /// The active components.
    pub(crate) fn comps(&self) -> &[usize] {
        &self.comps
    }

    fn mask(&self, v: &[Entry]) -> SignMask {
        SignMask::of(v, &self.comps)
    }

    /// Adds the stored vector `id` to the index.
    pub(crate) fn insert(&mut self, store: &VecStore, id: u32) {
        let v = store.get(id);
        let local = self.ids.len();
        self.ids.push(id);
        self.masks.push(self.mask(v));
        let (mut node, mut depth) = (0, 0);
        while let Node::Split { depth: d, children } = &self.nodes[node] {
            node = children[sign_slot(v[self.comps[*d]])];
            depth = d + 1;
        }
        if let Node::Leaf(items) = &mut self.nodes[node] {
            items.push(local);
            if items.len() > LEAF_CAPACITY && depth < self.comps.len() {
                self.split(store, node, depth);
            }
        }
    }

    fn split(&mut self, store: &VecStore, node: usize, depth: usize) {
        let Node::Leaf(items) = std::mem::replace(&mut self.nodes[node], Node::Leaf(Vec::new()))
        else {
            return;
        };
        let comp = self.comps[depth];
        let mut parts: [Vec<usize>; 3] = Default::default();
        for local in items {
            let v = store.get(self.ids[local]);
            parts[sign_slot(v[comp])].push(local);
        }
        let base = self.nodes.len();
        for part in parts {
            self.nodes.push(Node::Leaf(part));
        }
        self.nodes[node] = Node::Split {
            depth,
            children: [base, base + 1, base + 2],
        };
    }

    /// A stored vector `h` (other than `skip`) with `h ⊑ w` on the active components, if any.
    pub(crate) fn find(&self, store: &VecStore, w: &[Entry], skip: Option<u32>) -> Option<u32> {
        let wm = self.mask(w);
        self.find_below(0, store, w, &wm, skip)
    }

    fn find_below(
        &self,
        node: usize,
        store: &VecStore,
        w: &[Entry],
        wm: &SignMask,
        skip: Option<u32>,
    ) -> Option<u32> {
        match &self.nodes[node] {
            Node::Split { depth, children } => {
                let s = sign_slot(w[self.comps[*depth]]);
                if s != 2 {
                    if let Some(h) = self.find_below(children[s], store, w, wm, skip) {
                        return Some(h);
                    }
                }
                self.find_below(children[2], store, w, wm, skip)
            }
            Node::Leaf(items) => items.iter().find_map(|&local| {
                let id = self.ids[local];
                let mask = &self.masks[local];
                (Some(id) != skip
                    && mask.fits_in(wm)
                    && self.magnitudes_fit(mask, store.get(id), w))
                .then_some(id)
            }),
        }
    }

    /// `|h_c| <= |w_c|` on the support of `h` (signs are already known to agree).
    fn magnitudes_fit(&self, mask: &SignMask, h: &[Entry], w: &[Entry]) -> bool {
        mask.support().all(|k| {
            let c = self.comps[k];
            h[c].unsigned_abs() <= w[c].unsigned_abs()
        })
    }
}

/// Child slot of a value: 0 positive, 1 negative, 2 zero.
fn sign_slot(x: Entry) -> usize {
    match x.signum() {
        1 => 0,
        -1 => 1,
        _ => 2,
    }
}

/// The largest `k` with `k * h ⊑ w` on `comps`, given `h ⊑ w` there and `h` nonzero there.
pub(crate) fn max_multiple(h: &[Entry], w: &[Entry], comps: &[usize]) -> Entry {
    comps
        .iter()
        .filter(|&&c| h[c] != 0)
        .map(|&c| w[c] / h[c])
        .min()
        .unwrap_or(1)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn brute(store: &VecStore, comps: &[usize], w: &[Entry]) -> bool {
        store.iter().any(|h| {
            comps
                .iter()
                .all(|&c| h[c] * w[c] >= 0 && h[c].abs() <= w[c].abs())
        })
    }

    #[test]
    fn tree_agrees_with_linear_scan() {
        // A deterministic pseudo-random fill (linear congruential generator, common practice).
        let mut seed: u64 = 7;
        let mut next = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((seed >> 33) % 5) as Entry - 2
        };
        let mut store = VecStore::new(6);
        let comps = vec![0, 2, 3, 5];
        let mut index = Reducer::new(comps.clone());
        for _ in 0..200 {
            let v: Vec<Entry> = (0..6).map(|_| next()).collect();
            if comps.iter().any(|&c| v[c] != 0) {
                let id = store.push(&v);
                index.insert(&store, id);
            }
        }
        for _ in 0..300 {
            let w: Vec<Entry> = (0..6).map(|_| next() * 2).collect();
            let found = index.find(&store, &w, None);
            assert_eq!(found.is_some(), brute(&store, &comps, &w));
            if let Some(h) = found {
                let h = store.get(h);
                assert!(comps
                    .iter()
                    .all(|&c| h[c] * w[c] >= 0 && h[c].abs() <= w[c].abs()));
            }
        }
    }
}
